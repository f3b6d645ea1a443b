"""A fixed resistor plus a trimmer in place of one timing resistor.

For one-resistor R-C blocks (one-shot, delay, relaxation) :func:`trim_design`
sizes a fixed standard resistor and a 1-2-5 trimmer whose range covers the
worst-case spread of everything else, computed from the worst-case extremes at
the trimming condition, and computes the error left after trimming (temperature,
supply, ageing).  :func:`trim_fix` offers it as a fix when that remainder fits the
requirement; :func:`trim_with_change` pairs it with one part change when the
trimmer alone is not enough.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from timespec.analysis import Factor, FloatArray, worst_case
from timespec.design.fixes.changes import Change, apply_changes
from timespec.design.fixes.fix import COSTS, Fix, parts_text, percent
from timespec.design.result import BlockResult
from timespec.design.solver import solve_block
from timespec.families import family
from timespec.model import Block
from timespec.numbers import format_interval, format_part_value
from timespec.parts import series as eseries
from timespec.parts.part import Part

__all__ = ["TRIMMER_STEPS", "Trim", "trim_design", "trim_fix", "trim_with_change"]

#: Trimmer values: the 1-2-5 sequence trimmers are commonly sold in (common practice).
TRIMMER_STEPS: tuple[float, ...] = tuple(m * 10.0**e for e in range(1, 7) for m in (1.0, 2.0, 5.0))
# Cermet trimmer: end-to-end tolerance ±20 %, tempco ±100 ppm/K, setting to within
# ±0.1 % of the output with a multi-turn part (all from memory).
_TRIM_TOL = 0.20
_TRIM_TC_PPM = 100.0
_TRIM_SETTING = 0.001
_TRIMMED_KINDS = frozenset({"oneshot", "delay", "relaxation"})


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


def _combination_text(block: Block, trim: Trim) -> str:
    """``"a fixed 1M18 (E96 1 %) in series with a 500k trimmer (it surely covers …)"``."""
    rp = block.resistors
    return (
        f"a fixed {format_part_value(trim.fixed, 'resistance')} "
        f"({rp.series} {percent(rp.tolerance)}) in series with a "
        f"{format_part_value(trim.trimmer, 'resistance')} trimmer (it surely covers "
        f"{format_interval(trim.covered[0], trim.covered[1], 'resistance')}, "
        f"{format_interval(trim.needed[0], trim.needed[1], 'resistance')} is needed)"
    )


def _kept_text(kept: Sequence[Part]) -> str:
    """``" and C = 270n 2 % C0G"``: the design's other parts (empty when none)."""
    return f" and {parts_text(kept)}" if kept else ""


def _after_text(block: Block, trim: Trim) -> str:
    """How the trim is set and the worst-case window left after it (ends the sentence)."""
    w = block.requirements[0].window
    lo, hi = trim.remaining
    return (
        f"adjusted at 25 °C and nominal supply to the target; temperature, supply and "
        f"ageing still move it: {format_interval(lo, hi, w.kind)} worst case after trimming, "
        f"inside {format_interval(w.low, w.high, w.kind)}."
    )


def trim_fix(block: Block, res: BlockResult) -> Fix | None:
    """A fixed resistor plus a trimmer as a fix, when what stays after trimming fits.

    Parameters
    ----------
    block
        The block (see :func:`trim_design` for the blocks a trimmer suits).
    res
        Its solved result.

    Returns
    -------
    Fix or None
        A ``"trimmer"`` fix carrying the unmodified block and the window after
        trimming; ``None`` when no trimmer can be sized or the window after
        trimming leaves the requirement.
    """
    trim = trim_design(block, res)
    return None if trim is None else _fix_of(block, res, trim, None)


def _fix_of(block: Block, res: BlockResult, trim: Trim, change: Change | None) -> Fix | None:
    """The trimmer fix (led by ``change`` when one comes with it), if its window fits."""
    req = block.requirements[0]
    w = req.window
    lo, hi = trim.remaining
    if not (w.low <= lo and hi <= w.high):
        return None
    kept = [p for p in res.best.design.parts if p.ref != trim.ref] if res.best else []
    combination = f"{_combination_text(block, trim)}{_kept_text(kept)}"
    if change is None:
        what = f"Replace {trim.ref} by {combination}, {_after_text(block, trim)}"
    else:
        lead = f"{change.text[0].upper()}{change.text[1:]}"
        what = f"{lead}, with {trim.ref} made of {combination}, {_after_text(block, trim)}"
    width = w.high - w.low
    return Fix(
        what=what,
        kind="trimmer" if change is None else f"{change.kind}+trimmer",
        cost=COSTS["trimmer"] + (0 if change is None else change.cost),
        block=block,
        verdict="meets",
        windows={req.quantity: (lo, hi)},
        parts=(),
        margin=min(lo - w.low, w.high - hi) / width if width > 0 else 0.0,
    )


def trim_with_change(block: Block, changes: Sequence[Change]) -> Fix | None:
    """A trimmer together with one part change, when a trimmer alone is not enough.

    Trimming removes the initial tolerances but not what moves after the trim
    (temperature, supply, ageing); a steadier dielectric or tighter parts can
    bring that remainder inside the window.  The cheapest single change that
    does is reported with the trimmer.

    Parameters
    ----------
    block
        The block.
    changes
        The single changes to try (``"values"`` changes are skipped).

    Returns
    -------
    Fix or None
        A ``"<kind>+trimmer"`` fix carrying the changed block, its cost the sum of
        both; ``None`` when no single change makes the trimmer enough, and at once
        (nothing re-solved) when the block takes no trimmer (an astable, say, or
        more than one requirement).
    """
    if block.kind not in _TRIMMED_KINDS or len(block.requirements) != 1:
        return None  # no trimmer suits the block (as trim_design decides): no re-solve
    for change in sorted(changes, key=lambda c: c.cost):
        if change.kind == "values":
            continue
        modified = apply_changes(block, (change,))
        try:
            res = solve_block(modified)
        except ValueError:  # pragma: no cover - a change that the model rejects
            continue
        trim = trim_design(modified, res)
        fix = None if trim is None else _fix_of(modified, res, trim, change)
        if fix is not None:
            return fix
    return None
