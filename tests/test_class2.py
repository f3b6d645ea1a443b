"""Class 2 ceramic ageing and DC-bias loss as worst-case inputs (timespec issue 9)."""

from __future__ import annotations

import math

import pytest

import timespec
from timespec.design.solver import solve_block
from timespec.errors import SpecError
from timespec.families.inputs import part_factors
from timespec.language.canonical import layout
from timespec.parts.dielectrics import (
    ageing_loss_bound,
    bias_loss_bound,
    dielectric,
)
from timespec.parts.part import Part

HOURS_10_YEARS = 10 * 365.25 * 24.0


def test_ageing_relation() -> None:
    # Source: class 2 ageing law loss = rate * log10(t / t_ref) per decade-hour, X7R about
    # 1-2.5 %/decade-hour, X5R 2-5 %, Y5V up to 7 % (published application notes, from memory);
    # t_ref = 24 h after reflow (common practice).
    for name, rate in (("X7R", 0.025), ("X5R", 0.05), ("Y5V", 0.07)):
        want = rate * math.log10(HOURS_10_YEARS / 24.0)
        assert ageing_loss_bound(dielectric(name), HOURS_10_YEARS) == pytest.approx(want)
    assert ageing_loss_bound(dielectric("X7R"), 10.0) == 0.0  # before the reference time
    for name in ("C0G", "PP", "PET", "AL"):
        assert ageing_loss_bound(dielectric(name), HOURS_10_YEARS) == 0.0


def test_bias_relation() -> None:
    # Source: -10..-50 % at rated voltage common, 40-80 % in small cases (application
    # notes, from memory); bound L_rated * sqrt(V / V_rated), capped at 90 %.
    assert bias_loss_bound(dielectric("X7R"), 0.5) == pytest.approx(0.6 * math.sqrt(0.5))
    assert bias_loss_bound(dielectric("X5R"), 1.0) == pytest.approx(0.8)
    assert bias_loss_bound(dielectric("Y5V"), 4.0) == pytest.approx(0.9)
    assert bias_loss_bound(dielectric("C0G"), 1.0) == 0.0
    with pytest.raises(ValueError):
        bias_loss_bound(dielectric("X7R"), -1.0)


def _delay(life: str, rated: str, dielectric_name: str = "X7R") -> str:
    return (
        "delay por:\n  delay 5 ms to 200 ms\n  supply 5 V ±5%\n"
        f"  threshold 0.4 to 0.6 of supply\n  leakage 1 pA max\n{life}"
        f"  use R 22k1 1%, C 2u2 {dielectric_name} 10%{rated}\n"
    )


def _low(text: str) -> float:
    res = solve_block(timespec.parse(text).blocks[0])
    assert res.best is not None
    return res.best.outputs[0].low


def test_x7r_worst_case_shows_the_losses() -> None:
    # The delay is C times a factor independent of C (t = R*C*ln q, RC charge law [Txt]),
    # so the worst-case low scales by (1 - ageing loss)(1 - bias loss).  Not exactly: the
    # node's stray (at most 15 pF beside 2.2 uF, 7e-6 of C) and the 1 pA leakage stay put,
    # which moves the ratios by less than 1e-6; hence rel=1e-5.
    aged = _low(_delay("  life 10 years\n", " rated 16 V"))
    new = _low(_delay("", " rated 16 V"))
    far = _low(_delay("", " rated 1000000 V"))
    age = 0.025 * math.log10(HOURS_10_YEARS / 24.0)  # X7R high end, from 24 h after reflow
    bias_16 = 0.6 * math.sqrt(5.25 / 16.0)  # highest supply over the rating
    bias_far = 0.6 * math.sqrt(5.25 / 1e6)
    assert aged / new == pytest.approx(1.0 - age, rel=1e-5)
    assert new / far == pytest.approx((1.0 - bias_16) / (1.0 - bias_far), rel=1e-5)


def test_default_rating_is_twice_the_supply() -> None:
    block = timespec.parse(_delay("  life 10 years\n", "")).blocks[0]
    part = Part("C", "capacitance", 2.2e-6, 0.1, "E6", dielectric="X7R", pinned=True)
    factors = {f.name: f for f in part_factors(block, part)}
    assert factors["C.bias"].low == pytest.approx(-0.6 * math.sqrt(0.5))
    assert factors["C.bias"].high == 0.0
    res = solve_block(block)
    assert res.best is not None
    msg = next(f.message for f in res.best.findings if f.code == "imprecise-dielectric")
    assert "−42.4 %" in msg and "−8.91 %" in msg and "10.5 V" in msg


def test_stated_ageing_not_added() -> None:
    text = _delay("  life 10 years\n", "").replace(
        "  use", "  capacitors E6 10% X7R 1 %/year\n  use"
    )
    block = timespec.parse(text).blocks[0]
    part = Part("C", "capacitance", 2.2e-6, 0.1, "E6", dielectric="X7R", ageing=0.01, pinned=True)
    age = {f.name: f for f in part_factors(block, part)}["C.age"]
    # The larger of 10 %  (1 %/year x 10 years) and 8.91 % (log law) counts, not the sum.
    assert (age.low, age.high) == pytest.approx((-0.10, 0.10))


def test_c0g_unchanged() -> None:
    block = timespec.parse(_delay("  life 10 years\n", "", "C0G")).blocks[0]
    part = Part("C", "capacitance", 2.2e-6, 0.1, "E6", dielectric="C0G", pinned=True)
    names = [f.name for f in part_factors(block, part)]
    assert "C.bias" not in names and "C.age" not in names


def test_over_rating_is_reported() -> None:
    res = solve_block(timespec.parse(_delay("", " rated 4 V")).blocks[0])
    assert res.best is not None
    assert "class2-bias-range" in [f.code for f in res.best.findings]


def test_policy_rating_and_format_round_trip() -> None:
    text = (
        "delay por:\n  delay 5 ms to 200 ms\n  supply 5 V ±5%\n"
        "  threshold 0.4 to 0.6 of supply\n  capacitors E6 10% X7R, rated 25 V\n"
        "  use C 2u2 X7R rated 16 V\n"
    )
    block = timespec.parse(text).blocks[0]
    assert block.capacitors.rated_voltage == 25.0
    pinned = block.pinned_part("C")
    assert pinned is not None and pinned.rated_voltage == 16.0
    again = layout(text)
    assert "rated 25 V" in again and "rated 16 V" in again
    assert timespec.parse(again).blocks[0] == block


@pytest.mark.parametrize(
    ("item", "needle", "col"),
    [
        ("rated -25 V", "positive and finite", 32),
        ("rated 1e999 V", "positive and finite", 32),
        ("rated 25 ms", "a rated voltage is a voltage", 32),
        ("rated 25", "a bare number", 32),
        ("rated", "'rated' needs a voltage", 26),
        ("25 V", "rated 25 V", 26),
    ],
)
def test_bad_ratings_are_located(item: str, needle: str, col: int) -> None:
    text = f"delay por:\n  delay 5 ms to 200 ms\n  capacitors E6 10% X7R, {item}\n"
    with pytest.raises(SpecError) as info:
        timespec.parse(text, "t.tspec")
    message = str(info.value)
    assert needle in message
    assert f"t.tspec:3:{col}:" in message


def test_resistors_take_no_rating() -> None:
    with pytest.raises(SpecError, match="resistor policy takes no rated voltage"):
        timespec.parse("delay por:\n  delay 5 ms to 200 ms\n  resistors E96 rated 5 V\n")
