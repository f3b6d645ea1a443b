"""Changes of the requirement rather than the design: a narrower ambient range.

When no design change works, :func:`ambient_fix` finds the widest narrower ambient
range (shrunk towards 25 °C) under which the block meets.  It is offered last and
labelled as a change of the requirement, not of the design.
"""

from __future__ import annotations

import dataclasses

from timespec.design.fixes.fix import (
    COSTS,
    Fix,
    parts_text,
    relative_margin,
    required_windows,
    window_text,
)
from timespec.design.result import BlockResult
from timespec.design.solver import solve_block
from timespec.model import Block, Conditions

__all__ = ["ambient_fix"]


def ambient_fix(block: Block) -> Fix | None:
    """The widest narrower ambient range under which the block meets.

    Parameters
    ----------
    block
        The block that fails.

    Returns
    -------
    Fix or None
        An ``"ambient"`` fix carrying the block with the narrower range; ``None``
        when the range has no end to move towards 25 °C, or the block fails even
        with its ends moved all the way.

    Notes
    -----
    Each end beyond 25 °C is moved towards 25 °C by one common factor (the ends
    rounded to 0.1 °C); the factor is found by seven bisection steps between
    moved all the way and not moved at all.
    """
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
        f"{parts_text(r.best.design.parts)} then gives {window_text(r.best)}. "
        "This changes the requirement, not the design."
    )
    return Fix(
        what=what,
        kind="ambient",
        cost=COSTS["ambient"],
        block=blk,
        verdict=r.verdict,
        windows=required_windows(r.best),
        parts=r.best.design.parts,
        margin=relative_margin(r.best),
    )
