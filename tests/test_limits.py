"""Fixture acceptance limits: guard bands and capture counts checked by hand."""

from __future__ import annotations

import io
import json
import math

import pytest

import timespec
from timespec.cli import main
from timespec.design.limits import fixture_limits, measurement_uncertainty
from timespec.model import Fixture

SPEC = """
fixture:
  clock 16 MHz ±50 ppm
  uncertainty 2 us
oneshot hold:
  width 150 ms ±8%
  supply 12 V ±5%
  timer cmos
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
astable beat:
  frequency 10 Hz ±10%
  duty 25% ±5%
  supply 5 V ±5%
  timer cmos
  capacitors E12 2% PP, 10n to 1u
"""


@pytest.fixture(scope="module")
def result() -> timespec.Result:
    return timespec.solve(timespec.parse(SPEC), statistics=False, fixes=False)


def test_fixture_section_is_read() -> None:
    fx = timespec.parse(SPEC).fixture
    assert fx == Fixture(clock=16e6, clock_ppm=50e-6, uncertainty=2e-6, decision="guarded")


def test_uncertainty_bound_by_hand() -> None:
    # Timer capture: N = T·f_clk counts, ±1 count, plus the timebase error (ppm·T);
    # the fixture's own 2 µs is added as stated.  0.138 s: 6.9 µs + 62.5 ns + 2 µs.
    fx = Fixture(16e6, 50e-6, 2e-6)
    assert measurement_uncertainty(0.138, fx) == pytest.approx(6.9e-6 + 62.5e-9 + 2e-6)


def test_guarded_acceptance_moves_each_limit_in_by_the_uncertainty(result: timespec.Result) -> None:
    # ILAC-G8:2019 guarded acceptance: acceptance limit = tolerance limit − w, w = U.
    (hold,) = [lim for lim in fixture_limits(result) if lim.block == "hold"]
    fx = timespec.parse(SPEC).fixture
    assert fx is not None
    lo, hi = 0.138, 0.162
    assert hold.accept[0] == pytest.approx(lo + measurement_uncertainty(lo, fx), rel=1e-12)
    assert hold.accept[1] == pytest.approx(hi - measurement_uncertainty(hi, fx), rel=1e-12)
    # counts rounded inward: the smallest count above, the largest below
    assert hold.counts == (math.ceil(hold.accept[0] * 16e6), math.floor(hold.accept[1] * 16e6))
    assert hold.ratio == pytest.approx(0.012 / measurement_uncertainty(hi, fx))


def test_simple_acceptance_is_the_requirement(result: timespec.Result) -> None:
    # ILAC-G8:2019 simple acceptance: w = 0.
    (hold,) = [lim for lim in fixture_limits(result, decision="simple") if lim.block == "hold"]
    assert hold.accept == pytest.approx((0.138, 0.162))


def test_expected_rule_passes_every_unit_built_as_designed(result: timespec.Result) -> None:
    for lim in fixture_limits(result, decision="expected"):
        assert lim.accept[0] <= lim.expected[0] and lim.expected[1] <= lim.accept[1]
        lo_c, hi_c = lim.counts
        assert lo_c is not None and hi_c is not None
        assert lo_c <= lim.expected[0] * lim.clock and lim.expected[1] * lim.clock <= hi_c


def test_frequency_requirement_becomes_a_period_window(result: timespec.Result) -> None:
    # A fixture measures the period: 10 Hz ±10 % is 1/11 Hz … 1/9 Hz.
    (period,) = [
        lim for lim in fixture_limits(result) if lim.block == "beat" and lim.quantity == "period"
    ]
    assert period.required == pytest.approx((1 / 11.0, 1 / 9.0))
    high = [lim for lim in fixture_limits(result) if lim.block == "beat" and lim.quantity == "high"]
    assert high[0].decision == "expected"  # nothing is required of the high time itself
    assert high[0].notes


def test_a_coarse_fixture_cannot_decide(result: timespec.Result) -> None:
    coarse = Fixture(clock=100.0, clock_ppm=0.0, uncertainty=0.02)
    (hold,) = [lim for lim in fixture_limits(result, coarse) if lim.block == "hold"]
    assert not hold.decidable
    assert any("cannot decide" in n for n in hold.notes)


def test_cli_limits_table_and_json(tmp_path: pytest.TempPathFactory) -> None:
    spec = tmp_path / "rig.tspec"  # type: ignore[operator]
    spec.write_text(SPEC, encoding="utf-8")
    out = io.StringIO()
    assert main(["limits", str(spec)], stdout=out, stderr=io.StringIO()) == 0
    assert "counts @ 16 MHz" in out.getvalue()
    out = io.StringIO()
    assert main(["limits", str(spec), "--json"], stdout=out, stderr=io.StringIO()) == 0
    doc = json.loads(out.getvalue())
    assert doc["format"] == "timespec-limits"
    assert {lim["measures"] for lim in doc["limits"]} >= {"width", "period"}


def test_cli_limits_without_fixture_is_a_usage_error(tmp_path: pytest.TempPathFactory) -> None:
    spec = tmp_path / "rig.tspec"  # type: ignore[operator]
    spec.write_text("oneshot a: width 1 ms ±10% at supply 5 V\n", encoding="utf-8")
    err = io.StringIO()
    assert main(["limits", str(spec)], stdout=io.StringIO(), stderr=err) == 2
    assert "has no fixture: section" in err.getvalue()
