"""The timer class's figures hold over a range: widened or reported beyond it.

Checks (sources beside each):

* the CMOS class's threshold (input) current grows as junction leakage, about
  doubling every 10 K (common practice), past the top of the range it is quoted
  over; the bipolar class's base current grows when cold (about 2× from 25 °C to
  −55 °C, from memory), and each falls on the other side, so the quoted bound
  stays a bound there;
* a design outside the drift's or the supply sensitivity's range gets a located
  ``timer-class-range`` finding naming the figure, its range, the design's span
  and what to do; inside, nothing is said.
"""

from __future__ import annotations

import math

import pytest

from timespec.design.solver import solve_block
from timespec.families import family
from timespec.families.inputs import threshold_current
from timespec.language.assemble import parse
from timespec.parts.devices import timer_class

# Our own scenario: a soak-oven door interlock timer on a test rack.
_ONESHOT = """
oneshot oven_door_hold:
  width 5 ms ±10%
  timer {timer}
  supply {supply}
  ambient {ambient}
  resistors E96 1% 50 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
"""


def _block(timer: str = "cmos", supply: str = "12 V ±5%", ambient: str = "0 degC to 70 degC"):
    (block,) = parse(_ONESHOT.format(timer=timer, supply=supply, ambient=ambient)).blocks
    return block


def _codes(block) -> list[str]:
    result = solve_block(block)
    assert result.best is not None
    return [f.message for f in result.best.findings if f.code == "timer-class-range"]


def test_cmos_threshold_current_doubles_every_10_k_past_its_range() -> None:
    # common practice: junction leakage about doubles every 10 K
    t = timer_class("cmos")
    top = t.ith_ambient[1]
    assert t.threshold_current_max(0.0, top) == t.i_threshold_max
    assert math.isclose(t.threshold_current_max(0.0, top + 20.0), 4.0 * t.i_threshold_max)
    # colder than the range: leakage falls, the quoted bound stays a bound
    assert t.threshold_current_max(t.ith_ambient[0] - 30.0, top) == t.i_threshold_max


def test_bipolar_threshold_current_grows_when_cold() -> None:
    # from memory: a bipolar input's base current about doubles from 25 °C to −55 °C
    t = timer_class("bipolar")
    lo = t.ith_ambient[0]
    assert math.isclose(t.threshold_current_max(lo - 80.0, 50.0), 2.0 * t.i_threshold_max)
    assert t.threshold_current_max(lo, t.ith_ambient[1] + 40.0) == t.i_threshold_max


def test_widened_threshold_current_enters_the_worst_case() -> None:
    block = _block(ambient="0 degC to 105 degC")
    i_th = threshold_current(block)
    assert math.isclose(i_th, 4.0 * timer_class("cmos").i_threshold_max)
    result = solve_block(block)
    assert result.best is not None
    facs = family("oneshot").factors(block, result.best.design)
    (ith,) = [f for f in facs if f.name == "timer.ith"]
    assert ith.high == i_th
    (msg,) = [m for m in _codes(block) if "threshold current" in m]
    assert "85 °C" in msg and "105 °C" in msg and "widened" in msg


def test_no_finding_inside_every_range() -> None:
    assert _codes(_block()) == []


@pytest.mark.parametrize(
    ("timer", "supply", "ambient", "words"),
    [
        ("cmos", "12 V ±5%", "-55 degC to 70 degC", "drift"),
        ("cmos", "3.3 V ±5%", "0 degC to 70 degC", "supply sensitivity"),
    ],
)
def test_stretched_figure_is_reported(timer: str, supply: str, ambient: str, words: str) -> None:
    messages = _codes(_block(timer, supply, ambient))
    assert any(words in m and "outside" in m for m in messages), messages
