"""The ``oneshot`` family: a 555-type monostable.

Parts: ``R`` (timing resistor from the supply to the capacitor) and ``C``.
Output: ``width``, the output pulse width.

Second-order effects modelled (see :mod:`timespec.physics.monostable`): the
timer class's threshold-ratio band (from its guaranteed timing error), the
discharge transistor's on-resistance (the capacitor starts slightly above
0 V), the threshold input current and node leakage (a drain on the charging
current), the class's timing drift with temperature and supply, a forced
control voltage, part tolerance, tempco or dielectric drift, and ageing; the
stray the timer's pins and the board add to C and the delay from the threshold
crossing to the output edge (:mod:`timespec.families.timernode`):
``width = s·t_charge(R, C + Cs) + t_pd``.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from timespec.analysis import Factor
from timespec.families.candidates import (
    candidate_values,
    capacitor_part,
    neighbour_parts,
    neighbour_parts_many,
    resistor_part,
)
from timespec.families.capacitors import dielectric_findings, node_leakage
from timespec.families.goals import declare_monotone, scale_to_goal, target
from timespec.families.inputs import (
    apply_part,
    condition_factors,
    drain_current,
    part_factors,
    scaled_time,
    supply_nominal_factor,
    threshold_current,
    timer_factors,
)
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.families.timerclass import timer_class_findings
from timespec.families.timernode import delay_factor, node_stray_factor, node_stray_finding
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm
from timespec.physics import monostable

__all__ = ["OneShot"]


#: Factors in which the width never falls, anywhere in the box: more R or C (any
#: tolerance, ageing, dielectric drift or DC bias), a higher threshold or control voltage, or
#: more current drawn from the node (the node settles lower, so it charges longer).
#: ``t = R·C·ln((V' − v0)/(V' − vth))`` with ``V' = V − i·R`` and ``v0 = V'·ron/(R + ron)``:
#: the ratio ``V'·R/(R + ron)/(V' − vth)`` grows with R, with vth and with i, and the
#: timer's drift terms only scale it by a positive factor.  The stray adds to C and
#: the output delay adds to the width, so the width rises with both.
WIDTH_RISING = frozenset(
    {
        "R.tol",
        "R.age",
        "C.tol",
        "C.age",
        "C.drift",
        "C.bias",
        "timer.ratio",
        "timer.ith",
        "leak",
        "control",
        "stray",
        "timer.delay",
    }
)
#: Factors in which the width never rises: the discharge on-resistance lifts the start.
WIDTH_FALLING = frozenset({"timer.ron"})


class OneShot:
    """555-type monostable family."""

    kind = "oneshot"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: the pulse width.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``width``.
        """
        return (Output("width", "time", "pulse width"),)

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``R`` and ``C``.

        Returns
        -------
        list of Factor
            Parts, conditions, timer class, leakage and (when forced) the control
            voltage; the factors in which the width is monotone say so (see
            :data:`WIDTH_RISING`), which shrinks the worst-case search.
        """
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        out.append(supply_nominal_factor(block))
        out.extend(timer_factors(block, leakage=node_leakage(block, design)))
        assert block.timer is not None
        out.append(node_stray_factor(block.timer))
        out.append(delay_factor(block.timer, block.conditions.supply.low))
        control = block.window("control")
        if control is not None:
            out.append(
                Factor(
                    "control",
                    f"control voltage ({control.low:g}…{control.high:g} V)",
                    control.centre,
                    control.low,
                    control.high,
                    group="operating",
                )
            )
        return [declare_monotone(f, "width", WIDTH_RISING, WIDTH_FALLING) for f in out]

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """The vectorised model.

        Parameters
        ----------
        block
            The block.
        variant
            Unused (one circuit).

        Returns
        -------
        Evaluate
            Samples → ``{"width": ...}``.
        """
        forced = block.window("control") is not None

        zero = np.zeros(1)

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            r = apply_part(x, "R")
            c = apply_part(x, "C") + x.get("stray", zero)
            v = x["supply"]
            i = drain_current(x)
            if forced:
                w = monostable.width_control(r, c, v, x["control"], x["timer.ron"], i)
            else:
                w = monostable.width(r, c, v, x["timer.ratio"], x["timer.ron"], i)
            return {"width": scaled_time(x, w) + x.get("timer.delay", zero)}

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate (R, C) pairs: for each capacitor, the continuous R, snapped.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Candidates; pinned parts are kept as given.

        Notes
        -----
        For each allowed capacitor the resistor that puts the nominal width on
        target is found in closed form from ``t = R·C·ln(...)`` and refined once
        with the full nominal model (drain and on-resistance), then both
        standard neighbours are kept (and, when the policy allows pairs, the
        nearest series/parallel pairs between them, see
        :func:`~timespec.families.candidates.neighbour_parts`).  If R is pinned, the
        same is done for C.
        """
        rp, cp = block.resistors, block.capacitors
        pin_r, pin_c = block.pinned_part("R"), block.pinned_part("C")
        if pin_r is not None and pin_c is not None:
            return [Design((resistor_part("R", 0, rp, pin_r), capacitor_part("C", 0, cp, pin_c)))]
        req = block.requirement("width")
        assert req is not None
        goal = target(req.window)
        model = self.evaluate(block, "")
        probe = Design((resistor_part("R", 1.0, rp), capacitor_part("C", 1.0, cp)))
        nominal = {f.name: np.array([f.nominal]) for f in self.factors(block, probe)}

        def width_for(r: FloatArray, c: FloatArray) -> FloatArray:
            x = dict(nominal)
            x["R.value"] = np.asarray(r, dtype=np.float64)
            x["C.value"] = np.asarray(c, dtype=np.float64)
            n = max(x["R.value"].size, x["C.value"].size)
            x = {k: np.broadcast_to(v, (n,)) for k, v in x.items()}
            return model(x)["width"]

        designs: list[Design] = []
        if pin_c is not None:
            c = np.array([pin_c.value])
            r = scale_to_goal(
                lambda rr: width_for(rr, np.broadcast_to(c, rr.shape)),
                goal,
                goal / (c * np.log(3.0)),
            )
            for rpart in neighbour_parts("R", float(r[0]), rp):
                designs.append(Design((rpart, capacitor_part("C", 0, cp, pin_c))))
            return designs
        if pin_r is not None:
            r_fixed = np.array([pin_r.value])
            c = scale_to_goal(
                lambda cc: width_for(np.broadcast_to(r_fixed, cc.shape), cc),
                goal,
                goal / (r_fixed * np.log(3.0)),
            )
            for cpart in neighbour_parts("C", float(c[0]), cp):
                designs.append(Design((resistor_part("R", 0, rp, pin_r), cpart)))
            return designs
        cs = candidate_values(cp.series, cp.low, cp.high)
        if cs.size == 0:
            return []
        r0 = goal / (cs * np.log(3.0))
        r = scale_to_goal(lambda rr: width_for(rr, cs), goal, r0)
        for cval, rparts in zip(cs, neighbour_parts_many("R", r, rp), strict=True):
            cpart = capacitor_part("C", float(cval), cp)
            designs.extend(Design((rpart, cpart)) for rpart in rparts)
        return designs

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of a one-shot.

        Parameters
        ----------
        block
            The block.
        design
            The design.
        extremes
            Worst-case ``(low, high)`` of each output.

        Returns
        -------
        list of Finding
            Trigger length against the shortest pulse, trigger spacing against
            the longest pulse plus recovery, resistor range and drain, the node
            stray, the timer class's ranges, dielectric.
        """
        out: list[Finding] = []
        lo, hi = extremes["width"]
        r = design.part("R")
        c = design.part("C")
        timer = block.timer
        assert timer is not None
        trig = block.number("trigger")
        if trig is not None and trig >= lo:
            out.append(
                Finding(
                    "error",
                    "trigger-outlasts-pulse",
                    "the trigger is held low for "
                    f"{format_quantity(trig, 'time')} but the pulse can be as short "
                    f"as {format_quantity(lo, 'time')}: "
                    "the output stays high until the trigger returns. "
                    "Shorten the trigger (an RC differentiator on the trigger input) "
                    "or lengthen the pulse.",
                )
            )
        spacing = block.number("spacing")
        if spacing is not None:
            recovery = float(
                monostable.recovery_time(
                    c.value * (1 + c.tolerance),
                    timer.r_on_max,
                    block.conditions.supply.high,
                    2.0 / 3.0,
                )
            )
            if spacing < hi + recovery:
                out.append(
                    Finding(
                        "error",
                        "retrigger-before-recovery",
                        f"triggers may come {format_quantity(spacing, 'time')} "
                        "apart but the pulse can last "
                        f"{format_quantity(hi, 'time')} plus "
                        f"{format_quantity(recovery, 'time')} to discharge the capacitor: "
                        "a trigger would be missed or the next pulse shortened.",
                    )
                )
        if r.value < timer.r_min:
            out.append(
                Finding(
                    "warning",
                    "resistor-too-small",
                    f"R = {format_rkm(r.value, 'resistance')}Ω is below "
                    f"{format_rkm(timer.r_min, 'resistance')}Ω: "
                    "the discharge transistor and supply carry needless current.",
                )
            )
        drain = threshold_current(block) + node_leakage(block, design)
        v = block.conditions.supply.low
        rmax = float(monostable.max_drain_resistance(v, timer.ratio_band[1], drain))
        if r.value * (1 + r.tolerance) >= rmax:
            out.append(
                Finding(
                    "error",
                    "drain-stalls-charge",
                    f"with {format_quantity(drain, 'current')} "
                    "drawn from the timing node the capacitor never "
                    f"reaches the threshold through R = {format_rkm(r.value, 'resistance')}Ω "
                    f"at {v:g} V.",
                )
            )
        elif drain * r.value > 0.01 * v * (1 - timer.ratio_band[1]):
            out.append(
                Finding(
                    "warning",
                    "drain-shifts-timing",
                    "threshold current and leakage "
                    f"({format_quantity(drain, 'current')}) through R = "
                    f"{format_rkm(r.value, 'resistance')}Ω shift the width by more than 1 %; "
                    "a smaller R with a larger C is more robust.",
                )
            )
        out.extend(node_stray_finding(c, timer))
        out.extend(timer_class_findings(block))
        out.extend(dielectric_findings(block, c))
        return out
