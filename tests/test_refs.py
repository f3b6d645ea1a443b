"""The ``refs`` statement: board reference designators of a block's parts (issue 13 item 4).

Designators follow reference designation as IEEE 315 / ASME Y14.44 describe it: a
class code in capital letters, then a number (``R12``, ``C7``).  That a resistor's class
letter is R and a capacitor's C holds in IEEE 315 and in IEC 81346-2 (``RA``, ``CA``).
"""

from __future__ import annotations

from pathlib import Path

import pytest

import timespec
from timespec.errors import SpecError
from timespec.language.canonical import layout
from timespec.model import Block

BASE = "oneshot relay_hold:\n  width 150 ms ±8%\n  supply 12 V ±5%\n"


def _error(text: str) -> SpecError:
    with pytest.raises(SpecError) as info:
        timespec.parse(text, "board.tspec")
    return info.value


def test_refs_map_parts_to_designators() -> None:
    spec = timespec.parse(
        BASE
        + "  refs R R12, C C7\n"
        + "astable beeper:\n  frequency 2.7 kHz ±12%\n  supply 5 V ±5%\n"
        + "  refs RA R3, RB R4 R5, C C2\n"
        + "crystal clock:\n  frequency 12 MHz\n  load 8 pF\n  shunt 1.5 pF\n"
        + "  motional 4 fF\n  esr 60 ohm max\n  refs C1 C14, C2 C15\n"
    )
    assert spec.block("relay_hold").refs == {"R": ("R12",), "C": ("C7",)}
    # a second designator names the second part of a series/parallel pair
    assert spec.block("beeper").refs == {"RA": ("R3",), "RB": ("R4", "R5"), "C": ("C2",)}
    assert spec.block("clock").refs == {"C1": ("C14",), "C2": ("C15",)}


def test_block_without_refs_has_none() -> None:
    assert timespec.parse(BASE).blocks[0].refs == {}


def test_refs_in_the_one_line_form() -> None:
    spec = timespec.parse("oneshot kick: width 2 ms ±10% at supply 5 V ±5%; refs R R1, C C1\n")
    assert spec.blocks[0].refs == {"R": ("R1",), "C": ("C1",)}


def test_refs_round_trip_through_format() -> None:
    text = BASE + "  refs   R R12 ,C   C7  # board rev B\n"
    out = layout(text)
    assert "  refs R R12, C C7  # board rev B\n" in out
    assert layout(out) == out
    assert timespec.parse(out).blocks[0].refs == timespec.parse(text).blocks[0].refs


def test_unknown_part_lists_the_circuit_parts() -> None:
    err = _error(BASE + "  refs RA R12\n")
    assert str(err) == (
        "board.tspec:4:8: error: a oneshot circuit has no part 'RA'\n"
        "      refs RA R12\n"
        "           ^\n"
        "  hint: its parts are R, C"
    )
    err = _error(
        "crystal clock:\n  frequency 12 MHz\n  load 8 pF\n  shunt 1.5 pF\n"
        "  motional 4 fF\n  esr 60 ohm max\n  refs C C14\n"
    )
    assert "a crystal circuit has no part 'C'" in str(err)
    assert err.hint == "its parts are C1, C2"


def test_a_designator_names_one_part_across_blocks() -> None:
    text = (
        BASE
        + "  refs R R12, C C7\n"
        + "oneshot fan_kick:\n  width 2 ms ±10%\n  supply 12 V ±5%\n  refs R R13, C C7\n"
    )
    err = _error(text)
    assert str(err) == (
        "board.tspec:8:17: error: designator C7 is already given to relay_hold.C (line 4)\n"
        "      refs R R13, C C7\n"
        "                    ^\n"
        "  hint: each designator names one part on the board; give this part its own number"
    )


def test_duplicate_across_an_included_file_names_the_file(tmp_path: Path) -> None:
    (tmp_path / "fan.tspec").write_text(
        "oneshot fan_kick:\n  width 2 ms ±10%\n  supply 12 V ±5%\n  refs R R12\n",
        encoding="utf-8",
    )
    top = tmp_path / "board.tspec"
    top.write_text(BASE + '  refs R R12\ninclude "fan.tspec"\n', encoding="utf-8")
    with pytest.raises(SpecError) as info:
        timespec.load(top)
    err = info.value
    assert err.line == 4 and err.path is not None and err.path.endswith("fan.tspec")
    assert "designator R12 is already given to relay_hold.R" in str(err)
    assert "board.tspec:4)" in str(err)


@pytest.mark.parametrize(
    ("line", "message", "hint"),
    [
        (
            "refs R r12",
            "'r12' is not a reference designator",
            "write it in capitals: R12",
        ),
        (
            "refs R R0",
            "'R0' is not a reference designator",
            "a designator is a class code in capital letters, then a number from 1 "
            "(IEEE 315 reference designation), e.g. R12 or C7",
        ),
        (
            "refs R 12",
            "a plain number is not a reference designator",
            "a designator is a class code in capital letters, then a number from 1 "
            "(IEEE 315 reference designation), e.g. R12 or C7",
        ),
        (
            "refs R R12Ω",
            "a resistance (Ω) is not a reference designator",
            "a designator is a class code in capital letters, then a number from 1 "
            "(IEEE 315 reference designation), e.g. R12 or C7",
        ),
        (
            "refs R C12",
            "R is a resistor, but its designator C12 does not start with R",
            "a resistor's designator starts with R, e.g. R12",
        ),
        (
            "refs C R7",
            "C is a capacitor, but its designator R7 does not start with C",
            "a capacitor's designator starts with C, e.g. C7",
        ),
        ("refs R", "part R needs its board designator after it", "write it like: refs R R1"),
        (
            "refs R R1 R2 R3",
            "part R takes one designator (two when it is a pair)",
            "separate parts with commas, e.g. refs R R12, C C7",
        ),
        (
            "refs 4k7 R1",
            "each item starts with the part's reference in the circuit, e.g. R or C1",
            "write it like: refs R R12, C C7",
        ),
        ("refs R R12, R R13", "part R is given twice", None),
        ("refs R R12 R12", "R12 is given twice for part R", None),
        (
            "refs",
            "'refs' needs at least one part and its designator",
            "write it like: refs R R12, C C7",
        ),
    ],
)
def test_refs_mistakes_are_located(line: str, message: str, hint: str | None) -> None:
    err = _error(BASE + f"  {line}\n")
    assert err.line == 4
    assert err.message == message
    assert err.hint == hint


def test_refs_positions_point_at_the_designator() -> None:
    err = _error(BASE + "  refs R R12, C c7\n")
    assert (err.line, err.column) == (4, 17)


def test_refs_do_not_belong_in_defaults() -> None:
    err = _error("defaults:\n  refs R R1\n" + BASE)
    assert err.message == "'refs' does not belong in defaults"
    assert err.hint == "it is used in astable, crystal, delay, oneshot, relaxation blocks"


def test_refs_given_twice_in_a_block() -> None:
    err = _error(BASE + "  refs R R12\n  refs C C7\n")
    assert err.message == "'refs' is given twice in a oneshot block (first at line 4)"


def test_model_checks_designators() -> None:
    block = timespec.parse(BASE).blocks[0]
    fields = {f: getattr(block, f) for f in block.__dataclass_fields__}
    with pytest.raises(ValueError, match="not a reference designator"):
        Block(**{**fields, "refs": {"R": ("r1",)}})
    with pytest.raises(ValueError, match="one designator"):
        Block(**{**fields, "refs": {"R": ("R1", "R2", "R3")}})


def test_lexer_reads_refs_as_a_statement() -> None:
    pytest.importorskip("pygments")
    from pygments.token import Error, Keyword

    from timespec.outputs.highlight import TimespecLexer

    tokens = list(TimespecLexer().get_tokens(BASE + "  refs R R12, C C7\n"))
    assert (Keyword, "refs") in tokens
    assert not [t for t in tokens if t[0] is Error]
