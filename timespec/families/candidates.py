"""Candidate parts: standard values from the policies, snapped, paired or pinned.

The builders here turn a block's policies (IEC 60063 series and ranges) and
pinned parts into :class:`~timespec.parts.part.Part` objects, so that every
family picks parts the same way.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import numpy.typing as npt

from timespec.model import CapacitorPolicy, PinnedPart, ResistorPolicy
from timespec.parts import pairs, series
from timespec.parts.part import Part

__all__ = [
    "candidate_values",
    "capacitor_part",
    "neighbour_parts",
    "neighbour_parts_many",
    "pair_part",
    "resistor_part",
    "snap",
]

FloatArray = npt.NDArray[np.float64]


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
            series=pinned.series or _pinned_series(pinned, policy.tolerance),
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
            series=pinned.series or _pinned_series(pinned, policy.tolerance),
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


def _pinned_series(pinned: PinnedPart, policy_tolerance: float) -> str | None:
    """The series a pinned part belongs to by its value and tolerance (IEC 60063), or ``None``.

    See :func:`timespec.parts.series.part_series`: ``470k 5%`` is E24, not E3.
    """
    tolerance = pinned.tolerance if pinned.tolerance is not None else policy_tolerance
    return series.part_series(pinned.value, tolerance)


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
    :func:`timespec.parts.pairs.pair_tolerance` (equal to the parts' tolerance when both
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
    tol = pairs.pair_tolerance(lo, hi, how, policy.tolerance, policy.tolerance)
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
    table = pairs.pair_table(series_name, lo, hi)
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
    Pairs come from :func:`timespec.parts.pairs.pair_table` (larger/smaller part ratio at
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
