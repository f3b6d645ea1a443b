"""The timespec-table directive's ``:plot:`` option puts a chart into the built page."""

from __future__ import annotations

import contextlib
import io
from pathlib import Path

import pytest

pytest.importorskip("sphinx")
pytest.importorskip("matplotlib")

from sphinx.cmd.build import build_main

# Invented scenario: the timing of a bakery proofing cabinet's door buzzer.
SPEC = """\
defaults:
  supply 5 V ±5%
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 2% PP, 10n to 1u
  timer cmos

oneshot buzzer_hold:
  width 120 ms ±10%

crystal cabinet_clock:
  frequency 4 MHz
  load 10 pF
  stray 3 pF to 5 pF
  shunt 2 pF
  motional 4 fF
  esr 80 ohm max
  drive 300 uW max
  gm 8 mA/V
  swing 2 V
  tolerance ±20 ppm
  stability ±30 ppm
  aging ±3 ppm/year
  accuracy ±150 ppm
"""


def _build(tmp_path: Path, options: str, builder: str = "html") -> tuple[int, str, Path]:
    src = tmp_path / "src"
    src.mkdir()
    (src / "conf.py").write_text('extensions = ["timespec.sphinxext"]\n', encoding="utf-8")
    (src / "board.tspec").write_text(SPEC, encoding="utf-8")
    page = "Cabinet\n=======\n\n.. timespec-table:: board.tspec\n" + options
    (src / "index.rst").write_text(page, encoding="utf-8")
    out = tmp_path / "out"
    # with -q only warnings reach stderr; captured here rather than with '-w FILE', whose
    # file older Sphinx releases leave open
    err = io.StringIO()
    with contextlib.redirect_stderr(err):
        code = build_main(["-W", "--keep-going", "-q", "-E", "-b", builder, str(src), str(out)])
    return code, err.getvalue(), out


def test_waveform_is_embedded_as_an_svg(tmp_path: Path) -> None:
    code, warnings, out = _build(tmp_path, "   :blocks: buzzer_hold\n   :plot: waveform\n")
    assert code == 0 and warnings == ""
    html = (out / "index.html").read_text(encoding="utf-8")
    (image,) = (out / "_images").glob("timespec-waveform-*.svg")
    assert f'src="_images/{image.name}"' in html
    assert image.read_bytes().startswith(b"<?xml")
    # nothing is written into the source tree
    assert sorted(p.name for p in (tmp_path / "src").iterdir()) == [
        "board.tspec",
        "conf.py",
        "index.rst",
    ]


def test_nothing_to_draw_is_a_warning(tmp_path: Path) -> None:
    code, warnings, _ = _build(
        tmp_path, "   :blocks: cabinet_clock\n   :plot: waveform\n", builder="text"
    )
    assert code != 0 and "nothing to plot: no block has a capacitor waveform" in warnings
    assert "crystal blocks" in warnings and "<spec>" not in warnings


def test_unknown_kind_is_refused(tmp_path: Path) -> None:
    code, warnings, _ = _build(tmp_path, "   :plot: bode\n", builder="text")
    assert code != 0 and "bode" in warnings
