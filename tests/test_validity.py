"""Tests for timespec.parts.validity and timespec.families.assumptions."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from timespec.families.assumptions import Stretch, assumption_findings
from timespec.parts.validity import Held, stretch

DIODE = Held(
    "steering-diode drop 0.55…0.75 V",
    "diode current",
    0.1e-3,
    5e-3,
    "current",
    "[CP] small-signal silicon diode",
)


def test_inside_is_one() -> None:
    assert stretch(DIODE, 0.2e-3, 1e-3) == 1.0
    assert DIODE.contains(0.2e-3, 1e-3)


def test_below_is_the_ratio_to_the_low_end() -> None:
    # 11 µA against a 0.1 mA floor: 100/11 times too little current.
    assert stretch(DIODE, 11e-6, 29e-6) == pytest.approx(0.1e-3 / 11e-6)
    assert not DIODE.contains(11e-6, 29e-6)


def test_above_is_the_ratio_to_the_high_end() -> None:
    assert stretch(DIODE, 1e-3, 20e-3) == pytest.approx(4.0)


def test_temperatures_grow_with_the_distance() -> None:
    t = Held("x", "ambient", -55.0, 125.0, "temperature", "[DS]")
    assert stretch(t, -65.0, 25.0) == pytest.approx(1.0 + 10.0 / 180.0)
    assert stretch(t, -65.0, 25.0) < stretch(t, -75.0, 25.0)


def test_inverted_range_is_refused() -> None:
    with pytest.raises(ValueError, match="ordered"):
        Held("x", "y", 2.0, 1.0, "current", "[CP]")
    with pytest.raises(ValueError, match="ordered"):
        Held("x", "y", math.nan, 1.0, "current", "[CP]")


@given(st.floats(1e-9, 5e-3), st.floats(1.0, 1e3))
def test_stretch_never_below_one_and_grows_downward(low: float, k: float) -> None:
    # Below the top of the range, a smaller current is never less stretched.
    inner = stretch(DIODE, low)
    outer = stretch(DIODE, low / k)
    assert inner >= 1.0
    assert outer >= inner


def test_findings_name_range_span_ratio_and_fix() -> None:
    (f,) = assumption_findings(
        [Stretch(DIODE, 11e-6, 29e-6, "Use the diode model.")], "diode-current-range"
    )
    assert f.code == "diode-current-range"
    assert f.severity == "warning"
    assert "0.1 mA" in f.message and "5 mA" in f.message
    assert "11 µA" in f.message and "29 µA" in f.message
    assert "9.09×" in f.message
    assert f.message.endswith("Use the diode model.")


def test_small_stretch_is_a_note_and_inside_is_silent() -> None:
    notes = assumption_findings([Stretch(DIODE, 0.08e-3, 1e-3, "x")], "c")
    assert [f.severity for f in notes] == ["note"]
    assert assumption_findings([Stretch(DIODE, 0.2e-3, 1e-3, "x")], "c") == []
    forced = assumption_findings([Stretch(DIODE, 1e-6, 1e-6, "x", "error")], "c")
    assert [f.severity for f in forced] == ["error"]
