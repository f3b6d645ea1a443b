"""What a fix is, what it costs, and the words that describe a re-solved design.

:class:`Fix` is the result every search in :mod:`timespec.design.fixes` returns;
:data:`COSTS` ranks the kinds of change; the helpers here summarise a solved
candidate (its required windows, the room it leaves, a sentence on its parts and
windows) for the fixes built from it.

Cost
----
A small integer, an ordinal estimate of what a change adds to the bill of materials
and to production (common practice, not a price list): finer series 1 per step; a
decade more range 1; pairs 2 (a second part where needed); a tighter resistor grade
2 per step; a tighter capacitor grade 3 per step; C0G 3, film 4 (larger, dearer
parts); another timer class 4 (a different part, often dearer, on the same
footprint: dearer than a grade, cheaper than a trimmer); new values for a pinned
design 0; a trimmer 6 (a part plus an adjustment step in production); a narrower
ambient range 50 (not a design change at all).
Combinations add their costs.  Ties are broken by the remaining margin (more first).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

from timespec.design.result import BlockResult, Candidate
from timespec.model import Block
from timespec.numbers import format_interval, format_part_value
from timespec.parts.part import Part

__all__ = [
    "COSTS",
    "Fix",
    "design_text",
    "fix_sentence",
    "join_changes",
    "parts_text",
    "percent",
    "relative_margin",
    "required_windows",
    "tightest_window",
    "window_text",
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
    "timer-class": 4,
    "trimmer": 6,
    "ambient": 50,
}


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
        ``"capacitor-range"``, ``"timer-class"``, ``"trimmer"`` or ``"ambient"``; combinations join
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


def required_windows(cand: Candidate) -> dict[str, tuple[float, float]]:
    """The worst-case window of every required output of a candidate.

    Parameters
    ----------
    cand
        A solved candidate design.

    Returns
    -------
    dict
        Output name → ``(low, high)``, for the outputs that carry a requirement.
    """
    return {o.name: (o.low, o.high) for o in cand.outputs if o.required is not None}


def relative_margin(cand: Candidate) -> float:
    """Smallest room to a requirement end, relative to the requirement's width.

    Parameters
    ----------
    cand
        A solved candidate design.

    Returns
    -------
    float
        The smallest room over every required output and both ends, as a fraction
        of the requirement's width (of its centre when the width is zero or
        infinite); negative when outside; 0.0 when nothing is required.
    """
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


def window_text(cand: Candidate) -> str:
    """A sentence part: each required output's window inside its requirement.

    Parameters
    ----------
    cand
        A solved candidate design.

    Returns
    -------
    str
        ``"<label> <window> inside <required>"`` per required output, joined by ``"; "``.
    """
    texts = [
        f"{o.label} {format_interval(o.low, o.high, o.kind)} inside "
        f"{format_interval(o.required.low, o.required.high, o.kind)}"
        for o in cand.outputs
        if o.required is not None
    ]
    return "; ".join(texts)


def parts_text(parts: Iterable[Part]) -> str:
    """A sentence part listing parts with their values, grades and dielectric or tempco.

    Parameters
    ----------
    parts
        The parts of a design.

    Returns
    -------
    str
        ``"<ref> = <value> <tolerance> <dielectric or tempco>"`` per part (a pair
        shows its two values), joined by ``", "``.
    """
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


def join_changes(texts: Sequence[str]) -> str:
    """Change texts joined as one sentence part: ``"a"``, ``"a and b"``, ``"a, b and c"``.

    Parameters
    ----------
    texts
        The sentence parts of the changes, in order.

    Returns
    -------
    str
        The joined text (empty for no changes).
    """
    if len(texts) <= 1:
        return "".join(texts)
    return f"{', '.join(texts[:-1])} and {texts[-1]}"


def design_text(block: Block, cand: Candidate) -> str:
    """A sentence part naming a design: its circuit variant (astable) and its parts.

    Parameters
    ----------
    block
        The block the candidate was solved for.
    cand
        A solved candidate design.

    Returns
    -------
    str
        ``"<variant> circuit with <parts>"`` for an astable, else ``"<parts>"``
        (see :func:`parts_text`).
    """
    parts = parts_text(cand.design.parts)
    if block.kind == "astable" and cand.design.variant:
        return f"{cand.design.variant} circuit with {parts}"
    return parts


def fix_sentence(block: Block, changes: Sequence[str], cand: Candidate) -> str:
    """One sentence for a fix: the changes, the re-solved design and its windows.

    Parameters
    ----------
    block
        The modified block.
    changes
        The sentence part of each change made (see
        :attr:`timespec.design.fixes.changes.Change.text`).
    cand
        The re-solved best design of ``block``.

    Returns
    -------
    str
        ``"Use <changes>: <design> gives <windows>."``, e.g. ``"Use 1 % capacitors
        instead of 5 % and pairs: classic circuit with RA = …, RB = …, C = … gives
        frequency … inside …."``
    """
    return f"Use {join_changes(changes)}: {design_text(block, cand)} gives {window_text(cand)}."


def percent(t: float) -> str:
    """A tolerance as percent text.

    Parameters
    ----------
    t
        Tolerance as a fraction (0.01 for 1 %).

    Returns
    -------
    str
        Three significant digits and a percent sign, e.g. ``"0.5 %"``.
    """
    return f"{t * 100:.3g} %"
