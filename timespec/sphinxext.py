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

    A block that fails or is infeasible is never published as if it held: a
    note above the table names it with its worst case against the
    requirement, and a Sphinx warning at the directive's line fails a
    ``-W`` build.  ``:allow-failing:`` (block names, or none for every block
    in the table) says the failure is intended: the note stays, the warning
    goes.  Naming a block that meets (or is not in the table) is warned about,
    so a stale allowance does not outlive the failure it excused.

    ``:plot: margin|waveform|histogram|ambient`` shows that chart
    (:func:`timespec.outputs.charts.chart`) of the blocks instead of the table,
    written under the build's doctree folder as SVG and PNG and copied into the
    output by Sphinx's own image handling (each builder takes the format it
    supports).

    ``:explain:`` adds, after the table, the derivation of each output
    (:func:`timespec.outputs.explain.render_derivation`): the formula, every
    number at nominal and at the worst-case corners, and the source of each
    class constant.

``.. timespec-statements::``
    The statement vocabulary, generated from :data:`timespec.language.vocabulary.KEYWORDS`
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
import os
import re
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any, ClassVar

from docutils import nodes
from docutils.parsers.rst import directives
from docutils.statemachine import StringList
from sphinx.util import logging
from sphinx.util.docutils import SphinxDirective

from timespec.design.result import BlockResult, OutputResult, Result
from timespec.errors import SpecError
from timespec.language.vocabulary import KEYWORDS, Keyword
from timespec.model import BLOCK_KINDS, Spec
from timespec.numbers import format_interval, format_quantity, format_window, ratio_unit
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


def _verdict_phrase(br: BlockResult) -> str:
    if br.verdict == "fails":
        return "fails at worst case" + (" (its parts are pinned)" if br.mode == "checked" else "")
    if br.verdict == "infeasible":
        if br.best is None:
            return "is infeasible (no design could be formed)"
        return "is infeasible (no allowed design meets; the closest is shown)"
    return f"does not meet ({br.verdict})"


def _output_failure(out: OutputResult) -> str:
    """``width worst case 13.66 ms … 19.75 ms, required 15 ms ±2 % (…): … above``."""
    req = out.required
    assert req is not None
    ratio = ratio_unit(out.name, [out.nominal, out.low, out.high, req.low, req.high])
    worst = format_interval(out.low, out.high, out.kind, ratio=ratio)
    required = format_window(req, ratio=ratio)
    bounds = format_interval(req.low, req.high, out.kind, ratio=ratio)
    if bounds != required:
        required += f" ({bounds})"
    text = f"{out.name} worst case {worst}, required {required}"
    if not (math.isfinite(out.low) and math.isfinite(out.high)):
        return text + ": the worst case is unbounded"
    low_margin, high_margin = out.margin
    beyond = []
    if low_margin < 0:
        beyond.append(f"{format_quantity(-low_margin, out.kind, ratio=ratio)} below the low limit")
    if high_margin < 0:
        beyond.append(
            f"{format_quantity(-high_margin, out.kind, ratio=ratio)} above the high limit"
        )
    return text + (": " + ", ".join(beyond) if beyond else "")


def _failure_details(br: BlockResult) -> list[str]:
    """Why a block does not meet: each output outside its window, each design-rule error."""
    if br.best is None:
        return list(br.notes[:1]) or ["no candidate design"]
    details = [_output_failure(o) for o in br.best.outputs if not o.meets and o.required]
    details += [
        f"design-rule error: {f.message} [{f.code}]"
        for f in br.best.findings
        if f.severity == "error"
    ]
    return details or list(br.notes[:1]) or ["see the text report"]


def _verdict_note(failing: Sequence[BlockResult]) -> list[str]:
    """A reST warning admonition naming each block that does not meet."""
    if not failing:
        return []
    out = [".. admonition:: Not every block meets its requirements", "   :class: warning", ""]
    for br in failing:
        details = "; ".join(_failure_details(br))
        out.append(f"   * ``{br.block.name}`` {_escape(_verdict_phrase(br))}: {_escape(details)}.")
    return [*out, ""]


class TableDirective(_ParsingDirective):
    """``.. timespec-table:: spec.tspec`` — the part-value table of a spec file."""

    required_arguments = 1
    optional_arguments = 0
    final_argument_whitespace = True
    has_content = False
    option_spec: ClassVar[dict[str, Any]] = {
        "blocks": directives.unchanged,
        "title": directives.unchanged,
        "allow-failing": directives.unchanged,
        "plot": lambda arg: directives.choice(arg, ("margin", "waveform", "histogram", "ambient")),
        "explain": directives.flag,
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
        note = self.check_verdicts(result)
        if "plot" in self.options:  # the chart (timespec.outputs.charts) instead of the table
            return self.parse_lines([*note, *self.plot_lines(result, self.options["plot"])])
        text = render_table(result, "rest", title=self.options.get("title"))
        if "explain" in self.options:  # the derivation of each output after the table
            from timespec.outputs.explain import derive, render_derivation

            text += "\n" + render_derivation(derive(result), "rst")
        return self.parse_lines([*note, *text.splitlines()])

    def plot_lines(self, result: Result, kind: str) -> list[str]:
        """Write the chart under the doctree folder; an ``image`` directive that shows it.

        Parameters
        ----------
        result
            The solved blocks.
        kind
            The chart kind.

        Returns
        -------
        list of str
            The reST lines (none, with a warning, when there is nothing to draw).
        """
        from timespec.errors import UsageError
        from timespec.outputs.charts import write_chart

        try:  # SVG and PNG: ``stem.*`` lets each builder take the one it supports
            stem = write_chart(result, kind, Path(self.env.doctreedir) / "timespec")
        except UsageError as exc:
            logger.warning(
                exc.message, location=self.get_location(), type="timespec", subtype="plot"
            )
            return []
        here = Path(self.env.doc2path(self.env.docname)).parent
        uri = Path(os.path.relpath(stem, here)).as_posix() + ".*"
        return [f".. image:: {uri}", f"   :alt: timespec {kind} chart of {self.arguments[0]}", ""]

    def check_verdicts(self, result: Result) -> list[str]:
        """Warn about blocks that do not meet, unless ``:allow-failing:`` names them.

        Parameters
        ----------
        result
            The solved blocks shown in the table.

        Returns
        -------
        list of str
            reST lines of the note naming every failing or infeasible block
            (empty when all meet); the note is shown whether or not the failure
            is allowed.
        """
        where = self.get_location()
        shown = [br.block.name for br in result.blocks]
        failing = [br for br in result.blocks if br.verdict != "meets"]
        allowing = "allow-failing" in self.options
        allowed = _names(self.options.get("allow-failing")) or (shown if allowing else [])
        for br in failing:
            if br.block.name in allowed:
                continue
            logger.warning(
                f"{self.arguments[0]}: block {br.block.name!r} {_verdict_phrase(br)}: "
                f"{'; '.join(_failure_details(br))} (the table is published with a note; "
                f"add ':allow-failing: {br.block.name}' if the failure is intended) "
                "[timespec-table]",
                location=where,
                type="timespec",
                subtype="verdict",
            )
        failing_names = {br.block.name for br in failing}
        stale = [n for n in _names(self.options.get("allow-failing")) if n not in failing_names]
        if stale or (allowing and not failing):
            what = (
                f"names {', '.join(map(repr, stale))}, which "
                f"{'is not a failing block' if len(stale) == 1 else 'are not failing blocks'}"
                " of this table"
                if stale
                else "is given, but no block of this table fails"
            )
            logger.warning(
                f"{self.arguments[0]}: ':allow-failing:' {what}; remove the allowance "
                "[timespec-table]",
                location=where,
                type="timespec",
                subtype="allow-failing",
            )
        return _verdict_note(failing)


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
    "ith_ambient": "celsius-range",
    "drift_ambient": "celsius-range",
    "supply_drift_supply": "volt-range",
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
    if form == "celsius-range":
        return f"{value[0]:g} … {value[1]:g} °C"
    if form == "volt-range":
        return f"{value[0]:g} … {value[1]:g} V"
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
