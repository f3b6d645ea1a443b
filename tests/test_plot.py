"""Margin chart: rows scaled to their own requirement, and an image written."""

from __future__ import annotations

import io
from pathlib import Path

import pytest

import timespec
from timespec.cli import main
from timespec.outputs.plot import margin_rows

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
    # Regression: SVG and PDF embedded the date, so every run differed.
    pytest.importorskip("matplotlib")
    out = []
    for i in range(2):
        dest = tmp_path / f"m{i}{suffix}"
        code = main(
            ["plot", str(DEMO), "-o", str(dest), "--samples", "300"],
            stdout=io.StringIO(),
            stderr=io.StringIO(),
        )
        assert code == 0
        out.append(dest.read_bytes())
    assert out[0] == out[1]
