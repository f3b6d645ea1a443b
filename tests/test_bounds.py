"""Every number of a spec is finite and inside its statement's range, or a located error.

The ranges are data (:mod:`timespec.language.bounds`); these tests check the
reproducers of issue 11 (each once reported MEETS or escaped as a bare
ValueError), that every shipped example stays inside the ranges, and that the
language reference's bounds table agrees with the data.
"""

from __future__ import annotations

import pathlib

import pytest

import timespec
from timespec.errors import SpecError, SpecValueError
from timespec.language.bounds import rst_table

ROOT = pathlib.Path(__file__).resolve().parent.parent

CRYSTAL = (
    "crystal clk:\n  frequency 16 MHz\n  load 10 pF\n  shunt 3 pF\n  motional 10 fF\n"
    "  esr 40 ohm max\n  accuracy ±100 ppm\n  supply 3.3 V\n  ambient -20 degC to 70 degC\n"
)
ONESHOT = (
    "oneshot hold:\n  width 150 ms ±8%\n  supply 5 V ±5%\n  ambient 0 degC to 50 degC\n"
    "  capacitors E12 5% C0G, 1n to 1u\n  resistors E24 1% 100 ppm/K, 1k to 1M\n"
)
DELAY = (
    "delay d:\n  delay 20 ms to 40 ms\n  threshold 0.4 to 0.6 of supply\n  supply 5 V\n"
    "  capacitors E12 10% X7R, 10n to 2u2\n"
)


def _replace(text: str, keyword: str, line: str) -> str:
    lines = text.splitlines()
    out = [f"  {line}" if ln.strip().startswith(keyword + " ") else ln for ln in lines]
    if out == lines:
        out.append(f"  {line}")
    return "\n".join(out) + "\n"


def _error(text: str) -> SpecError:
    with pytest.raises(SpecError) as info:
        timespec.solve(timespec.parse(text, path="t.tspec"))
    assert type(info.value) is not ValueError
    return info.value


def test_the_bases_meet_or_solve() -> None:
    # The unmodified specs are valid, so each case below fails for its one line.
    for text in (CRYSTAL, ONESHOT, DELAY):
        timespec.solve(timespec.parse(text))


CRYSTAL_CASES = [
    ("frequency", "frequency 1e400 MHz", "not a finite number"),
    ("frequency", "frequency 500 MHz", "out of range"),
    ("swing", "swing 1e400 V", "not a finite number"),
    ("motional", "motional 1e300 F", "out of range"),
    ("esr", "esr 1e400 ohm max", "not a finite number"),
    ("accuracy", "accuracy ±-1 ppm", "negative"),
    ("tolerance", "tolerance ±-1 ppm", "negative"),
    ("stability", "stability ±-1 ppm", "negative"),
    ("aging", "aging ±-1 ppm/year", "negative"),
    ("life", "life 1e300 years", "out of range"),
    ("tolerance", "tolerance ±1e400 ppm", "not a finite number"),
    ("ambient", "ambient -20 degC to 1e400 degC", "not a finite number"),
    ("supply", "supply 1e400 V", "not a finite number"),
]


@pytest.mark.parametrize(("keyword", "line", "what"), CRYSTAL_CASES)
def test_crystal_reproducers_are_located(keyword: str, line: str, what: str) -> None:
    err = _error(_replace(CRYSTAL, keyword, line))
    assert isinstance(err, SpecValueError)
    text = str(err)
    assert text.startswith("t.tspec:")
    assert what in text
    assert "^" in text
    assert f"'{keyword}'" in text


def test_crystal_frequency_message_names_the_range() -> None:
    err = _error(_replace(CRYSTAL, "frequency", "frequency 1e400 MHz"))
    assert err.line == 2
    assert err.column == 13
    assert err.hint == (
        "'frequency' in a crystal block takes 1 kHz to 200 MHz "
        "(quartz crystals in a Pierce loop run from 1 kHz to 200 MHz)"
    )


RC_CASES = [
    (ONESHOT, "leakage", "leakage 1e400 A max"),
    (ONESHOT, "leakage", "leakage 1 A max"),
    (ONESHOT, "resistors", "resistors E24 1% 1e400 ppm/K, 1k to 1M"),
    (ONESHOT, "capacitors", "capacitors E12 5% C0G, 1n to 1e400 F"),
    (ONESHOT, "capacitors", "capacitors E12 1e400% C0G, 1n to 1u"),
    (ONESHOT, "spread", "spread normal 1e400 sigma"),
    (ONESHOT, "timer", "timer cmos, initial ±1e400%, drift ±100 ppm/K"),
    (ONESHOT, "timer", "timer cmos, initial ±2%, drift ±1e400 ppm/K"),
    (ONESHOT, "control", "control 1e400 V ±2%"),
    (ONESHOT, "width", "width 1e400 ms ±8%"),
    (ONESHOT, "life", "life 1e300 years"),
    (ONESHOT, "supply", "supply 5 V ±-5%"),
    (DELAY, "threshold", "threshold 0.4 to 1e400 of supply"),
    (DELAY, "start", "start 1e400 V"),
]


@pytest.mark.parametrize(("base", "keyword", "line"), RC_CASES)
def test_rc_reproducers_are_located(base: str, keyword: str, line: str) -> None:
    err = _error(_replace(base, keyword, line))
    assert str(err).startswith("t.tspec:")
    assert err.line is not None


def test_every_shipped_example_is_inside_the_bounds() -> None:
    for path in sorted((ROOT / "examples").glob("*.tspec")):
        timespec.load(path)


def test_docs_table_matches_the_data() -> None:
    page = (ROOT / "docs" / "language.rst").read_text(encoding="utf-8")
    start = page.index(".. bounds-table-start\n\n") + len(".. bounds-table-start\n\n")
    end = page.index("\n.. bounds-table-end")
    assert page[start:end] == rst_table()
