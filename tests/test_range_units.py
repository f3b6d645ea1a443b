"""A range may leave the unit off its first end: the second end's unit applies to both.

The expectation is the language reference's own promise (``20 to 40 ms``) and
the usual reading of engineering notation (common practice): ``-50 to 100 ppm``
is −50 ppm … 100 ppm.  Each case is checked against the same range written with
both units.
"""

from __future__ import annotations

import pytest

import timespec
from timespec.language.parser import Statement, parse_entries
from timespec.language.values import Fraction, Range

CASES = [
    ("20", "40 ms"),  # time
    ("2.4", "3 kHz"),  # frequency
    ("1", "4.7 kohm"),  # resistance
    ("3", "5 pF"),  # capacitance (was a false "range is inverted")
    ("4.5", "5.5 V"),  # voltage
    ("-1", "1 uA"),  # current
    ("40", "60%"),  # percent (was a false "range is inverted")
    ("-50", "100 ppm"),  # ppm (was −5·10⁷ ppm)
    ("-150", "0 ppm"),
    ("-10", "60 degC"),  # temperature with an offset-free unit
    ("250", "300 K"),  # temperature with an offset
    ("-2", "2 ppm/year"),  # a rate
]


def _range(text: str) -> Range:
    (entry,) = [e for e in parse_entries(f"x {text}\n") if isinstance(e, Statement)]
    term = entry.args[0][0]
    assert isinstance(term, Range)
    return term


@pytest.mark.parametrize(("first", "second"), CASES)
def test_second_unit_applies_to_the_first_end(first: str, second: str) -> None:
    unit = second.split(" ", 1)[1] if " " in second else second.lstrip("-0123456789.")
    short = _range(f"{first} to {second}")
    full = _range(f"{first}{'' if unit == '%' else ' '}{unit} to {second}")
    assert short.low.kind == full.low.kind
    assert short.low.value == pytest.approx(full.low.value, rel=1e-12, abs=1e-18)
    assert (short.high.value, short.high.kind) == (full.high.value, full.high.kind)


def test_fraction_range_is_unchanged() -> None:
    (entry,) = [
        e for e in parse_entries("threshold 0.4 to 0.6 of supply\n") if isinstance(e, Statement)
    ]
    term = entry.args[0][0]
    assert isinstance(term, Fraction)


def test_crystal_accuracy_range_is_read_as_written() -> None:
    # Regression: 'accuracy -50 to 100 ppm' was −5e7 ppm … 100 ppm, so a crystal at
    # −80 ppm passed.
    spec = timespec.parse(
        "crystal clk:\n  frequency 16 MHz\n  load 10 pF\n  shunt 3 pF\n  motional 10 fF\n"
        "  esr 40 ohm\n  accuracy -50 to 100 ppm\n  supply 3.3 V\n"
    )
    (req,) = [r for r in spec.blocks[0].requirements if r.quantity == "accuracy"]
    assert req.window.low == pytest.approx(-50e-6)
    assert req.window.high == pytest.approx(100e-6)


def test_stray_and_duty_ranges_are_no_longer_inverted() -> None:
    timespec.parse(
        "crystal clk:\n  frequency 16 MHz\n  load 10 pF\n  shunt 3 pF\n  motional 10 fF\n"
        "  esr 40 ohm\n  stray 3 to 5 pF\n  supply 3.3 V\n"
    )
    spec = timespec.parse("astable a:\n  frequency 1 kHz ±5%\n  duty 40 to 60%\n  supply 5 V\n")
    (duty,) = [r for r in spec.blocks[0].requirements if r.quantity == "duty"]
    assert (duty.window.low, duty.window.high) == pytest.approx((0.4, 0.6))
