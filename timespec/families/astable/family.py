"""The astable family object: the Family protocol, dispatching to the variant modules.

:class:`Astable` assembles what the solver and analysis need from the variant
modules: the factors (shared parts, conditions and timer class, then the
variant's own: the diode drop, the feedback output levels), the vectorised model
(the variant's half-periods with the timer's drift, then all five outputs), the
candidates (:mod:`~timespec.families.astable.search`) and the design rules
(shared ones here, the variant's own from its module).

Second-order effects modelled (see :mod:`timespec.physics.astable`): the timer
class's threshold-ratio band, discharge on-resistance (the discharge pin is a
Thevenin source of ``RA`` against ``r_on``), threshold input current and node
leakage, the class's timing drift with temperature and supply, the diode drop
and its tempco, the output levels of the feedback circuit, part tolerance,
tempco or dielectric drift, and ageing.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping

import numpy as np

from timespec.analysis import Factor
from timespec.families.astable import classic, diode, feedback, search
from timespec.families.astable.discharge import discharge_findings
from timespec.families.astable.monotone import declared
from timespec.families.astable.variants import VARIANTS, duty_findings
from timespec.families.capacitors import dielectric_findings, node_leakage
from timespec.families.inputs import (
    condition_factors,
    part_factors,
    scaled_time,
    supply_nominal_factor,
    timer_factors,
)
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.families.timerclass import timer_class_findings
from timespec.families.timernode import delay_factor, node_stray_factor, node_stray_finding
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm

__all__ = ["Astable"]

#: Each variant's half-periods before the timer's drift.
_HALF_PERIODS: Mapping[str, Callable[[Inputs], tuple[FloatArray, FloatArray]]] = {
    "classic": classic.half_periods,
    "diode": diode.half_periods,
    "feedback": feedback.half_periods,
}

#: What keeps the capacitor from a threshold when a variant stalls.
_STALL_CAUSE: Mapping[str, str] = {
    "classic": classic.STALL_CAUSE,
    "diode": diode.STALL_CAUSE,
    "feedback": feedback.STALL_CAUSE,
}


def _ohms(r: float) -> str:
    return f"{format_rkm(r, 'resistance')}Ω"


def _delay_share(block: Block, extremes: Mapping[str, tuple[float, float]]) -> list[Finding]:
    """A note when the timer's output delay is more than 1 % of the shortest period."""
    timer = block.timer
    assert timer is not None
    t_lo = extremes.get("period", (math.nan, math.nan))[0]
    d_hi = timer.delay_band(block.conditions.supply.low)[1]
    if not (math.isfinite(t_lo) and t_lo > 0 and 2 * d_hi > 0.01 * t_lo):
        return []
    return [
        Finding(
            "note",
            "timer-delay-share",
            f"the {timer.name} timer's output delay (up to {format_quantity(d_hi, 'time')} "
            f"per edge) is {2 * d_hi / t_lo * 100:.2g} % of the shortest period "
            f"{format_quantity(t_lo, 'time')}; the worst case includes the class's band (from "
            "memory), so check it against your part's datasheet.",
        )
    ]


def _outputs(th: FloatArray, tl: FloatArray) -> dict[str, FloatArray]:
    """All five outputs from the two half-periods (``inf`` when it stalls)."""
    period = np.asarray(th + tl, dtype=np.float64)
    finite = np.isfinite(period)
    with np.errstate(divide="ignore", invalid="ignore"):
        freq = np.where(finite, 1.0 / np.where(finite, period, 1.0), 0.0)
        duty = np.where(finite, th / np.where(finite, period, 1.0), np.inf)
    nan = np.isnan(period)
    return {
        "frequency": np.where(nan, np.nan, freq),
        "period": period,
        "duty": np.where(nan, np.nan, duty),
        "high": np.asarray(th, dtype=np.float64),
        "low": np.asarray(tl, dtype=np.float64),
    }


class Astable:
    """555-type astable family (classic, steering-diode and output-feedback circuits)."""

    kind = "astable"

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
            Output("frequency", "frequency", "frequency"),
            Output("period", "time", "period"),
            Output("duty", "ratio", "duty cycle"),
            Output("high", "time", "high time"),
            Output("low", "time", "low time"),
        )

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``RA``, ``RB``, ``C`` (classic, diode) or ``R``, ``C`` (feedback).

        Returns
        -------
        list of Factor
            Parts, conditions, timer class and leakage; for the diode circuit
            ``diode.v25`` (drop at 25 °C, V) and ``diode.tc`` (mV/K); for the
            feedback circuit ``output.drop`` (high level below the supply, V) and
            ``output.low`` (low level, V).  The discharge on-resistance is left
            out of the feedback circuit, which does not use the discharge pin.
            Proven monotone outputs are declared where that pays
            (:func:`~timespec.families.astable.monotone.declared`).
        """
        assert block.timer is not None
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        out.append(supply_nominal_factor(block))
        timer = timer_factors(block, leakage=node_leakage(block, design))
        timer.append(node_stray_factor(block.timer))
        timer.append(delay_factor(block.timer, block.conditions.supply.low))
        if design.variant == "feedback":
            timer = [f for f in timer if f.name not in feedback.UNUSED_TIMER_FACTORS]
            out.extend(timer)
            out.extend(feedback.output_factors(block))
            return declared(out, "feedback")
        out.extend(timer)
        if design.variant == "diode":
            out.extend(diode.drop_factors(block))
        return declared(out, design.variant)

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """The vectorised model of one circuit variant.

        Parameters
        ----------
        block
            The block.
        variant
            ``"classic"``, ``"diode"`` or ``"feedback"``.

        Returns
        -------
        Evaluate
            Samples → ``{"frequency", "period", "duty", "high", "low"}``; ``period``,
            ``high``, ``low`` and ``duty`` are ``inf`` (``frequency`` 0) where a
            threshold is never reached.

        Notes
        -----
        The variant's half-periods (``half_periods`` of
        :mod:`~timespec.families.astable.classic`,
        :mod:`~timespec.families.astable.diode` or
        :mod:`~timespec.families.astable.feedback`) both get the timer's
        temperature and supply drift (:func:`scaled_time`); then
        ``T = tH + tL``, ``f = 1/T``, ``D = tH/T``.
        """
        if variant not in VARIANTS:
            raise ValueError(f"unknown astable variant {variant!r}")
        half_periods = _HALF_PERIODS[variant]

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            th, tl = half_periods(x)
            return _outputs(scaled_time(x, th), scaled_time(x, tl))

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate designs for every variant considered, narrowed analytically.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Candidates (classic first, then diode, then feedback); pinned parts kept.

        Raises
        ------
        SpecValueError
            When pinned part references do not fit the pinned circuit.

        Notes
        -----
        Closed-form resistors per allowed capacitor, refined against the nominal
        model, snapped to standard values and re-aimed at the worst-case window:
        see :func:`~timespec.families.astable.search.candidates`.
        """
        return search.candidates(self, block)

    def _design(self, block: Block, variant: str, values: Mapping[str, float]) -> Design:
        """A design of the variant from part values (see :func:`search.design_from_values`)."""
        return search.design_from_values(block, variant, values)

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of an astable.

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
            Duty cycle out of the circuit's reach, feedback circuit on a timer
            without rail-to-rail output, no oscillation at some corner, discharge
            current above the class limit (with the smallest RA), frequency above
            the class limit, timing resistor below the class's useful minimum,
            the node stray, the output delay's share, the timer class's ranges
            and the capacitor's dielectric.
        """
        timer = block.timer
        assert timer is not None
        out: list[Finding] = []
        variant = design.variant
        out.extend(duty_findings(block, variant))
        if variant == "feedback":
            out.extend(feedback.rail_findings(block))
            out.extend(feedback.current_findings(block, design))
        if variant == "diode":
            out.extend(diode.current_findings(block, design))
        hi_ex = extremes.get("high", (0.0, 0.0))
        lo_ex = extremes.get("low", (0.0, 0.0))
        if not (math.isfinite(hi_ex[1]) and math.isfinite(lo_ex[1])):
            which = "upper" if not math.isfinite(hi_ex[1]) else "lower"
            cause = _STALL_CAUSE[variant]
            out.append(
                Finding(
                    "error",
                    "does-not-oscillate",
                    f"at some corner the capacitor never reaches the {which} threshold: {cause} "
                    "keeps it short. Use smaller resistors with a larger capacitor, or a higher "
                    "supply.",
                )
            )
        if variant in ("classic", "diode"):
            out.extend(discharge_findings(block, design))
        f_hi = extremes.get("frequency", (0.0, 0.0))[1]
        if math.isfinite(f_hi) and f_hi > timer.f_max:
            advice = (
                "Use 'timer cmos' (about 1 MHz) or a lower frequency."
                if timer.name != "cmos"
                else "A 555-type timer is the wrong circuit here: use a Schmitt-inverter "
                "relaxation oscillator or a crystal, or a lower frequency."
            )
            out.append(
                Finding(
                    "error",
                    "frequency-above-class",
                    f"the design runs at up to {format_quantity(f_hi, 'frequency')}, "
                    f"above the {format_quantity(timer.f_max, 'frequency')} "
                    f"the {timer.name} timer class is used at. {advice}",
                )
            )
        small = [p for p in design.parts if p.ref in ("RB", "R") and p.value < timer.r_min]
        for p in small:
            out.append(
                Finding(
                    "warning",
                    "resistor-too-small",
                    f"{p.ref} = {_ohms(p.value)} is below {_ohms(timer.r_min)}: the discharge "
                    "transistor (or output) carries needless current and its saturation "
                    "shifts the timing. Prefer a larger resistor with a smaller capacitor.",
                )
            )
        out.extend(node_stray_finding(design.part("C"), timer))
        out.extend(_delay_share(block, extremes))
        out.extend(timer_class_findings(block))
        out.extend(dielectric_findings(block, design.part("C")))
        return out
