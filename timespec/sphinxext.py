"""Sphinx extension: spec tables, the statement reference and device classes in the docs.

Add ``"timespec.sphinxext"`` to ``extensions`` in ``conf.py``.  It adds three
directives:

``.. timespec-table:: path/to/board.tspec``
    Loads the spec (path relative to the document), solves it and puts its
    part-value table (:func:`timespec.outputs.tables.render_table`) in the page.
    Options: ``:blocks:`` (block names, separated by commas or spaces, in the
    order to show) and ``:title:``.  The spec file and every file it includes
    become dependencies of the page, so editing the spec rebuilds it.  A
    mistake in the spec is reported as a Sphinx warning located at the spec's
    ``file:line`` (so ``sphinx-build -W`` fails), never as a traceback.

``.. timespec-statements::``
    The statement vocabulary, generated from :data:`timespec.language.statements.KEYWORDS`
    so the language reference never drifts from the parser.  Options:
    ``:kinds:`` (block kinds to list statements for) and ``:only:`` (only the
    statements no other block kind takes).

``.. timespec-devices::``
    The parameters of the generic timer and Schmitt-inverter classes
    (:mod:`timespec.parts.devices`) with the source mark of each value (``[DS]``,
    ``[CP]``, ``[Mem]``) read from the module.
"""

from __future__ import annotations

import inspect
import math
import re
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any, ClassVar

from docutils import nodes
from docutils.parsers.rst import directives
from docutils.statemachine import StringList
from sphinx.util import logging
from sphinx.util.docutils import SphinxDirective

from timespec.design.result import Result
from timespec.errors import SpecError
from timespec.language.vocabulary import KEYWORDS, Keyword
from timespec.model import BLOCK_KINDS, Spec
from timespec.numbers import format_quantity
from timespec.outputs.tables import render_table
from timespec.parts import devices

__all__ = [
    "DevicesDirective",
    "StatementsDirective",
    "TableDirective",
    "device_rows",
    "setup",
    "spec_files",
    "statement_rows",
]

logger = logging.getLogger(__name__)

_KIND_ORDER = ("defaults", *BLOCK_KINDS, "fixture")


def _names(text: str | None) -> list[str]:
    """Split an option value on commas and whitespace."""
    return [n for n in re.split(r"[,\s]+", text or "") if n]


_ESCAPES: dict[str, str | int | None] = {c: "\\" + c for c in "\\*`_|[]<>"}


def _escape(text: str) -> str:
    return text.translate(str.maketrans(_ESCAPES))


def spec_files(spec: Spec, main: Path) -> list[Path]:
    """Every file a loaded spec was read from: the file itself and its includes.

    Parameters
    ----------
    spec
        The loaded spec.
    main
        The spec file that was loaded.

    Returns
    -------
    list of Path
        Absolute paths, the main file first, each once.

    Notes
    -----
    Included files are found from the positions the parser recorded on each
    block and statement (positions carry the file they were read from).
    """
    seen: dict[Path, None] = {main.resolve(): None}
    for block in spec.blocks:
        for pos in [block.pos, *block.positions.values()]:
            if pos is not None and pos.path:
                seen.setdefault(Path(pos.path).resolve(), None)
    return list(seen)


def _spec_message(err: SpecError, where: str) -> str:
    text = err.message
    if err.column is not None:
        text += f" (column {err.column})"
    if err.hint:
        text += f"; hint: {err.hint}"
    return f"{text} [timespec-table in {where}]"


def _spec_location(err: SpecError, fallback: Path) -> str:
    path = Path(err.path).resolve() if err.path else fallback
    return f"{path}:{err.line}" if err.line is not None else f"{path}:1"


def _list_table(headers: Sequence[str], rows: Iterable[Sequence[str]]) -> list[str]:
    """A reST list-table; cells are already reST inline text."""
    out = [".. list-table::", "   :header-rows: 1", ""]
    for row in [list(headers), *rows]:
        for i, cell in enumerate(row):
            out.append(("   * - " if i == 0 else "     - ") + (cell or "\\-"))
    return out


class _ParsingDirective(SphinxDirective):
    """A directive that writes reST and parses it into the page."""

    def parse_lines(self, lines: list[str]) -> list[nodes.Node]:
        """Parse generated reST lines into nodes.

        Parameters
        ----------
        lines
            The reST text, one line per item.

        Returns
        -------
        list of docutils.nodes.Node
            The parsed nodes.
        """
        source = self.get_source_info()[0] or self.env.docname
        holder = nodes.container()
        holder.document = self.state.document
        self.state.nested_parse(StringList(lines, source=source), self.content_offset, holder)
        return list(holder.children)


class TableDirective(_ParsingDirective):
    """``.. timespec-table:: spec.tspec`` — the part-value table of a spec file."""

    required_arguments = 1
    optional_arguments = 0
    final_argument_whitespace = True
    has_content = False
    option_spec: ClassVar[dict[str, Any]] = {
        "blocks": directives.unchanged,
        "title": directives.unchanged,
    }

    def run(self) -> list[nodes.Node]:
        """Load, solve and render the spec.

        Returns
        -------
        list of docutils.nodes.Node
            The table, or nothing when the spec has a mistake (a warning is
            logged at the spec's file and line instead).
        """
        from timespec.design.solver import solve_block
        from timespec.language.assemble import load

        rel, abs_path = self.env.relfn2path(self.arguments[0], self.env.docname)
        path = Path(abs_path)
        self.env.note_dependency(rel)
        where = self.get_location()
        try:
            spec = load(path)
        except SpecError as err:
            logger.warning(
                _spec_message(err, where),
                location=_spec_location(err, path),
                type="timespec",
                subtype="spec",
            )
            return []
        for file in spec_files(spec, path):
            self.env.note_dependency(str(file))
        names = [b.name for b in spec.blocks]
        wanted = _names(self.options.get("blocks")) or names
        unknown = [n for n in wanted if n not in names]
        if unknown:
            logger.warning(
                f"{self.arguments[0]} has no block named {', '.join(map(repr, unknown))}; "
                f"its blocks are {', '.join(names)}",
                location=where,
                type="timespec",
                subtype="blocks",
            )
            return []
        try:
            result = Result(spec, tuple(solve_block(spec.block(n)) for n in wanted))
        except SpecError as err:
            logger.warning(
                _spec_message(err, where),
                location=_spec_location(err, path),
                type="timespec",
                subtype="spec",
            )
            return []
        except Exception as exc:  # a tool in a docs build reports, it does not crash
            logger.warning(
                f"timespec could not solve {self.arguments[0]}: {type(exc).__name__}: {exc}",
                location=where,
                type="timespec",
                subtype="solve",
            )
            return []
        text = render_table(result, "rest", title=self.options.get("title"))
        return self.parse_lines(text.splitlines())


def _where(kw: Keyword) -> str:
    kinds = [k for k in _KIND_ORDER if k in kw.kinds]
    if not kinds:
        return "between blocks"
    return ", ".join(kinds)


def statement_rows(kinds: Sequence[str] = (), only: bool = False) -> list[tuple[str, ...]]:
    """The statement reference rows: keyword, where it stands, example, meaning.

    Parameters
    ----------
    kinds
        Block kinds (or ``"defaults"``) to list statements for; empty for all.
    only
        Keep only statements that no other block kind takes.

    Returns
    -------
    list of tuple of str
        One row per keyword, in the statement table's order, as reST inline text.

    Raises
    ------
    ValueError
        On an unknown block kind.
    """
    bad = [k for k in kinds if k not in _KIND_ORDER]
    if bad:
        raise ValueError(
            f"unknown block kind {', '.join(map(repr, bad))}; use {', '.join(_KIND_ORDER)}"
        )
    rows: list[tuple[str, ...]] = []
    for kw in KEYWORDS.values():
        if kinds and not (kw.kinds & set(kinds)):
            continue
        if only and (kw.kinds - {"defaults"}) - set(kinds):
            continue
        rows.append(
            (f"``{kw.name}``", _escape(_where(kw)), f"``{kw.example}``", _escape(kw.meaning))
        )
    return rows


class StatementsDirective(_ParsingDirective):
    """``.. timespec-statements::`` — the statement vocabulary as a table."""

    has_content = False
    option_spec: ClassVar[dict[str, Any]] = {
        "kinds": directives.unchanged,
        "only": directives.flag,
    }

    def run(self) -> list[nodes.Node]:
        """Render the statement table.

        Returns
        -------
        list of docutils.nodes.Node
            The table.
        """
        try:
            rows = statement_rows(_names(self.options.get("kinds")), "only" in self.options)
        except ValueError as exc:
            raise self.error(str(exc)) from None
        lines = _list_table(("Statement", "Where", "Example", "Meaning"), rows)
        return self.parse_lines(lines)


# --------------------------------------------------------------------------
# device classes

_MARK_LINE = re.compile(r"^\s*(?P<field>\w+)=.*?#\s*(?P<comment>\[.*)$")
_CLASS_LINE = re.compile(r'^\s*"(?P<name>\w+)":\s*(?P<cls>TimerClass|GateClass)\(')
_MARKS = re.compile(r"\[([A-Za-z/]+)\]")

# How each field is shown: (kind for format_quantity, or a special form).
_FIELD_FORMS: dict[str, str] = {
    "supply_min": "voltage",
    "supply_max": "voltage",
    "initial": "percent",
    "drift_ppm": "ppm/K",
    "supply_drift": "percent/V",
    "r_on_max": "resistance",
    "i_threshold_max": "current",
    "i_discharge_max": "current",
    "f_max": "frequency",
    "r_min": "resistance",
    "r_max": "resistance",
    "output_drop": "voltage",
    "rising": "supply-triple",
    "falling": "supply-triple",
    "hysteresis_min": "supply",
    "i_input_max": "current",
}


def _source_marks() -> dict[tuple[str, str], tuple[str, str]]:
    """(class name, field) -> (marks, note) from the comments in :mod:`timespec.parts.devices`."""
    out: dict[tuple[str, str], tuple[str, str]] = {}
    current = ""
    for line in inspect.getsource(devices).splitlines():
        head = _CLASS_LINE.match(line)
        if head:
            current = head.group("name")
            continue
        m = _MARK_LINE.match(line)
        if m and current:
            comment = m.group("comment")
            marks = " ".join(f"[{x}]" for x in _MARKS.findall(comment))
            note = _MARKS.sub("", comment).strip(" ;,")
            out[(current, m.group("field"))] = (marks, note)
    return out


def _device_value(field: str, value: Any) -> str:
    form = _FIELD_FORMS.get(field)
    if form == "percent":
        return f"±{value * 100:.3g} %"
    if form == "ppm/K":
        return f"±{value:.3g} ppm/K"
    if form == "percent/V":
        return f"±{value * 100:.3g} %/V"
    if form == "supply":
        return f"{value:.3g} of supply"
    if form == "supply-triple":
        return " / ".join(f"{v:.2f}" for v in value) + " of supply (min / typ / max)"
    if form is not None and isinstance(value, float) and math.isfinite(value):
        return format_quantity(value, form, digits=3)
    return str(value)


def device_rows() -> list[tuple[str, ...]]:
    """Rows for the device-class table: class, parameter, value, source mark, note.

    Returns
    -------
    list of tuple of str
        One row per parameter of every timer and Schmitt-inverter class, as
        reST inline text; the mark is ``[DS]``, ``[CP]`` or ``[Mem]`` as
        written beside the value in :mod:`timespec.parts.devices`.
    """
    marks = _source_marks()
    rows: list[tuple[str, ...]] = []
    groups: list[tuple[str, dict[str, Any]]] = [
        ("timer", dict(devices.TIMER_CLASSES)),
        ("gate", dict(devices.GATE_CLASSES)),
    ]
    for what, classes in groups:
        for name, obj in classes.items():
            for field in obj.__dataclass_fields__:
                if field == "name":
                    continue
                mark, note = marks.get((name, field), ("", ""))
                rows.append(
                    (
                        f"{what} ``{name}``",
                        f"``{field}``",
                        _escape(_device_value(field, getattr(obj, field))),
                        _escape(mark),
                        _escape(note),
                    )
                )
    return rows


class DevicesDirective(_ParsingDirective):
    """``.. timespec-devices::`` — device-class defaults with their source marks."""

    has_content = False

    def run(self) -> list[nodes.Node]:
        """Render the device-class table.

        Returns
        -------
        list of docutils.nodes.Node
            The table.
        """
        lines = _list_table(("Class", "Parameter", "Value", "Source", "Note"), device_rows())
        return self.parse_lines(lines)


def setup(app: Any) -> dict[str, Any]:
    """Register the directives with Sphinx.

    Parameters
    ----------
    app
        The Sphinx application.

    Returns
    -------
    dict
        Extension metadata: version and parallel safety.
    """
    app.add_directive("timespec-table", TableDirective)
    app.add_directive("timespec-statements", StatementsDirective)
    app.add_directive("timespec-devices", DevicesDirective)
    return {"version": "0.1", "parallel_read_safe": True, "parallel_write_safe": True}
