"""Computed fixes for a requirement the allowed parts cannot meet.

Nothing here is guessed.  Each candidate change is applied to the block (a
:func:`dataclasses.replace` of its part policies, pinned parts or conditions), the
modified block is solved again with :func:`timespec.design.solver.solve_block`, and only
changes whose re-solved design *meets* at worst case are offered, cheapest first.

Candidate changes
-----------------
* ``values``: choose new standard values (a checked block whose pinned values fail);
* ``finer-series``: the next finer IEC 60063 series (resistors up to E192,
  capacitors up to E24, the finest commonly stocked for capacitors, common practice);
* ``pairs``: allow two standard values in series or parallel as one part;
* ``resistor-tolerance``: 0.5 % or 0.1 % resistors with a matching tempco
  (50 and 25 ppm/K: metal and thin film, figures from memory, see
  :data:`timespec.parts.dielectrics.RESISTOR_TCR_PPM`);
* ``capacitor-tolerance``: 10, 5, 2 or 1 % capacitors (class 2 ceramics not below
  5 %, electrolytics not below 10 %: what is commonly made, common practice);
* ``dielectric``: C0G or polypropylene film instead of a class 2 ceramic,
  electrolytic or other imprecise dielectric, the value range clipped to what the
  new dielectric is commonly made in;
* ``resistor-range`` / ``capacitor-range``: a decade more range when no candidate
  could be formed at all;
* combinations of two or three of the above (their costs add);
* ``trimmer``: for one-resistor R-C blocks, a fixed resistor plus a trimmer
  whose range covers the worst-case spread of everything else, computed from the
  worst-case extremes at the trimming condition; the error left after trimming
  (temperature, supply, ageing) is computed too;
* ``ambient``: the widest narrower ambient range that would meet — offered last and
  labelled as a change of the requirement, not of the design.

Cost
----
A small integer, an ordinal estimate of what a change adds to the bill of materials
and to production (common practice, not a price list): finer series 1 per step; a
decade more range 1; pairs 2 (a second part where needed); a tighter resistor grade
2 per step; a tighter capacitor grade 3 per step; C0G 3, film 4 (larger, dearer
parts); new values for a pinned design 0; a trimmer 6 (a part plus an adjustment
step in production); a narrower ambient range 50 (not a design change at all).
Combinations add their costs.  Ties are broken by the remaining margin (more first).
"""

from __future__ import annotations

import dataclasses
import itertools
import math
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from timespec.analysis import Factor, FloatArray, worst_case
from timespec.design.result import BlockResult, Candidate
from timespec.design.solver import solve_block
from timespec.families import family
from timespec.model import Block, CapacitorPolicy, Conditions, PinnedPart, ResistorPolicy
from timespec.numbers import format_interval, format_part_value
from timespec.parts import dielectrics
from timespec.parts import series as eseries
from timespec.parts.part import Part

__all__ = [
    "COSTS",
    "TRIMMER_STEPS",
    "Fix",
    "Trim",
    "suggest_fixes",
    "tightest_window",
    "trim_design",
]

#: Cost of each kind of change (see the module notes).
COSTS: Mapping[str, int] = {
    "values": 0,
    "finer-series": 1,
    "resistor-range": 1,
    "capacitor-range": 1,
    "pairs": 2,
    "resistor-tolerance": 2,
    "capacitor-tolerance": 3,
    "dielectric": 3,
    "trimmer": 6,
    "ambient": 50,
}

# Resistor grades: tolerance and the tempco bound that usually comes with it
# (thick film 1 % / 100 ppm/K, metal film 0.5 % / 50 ppm/K, thin film 0.1 % /
# 25 ppm/K; from memory, as RESISTOR_TCR_PPM).
_RESISTOR_GRADES: tuple[tuple[float, float], ...] = (
    (0.01, dielectrics.RESISTOR_TCR_PPM["thick film"]),
    (0.005, dielectrics.RESISTOR_TCR_PPM["metal film"]),
    (0.001, dielectrics.RESISTOR_TCR_PPM["thin film"]),
)
_CAPACITOR_GRADES: tuple[float, ...] = (0.10, 0.05, 0.02, 0.01)
# Tightest grade commonly made per dielectric family (common practice).
_TIGHTEST = {"class1": 0.01, "film": 0.01, "class2": 0.05, "electrolytic": 0.10}
_FINEST_CAPACITOR_SERIES = "E24"

#: Trimmer values: the 1-2-5 sequence trimmers are commonly sold in (common practice).
TRIMMER_STEPS: tuple[float, ...] = tuple(m * 10.0**e for e in range(1, 7) for m in (1.0, 2.0, 5.0))
# Cermet trimmer: end-to-end tolerance ±20 %, tempco ±100 ppm/K, setting to within
# ±0.1 % of the output with a multi-turn part (all from memory).
_TRIM_TOL = 0.20
_TRIM_TC_PPM = 100.0
_TRIM_SETTING = 0.001
_TRIMMED_KINDS = frozenset({"oneshot", "delay", "relaxation"})
# At most this many modified blocks are re-solved per call.
_BUDGET = 60


@dataclass(frozen=True)
class Fix:
    """One computed change that makes a block meet its requirements.

    Attributes
    ----------
    what
        A plain sentence: the change, the parts it leads to and the window reached.
    kind
        ``"values"``, ``"finer-series"``, ``"pairs"``, ``"resistor-tolerance"``,
        ``"capacitor-tolerance"``, ``"dielectric"``, ``"resistor-range"``,
        ``"capacitor-range"``, ``"trimmer"`` or ``"ambient"``; combinations join
        kinds with ``"+"``.
    cost
        Ordinal cost (see :data:`COSTS`); smaller is cheaper.
    block
        The modified block (for ``"trimmer"``, the original: the trimmer is outside
        the block model; apply it by hand).
    verdict
        Verdict of the re-solved design (``"meets"``).
    windows
        Worst-case ``(low, high)`` of every required output of the re-solved design
        (for ``"trimmer"``: after trimming).
    parts
        The re-solved design's parts.
    margin
        Smallest room left to the requirement, as a fraction of its width.
    """

    what: str
    kind: str
    cost: int
    block: Block
    verdict: str
    windows: Mapping[str, tuple[float, float]]
    parts: tuple[Part, ...] = ()
    margin: float = 0.0


@dataclass(frozen=True)
class Trim:
    """A fixed resistor plus a trimmer in place of one timing resistor.

    Attributes
    ----------
    ref
        The resistor replaced.
    fixed
        The fixed resistor, Ω (a standard value of the block's series).
    trimmer
        The trimmer's end-to-end value, Ω.
    needed
        ``(low, high)`` total resistance that puts the output on target over the
        worst-case spread of every other initial tolerance, Ω.
    covered
        ``(low, high)`` total the combination surely reaches, Ω.
    remaining
        Worst-case ``(low, high)`` of the output after trimming (temperature, supply,
        ageing, the trimmer's tempco and setting).
    goal
        The value the output is trimmed to.
    output
        The trimmed output's name.
    """

    ref: str
    fixed: float
    trimmer: float
    needed: tuple[float, float]
    covered: tuple[float, float]
    remaining: tuple[float, float]
    goal: float
    output: str


# --------------------------------------------------------------------------
# summaries


def tightest_window(result: BlockResult) -> dict[str, tuple[float, float]]:
    """The worst-case window of every output of the best (or closest) design.

    Parameters
    ----------
    result
        A solved block; when infeasible, ``result.best`` is the closest design.

    Returns
    -------
    dict
        Output name → ``(low, high)``; empty when no design could be formed.
    """
    if result.best is None:
        return {}
    return {o.name: (o.low, o.high) for o in result.best.outputs}


def _required_windows(cand: Candidate) -> dict[str, tuple[float, float]]:
    return {o.name: (o.low, o.high) for o in cand.outputs if o.required is not None}


def _margin(cand: Candidate) -> float:
    """Smallest room to a requirement end, relative to the requirement's width."""
    room = math.inf
    for o in cand.outputs:
        w = o.required
        if w is None:
            continue
        width = w.high - w.low
        scale = width if math.isfinite(width) and width > 0 else abs(w.centre) or 1.0
        lo, hi = o.margin
        room = min(room, lo / scale, hi / scale)
    return room if math.isfinite(room) else 0.0


def _window_text(cand: Candidate) -> str:
    texts = [
        f"{o.label} {format_interval(o.low, o.high, o.kind)} inside "
        f"{format_interval(o.required.low, o.required.high, o.kind)}"
        for o in cand.outputs
        if o.required is not None
    ]
    return "; ".join(texts)


def _parts_text(parts: Iterable[Part]) -> str:
    out = []
    for p in parts:
        value = format_part_value(p.value, p.kind)
        if p.pair is not None:
            a, b, how = p.pair
            value = f"{value} ({format_part_value(a, p.kind)} {how} {format_part_value(b, p.kind)})"
        grade = f"{p.tolerance * 100:.3g} %"
        extra = p.dielectric or (f"{p.tempco_ppm:g} ppm/K" if p.tempco_ppm is not None else "")
        out.append(f"{p.ref} = {value} {grade} {extra}".rstrip())
    return ", ".join(out)


# --------------------------------------------------------------------------
# changes


Edit = Callable[[Block], Block]


@dataclass(frozen=True)
class _Change:
    kind: str
    text: str
    cost: int
    apply: Edit
    slot: str  # changes in the same slot touch the same fields and never combine


def _apply(block: Block, changes: Sequence[_Change]) -> Block:
    out = block
    for ch in changes:
        out = ch.apply(out)
    return out


def _set_resistors(fields: Mapping[str, object], pinned: Mapping[str, float] | None = None) -> Edit:
    """An edit of the current resistor policy (and pinned resistors)."""

    def edit(block: Block) -> Block:
        pol: ResistorPolicy = dataclasses.replace(block.resistors, **fields)  # type: ignore[arg-type]
        pins = _pinned_update(block, "resistance", pinned) if pinned else block.pinned
        return dataclasses.replace(block, resistors=pol, pinned=pins)

    return edit


def _set_capacitors(
    fields: Mapping[str, object], pinned: Mapping[str, float | str] | None = None
) -> Edit:
    """An edit of the current capacitor policy (and pinned capacitors)."""

    def edit(block: Block) -> Block:
        pol: CapacitorPolicy = dataclasses.replace(block.capacitors, **fields)  # type: ignore[arg-type]
        pins = _pinned_update(block, "capacitance", pinned) if pinned else block.pinned
        return dataclasses.replace(block, capacitors=pol, pinned=pins)

    return edit


def _unpin(block: Block) -> Block:
    return dataclasses.replace(block, pinned=())


def _pinned_update(
    block: Block, kind: str, fields: Mapping[str, float | str]
) -> tuple[PinnedPart, ...]:
    out = []
    for p in block.pinned:
        if p.kind == kind:
            new = dict(fields)
            for name in ("tolerance", "tempco_ppm"):  # never loosen a pinned part's own grade
                own = getattr(p, name)
                value = new.get(name)
                if isinstance(value, float) and own is not None:
                    new[name] = min(own, value)
            p = dataclasses.replace(p, **new)  # type: ignore[arg-type]
        out.append(p)
    return tuple(out)


def _pct(t: float) -> str:
    return f"{t * 100:.3g} %"


def _resistor_changes(block: Block) -> list[_Change]:
    rp = block.resistors
    out: list[_Change] = []
    steps = 0
    for tol, tc in _RESISTOR_GRADES:
        if tol >= rp.tolerance:
            continue
        steps += 1
        tempco = min(rp.tempco_ppm, tc)
        fields: dict[str, float] = {"tolerance": tol, "tempco_ppm": tempco}
        out.append(
            _Change(
                "resistor-tolerance",
                f"{_pct(tol)} resistors ({tempco:g} ppm/K) instead of "
                f"{_pct(rp.tolerance)} ({rp.tempco_ppm:g} ppm/K)",
                COSTS["resistor-tolerance"] * steps,
                _set_resistors(fields, fields),
                "r-grade",
            )
        )
    idx = eseries.SERIES_NAMES.index(rp.series) if rp.series in eseries.SERIES_NAMES else -1
    if 0 <= idx < len(eseries.SERIES_NAMES) - 1:
        finer = eseries.SERIES_NAMES[idx + 1]
        out.append(
            _Change(
                "finer-series",
                f"resistors from {finer} instead of {rp.series}",
                COSTS["finer-series"],
                _set_resistors({"series": finer}),
                "r-series",
            )
        )
    if not rp.pairs:
        out.append(
            _Change(
                "pairs",
                "two standard resistors in series or parallel where one value falls between",
                COSTS["pairs"],
                _set_resistors({"pairs": True}),
                "r-pairs",
            )
        )
    return out


def _capacitor_changes(block: Block) -> list[_Change]:
    cp = block.capacitors
    d = dielectrics.dielectric(cp.dielectric)
    out: list[_Change] = []
    steps = 0
    for tol in _CAPACITOR_GRADES:
        if tol >= cp.tolerance:
            continue
        steps += 1
        if tol < _TIGHTEST[d.family]:
            continue
        out.append(
            _Change(
                "capacitor-tolerance",
                f"{_pct(tol)} capacitors instead of {_pct(cp.tolerance)}",
                COSTS["capacitor-tolerance"] * steps,
                _set_capacitors({"tolerance": tol}, {"tolerance": tol}),
                "c-grade",
            )
        )
    if not d.precise or d.name in ("U2J", "PET"):
        for name, extra in (("C0G", 0), ("PP", 1)):
            new = dielectrics.dielectric(name)
            lo, hi = max(cp.low, new.min_farads), min(cp.high, new.max_farads)
            if lo > hi:
                continue
            # precise dielectrics come in 5 % or better; tighter grades cost as above
            grades = [t for t in (0.05, *_CAPACITOR_GRADES) if t <= min(cp.tolerance, 0.05)]
            for steps, tol in enumerate(sorted(set(grades), reverse=True)):
                fields: dict[str, object] = {
                    "dielectric": name,
                    "tolerance": tol,
                    "low": lo,
                    "high": hi,
                }
                out.append(
                    _Change(
                        "dielectric",
                        f"{name} capacitors ({_pct(tol)}) instead of {d.name} "
                        f"({_pct(cp.tolerance)})",
                        COSTS["dielectric"] + extra + COSTS["capacitor-tolerance"] * steps,
                        _set_capacitors(fields, {"dielectric": name, "tolerance": tol}),
                        "c-grade",
                    )
                )
    idx = eseries.SERIES_NAMES.index(cp.series) if cp.series in eseries.SERIES_NAMES else -1
    if 0 <= idx < eseries.SERIES_NAMES.index(_FINEST_CAPACITOR_SERIES):
        finer = eseries.SERIES_NAMES[idx + 1]
        out.append(
            _Change(
                "finer-series",
                f"capacitors from {finer} instead of {cp.series}",
                COSTS["finer-series"],
                _set_capacitors({"series": finer}),
                "c-series",
            )
        )
    if not cp.pairs:
        out.append(
            _Change(
                "pairs",
                "two standard capacitors in parallel or series where one value falls between",
                COSTS["pairs"],
                _set_capacitors({"pairs": True}),
                "c-pairs",
            )
        )
    return out


def _range_changes(block: Block) -> list[_Change]:
    rp, cp = block.resistors, block.capacitors
    return [
        _Change(
            "resistor-range",
            f"resistors from {format_part_value(rp.low / 10, 'resistance')} to "
            f"{format_part_value(rp.high * 10, 'resistance')} instead of "
            f"{format_part_value(rp.low, 'resistance')} to "
            f"{format_part_value(rp.high, 'resistance')}",
            COSTS["resistor-range"],
            _set_resistors({"low": rp.low / 10, "high": rp.high * 10}),
            "r-range",
        ),
        _Change(
            "capacitor-range",
            f"capacitors from {format_part_value(cp.low / 10, 'capacitance')} to "
            f"{format_part_value(cp.high * 10, 'capacitance')} instead of "
            f"{format_part_value(cp.low, 'capacitance')} to "
            f"{format_part_value(cp.high, 'capacitance')}",
            COSTS["capacitor-range"],
            _set_capacitors({"low": cp.low / 10, "high": cp.high * 10}),
            "c-range",
        ),
    ]


def _design_changes(block: Block, no_design: bool) -> list[_Change]:
    out: list[_Change] = []
    if block.pinned:
        out.append(
            _Change(
                "values",
                "new standard values chosen from the policies instead of the pinned ones",
                COSTS["values"],
                _unpin,
                "values",
            )
        )
    out += _resistor_changes(block) + _capacitor_changes(block)
    if no_design:
        out += _range_changes(block)
    return out


def _combinations(changes: Sequence[_Change], most: int) -> list[tuple[_Change, ...]]:
    """Every set of up to ``most`` changes of different kinds, cheapest first."""
    combos: list[tuple[_Change, ...]] = []
    for k in range(1, most + 1):
        for combo in itertools.combinations(changes, k):
            slots = [c.slot for c in combo]
            if len(set(slots)) == len(slots):
                combos.append(combo)
    combos.sort(key=lambda c: (sum(x.cost for x in c), len(c)))
    return combos


def _fix_from(block: Block, combo: Sequence[_Change], res: BlockResult) -> Fix:
    assert res.best is not None
    change = "; ".join(c.text for c in combo)
    what = f"Use {change}: {_parts_text(res.best.design.parts)} gives {_window_text(res.best)}."
    return Fix(
        what=what,
        kind="+".join(c.kind for c in combo),
        cost=sum(c.cost for c in combo),
        block=block,
        verdict=res.verdict,
        windows=_required_windows(res.best),
        parts=res.best.design.parts,
        margin=_margin(res.best),
    )


# --------------------------------------------------------------------------
# trimmer


def _at(factor: Factor, value: float) -> Factor:
    """The factor pinned to one value (``fixed``)."""
    return dataclasses.replace(factor, nominal=value, low=value, high=value, distribution="fixed")


def _trim_reference(factors: Sequence[Factor], block: Block) -> dict[str, float]:
    """Factor values at the trimming condition: 25 °C, nominal supply, new parts."""
    ref: dict[str, float] = {}
    for f in factors:
        if f.name == "temp":
            ref[f.name] = 25.0
        elif f.name == "supply":
            ref[f.name] = block.conditions.supply.centre
        elif f.name.endswith((".age", ".drift")) and f.name != "timer.drift":
            ref[f.name] = 0.0
    return ref


def trim_design(block: Block, result: BlockResult | None = None) -> Trim | None:
    """Size a fixed resistor and a trimmer that take out every initial spread.

    Parameters
    ----------
    block
        A one-shot, delay or relaxation block with one requirement.
    result
        Its solved result (solved here when ``None``); the best or closest design's
        single resistor is the one replaced.

    Returns
    -------
    Trim or None
        The combination and the window left after trimming; ``None`` when the block
        is not an R-C family with one resistor and one requirement.

    Notes
    -----
    The unit is trimmed at 25 °C and nominal supply so the output equals the
    requirement's target.  With every part, tolerance and device spread at its
    worst-case extremes (the resistor's own tolerance excluded: the trimmer absorbs
    it) the output at the design's resistance ``R0`` spans ``[y_lo, y_hi]``.  Near the
    design point ``y ∝ R^p`` (``p`` from a 1 % step: +1 for a time, −1 for a
    frequency), so the total resistance must reach ``R0·(goal/y)^(1/p)`` for both
    extremes.  The fixed part is the largest standard value whose upper tolerance
    limit stays below the smallest need; the trimmer is the smallest 1-2-5 value
    whose lower tolerance limit (−20 %) closes the gap to the largest need.  What
    stays after trimming is computed as the worst case of
    ``y(x)/y(x at the trimming condition)`` over every factor, widened by the
    trimmer's share of the resistance times its tempco (±100 ppm/K) over the
    ambient range, and by a ±0.1 % setting accuracy (trimmer figures from memory).

    References
    ----------
    Extreme-value analysis, common practice; trimmer figures from memory.
    """
    if block.kind not in _TRIMMED_KINDS or len(block.requirements) != 1:
        return None
    res = result if result is not None else solve_block(block)
    if res.best is None:
        return None
    design = res.best.design
    resistors = [p for p in design.parts if p.kind == "resistance"]
    if len(resistors) != 1:
        return None
    part = resistors[0]
    req = block.requirements[0]
    w = req.window
    if not (math.isfinite(w.low) and math.isfinite(w.high)):
        return None
    goal = w.centre
    fam = family(block.kind)
    factors = fam.factors(block, design)
    model = fam.evaluate(block, design.variant)
    ref = _trim_reference(factors, block)
    ref[f"{part.ref}.tol"] = 0.0
    ref[f"{part.ref}.tc"] = 0.0  # no effect at 25 °C; keeps the grid small
    initial = [_at(f, ref[f.name]) if f.name in ref else f for f in factors]
    with np.errstate(all="ignore"):
        ex = worst_case(initial, model)[req.quantity]
        probe = {f.name: np.array([f.nominal, f.nominal]) for f in initial}
        probe[f"{part.ref}.value"] = np.array([part.value, part.value * 1.01])
        y = model(probe)[req.quantity]
    if not (math.isfinite(ex.low) and math.isfinite(ex.high) and ex.low > 0):
        return None
    p = math.log(float(y[1]) / float(y[0])) / math.log(1.01)
    if not (math.isfinite(p) and abs(p) > 1e-6):
        return None
    needs = sorted(part.value * (goal / v) ** (1.0 / p) for v in (ex.low, ex.high))
    need_lo, need_hi = needs
    rp = block.resistors
    fixed, _ = eseries.neighbours(rp.series, need_lo / (1.0 + part.tolerance))
    f_lo, f_hi = fixed * (1.0 - part.tolerance), fixed * (1.0 + part.tolerance)
    gap = need_hi - f_lo
    trimmer = next((t for t in TRIMMER_STEPS if t * (1.0 - _TRIM_TOL) >= gap), None)
    if trimmer is None:
        return None
    covered = (f_hi, f_lo + trimmer * (1.0 - _TRIM_TOL))
    remaining = _after_trim(block, factors, model, req.quantity, ref, part.ref)
    span = max(abs(block.conditions.ambient_low - 25.0), abs(block.conditions.ambient_high - 25.0))
    share = (need_hi - f_lo) / need_hi
    extra = abs(p) * share * _TRIM_TC_PPM * 1e-6 * span + _TRIM_SETTING
    lo = goal * (1.0 + remaining[0] - extra)
    hi = goal * (1.0 + remaining[1] + extra)
    return Trim(
        ref=part.ref,
        fixed=fixed,
        trimmer=trimmer,
        needed=(need_lo, need_hi),
        covered=covered,
        remaining=(lo, hi),
        goal=goal,
        output=req.quantity,
    )


def _after_trim(
    block: Block,
    factors: Sequence[Factor],
    model: object,
    output: str,
    ref: Mapping[str, float],
    part_ref: str,
) -> tuple[float, float]:
    """Worst-case relative change of the output from the trimming condition."""
    assert callable(model)
    at_trim = {k: v for k, v in ref.items() if not k.startswith(f"{part_ref}.")}

    def relative(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        y = np.asarray(model(x)[output], dtype=np.float64)
        x0 = dict(x)
        n = y.shape[0] if y.ndim else 1
        for k, v in at_trim.items():
            x0[k] = np.full(n, v)
        y0 = np.asarray(model(x0)[output], dtype=np.float64)
        return {output: y / y0 - 1.0}

    with np.errstate(all="ignore"):
        ex = worst_case(factors, relative)[output]
    return (ex.low, ex.high)


def _trim_fix(block: Block, res: BlockResult) -> Fix | None:
    trim = trim_design(block, res)
    if trim is None:
        return None
    req = block.requirements[0]
    w = req.window
    lo, hi = trim.remaining
    if not (w.low <= lo and hi <= w.high):
        return None
    kind = w.kind
    rp = block.resistors
    what = (
        f"Replace {trim.ref} by a fixed {format_part_value(trim.fixed, 'resistance')} "
        f"({rp.series} {_pct(rp.tolerance)}) in series with a "
        f"{format_part_value(trim.trimmer, 'resistance')} trimmer (it surely covers "
        f"{format_interval(trim.covered[0], trim.covered[1], 'resistance')}, "
        f"{format_interval(trim.needed[0], trim.needed[1], 'resistance')} is needed), "
        f"adjusted at 25 °C and nominal supply to the target; temperature, supply and "
        f"ageing still move it: {format_interval(lo, hi, kind)} worst case after trimming, "
        f"inside {format_interval(w.low, w.high, kind)}."
    )
    width = w.high - w.low
    return Fix(
        what=what,
        kind="trimmer",
        cost=COSTS["trimmer"],
        block=block,
        verdict="meets",
        windows={req.quantity: (lo, hi)},
        parts=(),
        margin=min(lo - w.low, w.high - hi) / width if width > 0 else 0.0,
    )


def _trim_with_change(block: Block, changes: Sequence[_Change]) -> Fix | None:
    """A trimmer together with one part change, when a trimmer alone is not enough.

    Trimming removes the initial tolerances but not what moves after the trim
    (temperature, supply, ageing); a steadier dielectric or tighter parts can
    bring that remainder inside the window.  The cheapest single change that
    does is reported with the trimmer.
    """
    for change in sorted(changes, key=lambda c: c.cost):
        if change.kind == "values":
            continue
        modified = _apply(block, (change,))
        try:
            res = solve_block(modified)
        except ValueError:  # pragma: no cover - a change that the model rejects
            continue
        fix = _trim_fix(modified, res)
        if fix is not None:
            return dataclasses.replace(
                fix,
                what=f"{change.text[0].upper()}{change.text[1:]}, and: {fix.what}",
                kind=f"{change.kind}+trimmer",
                cost=fix.cost + change.cost,
            )
    return None


# --------------------------------------------------------------------------
# ambient


def _ambient_fix(block: Block) -> Fix | None:
    c = block.conditions
    if c.ambient_low >= 25.0 and c.ambient_high <= 25.0:
        return None

    def shrunk(s: float) -> Block:
        lo = 25.0 + s * (c.ambient_low - 25.0) if c.ambient_low < 25.0 else c.ambient_low
        hi = 25.0 + s * (c.ambient_high - 25.0) if c.ambient_high > 25.0 else c.ambient_high
        lo, hi = round(lo, 1), round(hi, 1)
        cond: Conditions = dataclasses.replace(c, ambient_low=min(lo, hi), ambient_high=max(lo, hi))
        return dataclasses.replace(block, conditions=cond)

    best: tuple[Block, BlockResult] | None = None
    res0 = solve_block(shrunk(0.0))
    if res0.verdict != "meets":
        return None
    best = (shrunk(0.0), res0)
    lo_s, hi_s = 0.0, 1.0
    for _ in range(7):
        mid = 0.5 * (lo_s + hi_s)
        blk = shrunk(mid)
        r = solve_block(blk)
        if r.verdict == "meets":
            lo_s, best = mid, (blk, r)
        else:
            hi_s = mid
    blk, r = best
    assert r.best is not None
    nc = blk.conditions
    what = (
        f"If the requirement allowed it: an ambient range of {nc.ambient_low:g} … "
        f"{nc.ambient_high:g} °C instead of {c.ambient_low:g} … {c.ambient_high:g} °C; "
        f"{_parts_text(r.best.design.parts)} then gives {_window_text(r.best)}. "
        "This changes the requirement, not the design."
    )
    return Fix(
        what=what,
        kind="ambient",
        cost=COSTS["ambient"],
        block=blk,
        verdict=r.verdict,
        windows=_required_windows(r.best),
        parts=r.best.design.parts,
        margin=_margin(r.best),
    )


# --------------------------------------------------------------------------


def suggest_fixes(block: Block, *, limit: int = 3, solved: BlockResult | None = None) -> list[Fix]:
    """The cheapest computed changes that make a block meet its requirements.

    Parameters
    ----------
    block
        A block that is infeasible (or whose pinned design fails).
    limit
        How many fixes to return at most.
    solved
        The block's result from :func:`timespec.design.solver.solve_block`, when the
        caller has it already (it is not solved again).

    Returns
    -------
    list of Fix
        Cheapest first (ties: more margin first); empty when the block already meets
        or nothing tried works.  Every fix except ``"trimmer"`` carries the modified
        block, whose re-solved verdict is ``"meets"``.  A narrower ambient range is
        only offered when fewer than ``limit`` design changes work, and is labelled
        as a change of the requirement.

    Notes
    -----
    Candidate changes (see the module notes) are combined up to three at a time and
    tried cheapest first; at most 60 modified blocks are re-solved.  Once ``limit``
    fixes are found, dearer combinations are not tried.  A combination is only
    reported when no working combination is contained in it, slot by slot, at no
    greater cost (no padding: if 2 % capacitors work, 1 % ones are not offered).

    References
    ----------
    Extreme-value worst-case analysis, common practice; costs are an ordinal
    estimate, common practice.
    """
    base = solved if solved is not None and solved.block is block else solve_block(block)
    if base.verdict == "meets":
        return []
    changes = _design_changes(block, base.best is None)
    found: list[Fix] = []
    winners: list[dict[str, int]] = []  # slot -> cost of each working combination
    tried = 0
    for combo in _combinations(changes, 3):
        cost = sum(c.cost for c in combo)
        if len(found) >= limit and cost > found[limit - 1].cost:
            break
        key = {c.slot: c.cost for c in combo}
        if any(all(key.get(slot, -1) >= cost for slot, cost in w.items()) for w in winners):
            continue  # dominated: a cheaper change in the same slots already works
        if tried >= _BUDGET:
            break
        tried += 1
        modified = _apply(block, combo)
        res = solve_block(modified)
        if res.verdict == "meets" and res.best is not None:
            winners.append(key)
            found.append(_fix_from(modified, combo, res))
            found.sort(key=lambda f: (f.cost, -f.margin))
    trim = _trim_fix(block, base) or _trim_with_change(block, changes)
    if trim is not None:
        found.append(trim)
    found.sort(key=lambda f: (f.cost, -f.margin))
    found = found[:limit]
    if len(found) < limit:
        amb = _ambient_fix(block)
        if amb is not None:
            found.append(amb)
    return found
