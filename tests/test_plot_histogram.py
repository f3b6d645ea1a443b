"""Monte Carlo histograms: the very samples of the analysis, every one counted."""

from __future__ import annotations

import numpy as np
import pytest

import timespec
from timespec.design.result import Result
from timespec.outputs.histogram import BINS, histogram_chart, histograms, output_samples

# Invented scenario: a kiln door interlock's timing (a design aid; the real
# interlock is hard-wired).  One pulse, one clock, one one-sided limit.
KILN = """\
defaults:
  supply 12 V ±5%
  ambient 0 degC to 60 degC
  resistors E96 1% 50 ppm/K, 1k to 1M
  capacitors E12 2% PP, 10n to 1u
  timer cmos
  samples 3000
  seed 11

oneshot door_debounce:
  width 18 ms ±10%

oneshot lamp_min:
  width 6 ms min

astable beacon:
  frequency 4 Hz ±15%
"""


@pytest.fixture(scope="module")
def kiln() -> Result:
    return timespec.solve(timespec.parse(KILN), fixes=False)


def test_samples_are_the_analysed_ones(kiln: Result) -> None:
    # The stored statistics were computed from the same draws: with one chunk the
    # percentiles are exact (numpy.percentile, linear interpolation), so they match.
    for b in kiln.blocks:
        assert b.monte_carlo is not None
        drawn = output_samples(b)
        for name, stats in b.monte_carlo.outputs.items():
            x = drawn[name]
            assert x.size == b.monte_carlo.samples == 3000
            for p, value in stats.percentiles.items():
                assert np.percentile(x, p) == pytest.approx(value, rel=1e-12, abs=0.0)


def test_another_seed_gives_other_samples(kiln: Result) -> None:
    b = kiln.block("door_debounce")
    a = output_samples(b)["width"]
    again = output_samples(b)["width"]
    other = output_samples(b, seed=12)["width"]
    assert np.array_equal(a, again) and not np.array_equal(a, other)


def test_counts_sum_to_the_samples(kiln: Result) -> None:
    hs = histograms(kiln)
    # every required output: width, width, frequency
    assert [(h.block, h.output) for h in hs] == [
        ("door_debounce", "width"),
        ("lamp_min", "width"),
        ("beacon", "frequency"),
    ]
    for h in hs:
        assert h.counts.size == BINS and h.edges.size == BINS + 1
        assert int(h.counts.sum()) + h.non_finite == 3000
        # the bins reach the worst case at both ends
        assert h.edges[0] <= h.worst[0] and h.edges[-1] >= h.worst[1]


def test_one_sided_requirement_keeps_its_open_side(kiln: Result) -> None:
    (h,) = [h for h in histograms(kiln, ["lamp_min"])]
    assert h.required == (0.006, float("inf"))


def test_chart_structure(kiln: Result) -> None:
    pytest.importorskip("matplotlib")
    fig = histogram_chart(kiln, ["door_debounce", "beacon"])
    assert len(fig.axes) == 2
    assert [ax.get_title() for ax in fig.axes] == [
        "door_debounce width: 3000 samples",
        "beacon frequency: 3000 samples",
    ]
    for ax in fig.axes:
        assert len(ax.patches) >= 1  # the histogram
        assert ax.get_ylabel() == "samples"
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert labels == ["Monte Carlo samples", "required window", "worst case", "nominal"]


def test_upper_bound_opens_its_zero_end() -> None:
    # ``2 ms max`` is stored as 0 … 2 ms; the chart draws it as an upper bound only.
    spec = timespec.parse(KILN.replace("width 6 ms min", "width 9 ms max"))
    result = timespec.solve(spec, statistics=False, fixes=False)
    (h,) = histograms(result, ["lamp_min"], samples=200)
    assert h.required[0] == float("-inf") and h.required[1] == pytest.approx(9e-3)
