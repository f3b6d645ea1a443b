"""Canonical layout (``timespec format``): meaning kept, idempotent, comments kept."""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import timespec
from timespec.cli import main
from timespec.errors import SpecSyntaxError
from timespec.language.canonical import layout

ROOT = Path(__file__).resolve().parent.parent

MESSY = """# bench rig
defaults:
        supply   12V +-5%
  ambient -10 °C to 60degC   # range
  resistors E96 1%  100ppm/K,1k to 1M


oneshot relay_hold:   width 150ms +/-8% at supply 12 V ±5%
    trigger 2 ms,spacing 1 s
  use R 4k7 1%, C 1u X7R 10%
# a comment between blocks
delay rst:
 delay 20 ms to 40 ms ; threshold 0.55 to 0.75 of supply
"""

TIDY = """# bench rig
defaults:
  supply 12 V ±5%
  ambient -10 °C to 60 degC  # range
  resistors E96 1% 100 ppm/K, 1k to 1M

oneshot relay_hold: width 150 ms ±8% at supply 12 V ±5%
  trigger 2 ms, spacing 1 s
  use R 4k7 1%, C 1u X7R 10%
# a comment between blocks
delay rst:
  delay 20 ms to 40 ms; threshold 0.55 to 0.75 of supply
"""


def test_messy_spec_is_laid_out() -> None:
    assert layout(MESSY) == TIDY


def test_layout_keeps_the_model() -> None:
    assert timespec.parse(layout(MESSY)) == timespec.parse(MESSY)


def test_layout_is_idempotent_on_the_shipped_examples() -> None:
    for path in sorted((ROOT / "examples").glob("*.tspec")):
        text = path.read_text(encoding="utf-8")
        assert layout(text) == text, path.name


def test_broken_spec_is_not_laid_out() -> None:
    with pytest.raises(SpecSyntaxError):
        layout("oneshot a: width 150 ms ± at supply 12 V")


# A grammar of valid statements, to check the round trip on many specs.
VALUES = st.sampled_from(
    [
        "width 150 ms ±8%",
        "width 40ms +12% -6%",
        "width 1 s +- 50 ms",
        "supply 12 V ±5%",
        "supply 4.5 V to 5.5 V",
        "ambient -10 degC to 60 °C",
        "life 5 years",
        "resistors E96 1% 50 ppm/K, 1k to 2M",
        "capacitors E12 2% PP , 10n to 1u",
        "capacitors E6 10% X7R pairs",
        "trigger 2 ms, spacing 1 s",
        "timer cmos, initial ±2%",
        "use R 619k, C 220n",
        "leakage 5 nA max",
        "spread normal 3 sigma",
        "samples 5000",
    ]
)


@settings(max_examples=60, deadline=None)
@given(
    stmts=st.lists(VALUES, min_size=1, max_size=8, unique=True),
    indent=st.sampled_from(["", " ", "    ", "\t"]),
    one_line=st.booleans(),
)
def test_parse_of_layout_equals_parse(stmts: list[str], indent: str, one_line: bool) -> None:
    # Property: layout never changes what a spec means, and laying out twice changes nothing.
    if one_line:
        text = "oneshot a: " + " ; ".join(stmts) + "\n"
    else:
        text = "oneshot a:\n" + "".join(f"{indent}{s}   # note\n" for s in stmts)
    try:
        before = timespec.parse(text)
    except timespec.SpecError:
        # Not every random combination is a complete block; the layout must still agree.
        with pytest.raises(timespec.SpecError):
            timespec.parse(layout(text))
        return
    tidy = layout(text)
    assert timespec.parse(tidy) == before
    assert layout(tidy) == tidy


def test_cli_format_check_and_write(tmp_path: Path) -> None:
    spec = tmp_path / "rig.tspec"
    spec.write_text(MESSY, encoding="utf-8")
    out = io.StringIO()
    assert main(["format", "--check", str(spec)], stdout=out, stderr=io.StringIO()) == 1
    assert "would lay out" in out.getvalue()
    assert spec.read_text(encoding="utf-8") == MESSY  # --check changes nothing
    assert main(["format", "--write", str(spec)], stdout=io.StringIO(), stderr=io.StringIO()) == 0
    assert spec.read_text(encoding="utf-8") == TIDY
    assert main(["format", "--check", str(spec)], stdout=io.StringIO(), stderr=io.StringIO()) == 0


def test_cli_format_leaves_every_file_alone_when_one_is_broken(tmp_path: Path) -> None:
    good = tmp_path / "good.tspec"
    bad = tmp_path / "bad.tspec"
    good.write_text(MESSY, encoding="utf-8")
    bad.write_text("oneshot a: width 150 ms ±\n", encoding="utf-8")
    err = io.StringIO()
    code = main(["format", "--write", str(good), str(bad)], stdout=io.StringIO(), stderr=err)
    assert code == 2
    assert "bad.tspec:1:" in err.getvalue()
    assert good.read_text(encoding="utf-8") == MESSY
