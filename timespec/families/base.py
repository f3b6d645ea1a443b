"""Pieces every circuit family shares: findings, outputs, the protocol and the factor models.

Parts and designs live in :mod:`timespec.families.parts` and are re-exported
here, so a family imports its whole kit from one place.

A *family* (one module per circuit kind) turns a :class:`~timespec.model.Block`
into three things the generic solver and analysis need:

* candidate designs (parts chosen from the policies, narrowed analytically);
* the varying inputs, as :class:`~timespec.analysis.Factor` objects;
* a vectorised ``evaluate`` that maps factor samples to the measured outputs.

Part values enter ``evaluate`` as *fixed* factors named ``"<ref>.value"``, so one
``evaluate`` serves a whole batch of candidate designs at once (the solver passes
arrays of values).  The helpers below build the factors for parts, operating
conditions and timer classes, and apply them, so each family states only its
own physics.
"""

from __future__ import annotations

import dataclasses
import functools
import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from timespec import dielectrics
from timespec.analysis import Factor
from timespec.families.parts import (
    Design,
    FloatArray,
    Part,
    candidate_values,
    capacitor_part,
    neighbour_parts,
    neighbour_parts_many,
    pair_part,
    resistor_part,
    snap,
)
from timespec.fmt import format_quantity
from timespec.model import Block, Window

__all__ = [
    "Design",
    "Evaluate",
    "Family",
    "Finding",
    "FloatArray",
    "Output",
    "Part",
    "apply_part",
    "candidate_values",
    "capacitor_part",
    "condition_factors",
    "declare_monotone",
    "dielectric_findings",
    "neighbour_parts",
    "neighbour_parts_many",
    "node_leakage",
    "pair_part",
    "part_factors",
    "resistor_part",
    "scale_to_goal",
    "scaled_time",
    "snap",
    "timer_factors",
]

Inputs = Mapping[str, FloatArray]
Evaluate = Callable[[Inputs], dict[str, FloatArray]]

REFERENCE_C = 25.0  # °C, where tolerances and tempcos are referred to


@dataclass(frozen=True)
class Finding:
    """A design-rule finding.

    Attributes
    ----------
    severity
        ``"error"`` (the design cannot work as required), ``"warning"`` (it works
        but something is fragile) or ``"note"``.
    code
        Stable short name, e.g. ``"trigger-outlasts-pulse"``.
    message
        What was found and what to do.
    """

    severity: str
    code: str
    message: str


@dataclass(frozen=True)
class Output:
    """A quantity a family computes.

    Attributes
    ----------
    name
        Output key, e.g. ``"width"``.
    kind
        Kind of quantity, e.g. ``"time"``.
    label
        Human label.
    """

    name: str
    kind: str
    label: str


class Family(Protocol):
    """What a circuit family provides to the solver and analysis."""

    kind: str

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs computed for the block (requirements refer to these names)."""

    def candidates(self, block: Block) -> list[Design]:
        """Candidate designs, narrowed analytically, pinned parts honoured."""

    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs for a design (part values as fixed ``<ref>.value`` factors)."""

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """Vectorised model of the circuit variant."""

    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design-rule findings, given the worst-case extremes of each output."""


# --------------------------------------------------------------------------
# factors


def _tol_distribution(block: Block) -> tuple[str, float]:
    return block.statistics.distribution, block.statistics.sigmas


def part_factors(block: Block, part: Part) -> list[Factor]:
    """Factors of one part: its value (fixed), tolerance, temperature and ageing.

    Parameters
    ----------
    block
        The block (for the ambient range, life and spread).
    part
        The part.

    Returns
    -------
    list of Factor
        ``<ref>.value`` (fixed), ``<ref>.tol``, and ``<ref>.tc`` (linear tempco,
        ppm/K, multiplied by the temperature offset) or ``<ref>.drift`` (class 2
        and electrolytic envelope), and ``<ref>.age`` where a life and an ageing
        rate are given.

    Notes
    -----
    The tempco is a factor of its own and the temperature is shared by all
    parts, so parts of one board see one temperature (a systematic, correlated
    effect), while each part's coefficient varies within its band.
    """
    dist, sigmas = _tol_distribution(block)
    ref = part.ref
    out = [
        Factor(
            f"{ref}.value", f"{ref} value", part.value, part.value, part.value, "fixed", group=ref
        ),
        Factor(
            f"{ref}.tol",
            f"{ref} tolerance (±{part.tolerance * 100:g} %)",
            0.0,
            -part.tolerance,
            part.tolerance,
            dist,  # type: ignore[arg-type]
            sigmas,
            group=ref,
        ),
    ]
    cond = block.conditions
    span = cond.ambient_high > REFERENCE_C or cond.ambient_low < REFERENCE_C
    if part.kind == "resistance":
        tc = part.tempco_ppm or 0.0
        out.append(Factor(f"{ref}.tc", f"{ref} tempco (±{tc:g} ppm/K)", 0.0, -tc, tc, group=ref))
    else:
        assert part.dielectric is not None
        d = dielectrics.dielectric(part.dielectric)
        if d.linear:
            lo, hi = d.tc_ppm_low, d.tc_ppm_high
            mid = min(max(0.0, lo), hi)
            out.append(
                Factor(
                    f"{ref}.tc",
                    f"{ref} {d.name} tempco ({lo:g}…{hi:g} ppm/K)",
                    mid,
                    lo,
                    hi,
                    group=ref,
                )
            )
        elif span:
            lo, hi = d.drift_low, d.drift_high
            out.append(
                Factor(
                    f"{ref}.drift",
                    f"{ref} {d.name} change over temperature ({lo * 100:+g}…{hi * 100:+g} %)",
                    0.0,
                    lo,
                    hi,
                    group=ref,
                )
            )
    age = part.ageing * cond.life_years
    if age > 0:
        out.append(
            Factor(
                f"{ref}.age",
                f"{ref} ageing over {cond.life_years:g} years (±{age * 100:.3g} %)",
                0.0,
                -age,
                age,
                group=ref,
            )
        )
    return out


def apply_part(x: Inputs, ref: str) -> FloatArray:
    """The actual value of a part for samples of its factors and the temperature.

    Parameters
    ----------
    x
        Factor samples (must hold ``<ref>.value``, ``<ref>.tol`` and ``temp``).
    ref
        Part reference.

    Returns
    -------
    FloatArray
        ``value·(1 + tol)·(1 + tc·1e-6·(T − 25))·(1 + drift)·(1 + age)``.
    """
    v = x[f"{ref}.value"] * (1.0 + x[f"{ref}.tol"])
    tc = x.get(f"{ref}.tc")
    if tc is not None:
        v = v * (1.0 + tc * 1e-6 * (x["temp"] - REFERENCE_C))
    drift = x.get(f"{ref}.drift")
    if drift is not None:
        v = v * (1.0 + drift)
    age = x.get(f"{ref}.age")
    if age is not None:
        v = v * (1.0 + age)
    return np.asarray(v, dtype=np.float64)


def condition_factors(block: Block) -> list[Factor]:
    """Operating conditions: ambient temperature and supply voltage.

    Parameters
    ----------
    block
        The block.

    Returns
    -------
    list of Factor
        ``temp`` (°C, uniform over the ambient range, nominal 25 °C clipped into
        it) and ``supply`` (V, uniform over the supply window).

    Notes
    -----
    Monte Carlo draws the operating point uniformly over its range: the yield
    is the share of (unit, operating point) pairs in spec.  Worst-case covers
    every corner regardless.
    """
    c = block.conditions
    t_nom = min(max(REFERENCE_C, c.ambient_low), c.ambient_high)
    s = c.supply
    return [
        Factor(
            "temp",
            f"ambient ({c.ambient_low:g}…{c.ambient_high:g} °C)",
            t_nom,
            c.ambient_low,
            c.ambient_high,
            group="operating",
        ),
        Factor(
            "supply", f"supply ({s.low:g}…{s.high:g} V)", s.centre, s.low, s.high, group="operating"
        ),
    ]


def timer_factors(block: Block, *, leakage: float = 0.0) -> list[Factor]:
    """Factors of a 555-type timer class, and the timing node's leakage.

    Parameters
    ----------
    block
        A one-shot or astable block (``block.timer`` set).
    leakage
        Extra leakage bound at the timing node, A (capacitor and board).

    Returns
    -------
    list of Factor
        ``timer.ratio`` (upper threshold / supply), ``timer.drift`` (ppm/K of
        timing), ``timer.vco`` (timing change per volt away from nominal),
        ``timer.ron`` (discharge on-resistance, Ω), ``timer.ith`` (threshold
        input current, A) and ``leak`` (A).
    """
    t = block.timer
    assert t is not None
    k_lo, k_hi = t.ratio_band
    k_nom = min(max(2.0 / 3.0, k_lo), k_hi)
    out = [
        Factor(
            "timer.ratio",
            f"{t.name} timer threshold ratio (±{t.initial * 100:g} % timing)",
            k_nom,
            k_lo,
            k_hi,
            group="timer",
        ),
        Factor(
            "timer.drift",
            f"{t.name} timer drift (±{t.drift_ppm:g} ppm/K)",
            0.0,
            -t.drift_ppm,
            t.drift_ppm,
            group="timer",
        ),
        Factor(
            "timer.vco",
            f"{t.name} timer supply sensitivity (±{t.supply_drift * 100:g} %/V)",
            0.0,
            -t.supply_drift,
            t.supply_drift,
            group="timer",
        ),
        Factor(
            "timer.ron",
            f"{t.name} discharge on-resistance (0…{t.r_on_max:.3g} Ω)",
            0.4 * t.r_on_max,
            0.0,
            t.r_on_max,
            group="timer",
        ),
        Factor(
            "timer.ith",
            f"{t.name} threshold input current (0…{format_quantity(t.i_threshold_max, 'current')})",
            0.4 * t.i_threshold_max,
            0.0,
            t.i_threshold_max,
            group="timer",
        ),
    ]
    if leakage > 0:
        out.append(
            Factor(
                "leak",
                f"node leakage (0…{format_quantity(leakage, 'current')})",
                0.0,
                0.0,
                leakage,
                group="leakage",
            )
        )
    return out


def scaled_time(x: Inputs, t: FloatArray) -> FloatArray:
    """Apply the timer class's temperature and supply drift to a time.

    Parameters
    ----------
    x
        Factor samples (``timer.drift``, ``timer.vco``, ``temp``, ``supply``,
        and the nominal supply in ``supply.nominal``).
    t
        Times from the ideal circuit.

    Returns
    -------
    FloatArray
        ``t·(1 + drift·1e-6·(T − 25))·(1 + vco·(V − V_nom))``.
    """
    out = t * (1.0 + x["timer.drift"] * 1e-6 * (x["temp"] - REFERENCE_C))
    out = out * (1.0 + x["timer.vco"] * (x["supply"] - x["supply.nominal"]))
    return np.asarray(out, dtype=np.float64)


def supply_nominal_factor(block: Block) -> Factor:
    """The nominal supply as a fixed factor (the reference of the supply drift).

    Parameters
    ----------
    block
        The block.

    Returns
    -------
    Factor
        ``supply.nominal``, fixed.
    """
    v = block.conditions.supply.centre
    return Factor("supply.nominal", "nominal supply", v, v, v, "fixed", group="operating")


def drain_current(x: Inputs) -> FloatArray:
    """Total current drawn from a timing node: threshold input current plus leakage.

    Parameters
    ----------
    x
        Factor samples.

    Returns
    -------
    FloatArray
        A.
    """
    i = x.get("timer.ith", np.zeros(1)) + x.get("leak", np.zeros(1))
    return np.asarray(i, dtype=np.float64)


#: Rated voltage assumed for an electrolytic, as a multiple of the highest supply
#: (common practice: derate the working voltage to about half the rating).
ELECTROLYTIC_RATING_FACTOR = 2.0


def capacitor_leakage(block: Block, part: Part) -> float:
    """Leakage bound of a timing capacitor that the designer need not state.

    Parameters
    ----------
    block
        The block (for the supply).
    part
        A capacitor.

    Returns
    -------
    float
        A.  For aluminium electrolytics ``max(0.01·C·V_rated, 3 µA)`` with C in µF
        and V_rated in V giving µA (the usual leakage rating of the datasheet
        class), doubled for hot operation above 60 °C (leakage rises 2–3× when
        hot); the rated voltage is taken as :data:`ELECTROLYTIC_RATING_FACTOR`
        times the highest supply.  Zero for ceramic and film capacitors, whose
        leakage is negligible at timing resistances (state board leakage with
        the ``leakage`` statement).

    References
    ----------
    Aluminium electrolytic capacitor datasheets (generic device class): leakage
    current limit 0.01·C·V or 3 µA, whichever is greater, after a few minutes at
    rated voltage and 20 °C.
    """
    if part.dielectric is None:
        return 0.0
    d = dielectrics.dielectric(part.dielectric)
    if d.family != "electrolytic":
        return 0.0
    rated = ELECTROLYTIC_RATING_FACTOR * block.conditions.supply.high
    amps = max(0.01 * (part.value * 1e6) * rated, 3.0) * 1e-6
    if block.conditions.ambient_high > 60.0:
        amps *= 2.0
    return amps


def node_leakage(block: Block, design: Design, ref: str = "C") -> float:
    """The leakage bound at a timing node: the spec's ``leakage`` plus the capacitor's own.

    Parameters
    ----------
    block
        The block.
    design
        The design.
    ref
        Reference of the timing capacitor.

    Returns
    -------
    float
        A.
    """
    stated = block.number("leakage") or 0.0
    return stated + capacitor_leakage(block, design.part(ref))


def dielectric_findings(block: Block, part: Part) -> list[Finding]:
    """Findings about a capacitor's dielectric: precision, value range, rated temperature.

    Parameters
    ----------
    block
        The block.
    part
        A capacitor.

    Returns
    -------
    list of Finding
        Possibly empty.
    """
    assert part.dielectric is not None
    d = dielectrics.dielectric(part.dielectric)
    out: list[Finding] = []
    if not d.precise:
        out.append(
            Finding(
                "warning",
                "imprecise-dielectric",
                f"{part.ref} is {d.name}: {d.notes.rstrip('.')}. Prefer C0G or film for timing.",
            )
        )
    if not (d.min_farads <= part.value <= d.max_farads):
        out.append(
            Finding(
                "warning",
                "value-unusual-for-dielectric",
                f"{part.ref} = {_fmt_f(part.value)} is outside the values commonly made in "
                f"{d.name} ({_fmt_f(d.min_farads)}…{_fmt_f(d.max_farads)}); check availability.",
            )
        )
    c = block.conditions
    if c.ambient_low < d.t_min or c.ambient_high > d.t_max:
        out.append(
            Finding(
                "error",
                "dielectric-temperature-range",
                f"{part.ref} is {d.name}, rated {d.t_min:g}…{d.t_max:g} °C, but the ambient "
                f"spans {c.ambient_low:g}…{c.ambient_high:g} °C.",
            )
        )
    return out


def _fmt_f(v: float) -> str:
    from timespec.rkm import format_rkm

    return format_rkm(v, "capacitance")


def is_upper_bound(window: Window) -> bool:
    """Whether a requirement is only an upper bound (``10 ms max`` reads as 0…10 ms).

    Parameters
    ----------
    window
        The requirement.

    Returns
    -------
    bool
        True for ``max`` bounds.
    """
    return window.nominal is None and window.low <= 0.0 and window.kind != "ratio"


def target(window: Window) -> float:
    """The value a design should aim its nominal at.

    Parameters
    ----------
    window
        The requirement.

    Returns
    -------
    float
        The midpoint of a two-sided window (its geometric mean for a frequency
        or time range wider than 2:1); 1.25 × a lower bound; 0.8 × an upper bound.
    """
    if math.isinf(window.high):
        return window.low * 1.25
    if is_upper_bound(window):
        return window.high * 0.8
    return 0.5 * (window.low + window.high)


def window_score(nominal: FloatArray, window: Window) -> FloatArray:
    """How far a nominal value sits from where a design should aim.

    Parameters
    ----------
    nominal
        Nominal outputs (any shape).
    window
        The requirement.

    Returns
    -------
    FloatArray
        ``|nominal − target| / scale`` where the scale is the half-width of a
        two-sided window, or the bound itself for a one-sided one.
    """
    nominal = np.asarray(nominal, dtype=np.float64)
    aim = target(window)
    if math.isinf(window.high) or is_upper_bound(window):
        scale = abs(aim) or 1.0
    else:
        scale = 0.5 * (window.high - window.low) or (abs(aim) * 1e-9 or 1e-30)
    return np.asarray(np.abs(nominal - aim) / scale, dtype=np.float64)


def by_ref(parts: Sequence[Part]) -> dict[str, Part]:
    """Index parts by reference.

    Parameters
    ----------
    parts
        Parts.

    Returns
    -------
    dict
        ref → part.
    """
    return {p.ref: p for p in parts}


def scale_to_goal(
    model: Callable[[FloatArray], FloatArray], goal: float, x0: FloatArray
) -> FloatArray:
    """Refine continuous part values so that a time comes out on target.

    Parameters
    ----------
    model
        Maps an array of part values to the resulting times.
    goal
        The time to aim at.
    x0
        First guesses (from the ideal closed form).

    Returns
    -------
    FloatArray
        The values after two multiplicative corrections ``x ← x·goal/model(x)``;
        nan where the model gives no finite positive time.

    Notes
    -----
    Times of RC circuits are nearly proportional to R and to C, so two
    corrections bring in the second-order effects (drain current, on-resistance).
    """
    x = np.asarray(x0, dtype=np.float64)
    for _ in range(2):
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            t = np.asarray(model(x), dtype=np.float64)
            ratio = np.where(np.isfinite(t) & (t > 0), goal / t, np.nan)
        x = x * ratio
    return x


@functools.lru_cache(maxsize=8192)
def declare_monotone(
    factor: Factor, output: str, rising: frozenset[str], falling: frozenset[str]
) -> Factor:
    """Mark a factor as moving one output monotonically (see :class:`~timespec.analysis.Factor`).

    Parameters
    ----------
    factor
        The factor.
    output
        The output name.
    rising, falling
        Names of the factors in which the output never falls / never rises.

    Returns
    -------
    Factor
        The factor with ``rising=(output,)`` or ``falling=(output,)``, or unchanged.
    """
    if factor.name in rising:
        return dataclasses.replace(factor, rising=(output,))
    if factor.name in falling:
        return dataclasses.replace(factor, falling=(output,))
    return factor
