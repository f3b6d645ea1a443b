"""The timespec-table directive never publishes a failing design as if it held.

A block that fails or is infeasible gets a note above the table and a Sphinx
warning at the directive's line (so ``sphinx-build -W`` fails), unless the
directive's ``:allow-failing:`` option says the failure is intended.  Each test
builds a one-page Sphinx project in ``tmp_path`` with Sphinx's own command-line
entry point, run in this process to stay fast.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

pytest.importorskip("sphinx")

from sphinx.cmd.build import build_main

from timespec.design.solver import solve_block
from timespec.language.assemble import parse
from timespec.numbers import format_interval

# An invented bench-controller board: a relay hold that meets, the previous
# board revision's pinned parts, and a window no stocked part could hold.
SPEC = """\
oneshot relay_hold: width 15 ms ±12% at supply 12 V ±5%

oneshot old_hold:
  width 15 ms ±2%
  supply 12 V ±5%
  use R 150k 5%, C 100n 10%

oneshot tight_hold:
  width 15 ms ±0.1%
  supply 12 V ±5%
"""

NOTE = "Not every block meets its requirements"
# The directive stands on this line of every test page (after a title and a paragraph).
DIRECTIVE_LINE = 6


def _build(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], options: str
) -> tuple[int, str, str]:
    """Build a page holding one timespec-table; return exit code, warnings, page text."""
    src = tmp_path / "src"
    src.mkdir()
    (src / "conf.py").write_text('extensions = ["timespec.sphinxext"]\n', encoding="utf-8")
    (src / "board.tspec").write_text(SPEC, encoding="utf-8")
    page = "Bench\n=====\n\nThe relay timing.\n\n.. timespec-table:: board.tspec\n" + options
    (src / "index.rst").write_text(page, encoding="utf-8")
    out = tmp_path / "out"
    # the text builder: the same doctree as HTML, without the theme's files to copy;
    # with -q only warnings reach stderr
    capsys.readouterr()
    code = build_main(["-W", "--keep-going", "-q", "-E", "-b", "text", str(src), str(out)])
    warnings = capsys.readouterr().err
    # the text builder writes ``literal`` as "literal": drop the quotes, join the lines
    text = (out / "index.txt").read_text(encoding="utf-8").replace('"', "")
    return code, warnings, " ".join(text.split())


def _worst(block: str) -> str:
    """The worst-case width the solver computes for a block, as the note writes it."""
    best = solve_block(parse(SPEC).block(block)).best
    assert best is not None
    width = best.output("width")
    return format_interval(width.low, width.high, width.kind)


def test_the_pinned_design_really_fails() -> None:
    # The 555-type monostable's width is R·C·ln 3 ≈ 1.1·R·C: the capacitor charges
    # from 0 to 2/3 of the supply (the formula of the generic timer datasheets).
    # With the pinned 150 kΩ and 100 nF it is 16.48 ms at nominal, already outside
    # 15 ms ±2 % (14.7 ms to 15.3 ms): the block must fail whatever tolerances add.
    nominal = 150e3 * 100e-9 * math.log(3)
    assert nominal > 15e-3 * 1.02
    # The width is proportional to R, so the default resistors' own ±1 % (E96,
    # the default policy) already spreads it past ±0.1 %: no allowed design holds.
    spec = parse(SPEC)
    assert spec.block("tight_hold").resistors.tolerance > 0.001
    assert solve_block(spec.block("old_hold")).verdict == "fails"
    assert solve_block(spec.block("tight_hold")).verdict == "infeasible"


def test_a_failing_block_is_a_warning_at_the_directive_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    code, warnings, text = _build(tmp_path, capsys, "   :blocks: relay_hold, old_hold\n")
    assert code != 0
    head = f"index.rst:{DIRECTIVE_LINE}: WARNING: board.tspec: block 'old_hold' fails at worst case"
    assert head in warnings, warnings
    assert f"width worst case {_worst('old_hold')}" in warnings
    assert "required 15 ms ±2 % (14.7 ms … 15.3 ms)" in warnings
    assert ":allow-failing: old_hold" in warnings
    assert "'relay_hold'" not in warnings  # the block that meets is not warned about
    assert warnings.count("WARNING") == 1
    # the page says so too, above the table
    assert NOTE in text
    assert "old_hold fails at worst case (its parts are pinned): width worst case" in text
    assert _worst("old_hold") in text
    assert text.index(NOTE) < text.index("Verdict")
    assert "below the low limit" in text and "above the high limit" in text


def test_an_infeasible_block_is_a_warning_and_a_note(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    code, warnings, text = _build(tmp_path, capsys, "   :blocks: tight_hold\n")
    assert code != 0
    head = f"index.rst:{DIRECTIVE_LINE}: WARNING: board.tspec: block 'tight_hold' is infeasible"
    assert head in warnings, warnings
    assert "required 15 ms ±0.1 %" in warnings
    assert NOTE in text and "tight_hold is infeasible" in text
    assert _worst("tight_hold") in text


def test_allow_failing_keeps_the_note_and_drops_the_warning(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    code, warnings, text = _build(
        tmp_path, capsys, "   :blocks: relay_hold, old_hold\n   :allow-failing: old_hold\n"
    )
    assert code == 0, warnings
    assert warnings == ""
    assert NOTE in text and "old_hold fails at worst case" in text


def test_allow_failing_without_names_covers_every_block(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    code, warnings, text = _build(
        tmp_path, capsys, "   :blocks: old_hold, tight_hold\n   :allow-failing:\n"
    )
    assert code == 0, warnings
    assert "old_hold fails" in text and "tight_hold is infeasible" in text


def test_allowing_only_one_block_still_warns_about_the_other(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    code, warnings, _ = _build(tmp_path, capsys, "   :allow-failing: old_hold\n")
    assert code != 0
    assert "block 'tight_hold' is infeasible" in warnings
    assert "block 'old_hold'" not in warnings


@pytest.mark.parametrize(
    ("options", "named"),
    [
        (
            "   :blocks: relay_hold, old_hold\n   :allow-failing: old_hold, relay_hold\n",
            "names 'relay_hold', which is not a failing block",
        ),
        (
            "   :blocks: old_hold\n   :allow-failing: old_hold, old_hlod, relay_hold\n",
            "names 'old_hlod', 'relay_hold', which are not failing blocks",
        ),
        ("   :blocks: relay_hold\n   :allow-failing:\n", "is given, but no block"),
    ],
)
def test_a_stale_allowance_is_warned_about(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], options: str, named: str
) -> None:
    code, warnings, _ = _build(tmp_path, capsys, options)
    assert code != 0
    assert f"':allow-failing:' {named}" in warnings, warnings
    assert "remove the allowance" in warnings
    assert "fails at worst case" not in warnings


def test_a_table_that_meets_has_no_note(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, warnings, text = _build(tmp_path, capsys, "   :blocks: relay_hold\n")
    assert code == 0, warnings
    assert NOTE not in text and "relay_hold" in text
