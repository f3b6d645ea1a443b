"""Part-value tables and bills of materials, in Markdown, reStructuredText or CSV.

A table answers "what did we fit, and does it hold?" at a glance: the block,
its circuit, the parts (RKM values with series, tolerance and tempco or
dielectric), each requirement next to the nominal value and the worst-case
window, and the verdict.  The cells are built once (:func:`table_cells`) and
written out by three small writers, so the formats never disagree.

Quantities are shown with SI prefixes (``149.4 ms``, ``3.997 kHz``); ratios
are shown in percent, or in ppm for frequency errors (``accuracy``) and other
small ratios.

The bill of materials (:func:`render_bom`, ``timespec table --bom``) has one row
per physical part instead: its board designator (from the block's ``refs``
statement), value, series, tolerance, tempco or dielectric, a technology that
meets them, the rated voltage where the analysis knows or assumes one, whether
the spec pinned it, and the block's verdict, so that it pastes into a parts list.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from timespec.design.result import BlockResult, OutputResult, Result
from timespec.errors import UsageError
from timespec.families.capacitors import ELECTROLYTIC_RATING_FACTOR, rated_voltage
from timespec.model import Block, Window
from timespec.numbers import (
    format_interval,
    format_part,
    format_quantity,
    format_window,
    ratio_unit,
)
from timespec.parts import dielectrics
from timespec.parts.part import Part

__all__ = [
    "BOM_HEADERS",
    "HEADERS",
    "TableFormat",
    "bom_rows",
    "designators",
    "format_part",
    "format_quantity",
    "format_window",
    "render_bom",
    "render_table",
    "table_cells",
    "technology",
]

TableFormat = Literal["markdown", "rest", "csv"]

#: Column headers, in order.
HEADERS: tuple[str, ...] = (
    "Block",
    "Circuit",
    "Parts",
    "Required",
    "Nominal",
    "Worst case",
    "Verdict",
)

#: What an empty cell shows.
MISSING = "—"

#: Separator between several items in one Markdown or CSV cell.
JOIN = "; "


@dataclass(frozen=True)
class _Shown:
    """One output shown in a row: its name, requirement and results (if any)."""

    name: str
    kind: str
    required: Window | None
    result: OutputResult | None


def _shown_outputs(br: BlockResult) -> list[_Shown]:
    """The required outputs of a block (all outputs when nothing is required)."""
    best = br.best
    by_name = {o.name: o for o in best.outputs} if best is not None else {}
    shown = [
        _Shown(req.quantity, req.window.kind, req.window, by_name.get(req.quantity))
        for req in br.block.requirements
    ]
    if not shown and best is not None:
        shown = [_Shown(o.name, o.kind, o.required, o) for o in best.outputs]
    return shown


def _output_cells(item: _Shown) -> tuple[str, str, str]:
    """Required, nominal and worst-case text for one output, each led by its name."""
    res = item.result
    values = [res.nominal, res.low, res.high] if res is not None else []
    if item.required is not None:
        values += [item.required.low, item.required.high]
    ratio = ratio_unit(item.name, values)
    head = f"{item.name} "
    required = head + (format_window(item.required, ratio=ratio) if item.required else "none")
    if res is None:
        return required, head + MISSING, head + MISSING
    nominal = head + format_quantity(res.nominal, item.kind, ratio=ratio)
    worst = format_interval(res.low, res.high, item.kind, ratio=ratio, sep=" to ")
    return required, nominal, head + worst


def _circuit(br: BlockResult) -> str:
    variant = br.best.design.variant if br.best is not None else ""
    return f"{br.block.kind} ({variant})" if variant else br.block.kind


def _row(br: BlockResult) -> tuple[tuple[str, ...], ...]:
    triples = [_output_cells(item) for item in _shown_outputs(br)]
    parts = tuple(format_part(p) for p in br.parts) or ("no design",)
    verdict = br.verdict if br.mode != "checked" else f"{br.verdict} (checked)"
    return (
        (br.block.name,),
        (_circuit(br),),
        parts,
        tuple(t[0] for t in triples) or (MISSING,),
        tuple(t[1] for t in triples) or (MISSING,),
        tuple(t[2] for t in triples) or (MISSING,),
        (verdict,),
    )


def _select(result: Result, blocks: Sequence[str] | None) -> list[BlockResult]:
    if blocks is None:
        return list(result.blocks)
    names = [b.block.name for b in result.blocks]
    missing = [n for n in blocks if n not in names]
    if missing:
        raise UsageError(
            f"no block named {', '.join(repr(m) for m in missing)}; "
            f"the blocks are {', '.join(names)}"
        )
    return [result.block(n) for n in blocks]


def table_cells(
    result: Result, blocks: Sequence[str] | None = None
) -> list[tuple[tuple[str, ...], ...]]:
    """The table's body, one row per block; each cell is a tuple of lines.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Names of the blocks to show, in that order; ``None`` for all.

    Returns
    -------
    list
        Rows of seven cells, matching :data:`HEADERS`; a cell with several
        items (parts, outputs) has one line per item.

    Raises
    ------
    UsageError
        When a name in ``blocks`` is not a block of the spec.
    """
    return [_row(br) for br in _select(result, blocks)]


# --------------------------------------------------------------------------
# the bill of materials: one row per physical part

#: Bill-of-materials column headers, in order.
BOM_HEADERS: tuple[str, ...] = (
    "Designator",
    "Block",
    "Part",
    "Value",
    "Series",
    "Tolerance",
    "Tempco or dielectric",
    "Technology",
    "Rated voltage",
    "Pinned",
    "Verdict",
    "Note",
)

#: What the series column shows for a value in no IEC 60063 series.
OFF_SERIES = "off-series"

#: What each capacitor dielectric family is, as a parts list names the technology.
_CAPACITOR_TECHNOLOGY = {
    "class1": "class 1 ceramic",
    "class2": "class 2 ceramic",
    "electrolytic": "aluminium electrolytic",
}
_FILM_TECHNOLOGY = {"PP": "polypropylene film", "PET": "polyester film"}


def designators(block: Block, part: Part) -> tuple[str, ...]:
    """The board designators of a part, from the block's ``refs`` statement.

    Parameters
    ----------
    block
        The block the part belongs to.
    part
        One part of its design.

    Returns
    -------
    tuple of str
        One designator for a single part, two for a series/parallel pair (the
        second one given in ``refs``, else the first with the suffix letters A
        and B), or none when ``refs`` does not name the part.

    Notes
    -----
    Suffix letters for the parts of one item (``R12A``, ``R12B``) follow IEEE 315
    reference designation (from memory); a designator written in a spec never
    ends in a letter, so a suffixed one cannot clash with it.
    """
    names = block.refs.get(part.ref, ())
    if not names:
        return ()
    if part.pair is None:
        return names[:1]
    if len(names) == 2:
        return names
    return (names[0] + "A", names[0] + "B")


def technology(part: Part) -> str:
    """A part technology that meets the part's figures, as a parts list names it.

    Parameters
    ----------
    part
        A resistor or capacitor.

    Returns
    -------
    str
        Capacitors: the dielectric's family (``"class 1 ceramic"``, ``"class 2
        ceramic"``, ``"polypropylene film"``, ``"polyester film"``, ``"aluminium
        electrolytic"``).  Resistors: the most common technology whose typical
        tempco lies within the part's bound (thick film 100, metal film 50, thin
        film 25 ppm/K, ``timespec.parts.dielectrics.RESISTOR_TCR_PPM``), or
        ``"low-TCR thin film"`` for a bound below 25 ppm/K.

    Notes
    -----
    The resistor figures are typical datasheet classes, from memory; the analysis
    uses the tempco bound itself, never the technology.
    """
    if part.kind == "capacitance":
        if not part.dielectric:
            return MISSING
        d = dielectrics.dielectric(part.dielectric)
        if d.family == "film":
            return _FILM_TECHNOLOGY.get(d.name, "film")
        return _CAPACITOR_TECHNOLOGY[d.family]
    if part.tempco_ppm is None:
        return MISSING
    by_tcr = sorted(dielectrics.RESISTOR_TCR_PPM.items(), key=lambda kv: -kv[1])
    for name, typical in by_tcr:
        if typical <= part.tempco_ppm * (1.0 + 1e-9):
            return name
    return "low-TCR thin film"


def _rated(block: Block, part: Part) -> str:
    """The rated-voltage cell: stated, assumed by the analysis, or unknown."""
    if part.kind != "capacitance" or not part.dielectric:
        return MISSING
    volts, stated = rated_voltage(block, part)
    if stated:
        return format_quantity(volts, "voltage")
    family = dielectrics.dielectric(part.dielectric).family
    if family == "class2":
        # the DC-bias loss bound assumed this rating; a part rated lower loses more
        return f"{format_quantity(volts, 'voltage')} min (assumed)"
    if family == "electrolytic":
        assumed = ELECTROLYTIC_RATING_FACTOR * block.conditions.supply.high
        return f"{format_quantity(assumed, 'voltage')} (assumed)"
    return MISSING


def _percent(x: float) -> str:
    return f"±{format_quantity(x, 'ratio')}"


def _characteristic(part: Part) -> str:
    if part.kind == "resistance":
        if part.tempco_ppm is None:
            return MISSING
        return f"{part.tempco_ppm:g} ppm/K"
    return part.dielectric or MISSING


def _bom_verdict(br: BlockResult) -> str:
    if br.verdict == "infeasible":
        return "infeasible: closest design"
    return br.verdict


def _bom_part_rows(br: BlockResult, part: Part) -> list[tuple[str, ...]]:
    block = br.block
    names = designators(block, part)
    common = (
        part.series or OFF_SERIES,
        _percent(part.tolerance),
        _characteristic(part),
        technology(part),
        _rated(block, part),
        "yes" if part.pinned else "no",
        _bom_verdict(br),
    )
    if part.pair is None:
        name = names[0] if names else f"{block.name}.{part.ref}"
        value = format_quantity(part.value, part.kind)
        return [(name, block.name, part.ref, value, *common, "")]
    lo, hi, how = part.pair
    if not names:
        names = (f"{block.name}.{part.ref}.1", f"{block.name}.{part.ref}.2")
    total = format_quantity(part.value, part.kind)
    rows: list[tuple[str, ...]] = []
    for i, each in enumerate((lo, hi)):
        note = f"in {how} with {names[1 - i]}: {part.ref} = {total}"
        rows.append(
            (names[i], block.name, part.ref, format_quantity(each, part.kind), *common, note)
        )
    return rows


def bom_rows(result: Result, blocks: Sequence[str] | None = None) -> list[tuple[str, ...]]:
    """The bill of materials' body: one row per physical part.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Names of the blocks to list, in that order; ``None`` for all.

    Returns
    -------
    list of tuple of str
        Rows matching :data:`BOM_HEADERS`, block by block in spec order and part
        by part in the design's order (a pair gives two rows, smaller value
        first).  A part the ``refs`` statement does not name is designated
        ``<block>.<part>``.  An infeasible block lists its closest design, its
        verdict cell saying so; a block with no design at all gives one row
        saying that.

    Raises
    ------
    UsageError
        When a name in ``blocks`` is not a block of the spec.
    """
    rows: list[tuple[str, ...]] = []
    for br in _select(result, blocks):
        if not br.parts:
            blank = (MISSING,) * 8  # part, value ... pinned
            rows.append((MISSING, br.block.name, *blank, f"{br.verdict}: no design", ""))
            continue
        for part in br.parts:
            rows.extend(_bom_part_rows(br, part))
    return rows


# --------------------------------------------------------------------------
# writers


def _markdown_escape(text: str) -> str:
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def _markdown(rows: list[tuple[tuple[str, ...], ...]], headers: tuple[str, ...] = HEADERS) -> str:
    def line(cells: Sequence[str]) -> str:
        return "| " + " | ".join(cells) + " |"

    out = [line([_markdown_escape(h) for h in headers]), line(["---"] * len(headers))]
    for row in rows:
        out.append(line([_markdown_escape(JOIN.join(cell)) for cell in row]))
    return "\n".join(out) + "\n"


_REST_SPECIAL = str.maketrans({c: "\\" + c for c in "\\*`_|[]:<>"})


def _rest_escape(text: str) -> str:
    return text.translate(_REST_SPECIAL)


def _rest(
    rows: list[tuple[tuple[str, ...], ...]],
    title: str | None,
    headers: tuple[str, ...] = HEADERS,
) -> str:
    # Each cell is a line block ("| text"): its lines are inline text only, so a
    # value that starts with "-" or "1." can never turn into a list.
    out = [f".. list-table:: {_rest_escape(title)}" if title else ".. list-table::"]
    out += ["   :header-rows: 1", ""]
    for row in [tuple((h,) for h in headers), *rows]:
        for i, cell in enumerate(row):
            lead = "   * - " if i == 0 else "     - "
            lines = [f"| {_rest_escape(item)}" for item in cell] or ["| " + MISSING]
            out.append(lead + lines[0])
            out += ["       " + ln for ln in lines[1:]]
    return "\n".join(out) + "\n"


def _csv(rows: list[tuple[tuple[str, ...], ...]], headers: tuple[str, ...] = HEADERS) -> str:
    buf = io.StringIO(newline="")
    writer = csv.writer(buf, lineterminator="\r\n")  # RFC 4180: CRLF line ends
    writer.writerow(headers)
    for row in rows:
        writer.writerow([JOIN.join(cell) for cell in row])
    return buf.getvalue()


def _check_format(fmt: str) -> None:
    if fmt not in ("markdown", "rest", "csv"):
        raise UsageError(f"unknown table format {fmt!r}; use markdown, rest or csv")


def _render(
    rows: list[tuple[tuple[str, ...], ...]], fmt: str, title: str | None, headers: tuple[str, ...]
) -> str:
    """One table in one of the formats (checked by :func:`_check_format`)."""
    if fmt == "markdown":
        return _markdown(rows, headers)
    if fmt == "rest":
        return _rest(rows, title, headers)
    return _csv(rows, headers)


def render_table(
    result: Result,
    fmt: TableFormat,
    *,
    blocks: Sequence[str] | None = None,
    title: str | None = None,
) -> str:
    """Render the part-value table of a solved spec.

    Parameters
    ----------
    result
        A solved spec (:func:`timespec.design.solver.solve`).
    fmt
        ``"markdown"`` (a pipe table), ``"rest"`` (a ``list-table`` directive) or
        ``"csv"`` (RFC 4180: comma separated, quoted where needed, CRLF line ends).
    blocks
        Names of the blocks to show, in that order; ``None`` for all.
    title
        Table title (reST only; ignored by the other formats).

    Returns
    -------
    str
        The table, ending with a newline: a header row, then one row per block.

    Raises
    ------
    UsageError
        On an unknown format, or when a name in ``blocks`` is not a block of
        the spec.

    Notes
    -----
    Cells holding several items (parts, or the outputs of a block with more
    than one requirement) join them with ``"; "`` in Markdown and CSV, and put
    each on its own line in reST.

    References
    ----------
    RFC 4180, Common Format and MIME Type for Comma-Separated Values (CSV) Files.
    """
    _check_format(fmt)
    return _render(table_cells(result, blocks), fmt, title, HEADERS)


def render_bom(
    result: Result,
    fmt: TableFormat,
    *,
    blocks: Sequence[str] | None = None,
    title: str | None = None,
) -> str:
    """Render the bill of materials of a solved spec: one row per physical part.

    Parameters
    ----------
    result
        A solved spec (:func:`timespec.design.solver.solve`).
    fmt
        ``"markdown"``, ``"rest"`` or ``"csv"``, as for :func:`render_table`.
    blocks
        Names of the blocks to list, in that order; ``None`` for all.
    title
        Table title (reST only).

    Returns
    -------
    str
        A header row (:data:`BOM_HEADERS`), then the rows of :func:`bom_rows`
        (in CSV an empty cell stands for "—"); the same result gives the same bytes.

    Raises
    ------
    UsageError
        On an unknown format, or when a name in ``blocks`` is not a block of
        the spec.

    References
    ----------
    RFC 4180 (CSV); IEEE 315 / ASME Y14.44 reference designation (designators).
    """
    _check_format(fmt)
    body = bom_rows(result, blocks)
    if fmt == "csv":  # a spreadsheet or parts-list import reads an empty cell as "none"
        body = [tuple("" if cell == MISSING else cell for cell in row) for row in body]
    rows: list[tuple[tuple[str, ...], ...]] = [tuple((cell,) for cell in row) for row in body]
    return _render(rows, fmt, title, BOM_HEADERS)
