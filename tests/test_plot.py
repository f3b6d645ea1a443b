"""Margin chart: rows scaled to their own requirement, and an image written."""

from __future__ import annotations

import io
from pathlib import Path

import pytest

import timespec
from timespec.cli import main
from timespec.outputs.plot import CLIP, margin_chart, margin_rows

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "examples" / "bench_instrument.tspec"


def test_rows_are_scaled_to_the_requirement() -> None:
    result = timespec.solve(timespec.load(DEMO), samples=500, fixes=False)
    rows = margin_rows(result)
    assert len(rows) == 8  # every two-sided requirement of the demo
    hold = next(r for r in rows if r.label == "display_blank width")
    out = result.block("display_blank").best.output("width")  # type: ignore[union-attr]
    # −100 … +100 is the required window: 270 ms … 330 ms
    assert hold.low == pytest.approx(100 * (out.low - 0.3) / 0.03)
    assert hold.high == pytest.approx(100 * (out.high - 0.3) / 0.03)
    for row in rows:
        assert row.meets == (row.low >= -100 and row.high <= 100)


def test_cli_plot_writes_an_image(tmp_path: Path) -> None:
    pytest.importorskip("matplotlib")
    dest = tmp_path / "margins.png"
    out = io.StringIO()
    code = main(
        ["plot", str(DEMO), "-o", str(dest), "--samples", "300"], stdout=out, stderr=io.StringIO()
    )
    assert code == 0
    assert dest.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert [p.name for p in tmp_path.iterdir()] == ["margins.png"]


def test_cli_plot_refuses_an_unknown_image_type(tmp_path: Path) -> None:
    err = io.StringIO()
    code = main(
        ["plot", str(DEMO), "-o", str(tmp_path / "x.gif")], stdout=io.StringIO(), stderr=err
    )
    assert code == 2 and "use .png, .svg or .pdf" in err.getvalue()


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_charts_are_the_same_bytes_every_run(tmp_path: Path, suffix: str) -> None:
    # Regression: SVG and PDF embedded the date, so every run differed.  The small
    # pump spec (below) keeps it fast; its pinned block fails, so the exit code is 1.
    pytest.importorskip("matplotlib")
    spec = tmp_path / "pump.tspec"
    spec.write_text(PUMP, encoding="utf-8")
    out = []
    for i in range(2):
        dest = tmp_path / f"m{i}{suffix}"
        code = main(
            ["plot", str(spec), "-o", str(dest), "--samples", "300"],
            stdout=io.StringIO(),
            stderr=io.StringIO(),
        )
        assert code == 1
        out.append(dest.read_bytes())
    assert out[0] == out[1]


# Invented scenario: a garden-pump controller.  One requirement of each shape, and
# the previous revision's pinned parts, ten times too slow for their window.
PUMP = """\
defaults:
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
  timer cmos
  samples 400

oneshot valve_open:
  width 5 ms min

oneshot debounce:
  width 2 ms max

oneshot prime_pinned:
  width 1 ms ±10%
  use R 91k 1%, C 100n C0G 5%

oneshot spray:
  width 20 ms ±10%
"""


@pytest.fixture(scope="module")
def pump() -> timespec.Result:
    return timespec.solve(timespec.parse(PUMP), fixes=False)


def test_one_sided_requirements_are_rows(pump: timespec.Result) -> None:
    rows = {r.label: r for r in margin_rows(pump)}
    assert list(rows) == [
        "valve_open width (min)",
        "debounce width (max)",
        "prime_pinned width",
        "spray width",
    ]
    low = rows["valve_open width (min)"]
    out = pump.block("valve_open").best.output("width")  # type: ignore[union-attr]
    # a lower bound b sits at −100, 2·b at 0: x = −100 + 100·(v − b)/b
    assert low.low == pytest.approx(-100 + 100 * (out.low - 5e-3) / 5e-3)
    assert low.side == "min" and low.meets and low.low >= -100
    high = rows["debounce width (max)"]
    out = pump.block("debounce").best.output("width")  # type: ignore[union-attr]
    assert high.high == pytest.approx(100 + 100 * (out.high - 2e-3) / 2e-3)
    assert high.side == "max" and high.meets and high.high <= 100


def _row_artists(ax: object, y: int) -> list[object]:
    return [
        line
        for line in ax.get_lines()  # type: ignore[attr-defined]
        if len(line.get_ydata()) and all(abs(v - y) < 0.5 for v in line.get_ydata())
    ]


def test_ten_times_too_slow_row_is_visible(pump: timespec.Result) -> None:
    pytest.importorskip("matplotlib")
    rows = margin_rows(pump)
    pinned = next(r for r in rows if r.label == "prime_pinned width")
    # nominal R·C·ln 3 = 91 kΩ · 100 nF · 1.0986 ≈ 10 ms against 0.9 … 1.1 ms: about +9000
    # (555-type monostable, t = R·C·ln 3; the timer datasheets' 1.1·R·C rule)
    assert pinned.low > 80 * CLIP / 4 and not pinned.meets
    fig = margin_chart(pump)
    ax = fig.axes[0]
    lo, hi = ax.get_xlim()
    y = len(rows) - 1 - rows.index(pinned)
    bar = [ln for ln in _row_artists(ax, y) if ln.get_linewidth() == 7]
    assert bar, "the pinned row has no bar"
    xs = [x for ln in bar for x in ln.get_xdata()]
    assert all(lo <= x <= hi for x in xs) and max(xs) - min(xs) > 0
    marks = [ln for ln in _row_artists(ax, y) if ln.get_marker() == ">"]
    assert marks and marks[0].get_xdata()[0] == CLIP
    written = [t.get_text() for t in ax.texts]
    assert any(t.startswith("+") and "%" in t for t in written)


def test_one_sided_rows_are_drawn(pump: timespec.Result) -> None:
    pytest.importorskip("matplotlib")
    fig = margin_chart(pump)
    ax = fig.axes[0]
    labels = [t.get_text() for t in ax.get_yticklabels()]
    assert "valve_open width (min)" in labels and "debounce width (max)" in labels
    lo, hi = ax.get_xlim()
    for label in ("valve_open width (min)", "debounce width (max)"):
        y = ax.get_yticks()[labels.index(label)]
        assert [ln for ln in _row_artists(ax, y) if ln.get_linewidth() == 7]
        # the required band runs from the bound to the chart's edge
        band = [p for p in ax.patches if abs(p.get_y() + p.get_height() / 2 - y) < 1e-9]
        assert len(band) == 1
        left, right = band[0].get_x(), band[0].get_x() + band[0].get_width()
        assert (left, right) == ((-100, hi) if "(min)" in label else (lo, 100))


def _legend(result: timespec.Result) -> list[tuple[str, str]]:
    from matplotlib.colors import to_hex

    leg = margin_chart(result).legends[0]
    out = []
    for handle, text in zip(leg.legend_handles, leg.get_texts(), strict=True):
        colour = handle.get_facecolor() if hasattr(handle, "get_width") else handle.get_color()
        out.append((text.get_text(), to_hex(colour)))
    return out


def test_legend_does_not_depend_on_row_order() -> None:
    pytest.importorskip("matplotlib")
    head, *blocks = PUMP.split("\n\noneshot ")
    first = timespec.solve(timespec.parse(PUMP), statistics=False, fixes=False)
    turned = "\n\noneshot ".join([head, *reversed(blocks)]) + "\n"
    second = timespec.solve(timespec.parse(turned), statistics=False, fixes=False)
    assert [r.label for r in margin_rows(second)] != [r.label for r in margin_rows(first)]
    assert _legend(first) == _legend(second)
    labels = dict(_legend(first))
    # both bar colours are explained whatever row comes first
    assert labels["worst case, meets"] == "#2a7a2a" and labels["worst case, can fail"] == "#b22222"


@pytest.mark.parametrize("kind", ["margin", "waveform", "histogram", "ambient"])
@pytest.mark.parametrize("suffix", [".png", ".svg"])
def test_every_kind_is_the_same_bytes_every_run(
    tmp_path: Path, pump: timespec.Result, kind: str, suffix: str
) -> None:
    pytest.importorskip("matplotlib")
    from timespec.outputs.charts import chart
    from timespec.outputs.figures import figure_bytes

    blocks = ["spray"] if kind != "margin" else []
    one = figure_bytes(chart(pump, kind, blocks), suffix[1:])
    two = figure_bytes(chart(pump, kind, blocks), suffix[1:])
    assert one == two
    if suffix == ".svg":
        text = one.decode("utf-8")
        assert "<dc:date>" not in text and "Matplotlib v" not in text
    else:
        assert b"tIME" not in one and b"Software" not in one


def test_cli_draws_each_kind_and_honours_the_seed(tmp_path: Path) -> None:
    pytest.importorskip("matplotlib")
    spec = tmp_path / "pump.tspec"
    spec.write_text(PUMP, encoding="utf-8")
    images = {}
    for kind, seed in (("histogram", "1"), ("histogram", "2"), ("waveform", "1")):
        dest = tmp_path / f"{kind}-{seed}.svg"
        argv = ["plot", str(spec), "-o", str(dest), "--kind", kind, "--block", "spray"]
        code = main([*argv, "--seed", seed], stdout=io.StringIO(), stderr=io.StringIO())
        assert code == 1  # the verdict of the whole spec: prime_pinned fails
        images[kind, seed] = dest.read_bytes()
    # another seed draws other samples, so another histogram
    assert images["histogram", "1"] != images["histogram", "2"]
    assert images["waveform", "1"].startswith(b"<?xml")


def test_cli_refuses_an_unknown_block(tmp_path: Path) -> None:
    spec = tmp_path / "pump.tspec"
    spec.write_text(PUMP, encoding="utf-8")
    err = io.StringIO()
    argv = ["plot", str(spec), "-o", str(tmp_path / "x.png"), "--block", "sprya"]
    assert main([*argv, "--kind", "ambient"], stdout=io.StringIO(), stderr=err) == 2
    assert "no block named 'sprya'" in err.getvalue()
