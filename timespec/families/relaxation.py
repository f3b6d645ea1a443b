"""The ``relaxation`` family: a Schmitt-inverter RC oscillator.

Parts: ``R`` (from the inverter's output back to its input) and ``C`` (from the
input to ground).  Outputs: ``frequency``, ``period``, ``duty``, ``high`` and
``low`` (the output's high and low times).

The output swings rail to rail; the capacitor runs between the falling
threshold VT− and the rising threshold VT+, so (see
:mod:`timespec.physics.relaxation`)::

    T = R·C·[ln(VT+/VT−) + ln((V − VT−)/(V − VT+))]

Thresholds
----------
The gate class's threshold bands and the two factors that span their feasible
pairs exactly (``gate.hysteresis``, ``gate.centre``) live in
:mod:`timespec.families.schmitt`, with the argument why the worst case sits on
grid nodes.

Leakage is the gate's input current, ``±i_input_max``, plus the ``leakage``
bound of the capacitor and board (a drain only) and an electrolytic's own
leakage.  The input pin and the board add a stray capacitance (``stray``) to C,
and the gate switches its output a propagation delay (``gate.delay``) after the
input crosses a threshold, which lengthens each half-period by the delay and
the overshoot it lets the capacitor make
(:func:`timespec.physics.relaxation.delayed_times`); the delay band is widened
below the supply it is quoted at (see :mod:`timespec.families.logicinput`).

Period, frequency, high and low time are monotone in the stray and the gate
delay (more of either lengthens both halves); the duty cycle depends on them
only through ``t_pd/(R·C)`` and is monotone in that ratio (checked on a dense
grid of thresholds and leakage shifts in the tests), so both factors are
searched at their ends.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np

from timespec.analysis import Factor, grouped_shares, rss, worst_case
from timespec.families.capacitors import dielectric_findings
from timespec.families.inputs import apply_part, condition_factors, part_factors
from timespec.families.logicinput import (
    gate_delay_band,
    gate_delay_factor,
    gate_stretches,
    node_leakage_band,
    stray_factor,
    stray_finding,
)
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.families.rcscale import rc_candidates
from timespec.families.schmitt import (
    centre_position,
    threshold_centre,
    thresholds,
    width_knots,
)
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm
from timespec.physics import relaxation

__all__ = ["Relaxation"]

#: Factor group of the gate's thresholds (used for the share of the spread).
GATE_GROUP = "gate thresholds"


def _leak_bounds(block: Block, design: Design) -> tuple[float, float]:
    band = node_leakage_band(block, design, block.gate, add_stated=True)
    return band.low, band.high


class Relaxation:
    """Schmitt-inverter RC oscillator family."""

    kind = "relaxation"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: frequency, period, duty cycle, high and low time.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``frequency``, ``period``, ``duty``, ``high``, ``low``.
        """
        return (
            Output("frequency", "frequency", "oscillation frequency"),
            Output("period", "time", "period"),
            Output("duty", "ratio", "duty cycle (share of the period high)"),
            Output("high", "time", "output high time"),
            Output("low", "time", "output low time"),
        )

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
            Parts, ambient and supply, ``gate.hysteresis`` and ``gate.centre``
            (see the module notes), ``leak``, the signed input leakage
            (A, positive drains the node), ``stray`` (F) and ``gate.delay`` (s).
        """
        gate = block.gate
        assert gate is not None
        th = thresholds(block)
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        w_lo, w_hi = th.width_low, th.width_high
        w_nom = min(max(th.rise_typ - th.fall_typ, w_lo), w_hi)
        g_nom = centre_position(th, w_nom, 0.5 * (th.rise_typ + th.fall_typ))
        us, ws = width_knots(th)
        u_nom = float(np.interp(w_nom, ws, us)) if w_hi > w_lo else 0.0
        out.append(
            Factor(
                "gate.hysteresis",
                f"{gate.name} gate hysteresis VT+ − VT− (0…1 across {w_lo:.3g}…{w_hi:.3g} "
                "of supply)",
                u_nom,
                0.0,
                1.0,
                monotone=False,
                group=GATE_GROUP,
            )
        )
        out.append(
            Factor(
                "gate.centre",
                f"{gate.name} gate threshold position (−1…1 across VT+ {th.rise_low:.3g}…"
                f"{th.rise_high:.3g}, VT− {th.fall_low:.3g}…{th.fall_high:.3g} of supply)",
                g_nom,
                -1.0,
                1.0,
                monotone=False,
                group=GATE_GROUP,
            )
        )
        i_lo, i_hi = _leak_bounds(block, design)
        out.append(
            Factor(
                "leak",
                f"input and node leakage ({i_lo:.3g}…{format_quantity(i_hi, 'current')})",
                0.0,
                i_lo,
                i_hi,
                monotone=False,
                group="leakage",
            )
        )
        out.append(stray_factor(gate))
        out.append(gate_delay_factor(gate, block.conditions.supply.low, "gate delay"))
        return out

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
            Samples → frequency (Hz, 0 when it does not oscillate), period,
            high and low time (s, ``inf`` when it does not oscillate) and duty
            (``inf`` when it does not oscillate).

        Notes
        -----
        ``VT± = (c ± w/2)·V``; the physics adds the drain ``i`` to both phases
        (``tH = R·C·ln((V − i·R − VT−)/(V − i·R − VT+))``,
        ``tL = R·C·ln((VT+ + i·R)/(VT− + i·R))`` without gate delay), C includes
        the stray, and the gate delay enters through
        :func:`~timespec.physics.relaxation.delayed_times`.

        References
        ----------
        First-order RC charge and discharge laws, any circuit-theory handbook;
        the Schmitt-inverter oscillator relation as in the module notes.
        """
        th = thresholds(block)
        us, ws = width_knots(th)

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            r = apply_part(x, "R")
            c = apply_part(x, "C") + x["stray"]
            v = x["supply"]
            i = x["leak"]
            w = np.interp(x["gate.hysteresis"], us, ws)
            e = i * r / v
            centre = threshold_centre(th, w, x["gate.centre"], e)
            vt_plus = (centre + 0.5 * w) * v
            vt_minus = (centre - 0.5 * w) * v
            t_h, t_l = relaxation.delayed_times(r, c, v, 0.0, vt_plus, vt_minus, x["gate.delay"], i)
            period = t_h + t_l
            ok = np.isfinite(period)
            with np.errstate(divide="ignore", invalid="ignore"):
                freq = np.where(ok, 1.0 / np.where(ok, period, 1.0), 0.0)
                duty = np.where(ok, t_h / np.where(ok, period, 1.0), np.inf)
            return {
                "frequency": np.asarray(freq, dtype=np.float64),
                "period": np.asarray(period, dtype=np.float64),
                "duty": np.asarray(duty, dtype=np.float64),
                "high": np.asarray(t_h, dtype=np.float64),
                "low": np.asarray(t_l, dtype=np.float64),
            }

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
        As for the delay family (:func:`timespec.families.rcscale.rc_candidates`):
        the nominal period is aimed so that the worst-case window is centred on
        the requirement, R is solved per capacitor from ``T = R·C·K`` and
        snapped; R stays inside the gate class's usable range where the
        resistor policy allows.
        """
        gate = block.gate
        assert gate is not None
        return rc_candidates(self, block, "period", r_limits=(gate.r_min, gate.r_max))

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of a Schmitt-inverter oscillator.

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
            Inconsistent threshold bands, no oscillation, frequency above the
            class's limit (errors); R outside the class's usable range, leakage
            shifting the thresholds, timing capacitor comparable with the stray
            (warnings); the share of the spread due to the thresholds, gate
            delay a noticeable share of the period, the longer first cycle
            (notes); gate class used outside its ranges; dielectric.
        """
        gate = block.gate
        assert gate is not None
        th = thresholds(block)
        out: list[Finding] = []
        r, c = design.part("R"), design.part("C")
        s = block.conditions.supply
        f_lo, f_hi = extremes["frequency"]
        t_lo, t_hi = extremes["period"]
        if not th.consistent:
            out.append(
                Finding(
                    "error",
                    "thresholds-overlap",
                    f"the rising band tops out at {th.rise_high:.3g} of the supply and the falling "
                    f"band starts at {th.fall_low:.3g}: less than the {gate.name} class's minimum "
                    f"hysteresis {th.hysteresis_min:.3g}. Check the 'rising' and 'falling' bands.",
                )
            )
        if not (math.isfinite(t_hi) and f_lo > 0):
            out.append(
                Finding(
                    "error",
                    "no-oscillation",
                    "at some corner the input never reaches a threshold (leakage through R "
                    "shifts the node past it): the circuit can stop. Use a smaller R with a "
                    "larger C.",
                )
            )
        slow = gate.slowdown(s.low)
        f_max = gate.f_max / slow
        at = f" at {s.low:g} V" if slow > 1.0 else ""
        if f_hi > f_max:
            out.append(
                Finding(
                    "error",
                    "frequency-above-gate-limit",
                    f"the frequency can reach {f_hi:.4g} Hz, above the {gate.name} class's "
                    f"{f_max:.3g} Hz{at} for an RC oscillator. Use a faster gate class, a higher "
                    "supply, or a crystal or timer circuit.",
                )
            )
        d_hi = gate_delay_band(gate, s.low)[1]
        if math.isfinite(t_lo) and t_lo > 0 and 2 * d_hi > 0.01 * t_lo:
            out.append(
                Finding(
                    "note",
                    "gate-delay-share",
                    f"the gate's propagation delay (up to {format_quantity(d_hi, 'time')} per "
                    f"edge{at}) is {2 * d_hi / t_lo * 100:.2g} % of the shortest period "
                    f"{format_quantity(t_lo, 'time')}; the worst case includes it, but it "
                    "depends on the load at the output: keep that load small.",
                )
            )
        rv = format_rkm(r.value, "resistance")
        if r.value < gate.r_min:
            out.append(
                Finding(
                    "warning",
                    "resistor-below-gate-range",
                    f"R = {rv}Ω is below {format_rkm(gate.r_min, 'resistance')}Ω: the gate output "
                    "then carries enough current to sag below the rails, which the model (rail "
                    "to rail) does not include. Use a larger R with a smaller C.",
                )
            )
        if r.value > gate.r_max:
            out.append(
                Finding(
                    "error",
                    "resistor-above-gate-range",
                    f"R = {rv}Ω is above {format_rkm(gate.r_max, 'resistance')}Ω, beyond the "
                    f"usable range of a {gate.name} input: leakage that grows when hot, pickup "
                    "and the input capacitance govern the timing. Use a smaller R with a larger C.",
                )
            )
        i_lo, i_hi = _leak_bounds(block, design)
        shift = max(abs(i_lo), abs(i_hi)) * r.value * (1 + r.tolerance)
        if shift > 0.5 * th.hysteresis_min * s.low:
            out.append(
                Finding(
                    "warning",
                    "leakage-shifts-thresholds",
                    "input and node leakage (up to "
                    f"{format_quantity(max(abs(i_lo), abs(i_hi)), 'current')}) "
                    "through "
                    f"R = {rv}Ω shifts the node by up to {shift:.3g} V, more than half of "
                    f"the minimum hysteresis ({th.hysteresis_min * s.low:.3g} V at {s.low:g} V); "
                    "the worst case includes it, but a smaller R with a larger C is steadier.",
                )
            )
        out.extend(self._threshold_share(block, design, t_lo, t_hi))
        first = float(relaxation.high_time(r.value, c.value, 1.0, th.rise_typ, 1e-300))
        out.append(
            Finding(
                "note",
                "first-cycle-longer",
                f"after power-up the capacitor starts at 0 V, so the first high time is about "
                f"{format_quantity(first, 'time')} "
                "(typical thresholds) instead of the steady one; allow for it "
                "if the first edges are counted.",
            )
        )
        out.extend(stray_finding(block, c, gate))
        overridden = block.window("rising") is not None and block.window("falling") is not None
        out.extend(gate_stretches(block, gate, thresholds=not overridden))
        out.extend(dielectric_findings(block, c))
        return out

    def _threshold_share(
        self, block: Block, design: Design, t_lo: float, t_hi: float
    ) -> list[Finding]:
        """Share of the period spread due to the gate thresholds, as a note."""
        factors = self.factors(block, design)
        model = self.evaluate(block, design.variant)
        spread = rss(factors, model)["period"]
        shares = dict(grouped_shares(spread))
        share = shares.get(GATE_GROUP, 0.0)
        only = [
            f
            if f.group == GATE_GROUP
            else Factor(f.name, f.label, f.nominal, f.nominal, f.nominal, "fixed", group=f.group)
            for f in factors
        ]
        alone = worst_case(only, model)["period"]
        if not (math.isfinite(share) and math.isfinite(alone.high) and alone.nominal > 0):
            return []
        down = (alone.low / alone.nominal - 1) * 100
        up = (alone.high / alone.nominal - 1) * 100
        return [
            Finding(
                "note",
                "thresholds-dominate" if share >= 0.5 else "threshold-share",
                f"the gate thresholds cause {share * 100:.0f} % of the period's spread (RSS); "
                f"alone they move the period {down:+.0f} %…{up:+.0f} % about its nominal "
                f"{format_quantity(alone.nominal, 'time')} "
                f"(worst case with everything: {format_quantity(t_lo, 'time')}…"
                f"{format_quantity(t_hi, 'time')}). "
                "When the window is tighter, trim R on each board or use "
                "a 555-type timer, whose thresholds come from a resistor divider.",
            )
        ]
