"""Part-value tables: one row per block, in Markdown, reStructuredText or CSV.

A table answers "what did we fit, and does it hold?" at a glance: the block,
its circuit, the parts (RKM values with series, tolerance and tempco or
dielectric), each requirement next to the nominal value and the worst-case
window, and the verdict.  The cells are built once (:func:`table_cells`) and
written out by three small writers, so the formats never disagree.

Quantities are shown with SI prefixes (``149.4 ms``, ``3.997 kHz``); ratios
are shown in percent, or in ppm for frequency errors (``accuracy``) and other
small ratios.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from timespec.design.result import BlockResult, OutputResult, Result
from timespec.errors import UsageError
from timespec.model import Window
from timespec.numbers import (
    format_interval,
    format_part,
    format_quantity,
    format_window,
    ratio_unit,
)

__all__ = [
    "HEADERS",
    "TableFormat",
    "format_part",
    "format_quantity",
    "format_window",
    "render_table",
    "table_cells",
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
# writers


def _markdown_escape(text: str) -> str:
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def _markdown(rows: list[tuple[tuple[str, ...], ...]]) -> str:
    def line(cells: Sequence[str]) -> str:
        return "| " + " | ".join(cells) + " |"

    out = [line(HEADERS), line(["---"] * len(HEADERS))]
    for row in rows:
        out.append(line([_markdown_escape(JOIN.join(cell)) for cell in row]))
    return "\n".join(out) + "\n"


_REST_SPECIAL = str.maketrans({c: "\\" + c for c in "\\*`_|[]:<>"})


def _rest_escape(text: str) -> str:
    return text.translate(_REST_SPECIAL)


def _rest(rows: list[tuple[tuple[str, ...], ...]], title: str | None) -> str:
    # Each cell is a line block ("| text"): its lines are inline text only, so a
    # value that starts with "-" or "1." can never turn into a list.
    out = [f".. list-table:: {_rest_escape(title)}" if title else ".. list-table::"]
    out += ["   :header-rows: 1", ""]
    for row in [tuple((h,) for h in HEADERS), *rows]:
        for i, cell in enumerate(row):
            lead = "   * - " if i == 0 else "     - "
            lines = [f"| {_rest_escape(item)}" for item in cell] or ["| " + MISSING]
            out.append(lead + lines[0])
            out += ["       " + ln for ln in lines[1:]]
    return "\n".join(out) + "\n"


def _csv(rows: list[tuple[tuple[str, ...], ...]]) -> str:
    buf = io.StringIO(newline="")
    writer = csv.writer(buf, lineterminator="\r\n")  # RFC 4180: CRLF line ends
    writer.writerow(HEADERS)
    for row in rows:
        writer.writerow([JOIN.join(cell) for cell in row])
    return buf.getvalue()


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
    if fmt not in ("markdown", "rest", "csv"):
        raise UsageError(f"unknown table format {fmt!r}; use markdown, rest or csv")
    rows = table_cells(result, blocks)
    if fmt == "markdown":
        return _markdown(rows)
    if fmt == "rest":
        return _rest(rows, title)
    return _csv(rows)
