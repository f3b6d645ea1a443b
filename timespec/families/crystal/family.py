"""The crystal family's Family protocol: factors, model, candidates and rules."""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping

from timespec.analysis import Factor, worst_case
from timespec.families.candidates import capacitor_part
from timespec.families.capacitors import dielectric_findings
from timespec.families.crystal.budget import Budget, budget_of
from timespec.families.crystal.rules import drive_findings, gain_findings, load_findings
from timespec.families.crystal.settings import (
    MIN_GAIN_MARGIN,
    PPM,
    ageing,
    ageing_span,
    allowed_values,
    band,
    band_factor,
    capacitor_policy,
    load_pair,
    needed,
    neighbour_values,
    pf,
    ppm,
    stray_window,
    values_around,
)
from timespec.families.inputs import apply_part, condition_factors, part_factors
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.model import Block
from timespec.parts.part import Design
from timespec.physics import pierce

__all__ = ["Crystal", "accuracy_budget"]


class Crystal:
    """Pierce crystal oscillator family (load capacitors, ppm budget, gain, drive)."""

    kind = "crystal"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: accuracy, pulling, load, gain margin (or gm needed), drive.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``accuracy``, ``pulling`` (fractions), ``load`` (F), ``gain_margin``
            (dimensionless; ``gm_needed`` in A/V when the block states no ``gm``)
            and ``drive`` (W).
        """
        gain = (
            Output("gain_margin", "factor", "gain margin gm/gm_crit")
            if block.number("gm") is not None
            else Output("gm_needed", "transconductance", f"gm for a margin of {MIN_GAIN_MARGIN:g}")
        )
        return (
            Output("accuracy", "ratio", "frequency error over life"),
            Output("pulling", "ratio", "pulling by load mismatch"),
            Output("load", "capacitance", "load capacitance seen by the crystal"),
            gain,
            Output("drive", "power", "crystal drive level"),
        )

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``C1`` and ``C2``.

        Returns
        -------
        list of Factor
            Both capacitors (value, tolerance, tempco or drift, ageing), the
            ambient and supply, the stray capacitance, and the crystal's
            calibration, stability and ageing bands.
        """
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        s = stray_window(block)
        out.append(
            Factor(
                "stray",
                f"stray capacitance ({pf(s.low)}…{pf(s.high)})",
                s.centre,
                s.low,
                s.high,
                group="board",
            )
        )
        tol, stab, age = band(block, "tolerance"), band(block, "stability"), ageing(block)
        out.append(
            band_factor("xtal.cal", f"crystal calibration ({ppm(tol.low)}…{ppm(tol.high)})", tol)
        )
        out.append(
            band_factor(
                "xtal.temp",
                f"crystal stability over temperature ({ppm(stab.low)}…{ppm(stab.high)})",
                stab,
            )
        )
        out.append(
            band_factor(
                "xtal.age",
                f"crystal ageing {ageing_span(block)} ({ppm(age.low)}…{ppm(age.high)})",
                age,
            )
        )
        # Not declared here (see :func:`~timespec.families.crystal.monotone.declare`):
        # every group of outputs with declarations costs two searches instead of one,
        # and on this family's small
        # grid (9 to 12 two-level factors) that overhead outweighs the points saved
        # (one design's worst case took 0.6 ms plain, 1.9 ms declared).
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
            Samples → ``accuracy``, ``pulling``, ``load``, ``gain_margin`` or
            ``gm_needed``, ``drive``.

        Notes
        -----
        ``CL = C1·C2/(C1 + C2) + Cs``; pulling
        ``(Cm/2)·(1/(C0 + CL) − 1/(C0 + CL_spec))``; accuracy
        ``cal + temp + age + pulling``; ``gm_crit`` from
        :func:`timespec.physics.pierce.critical_gm_caps` with the stray counted
        with ``C0`` (equal capacitors: ``4·ESR·(2πf)²·(C0 + CL)²``); drive
        ``ESR·(2πf·(C0 + CL)·Vpp·(1 + C2/C1)/(2√2))²`` with ``Vpp`` the swing at
        the amplifier output node
        (:func:`timespec.physics.pierce.drive_level_from_output`).  The gain margin
        is monotone in each capacitor for the near-equal pairs this family builds, so
        its corners are exact.
        """
        f = needed(block, "frequency")
        cl_spec = needed(block, "load")
        c0 = needed(block, "shunt")
        cm = needed(block, "motional")
        esr = needed(block, "esr")
        gm = block.number("gm")
        swing = block.number("swing")
        # pulling = offset(CL) − offset(CL_spec), the second term a constant
        offset_spec = float(pierce.load_offset_ppm(cm, c0, cl_spec))

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            c1 = apply_part(x, "C1")
            c2 = apply_part(x, "C2")
            cs = x["stray"]
            cl = pierce.load_capacitance(c1, c2, cs)
            pull = (pierce.load_offset_ppm(cm, c0, cl) - offset_spec) * PPM
            acc = x["xtal.cal"] + x["xtal.temp"] + x["xtal.age"] + pull
            gm_crit = pierce.critical_gm_caps(esr, f, c0 + cs, c1, c2)
            vpp = x["supply"] if swing is None else swing
            # swing: peak-to-peak at the amplifier output node; the crystal sees
            # about Vpp·(1 + C2/C1) of it (Pierce loop).
            drive = pierce.drive_level_from_output(esr, f, c0, c1, c2, cs, vpp)
            out = {"accuracy": acc, "pulling": pull, "load": cl, "drive": drive}
            if gm is None:
                out["gm_needed"] = MIN_GAIN_MARGIN * gm_crit
            else:
                out["gain_margin"] = pierce.gain_margin(gm, gm_crit)
            return out

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate (C1, C2) pairs around ``2·(CL − Cs_mid)``.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Equal pairs from both standard neighbours of the ideal value, and the
            unequal pair of adjacent values between them (which centres the load
            between the two equal pairs); pinned parts are kept as given.  When the
            load is at or below the stray capacitance, the smallest allowed pair
            (the closest a design can come; the findings say why it fails).

        Notes
        -----
        Equal capacitors: ``C1 = C2 = 2·(CL − Cs)`` with ``Cs`` the middle of the
        stray window.  With one capacitor pinned, the other solves
        ``C1·C2/(C1 + C2) = CL − Cs`` and is snapped to both neighbours.  Of an
        unequal pair the larger goes on C2 (load and ``gm_crit`` are symmetric in
        the two, so the order is a labelling choice).
        """
        policy = capacitor_policy(block)
        cl_spec = needed(block, "load")
        cs = stray_window(block).centre
        pin1, pin2 = block.pinned_part("C1"), block.pinned_part("C2")
        if pin1 is not None and pin2 is not None:
            return [
                Design(
                    (capacitor_part("C1", 0, policy, pin1), capacitor_part("C2", 0, policy, pin2))
                )
            ]
        series_cap = cl_spec - cs
        if pin1 is not None or pin2 is not None:
            pinned = pin1 if pin1 is not None else pin2
            assert pinned is not None
            other = "C2" if pin1 is not None else "C1"
            values: list[float] = []
            if series_cap > 0 and pinned.value > series_cap:
                ideal = pinned.value * series_cap / (pinned.value - series_cap)
                values = neighbour_values(policy, ideal)
            if not values:
                values = [float(v) for v in allowed_values(policy)[:1]]
            out = []
            for v in values:
                free = capacitor_part(other, v, policy)
                fixed = capacitor_part(pinned.ref, 0, policy, pinned)
                pair = (fixed, free) if pinned.ref == "C1" else (free, fixed)
                out.append(Design(pair))
            return out
        if series_cap <= 0:
            smallest = allowed_values(policy)[:1]
            return [load_pair(policy, float(v), float(v)) for v in smallest]
        vals = neighbour_values(policy, 2.0 * series_cap)
        if len(vals) == 1:
            vals = values_around(policy, vals[0])
        designs = [load_pair(policy, v, v) for v in vals]
        designs += [load_pair(policy, a, b) for a, b in itertools.pairwise(vals)]
        return designs

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of a Pierce oscillator.

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
            Load against stray, gain margin, drive level (with a series resistor
            suggestion), unequal capacitors, the ppm budget, and the dielectrics.
        """
        out: list[Finding] = []
        c1, c2 = design.part("C1"), design.part("C2")
        cl_spec = needed(block, "load")
        f = needed(block, "frequency")
        s = stray_window(block)
        out.extend(load_findings(block, cl_spec, s, capacitor_policy(block)))
        out.extend(gain_findings(block, extremes))
        out.extend(drive_findings(block, extremes, f, c1, c2))
        if not math.isclose(c1.value, c2.value, rel_tol=1e-9):
            out.append(
                Finding(
                    "note",
                    "unequal-caps",
                    f"C1 = {pf(c1.value)} and C2 = {pf(c2.value)} differ: the pair centres the "
                    f"load better than equal standard values; swapping them does not change the "
                    "load or the gain margin.",
                )
            )
        factors = self.factors(block, design)
        b = budget_of(
            block,
            factors,
            self.evaluate(block, design.variant),
            extremes["accuracy"],
            extremes["pulling"],
        )
        out.append(
            Finding(
                "note",
                "ppm-budget",
                f"frequency error over {block.conditions.life_years:g} years: worst case "
                f"±{ppm(b.worst_case)} (calibration {ppm(b.calibration)} + temperature "
                f"{ppm(b.temperature)} + ageing {ppm(b.ageing)} + load pulling "
                f"{ppm(b.pulling)}), RSS ±{ppm(b.rss)}.",
            )
        )
        for part in (c1, c2):
            out.extend(dielectric_findings(block, part))
        return out


# --------------------------------------------------------------------------
# helpers


def accuracy_budget(block: Block, design: Design) -> Budget:
    """Worst-case and RSS frequency-error budget of a design.

    Parameters
    ----------
    block
        A crystal block.
    design
        Parts ``C1`` and ``C2``.

    Returns
    -------
    Budget
        The terms, their exact worst-case sum and their RSS, as fractions.

    Notes
    -----
    Worst case: the extremes of ``cal + temp + age + pull`` over every corner
    (exact, the sum is linear in each term).  RSS:
    ``|y_nom| + sqrt(sum_i (c_i·h_i)**2)`` with ``y_nom`` the nominal error (the
    load offset of the chosen standard values), ``c_i`` the first-order
    sensitivity and ``h_i`` the half-range of factor ``i``: the usual
    statistical stack-up, with the systematic offset added linearly.

    References
    ----------
    Sum for a guarantee, root-sum-square for a statistical figure: common practice
    for frequency budgets; first-order sensitivities as in JCGM 100 (GUM) 5.1.2.
    """
    fam = Crystal()
    factors = fam.factors(block, design)
    model = fam.evaluate(block, design.variant)
    ex = worst_case(factors, model)
    return budget_of(
        block,
        factors,
        model,
        (ex["accuracy"].low, ex["accuracy"].high),
        (ex["pulling"].low, ex["pulling"].high),
    )
