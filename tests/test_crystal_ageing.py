"""Crystal data as datasheets give it (issue 10 item 7).

* Ageing as a rate per year times the life, or as a total over a stated period:
  the total bounds every life up to the period (ageing only accumulates) and grows
  in proportion beyond it, which bounds the roughly logarithmic ageing of quartz
  from above (common practice; a logarithmic law ``a·log10(1 + t/t0)`` fitted to
  the same total stays below the proportional extension, checked here).
* The documented one-sided tuning-fork stability band covers the handbook
  parabola ``k·(T − T0)²`` (k = −0.034 ppm/K², T0 = 25 °C; tuning-fork crystal
  datasheets, generic class) at the ends of its ambient range, and gives a
  one-sided accuracy window.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from timespec.design.solver import solve_block
from timespec.errors import SpecError
from timespec.families.crystal.settings import ageing
from timespec.language.assemble import parse
from timespec.language.canonical import layout
from timespec.physics.pierce import tuning_fork_ppm

ROOT = Path(__file__).resolve().parents[1]

# Our own scenario: the reference crystal of a bench frequency counter.
_BASE = """crystal counter_ref:
  frequency 16 MHz
  load 10 pF
  shunt 2 pF
  motional 5 fF
  esr 40 ohm max
  accuracy ±80 ppm
"""


def _ageing_ppm(extra: str) -> tuple[float, float]:
    (block,) = parse(_BASE + extra).blocks
    w = ageing(block)
    return w.low * 1e6, w.high * 1e6


def test_rate_times_life() -> None:
    lo, hi = _ageing_ppm("  aging ±3 ppm/year\n  life 5 years\n")
    assert math.isclose(lo, -15.0) and math.isclose(hi, 15.0)


@pytest.mark.parametrize(
    ("life", "expected"), [(1.0, 10.0), (5.0, 10.0), (10.0, 10.0), (20.0, 20.0)]
)
def test_total_over_a_period(life: float, expected: float) -> None:
    lo, hi = _ageing_ppm(f"  aging ±10 ppm over 10 years\n  life {life:g} years\n")
    assert math.isclose(hi, expected) and math.isclose(lo, -expected)


def test_total_without_life_counts_in_full() -> None:
    assert _ageing_ppm("  aging -5 to 2 ppm over 1 year\n") == pytest.approx((-5.0, 2.0))


def test_proportional_extension_bounds_logarithmic_ageing() -> None:
    # a·log10(1 + t/t0) through 10 ppm at 10 years (t0 = 30 days): at 20 years it is
    # below the proportional 20 ppm the model takes
    t0 = 30.0 / 365.25
    a = 10.0 / math.log10(1.0 + 10.0 / t0)
    assert (
        a * math.log10(1.0 + 20.0 / t0)
        < _ageing_ppm("  aging ±10 ppm over 10 years\n  life 20 years\n")[1]
    )


@pytest.mark.parametrize(
    ("line", "words"),
    [
        ("  aging ±10 ppm beyond 10 years\n", "'over <period>'"),
        ("  aging ±10 ppm over 10 kHz\n", "aging"),
        ("  aging ±10 ppm over 500 years\n", "100 years"),
    ],
)
def test_bad_ageing_statements_are_located(line: str, words: str) -> None:
    with pytest.raises(SpecError) as err:
        parse(_BASE + line)
    assert err.value.line == 8 and words in str(err.value)


def test_total_form_round_trips_through_format() -> None:
    text = _BASE + "  aging ±10 ppm over 10 years\n"
    assert "aging ±10 ppm over 10 years" in layout(text)


def _documented_rtc() -> str:
    page = (ROOT / "docs" / "language.rst").read_text(encoding="utf-8")
    start = page.index("      crystal rtc_clock:")
    lines = []
    for line in page[start:].splitlines():
        if not line.strip():
            break
        lines.append(line[6:])
    return "\n".join(lines) + "\n"


def test_documented_tuning_fork_band_covers_the_parabola() -> None:
    (block,) = parse(_documented_rtc()).blocks
    stability = block.window("stability")
    assert stability is not None
    c = block.conditions
    for t in (c.ambient_low, c.ambient_high):
        dev = float(tuning_fork_ppm(t)) * 1e-6
        assert stability.low <= dev <= stability.high
    result = solve_block(block)
    assert result.best is not None
    acc = result.best.output("accuracy")
    # one-sided in temperature: the window reaches further down than up
    assert -acc.low > acc.high
