"""The worst-case search ties the factors that act through one part value.

A part's tolerance, tempco, ageing, class 2 drift and DC-bias loss (and the node
stray added to a timing capacitor) reach the model only through the part's
effective value (:func:`timespec.families.inputs.apply_part`), so the corner
search visits only that value's lowest and highest combination
(:attr:`timespec.analysis.Factor.through`).  Checked here against the full
enumeration of every combination of their ends on the designs the solver picks for
every family and circuit, and on the shipped demo specs: the extremes must agree.

Source of the reference: the plain corner enumeration of the same factor box
(extreme-value worst-case analysis, common practice), i.e. the search with every
``through`` removed.
"""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from timespec.analysis import Factor, grid_size, worst_case
from timespec.design.solver import solve_block
from timespec.families import family
from timespec.language.assemble import load, parse
from timespec.model import Block

EXAMPLES = sorted((Path(__file__).resolve().parents[1] / "examples").glob("*.tspec"))

# Our own small scenarios (a soak-chamber controller), one per family and circuit.
SPECS = {
    "oneshot-c0g": """
oneshot door_hold:
  width 2 ms ±6%
  supply 5 V ±5%
  ambient -20 degC to 70 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
""",
    "oneshot-x7r-aged": """
oneshot fan_kick:
  width 40 ms ±25%
  supply 12 V ±5%
  ambient 0 degC to 60 degC
  life 10 years
  resistors E24 1% 100 ppm/K, 1k to 1M
  capacitors E6 10% X7R rated 16 V, 1n to 2.2u
""",
    "astable-classic": """
astable heater_pwm:
  frequency 500 Hz ±10%
  duty 60% ±6%
  circuit classic
  supply 12 V ±5%
  ambient -10 degC to 60 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 1n to 100n
""",
    "astable-diode": """
astable lamp_tick:
  frequency 20 Hz ±15%
  duty 30% ±8%
  circuit diode
  supply 9 V ±10%
  ambient 0 degC to 50 degC
  resistors E24 1% 100 ppm/K, 1k to 1M
  capacitors E12 10% X7R, 10n to 2.2u
""",
    "astable-feedback": """
astable beeper:
  frequency 2 kHz ±10%
  duty 50% ±5%
  circuit feedback
  timer cmos
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 50 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 1n to 100n
""",
    "delay": """
delay relay_enable:
  delay 20 ms to 40 ms
  threshold 0.55 to 0.75 of supply
  supply 5 V ±5%
  ambient -20 degC to 70 degC
  resistors E24 1% 100 ppm/K, 1k to 1M
  capacitors E12 10% X7R, 1n to 10u
""",
    "relaxation": """
relaxation panel_clock:
  frequency 10 kHz ±20%
  supply 5 V ±5%
  ambient 0 degC to 60 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
""",
}


def _untied(factors: list[Factor]) -> list[Factor]:
    return [dataclasses.replace(f, through="", pivot=None) for f in factors]


def _same(a: float, b: float) -> bool:
    return a == b or (math.isnan(a) and math.isnan(b))


def _check(block: Block) -> int:
    """Compare the tied and the full search on the block's chosen design; the number of
    tied factors."""
    result = solve_block(block)
    assert result.best is not None
    fam = family(block.kind)
    design = result.best.design
    facs = fam.factors(block, design)
    # declarations off on both sides, so only the tie differs
    facs = [dataclasses.replace(f, rising=(), falling=()) for f in facs]
    model = fam.evaluate(block, design.variant)
    tied = worst_case(facs, model)
    full = worst_case(_untied(facs), model)
    for name, e in full.items():
        got = tied[name]
        assert _same(got.nominal, e.nominal), (block.name, name)
        assert _same(got.low, e.low) and _same(got.high, e.high), (block.name, name, got, e)
    return sum(1 for f in facs if f.through)


@pytest.mark.parametrize("key", sorted(SPECS))
def test_tied_search_equals_full_enumeration(key: str) -> None:
    (block,) = parse(SPECS[key]).blocks
    assert _check(block) >= 2


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_tied_search_equals_full_enumeration_on_demos(path: Path) -> None:
    for block in load(path).blocks:
        _check(block)


def test_tied_grid_is_smaller() -> None:
    # RA, RB (tol, tempco) and C (tol, tempco, stray) with the temperature: 2·2·2·2
    # levels on one axis instead of 2 (temp)·4·4·8.
    (block,) = parse(SPECS["astable-classic"]).blocks
    result = solve_block(block)
    assert result.best is not None
    fam = family("astable")
    facs = fam.factors(block, result.best.design)
    assert grid_size(_untied(facs)) == 16 * grid_size(facs)


def test_pivot_needs_through() -> None:
    with pytest.raises(ValueError, match="through"):
        Factor("R.tc", "tempco", 0.0, -1.0, 1.0, pivot=("temp", 25.0))


_ASTABLE = parse(SPECS["astable-classic"]).blocks[0]


@settings(max_examples=10, deadline=None)
# found by the lowest-dependency CI run: the diode overshoot's Newton residue
@example(variant="diode", ra=26458.0, rb=1000.0, c=1.0000000030519359e-09)
@given(
    variant=st.sampled_from(["classic", "diode"]),
    ra=st.floats(1e3, 1e6),
    rb=st.floats(1e3, 1e6),
    c=st.floats(1e-9, 1e-6),
)
def test_tied_search_equals_full_enumeration_random_astables(
    variant: str, ra: float, rb: float, c: float
) -> None:
    # Small RA next to the discharge on-resistance is where the low time is least
    # monotone in RA (the discharge node's level and resistance move against each other).
    block = _ASTABLE
    fam = family("astable")
    design = fam._design(block, variant, {"RA": ra, "RB": rb, "C": c})  # type: ignore[attr-defined]
    facs = [dataclasses.replace(f, rising=(), falling=()) for f in fam.factors(block, design)]
    model = fam.evaluate(block, variant)
    tied = worst_case(facs, model)
    full = worst_case(_untied(facs), model)
    # The classic circuit is closed form: exactly equal.  The diode circuit's overshoot
    # comes from three Newton steps on the diode-equation charge, converged to about
    # 1e-9 (tests/test_timer_delay.py holds it to solve_ivp within 1e-7); that residue is
    # not monotone in the parts, so the full grid may find a point 1e-9 lower.
    rel = 0.0 if variant == "classic" else 1e-8
    for name, e in full.items():
        got = tied[name]
        for a, b in ((got.low, e.low), (got.high, e.high)):
            assert _same(a, b) or math.isclose(a, b, rel_tol=rel), (name, got, e)
