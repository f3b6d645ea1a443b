"""The search: try changes cheapest first, re-solve each, keep those that meet.

:func:`suggest_fixes` combines the part and policy changes of
:mod:`~timespec.design.fixes.changes` up to three at a time, re-solves every
modified block with :func:`timespec.design.solver.solve_block` within a fixed
budget, skips combinations a cheaper working one already covers and those whose
spread alone surely exceeds the window (:mod:`~timespec.design.fixes.predict`,
one worst case of the closest design re-graded instead of a re-solve), then adds the
trimmer of :mod:`~timespec.design.fixes.trimmer` and, when too few design changes
work, the narrower ambient range of :mod:`~timespec.design.fixes.requirement`.
"""

from __future__ import annotations

from collections.abc import Sequence

from timespec.design.fixes.changes import Change, apply_changes, combinations, design_changes
from timespec.design.fixes.fix import (
    Fix,
    fix_sentence,
    relative_margin,
    required_windows,
)
from timespec.design.fixes.predict import SearchMemo
from timespec.design.fixes.requirement import ambient_fix
from timespec.design.fixes.trimmer import trim_fix, trim_with_change
from timespec.design.result import BlockResult
from timespec.design.solver import solve_block
from timespec.model import Block

__all__ = ["suggest_fixes"]

# At most this many modified blocks are re-solved per call.
_BUDGET = 60


def _fix_from(block: Block, combo: Sequence[Change], res: BlockResult) -> Fix:
    assert res.best is not None
    return Fix(
        what=fix_sentence(block, [c.text for c in combo], res.best),
        kind="+".join(c.kind for c in combo),
        cost=sum(c.cost for c in combo),
        block=block,
        verdict=res.verdict,
        windows=required_windows(res.best),
        parts=res.best.design.parts,
        margin=relative_margin(res.best),
    )


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
    Candidate changes (see :mod:`timespec.design.fixes`) are combined up to three at a time and
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
    changes = design_changes(block, base.best is None)
    found: list[Fix] = []
    winners: list[dict[str, int]] = []  # slot -> cost of each working combination
    tried = 0
    memo = SearchMemo()
    for combo in combinations(changes, 3):
        cost = sum(c.cost for c in combo)
        if len(found) >= limit and cost > found[limit - 1].cost:
            break
        key = {c.slot: c.cost for c in combo}
        if any(all(key.get(slot, -1) >= cost for slot, cost in w.items()) for w in winners):
            continue  # dominated: a cheaper change in the same slots already works
        if tried >= _BUDGET:
            break
        modified = apply_changes(block, combo)
        if memo.settled(modified) or memo.cannot_fit(modified, base.best):
            continue  # its spread alone is wider than the window, or a re-solve showed it
        tried += 1
        res = solve_block(modified)
        if res.verdict == "meets" and res.best is not None:
            winners.append(key)
            found.append(_fix_from(modified, combo, res))
            found.sort(key=lambda f: (f.cost, -f.margin))
        else:
            memo.learn(modified, res.best)
    # A trimmer and a narrower ambient range only take out spread: they are offered when
    # the closest design misses its window and breaks no design rule (a trigger longer
    # than the pulse, say, stays broken however R is trimmed).
    spread_only = base.best is None or (
        base.best.excess > 0 and not any(f.severity == "error" for f in base.best.findings)
    )
    trim = (trim_fix(block, base) or trim_with_change(block, changes)) if spread_only else None
    if trim is not None:
        found.append(trim)
    found.sort(key=lambda f: (f.cost, -f.margin))
    found = found[:limit]
    if len(found) < limit and spread_only:
        amb = ambient_fix(block)
        if amb is not None:
            found.append(amb)
    return found
