"""Pieces every circuit family shares: parts, designs, findings and the factor models.

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
import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Protocol

import numpy as np
import numpy.typing as npt

from timespec import dielectrics, series
from timespec.analysis import Factor
from timespec.fmt import format_quantity
from timespec.model import Block, CapacitorPolicy, PinnedPart, ResistorPolicy, Window

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
    "dielectric_findings",
    "neighbour_parts",
    "neighbour_parts_many",
    "node_leakage",
    "pair_part",
    "part_factors",
    "resistor_part",
    "scaled_time",
    "snap",
    "timer_factors",
]

FloatArray = npt.NDArray[np.float64]
Inputs = Mapping[str, FloatArray]
Evaluate = Callable[[Inputs], dict[str, FloatArray]]

REFERENCE_C = 25.0  # °C, where tolerances and tempcos are referred to


@dataclass(frozen=True)
class Part:
    """One chosen or pinned part.

    Attributes
    ----------
    ref
        Reference in the circuit (``R``, ``C``, ``RA`` ...).
    kind
        ``"resistance"`` or ``"capacitance"``.
    value
        Ω or F.
    tolerance
        Relative tolerance.
    series
        IEC 60063 series it comes from, or ``None`` for an off-series pinned value.
    tempco_ppm
        Resistor tempco bound (±ppm/K), ``None`` for capacitors.
    dielectric
        Capacitor dielectric, ``None`` for resistors.
    pinned
        Whether the spec fixed it.
    ageing
        Relative drift per year bound.
    pair
        ``(a, b, how)`` when the part is two standard values ``a <= b`` joined in
        ``"series"`` or ``"parallel"`` (``value`` is then the combined value and
        ``tolerance`` the pair's worst-case tolerance); ``None`` for a single part.
    """

    ref: str
    kind: str
    value: float
    tolerance: float
    series: str | None
    tempco_ppm: float | None = None
    dielectric: str | None = None
    pinned: bool = False
    ageing: float = 0.0
    pair: tuple[float, float, str] | None = None

    @property
    def count(self) -> int:
        """How many physical parts this stands for (2 for a pair)."""
        return 1 if self.pair is None else 2


@dataclass(frozen=True)
class Design:
    """A set of parts (and a circuit variant, where the family has several).

    Attributes
    ----------
    parts
        The parts, in the family's order.
    variant
        Circuit variant, e.g. ``"diode"`` for an astable; empty when there is one.
    """

    parts: tuple[Part, ...]
    variant: str = ""

    def part(self, ref: str) -> Part:
        """Return the part with this reference.

        Parameters
        ----------
        ref
            Part reference.

        Returns
        -------
        Part
            The part.

        Raises
        ------
        KeyError
            When the design has no such part.
        """
        for p in self.parts:
            if p.ref == ref:
                return p
        raise KeyError(ref)


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
# parts


def resistor_part(
    ref: str, value: float, policy: ResistorPolicy, pinned: PinnedPart | None = None
) -> Part:
    """Make a resistor from a policy (or a pinned part, whose own figures win).

    Parameters
    ----------
    ref
        Reference.
    value
        Ω.
    policy
        The block's resistor policy.
    pinned
        The pinned part, when the spec fixes this one.

    Returns
    -------
    Part
        The resistor.
    """
    if pinned is not None:
        return Part(
            ref=ref,
            kind="resistance",
            value=pinned.value,
            tolerance=pinned.tolerance if pinned.tolerance is not None else policy.tolerance,
            series=pinned.series or _member_series(pinned.value, policy.series),
            tempco_ppm=pinned.tempco_ppm if pinned.tempco_ppm is not None else policy.tempco_ppm,
            pinned=True,
            ageing=policy.ageing,
        )
    return Part(
        ref=ref,
        kind="resistance",
        value=value,
        tolerance=policy.tolerance,
        series=policy.series,
        tempco_ppm=policy.tempco_ppm,
        ageing=policy.ageing,
    )


def capacitor_part(
    ref: str, value: float, policy: CapacitorPolicy, pinned: PinnedPart | None = None
) -> Part:
    """Make a capacitor from a policy (or a pinned part, whose own figures win).

    Parameters
    ----------
    ref
        Reference.
    value
        F.
    policy
        The block's capacitor policy.
    pinned
        The pinned part, when the spec fixes this one.

    Returns
    -------
    Part
        The capacitor.
    """
    if pinned is not None:
        return Part(
            ref=ref,
            kind="capacitance",
            value=pinned.value,
            tolerance=pinned.tolerance if pinned.tolerance is not None else policy.tolerance,
            series=pinned.series or _member_series(pinned.value, policy.series),
            dielectric=pinned.dielectric or policy.dielectric,
            pinned=True,
            ageing=policy.ageing,
        )
    return Part(
        ref=ref,
        kind="capacitance",
        value=value,
        tolerance=policy.tolerance,
        series=policy.series,
        dielectric=policy.dielectric,
        ageing=policy.ageing,
    )


def _member_series(value: float, preferred: str) -> str | None:
    """The coarsest series that holds a value (the policy's first), or ``None``."""
    for name in (preferred, *series.SERIES_NAMES):
        if series.is_member(name, value, rel=1e-6):
            return name
    return None


def candidate_values(series_name: str, low: float, high: float) -> FloatArray:
    """All values of a series within ``[low, high]``.

    Parameters
    ----------
    series_name
        IEC 60063 series.
    low, high
        Range, SI.

    Returns
    -------
    FloatArray
        The values, ascending.
    """
    return np.asarray(series.values_between(series_name, low, high), dtype=np.float64)


def snap(series_name: str, x: FloatArray, low: float, high: float) -> tuple[FloatArray, FloatArray]:
    """Standard neighbours below and above each continuous value, limited to a range.

    Parameters
    ----------
    series_name
        IEC 60063 series.
    x
        Continuous values (may hold nan/inf; those give nan).
    low, high
        Allowed range; neighbours outside it become nan.

    Returns
    -------
    tuple of FloatArray
        ``(below, above)``, nan where no neighbour is allowed.
    """
    x = np.asarray(x, dtype=np.float64)
    ok = np.isfinite(x) & (x > 0)
    below = np.full(x.shape, np.nan)
    above = np.full(x.shape, np.nan)
    if ok.any():
        b, a = series.neighbours_many(series_name, x[ok])
        below[ok] = b
        above[ok] = a
    tol = 1e-9
    below = np.where((below >= low * (1 - tol)) & (below <= high * (1 + tol)), below, np.nan)
    above = np.where((above >= low * (1 - tol)) & (above <= high * (1 + tol)), above, np.nan)
    return below, above


def pair_part(
    ref: str, a: float, b: float, how: str, policy: ResistorPolicy | CapacitorPolicy
) -> Part:
    """Make one part out of two standard values in series or in parallel.

    Parameters
    ----------
    ref
        Reference.
    a, b
        The two standard values, Ω or F.
    how
        ``"series"`` or ``"parallel"``.
    policy
        The block's resistor or capacitor policy (series, tolerance, tempco or
        dielectric and ageing of both parts).

    Returns
    -------
    Part
        A part whose ``value`` is the combination, ``tolerance`` the pair's
        worst-case tolerance and ``pair`` the constituents.

    Notes
    -----
    Series ``a + b``, parallel ``a·b/(a + b)``; the worst-case tolerance comes from
    :func:`timespec.series.pair_tolerance` (equal to the parts' tolerance when both
    share it).  Both combinations are weighted means of the parts' relative changes
    (by value in series, by conductance in parallel for resistors; the reverse for
    capacitors), so a common tempco band, dielectric drift or ageing bound applies
    to the pair unchanged.  Monte Carlo treats the pair as one part spread over its
    tolerance, which is conservative (two independent parts partly average out).

    References
    ----------
    Series and parallel combination (Ohm's and Kirchhoff's laws); extreme-value
    analysis of a monotone function, common practice.
    """
    lo, hi = sorted((float(a), float(b)))
    value = lo + hi if how == "series" else lo * hi / (lo + hi)
    tol = series.pair_tolerance(lo, hi, how, policy.tolerance, policy.tolerance)
    single = (
        resistor_part(ref, value, policy)
        if isinstance(policy, ResistorPolicy)
        else capacitor_part(ref, value, policy)
    )
    return dataclasses.replace(single, tolerance=tol, pair=(lo, hi, how))


def _nearest_pairs(
    series_name: str, x: float, low: float, high: float
) -> list[tuple[float, float, str]]:
    """The pairs nearest below and above ``x`` that fall between its single neighbours."""
    below, above = series.neighbours(series_name, x)
    lo, hi = max(below, low), min(above, high)
    if not lo < hi:
        return []
    table = series.pair_table(series_name, lo, hi)
    slack = 1e-9
    keep = (table["a"] >= low * (1 - slack)) & (table["b"] <= high * (1 + slack))
    # a pair equal to a single standard value adds a part for nothing
    keep &= ~np.isclose(table["value"], below, rtol=1e-6, atol=0.0)
    keep &= ~np.isclose(table["value"], above, rtol=1e-6, atol=0.0)
    table = table[keep]
    out: list[tuple[float, float, str]] = []
    for side in (table[table["value"] <= x], table[table["value"] > x]):
        if not side.size:
            continue
        # nearest value; among equal values the most even pair (smallest b/a)
        gap = np.abs(side["value"] - x)
        tied = side[gap == gap.min()]
        rec = tied[int(np.argmin(tied["b"] / tied["a"]))]
        out.append((float(rec["a"]), float(rec["b"]), str(rec["how"])))
    return out


def neighbour_parts(ref: str, x: float, policy: ResistorPolicy | CapacitorPolicy) -> list[Part]:
    """Standard parts just below and above a continuous value, pairs included when allowed.

    Parameters
    ----------
    ref
        Reference for the parts.
    x
        The continuous value a family solved for, Ω or F (nan or non-positive: none).
    policy
        The resistor or capacitor policy: series, range and whether ``pairs`` are allowed.

    Returns
    -------
    list of Part
        The single standard values below and above ``x`` inside the policy range
        (one when ``x`` is itself standard) and, when ``policy.pairs`` is set, the
        series or parallel pair of standard values nearest below and nearest above
        ``x`` among those strictly between the two single neighbours, both parts
        inside the policy range.  Families use this instead of :func:`snap` to
        offer in-between values.

    Notes
    -----
    Pairs come from :func:`timespec.series.pair_table` (larger/smaller part ratio at
    most 10) restricted to the gap between the single neighbours, so the table stays
    small; a pair that equals a single standard value is dropped.

    References
    ----------
    IEC 60063 for the values; series and parallel combination, textbook circuit theory.
    """
    if not (math.isfinite(x) and x > 0):
        return []
    lo, hi = policy.low, policy.high
    below, above = snap(policy.series, np.array([x]), lo, hi)
    values = sorted({float(v) for v in (below[0], above[0]) if np.isfinite(v)})
    out: list[Part] = []
    for v in values:
        if isinstance(policy, ResistorPolicy):
            out.append(resistor_part(ref, v, policy))
        else:
            out.append(capacitor_part(ref, v, policy))
    if policy.pairs:
        for a, b, how in _nearest_pairs(policy.series, x, lo, hi):
            out.append(pair_part(ref, a, b, how, policy))
    return out


def neighbour_parts_many(
    ref: str, xs: FloatArray, policy: ResistorPolicy | CapacitorPolicy
) -> list[list[Part]]:
    """:func:`neighbour_parts` for many continuous values at once.

    Parameters
    ----------
    ref
        Reference for the parts.
    xs
        Continuous values, Ω or F.
    policy
        The resistor or capacitor policy.

    Returns
    -------
    list of list of Part
        For each value, the same parts :func:`neighbour_parts` gives; the
        single standard neighbours are found in one vectorised call.
    """
    xs = np.asarray(xs, dtype=np.float64)
    below, above = snap(policy.series, xs, policy.low, policy.high)
    make = resistor_part if isinstance(policy, ResistorPolicy) else capacitor_part
    out: list[list[Part]] = []
    for x, b, a in zip(xs, below, above, strict=True):
        values = sorted({float(v) for v in (b, a) if np.isfinite(v)})
        parts = [make(ref, v, policy) for v in values]  # type: ignore[arg-type]
        if policy.pairs and math.isfinite(x) and x > 0:
            for pa, pb, how in _nearest_pairs(policy.series, float(x), policy.low, policy.high):
                parts.append(pair_part(ref, pa, pb, how, policy))
        out.append(parts)
    return out


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
