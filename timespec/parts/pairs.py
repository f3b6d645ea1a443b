"""Two standard parts joined in series or in parallel to reach a value between the steps.

A series of IEC 60063 values has gaps of 1 % (E96) to 100 % (E3); two parts of the same
series combined in series (``a + b``) or in parallel (``a*b/(a + b)``) fill them.  This
module lists those combinations and bounds the tolerance of the pair from the tolerances of
its parts.

All functions take and return plain SI floats (ohm, farad) or numpy arrays; bad input raises a
plain :class:`ValueError`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final, Literal

import numpy as np
import numpy.typing as npt

from timespec.parts.series import canonical_name, values_between

__all__ = [
    "PAIR_DTYPE",
    "Pair",
    "pair_table",
    "pair_tolerance",
    "pair_tolerance_bounds",
    "pair_values",
]

FloatArray = npt.NDArray[np.float64]

# Relative slack on the bounds, as in timespec.parts.series.
_DEFAULT_REL: Final[float] = 1e-9

#: One row of a pair table: the two values, ``"series"`` or ``"parallel"``, the result.
PAIR_DTYPE: Final[np.dtype[np.void]] = np.dtype(
    [("a", np.float64), ("b", np.float64), ("how", "U8"), ("value", np.float64)]
)


@dataclass(frozen=True, slots=True)
class Pair:
    """Two standard values joined in series or in parallel.

    Parameters
    ----------
    a
        The smaller part (ohm or farad), ``a <= b``.
    b
        The larger part.
    how
        ``"series"`` or ``"parallel"``.
    value
        The combined value: ``a + b`` in series, ``a*b/(a + b)`` in parallel (for
        resistors; for capacitors the caller swaps the meaning).
    """

    a: float
    b: float
    how: Literal["series", "parallel"]
    value: float


def _check_positive(what: str, x: float) -> float:
    value = float(x)
    if not math.isfinite(value) or value <= 0.0:
        raise ValueError(f"{what} must be a finite number greater than zero, got {x!r}")
    return value


def _parallel(a: FloatArray | float, b: FloatArray | float) -> FloatArray:
    a_arr = np.asarray(a, dtype=np.float64)
    b_arr = np.asarray(b, dtype=np.float64)
    return np.asarray(a_arr * b_arr / (a_arr + b_arr), dtype=np.float64)


def pair_table(
    name: str,
    low: float,
    high: float,
    *,
    series: bool = True,
    parallel: bool = True,
    max_ratio: float = 10.0,
) -> npt.NDArray[np.void]:
    """Return every two-part combination of standard values whose value is in ``[low, high]``.

    Parameters
    ----------
    name
        Series name, case-insensitive; both parts come from this series.
    low, high
        Inclusive bounds on the combined value, ``0 < low <= high`` (relative slack 1e-9).
    series
        Include series combinations ``a + b``.
    parallel
        Include parallel combinations ``a*b/(a + b)``.
    max_ratio
        Largest allowed ``b/a`` (``>= 1``).  Without a limit there would be endless pairs in
        which the larger (series) or smaller (parallel) part only trims; 10 keeps the smaller
        contribution at 1/11 of the total or more.

    Returns
    -------
    numpy.ndarray
        Structured array of dtype :data:`PAIR_DTYPE` (fields ``a``, ``b``, ``how``, ``value``),
        ``a <= b``, sorted by ``value`` then ``how`` then ``a``.  Equal parts (``a == b``)
        are included.

    Raises
    ------
    ValueError
        On an unknown series, bad bounds or ``max_ratio < 1``.

    Notes
    -----
    Series: ``R = a + b``; the parts come from ``[low/(1 + max_ratio), high]``.  Parallel:
    ``R = a*b/(a + b)``; since ``a/2 <= R <= a`` and ``b <= max_ratio*a``, the parts come from
    ``[low, high*(1 + max_ratio)]``.  All pairs of the pool are formed at once with numpy
    (memory grows with the square of the pool size: a few decades of E192 is fine).

    References
    ----------
    Series and parallel combination of resistances (Ohm's and Kirchhoff's laws), textbook
    circuit theory; IEC 60063:2015 for the parts.
    """
    key = canonical_name(name)
    lo = _check_positive("low", low)
    hi = _check_positive("high", high)
    if lo > hi:
        raise ValueError(f"low ({low!r}) must not exceed high ({high!r})")
    ratio = float(max_ratio)
    if not math.isfinite(ratio) or ratio < 1.0:
        raise ValueError(f"max_ratio must be a finite number >= 1, got {max_ratio!r}")
    lo_t = lo * (1.0 - _DEFAULT_REL)
    hi_t = hi * (1.0 + _DEFAULT_REL)
    parts: list[npt.NDArray[np.void]] = []
    kinds: list[tuple[Literal["series", "parallel"], float, float]] = []
    if series:
        kinds.append(("series", lo / (1.0 + ratio), hi))
    if parallel:
        kinds.append(("parallel", lo, hi * (1.0 + ratio)))
    for how, pool_lo, pool_hi in kinds:
        pool = values_between(key, pool_lo, pool_hi)
        ia, ib = np.triu_indices(pool.size)
        a = pool[ia]
        b = pool[ib]
        value = a + b if how == "series" else _parallel(a, b)
        keep = (value >= lo_t) & (value <= hi_t) & (b <= a * ratio * (1.0 + _DEFAULT_REL))
        rec = np.empty(int(np.count_nonzero(keep)), dtype=PAIR_DTYPE)
        rec["a"] = a[keep]
        rec["b"] = b[keep]
        rec["how"] = how
        rec["value"] = value[keep]
        parts.append(rec)
    if not parts:
        return np.empty(0, dtype=PAIR_DTYPE)
    out = np.concatenate(parts)
    order = np.lexsort((out["a"], out["how"], out["value"]))
    return np.asarray(out[order])


def pair_values(
    name: str,
    low: float,
    high: float,
    *,
    series: bool = True,
    parallel: bool = True,
    max_ratio: float = 10.0,
) -> list[Pair]:
    """Return the two-part combinations of :func:`pair_table` as :class:`Pair` objects.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    low, high
        Inclusive bounds on the combined value.
    series
        Include series combinations.
    parallel
        Include parallel combinations.
    max_ratio
        Largest allowed ratio of the larger to the smaller part.

    Returns
    -------
    list of Pair
        Sorted by value.

    Raises
    ------
    ValueError
        As :func:`pair_table`.

    Notes
    -----
    ``R = a + b`` (series), ``R = a*b/(a + b)`` (parallel).

    References
    ----------
    Textbook circuit theory; IEC 60063:2015 for the parts.
    """
    table = pair_table(name, low, high, series=series, parallel=parallel, max_ratio=max_ratio)
    result: list[Pair] = []
    for a, b, how, value in zip(
        table["a"].tolist(),
        table["b"].tolist(),
        table["how"].tolist(),
        table["value"].tolist(),
        strict=True,
    ):
        result.append(Pair(float(a), float(b), "series" if how == "series" else "parallel", value))
    return result


def _check_how(how: str) -> Literal["series", "parallel"]:
    if how == "series":
        return "series"
    if how == "parallel":
        return "parallel"
    raise ValueError(f"how must be 'series' or 'parallel', got {how!r}")


def _check_tol(what: str, t: float) -> float:
    value = float(t)
    if not math.isfinite(value) or value < 0.0 or value >= 1.0:
        raise ValueError(f"{what} must be a relative tolerance in [0, 1), got {t!r}")
    return value


def pair_tolerance_bounds(
    a: float, b: float, how: str, tol_a: float, tol_b: float
) -> tuple[float, float]:
    """Return the exact worst-case relative deviation (low, high) of a two-part combination.

    Parameters
    ----------
    a, b
        Nominal part values (positive).
    how
        ``"series"`` or ``"parallel"``.
    tol_a, tol_b
        Symmetric relative tolerance of each part, in ``[0, 1)``.

    Returns
    -------
    (low, high) : tuple of float
        Signed relative deviations of the combination, ``low <= 0 <= high``.

    Raises
    ------
    ValueError
        On non-positive parts, an unknown ``how`` or a tolerance outside ``[0, 1)``.

    Notes
    -----
    Both combinations increase with each part, so the extremes are at the corners where both
    parts are low or both high.  Series: ``+-(a*ta + b*tb)/(a + b)``.  Parallel, with
    ``P(x, y) = x*y/(x + y)``: ``P(a(1+ta), b(1+tb))/P(a, b) - 1`` and
    ``P(a(1-ta), b(1-tb))/P(a, b) - 1``; these are ``+-t`` when ``ta = tb = t``.

    References
    ----------
    Extreme-value (worst-case) analysis of a monotonic function, common practice.
    """
    av = _check_positive("a", a)
    bv = _check_positive("b", b)
    kind = _check_how(how)
    ta = _check_tol("tol_a", tol_a)
    tb = _check_tol("tol_b", tol_b)
    if kind == "series":
        t = (av * ta + bv * tb) / (av + bv)
        return (-t, t)
    nominal = av * bv / (av + bv)
    hi_a, hi_b = av * (1.0 + ta), bv * (1.0 + tb)
    lo_a, lo_b = av * (1.0 - ta), bv * (1.0 - tb)
    high = hi_a * hi_b / (hi_a + hi_b) / nominal - 1.0
    low = lo_a * lo_b / (lo_a + lo_b) / nominal - 1.0
    return (min(low, 0.0), max(high, 0.0))


def pair_tolerance(a: float, b: float, how: str, tol_a: float, tol_b: float) -> float:
    """Return the worst-case symmetric relative tolerance of a two-part combination.

    Parameters
    ----------
    a, b
        Nominal part values (positive).
    how
        ``"series"`` or ``"parallel"``.
    tol_a, tol_b
        Symmetric relative tolerance of each part, in ``[0, 1)``.

    Returns
    -------
    float
        ``max(-low, high)`` of :func:`pair_tolerance_bounds`; equals ``t`` when both parts
        have tolerance ``t``.

    Raises
    ------
    ValueError
        As :func:`pair_tolerance_bounds`.

    Notes
    -----
    For parallel parts with unequal tolerances the deviation is slightly asymmetric; the
    larger side is returned so the figure is always safe.

    References
    ----------
    Extreme-value (worst-case) analysis, common practice.
    """
    low, high = pair_tolerance_bounds(a, b, how, tol_a, tol_b)
    return max(-low, high)
