"""IEC 60063 preferred number series (E3 ... E192) for resistors and capacitors.

Every standard value is a mantissa from one of the tables below times a power of ten.  The
tables are literal data, exactly as the standard lists them; nothing here is computed from a
formula at import time.

Values are built from the integer form of the mantissa and an exact power of ten, so that a
standard value always comes out as the float nearest to its decimal spelling (``4.7e3`` is
``4700.0``, never ``4699.999...``; ``4.7e-9`` is ``float("4.7e-9")``).  This holds for values
between 1e-22 and 1e22, which covers every real resistor and capacitor.

All functions take and return plain SI floats (ohm, farad) or numpy arrays; bad input raises a
plain :class:`ValueError`.
"""

from __future__ import annotations

import bisect
import math
from typing import Final

import numpy as np
import numpy.typing as npt

__all__ = [
    "SERIES_NAMES",
    "canonical_name",
    "is_member",
    "mantissas",
    "nearest",
    "nearest_many",
    "neighbours",
    "neighbours_many",
    "part_series",
    "usual_tolerance",
    "values_between",
]

FloatArray = npt.NDArray[np.float64]

#: The IEC 60063 series names, coarsest first.
SERIES_NAMES: Final[tuple[str, ...]] = ("E3", "E6", "E12", "E24", "E48", "E96", "E192")

# IEC 60063: the two-digit series are fixed lists; several values (2.7, 3.0, 3.3, 3.6, 3.9,
# 4.3, 4.7, 8.2) differ from the rounded geometric progression, so they are kept as data.
_E3: Final[tuple[float, ...]] = (1.0, 2.2, 4.7)
_E6: Final[tuple[float, ...]] = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
_E12: Final[tuple[float, ...]] = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
_E24: Final[tuple[float, ...]] = (
    1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
    3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
)  # fmt: skip

# IEC 60063: the three-digit series are 10**(i/N) rounded to three significant figures, with
# one listed exception, E192 i = 185, which the standard gives as 9.20 (the formula gives 9.19).
_E48: Final[tuple[float, ...]] = (
    1.00, 1.05, 1.10, 1.15, 1.21, 1.27, 1.33, 1.40, 1.47, 1.54, 1.62, 1.69, 1.78, 1.87, 1.96,
    2.05, 2.15, 2.26, 2.37, 2.49, 2.61, 2.74, 2.87, 3.01, 3.16, 3.32, 3.48, 3.65, 3.83, 4.02,
    4.22, 4.42, 4.64, 4.87, 5.11, 5.36, 5.62, 5.90, 6.19, 6.49, 6.81, 7.15, 7.50, 7.87, 8.25,
    8.66, 9.09, 9.53,
)  # fmt: skip
_E96: Final[tuple[float, ...]] = (
    1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, 1.33, 1.37, 1.40,
    1.43, 1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91, 1.96, 2.00,
    2.05, 2.10, 2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.80, 2.87,
    2.94, 3.01, 3.09, 3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12,
    4.22, 4.32, 4.42, 4.53, 4.64, 4.75, 4.87, 4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.90,
    6.04, 6.19, 6.34, 6.49, 6.65, 6.81, 6.98, 7.15, 7.32, 7.50, 7.68, 7.87, 8.06, 8.25, 8.45,
    8.66, 8.87, 9.09, 9.31, 9.53, 9.76,
)  # fmt: skip
_E192: Final[tuple[float, ...]] = (
    1.00, 1.01, 1.02, 1.04, 1.05, 1.06, 1.07, 1.09, 1.10, 1.11, 1.13, 1.14, 1.15, 1.17, 1.18,
    1.20, 1.21, 1.23, 1.24, 1.26, 1.27, 1.29, 1.30, 1.32, 1.33, 1.35, 1.37, 1.38, 1.40, 1.42,
    1.43, 1.45, 1.47, 1.49, 1.50, 1.52, 1.54, 1.56, 1.58, 1.60, 1.62, 1.64, 1.65, 1.67, 1.69,
    1.72, 1.74, 1.76, 1.78, 1.80, 1.82, 1.84, 1.87, 1.89, 1.91, 1.93, 1.96, 1.98, 2.00, 2.03,
    2.05, 2.08, 2.10, 2.13, 2.15, 2.18, 2.21, 2.23, 2.26, 2.29, 2.32, 2.34, 2.37, 2.40, 2.43,
    2.46, 2.49, 2.52, 2.55, 2.58, 2.61, 2.64, 2.67, 2.71, 2.74, 2.77, 2.80, 2.84, 2.87, 2.91,
    2.94, 2.98, 3.01, 3.05, 3.09, 3.12, 3.16, 3.20, 3.24, 3.28, 3.32, 3.36, 3.40, 3.44, 3.48,
    3.52, 3.57, 3.61, 3.65, 3.70, 3.74, 3.79, 3.83, 3.88, 3.92, 3.97, 4.02, 4.07, 4.12, 4.17,
    4.22, 4.27, 4.32, 4.37, 4.42, 4.48, 4.53, 4.59, 4.64, 4.70, 4.75, 4.81, 4.87, 4.93, 4.99,
    5.05, 5.11, 5.17, 5.23, 5.30, 5.36, 5.42, 5.49, 5.56, 5.62, 5.69, 5.76, 5.83, 5.90, 5.97,
    6.04, 6.12, 6.19, 6.26, 6.34, 6.42, 6.49, 6.57, 6.65, 6.73, 6.81, 6.90, 6.98, 7.06, 7.15,
    7.23, 7.32, 7.41, 7.50, 7.59, 7.68, 7.77, 7.87, 7.96, 8.06, 8.16, 8.25, 8.35, 8.45, 8.56,
    8.66, 8.76, 8.87, 8.98, 9.09, 9.20, 9.31, 9.42, 9.53, 9.65, 9.76, 9.88,
)  # fmt: skip

_TABLES: Final[dict[str, tuple[float, ...]]] = {
    "E3": _E3,
    "E6": _E6,
    "E12": _E12,
    "E24": _E24,
    "E48": _E48,
    "E96": _E96,
    "E192": _E192,
}

# Significant digits of each series' mantissas (two for E3..E24, three for E48..E192).
_DIGITS: Final[dict[str, int]] = {
    "E3": 2,
    "E6": 2,
    "E12": 2,
    "E24": 2,
    "E48": 3,
    "E96": 3,
    "E192": 3,
}

# Integer mantissas (47 for 4.7 in E12, 475 for 4.75 in E96): exact building blocks.
_INTS: Final[dict[str, npt.NDArray[np.int64]]] = {
    key: np.array([round(m * 10 ** (_DIGITS[key] - 1)) for m in table], dtype=np.int64)
    for key, table in _TABLES.items()
}

# Tolerance usually sold with each series.  IEC 60063 ties E6..E192 to 20/10/5/2/1/0.5 %;
# for E3 it only says "above 20 %", and 0.2 is used here as common practice (some tables give
# 0.4 for E3).
_USUAL_TOLERANCE: Final[dict[str, float]] = {
    "E3": 0.2,
    "E6": 0.2,
    "E12": 0.10,
    "E24": 0.05,
    "E48": 0.02,
    "E96": 0.01,
    "E192": 0.005,
}

# Exact binary64 powers of ten: 10**k is exactly representable for 0 <= k <= 22.
_EXACT_POW10_MAX: Final[int] = 22
_POW10: Final[FloatArray] = np.array(
    [float(10**k) for k in range(_EXACT_POW10_MAX + 1)], dtype=np.float64
)

_DEFAULT_REL: Final[float] = 1e-9


def canonical_name(name: str) -> str:
    """Return the canonical spelling of a series name (``"e24"`` -> ``"E24"``).

    Raises
    ------
    ValueError
        When the name is not one of :data:`SERIES_NAMES`.
    """
    key = name.strip().upper()
    if key not in _TABLES:
        raise ValueError(
            f"unknown preferred number series {name!r}; known series: {', '.join(SERIES_NAMES)}"
        )
    return key


def _check_positive(what: str, x: float) -> float:
    value = float(x)
    if not math.isfinite(value) or value <= 0.0:
        raise ValueError(f"{what} must be a finite number greater than zero, got {x!r}")
    return value


def _check_rel(rel: float) -> float:
    value = float(rel)
    if not math.isfinite(value) or value < 0.0 or value >= 0.01:
        raise ValueError(f"rel must be a small non-negative fraction below 0.01, got {rel!r}")
    return value


def _scale(ints: npt.NDArray[np.int64], exps: npt.NDArray[np.int64]) -> FloatArray:
    """Return ``ints * 10**exps`` as the floats nearest the exact decimal values.

    A product or quotient of two exactly representable numbers is correctly rounded in IEEE
    754, so ``47 / 1e12`` is the float nearest 4.7e-11.  Exponents outside +-22 fall back to
    ``float(f"{m}e{e}")``, which is also correctly rounded.
    """
    ints_f = ints.astype(np.float64)
    exps = np.asarray(exps, dtype=np.int64)
    exps_b = np.broadcast_to(exps, ints_f.shape)
    inside = np.abs(exps_b) <= _EXACT_POW10_MAX
    idx = np.clip(np.abs(exps_b), 0, _EXACT_POW10_MAX)
    pow10 = _POW10[idx]
    out = np.where(exps_b >= 0, ints_f * pow10, ints_f / pow10)
    if not bool(np.all(inside)):
        for pos in zip(*np.nonzero(~inside), strict=True):
            out[pos] = float(f"{int(ints[pos])}e{int(exps_b[pos])}")
    return np.asarray(out, dtype=np.float64)


def _values_at(key: str, g: npt.NDArray[np.int64]) -> FloatArray:
    """Standard values at global indices ``g`` (index 0 is 1.0, index N is 10.0, ...)."""
    n = len(_TABLES[key])
    decade = np.floor_divide(g, n)
    pos = np.mod(g, n)
    return _scale(_INTS[key][pos], decade - (_DIGITS[key] - 1))


def _value_at_scalar(key: str, g: int) -> float:
    """Scalar form of :func:`_values_at`, in plain Python."""
    decade, pos = divmod(g, len(_TABLES[key]))
    mant = int(_INTS[key][pos])
    exp = decade - (_DIGITS[key] - 1)
    if 0 <= exp <= _EXACT_POW10_MAX:
        return mant * float(10**exp)
    if -_EXACT_POW10_MAX <= exp < 0:
        return mant / float(10**-exp)
    return float(f"{mant}e{exp}")


def mantissas(name: str) -> tuple[float, ...]:
    """Return the mantissas of a preferred number series, in [1, 10).

    Parameters
    ----------
    name
        Series name, case-insensitive: one of :data:`SERIES_NAMES` (``"E24"``, ``"e96"``...).

    Returns
    -------
    tuple of float
        The mantissas in increasing order, exactly as the standard lists them.

    Raises
    ------
    ValueError
        If the series is unknown; the message lists the known series.

    Notes
    -----
    E3 to E24 are fixed lists.  E48, E96 and E192 equal ``round(10**(i/N), 2)`` for
    ``i = 0 .. N-1``, except E192 ``i = 185``, which is listed as 9.20.

    References
    ----------
    IEC 60063:2015, preferred number series for resistors and capacitors, tables 1 to 3.
    """
    return _TABLES[canonical_name(name)]


def usual_tolerance(name: str) -> float:
    """Return the relative tolerance usually associated with a series.

    Parameters
    ----------
    name
        Series name, case-insensitive.

    Returns
    -------
    float
        Relative tolerance: E3 0.2, E6 0.2, E12 0.10, E24 0.05, E48 0.02, E96 0.01,
        E192 0.005.

    Raises
    ------
    ValueError
        If the series is unknown.

    Notes
    -----
    The series were built so that parts of the usual tolerance cover the decade without gaps.
    IEC 60063 gives E3 only as "above 20 %"; 0.2 is used here as common practice.

    References
    ----------
    IEC 60063:2015, introduction and tables (tolerance associated with each series); common
    practice for E3.
    """
    return _USUAL_TOLERANCE[canonical_name(name)]


def values_between(name: str, low: float, high: float) -> FloatArray:
    """Return every value of a series, over all decades, within ``[low, high]``.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    low, high
        Inclusive bounds in SI units, ``0 < low <= high``.  A value within a relative 1e-9 of a
        bound counts as inside, so rounding in the bounds never drops an end value.

    Returns
    -------
    numpy.ndarray
        Sorted float64 array; each entry is the float nearest its decimal spelling
        (``4700.0``, not ``4699.999...``).  May be empty.

    Raises
    ------
    ValueError
        If the series is unknown, a bound is not a finite positive number, or ``low > high``.

    Notes
    -----
    Value = mantissa * 10**k for every integer k; computed as integer mantissa times an exact
    power of ten, so each entry is correctly rounded.

    References
    ----------
    IEC 60063:2015 (the series repeat in every decade).
    """
    key = canonical_name(name)
    lo = _check_positive("low", low)
    hi = _check_positive("high", high)
    if lo > hi:
        raise ValueError(f"low ({low!r}) must not exceed high ({high!r})")
    lo_t = lo * (1.0 - _DEFAULT_REL)
    hi_t = hi * (1.0 + _DEFAULT_REL)
    n = len(_TABLES[key])
    d_lo = math.floor(math.log10(lo_t)) - 1
    d_hi = math.floor(math.log10(hi_t)) + 1
    g = np.arange(d_lo * n, (d_hi + 1) * n, dtype=np.int64)
    values = _values_at(key, g)
    keep = (values >= lo_t) & (values <= hi_t)
    return np.asarray(values[keep], dtype=np.float64)


def neighbours_many(
    name: str, x: npt.ArrayLike, *, rel: float = _DEFAULT_REL
) -> tuple[FloatArray, FloatArray]:
    """Vectorised :func:`neighbours`: standard values just below and just above each ``x``.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    x
        Array of finite positive values (any shape).
    rel
        Snap tolerance: an ``x`` within this relative distance of a standard value is taken
        to be that value, and both neighbours equal it.

    Returns
    -------
    below, above : numpy.ndarray
        Arrays shaped like ``x``: ``below <= x*(1+rel)`` and ``above >= x*(1-rel)``, both
        members of the series, with no member strictly between them and ``x``.

    Raises
    ------
    ValueError
        If the series is unknown, any ``x`` is not finite and positive, or ``rel`` is not a
        small non-negative fraction.

    Notes
    -----
    The decade is ``floor(log10 x)``; the mantissa ``x / 10**decade`` is located in the table
    by binary search, and four candidates around it are compared exactly, which absorbs any
    rounding in the logarithm.

    References
    ----------
    IEC 60063:2015.
    """
    key = canonical_name(name)
    tol = _check_rel(rel)
    xs = np.asarray(x, dtype=np.float64)
    if not bool(np.all(np.isfinite(xs) & (xs > 0.0))):
        raise ValueError("every value must be a finite number greater than zero")
    table = np.asarray(_TABLES[key], dtype=np.float64)
    n = len(table)
    decade = np.floor(np.log10(xs)).astype(np.int64)
    mant = xs / np.power(10.0, decade.astype(np.float64))
    j = np.searchsorted(table, mant, side="right").astype(np.int64)
    g0 = decade * n + j - 1  # index of the member at or just below x (up to rounding)
    cand = np.stack([_values_at(key, g0 + k) for k in (-2, -1, 0, 1, 2)], axis=-1)
    xe = xs[..., np.newaxis]
    close = np.abs(cand - xe) <= tol * xe
    below_c = np.where(cand < xe, cand, -np.inf)
    above_c = np.where(cand > xe, cand, np.inf)
    below = below_c.max(axis=-1)
    above = above_c.min(axis=-1)
    snapped = np.where(close, cand, np.nan)
    has_snap = close.any(axis=-1)
    # Pick the candidate closest to x when it lies within the snap tolerance.
    dist = np.where(close, np.abs(cand - xe), np.inf)
    pick = np.take_along_axis(snapped, np.argmin(dist, axis=-1)[..., np.newaxis], axis=-1)[..., 0]
    below = np.where(has_snap, pick, below)
    above = np.where(has_snap, pick, above)
    return np.asarray(below, dtype=np.float64), np.asarray(above, dtype=np.float64)


def neighbours(name: str, x: float, *, rel: float = _DEFAULT_REL) -> tuple[float, float]:
    """Return the standard values just below-or-equal and above-or-equal ``x``.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    x
        A finite positive value in SI units, in any decade.
    rel
        Snap tolerance: if ``x`` lies within this relative distance of a standard value, both
        neighbours are that value (so ``4.7 * 1e-9`` snaps to 4.7 nF despite float rounding).

    Returns
    -------
    (below, above) : tuple of float
        ``below <= x <= above`` (up to ``rel``); equal when ``x`` is a member.

    Raises
    ------
    ValueError
        If the series is unknown or ``x`` is not finite and positive.

    Notes
    -----
    See :func:`neighbours_many` for the method.

    References
    ----------
    IEC 60063:2015.
    """
    key = canonical_name(name)
    xv = _check_positive("x", x)
    tol = _check_rel(rel)
    table = _TABLES[key]
    n = len(table)
    decade = math.floor(math.log10(xv))
    j = bisect.bisect_right(table, xv / 10.0**decade)
    g0 = decade * n + j - 1
    cands = [_value_at_scalar(key, g0 + k) for k in (-2, -1, 0, 1, 2)]
    close = [c for c in cands if abs(c - xv) <= tol * xv]
    if close:
        snap = min(close, key=lambda c: abs(c - xv))
        return snap, snap
    return max(c for c in cands if c < xv), min(c for c in cands if c > xv)


def nearest_many(name: str, x: npt.ArrayLike, *, rel: float = _DEFAULT_REL) -> FloatArray:
    """Vectorised :func:`nearest`.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    x
        Array of finite positive values.
    rel
        Snap tolerance passed to :func:`neighbours_many`.

    Returns
    -------
    numpy.ndarray
        For each ``x``, the neighbour nearer on a logarithmic scale; ties go to the lower one.

    Raises
    ------
    ValueError
        As :func:`neighbours_many`.

    Notes
    -----
    ``below`` is chosen when ``ln(x/below) <= ln(above/x)``, i.e. when ``x`` does not exceed
    the geometric mean ``sqrt(below*above)``.

    References
    ----------
    IEC 60063:2015 (the series are geometric, so log distance is the natural measure).
    """
    below, above = neighbours_many(name, x, rel=rel)
    xs = np.asarray(x, dtype=np.float64)
    take_below = (np.log(xs) - np.log(below)) <= (np.log(above) - np.log(xs))
    return np.asarray(np.where(take_below, below, above), dtype=np.float64)


def nearest(name: str, x: float, *, rel: float = _DEFAULT_REL) -> float:
    """Return the standard value nearest ``x`` on a logarithmic scale.

    Parameters
    ----------
    name
        Series name, case-insensitive.
    x
        A finite positive value in SI units.
    rel
        Snap tolerance passed to :func:`neighbours`.

    Returns
    -------
    float
        One of ``neighbours(name, x)``; ties go to the lower value.

    Raises
    ------
    ValueError
        If the series is unknown or ``x`` is not finite and positive.

    Notes
    -----
    ``below`` wins when ``ln(x/below) <= ln(above/x)``.

    References
    ----------
    IEC 60063:2015.
    """
    below, above = neighbours(name, x, rel=rel)
    xv = float(x)
    if math.log(xv) - math.log(below) <= math.log(above) - math.log(xv):
        return below
    return above


def is_member(name: str, x: float, rel: float = _DEFAULT_REL) -> bool:
    """Tell whether ``x`` is a value of the series (within a relative tolerance).

    Parameters
    ----------
    name
        Series name, case-insensitive.
    x
        A finite positive value in SI units.
    rel
        Relative tolerance of the comparison.

    Returns
    -------
    bool
        True when some standard value ``v`` has ``|x - v| <= rel*x``.

    Raises
    ------
    ValueError
        If the series is unknown or ``x`` is not finite and positive.

    Notes
    -----
    Uses :func:`neighbours` with the same tolerance.

    References
    ----------
    IEC 60063:2015.
    """
    below, above = neighbours(name, x, rel=rel)
    return below == above


def part_series(value: float, tolerance: float, *, rel: float = 1e-6) -> str | None:
    """The series a part of this value and tolerance belongs to, or ``None`` for none.

    Parameters
    ----------
    value
        The part's value in SI units (finite, positive).
    tolerance
        Its relative tolerance (0.05 for ±5 %).
    rel
        Relative slack when matching the value to a standard value.

    Returns
    -------
    str or None
        Of the series that hold the value, the finest one whose own tolerance is no
        tighter than the part's; when every series that holds the value asks for a
        tighter part, the coarsest of them; ``None`` when no series holds it.

    Raises
    ------
    ValueError
        If ``value`` is not finite and positive.

    Notes
    -----
    IEC 60063 pairs each series with a tolerance (E6 20 %, E12 10 %, E24 5 %, E48 2 %,
    E96 1 %, E192 0.5 % and tighter; E3 above 20 %): parts of that tolerance cover the
    decade without gaps.  A part at least as tight as a series' tolerance is a part of
    that series, so ``470k 5%`` is an E24 part (470 is in E3 to E24, and 5 % is the E24
    tolerance), ``1k 5%`` is E24 too (1.0 is in every series), ``1k 1%`` is E96,
    ``2k2 1%`` is E24 (2.2 is in no three-digit series; tighter parts of E24 values are
    common practice) and ``1k 30%`` is E3.  A value found only in series meant for
    tighter parts (``4k75 5%``) is labelled with the coarsest series that holds it
    (E96): the value comes from that series, and its tolerance, shown beside it, says
    the part is looser than the series asks.

    References
    ----------
    IEC 60063:2015, preferred number series and the tolerance associated with each.
    """
    members = [name for name in SERIES_NAMES if is_member(name, value, rel=rel)]
    if not members:
        return None
    fits = [
        name
        for name in members
        # E3 stands for tolerances above 20 %: any part fits its grid
        if name == "E3" or tolerance <= _USUAL_TOLERANCE[name] * (1.0 + 1e-9)
    ]
    return fits[-1] if fits else members[0]
