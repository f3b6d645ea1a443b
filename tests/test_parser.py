"""Spec language: parsing, units, tolerances, and every error path with its exact text."""

from __future__ import annotations

import math
import pickle
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import timespec
from timespec.errors import (
    SpecError,
    SpecIncludeError,
    SpecSyntaxError,
    SpecUnitError,
    SpecValueError,
)

BASE = "defaults:\n  supply 12 V ±5%\n"


def one(text: str) -> timespec.Spec:
    return timespec.parse(text, "t.tspec")


def error_text(text: str) -> str:
    with pytest.raises(SpecError) as info:
        timespec.parse(text, "t.tspec")
    return str(info.value)


# ---------------------------------------------------------------- values


def test_block_and_one_line_forms_agree() -> None:
    a = one("oneshot r:\n  width 150 ms ±8%\n  supply 12 V ±5%\n")
    b = one("oneshot r: width 150 ms ±8% at supply 12 V ±5%")
    assert a.blocks[0] == b.blocks[0]


def test_quantities_with_si_prefixes_and_ascii_alternatives() -> None:
    spec = one(
        "oneshot r:\n  width 150ms +-8%\n  supply 12 V +/-5%\n"
        "  ambient -10 °C to 60 degC\n  resistors E24 1% 100 ppm/K, 4.7 kΩ to 1 Mohm\n"
        "  capacitors E6 10% X7R, 1 nF to 2.2 µF\n"
    )
    b = spec.blocks[0]
    w = b.requirement("width")
    assert w is not None
    assert w.window.low == pytest.approx(0.138) and w.window.high == pytest.approx(0.162)
    assert b.conditions.supply.low == pytest.approx(11.4)
    assert (b.conditions.ambient_low, b.conditions.ambient_high) == (-10.0, 60.0)
    assert b.resistors.low == pytest.approx(4700.0) and b.resistors.high == pytest.approx(1e6)
    assert b.resistors.tempco_ppm == 100.0
    assert b.capacitors.high == pytest.approx(2.2e-6)
    assert b.capacitors.dielectric == "X7R"


@pytest.mark.parametrize(
    ("code", "value", "kind"),
    [
        # IEC 60062 RKM codes: the letter stands for the decimal point.
        ("4k7", 4700.0, "resistance"),
        ("2R2", 2.2, "resistance"),
        ("R47", 0.47, "resistance"),
        ("1M", 1e6, "resistance"),
        ("10n", 10e-9, "capacitance"),
        ("4n7", 4.7e-9, "capacitance"),
        ("1u0", 1e-6, "capacitance"),
        ("4.7k", 4700.0, "resistance"),  # everyday decimal form, common practice
    ],
)
def test_rkm_codes_in_pinned_parts(code: str, value: float, kind: str) -> None:
    ref = "R" if kind == "resistance" else "C"
    other = "C 1u" if ref == "R" else "R 10k"
    spec = one(BASE + f"oneshot r:\n  width 1 s ±50%\n  use {ref} {code}, {other}\n")
    part = spec.blocks[0].pinned_part(ref)
    assert part is not None
    assert part.value == pytest.approx(value, rel=1e-12)
    assert part.kind == kind


def test_asymmetric_absolute_and_bounds() -> None:
    b = one(BASE + "oneshot r: width 40 ms +10% -5%").blocks[0]
    w = b.requirement("width")
    assert w is not None
    assert (w.window.low, w.window.high) == pytest.approx((0.038, 0.044))
    b = one(BASE + "oneshot r: width 40 ms ±2 ms").blocks[0]
    w = b.requirement("width")
    assert w is not None
    assert (w.window.low, w.window.high) == pytest.approx((0.038, 0.042))
    b = one(BASE + "delay d:\n  delay 20 ms min\n  threshold 0.5 to 0.7 of supply\n").blocks[0]
    w = b.requirement("delay")
    assert w is not None
    assert w.window.low == pytest.approx(0.02) and math.isinf(w.window.high)


def test_duty_tolerance_is_in_percentage_points() -> None:
    b = one(BASE + "astable a:\n  frequency 4 Hz ±10%\n  duty 30% ±5%\n").blocks[0]
    d = b.requirement("duty")
    assert d is not None
    assert (d.window.low, d.window.high) == pytest.approx((0.25, 0.35))


def test_defaults_merge_field_by_field() -> None:
    spec = one(
        "defaults:\n  supply 12 V ±5%\n  resistors E96 1% 50 ppm/K, 1k to 1M\n"
        "oneshot a:\n  width 1 ms ±10%\n  resistors E24\n"
    )
    r = spec.blocks[0].resistors
    assert (r.series, r.tolerance, r.tempco_ppm, r.low, r.high) == ("E24", 0.01, 50.0, 1e3, 1e6)


def test_comments_blank_lines_and_indentation_are_free() -> None:
    spec = one(
        "# header comment\n\n   oneshot a:   # trailing\n"
        "width 1 ms ±10%   # inline\n\n\n      supply 5 V\n"
    )
    assert spec.blocks[0].name == "a"


def test_timer_class_and_overrides() -> None:
    b = one(BASE + "oneshot a: width 1 ms ±10%; timer cmos, initial ±2%, drift ±100 ppm/K").blocks[
        0
    ]
    assert b.timer is not None
    assert (b.timer.name, b.timer.initial, b.timer.drift_ppm) == ("cmos", 0.02, 100.0)


def test_model_is_frozen() -> None:
    b = one(BASE + "oneshot a: width 1 ms ±10%").blocks[0]
    with pytest.raises(AttributeError):
        b.name = "other"  # type: ignore[misc]


def test_include_relative_and_inside_root(tmp_path: pytest.TempPathFactory) -> None:
    root = tmp_path  # type: ignore[assignment]
    (root / "common").mkdir()  # type: ignore[operator]
    (root / "common" / "rails.tspec").write_text("defaults:\n  supply 5 V ±5%\n")  # type: ignore[operator]
    main = root / "board.tspec"  # type: ignore[operator]
    main.write_text('include "common/rails.tspec"\noneshot a: width 1 ms ±10%\n')
    spec = timespec.load(main)
    assert spec.blocks[0].conditions.supply.centre == pytest.approx(5.0)


def test_include_outside_root_is_refused(tmp_path: pytest.TempPathFactory) -> None:
    inner = tmp_path / "proj"  # type: ignore[operator]
    inner.mkdir()
    (tmp_path / "evil.tspec").write_text("defaults:\n  supply 5 V\n")  # type: ignore[operator]
    main = inner / "board.tspec"
    main.write_text('include "../evil.tspec"\noneshot a: width 1 ms ±10% at supply 5 V\n')
    with pytest.raises(SpecIncludeError) as info:
        timespec.load(main)
    assert "lies outside the spec's folder" in str(info.value)
    assert ":1:9:" in str(info.value)


def test_include_cycle_is_refused(tmp_path: pytest.TempPathFactory) -> None:
    a = tmp_path / "a.tspec"  # type: ignore[operator]
    a.write_text('include "a.tspec"\n')
    with pytest.raises(SpecIncludeError, match="includes itself"):
        timespec.load(a)


def test_missing_file_is_a_spec_error(tmp_path: pytest.TempPathFactory) -> None:
    with pytest.raises(SpecIncludeError, match="no such spec file"):
        timespec.load(tmp_path / "nope.tspec")  # type: ignore[operator]


# ---------------------------------------------------------------- errors, exact text

ERRORS = [
    (
        "oneshot a:\n  widht 150 ms ±8%\n  supply 12 V\n",
        SpecValueError,
        "t.tspec:2:3: error: unknown statement 'widht' in a oneshot block\n"
        "      widht 150 ms ±8%\n"
        "      ^\n"
        "  hint: did you mean 'width'?",
    ),
    (
        "oneshto a:\n  width 150 ms ±8%\n",
        SpecValueError,
        "t.tspec:1:1: error: unknown block kind 'oneshto'\n"
        "    oneshto a:\n"
        "    ^\n"
        "  hint: did you mean 'oneshot'?",
    ),
    (
        "oneshot a: width 150 Hz ±8% at supply 12 V",
        SpecUnitError,
        "t.tspec:1:18: error: 'width' needs a time (s), but '150 Hz' is a frequency (Hz)\n"
        "    oneshot a: width 150 Hz ±8% at supply 12 V\n"
        "                     ^\n"
        "  hint: write it like: width 150 ms ±8%",
    ),
    (
        "oneshot a: width 150 mss ±8% at supply 12 V",
        SpecUnitError,
        "t.tspec:1:22: error: unknown unit 'mss'; did you mean 'ms' or 's'?\n"
        "    oneshot a: width 150 mss ±8% at supply 12 V\n"
        "                         ^",
    ),
    (
        "oneshot a: width 150 ms ± at supply 12 V",
        SpecSyntaxError,
        "t.tspec:1:27: error: unexpected 'at'; expected '-', a number or a value such as 4k7\n"
        "    oneshot a: width 150 ms ± at supply 12 V\n"
        "                              ^\n"
        "  hint: a tolerance needs a size after ±, e.g. ±5% or ±2 ms",
    ),
    (
        "oneshot a: width 160 ms to 140 ms at supply 12 V",
        SpecValueError,
        "t.tspec:1:18: error: the range is inverted: 160 ms is above 140 ms\n"
        "    oneshot a: width 160 ms to 140 ms at supply 12 V\n"
        "                     ^\n"
        "  hint: write the lower end first",
    ),
    (
        "oneshot a: width 150 ms ±8%",
        SpecValueError,
        "t.tspec:1:1: error: block 'a' has no supply voltage\n"
        "    oneshot a: width 150 ms ±8%\n"
        "    ^\n"
        "  hint: add 'supply 12 V ±5%' to the block or to a defaults: section",
    ),
    (
        "oneshot a: width 150 ms ±8% at supply 18 V",
        SpecValueError,
        "t.tspec:1:32: error: the supply 18…18 V lies outside the bipolar timer class's "
        "range 4.5…16 V\n"
        "    oneshot a: width 150 ms ±8% at supply 18 V\n"
        "                                   ^\n"
        # no class takes 18 V (the old hint pointed at 'timer cmos', which stops at 15 V)
        "  hint: no timer class takes this supply (bipolar 4.5…16 V, cmos 2…15 V): "
        "change the supply",
    ),
    (
        "oneshot a:\n  width 150 ms ±8%\n  duty 30% ±5%\n  supply 12 V\n",
        SpecValueError,
        "t.tspec:3:3: error: 'duty' does not belong in a oneshot block\n"
        "      duty 30% ±5%\n"
        "      ^\n"
        "  hint: it is used in astable blocks",
    ),
    (
        "oneshot a:\n  width: 150 ms ±8%\n",
        SpecSyntaxError,
        "t.tspec:2:10: error: unexpected '150'; expected a word or the end of the line\n"
        "      width: 150 ms ±8%\n"
        "             ^\n"
        "  hint: statements take no ':'; write it like: width 150 ms ±8%",
    ),
    (
        "oneshot a: width 150 ms at supply 12 V",
        SpecValueError,
        "t.tspec:1:18: error: 'width' needs a tolerance or a range, not an exact value\n"
        "    oneshot a: width 150 ms at supply 12 V\n"
        "                     ^\n"
        "  hint: write it like: width 150 ms ±8%",
    ),
    (
        "oneshot a:\n  width 150 ms ±8%\n  supply 12 V\n  use RA 4k7, C 1u\n",
        SpecValueError,
        "t.tspec:4:7: error: a oneshot circuit has no part 'RA'\n"
        "      use RA 4k7, C 1u\n"
        "          ^\n"
        "  hint: its parts are R, C",
    ),
    (
        "oneshot a:\n  width 150 ms ±8%\n  width 10 ms ±1%\n  supply 12 V\n",
        SpecValueError,
        "t.tspec:3:3: error: 'width' is given twice in a oneshot block (first at line 2)\n"
        "      width 10 ms ±1%\n"
        "      ^\n"
        "  hint: keep one of them",
    ),
    (
        "width 150 ms ±8%\n",
        SpecValueError,
        "t.tspec:1:1: error: statement 'width' stands outside any block\n"
        "    width 150 ms ±8%\n"
        "    ^\n"
        "  hint: start a block first, e.g. 'oneshot relay_hold:' or 'defaults:'",
    ),
    (
        "oneshot a:\n  width 150 ms ±8%\n  supply 12 V\n  resistors E97\n",
        SpecValueError,
        "t.tspec:4:13: error: unknown word 'E97' in a resistor policy\n"
        "      resistors E97\n"
        "                ^\n"
        "  hint: did you mean 'E96'?",
    ),
    (
        "oneshot a:\n  width 150 ms ±8%\n  supply 12 V\n  use R 4.7 k, C 1u\n",
        SpecUnitError,
        "t.tspec:4:13: error: 'k' on its own is not a unit\n"
        "      use R 4.7 k, C 1u\n"
        "                ^\n"
        "  hint: write the value as an RKM code without spaces (4.7k) or with a full unit "
        "('4.7 kohm')",
    ),
    (
        "oneshot a: width 150 ms ±8% at supply 12 V; timer cmoss",
        SpecValueError,
        "t.tspec:1:51: error: unknown timer class 'cmoss'\n"
        "    oneshot a: width 150 ms ±8% at supply 12 V; timer cmoss\n"
        "                                                      ^\n"
        "  hint: did you mean 'cmos'?",
    ),
    (
        "",
        SpecValueError,
        "t.tspec:1:1: error: the spec has no blocks\n"
        "  hint: add a block, e.g. 'oneshot relay_hold: width 150 ms ±8% at supply 12 V ±5%'",
    ),
]


@pytest.mark.parametrize(("text", "cls", "message"), ERRORS)
def test_error_messages_exact(text: str, cls: type[SpecError], message: str) -> None:
    with pytest.raises(cls) as info:
        timespec.parse(text, "t.tspec")
    assert str(info.value) == message


def test_errors_are_value_errors_and_picklable() -> None:
    with pytest.raises(ValueError) as info:
        timespec.parse("oneshto a:\n", "t.tspec")
    err = info.value
    assert isinstance(err, SpecError)
    again = pickle.loads(pickle.dumps(err))
    assert type(again) is type(err)
    assert str(again) == str(err)
    assert (again.line, again.column, again.hint) == (1, 1, "did you mean 'oneshot'?")


# ---------------------------------------------------------------- fuzz


ALPHABET = st.sampled_from(
    [
        *'abcdefghijklmnopqrstuvwxyz0123456789 \n\t:;,.+-±%#"/µΩ°',
        *["oneshot ", "width ", "ms", " to ", "supply ", "V", "use ", "R ", "4k7", "±5%", "\n  "],
    ]
)


@settings(max_examples=300, deadline=None)
@given(st.lists(ALPHABET, max_size=40).map("".join))
def test_parser_never_raises_anything_but_spec_error(text: str) -> None:
    # Design rule of the project: user text can only produce SpecError.
    try:
        timespec.parse(text)
    except SpecError as err:
        assert str(err)


@settings(max_examples=60, deadline=None)
@given(
    width=st.floats(1e-6, 100.0, allow_nan=False),
    tol=st.integers(1, 50),
    supply=st.floats(5.0, 15.0),
)
def test_parsed_window_matches_written_numbers(width: float, tol: int, supply: float) -> None:
    text = f"oneshot a: width {width!r} s ±{tol}% at supply {supply!r} V"
    w = timespec.parse(text).blocks[0].requirement("width")
    assert w is not None
    assert w.window.low == pytest.approx(width * (1 - tol / 100), rel=1e-12)
    assert w.window.high == pytest.approx(width * (1 + tol / 100), rel=1e-12)


def test_missing_comma_between_pinned_parts_is_explained() -> None:
    # Regression: "use R 4k7 C 10u" used to say "unknown word 'C' in a resistor policy".
    text = "oneshot a:\n  width 150 ms ±8%\n  supply 12 V\n  use R 4k7 C 10u\n"
    assert error_text(text) == (
        "t.tspec:4:13: error: 'C' looks like the next part, but no comma stands before it\n"
        "      use R 4k7 C 10u\n"
        "                ^\n"
        "  hint: separate pinned parts with commas, e.g. use R 4k7, C 10u"
    )


def test_spread_normal_sigma_words() -> None:
    # Regression: "sigma" used to be read as a unit (pint knows a constant of that name).
    b = one(BASE + "oneshot a: width 1 ms ±10%; spread normal 3 sigma").blocks[0]
    assert (b.statistics.distribution, b.statistics.sigmas) == ("normal", 3.0)


def test_odd_unit_products_are_spec_errors() -> None:
    # Regression (found by mutation fuzzing): pint raised its own DimensionalityError
    # for "%degC" instead of our error.
    with pytest.raises(SpecUnitError, match="mixes units"):
        one(BASE + "oneshot a: width 1 ms ±10%; ambient 0 %degC to 50 degC")


_DEMO = (Path(__file__).resolve().parent.parent / "examples" / "bench_instrument.tspec").read_text(
    encoding="utf-8"
)


@settings(max_examples=300)
@given(
    edits=st.lists(
        st.tuples(
            st.integers(0, len(_DEMO) - 1),
            st.sampled_from(["replace", "delete", "insert"]),
            st.sampled_from([*'0123456789 .,:;+-±%kKmMnuµpRCE\n#"', "to", "of"]),
        ),
        min_size=1,
        max_size=4,
    )
)
def test_mutated_demo_gives_a_spec_or_our_error(edits: list[tuple[int, str, str]]) -> None:
    # Mutation fuzzing of a real spec: whatever the damage, only SpecError may come out.
    text = list(_DEMO)
    for where, how, char in edits:
        where = min(where, len(text) - 1)
        if how == "replace":
            text[where] = char
        elif how == "delete":
            del text[where]
        else:
            text.insert(where, char)
    try:
        timespec.parse("".join(text))
    except SpecError as err:
        assert str(err)
