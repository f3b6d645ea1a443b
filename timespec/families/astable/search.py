"""Candidate narrowing of the astable, for every circuit variant the requirements reach.

Target high and low times come from the requirements
(:func:`~timespec.families.astable.variants.time_targets`); for every allowed
capacitor the variant's continuous resistors are solved in closed form from
nominal physics, refined twice with the full nominal model, and each resistor is
snapped to both standard neighbours (at most four designs per capacitor; the
steps are the variant's own: :mod:`~timespec.families.astable.discharge` with
:mod:`~timespec.families.astable.classic` or
:mod:`~timespec.families.astable.diode`, and
:mod:`~timespec.families.astable.feedback`).  All triples are never enumerated.
One probe design per variant then gets the full worst case, which re-aims the
targets and gives the extreme corners at which every candidate is scored.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping

import numpy as np

from timespec.analysis import worst_case
from timespec.families.astable import classic, diode, feedback
from timespec.families.astable.discharge import pair_options, ra_floor
from timespec.families.astable.nominal import NominalRun, nominal_run
from timespec.families.astable.variants import PART_REFS, reachable_variants, time_targets
from timespec.families.candidates import candidate_values, capacitor_part, resistor_part
from timespec.families.goals import window_score
from timespec.families.protocol import Family, FloatArray
from timespec.model import Block
from timespec.parts.part import Design, Part

__all__ = ["KEEP", "KEEP_PER_VARIANT", "candidates", "design_from_values"]

#: Candidates handed to the solver (best screening scores over all variants) …
KEEP = 8
#: … and at least this many of each variant considered.
KEEP_PER_VARIANT = 3


def candidates(family: Family, block: Block) -> list[Design]:
    """Candidate designs for every variant considered, narrowed analytically.

    Parameters
    ----------
    family
        The astable family (for its factors and model).
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
    For each allowed capacitor (or the pinned one) the continuous resistors
    that put the nominal high and low times on target are found in closed
    form — classic ``RB = tL/(C·g_L)``, ``RA + RB = tH/(C·g_H)``; diode
    ``RA = tH/(C·g_H')``, ``RB = tL/(C·g_L)``; feedback
    ``R = T/(C·(g_H + g_L))`` with the nominal gains ``g`` (``ln 2`` for an
    ideal timer) — then refined twice against the full nominal model, and
    each is snapped to both standard neighbours: at most four designs per
    capacitor.  ``RA`` never goes below ``V_max/i_discharge_max``; where
    the classic circuit cannot reach the duty target, ``RA`` sits at that
    floor and ``RB`` keeps the period (the closest design).  With a
    resistor pinned, the free one is solved from each target it can meet
    (classic: from ``tL`` and from ``tH``) and snapped.

    The targets are then corrected so that the *worst-case* window, not
    the nominal, is centred: one probe design gets the full worst case,
    which gives ``nominal/middle`` per requirement and the extreme corners;
    the narrowing is repeated with the corrected targets and every
    candidate is scored at nominal and at the probe's corners (an
    approximation of the solver's ranking).  The best :data:`KEEP` go to
    the solver, at least :data:`KEEP_PER_VARIANT` of each variant.
    """
    pools: list[tuple[str, FloatArray, FloatArray]] = []
    for variant in reachable_variants(block):
        pins = [block.pinned_part(ref) for ref in PART_REFS[variant]]
        if all(p is not None for p in pins):
            pools.append((variant, np.zeros((1, len(pins))), np.zeros(1)))
            continue
        rows, score = _rows(family, block, variant, None)
        if rows.shape[0] == 0:
            continue
        scale, corners = _probe(family, block, variant, rows[int(np.argmin(score))])
        rows, _ = _rows(family, block, variant, scale)
        if rows.shape[0] == 0:
            continue
        pools.append((variant, rows, _corner_score(family, block, variant, rows, corners)))
    return _keep(block, pools)


def design_from_values(block: Block, variant: str, values: Mapping[str, float]) -> Design:
    """A design of a variant from part values, pinned parts honoured.

    Parameters
    ----------
    block
        The block.
    variant
        ``"classic"``, ``"diode"`` or ``"feedback"``.
    values
        Part value by reference (a missing one is 0).

    Returns
    -------
    Design
        Parts in the variant's reference order, from the block's policies.
    """
    rp, cp = block.resistors, block.capacitors
    parts: list[Part] = []
    for ref in PART_REFS[variant]:
        pin = block.pinned_part(ref)
        if ref == "C":
            parts.append(capacitor_part(ref, values.get(ref, 0.0), cp, pin))
        else:
            parts.append(resistor_part(ref, values.get(ref, 0.0), rp, pin))
    return Design(tuple(parts), variant)


def _keep(block: Block, pools: list[tuple[str, FloatArray, FloatArray]]) -> list[Design]:
    """The best :data:`KEEP` rows overall, at least :data:`KEEP_PER_VARIANT` of each variant."""
    chosen: list[tuple[float, int, int]] = []  # (score, pool, row)
    rest: list[tuple[float, int, int]] = []
    for p, (_, _, score) in enumerate(pools):
        order = np.argsort(score, kind="stable")
        chosen.extend((float(score[i]), p, int(i)) for i in order[:KEEP_PER_VARIANT])
        rest.extend((float(score[i]), p, int(i)) for i in order[KEEP_PER_VARIANT:])
    rest.sort()
    chosen.extend(rest[: max(0, KEEP - len(chosen))])
    chosen.sort(key=lambda c: (c[1], c[0]))
    designs = []
    for _, p, i in chosen:
        variant, rows, _ = pools[p]
        row = rows[i]
        values = dict(zip(PART_REFS[variant], (float(v) for v in row), strict=True))
        designs.append(design_from_values(block, variant, values))
    return designs


def _probe(
    family: Family, block: Block, variant: str, row: FloatArray
) -> tuple[dict[str, float], list[Mapping[str, float]]]:
    """Full worst case of one probe design: aim corrections and extreme corners.

    Returns
    -------
    tuple
        Per requirement ``nominal/middle`` of the worst-case window (aiming
        the nominal at ``target·ratio`` centres the window; the ratio is
        nearly the same for every candidate of a variant), and the factor
        values of every extreme corner (the same corners are extreme for
        every candidate of a variant: the sensitivities share their signs).
    """
    values = dict(zip(PART_REFS[variant], map(float, row), strict=True))
    facs = family.factors(block, design_from_values(block, variant, values))
    extremes = worst_case(facs, family.evaluate(block, variant))
    scale: dict[str, float] = {}
    for req in block.requirements:
        e = extremes[req.quantity]
        mid = 0.5 * (e.low + e.high)
        if math.isfinite(mid) and mid > 0 and math.isfinite(e.nominal) and e.nominal > 0:
            scale[req.quantity] = e.nominal / mid
    corners = [at for e in extremes.values() for at in (e.low_at, e.high_at)]
    return scale, corners


def _corner_score(
    family: Family,
    block: Block,
    variant: str,
    rows: FloatArray,
    corners: list[Mapping[str, float]],
) -> FloatArray:
    """Approximate solver ranking of every row from the probe's extreme corners.

    Notes
    -----
    Each row is evaluated at nominal and at the probe's extreme corners
    (``1 + 2·outputs`` points); the spread of those values stands for its
    worst-case window.  Score: ``10⁶·excess + centring`` with the solver's
    definitions (relative excursion outside the window, then distance of
    the window's middle from the requirement's middle in half-widths).
    """
    run = _nominal_model(family, block, variant)
    n, k = rows.shape[0], len(corners) + 1
    values = {ref: np.repeat(rows[:, j], k) for j, ref in enumerate(PART_REFS[variant])}
    extra: dict[str, FloatArray] = {}
    names = sorted({name for c in corners for name in c})
    for name in names:
        col = np.array([np.nan] + [c.get(name, np.nan) for c in corners])
        extra[name] = np.tile(col, n)
    out = run(values, extra)
    score = np.zeros(n)
    for req in block.requirements:
        y = np.asarray(out[req.quantity], dtype=np.float64).reshape(n, k)
        with np.errstate(invalid="ignore"):
            lo, hi = y.min(axis=1), y.max(axis=1)
        w = req.window
        finite = math.isfinite(w.high - w.low) and w.high > w.low
        span = (w.high - w.low) if finite else (abs(w.centre) or 1.0)
        exc = (np.maximum(0.0, w.low - lo) + np.maximum(0.0, hi - w.high)) / span
        exc = np.where(np.isfinite(lo) & np.isfinite(hi), exc, np.inf)
        cen = np.zeros(n)
        if finite:
            cen = np.abs(0.5 * (lo + hi) - 0.5 * (w.low + w.high)) / (0.5 * (w.high - w.low))
        cen = np.where(np.isfinite(cen), cen, np.inf)
        score = np.maximum(score, 1e6 * exc + cen)
    return np.asarray(np.nan_to_num(score, nan=np.inf), dtype=np.float64)


def _nominal_model(family: Family, block: Block, variant: str) -> NominalRun:
    """Nominal model: part values (by ref) → outputs, everything else nominal."""
    rp, cp = block.resistors, block.capacitors
    parts = tuple(
        capacitor_part(ref, 1.0, cp) if ref == "C" else resistor_part(ref, 1.0, rp)
        for ref in PART_REFS[variant]
    )
    nominal = {f.name: f.nominal for f in family.factors(block, Design(parts, variant))}
    return nominal_run(nominal, family.evaluate(block, variant))


def _resistor_options(
    block: Block, variant: str, run: NominalRun, cs: FloatArray, th: float, tl: float
) -> dict[str, list[FloatArray]]:
    """The variant's standard-value options for each resistor at each capacitor."""
    if variant == "feedback":
        return {"R": feedback.resistor_options(block, run, cs, th + tl)}
    search = classic.PAIR_SEARCH if variant == "classic" else diode.PAIR_SEARCH
    return pair_options(block, search, run, cs, th, tl)


def _rows(
    family: Family, block: Block, variant: str, scale: Mapping[str, float] | None
) -> tuple[FloatArray, FloatArray]:
    """Candidate part values (one row per design, columns in ``PART_REFS`` order) and
    their nominal screening score (smaller is better)."""
    pins = {ref: block.pinned_part(ref) for ref in PART_REFS[variant]}
    cp = block.capacitors
    pin_c = pins["C"]
    cs = (
        np.array([pin_c.value])
        if pin_c is not None
        else candidate_values(cp.series, cp.low, cp.high)
    )
    empty = (np.zeros((0, len(pins))), np.zeros(0))
    if cs.size == 0:
        return empty
    th, tl = time_targets(block, variant, scale)
    run = _nominal_model(family, block, variant)
    options = _resistor_options(block, variant, run, cs, th, tl)
    refs = [r for r in PART_REFS[variant] if r != "C"]
    rows = np.concatenate(
        [np.column_stack([*combo, cs]) for combo in itertools.product(*(options[r] for r in refs))]
    )
    ok = np.all(np.isfinite(rows), axis=1)
    if "RA" in refs and pins["RA"] is None:
        ok &= rows[:, 0] >= ra_floor(block) * (1 - 1e-9)
    rows = np.unique(rows[ok], axis=0)
    if rows.shape[0] == 0:
        return empty
    out = run({ref: rows[:, j] for j, ref in enumerate(PART_REFS[variant])})
    sc = scale or {}
    score = np.zeros(rows.shape[0])
    for req in block.requirements:
        predicted = np.asarray(out[req.quantity]) / sc.get(req.quantity, 1.0)
        w = window_score(predicted, req.window)
        score = np.maximum(score, np.where(np.isfinite(w), w, np.inf))
    return rows, score
