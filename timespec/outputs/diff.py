"""Compare two solved specs block by block, for a design review (``timespec diff``).

Blocks are matched by name.  A block only in the old spec is *removed*, one only
in the new spec is *added*; a removed and an added block whose statements are
identical apart from the name are reported as one *renamed* block.  For every
block present on both sides the comparison lists what changed in the
requirements, in the other statements (the *inputs*: policies, conditions, pinned
parts, settings), in the chosen parts, and, per required output, the nominal
value, the worst-case window, the margin and the verdict.

The **margin** of a required output is the smallest room between its worst-case
window and the edges of the required window, divided by the required half-width
(half of ``high - low``): ``+1`` is a worst case shrunk to the centre line, ``0``
touches an edge, negative values lie outside (``-0.1`` pokes out by a tenth of
the half-width).  This is the scale of the solver's centring term
(:func:`timespec.design.solver.rank_key`); for a one-sided requirement
(``20 ms min``) the room is divided by the bound itself.  A block's margin is the
smallest over its required outputs; it is ``-inf`` when a worst case is not
finite and ``None`` when nothing is required or no design could be formed.

A block got **worse** when its verdict went from ``meets`` to ``fails`` or
``infeasible``, when it is new and does not meet, or, with a margin-drop
threshold, when its margin fell by more than the threshold (in units of the
required half-width).  Without a threshold, margins are reported but only
verdicts decide.  This module is pure: the results come in solved.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from timespec._version import __version__
from timespec.design.result import BlockResult, OutputResult, Result
from timespec.model import Block, Window
from timespec.numbers import (
    format_interval,
    format_part,
    format_quantity,
    format_window,
    ratio_unit,
)
from timespec.parts.part import Part
from timespec.units import kind_symbol

__all__ = [
    "DIFF_FORMAT",
    "DIFF_MINOR",
    "DIFF_VERSION",
    "BlockDiff",
    "Diff",
    "OutputChange",
    "OutputSide",
    "PartChange",
    "RequirementChange",
    "diff_results",
    "diff_to_dict",
    "output_margin",
    "render_diff",
]

#: The ``format`` value of the diff JSON document.
DIFF_FORMAT = "timespec-diff"
#: Its major version.
DIFF_VERSION = 1
#: Its minor version.
DIFF_MINOR = 0

#: Margin changes smaller than this (in half-widths) are rounding, not a change.
_SAME = 1e-9

#: The fields of a block, other than name and requirements, listed as inputs.
_INPUTS = (
    "conditions",
    "resistors",
    "capacitors",
    "timer",
    "gate",
    "pinned",
    "settings",
    "statistics",
    "refs",
)

#: How the changed block fields are named for people: the statements that set them.
_INPUT_WORDS = {
    "conditions": "supply/ambient/life",
    "pinned": "use",
    "settings": "circuit settings",
    "statistics": "samples/seed",
}

#: The fields of a part compared for a parts change.
_PART_FIELDS = ("value", "series", "tolerance", "tempco_ppm", "dielectric", "pinned", "pair")


def output_margin(out: OutputResult) -> float | None:
    """The margin of one output against its requirement, in required half-widths.

    Parameters
    ----------
    out
        An output of a solved design.

    Returns
    -------
    float or None
        ``min(low - required.low, required.high - high)`` over the finite edges,
        divided by half the required width (by the bound's size for a one-sided
        requirement, by 1 when that is zero); negative when the worst case lies
        outside, ``-inf`` when it is not finite, ``None`` when nothing is required.
    """
    w = out.required
    if w is None:
        return None
    if not (math.isfinite(out.low) and math.isfinite(out.high)):
        return -math.inf
    rooms = []
    if math.isfinite(w.low):
        rooms.append(out.low - w.low)
    if math.isfinite(w.high):
        rooms.append(w.high - out.high)
    if not rooms:
        return math.inf
    if math.isfinite(w.low) and math.isfinite(w.high) and w.high > w.low:
        scale = 0.5 * (w.high - w.low)
    else:
        edge = w.low if math.isfinite(w.low) else w.high
        scale = abs(edge) or 1.0
    return min(rooms) / scale


@dataclass(frozen=True)
class RequirementChange:
    """One requirement written differently on the two sides.

    Attributes
    ----------
    quantity
        What is required (``"width"``, ``"frequency"`` ...).
    old, new
        The window as a spec would state it (``"150 ms ±8 %"``), ``None`` where absent.
    """

    quantity: str
    old: str | None
    new: str | None


@dataclass(frozen=True)
class PartChange:
    """One part of the chosen (or pinned) design that differs.

    Attributes
    ----------
    ref
        The part reference (``"R"``, ``"C"``).
    old, new
        The part on each side, ``None`` where the design has no such part.
    fields
        Which of value, series, tolerance, tempco, dielectric, pinned and pair differ
        (empty when the part was added or removed).
    """

    ref: str
    old: Part | None
    new: Part | None
    fields: tuple[str, ...]


@dataclass(frozen=True)
class OutputSide:
    """One required output on one side of the comparison.

    Attributes
    ----------
    required
        The required window (``None``: nothing required on this side).
    nominal
        The value with every input at nominal.
    low, high
        The worst-case window.
    margin
        See :func:`output_margin`.
    """

    required: Window | None
    nominal: float
    low: float
    high: float
    margin: float | None


@dataclass(frozen=True)
class OutputChange:
    """An output that is required on at least one side, old and new.

    Attributes
    ----------
    name
        Output key.
    label
        Human label.
    kind
        Kind of quantity (``"time"``, ``"frequency"``, ``"ratio"`` ...).
    old, new
        Each side, ``None`` where the design does not compute it.
    """

    name: str
    label: str
    kind: str
    old: OutputSide | None
    new: OutputSide | None

    @property
    def changed(self) -> bool:
        """Whether anything about the output differs between the sides."""
        return not _same_side(self.old, self.new)


@dataclass(frozen=True)
class BlockDiff:
    """The comparison of one block.

    Attributes
    ----------
    name
        The block's name (the new name of a renamed block).
    old_name
        The old name of a renamed block, else ``None``.
    status
        ``"added"``, ``"removed"``, ``"renamed"``, ``"changed"`` or ``"unchanged"``.
    kind
        The block kind.
    old_verdict, new_verdict
        Verdict on each side (``None`` where the block is absent).
    old_margin, new_margin
        Block margin on each side (the smallest output margin; see the module notes).
    requirements
        Requirements written differently.
    inputs
        Names of other statements that differ (``"capacitors"``, ``"conditions"`` ...).
    parts
        Parts that differ.
    outputs
        Every output required on either side, changed or not, in the family's order.
    worse
        Whether the block got worse (see the module notes).
    reasons
        Why it counts as worse, in words (empty when it does not).
    """

    name: str
    old_name: str | None
    status: str
    kind: str
    old_verdict: str | None
    new_verdict: str | None
    old_margin: float | None
    new_margin: float | None
    requirements: tuple[RequirementChange, ...]
    inputs: tuple[str, ...]
    parts: tuple[PartChange, ...]
    outputs: tuple[OutputChange, ...]
    worse: bool
    reasons: tuple[str, ...]


@dataclass(frozen=True)
class Diff:
    """The comparison of two solved specs.

    Attributes
    ----------
    old_label, new_label
        What each side is (a path, or ``REV:PATH``).
    blocks
        One entry per block: the new spec's order, then removed blocks.
    margin_drop
        The threshold used, in required half-widths, or ``None``.
    old_ok, new_ok
        Whether every block met its requirement on each side.
    """

    old_label: str
    new_label: str
    blocks: tuple[BlockDiff, ...]
    margin_drop: float | None
    old_ok: bool
    new_ok: bool

    @property
    def worse(self) -> bool:
        """Whether any block got worse."""
        return any(b.worse for b in self.blocks)


# --------------------------------------------------------------------------
# comparing


def _close(a: float | None, b: float | None) -> bool:
    if a is None or b is None:
        return a is b
    if math.isinf(a) or math.isinf(b) or math.isnan(a) or math.isnan(b):
        return a == b or (math.isnan(a) and math.isnan(b))
    return math.isclose(a, b, rel_tol=1e-12, abs_tol=1e-300)


def _same_side(a: OutputSide | None, b: OutputSide | None) -> bool:
    if a is None or b is None:
        return a is b
    return (
        a.required == b.required
        and _close(a.nominal, b.nominal)
        and _close(a.low, b.low)
        and _close(a.high, b.high)
    )


def _side(out: OutputResult) -> OutputSide:
    return OutputSide(out.required, out.nominal, out.low, out.high, output_margin(out))


def _block_margin(res: BlockResult) -> float | None:
    if res.best is None:
        return None
    margins = [m for m in (output_margin(o) for o in res.best.outputs) if m is not None]
    return min(margins) if margins else None


def _requirement_texts(block: Block) -> dict[str, str]:
    return {
        r.quantity: format_window(
            r.window, ratio=ratio_unit(r.quantity, (r.window.low, r.window.high))
        )
        for r in block.requirements
    }


def _requirements(old: Block, new: Block) -> tuple[RequirementChange, ...]:
    a, b = _requirement_texts(old), _requirement_texts(new)
    order = list(a) + [q for q in b if q not in a]
    out = []
    for q in order:
        ra = next((r.window for r in old.requirements if r.quantity == q), None)
        rb = next((r.window for r in new.requirements if r.quantity == q), None)
        if ra != rb:
            out.append(RequirementChange(q, a.get(q), b.get(q)))
    return tuple(out)


def _inputs(old: Block, new: Block) -> tuple[str, ...]:
    changed = (f for f in _INPUTS if getattr(old, f) != getattr(new, f))
    return tuple(_INPUT_WORDS.get(f, f) for f in changed)


def _parts(old: BlockResult, new: BlockResult) -> tuple[PartChange, ...]:
    a = {p.ref: p for p in old.parts}
    b = {p.ref: p for p in new.parts}
    out = []
    for ref in list(a) + [r for r in b if r not in a]:
        pa, pb = a.get(ref), b.get(ref)
        if pa is None or pb is None:
            out.append(PartChange(ref, pa, pb, ()))
            continue
        fields = tuple(f for f in _PART_FIELDS if getattr(pa, f) != getattr(pb, f))
        if fields:
            out.append(PartChange(ref, pa, pb, fields))
    return tuple(out)


def _outputs(old: BlockResult | None, new: BlockResult | None) -> tuple[OutputChange, ...]:
    a = {o.name: o for o in (old.best.outputs if old is not None and old.best else ())}
    b = {o.name: o for o in (new.best.outputs if new is not None and new.best else ())}
    out = []
    for name in list(b) + [n for n in a if n not in b]:
        oa, ob = a.get(name), b.get(name)
        if (oa is None or oa.required is None) and (ob is None or ob.required is None):
            continue
        first = ob if ob is not None else oa
        assert first is not None
        out.append(
            OutputChange(
                name,
                first.label,
                first.kind,
                _side(oa) if oa is not None else None,
                _side(ob) if ob is not None else None,
            )
        )
    return tuple(out)


def _worse(
    old: BlockResult | None, new: BlockResult | None, margin_drop: float | None
) -> tuple[str, ...]:
    if new is None:
        return ()
    if old is None:
        if new.verdict != "meets":
            return (f"a new block that does not meet (verdict {new.verdict})",)
        return ()
    reasons = []
    if old.verdict == "meets" and new.verdict != "meets":
        reasons.append(f"verdict {old.verdict} -> {new.verdict}")
    if margin_drop is not None:
        ma, mb = _block_margin(old), _block_margin(new)
        if ma is not None and math.isfinite(ma):
            drop = ma - (mb if mb is not None else -math.inf)
            if drop > margin_drop + _SAME:
                reasons.append(
                    f"margin fell by {_points(drop)} of the required half-width "
                    f"(threshold {_points(margin_drop)})"
                )
    return tuple(reasons)


def _points(x: float) -> str:
    if math.isinf(x):
        return "all of it"
    return f"{x * 100:.3g} %"


def _same_but_name(a: Block, b: Block) -> bool:
    return dataclasses.replace(a, name=b.name) == b


def _compare(
    name: str,
    old_name: str | None,
    old: BlockResult | None,
    new: BlockResult | None,
    margin_drop: float | None,
) -> BlockDiff:
    ref = new if new is not None else old
    assert ref is not None
    reqs: tuple[RequirementChange, ...] = ()
    inputs: tuple[str, ...] = ()
    parts: tuple[PartChange, ...] = ()
    if old is not None and new is not None:
        reqs = _requirements(old.block, new.block)
        inputs = _inputs(old.block, new.block)
        parts = _parts(old, new)
    outputs = _outputs(old, new)
    if old is None:
        status = "added"
    elif new is None:
        status = "removed"
    elif old_name is not None:
        status = "renamed"
    elif (
        reqs
        or inputs
        or parts
        or old.verdict != new.verdict
        or old.block.kind != new.block.kind
        or any(o.changed for o in outputs)
    ):
        status = "changed"
    else:
        status = "unchanged"
    reasons = _worse(old, new, margin_drop)
    return BlockDiff(
        name=name,
        old_name=old_name,
        status=status,
        kind=ref.block.kind,
        old_verdict=old.verdict if old is not None else None,
        new_verdict=new.verdict if new is not None else None,
        old_margin=_block_margin(old) if old is not None else None,
        new_margin=_block_margin(new) if new is not None else None,
        requirements=reqs,
        inputs=inputs,
        parts=parts,
        outputs=outputs,
        worse=bool(reasons),
        reasons=reasons,
    )


def diff_results(
    old: Result,
    new: Result,
    *,
    old_label: str = "old",
    new_label: str = "new",
    margin_drop: float | None = None,
) -> Diff:
    """Compare two solved specs block by block.

    Parameters
    ----------
    old, new
        The two results (solved, statistics not needed).
    old_label, new_label
        What each side is, for the renderers.
    margin_drop
        A block whose margin fell by more than this (in required half-widths,
        ``0.05`` for 5 %) counts as worse; ``None``: only verdicts decide.

    Returns
    -------
    Diff
        One entry per block: in the new spec's order, then the removed blocks.

    Raises
    ------
    ValueError
        When ``margin_drop`` is negative or not finite.
    """
    if margin_drop is not None and not (math.isfinite(margin_drop) and margin_drop >= 0):
        raise ValueError("a margin-drop threshold is a finite size, e.g. 0.05")
    a = {b.block.name: b for b in old.blocks}
    b = {r.block.name: r for r in new.blocks}
    gone = [n for n in a if n not in b]
    renamed: dict[str, str] = {}
    for name in (n for n in b if n not in a):
        match = next(
            (
                g
                for g in gone
                if g not in renamed.values() and _same_but_name(a[g].block, b[name].block)
            ),
            None,
        )
        if match is not None:
            renamed[name] = match
    entries = []
    for name, res in b.items():
        was = renamed.get(name, name if name in a else None)
        entries.append(
            _compare(name, renamed.get(name), a.get(was) if was else None, res, margin_drop)
        )
    for name in gone:
        if name not in renamed.values():
            entries.append(_compare(name, None, a[name], None, margin_drop))
    return Diff(old_label, new_label, tuple(entries), margin_drop, old.ok, new.ok)


# --------------------------------------------------------------------------
# rendering


def _unit(kind: str) -> str:
    try:
        return kind_symbol(kind)
    except KeyError:
        return ""


def _margin_text(m: float | None) -> str:
    if m is None:
        return "—"
    if math.isinf(m):
        return "none (worst case not finite)" if m < 0 else "unbounded"
    return f"{m * 100:+.1f} %" if abs(m) < 10 else f"{m * 100:+.0f} %"


def _window_text(side: OutputSide | None, kind: str, name: str) -> tuple[str, str, str, str]:
    if side is None:
        return ("—", "—", "—", "—")
    r = ratio_unit(name, (side.nominal, side.low, side.high))
    required = format_window(side.required, ratio=r) if side.required is not None else "—"
    return (
        required,
        format_quantity(side.nominal, kind, ratio=r),
        format_interval(side.low, side.high, kind, ratio=r),
        _margin_text(side.margin),
    )


def _part_text(p: Part | None) -> str:
    return format_part(p) if p is not None else "—"


def _rows(b: BlockDiff) -> list[tuple[str, str, str]]:
    """The table of one block: (what, old, new)."""
    rows = [("verdict", b.old_verdict or "—", b.new_verdict or "—")]
    if len(b.outputs) != 1:  # with one required output its own margin row says it
        rows.append(("margin", _margin_text(b.old_margin), _margin_text(b.new_margin)))
    shown = {o.name for o in b.outputs}
    for req in b.requirements:
        if req.quantity not in shown:
            rows.append((f"{req.quantity} required", req.old or "—", req.new or "—"))
    for change in b.parts:
        what = f"part {change.ref}"
        if change.fields:
            what += f" ({', '.join(change.fields)})"
        rows.append((what, _part_text(change.old), _part_text(change.new)))
    for out in b.outputs:
        old = _window_text(out.old, out.kind, out.name)
        new = _window_text(out.new, out.kind, out.name)
        labels = ("required", "nominal", "worst case", "margin")
        for label, x, y in zip(labels, old, new, strict=True):
            if label == "required" and x == y:
                continue
            rows.append((f"{out.name} {label}", x, y))
    return rows


def _heading(b: BlockDiff) -> str:
    status = f"renamed from {b.old_name}" if b.status == "renamed" else b.status
    return f"{b.name} ({b.kind}): {status}" + (" — WORSE" if b.worse else "")


def _summary(d: Diff) -> str:
    counts: dict[str, int] = {}
    for b in d.blocks:
        counts[b.status] = counts.get(b.status, 0) + 1
    parts = [
        f"{counts[s]} {s}"
        for s in ("changed", "renamed", "added", "removed", "unchanged")
        if counts.get(s)
    ]
    worse = sum(1 for b in d.blocks if b.worse)
    head = f"{len(d.blocks)} block{'' if len(d.blocks) == 1 else 's'}: " + (
        ", ".join(parts) if parts else "none"
    )
    return head + f"; {worse} worse" if worse else head + "; none worse"


def _threshold(d: Diff) -> str:
    if d.margin_drop is None:
        return "worse means: the verdict no longer meets (no margin-drop threshold)"
    return (
        "worse means: the verdict no longer meets, or the margin fell by more than "
        f"{_points(d.margin_drop)} of the required half-width"
    )


def _render_text(d: Diff) -> str:
    lines = [f"timespec diff {d.old_label} -> {d.new_label}", _summary(d), _threshold(d)]
    same = [b.name for b in d.blocks if b.status == "unchanged"]
    for b in d.blocks:
        if b.status == "unchanged":
            continue
        lines.append("")
        lines.append(_heading(b))
        for reason in b.reasons:
            lines.append(f"  worse: {reason}")
        if b.inputs:
            lines.append(f"  statements changed: {', '.join(b.inputs)}")
        rows = _rows(b)
        w0 = max(len(r[0]) for r in rows)
        w1 = max(len(r[1]) for r in rows)
        for what, x, y in rows:
            mark = "  " if x == y else " *"
            lines.append(f" {mark}{what:<{w0}}  {x:<{w1}}  ->  {y}".rstrip())
    if same:
        lines.append("")
        lines.append(f"unchanged: {', '.join(same)}")
    return "\n".join(lines) + "\n"


def _cell(text: str) -> str:
    return text.replace("|", "\\|")


def _render_markdown(d: Diff) -> str:
    worse = [b.name for b in d.blocks if b.worse]
    verdict = (
        f"**{len(worse)} block{'s' if len(worse) != 1 else ''} worse:** "
        + ", ".join(f"`{n}`" for n in worse)
        + "."
        if worse
        else "**No block got worse.**"
    )
    lines = [
        f"### timespec diff `{d.old_label}` → `{d.new_label}`",
        "",
        verdict + " " + _summary(d)[0].upper() + _summary(d)[1:] + ".",
        "",
        f"_{_threshold(d)}._",
    ]
    same = [b.name for b in d.blocks if b.status == "unchanged"]
    for b in d.blocks:
        if b.status == "unchanged":
            continue
        lines += ["", f"#### `{b.name}` ({b.kind}): " + _heading(b).split(": ", 1)[1], ""]
        for reason in b.reasons:
            lines.append(f"- worse: {_cell(reason)}")
        if b.inputs:
            lines.append(f"- statements changed: {', '.join(b.inputs)}")
        if b.reasons or b.inputs:
            lines.append("")
        lines += ["| | old | new |", "|---|---|---|"]
        for what, x, y in _rows(b):
            cell = _cell(y) if x == y else f"**{_cell(y)}**"
            lines.append(f"| {_cell(what)} | {_cell(x)} | {cell} |")
    if same:
        lines += ["", "Unchanged: " + ", ".join(f"`{n}`" for n in same) + "."]
    return "\n".join(lines) + "\n"


def render_diff(diff: Diff, form: str = "text") -> str:
    """Render a comparison for people.

    Parameters
    ----------
    diff
        The comparison.
    form
        ``"text"`` (aligned rows, changed rows marked ``*``) or ``"md"`` (Markdown
        for a pull-request comment: a table per changed block, changed cells bold).

    Returns
    -------
    str
        The text; unchanged blocks share one closing line.

    Raises
    ------
    ValueError
        For an unknown form.
    """
    if form == "text":
        return _render_text(diff)
    if form == "md":
        return _render_markdown(diff)
    raise ValueError(f"unknown form {form!r}: text or md")


# --------------------------------------------------------------------------
# JSON


def _num(x: float | None) -> float | None:
    return x if x is not None and math.isfinite(x) else None


def _window_dict(w: Window | None) -> dict[str, float | None] | None:
    return None if w is None else {"low": _num(w.low), "high": _num(w.high)}


def _part_dict(p: Part | None) -> dict[str, object] | None:
    if p is None:
        return None
    return {
        "text": format_part(p),
        "value": p.value,
        "unit": _unit(p.kind),
        "series": p.series,
        "tolerance": p.tolerance,
        "tempco_ppm": p.tempco_ppm if p.kind == "resistance" else None,
        "dielectric": p.dielectric if p.kind == "capacitance" else None,
        "pinned": p.pinned,
    }


def _side_dict(s: OutputSide | None) -> dict[str, object] | None:
    if s is None:
        return None
    return {
        "required": _window_dict(s.required),
        "nominal": _num(s.nominal),
        "worst_case": {"low": _num(s.low), "high": _num(s.high)},
        "margin": _num(s.margin),
    }


def _block_dict(b: BlockDiff) -> dict[str, object]:
    return {
        "name": b.name,
        "old_name": b.old_name,
        "status": b.status,
        "kind": b.kind,
        "worse": b.worse,
        "reasons": list(b.reasons),
        "verdict": {"old": b.old_verdict, "new": b.new_verdict},
        "margin": {"old": _num(b.old_margin), "new": _num(b.new_margin)},
        "requirements": [
            {"quantity": r.quantity, "old": r.old, "new": r.new} for r in b.requirements
        ],
        "inputs": list(b.inputs),
        "parts": [
            {
                "ref": p.ref,
                "fields": list(p.fields),
                "old": _part_dict(p.old),
                "new": _part_dict(p.new),
            }
            for p in b.parts
        ],
        "outputs": [
            {
                "name": o.name,
                "unit": _unit(o.kind),
                "changed": o.changed,
                "old": _side_dict(o.old),
                "new": _side_dict(o.new),
            }
            for o in b.outputs
        ],
    }


def diff_to_dict(diff: Diff) -> dict[str, object]:
    """The comparison as the versioned ``timespec-diff`` JSON document.

    Parameters
    ----------
    diff
        The comparison.

    Returns
    -------
    dict
        Plain JSON values (infinite numbers as ``None``); the layout is described
        in the documentation page *JSON documents* and by the shipped schema
        ``timespec/schemas/timespec-diff.schema.json``.
    """
    return {
        "format": DIFF_FORMAT,
        "format_version": DIFF_VERSION,
        "format_minor": DIFF_MINOR,
        "timespec_version": __version__,
        "old": {"label": diff.old_label, "ok": diff.old_ok},
        "new": {"label": diff.new_label, "ok": diff.new_ok},
        "margin_drop": diff.margin_drop,
        "worse": diff.worse,
        "blocks": [_block_dict(b) for b in diff.blocks],
    }
