"""Ambient sweeps: the model at the range ends, the corners through their worst case."""

from __future__ import annotations

import numpy as np
import pytest

import timespec
from timespec.analysis.factors import call_evaluate
from timespec.design.result import Result
from timespec.families import family
from timespec.outputs.ambient import POINTS, ambient_chart, ambient_sweep, ambient_sweeps
from timespec.outputs.waveform import nominal_inputs

# Invented scenario: a cold-store door alarm's timing board, ambient well below zero.
COLD = """\
defaults:
  supply 5 V ±5%
  ambient -30 degC to 40 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% PET, 10n to 1u
  timer cmos

oneshot alarm_hold:
  width 250 ms ±15%

relaxation chirp:
  frequency 1 kHz to 4 kHz
  gate highspeed
"""


@pytest.fixture(scope="module")
def cold() -> Result:
    return timespec.solve(timespec.parse(COLD), statistics=False, fixes=False)


def _model_at(cold: Result, block: str, output: str, at: dict[str, float], temp: float) -> float:
    b = cold.block(block)
    assert b.best is not None
    x = {k: np.array([at.get(k, float(v[0]))]) for k, v in nominal_inputs(b).items()}
    x["temp"] = np.array([temp])
    model = family(b.block.kind).evaluate(b.block, b.best.design.variant)
    return float(call_evaluate(model, x, 1)[output][0])


@pytest.mark.parametrize(("block", "output"), [("alarm_hold", "width"), ("chirp", "frequency")])
def test_endpoints_are_the_model_at_the_range_ends(cold: Result, block: str, output: str) -> None:
    b = cold.block(block)
    assert b.best is not None
    out = b.best.output(output)
    s = ambient_sweep(b, out)
    assert s.temps.size == POINTS
    assert (s.temps[0], s.temps[-1]) == (-30.0, 40.0)
    for i, temp in ((0, -30.0), (-1, 40.0)):
        assert s.nominal[i] == pytest.approx(_model_at(cold, block, output, {}, temp), rel=1e-12)
        low = _model_at(cold, block, output, dict(out.low_at), temp)
        assert s.low[i] == pytest.approx(low, rel=1e-12)


def test_corner_curves_pass_through_the_worst_case(cold: Result) -> None:
    # The worst-case search put the extremes at one ambient; the corner parts,
    # swept, pass through the extreme there (the search's own corner).
    b = cold.block("alarm_hold")
    assert b.best is not None
    out = b.best.output("width")
    s = ambient_sweep(b, out, points=2)
    t_low, t_high = out.low_at["temp"], out.high_at["temp"]
    assert t_low in (-30.0, 40.0) and t_high in (-30.0, 40.0)
    assert s.low[0 if t_low == -30.0 else 1] == pytest.approx(out.low, rel=1e-9)
    assert s.high[0 if t_high == -30.0 else 1] == pytest.approx(out.high, rel=1e-9)
    # and every curve stays inside the worst-case window
    assert np.all(s.low >= out.low * (1 - 1e-9)) and np.all(s.high <= out.high * (1 + 1e-9))


def test_one_sweep_per_required_output(cold: Result) -> None:
    names = [(s.block, s.output) for s in ambient_sweeps(cold)]
    assert names == [("alarm_hold", "width"), ("chirp", "frequency")]


def test_chart_structure(cold: Result) -> None:
    pytest.importorskip("matplotlib")
    fig = ambient_chart(cold)
    assert len(fig.axes) == 2
    for ax in fig.axes:
        assert ax.get_xlabel() == "ambient (°C)"
        assert len(ax.get_lines()) >= 3  # nominal, low corner, high corner
        assert ax.get_xlim() == (-30.0, 40.0)
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert labels[:3] == ["nominal parts", "low-corner parts", "high-corner parts"]
