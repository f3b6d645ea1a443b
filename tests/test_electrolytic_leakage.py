"""Electrolytic leakage as datasheets state it (issue 10 item 2).

The datasheet class rates an aluminium electrolytic's leakage as ``I = k·C·V``
(C in µF, V the rated voltage in V, giving µA) or a floor, whichever is greater;
the usual class figure is 0.01·CV or 3 µA (aluminium electrolytic datasheets,
generic class).  A spec may state the rating and the leakage figure on the policy
or on a pinned part; without them the built-in rule applies at twice the highest
supply (common practice: an electrolytic is derated to about half its rating).
Leakage doubles above 60 °C ambient in the model (it rises 2–3× when hot,
datasheet class, from memory).
"""

from __future__ import annotations

import math

import pytest

from timespec.errors import SpecError
from timespec.families import family
from timespec.families.capacitors import capacitor_leakage
from timespec.language.assemble import parse
from timespec.language.canonical import layout

# Our own scenario: the slow start-up hold of a burn-in oven's fan controller.
_HEAD = "oneshot fan_hold:\n  width 20 s ±20%\n  supply 12 V ±5%\n"


def _leak(extra: str, use: str = "use R 100k 1%, C 330u 20% AL") -> float:
    (block,) = parse(_HEAD + f"  {use}{extra}\n").blocks
    (design,) = family("oneshot").candidates(block)
    return capacitor_leakage(block, design.part("C"))


def test_built_in_rule_at_twice_the_supply() -> None:
    # 0.01 · 330 µF · (2 · 12.6 V) = 83.16 µA
    assert math.isclose(_leak(""), 0.01 * 330 * 25.2 * 1e-6)


def test_stated_rating_and_rule_on_the_pinned_part() -> None:
    # 0.006 · 330 · 25 = 49.5 µA
    assert math.isclose(_leak(" rated 25 V leakage 0.006 of CV or 4 uA"), 49.5e-6)
    # the floor wins for a small part: 0.006 · 1 · 25 = 0.15 µA < 4 µA
    got = _leak("", use="use R 100k 1%, C 1u 20% AL rated 25 V leakage 0.006 of CV or 4 uA")
    assert math.isclose(got, 4e-6)


def test_plain_bound_from_the_policy() -> None:
    text = (
        _HEAD
        + "  use R 100k 1%, C 330u 20% AL\n  capacitors E6 20% AL, 1u to 1000u, leakage 2 uA\n"
    )
    (block,) = parse(text).blocks
    (design,) = family("oneshot").candidates(block)
    assert math.isclose(capacitor_leakage(block, design.part("C")), 2e-6)


def test_hot_ambient_doubles_the_stated_figure() -> None:
    hot = "\n  ambient 0 degC to 70 degC"
    assert math.isclose(_leak(hot, use="use R 100k 1%, C 330u 20% AL leakage 5 uA"), 10e-6)


@pytest.mark.parametrize(
    ("item", "words"),
    [
        (" leakage", "needs a value"),
        (" leakage 2 of supply", "'k of CV'"),
        (" leakage 5 V", "needs a current"),
        (" leakage 0.01 of CV or", "needs a value"),
        (" leakage 50 of CV", "makes no sense"),
    ],
)
def test_bad_leakage_items_are_located(item: str, words: str) -> None:
    with pytest.raises(SpecError) as err:
        parse(_HEAD + f"  use R 100k 1%, C 330u 20% AL{item}\n")
    assert err.value.line == 4 and words in str(err.value)


def test_leakage_round_trips_through_format() -> None:
    text = _HEAD + "  use R 100k 1%, C 330u 20% AL rated 25 V leakage 0.006 of CV or 4 uA\n"
    assert "leakage 0.006 of CV or 4 uA" in layout(text)
