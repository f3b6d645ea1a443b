"""Extreme-value worst-case analysis over the box of factor ranges.

Every output is evaluated at every corner of the box spanned by the varying factors
(and at the nominal point).  For a model that is monotone in each factor the extremes
over the whole box lie at corners, so the result is exact.  Factors marked
``monotone=False`` (e.g. temperature feeding a parabolic tempco) get a grid of evenly
spaced values over their range instead of just the two ends.

Two reductions never change the result of a model that is monotone in each
factor, only the number of points visited: factors that declare an output
``rising``/``falling`` are fixed at the end that gives each extreme, and factors
that act through one effective value (``Factor.through``, e.g. a resistor's
tolerance and tempco) are tied to that value's lowest and highest combination.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from timespec.analysis.factors import (
    Evaluate,
    Factor,
    FloatArray,
    call_evaluate,
    check_factors,
    is_varying,
    nominal_inputs,
)

__all__ = ["Extremes", "corner_label", "grid_size", "worst_case", "worst_case_many"]

_CHUNK = 65_536  # grid points evaluated per call of the model
#: Grids up to this size keep their level digits cached between searches.
_DIGIT_CACHE_LIMIT = 1 << 16


@dataclass(frozen=True)
class Extremes:
    """Worst-case extremes of one output.

    Parameters
    ----------
    nominal : float
        Output at the nominal point.
    low, high : float
        Smallest and largest output over the searched points (``low <= nominal <=
        high``).  ``high`` is ``inf`` when some point never reaches its threshold; both
        are ``nan`` when the model is undefined (NaN) somewhere in the box.
    low_at, high_at : mapping of str to float
        Values of the varying factors at the minimising and maximising points (for
        NaN: the first point where the output is NaN).
    """

    nominal: float
    low: float
    high: float
    low_at: Mapping[str, float]
    high_at: Mapping[str, float]


def _levels(factor: Factor, interior_points: int) -> FloatArray:
    """Values a varying factor takes in the search grid."""
    if factor.monotone:
        return np.array([factor.low, factor.high], dtype=np.float64)
    return np.linspace(factor.low, factor.high, interior_points, dtype=np.float64)


def grid_size(factors: Sequence[Factor], *, interior_points: int = 9) -> int:
    """Number of points :func:`worst_case` evaluates for these factors.

    Parameters
    ----------
    factors : sequence of Factor
        The factors.
    interior_points : int, optional
        As for :func:`worst_case`.

    Returns
    -------
    int
        ``2**m * interior_points**k`` for ``m`` monotone and ``k`` other varying factors,
        where the factors that act through one effective value
        (``through`` of :class:`~timespec.analysis.Factor`) count as one monotone factor.
    """
    facs = [f for f in factors if is_varying(f)]
    known = {f.name: f.nominal for f in factors if not is_varying(f)}
    return _points(_dimensions(facs, known, interior_points))


class _Tracker:
    """Running minimum and maximum of one output with the flat index where they occur.

    Index ``-1`` stands for the nominal point.  Ties keep the earlier point.
    """

    def __init__(self, nominal: float) -> None:
        self.low = nominal
        self.high = nominal
        self.low_index = -1
        self.high_index = -1
        self.nan_index: int | None = -1 if math.isnan(nominal) else None

    def update(self, values: FloatArray, offset: int) -> None:
        if self.nan_index is not None:
            return
        nan_mask = np.isnan(values)
        if nan_mask.any():
            self.nan_index = offset + int(np.argmax(nan_mask))
            return
        i_lo = int(np.argmin(values))
        i_hi = int(np.argmax(values))
        if values[i_lo] < self.low:
            self.low, self.low_index = float(values[i_lo]), offset + i_lo
        if values[i_hi] > self.high:
            self.high, self.high_index = float(values[i_hi]), offset + i_hi


@dataclass(frozen=True)
class _Dim:
    """One axis of the search grid: one factor, or factors that move together.

    ``table[level, j]`` is the value of ``names[j]`` at that level.
    """

    names: tuple[str, ...]
    table: FloatArray


def _direction(factor: Factor, context: Mapping[str, float]) -> int:
    """+1 when ``factor`` raises its effective value, −1 when it lowers it (``context``
    holds the pivot factor's value)."""
    if factor.pivot is None:
        return 1
    name, value = factor.pivot
    return -1 if context.get(name, value) < value else 1


def _tied_rows(
    groups: Sequence[Sequence[Factor]], context: Mapping[str, float]
) -> list[list[float]]:
    """Rows of member values: every combination of each group at its lowest or
    highest effective value, the groups in order (the last varies fastest)."""
    rows: list[list[float]] = [[]]
    for members in groups:
        ends = []
        for top in (False, True):
            ends.append([m.high if (_direction(m, context) > 0) == top else m.low for m in members])
        rows = [row + end for row in rows for end in ends]
    return rows


def _dimensions(
    free: Sequence[Factor],
    known: Mapping[str, float],
    interior_points: int,
) -> list[_Dim]:
    """The grid's axes: each free factor alone, except that factors acting
    through one effective value (``Factor.through``) are tied to its two
    extremes; tied groups whose direction turns on a free factor (a tempco on
    the temperature) share one axis with that factor.

    ``known`` holds the values of factors that are not free (declared ends,
    fixed factors) for the pivots.
    """
    free_names = {f.name for f in free}
    by_through: dict[str, list[Factor]] = {}
    for f in free:
        if f.through and f.monotone:
            by_through.setdefault(f.through, []).append(f)
    tied: dict[str, list[Factor]] = {}
    for key, members in by_through.items():
        pivots = {m.pivot[0] for m in members if m.pivot is not None}
        if len(members) >= 2 and len(pivots) <= 1:
            tied[key] = members
    in_tie = {m.name for members in tied.values() for m in members}
    # tied groups keyed by the free factor their direction turns on ("" for none)
    by_context: dict[str, list[list[Factor]]] = {}
    for members in tied.values():
        pivots = {m.pivot[0] for m in members if m.pivot is not None}
        context = next(iter(pivots)) if pivots else ""
        by_context.setdefault(context if context in free_names else "", []).append(members)
    dims: list[_Dim] = []
    for f in free:
        if f.name in in_tie or f.name in by_context:
            continue
        dims.append(_Dim((f.name,), _levels(f, interior_points)[:, None]))
    for context, groups in by_context.items():
        names = tuple(m.name for members in groups for m in members)
        if not context:
            rows = _tied_rows(groups, known)
            dims.append(_Dim(names, np.array(rows, dtype=np.float64)))
            continue
        pivot_factor = next(f for f in free if f.name == context)
        table = [
            [float(t), *row]
            for t in _levels(pivot_factor, interior_points)
            for row in _tied_rows(groups, {**known, context: float(t)})
        ]
        dims.append(_Dim((context, *names), np.array(table, dtype=np.float64)))
    return dims


@functools.lru_cache(maxsize=32)
def _digits(sizes: tuple[int, ...]) -> tuple[npt.NDArray[np.int32], ...]:
    """Level of every axis at every flat grid index (last axis fastest), cached."""
    count = math.prod(sizes)
    index = np.arange(count, dtype=np.int32)
    out = []
    stride = count
    for n in sizes:
        stride //= n
        digits = (index // stride) % n
        digits.flags.writeable = False
        out.append(digits)
    return tuple(out)


def _grid(dims: Sequence[_Dim]) -> tuple[dict[str, FloatArray], int]:
    """Every factor's column over the full grid of ``dims``, and its size."""
    sizes = tuple(d.table.shape[0] for d in dims)
    count = math.prod(sizes)
    digits = _digits.__wrapped__(sizes) if count > _DIGIT_CACHE_LIMIT else _digits(sizes)
    grid: dict[str, FloatArray] = {}
    for dim, level in zip(dims, digits, strict=True):
        for j, name in enumerate(dim.names):
            grid[name] = dim.table[level, j]
    return grid, count


def _point(index: int, free: Sequence[Factor], dims: Sequence[_Dim]) -> dict[str, float]:
    """Factor values of grid point ``index`` (``-1``: the nominal point)."""
    if index < 0:
        return {f.name: f.nominal for f in free}
    out: dict[str, float] = {}
    rest = index
    for dim in reversed(dims):
        n = dim.table.shape[0]
        level = rest % n
        rest //= n
        for j, name in enumerate(dim.names):
            out[name] = float(dim.table[level, j])
    return {f.name: out[f.name] for f in free}


def _points(dims: Sequence[_Dim]) -> int:
    return math.prod(d.table.shape[0] for d in dims)


def worst_case(
    factors: Sequence[Factor],
    evaluate: Evaluate,
    *,
    interior_points: int = 9,
    max_points: int = 2**20,
) -> dict[str, Extremes]:
    """Extreme values of every output over the box of factor ranges.

    Parameters
    ----------
    factors : sequence of Factor
        The circuit's factors; ``"fixed"`` factors and empty ranges stay at nominal.
    evaluate : Evaluate
        Vectorised circuit model.
    interior_points : int, optional
        Number of evenly spaced values (ends included) searched for each factor with
        ``monotone=False``; at least 2.  Default 9.
    max_points : int, optional
        Largest grid accepted (the nominal point is not counted).  Default ``2**20``.

    Returns
    -------
    dict of str to Extremes
        Output name → extremes and the factor values that produce them.

    Raises
    ------
    ValueError
        If the grid has more than ``max_points`` points, ``interior_points < 2``, factor
        names repeat, or the model returns malformed outputs.

    Notes
    -----
    The grid is the Cartesian product of ``{low, high}`` for monotone factors and
    ``linspace(low, high, interior_points)`` for the others, i.e.
    ``2**m * interior_points**k`` points, evaluated in chunks of 65 536 points.
    Corners give the exact extremes of a model that is monotone in each factor; for the
    others the grid bounds the extremes from inside (a finer grid tightens them).
    Infinite outputs propagate (``high = inf``); a NaN anywhere makes both extremes NaN
    so that no window check can pass silently.

    References
    ----------
    Extreme-value (corner) worst-case analysis, common practice in circuit tolerance
    design; monotonicity caveat as in the project reference sheet.
    """
    return worst_case_many(
        factors, evaluate, {}, interior_points=interior_points, max_points=max_points
    )[0]


def worst_case_many(
    factors: Sequence[Factor],
    evaluate: Evaluate,
    overrides: Mapping[str, FloatArray],
    *,
    interior_points: int = 9,
    max_points: int = 2**20,
) -> list[dict[str, Extremes]]:
    """Worst case of many variants of one model at once (e.g. candidate designs).

    Parameters
    ----------
    factors : sequence of Factor
        The factors shared by every variant.
    evaluate : Evaluate
        Vectorised model.
    overrides : mapping of str to FloatArray
        For some *fixed* factors, one value per variant (all arrays the same
        length); empty for a single variant.
    interior_points, max_points : int, optional
        As for :func:`worst_case`.

    Returns
    -------
    list of dict of str to Extremes
        One result per variant, identical to calling :func:`worst_case` with the
        fixed factors set to that variant's values.

    Raises
    ------
    ValueError
        If an override names a varying or unknown factor, the arrays differ in
        length, or the grid is too large.

    Notes
    -----
    The grid of :func:`worst_case` is built once and evaluated for all variants in
    one vectorised call (in chunks), which is what makes ranking a shortlist of
    designs cheap.  Factors that declare an output ``rising`` or ``falling`` are
    fixed at the end that gives each extreme of that output (for the minimum of
    a rising output, the low end: any point of the box is at least the value with
    that factor at its low end), so the grid for that output only spans the
    other factors; outputs with the same declarations share their grids.  NaN is
    only detected at the points searched.
    """
    if interior_points < 2:
        raise ValueError(f"interior_points must be at least 2, got {interior_points}")
    facs = check_factors(factors)
    by_name = {f.name: f for f in facs}
    sizes = {len(np.atleast_1d(v)) for v in overrides.values()}
    if len(sizes) > 1:
        raise ValueError("override arrays must all have the same length")
    d_total = sizes.pop() if sizes else 1
    for name in overrides:
        if name not in by_name or is_varying(by_name[name]):
            raise ValueError(f"override {name!r} is not a fixed factor")
    ov = {k: np.asarray(np.atleast_1d(v), dtype=np.float64) for k, v in overrides.items()}
    varying = [f for f in facs if is_varying(f)]
    fixed = [f for f in facs if not is_varying(f)]

    nominal_in = {k: np.repeat(v, d_total) for k, v in nominal_inputs(facs).items()}
    nominal_in.update(ov)
    nominal = call_evaluate(evaluate, nominal_in, d_total)

    plan = _plan(varying, list(nominal), by_name, fixed, interior_points)
    low_t: dict[str, list[_Tracker]] = {k: [] for k in nominal}
    high_t: dict[str, list[_Tracker]] = {k: [] for k in nominal}
    low_at: dict[str, list[dict[str, float]]] = {k: [] for k in nominal}
    high_at: dict[str, list[dict[str, float]]] = {k: [] for k in nominal}
    for search in plan:
        count = _points(search.dims)
        if count > max_points:
            raise ValueError(
                f"worst-case grid has {count} points, more than max_points={max_points}; "
                "mark fewer factors monotone=False, lower interior_points or raise max_points"
            )
        grid, _ = _grid(search.dims)
        keys = sorted({key for key, _ in search.tasks})
        trackers = _search(fixed, grid, search.ends, ov, count, d_total, evaluate, nominal, keys)
        for key, side in search.tasks:
            for j, tracker in enumerate(trackers[key]):
                at = _point(tracker.low_index, search.free, search.dims)
                at_hi = _point(tracker.high_index, search.free, search.dims)
                if tracker.nan_index is not None:
                    at = at_hi = _point(tracker.nan_index, search.free, search.dims)
                at = {**at, **search.ends} if tracker.low_index >= 0 else at
                at_hi = {**at_hi, **search.ends} if tracker.high_index >= 0 else at_hi
                if side in ("low", "both"):
                    _store(low_t[key], low_at[key], j, tracker, at)
                if side in ("high", "both"):
                    _store(high_t[key], high_at[key], j, tracker, at_hi)
    results: list[dict[str, Extremes]] = []
    for j in range(d_total):
        res: dict[str, Extremes] = {}
        for key in nominal:
            lo, hi = low_t[key][j], high_t[key][j]
            nom = float(nominal[key][j])
            if lo.nan_index is not None or hi.nan_index is not None:
                at = low_at[key][j] if lo.nan_index is not None else high_at[key][j]
                res[key] = Extremes(nom, math.nan, math.nan, at, dict(at))
            else:
                res[key] = Extremes(nom, lo.low, hi.high, low_at[key][j], high_at[key][j])
        results.append(res)
    return results


@dataclass(frozen=True)
class _Search:
    """One grid to evaluate: the free factors' axes, the declared factors' ends, and
    which extreme (``low``, ``high`` or ``both``) of which output it decides."""

    free: tuple[Factor, ...]
    dims: tuple[_Dim, ...]
    ends: Mapping[str, float]
    tasks: tuple[tuple[str, str], ...]


#: Declarations are used when their grids together visit at most this share of
#: the points of the one undeclared grid (each extra grid costs a model call).
DECLARED_PAYS = 0.75


def _plan(
    varying: Sequence[Factor],
    keys: Sequence[str],
    by_name: Mapping[str, Factor],
    fixed: Sequence[Factor],
    interior_points: int,
) -> list[_Search]:
    """The grids of a search: one per set of declared ends, shared by every output
    and extreme that needs it, or the one undeclared grid when that is cheaper."""
    fixed_values = {f.name: f.nominal for f in fixed}
    plain_dims = tuple(_dimensions(varying, fixed_values, interior_points))
    plain = _Search(tuple(varying), plain_dims, {}, tuple((k, "both") for k in keys))
    searches: dict[
        tuple[object, ...], tuple[tuple[Factor, ...], dict[str, float], list[tuple[str, str]]]
    ] = {}
    for key in keys:
        declared = {
            f.name: (1 if key in f.rising else -1)
            for f in varying
            if key in f.rising or key in f.falling
        }
        free = tuple(f for f in varying if f.name not in declared)
        for side in ("low", "high") if declared else ("both",):
            ends = {
                name: (by_name[name].low if (sign > 0) == (side == "low") else by_name[name].high)
                for name, sign in declared.items()
            }
            ident = (tuple(f.name for f in free), tuple(sorted(ends.items())))
            entry = searches.setdefault(ident, (free, ends, []))
            entry[2].append((key, side))
    if len(searches) == 1 and not next(iter(searches.values()))[1]:
        return [plain]
    plan = [
        _Search(
            free,
            tuple(_dimensions(free, {**fixed_values, **ends}, interior_points)),
            ends,
            tuple(tasks),
        )
        for free, ends, tasks in searches.values()
    ]
    if sum(_points(s.dims) for s in plan) > DECLARED_PAYS * _points(plain_dims):
        return [plain]
    return plan


def _store(
    trackers: list[_Tracker],
    points: list[dict[str, float]],
    j: int,
    tracker: _Tracker,
    at: dict[str, float],
) -> None:
    if len(trackers) <= j:
        trackers.append(tracker)
        points.append(at)
    else:  # pragma: no cover - each output is searched once per side
        trackers[j] = tracker
        points[j] = at


def _search(
    fixed: Sequence[Factor],
    grid: Mapping[str, FloatArray],
    ends: Mapping[str, float],
    ov: Mapping[str, FloatArray],
    count: int,
    d_total: int,
    evaluate: Evaluate,
    nominal: Mapping[str, FloatArray],
    keys: Sequence[str],
) -> dict[str, list[_Tracker]]:
    """Evaluate one grid for every variant; a tracker per output and variant."""
    trackers: dict[str, list[_Tracker]] = {
        k: [_Tracker(float(nominal[k][j])) for j in range(d_total)] for k in keys
    }
    per_call = max(1, _CHUNK // max(count, 1))
    for d0 in range(0, d_total, per_call):
        d1 = min(d0 + per_call, d_total)
        d = d1 - d0
        n = d * count
        inputs: dict[str, FloatArray] = {}
        for f in fixed:
            if f.name in ov:
                inputs[f.name] = np.repeat(ov[f.name][d0:d1], count)
            else:
                inputs[f.name] = np.full(n, f.nominal)
        for name, value in ends.items():
            inputs[name] = np.full(n, value)
        for name, col in grid.items():
            inputs[name] = np.tile(col, d)
        outputs = call_evaluate(evaluate, inputs, n)
        if not set(keys) <= outputs.keys():
            raise ValueError(
                f"evaluate returned outputs {sorted(outputs)}, expected {sorted(nominal)}"
            )
        for key in keys:
            arr = outputs[key]
            for j in range(d):
                trackers[key][d0 + j].update(arr[j * count : (j + 1) * count], 0)
    return trackers


def _short_name(factor: Factor) -> str:
    return factor.name.replace(".", " ").replace("_", " ")


def corner_label(at: Mapping[str, float], factors: Sequence[Factor]) -> str:
    """Short readable description of a point of the worst-case search.

    Parameters
    ----------
    at : mapping of str to float
        Factor values, as in :attr:`Extremes.low_at`.
    factors : sequence of Factor
        The factors, in the order they should be listed.

    Returns
    -------
    str
        E.g. ``"R1 tol high, C1 tol low, temp 60, supply low"``: the factor name with
        dots shown as spaces, then ``low``/``high`` for a monotone factor at an end of its
        range, or the value (4 significant digits) otherwise.  Factors at their nominal
        value are left out; ``"nominal"`` when all are.
    """
    parts: list[str] = []
    for f in factors:
        if f.name not in at:
            continue
        value = at[f.name]
        if value == f.nominal:
            continue
        if f.monotone and value == f.low:
            word = "low"
        elif f.monotone and value == f.high:
            word = "high"
        else:
            word = f"{value:.4g}"
        parts.append(f"{_short_name(f)} {word}")
    return ", ".join(parts) if parts else "nominal"
