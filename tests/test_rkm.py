"""Tests for timespec.parts.rkm: IEC 60062 RKM codes and tolerance letters."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from timespec.parts.rkm import (
    TOLERANCE_LETTERS,
    format_rkm,
    looks_like_rkm,
    parse_rkm,
    tolerance_from_letter,
)

# Source for every code in this table: IEC 60062:2016, RKM code (the letter takes the place of
# the decimal point; R, K, M, G, T for resistance, p, n, u/µ, m for capacitance).
PARSE_TABLE = [
    ("4k7", 4700.0, "resistance"),
    ("4K7", 4700.0, "resistance"),
    ("2R2", 2.2, "resistance"),
    ("R47", 0.47, "resistance"),
    ("4R7", 4.7, "resistance"),
    ("4M7", 4.7e6, "resistance"),
    ("1k", 1000.0, "resistance"),
    ("10K", 10e3, "resistance"),
    ("100R", 100.0, "resistance"),
    ("47k", 47e3, "resistance"),
    ("1G5", 1.5e9, "resistance"),
    ("2T", 2e12, "resistance"),
    ("0R", 0.0, "resistance"),
    ("4n7", 4.7e-9, "capacitance"),
    ("10p", 10e-12, "capacitance"),
    ("1u0", 1e-6, "capacitance"),
    ("100n", 100e-9, "capacitance"),
    ("10n", 10e-9, "capacitance"),
    ("p47", 0.47e-12, "capacitance"),
    ("2\u00b52", 2.2e-6, "capacitance"),  # MICRO SIGN
    ("2\u03bc2", 2.2e-6, "capacitance"),  # GREEK SMALL LETTER MU
    ("2u2", 2.2e-6, "capacitance"),
    ("1m5", 1.5e-3, "capacitance"),  # lower-case m: millifarad, not mega-ohm
    ("4.7k", 4700.0, "resistance"),  # everyday decimal form, letter last
    (" 4k7 ", 4700.0, "resistance"),
]


@pytest.mark.parametrize(("text", "value", "dimension"), PARSE_TABLE)
def test_parse_rkm_table(text: str, value: float, dimension: str) -> None:
    got_value, got_dimension = parse_rkm(text)
    assert got_value == value  # exact: correctly rounded decimal conversion
    assert got_dimension == dimension
    assert looks_like_rkm(text)


def test_case_of_m_matters() -> None:
    # Source: IEC 60062:2016, M is the mega multiplier for resistance; m is milli for
    # capacitance (millifarad).
    assert parse_rkm("4M7") == (4.7e6, "resistance")
    assert parse_rkm("4m7") == (4.7e-3, "capacitance")


@pytest.mark.parametrize(
    ("text", "reason"),
    [
        ("4k7k", "only one multiplier letter"),
        ("k", "no digits"),
        ("4.7k7", "decimal point"),
        ("", "empty"),
        ("   ", "empty"),
        ("4.k", "decimal point"),
        (".5k", "decimal point"),
        ("4N7", "lower case"),
        ("4K7F", "'F' is not a multiplier letter"),
        ("47", "multiplier letter is missing"),
        ("4 k7", "unexpected character ' '"),
        ("4k-7", "unexpected character '-'"),
    ],
)
def test_parse_rkm_rejects(text: str, reason: str) -> None:
    with pytest.raises(ValueError, match=reason) as info:
        parse_rkm(text)
    assert "expected an RKM code" in str(info.value)


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("4k7k", True),  # malformed but meant as a code: parse_rkm reports the problem
        ("4.7k7", True),
        ("10ms", False),
        ("5V", False),
        ("kohm", False),
        ("k", False),
        ("1e3", False),
        ("12", False),
        ("", False),
    ],
)
def test_looks_like_rkm(text: str, expected: bool) -> None:
    assert looks_like_rkm(text) is expected


# Source: IEC 60062:2016 RKM code; examples of the required output.
FORMAT_TABLE = [
    (4700.0, "resistance", "4k7"),
    (150000.0, "resistance", "150k"),
    (1e6, "resistance", "1M"),
    (2.2, "resistance", "2R2"),
    (0.47, "resistance", "R47"),
    (0.047, "resistance", "R047"),
    (100.0, "resistance", "100R"),
    (1e3, "resistance", "1k"),
    (4.7e-9, "capacitance", "4n7"),
    (1e-7, "capacitance", "100n"),
    (1e-6, "capacitance", "1u"),
    (10e-12, "capacitance", "10p"),
    (1.5e-6, "capacitance", "1u5"),
    (0.47e-12, "capacitance", "p47"),
    (2.2e-3, "capacitance", "2m2"),
    (0.0, "resistance", "0R"),
]


@pytest.mark.parametrize(("value", "dimension", "text"), FORMAT_TABLE)
def test_format_rkm_table(value: float, dimension: str, text: str) -> None:
    assert format_rkm(value, dimension) == text


def test_format_rounds_to_significant_digits() -> None:
    assert format_rkm(4712.0, "resistance") == "4k71"
    assert format_rkm(4712.0, "resistance", digits=2) == "4k7"
    assert format_rkm(999.6, "resistance") == "1k"  # rounding moves to the next multiplier
    assert format_rkm(4.7 * 1e-9, "capacitance") == "4n7"


@pytest.mark.parametrize(
    ("value", "dimension", "digits"),
    [
        (-1.0, "resistance", 3),
        (math.nan, "resistance", 3),
        (math.inf, "capacitance", 3),
        (1.0, "inductance", 3),
        (1.0, "resistance", 0),
        (1.0, "resistance", 16),
    ],
)
def test_format_rkm_rejects(value: float, dimension: str, digits: int) -> None:
    with pytest.raises(ValueError):
        format_rkm(value, dimension, digits)


@given(
    mantissa=st.integers(1, 999),
    exponent=st.integers(-3, 12),
)
def test_round_trip_resistance(mantissa: int, exponent: int) -> None:
    # Property: parse(format(x)) == x for any value of at most three significant figures.
    x = float(f"{mantissa}e{exponent - 2}")
    assert parse_rkm(format_rkm(x, "resistance")) == (x, "resistance")


@given(
    mantissa=st.integers(1, 999),
    exponent=st.integers(-15, 0),
)
def test_round_trip_capacitance(mantissa: int, exponent: int) -> None:
    x = float(f"{mantissa}e{exponent - 2}")
    assert parse_rkm(format_rkm(x, "capacitance")) == (x, "capacitance")


@given(st.text(max_size=8))
def test_parse_raises_only_value_error(text: str) -> None:
    # The parser above us relies on ValueError being the only failure mode.
    try:
        value, dimension = parse_rkm(text)
    except ValueError:
        return
    assert math.isfinite(value) and value >= 0.0
    assert dimension in ("resistance", "capacitance")
    assert looks_like_rkm(text)


# ----- tolerance letters -----------------------------------------------------------------------


def test_tolerance_letters_table() -> None:
    # Source: IEC 60062:2016, tolerance code letters.
    expected = {
        "B": 0.001,
        "C": 0.0025,
        "D": 0.005,
        "F": 0.01,
        "G": 0.02,
        "J": 0.05,
        "K": 0.10,
        "M": 0.20,
    }
    for letter, t in expected.items():
        assert TOLERANCE_LETTERS[letter] == (-t, t)
        assert tolerance_from_letter(letter) == (-t, t)
        assert tolerance_from_letter(letter.lower()) == (-t, t)
    assert TOLERANCE_LETTERS["Z"] == (-0.20, 0.80)  # IEC 60062: Z is +80 % / -20 %
    assert set(TOLERANCE_LETTERS) == {*expected, "Z"}


def test_small_capacitor_letters_are_absolute() -> None:
    # Source: IEC 60062:2016: below 10 pF, B, C, D mean +-0.1, +-0.25, +-0.5 pF.
    low, high = tolerance_from_letter("C", value_farads=4.7e-12)
    assert high == pytest.approx(0.25 / 4.7, rel=1e-12)
    assert low == -high
    assert tolerance_from_letter("D", 1e-12) == pytest.approx((-0.5, 0.5), rel=1e-12)
    # at and above 10 pF the letters are relative again
    assert tolerance_from_letter("B", 10e-12) == (-0.001, 0.001)
    # letters other than B, C, D stay relative for small capacitors
    assert tolerance_from_letter("J", 2.2e-12) == (-0.05, 0.05)
    # resistors (no capacitance given) always relative
    assert tolerance_from_letter("D") == (-0.005, 0.005)


def test_tolerance_letter_errors() -> None:
    with pytest.raises(
        ValueError, match=r"unknown tolerance letter 'Q'.*B, C, D, F, G, J, K, M, Z"
    ):
        tolerance_from_letter("Q")
    with pytest.raises(ValueError, match="value_farads"):
        tolerance_from_letter("C", value_farads=0.0)
