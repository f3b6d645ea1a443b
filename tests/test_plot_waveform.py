"""Waveform chart: sampled exponentials against an integrated RC node and the solver."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

import timespec
from timespec.design.result import Result
from timespec.errors import UsageError
from timespec.outputs.waveform import Phase, Waveform, block_waveform, waveform_chart

ROOT = Path(__file__).resolve().parent.parent

# Invented scenario: the timing board of a greenhouse vent controller.
VENT = """\
defaults:
  supply 5 V ±5%
  ambient -5 degC to 45 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 2% PP, 1n to 1u
  timer cmos

oneshot vent_pulse:
  width 40 ms ±10%

astable stepper_clock:
  frequency 1 kHz ±10%
  duty 60% to 75%

relaxation fan_ref:
  frequency 500 Hz to 5 kHz
  gate highspeed

delay sensor_wake:
  delay 2 ms to 8 ms
  threshold 0.4 to 0.6 of supply
  leakage 100 nA max

crystal sensor_clock:
  frequency 8 MHz
  load 12 pF
  stray 3 pF to 5 pF
  shunt 2 pF
  motional 4 fF
  esr 60 ohm max
  drive 300 uW max
  gm 8 mA/V
  swing 2 V
  tolerance ±20 ppm
  stability ±30 ppm
  aging ±3 ppm/year
  accuracy ±150 ppm
"""


@pytest.fixture(scope="module")
def vent() -> Result:
    return timespec.solve(timespec.parse(VENT), statistics=False, fixes=False)


def _integrated_crossing(phase: Phase, level: float) -> float:
    """Time the node crosses ``level``, integrating ``dv/dt = (v∞ − v)/τ`` with scipy.

    ``C dv/dt = (V − v)/R − i`` is ``dv/dt = (v∞ − v)/τ`` with ``v∞ = V − i·R`` and
    ``τ = R·C`` (first-order RC node, any circuit-theory handbook); scipy's
    ``solve_ivp`` with a terminal event finds the crossing independently of the
    closed form.
    """

    def rhs(_t: float, v: np.ndarray) -> np.ndarray:
        return (phase.target - v) / phase.tau

    def event(_t: float, v: np.ndarray) -> float:
        return float(v[0] - level)

    event.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        rhs,
        (0.0, 10 * phase.tau),
        [phase.v_start],
        events=event,
        rtol=1e-10,
        atol=1e-12,
        method="DOP853",
    )
    return float(sol.t_events[0][0])


def _sampled_crossing(wf: Waveform, phase: Phase, level: float) -> float:
    """Crossing time read off the sampled trace by linear interpolation."""
    t = np.linspace(phase.start, phase.end, 20001)
    v = phase.voltage(t)
    k = int(np.flatnonzero(np.diff(np.sign(v - level)))[0])
    return float(t[k] + (level - v[k]) * (t[k + 1] - t[k]) / (v[k + 1] - v[k]))


def test_oneshot_capacitor_crosses_the_threshold_when_integration_says(vent: Result) -> None:
    b = vent.block("vent_pulse")
    wf = block_waveform(b)
    charge = next(p for p in wf.phases if p.name == "charge")
    ((_, vth),) = wf.thresholds
    expected = _integrated_crossing(charge, vth)
    assert _sampled_crossing(wf, charge, vth) - charge.start == pytest.approx(expected, rel=1e-6)
    # the output falls when the solver's nominal width ends (crossing plus output delay)
    assert b.best is not None
    assert charge.end == pytest.approx(b.best.output("width").nominal, rel=1e-12)


@pytest.mark.parametrize("name", ["stepper_clock", "fan_ref"])
def test_oscillator_cycle_matches_integration_and_the_solver(vent: Result, name: str) -> None:
    b = vent.block(name)
    wf = block_waveform(b)
    high, low = wf.phases
    assert b.best is not None
    # one steady cycle: its halves are the solver's nominal high and low times ...
    assert high.duration == pytest.approx(b.best.output("high").nominal, rel=1e-12)
    assert low.duration == pytest.approx(b.best.output("low").nominal, rel=1e-12)
    # ... and the capacitor comes back to where it started
    assert low.v_end == pytest.approx(high.v_start, rel=1e-9)
    (_, lower), (_, upper) = wf.thresholds
    # each half crosses its threshold one output delay before it ends (scipy integration)
    delay = high.end - (high.start + _integrated_crossing(high, upper))
    assert _sampled_crossing(wf, high, upper) == pytest.approx(high.end - delay, rel=1e-6)
    back = _integrated_crossing(low, lower)
    assert low.end - (low.start + back) == pytest.approx(delay, rel=1e-6, abs=1e-12)


def test_delay_output_switches_after_the_crossing(vent: Result) -> None:
    b = vent.block("sensor_wake")
    wf = block_waveform(b)
    first = wf.phases[0]
    ((_, vth),) = wf.thresholds
    assert b.best is not None
    nominal = b.best.output("delay").nominal
    assert first.end == pytest.approx(nominal, rel=1e-12)
    # the input reads high a gate delay (never negative) after the node crosses
    crossing = _integrated_crossing(first, vth)
    assert -1e-9 * nominal <= nominal - crossing < 0.01 * nominal
    t, _, out = wf.sample()
    assert out[t < 0.99 * nominal].max() == 0.0 and out[-1] == pytest.approx(wf.supply)


def test_marks_carry_the_requirement_and_the_worst_case(vent: Result) -> None:
    b = vent.block("vent_pulse")
    wf = block_waveform(b)
    (mark,) = wf.marks
    assert b.best is not None
    out = b.best.output("width")
    assert mark.name == "width" and mark.required == pytest.approx((0.036, 0.044))
    assert mark.worst == (out.low, out.high)


def test_crystal_has_no_waveform(vent: Result) -> None:
    with pytest.raises(UsageError, match="no waveform for crystal blocks"):
        block_waveform(vent.block("sensor_clock"))


def test_chart_draws_one_panel_per_block_and_skips_the_crystal(vent: Result) -> None:
    pytest.importorskip("matplotlib")
    fig = waveform_chart(vent)
    titles = [ax.get_title() for ax in fig.axes]
    assert len(titles) == 4 and not any("sensor_clock" in t for t in titles)
    assert all(t.endswith("at nominal") for t in titles)
    for ax in fig.axes:
        assert len(ax.get_lines()) >= 3  # output, capacitor, thresholds, worst-case ticks
        assert ax.get_xlabel().startswith("time (")
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert labels[:3] == ["capacitor", "output", "threshold"]


def test_named_crystal_block_is_refused(vent: Result) -> None:
    with pytest.raises(UsageError, match="crystal"):
        waveform_chart(vent, ["sensor_clock"])


def test_oneshot_trace_is_continuous(vent: Result) -> None:
    wf = block_waveform(vent.block("vent_pulse"))
    for a, b in zip(wf.phases, wf.phases[1:], strict=False):
        assert b.start == pytest.approx(a.end, rel=1e-12)
        assert b.v_start == pytest.approx(a.v_end, rel=1e-12)
    assert math.isinf(wf.phases[0].tau)  # idle before the trigger


# Invented scenario: an aquarium dosing pump's short-pulse clock, once with the
# diode equation (the default) and once with a stated constant diode drop.
DOSING = """\
defaults:
  supply 5 V ±5%
  ambient 10 degC to 40 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 2% PP, 10n to 1u
  timer cmos

astable dose_tick:
  frequency 20 Hz ±10%
  duty 25% ±5%

astable dose_tick_drop:
  frequency 20 Hz ±10%
  duty 25% ±5%
  diode 0.6 V to 0.7 V
"""


@pytest.fixture(scope="module")
def dosing() -> Result:
    return timespec.solve(timespec.parse(DOSING), statistics=False, fixes=False)


@pytest.mark.parametrize("name", ["dose_tick", "dose_tick_drop"])
def test_diode_astable_cycle_matches_the_solver(dosing: Result, name: str) -> None:
    b = dosing.block(name)
    assert b.best is not None and b.best.design.variant == "diode"
    high, low = block_waveform(b).phases
    assert high.curve is not None
    since, volts = high.curve
    # the charge sampled by voltage ends at the solver's nominal high time, at the
    # voltage the discharge (one exponential over the low time) starts from
    assert high.duration == pytest.approx(b.best.output("high").nominal, rel=1e-12)
    assert since[-1] == pytest.approx(high.duration, rel=1e-9)
    assert volts[-1] == pytest.approx(low.v_start, rel=1e-12)
    assert low.duration == pytest.approx(b.best.output("low").nominal, rel=1e-12)
    assert low.v_end == pytest.approx(high.v_start, rel=1e-9)
    assert np.all(np.diff(since) > 0)  # time runs forward as the capacitor charges


def test_diode_equation_charge_matches_integration(dosing: Result) -> None:
    # Integrate the steering-diode node with scipy: C·dv/dt = I_A − i, where the
    # current through RA splits into the diode (Shockley, Is·(e^(vd/nVt) − 1)) and
    # RB in parallel, and V − v = vd + RA·I_A (Kirchhoff's laws, any circuit-theory
    # handbook); vd is solved at each step with scipy's brentq.
    from scipy.optimize import brentq

    from timespec.families.astable.diode import DIODE
    from timespec.families.inputs import apply_part, drain_current
    from timespec.outputs.waveform import nominal_inputs
    from timespec.physics.astable import diode_saturation_current, thermal_voltage

    b = dosing.block("dose_tick")
    x = nominal_inputs(b)
    high, _ = block_waveform(b).phases
    assert high.curve is not None
    ra, rb = float(apply_part(x, "RA")[0]), float(apply_part(x, "RB")[0])
    c = float((apply_part(x, "C") + x["stray"])[0])
    v = float(x["supply"][0])
    i = float(drain_current(x)[0])
    i_s = float(
        diode_saturation_current(x["diode.is"], x["diode.n"], x["temp"], DIODE.eg, DIODE.xti)[0]
    )
    n_vt = float((x["diode.n"] * thermal_voltage(x["temp"]))[0])

    def i_a(vc: float) -> float:
        def node(vd: float) -> float:
            return vd + ra * (i_s * math.expm1(vd / n_vt) + vd / rb) - (v - vc)

        vd = brentq(node, 0.0, v - vc, xtol=1e-15)
        return i_s * math.expm1(vd / n_vt) + vd / rb

    upper = float(x["timer.ratio"][0]) * v

    def event(_t: float, y: np.ndarray) -> float:
        return float(y[0] - upper)

    event.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        lambda _t, y: [(i_a(float(y[0])) - i) / c],
        (0.0, 10 * high.duration),
        [high.v_start],
        events=event,
        rtol=1e-10,
        atol=1e-13,
    )
    since, volts = high.curve
    assert float(np.interp(upper, volts, since)) == pytest.approx(sol.t_events[0][0], rel=1e-5)
