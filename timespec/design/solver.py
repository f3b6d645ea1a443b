"""Choose parts for a block, or check pinned ones, and rank the alternatives.

The family proposes a short list of candidate designs (narrowed analytically:
for each capacitor the continuous resistor, snapped to its standard
neighbours).  The solver evaluates all of them at nominal in one vectorised
call, keeps the few nearest the target, runs the full extreme-value worst case
on those, and ranks them:

1. worst-case window inside every requirement (and no design-rule error);
2. centring: the worst-case window's middle nearest the requirement's middle;
3. simpler: coarser series first, fewer parts, then the smaller capacitor.

A series or parallel pair of standard values (allowed by ``pairs`` in a policy)
counts as two parts.  Among designs that meet, one using fewer pairs ranks first
whatever its centring: a part is only added where it is needed.  Nominal
screening keeps a shortlist for each pair count, so pairs (usually nearest the
target) never crowd out the single-part designs.

When no candidate meets the requirement the block is *infeasible* and the
closest candidate (least excursion outside the window) is reported with it.
"""

from __future__ import annotations

import dataclasses
import math
from collections import defaultdict

import numpy as np

from timespec.analysis import (
    Extremes,
    Factor,
    corner_label,
    grid_size,
    nominal_inputs,
    worst_case,
    worst_case_many,
)
from timespec.design.causes import infeasible_causes
from timespec.design.reach import range_cause
from timespec.design.result import BlockResult, Candidate, OutputResult, Result
from timespec.errors import SpecValueError
from timespec.families import family
from timespec.families.goals import window_score
from timespec.families.protocol import Family
from timespec.language.arguments import error_at
from timespec.model import Block, CapacitorPolicy, Spec
from timespec.numbers import format_quantity
from timespec.parts import series as eseries
from timespec.parts.dielectrics import steadiness
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm

__all__ = [
    "SHORTLIST",
    "evaluate_design",
    "rank_key",
    "solve",
    "solve_block",
    "technology_blocks",
    "technology_text",
]

#: How many candidates get the full worst-case analysis.
SHORTLIST = 8
#: How many alternatives are reported beside the best.
ALTERNATIVES = 4
#: Points of exhaustive worst-case search spent on one block's final ranking; a
#: circuit whose corner grid is large gets fewer runners-up (at least one).
SEARCH_BUDGET = 2**17


def evaluate_design(block: Block, design: Design, fam: Family | None = None) -> Candidate:
    """Worst-case analysis and design rules of one design.

    Parameters
    ----------
    block
        The block.
    design
        The parts.
    fam
        The block's family (looked up when ``None``).

    Returns
    -------
    Candidate
        Outputs with nominal and worst-case values, and findings.
    """
    fam = fam or family(block.kind)
    factors = fam.factors(block, design)
    extremes = worst_case(factors, fam.evaluate(block, design.variant))
    return _candidate(block, design, fam, factors, extremes)


def _candidate(
    block: Block,
    design: Design,
    fam: Family,
    factors: list[Factor],
    extremes: dict[str, Extremes],
    *,
    rules: bool = True,
) -> Candidate:
    outputs = []
    for out in fam.outputs(block):
        ex = extremes[out.name]
        req = block.requirement(out.name)
        outputs.append(
            OutputResult(
                name=out.name,
                kind=out.kind,
                label=out.label,
                required=req.window if req is not None else None,
                nominal=ex.nominal,
                low=ex.low,
                high=ex.high,
                low_corner=corner_label(ex.low_at, factors) if rules else "",
                high_corner=corner_label(ex.high_at, factors) if rules else "",
                low_at=ex.low_at,
                high_at=ex.high_at,
            )
        )
    if not rules:
        return Candidate(design, tuple(outputs), ())
    findings = fam.findings(block, design, {k: (v.low, v.high) for k, v in extremes.items()})
    return Candidate(design, tuple(outputs), tuple(findings))


def _series_rank(name: str | None) -> int:
    if name is None:
        return len(eseries.SERIES_NAMES)
    return eseries.SERIES_NAMES.index(name)


def _centring(cand: Candidate) -> float:
    worst = 0.0
    for o in cand.outputs:
        w = o.required
        if w is None or not (math.isfinite(o.low) and math.isfinite(o.high)):
            continue
        if math.isinf(w.high) or math.isinf(w.low):
            continue
        half = 0.5 * (w.high - w.low)
        if half <= 0:
            continue
        mid = 0.5 * (o.low + o.high)
        worst = max(worst, abs(mid - 0.5 * (w.low + w.high)) / half)
    return worst


#: The solver's sort key (smaller is better).
RankKey = tuple[int, float, int, float, int, int, float]


def rank_key(cand: Candidate) -> RankKey:
    """Sort key: meets first, then least excursion, fewest pairs, centring, simplicity.

    Parameters
    ----------
    cand
        An analysed candidate.

    Returns
    -------
    tuple
        Smaller is better.
    """
    parts = cand.design.parts
    complexity = sum(_series_rank(p.series) * p.count for p in parts)
    cap = sum(p.value for p in parts if p.kind == "capacitance")
    return (
        0 if cand.meets else 1,
        round(cand.excess, 9),
        _pairs(cand.design),
        round(_centring(cand), 6),
        complexity,
        sum(p.count for p in parts),
        cap,
    )


def _pairs(design: Design) -> int:
    """How many parts of a design are series/parallel pairs."""
    return sum(1 for p in design.parts if p.pair is not None)


def _reason(cand: Candidate, best: Candidate) -> str:
    if cand.meets and not best.meets:
        return "meets"  # pragma: no cover - best is always at least as good
    if not cand.meets:
        if any(f.severity == "error" for f in cand.findings):
            return "design-rule error"
        return f"worst case outside the requirement by {cand.excess * 100:.3g} % of its width"
    if _pairs(cand.design) > _pairs(best.design):
        return "meets, but needs more parts (a series or parallel pair)"
    c, b = _centring(cand), _centring(best)
    if c > b + 1e-6:
        return f"meets, less centred ({c * 100:.3g} % of the half-window off centre)"
    return "meets, equally centred; ranked by series and size"


def _shortlist(block: Block, fam: Family, designs: list[Design], keep: int) -> list[Design]:
    """Nominal screening: one vectorised call per circuit variant."""
    if len(designs) <= keep:
        return designs
    scores = np.full(len(designs), np.inf)
    groups: dict[str, list[int]] = defaultdict(list)
    for i, d in enumerate(designs):
        groups[d.variant].append(i)
    reqs = block.requirements
    for variant, idx in groups.items():
        template = fam.factors(block, designs[idx[0]])
        x = nominal_inputs(template)
        n = len(idx)
        x = {k: np.broadcast_to(v, (n,)).copy() for k, v in x.items()}
        for ref in {p.ref for p in designs[idx[0]].parts}:
            x[f"{ref}.value"] = np.array([designs[i].part(ref).value for i in idx])
        with np.errstate(all="ignore"):
            out = fam.evaluate(block, variant)(x)
        s = np.zeros(n)
        for req in reqs:
            if req.quantity in out:
                sc = window_score(np.asarray(out[req.quantity]), req.window)
                s = np.maximum(s, np.where(np.isfinite(sc), sc, np.inf))
        scores[idx] = s
    order = np.argsort(scores, kind="stable")
    taken: dict[int, int] = defaultdict(int)
    chosen: list[int] = []
    for i in order:  # the best few of each pair count
        k = _pairs(designs[i])
        if taken[k] < keep:
            taken[k] += 1
            chosen.append(int(i))
    return [designs[i] for i in chosen]


def _preselect(
    block: Block,
    fam: Family,
    designs: list[Design],
    keep: int,
    facs_of: dict[Design, list[Factor]],
    known: dict[Design, dict[str, Extremes]],
) -> list[Design]:
    """Quick ranking of a shortlist before the exhaustive worst case.

    The extreme corners of the first design are evaluated for every design of
    the same layout in one vectorised call (designs of one family share their
    sensitivity pattern, so the same corners are extreme); the ``keep`` best by
    the usual ranking then get the full, exhaustive corner search that the
    report relies on, with every design of another layout (no estimate from
    these corners).  The first design's exhaustive result goes into ``known``.
    """
    if len(designs) <= keep:
        return designs
    first = designs[0]
    facs = facs_of[first]
    extremes = worst_case(facs, fam.evaluate(block, first.variant))
    known[first] = extremes
    corners = [e.low_at for e in extremes.values()] + [e.high_at for e in extremes.values()]
    sig = (first.variant, _signature(facs))
    same = [d for d in designs if (d.variant, _signature(facs_of[d])) == sig]
    # a different layout gets no quick estimate from these corners: always kept, beside
    # (not instead of) the best of this layout
    others = [d for d in designs if (d.variant, _signature(facs_of[d])) != sig]
    quick: list[tuple[RankKey, int]] = []
    n = len(corners) + 1
    x = {k: np.repeat(v, n * len(same)) for k, v in nominal_inputs(facs).items()}
    for j, corner in enumerate(corners, start=1):
        for name, value in corner.items():
            x[name][j::n] = value
    for name in (f.name for f in facs if f.name.endswith(".value")):
        values = [next(f.nominal for f in facs_of[d] if f.name == name) for d in same]
        x[name] = np.repeat(np.asarray(values, dtype=np.float64), n)
    with np.errstate(all="ignore"):
        out = fam.evaluate(block, first.variant)(x)
    index = {id(d): i for i, d in enumerate(designs)}
    for k, d in enumerate(same):
        approx = {
            name: Extremes(
                float(v[k * n]),
                float(np.min(v[k * n : (k + 1) * n])),
                float(np.max(v[k * n : (k + 1) * n])),
                {},
                {},
            )
            for name, v in out.items()
        }
        cand = _candidate(block, d, fam, facs_of[d], approx, rules=False)
        quick.append((rank_key(cand), index[id(d)]))
    quick.sort()
    return [designs[i] for _, i in quick[:keep]] + others


def _signature(factors: list[Factor]) -> tuple[object, ...]:
    return tuple(
        (f.name, f.nominal, f.low, f.high, f.distribution, f.sigmas, f.monotone)
        for f in factors
        if not f.name.endswith(".value")
    )


def _analyse_many(
    block: Block,
    fam: Family,
    designs: list[Design],
    facs_of: dict[Design, list[Factor]] | None = None,
    known: dict[Design, dict[str, Extremes]] | None = None,
) -> list[Candidate]:
    """Worst case of many designs, batched per circuit variant and factor layout.

    Designs whose exhaustive worst case is already in ``known`` are not searched again.
    """
    groups: dict[tuple[object, ...], list[tuple[Design, list[Factor]]]] = defaultdict(list)
    out: list[Candidate] = []
    for d in designs:
        facs = facs_of[d] if facs_of is not None else fam.factors(block, d)
        if known is not None and d in known:
            out.append(_candidate(block, d, fam, facs, known[d]))
            continue
        groups[(d.variant, _signature(facs))].append((d, facs))
    for (variant, _sig), members in groups.items():
        template = members[0][1]
        refs = [f.name for f in template if f.name.endswith(".value")]
        overrides = {
            name: np.array([next(f.nominal for f in facs if f.name == name) for _, facs in members])
            for name in refs
        }
        many = worst_case_many(template, fam.evaluate(block, str(variant)), overrides)
        for (d, facs), extremes in zip(members, many, strict=True):
            out.append(_candidate(block, d, fam, facs, extremes))
    return out


def _condition_notes(block: Block) -> list[str]:
    """Say when a worst case leaves out a condition because the spec did not state it."""
    notes: list[str] = []
    c = block.conditions
    if "ambient" not in block.positions:
        notes.append(
            "no ambient range stated: temperature effects are left out (the worst case is at "
            "25 °C); add e.g. 'ambient -10 degC to 60 degC'"
        )
    if "supply" in block.positions and c.supply.low == c.supply.high and block.kind != "crystal":
        notes.append(
            f"the supply is taken as exactly {c.supply.low:g} V; give its tolerance "
            "(e.g. 'supply 12 V ±5%') to include supply variation"
        )
    return notes


def solve_block(block: Block, *, shortlist: int = SHORTLIST) -> BlockResult:
    """Choose (or check) the parts of one block at worst case.

    A block offering several capacitor technologies (:attr:`Block.capacitor_options`)
    is solved once per technology; the steadiest technology that meets is chosen
    (:func:`timespec.parts.dielectrics.steadiness`), else the one whose closest
    design has the smallest worst violation.  The result's block is then the
    single-technology block solved, and the best designs of the other technologies
    are among the alternatives.

    Parameters
    ----------
    block
        The block.
    shortlist
        How many candidates get the full worst-case analysis.

    Returns
    -------
    BlockResult
        Verdict, best design, alternatives and the factors of the best design.
    """
    variants = technology_blocks(block)
    if len(variants) == 1:
        result = _solve_technology(variants[0], shortlist=shortlist)
        assumed = _assumed_technology(block, variants[0])
        return dataclasses.replace(result, notes=(assumed, *result.notes)) if assumed else result
    results = [_solve_technology(b, shortlist=shortlist) for b in variants]
    return _choose_technology(block, results)


def technology_blocks(block: Block) -> tuple[Block, ...]:
    """One single-technology block per capacitor technology a block offers.

    Parameters
    ----------
    block
        The block.

    Returns
    -------
    tuple of Block
        ``(block,)`` when it offers one technology.  When it pins a capacitor, the
        one technology that describes the pinned part: the first of its dielectric,
        else the first whose range holds its value, else the first.
    """
    policies = block.capacitor_policies()
    if len(policies) == 1:
        return (block,)
    pinned = [p for p in block.pinned if p.ref.startswith("C")]
    if pinned:
        part = pinned[0]
        same = [p for p in policies if p.dielectric == part.dielectric]
        # an unstated dielectric: the least steady technology that makes the value, so
        # that a verdict on the board never rests on a better part than it may carry
        holds = sorted(
            (p for p in policies if p.low <= part.value <= p.high),
            key=lambda p: steadiness(p.dielectric),
            reverse=True,
        )
        chosen = (same or holds or list(policies))[0]
        return (dataclasses.replace(block, capacitors=chosen, capacitor_options=()),)
    return tuple(dataclasses.replace(block, capacitors=p, capacitor_options=()) for p in policies)


def _assumed_technology(block: Block, solved: Block) -> str | None:
    """The note for a pinned capacitor whose dielectric a list of technologies supplies."""
    if len(block.capacitor_policies()) == 1:
        return None
    part = next((p for p in block.pinned if p.ref.startswith("C")), None)
    if part is None or part.dielectric is not None:
        return None
    value = format_quantity(part.value, "capacitance")
    code = format_rkm(part.value, "capacitance")
    return (
        f"{part.ref}'s dielectric is not stated: it is taken as "
        f"{technology_text(solved.capacitors)}, the least steady technology offered that "
        f"makes {value}; state it, e.g. 'use {part.ref} {code} PET 5%'"
    )


def technology_text(policy: CapacitorPolicy) -> str:
    """A capacitor technology in words, e.g. ``"PP 2 % E24 (1 nF…1 µF)"``.

    Parameters
    ----------
    policy
        One technology.

    Returns
    -------
    str
        Dielectric, tolerance, series and value range.
    """
    low, high = (format_quantity(v, "capacitance") for v in (policy.low, policy.high))
    return f"{policy.dielectric} {policy.tolerance * 100:g} % {policy.series} ({low}…{high})"


def _choose_technology(block: Block, results: list[BlockResult]) -> BlockResult:
    """The result of the steadiest technology that meets, else of the closest design."""
    order = range(len(results))
    meeting = [i for i in order if results[i].verdict == "meets"]
    if meeting:
        pick = min(meeting, key=lambda i: (steadiness(results[i].block.capacitors.dielectric), i))
    else:
        tried = [i for i in order if results[i].best is not None]
        if not tried:  # the value-range cause across every technology offered
            return _no_candidates(block, results[0].mode)
        pick = min(tried, key=lambda i: (rank_key(_best(results[i])), i))
    chosen = results[pick]
    best = _best(chosen)
    others: list[Candidate] = []
    for i in order:
        r = results[i]
        if i == pick or r.best is None:
            continue
        tech = technology_text(r.block.capacitors)
        if r.verdict == "meets":
            why = f"meets with {tech} capacitors; {chosen.block.capacitors.dielectric} is steadier"
        else:
            why = f"with {tech} capacitors: {_reason(r.best, best)}"
        others.append(Candidate(r.best.design, r.best.outputs, r.best.findings, why))
    meets_too = [technology_text(results[i].block.capacitors) for i in meeting if i != pick]
    empty = [technology_text(r.block.capacitors) for r in results if r.best is None]
    note = f"capacitors: {technology_text(chosen.block.capacitors)}"
    if chosen.verdict == "meets":
        note += f", the steadiest of the {len(results)} technologies offered that meets"
        if meets_too:
            note += f" (also meets: {'; '.join(meets_too)})"
    else:
        note += f", the closest of the {len(results)} technologies offered"
    if empty:
        note += f"; no value near the requirement in {'; '.join(empty)}"
    extra = dict(chosen.extra)
    extra["candidates"] = sum(int(r.extra.get("candidates", 0)) for r in results)
    extra["technologies"] = len(results)
    return dataclasses.replace(
        chosen,
        alternatives=(*chosen.alternatives, *others),
        notes=(note, *chosen.notes),
        extra=extra,
    )


def _no_candidates(block: Block, mode: str) -> BlockResult:
    """The result of a block no standard value comes near: the value-range cause."""
    return BlockResult(
        block=block,
        verdict="infeasible",
        mode=mode,
        best=None,
        notes=(
            range_cause(block)
            or "no standard value in the allowed ranges comes near the requirement; "
            "widen the resistor or capacitor range",
            *_condition_notes(block),
        ),
    )


def _best(result: BlockResult) -> Candidate:
    assert result.best is not None
    return result.best


def _solve_technology(block: Block, *, shortlist: int = SHORTLIST) -> BlockResult:
    """Solve a block of one capacitor technology (see :func:`solve_block`)."""
    fam = family(block.kind)
    designs = fam.candidates(block)
    mode = "checked" if designs and all(p.pinned for p in designs[0].parts) else "solved"
    if not designs:
        return _no_candidates(block, mode)
    chosen = _shortlist(block, fam, designs, shortlist)
    facs_of = {d: fam.factors(block, d) for d in chosen}
    known: dict[Design, dict[str, Extremes]] = {}
    per_design = max(grid_size(facs_of[chosen[0]]), 1)
    finalists = max(2, min(1 + ALTERNATIVES, SEARCH_BUDGET // per_design))
    chosen = _preselect(block, fam, chosen, finalists, facs_of, known)
    analysed = sorted(_analyse_many(block, fam, chosen, facs_of, known), key=rank_key)
    best = analysed[0]
    alternatives = tuple(
        Candidate(c.design, c.outputs, c.findings, _reason(c, best))
        for c in analysed[1 : 1 + ALTERNATIVES]
    )
    best = Candidate(best.design, best.outputs, best.findings, "best of the candidates")
    notes: list[str] = _condition_notes(block)
    if best.meets:
        verdict = "meets"
    elif mode == "checked":
        verdict = "fails"
        notes.extend(
            infeasible_causes(
                block, best, facs_of.get(best.design) or fam.factors(block, best.design)
            )
        )
    else:
        verdict = "infeasible"
        if best.excess == 0:
            notes.append(
                f"the best of the {len(designs)} candidate designs keeps every window at worst "
                "case but breaks a design rule (see the findings); it is shown"
            )
        else:
            notes.extend(
                infeasible_causes(
                    block, best, facs_of.get(best.design) or fam.factors(block, best.design)
                )
                or (
                    f"none of the {len(designs)} candidate designs from the allowed parts meets "
                    "the requirement at worst case; the closest is shown",
                )
            )
    for cand in (best, *alternatives):
        _check_finite(block, cand, verdict == "meets" and cand is best)
    factors: tuple[Factor, ...] = tuple(facs_of.get(best.design) or fam.factors(block, best.design))
    return BlockResult(
        block=block,
        verdict=verdict,
        mode=mode,
        best=best,
        alternatives=alternatives,
        factors=factors,
        notes=tuple(notes),
        extra={"candidates": len(designs), "analysed": len(chosen)},
    )


def _check_finite(block: Block, cand: Candidate, meets: bool) -> None:
    """Refuse a verdict built on a NaN, or a MEETS built on an infinite value.

    An infinite worst-case end is a real answer when a threshold is never
    reached (the physics returns ``inf``), and it fails its requirement; a NaN
    is never an answer, and a design that meets with an infinite output or
    margin has met nothing.
    """
    for out in cand.outputs:
        values = (out.nominal, out.low, out.high)
        bad = any(math.isnan(v) for v in values) or (
            meets and not all(math.isfinite(v) for v in values)
        )
        if bad:
            raise error_at(
                SpecValueError,
                f"block '{block.name}': the computed {out.label or out.name} is not a finite "
                f"number (nominal {out.nominal:g}, worst case {out.low:g} to {out.high:g}); "
                "no verdict is given",
                block.pos,
                "some value of the spec drives the model outside floating-point range: "
                "check its magnitudes and units",
            )


def solve(spec: Spec) -> Result:
    """Solve every block of a spec at worst case.

    Parameters
    ----------
    spec
        A parsed spec.

    Returns
    -------
    Result
        One :class:`~timespec.design.result.BlockResult` per block.
    """
    return Result(spec, tuple(solve_block(b) for b in spec.blocks))
