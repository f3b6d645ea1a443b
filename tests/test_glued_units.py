"""Values written the way people type them (issue 11, item 7).

Glued ohm signs (``100kΩ``, ``4k7Ω``, ``100kohm``), explicit plus signs
(``+85°C``, ``-40°C to +85°C``), and ``min`` as minutes after a bare number
versus ``min`` as a lower bound after a unit.  Expected values are the IEC 60062
RKM reading and SI prefixes (common practice), not the parser's own output.
"""

from __future__ import annotations

import pytest

from timespec.errors import SpecError, SpecUnitError
from timespec.language.canonical import layout
from timespec.language.parser import parse_entries
from timespec.language.values import Bound, Quantity, Range, Tolerance


def _term(text: str) -> object:
    entries = parse_entries(f"x {text}\n")
    return entries[0].args[0][0]  # type: ignore[union-attr]


@pytest.mark.parametrize(
    ("text", "ohms"),
    [
        ("100kΩ", 100e3),
        ("100 kΩ", 100e3),
        ("1MΩ", 1e6),
        ("4k7Ω", 4.7e3),
        ("4k7ohm", 4.7e3),
        ("100kohm", 100e3),
        ("R47Ω", 0.47),
        ("2R2Ω", 2.2),
        ("4k7\u2126", 4.7e3),  # U+2126 OHM SIGN, the look-alike of Greek omega
    ],
)
def test_glued_ohm_sign(text: str, ohms: float) -> None:
    q = _term(text)
    assert isinstance(q, Quantity)
    assert q.kind == "resistance"
    assert q.value == pytest.approx(ohms)


def test_ohm_sign_on_a_capacitance_code_is_an_error() -> None:
    with pytest.raises(SpecUnitError) as info:
        parse_entries("x 4n7Ω\n")
    assert info.value.line == 1 and info.value.column == 3
    assert "ohm sign on a capacitance code" in str(info.value)


@pytest.mark.parametrize(("text", "celsius"), [("+85°C", 85.0), ("+85 degC", 85.0)])
def test_explicit_plus_sign(text: str, celsius: float) -> None:
    q = _term(text)
    assert isinstance(q, Quantity) and q.kind == "temperature"
    # the parsed values keep temperatures in degrees Celsius
    assert q.value == pytest.approx(celsius)


@pytest.mark.parametrize("text", ["-40°C to +85°C", "-40 to +85°C", "-40 degC to +85 degC"])
def test_signed_range(text: str) -> None:
    r = _term(text)
    assert isinstance(r, Range)
    assert r.low.value == pytest.approx(-40.0)  # type: ignore[union-attr]
    assert r.high.value == pytest.approx(85.0)  # type: ignore[union-attr]


def test_asymmetric_tolerance_still_reads() -> None:
    t = _term("+5% -3%")
    assert isinstance(t, Tolerance)
    assert t.plus.value == pytest.approx(0.05) and t.minus.value == pytest.approx(0.03)


def test_plus_after_plusminus_is_still_an_error() -> None:
    with pytest.raises(SpecError):
        parse_entries("x 10 ms ±+5%\n")


@pytest.mark.parametrize(
    ("text", "seconds", "side"),
    [
        ("2 min", 120.0, None),  # a bare number then min: the unit minutes
        ("2 min max", 120.0, "max"),
        ("2 min min", 120.0, "min"),  # at least two minutes
        ("5 ms min", 5e-3, "min"),  # after a unit: the lower bound
        ("-1 min", -60.0, None),
        ("+1 min", 60.0, None),
    ],
)
def test_min_as_unit_or_bound(text: str, seconds: float, side: str | None) -> None:
    t = _term(text)
    if side is None:
        assert isinstance(t, Quantity) and t.kind == "time"
        assert t.value == pytest.approx(seconds)
    else:
        assert isinstance(t, Bound) and t.side == side
        assert t.quantity.value == pytest.approx(seconds)


def test_range_in_minutes() -> None:
    r = _term("1 to 2 min")
    assert isinstance(r, Range)
    assert r.low.value == pytest.approx(60.0)  # type: ignore[union-attr]
    assert r.high.value == pytest.approx(120.0)  # type: ignore[union-attr]


@pytest.mark.parametrize(
    "line", ["x 100kΩ", "x -40°C to +85°C", "x 2 min", "x 2 min min", "x 4k7ohm, +3 ms"]
)
def test_format_keeps_the_meaning(line: str) -> None:
    once = layout(line + "\n")
    assert layout(once) == once


@pytest.mark.parametrize("text", ["x 5 ms \x00\n", "x 5 ms", "x \u2028 5\n", "x 5 ms ±\n"])
def test_no_empty_unexpected_character(text: str) -> None:
    try:
        parse_entries(text)
    except SpecError as exc:
        assert "unexpected character ''" not in str(exc)
