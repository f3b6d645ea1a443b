"""Tests for timespec.outputs.tables: part-value tables in Markdown, reST and CSV."""

from __future__ import annotations

import csv
import io
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.design.result import BlockResult, Candidate, OutputResult, Result
from timespec.errors import UsageError
from timespec.families.protocol import Finding
from timespec.language.assemble import parse
from timespec.model import (
    Block,
    CapacitorPolicy,
    Conditions,
    Requirement,
    ResistorPolicy,
    Spec,
    Window,
)
from timespec.outputs.tables import (
    HEADERS,
    JOIN,
    format_part,
    format_quantity,
    format_window,
    render_table,
    table_cells,
)
from timespec.parts.part import Design, Part
from timespec.units import unit_info

SPEC = """
defaults:
  supply 12 V ±5%
  ambient -10 degC to 60 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 1n to 100n
  timer cmos

oneshot relay_hold:
  width 15 ms ±12%

oneshot fan_kick:
  width 2 ms to 2.6 ms
  use R 20k, C 100n

oneshot heater_rest: width 300 us min
"""


@pytest.fixture(scope="module")
def solved() -> Result:
    from timespec.design.solver import solve

    return solve(parse(SPEC, "demo.tspec"))


# --------------------------------------------------------------------------
# synthetic results: several outputs per block, ppm, no design, awkward names


def _block(kind: str, name: str, reqs: tuple[Requirement, ...]) -> Block:
    return Block(
        kind=kind,
        name=name,
        requirements=reqs,
        conditions=Conditions(Window(4.5, 5.5, "voltage", 5.0)),
        resistors=ResistorPolicy(),
        capacitors=CapacitorPolicy(),
    )


def _synthetic() -> Result:
    freq = Requirement("frequency", Window(3.6, 4.4, "frequency", 4.0))
    duty = Requirement("duty", Window(0.25, 0.35, "ratio", 0.30))
    astable = _block("astable", "heart|beat*", (freq, duty))
    parts = (
        Part("RA", "resistance", 4700.0, 0.01, "E96", tempco_ppm=100.0),
        Part("RB", "resistance", 150e3, 0.01, "E96", tempco_ppm=100.0),
        Part("C", "capacitance", 1e-6, 0.1, "E12", dielectric="X7R", pinned=True),
    )
    astable_best = Candidate(
        Design(parts, "diode"),
        (
            OutputResult("frequency", "frequency", "frequency", freq.window, 4.01, 3.7, 4.3),
            OutputResult("duty", "ratio", "duty cycle", duty.window, 0.301, 0.27, 0.33),
            OutputResult("period", "time", "period", None, 0.2494, 0.23, 0.27),
        ),
        (Finding("warning", "imprecise-dielectric", "C is X7R"),),
    )
    accuracy = Requirement("accuracy", Window(-50e-6, 50e-6, "ratio", 0.0))
    crystal = _block("crystal", "mcu, clock", (accuracy,))
    crystal_best = Candidate(
        Design(
            (
                Part("C1", "capacitance", 12e-12, 0.05, "E12", dielectric="C0G"),
                Part("C2", "capacitance", 12e-12, 0.05, "E12", dielectric="C0G"),
            )
        ),
        (
            OutputResult(
                "accuracy", "ratio", "frequency error", accuracy.window, 1e-6, -37.5e-6, 41.2e-6
            ),
        ),
        (),
    )
    delay = _block("delay", '"quoted"_name_', (Requirement("delay", Window(0.02, 0.04, "time")),))
    blocks = (
        BlockResult(astable, "meets", "solved", astable_best),
        BlockResult(crystal, "meets", "solved", crystal_best),
        BlockResult(delay, "infeasible", "solved", None),
    )
    return Result(Spec(tuple(b.block for b in blocks)), blocks)


@pytest.fixture(scope="module")
def synthetic() -> Result:
    return _synthetic()


def _joined(result: Result) -> list[list[str]]:
    return [list(HEADERS)] + [[JOIN.join(c) for c in row] for row in table_cells(result)]


# --------------------------------------------------------------------------
# CSV


@pytest.mark.parametrize("which", ["solved", "synthetic"])
def test_csv_parses_back_to_the_same_cells(which: str, request: pytest.FixtureRequest) -> None:
    result: Result = request.getfixturevalue(which)
    text = render_table(result, "csv")
    # RFC 4180 section 2: records end in CRLF, fields with commas, quotes or line
    # breaks are quoted, quotes doubled; the csv module reads that dialect back.
    rows = list(csv.reader(io.StringIO(text, newline="")))
    assert rows == _joined(result)
    assert text.endswith("\r\n")
    assert text.count("\r\n") == len(result.blocks) + 1


def test_csv_quotes_awkward_names(synthetic: Result) -> None:
    text = render_table(synthetic, "csv")
    # RFC 4180 section 2 rule 7: a double quote inside a field is doubled
    assert '"""quoted""_name_"' in text
    assert '"mcu, clock"' in text


# --------------------------------------------------------------------------
# Markdown


def _md_cells(line: str) -> list[str]:
    assert line.startswith("| ") and line.endswith(" |")
    inner = line[2:-2]
    cells, cur, i = [], "", 0
    while i < len(inner):
        if inner[i] == "\\" and i + 1 < len(inner):
            cur += inner[i + 1]
            i += 2
            continue
        if inner.startswith(" | ", i):
            cells.append(cur)
            cur, i = "", i + 3
            continue
        cur += inner[i]
        i += 1
    cells.append(cur)
    return cells


@pytest.mark.parametrize("which", ["solved", "synthetic"])
def test_markdown_shape(which: str, request: pytest.FixtureRequest) -> None:
    result: Result = request.getfixturevalue(which)
    lines = render_table(result, "markdown").splitlines()
    # a pipe table: header, separator row of dashes, then one row per block
    assert len(lines) == len(result.blocks) + 2
    assert _md_cells(lines[0]) == list(HEADERS)
    assert all(set(c) <= {"-", ":"} and c for c in _md_cells(lines[1]))
    assert len(_md_cells(lines[1])) == len(HEADERS)
    expected = _joined(result)[1:]
    assert [_md_cells(line) for line in lines[2:]] == expected


# --------------------------------------------------------------------------
# reST


def _doctree(text: str) -> object:
    from docutils.core import publish_doctree

    # halt_level 2: any warning (or worse) raises instead of being reported
    return publish_doctree(
        text,
        settings_overrides={"halt_level": 2, "report_level": 1, "warning_stream": io.StringIO()},
    )


@pytest.mark.parametrize("which", ["solved", "synthetic"])
def test_rest_parses_cleanly(which: str, request: pytest.FixtureRequest) -> None:
    pytest.importorskip("docutils")
    from docutils import nodes

    result: Result = request.getfixturevalue(which)
    tree = _doctree(render_table(result, "rest", title="Timing parts"))
    tables = list(tree.findall(nodes.table))  # type: ignore[attr-defined]
    assert len(tables) == 1
    rows = list(tables[0].findall(nodes.row))
    assert len(rows) == len(result.blocks) + 1
    # each cell holds its items as separate lines of a line block
    got = [
        [
            tuple(ln.astext() for ln in entry.findall(nodes.line))
            for entry in row.findall(nodes.entry)
        ]
        for row in rows
    ]
    assert got[0] == [(h,) for h in HEADERS]
    assert got[1:] == [list(row) for row in table_cells(result)]
    title = next(iter(tables[0].findall(nodes.title)))
    assert title.astext() == "Timing parts"


# --------------------------------------------------------------------------
# content


def test_cells_of_a_solved_spec(solved: Result) -> None:
    rows = {row[0][0]: row for row in table_cells(solved)}
    assert list(rows) == ["relay_hold", "fan_kick", "heater_rest"]
    relay = rows["relay_hold"]
    assert relay[1] == ("oneshot",)
    assert relay[3] == ("width 15 ms ±12 %",)
    assert relay[4][0].startswith("width ") and relay[4][0].endswith(" ms")
    fan = rows["fan_kick"]
    # IEC 60063: a pinned part is labelled with the series of its value and tolerance;
    # 100n at 5 % is E24 (1.0 is in every series, 5 % is the E24 tolerance), 20k at 1 %
    # is E96 (2.00 is in E96, 1 % is the E96 tolerance); issue 13
    assert fan[2] == (
        "R 20k E96 ±1 % 100 ppm/K, pinned",
        "C 100n E24 ±5 % C0G, pinned",
    )
    assert fan[3] == ("width 2 ms to 2.6 ms",)
    assert fan[6][0].endswith("(checked)")
    assert rows["heater_rest"][3] == ("width 300 µs min",)
    for name, row in rows.items():
        verdict = solved.block(name).verdict
        assert row[6][0].split()[0] == verdict


def test_cells_of_several_outputs(synthetic: Result) -> None:
    heart, clock, delay = table_cells(synthetic)
    assert heart[1] == ("astable (diode)",)
    # only required outputs are shown, in the order of the requirements
    assert heart[3] == ("frequency 4 Hz ±10 %", "duty 30 % ±5 %")
    assert heart[4] == ("frequency 4.01 Hz", "duty 30.1 %")
    assert heart[5] == ("frequency 3.7 Hz to 4.3 Hz", "duty 27 % to 33 %")
    # frequency errors are shown in ppm
    assert clock[3] == ("accuracy ±50 ppm",)
    assert clock[5] == ("accuracy -37.5 ppm to 41.2 ppm",)
    # no design at all: the requirement is still shown
    assert delay[2] == ("no design",)
    assert delay[3] == ("delay 20 ms to 40 ms",)
    assert delay[4] == ("delay —",)
    assert delay[6] == ("infeasible",)


def test_block_selection(synthetic: Result) -> None:
    rows = table_cells(synthetic, ["mcu, clock", "heart|beat*"])
    assert [r[0][0] for r in rows] == ["mcu, clock", "heart|beat*"]
    with pytest.raises(UsageError, match="no block named 'nope'; the blocks are heart"):
        render_table(synthetic, "csv", blocks=["nope"])


def test_unknown_format(synthetic: Result) -> None:
    with pytest.raises(UsageError, match="unknown table format"):
        render_table(synthetic, "html")  # type: ignore[arg-type]


# --------------------------------------------------------------------------
# quantities


# Expected texts use the SI prefixes of the SI Brochure (BIPM, 9th ed., 2019, table 7):
# f 1e-15, p 1e-12, n 1e-9, µ 1e-6, m 1e-3, k 1e3, M 1e6, G 1e9, T 1e12.
QUANTITIES = [
    (0.1494, "time", "149.4 ms"),
    (2.5e-6, "time", "2.5 µs"),
    (3997.2, "frequency", "3.997 kHz"),
    (12e6, "frequency", "12 MHz"),
    (4.7e-9, "capacitance", "4.7 nF"),
    (15e-15, "capacitance", "15 fF"),
    (412e3, "resistance", "412 kΩ"),
    (2.2e6, "resistance", "2.2 MΩ"),
    (5e-9, "current", "5 nA"),
    (100e-6, "power", "100 µW"),
    (5e-3, "transconductance", "5 mA/V"),
    (-10.0, "temperature", "-10 °C"),
    (100e-6, "tempco", "100 ppm/K"),
    (0.3, "ratio", "30 %"),
    (0.0, "time", "0 s"),
    (1.0, "time", "1 s"),
    (math.inf, "time", "∞ s"),
    (0.99996, "time", "1 s"),  # rounding carries 999.96 ms up to the next prefix
    (999.96e-6, "time", "1 ms"),
]


@pytest.mark.parametrize(("value", "kind", "text"), QUANTITIES)
def test_format_quantity_table(value: float, kind: str, text: str) -> None:
    assert format_quantity(value, kind) == text


def test_format_quantity_ppm() -> None:
    # 1 ppm = 1e-6 (SI Brochure 5.4.7 discourages the word, but the trade uses it)
    assert format_quantity(-32e-6, "ratio", ratio="ppm") == "-32 ppm"


@settings(max_examples=200, deadline=None)
@given(
    mantissa=st.floats(1.0, 9.999, allow_nan=False),
    exponent=st.integers(-14, 11),
    kind=st.sampled_from(["time", "frequency", "resistance", "capacitance", "voltage", "current"]),
)
def test_format_quantity_reads_back_through_pint(mantissa: float, exponent: int, kind: str) -> None:
    """parse(format(x)) ≈ x: the printed unit, read by pint, gives the value to 4 figures."""
    value = mantissa * 10.0**exponent
    number, unit = format_quantity(value, kind).split(" ")
    info = unit_info(unit)  # pint resolves the prefixed unit (kΩ, µF ...)
    assert info.kind == kind
    assert float(number) * info.scale == pytest.approx(value, rel=5.001e-4)
    assert 1.0 <= abs(float(number)) < 1000.0


# --------------------------------------------------------------------------
# windows and parts

WINDOWS = [
    (Window(0.138, 0.162, "time", 0.15), "%", "150 ms ±8 %"),
    (Window(0.0392, 0.046, "time", 0.04), "%", "40 ms +15 % −2 %"),
    (Window(0.02, 0.04, "time"), "%", "20 ms to 40 ms"),
    (Window(0.0, 0.04, "time"), "%", "40 ms max"),
    (Window(300e-6, math.inf, "time"), "%", "300 µs min"),
    (Window(0.25, 0.35, "ratio", 0.3), "%", "30 % ±5 %"),
    (Window(-50e-6, 50e-6, "ratio", 0.0), "ppm", "±50 ppm"),
    (Window(-math.inf, 20e-6, "ratio"), "ppm", "20 ppm max"),
    (Window(5.0, 5.0, "voltage", 5.0), "%", "5 V"),
    (Window(900.0, 1100.0, "frequency"), "%", "0.9 kHz to 1.1 kHz"),
]


@pytest.mark.parametrize(("window", "ratio", "text"), WINDOWS)
def test_format_window(window: Window, ratio: str, text: str) -> None:
    assert format_window(window, ratio=ratio) == text  # type: ignore[arg-type]


def test_format_part() -> None:
    # RKM codes per IEC 60062: the multiplier letter stands for the decimal point
    assert format_part(Part("R", "resistance", 4700.0, 0.01, "E96", tempco_ppm=50.0)) == (
        "R 4k7 E96 ±1 % 50 ppm/K"
    )
    assert format_part(Part("C", "capacitance", 4.7e-9, 0.05, "E12", dielectric="C0G")) == (
        "C 4n7 E12 ±5 % C0G"
    )
    assert (
        format_part(Part("RB", "resistance", 0.47, 0.05, None, tempco_ppm=200.0, pinned=True))
        == "RB R47 no series ±5 % 200 ppm/K, pinned"
    )
