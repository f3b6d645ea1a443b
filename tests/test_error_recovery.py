"""Every mistake at once (issue 12, item 3): recovery after a broken statement or block.

A spec with several independent mistakes reports all of them (at most
:data:`~timespec.errors.MAX_ERRORS`), each at its own line and column, in the order
of the text; a mistake in a block's header hides that block's statements (no
cascade); a spec with one mistake reports exactly that one, as it always did.
The scenarios are invented for these tests (a greenhouse controller board).
"""

from __future__ import annotations

import io
import pickle
import random
from pathlib import Path

import pytest

import timespec
from timespec.cli import main
from timespec.errors import (
    MAX_ERRORS,
    SpecError,
    SpecErrors,
    SpecIncludeError,
    SpecSyntaxError,
    SpecUnitError,
    SpecValueError,
    collect_errors,
)
from timespec.language.parser import parse_entries, parse_recovering, source_lines

ROOT = Path(__file__).resolve().parents[1]

# Five independent mistakes of four kinds: a unit, a statement, a missing
# requirement, a duplicate block name, a syntax error.
MIXED = """defaults:
  supply 12 V ±5%

oneshot vent_pulse:
  width 40 ms ±10%
  ambient -10 degC to 50 degQ

astable mist_beat:
  frequency 4 Hz ±5%
  widht 3

delay door_guard:
  threshold 0.5 to 0.7 of supply

oneshot vent_pulse:
  width 10 ms ±5%

relaxation fan_clock:
  frequency 1 kHz ±
"""


def _errors(text: str, path: str = "g.tspec") -> tuple[SpecError, ...]:
    with pytest.raises(SpecError) as info:
        timespec.parse(text, path)
    exc = info.value
    return exc.errors if isinstance(exc, SpecErrors) else (exc,)


def _at(text: str, line_no: int, needle: str) -> tuple[int, int]:
    """Line and 1-based column of ``needle`` on a line of ``text`` (found, not typed in)."""
    line = source_lines(text)[line_no - 1]
    assert needle in line, (needle, line)
    return line_no, line.index(needle) + 1


def test_every_independent_mistake_is_reported_located_and_in_order() -> None:
    errors = _errors(MIXED)
    lines = source_lines(MIXED)
    last = lines[18]
    assert [(type(e), e.line, e.column) for e in errors] == [
        (SpecUnitError, *_at(MIXED, 6, "degQ")),
        (SpecValueError, *_at(MIXED, 10, "widht")),
        (SpecValueError, *_at(MIXED, 12, "delay")),  # at the header of the block lacking it
        (SpecValueError, *_at(MIXED, 15, "vent_pulse")),  # at the second name
        (SpecSyntaxError, 19, len(last.rstrip()) + 1),  # just past the bare ±
    ]
    assert "degQ" in errors[0].message
    assert "widht" in errors[1].message and errors[1].hint is not None
    assert "'delay'" in errors[2].message
    assert "already stands at line 4" in errors[3].message
    assert "ends too early" in errors[4].message
    assert all(e.path == "g.tspec" for e in errors)
    assert all(e.source_line == lines[e.line - 1] for e in errors if e.line is not None)


def test_the_exception_is_the_first_mistake_and_of_its_class() -> None:
    with pytest.raises(SpecUnitError) as info:  # the first mistake's class still catches it
        timespec.parse(MIXED, "g.tspec")
    exc = info.value
    assert isinstance(exc, SpecErrors)
    first = exc.errors[0]
    assert (exc.message, exc.line, exc.column, exc.hint) == (
        first.message,
        first.line,
        first.column,
        first.hint,
    )
    assert not exc.truncated
    # str() shows every mistake in the located form, one after another
    text = str(exc)
    assert text == "\n".join(SpecError.__str__(e) for e in exc.errors)
    assert text.count(": error: ") == len(exc.errors) == 5


def test_errors_survive_pickling_for_process_pools() -> None:
    with pytest.raises(SpecErrors) as info:
        timespec.parse(MIXED, "g.tspec")
    back = pickle.loads(pickle.dumps(info.value))
    assert isinstance(back, SpecErrors) and isinstance(back, SpecUnitError)
    assert [(type(e), e.line, e.column, e.message) for e in back.errors] == [
        (type(e), e.line, e.column, e.message) for e in info.value.errors
    ]


def test_one_mistake_reports_exactly_as_before() -> None:
    text = "oneshot vent_pulse:\n  width 40 ms ±10%\n  supply 12 Vq\n"
    with pytest.raises(SpecError) as info:
        timespec.parse(text, "g.tspec")
    exc = info.value
    assert type(exc) is SpecUnitError  # the plain class, not a collection
    line, column = _at(text, 3, "Vq")
    assert (exc.line, exc.column) == (line, column)
    assert str(exc) == (
        f"g.tspec:{line}:{column}: error: {exc.message}\n"
        f"      supply 12 Vq\n"
        f"    {' ' * (column - 1)}^" + (f"\n  hint: {exc.hint}" if exc.hint else "")
    )


def test_one_syntax_mistake_through_parse_entries_is_the_plain_error() -> None:
    with pytest.raises(SpecError) as info:
        parse_entries("oneshot a:\n  width 40 ms ±\n", "g.tspec")
    assert type(info.value) is SpecSyntaxError
    assert (info.value.line, info.value.column) == (2, len("  width 40 ms ±") + 1)


def test_no_cascade_after_a_broken_block_header() -> None:
    # The header has a space in the name; without recovery care its statements would
    # stand outside any block, and "width" twice would be a second complaint.
    text = (
        "astable mist_beat:\n  frequency 4 Hz ±5%\n  supply 12 V ±5%\n"
        "oneshot vent pulse:\n  width 40 ms ±10%\n  width 40 ms ±10%\n  supply 5 V\n"
    )
    errors = _errors(text)
    assert len(errors) == 1
    assert isinstance(errors[0], SpecSyntaxError) and errors[0].line == 4


def test_no_cascade_after_a_one_line_header_with_a_bad_value() -> None:
    text = "oneshot vent_pulse: width 40 ms ±10% at supply 12 Vq\n  ambient 0 degC to 40 degC\n"
    errors = _errors(text)
    assert [(type(e), e.line) for e in errors] == [(SpecUnitError, 1)]


def test_an_unknown_block_kind_hides_its_statements_but_later_blocks_are_checked() -> None:
    text = (
        "defaults:\n  supply 12 V ±5%\n"
        "oneshoot vent_pulse:\n  width 40 ms ±10%\n  widht 3\n"
        "oneshot door_guard:\n  width 5 ms ±5%\n  colour blue\n"
    )
    errors = _errors(text)
    assert [(e.line, e.column) for e in errors] == [
        _at(text, 3, "oneshoot"),
        _at(text, 8, "colour"),
    ]
    assert "unknown block kind" in errors[0].message


def test_a_broken_statement_does_not_also_report_its_block_as_incomplete() -> None:
    # "widht" was meant as the requirement: "has no 'width' statement" would repeat it.
    text = "oneshot vent_pulse:\n  widht 40 ms ±10%\n  supply 12 V ±5%\n"
    errors = _errors(text)
    assert len(errors) == 1 and "unknown statement 'widht'" in errors[0].message


def test_a_broken_defaults_section_does_not_make_every_block_lack_a_supply() -> None:
    text = (
        "defaults: supply 12 Vq\n"
        "oneshot vent_pulse:\n  width 40 ms ±10%\n"
        "oneshot door_guard:\n  width 5 ms ±5%\n  colour blue\n"
    )
    errors = _errors(text)
    assert [e.line for e in errors] == [1, 6]  # no "has no supply voltage" for lines 2, 4


def test_a_header_without_its_colon_hides_its_statements() -> None:
    text = (
        "defaults:\n  supply 3.3 V ±5%\n"
        "crystal mcu_clock\n  frequency 16 MHz ±50 ppm\n  load 10 pF\n  shunt 2 pF\n"
        "oneshot door_guard:\n  width 5 ms ±5%\n  colour blue\n"
    )
    errors = _errors(text)
    assert [(e.line, e.column) for e in errors] == [(3, 1), _at(text, 9, "colour")]


def test_a_missing_header_is_one_mistake_not_one_per_statement() -> None:
    # The astable's header was deleted: its statements land in the oneshot block,
    # where each is misplaced or given twice.  The first says so; the rest repeat it.
    text = (
        "oneshot vent_pulse:\n  width 40 ms ±10%\n  supply 12 V ±5%\n"
        "  frequency 4 Hz ±5%\n  duty 40% to 60%\n  supply 12 V ±5%\n  width 1 ms ±1%\n"
        "oneshot door_guard:\n  width 5 ms ±5%\n  colour blue\n"
    )
    errors = _errors(text)
    assert [(e.line, e.column) for e in errors] == [(4, 3), _at(text, 10, "colour")]
    assert "does not belong" in errors[0].message


def test_two_misspelt_statements_in_one_block_are_both_reported() -> None:
    text = "oneshot vent_pulse:\n  widht 40 ms ±10%\n  suply 12 V ±5%\n"
    errors = _errors(text)
    assert [(e.line, e.column) for e in errors] == [(2, 3), (3, 3)]


def test_statements_outside_any_block_are_one_mistake() -> None:
    text = "  width 40 ms ±10%\n  supply 12 V\noneshot a:\n  width 1 ms ±1%\n  supply 12 Vq\n"
    errors = _errors(text)
    assert [(e.line, e.column) for e in errors] == [(1, 3), _at(text, 5, "Vq")]
    assert "outside any block" in errors[0].message


def test_the_report_is_bounded() -> None:
    n = MAX_ERRORS + 5
    text = "defaults:\n  supply 12 V ±5%\n" + "".join(
        f"oneshot pulse_{i}:\n  width {i + 1} ms ±5%\n  ambient 0 degC to 40 degQ\n"
        for i in range(n)
    )
    with pytest.raises(SpecErrors) as info:
        timespec.parse(text, "g.tspec")
    exc = info.value
    assert len(exc.errors) == MAX_ERRORS and exc.truncated
    assert [e.line for e in exc.errors] == [2 + 3 * i + 3 for i in range(MAX_ERRORS)]
    assert str(exc).endswith(
        f"timespec: stopped after {MAX_ERRORS} mistakes in g.tspec; fix these and run it again"
    )


def test_the_syntax_report_is_bounded_too() -> None:
    text = "".join(f"oneshot p{i}:\n  width {i + 1} ms ±\n" for i in range(MAX_ERRORS + 5))
    with pytest.raises(SpecSyntaxError) as info:
        parse_entries(text, "g.tspec")
    exc = info.value
    assert isinstance(exc, SpecErrors) and exc.truncated
    assert [e.line for e in exc.errors] == [2 * i + 2 for i in range(MAX_ERRORS)]


def test_recovery_keeps_every_good_line_in_place() -> None:
    text = "oneshot a:\n  width 40 ms ±\n  supply 12 V\noneshot b c:\n  width 1 ms\n"
    found = parse_recovering(text, "g.tspec")
    kinds = [
        (
            type(e).__name__,
            getattr(e, "kind", None),
            e.error.line if hasattr(e, "error") else e.pos.line,
        )
        for e in found
    ]
    assert kinds == [
        ("Header", "oneshot", 1),
        ("Broken", "statement", 2),
        ("Statement", None, 3),
        ("Broken", "header", 4),
        ("Statement", None, 5),
    ]


def test_a_failed_include_is_reported_and_later_blocks_still_checked(tmp_path: Path) -> None:
    top = tmp_path / "board.tspec"
    top.write_text(
        'include "missing_defaults.tspec"\n'
        "oneshot vent_pulse:\n  width 40 ms ±10%\n"
        "oneshot door_guard:\n  width 5 ms ±5%\n  colour blue\n",
        encoding="utf-8",
    )
    with pytest.raises(SpecIncludeError) as info:
        timespec.load(top)
    exc = info.value
    assert isinstance(exc, SpecErrors)
    assert [e.line for e in exc.errors] == [1, 6]  # no "has no supply" (it was to come in)


def test_mistakes_in_an_included_file_are_reported_with_its_name(tmp_path: Path) -> None:
    (tmp_path / "common.tspec").write_text("defaults:\n  supply 12 Vq\n", encoding="utf-8")
    top = tmp_path / "board.tspec"
    top.write_text(
        'include "common.tspec"\noneshot vent_pulse:\n  width 40 ms ±10%\n  colour blue\n',
        encoding="utf-8",
    )
    with pytest.raises(SpecError) as info:
        timespec.load(top)
    errors = info.value.errors if isinstance(info.value, SpecErrors) else (info.value,)
    assert [(Path(e.path or "").name, e.line) for e in errors] == [
        ("common.tspec", 2),
        ("board.tspec", 4),
    ]


def test_collect_errors_flattens_and_drops_repeats() -> None:
    a = SpecValueError("a", path="x", line=1, column=1)
    b = SpecValueError("b", path="x", line=2, column=1)
    assert collect_errors([a]) is a
    both = collect_errors([collect_errors([a, b]), a])
    assert isinstance(both, SpecErrors) and both.errors == (a, b)


def test_the_cli_prints_every_mistake_in_the_located_form(tmp_path: Path) -> None:
    spec = tmp_path / "board.tspec"
    spec.write_text(MIXED, encoding="utf-8")
    out, err = io.StringIO(), io.StringIO()
    code = main(["solve", str(spec)], stdout=out, stderr=err)
    assert code == 2
    shown = err.getvalue()
    wanted = [f"{spec}:{e.line}:{e.column}: error: " for e in _errors(MIXED, str(spec))]
    places = [shown.index(w) for w in wanted]
    assert places == sorted(places) and len(wanted) == 5
    assert shown.count(": error: ") == 5


def test_format_check_reports_every_syntax_mistake(tmp_path: Path) -> None:
    spec = tmp_path / "board.tspec"
    spec.write_text("oneshot a:\n  width 40 ms ±\noneshot b c:\n  width 1 ms\n", encoding="utf-8")
    err = io.StringIO()
    code = main(["format", "--check", str(spec)], stdout=io.StringIO(), stderr=err)
    assert code == 2
    lines = [ln for ln in err.getvalue().splitlines() if ": error: " in ln]
    assert [ln.split(": error: ")[0] for ln in lines] == [f"{spec}:2:16", f"{spec}:3:12"]


def _mutate(text: str, r: random.Random) -> str:
    """Break a few lines of a shipped example: swap a word, cut a line, add a stray mark."""
    lines = text.split("\n")
    for _ in range(r.randint(1, 6)):
        i = r.randrange(len(lines))
        ln = lines[i]
        choice = r.randrange(4)
        if choice == 0 and ln:
            lines[i] = ln[: r.randrange(len(ln))]
        elif choice == 1:
            lines[i] = ln + r.choice([" ±", " :", " 3 qs", " ,", " to"])
        elif choice == 2:
            lines[i] = ln.replace(" ", " zz ", 1)
        else:
            lines[i] = r.choice(["oneshot x y:", "  frobnicate 3", "widht 2 ms", "delay:"])
    return "\n".join(lines)


def test_every_reported_mistake_lies_inside_the_input() -> None:
    # The fuzz invariant of tests/test_fuzz.py, for every error of a collection:
    # only SpecError escapes, each located inside the text; and the report is
    # deterministic.
    examples = [p.read_text(encoding="utf-8") for p in sorted((ROOT / "examples").glob("*.tspec"))]
    examples = [t for t in examples if "include" not in t]
    r = random.Random(20261203)
    for case in range(150):
        text = _mutate(r.choice(examples), r)
        try:
            timespec.parse(text, "m.tspec")
        except SpecError as exc:
            errors = exc.errors if isinstance(exc, SpecErrors) else (exc,)
            assert 1 <= len(errors) <= MAX_ERRORS, case
            lines = source_lines(text) or [""]
            for e in errors:
                assert e.line is None or 1 <= e.line <= len(lines) + 1, (case, e)
                if e.line is not None and e.column is not None and e.line <= len(lines):
                    assert 1 <= e.column <= len(lines[e.line - 1]) + 2, (case, e)
            with pytest.raises(SpecError) as again:
                timespec.parse(text, "n.tspec")  # another name: no cached reading
            twice = again.value.errors if isinstance(again.value, SpecErrors) else (again.value,)
            assert [(e.line, e.column, e.message) for e in twice] == [
                (e.line, e.column, e.message) for e in errors
            ], case
