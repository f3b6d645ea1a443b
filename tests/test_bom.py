"""The bill of materials (issue 13 item 4) and the series a pinned part belongs to.

Sources: IEC 60063:2015 for the preferred-number tables and the tolerance tied to each
series (E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 %; E3 above 20 %);
RFC 4180 for CSV (comma separated, CRLF line ends, quotes only where needed); IEEE 315 /
ASME Y14.44 for reference designators (class letters, then a number).
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

import timespec
from timespec.cli import main
from timespec.outputs.jsondoc import FORMAT_MINOR, result_to_dict
from timespec.outputs.tables import (
    BOM_HEADERS,
    bom_rows,
    designators,
    render_bom,
    technology,
)
from timespec.parts.part import Part
from timespec.parts.series import part_series

# Every part pinned, two blocks: the BOM of a checked design.
PINNED = """\
oneshot lamp_hold:
  width 170 ms ±20%
  supply 12 V ±5%
  use R 470k 5%, C 330n PP 5%
  refs R R12, C C7
oneshot buzzer_kick:
  width 1.1 ms ±60%
  supply 12 V ±5%
  use R 1k 5%, C 1u X7R 10%
  refs R R14
"""

# Nothing fits a 10 µs window around 20 ms: infeasible, with a closest design.
INFEASIBLE = """\
delay late_start:
  delay 20 ms to 20.01 ms
  threshold 0.55 to 0.75 of supply
  supply 5 V ±5%
  refs R R30
"""

# Needs R near 210k, which E24 has only as a pair (100k + 110k in series).
PAIRS = """\
defaults:
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  resistors E24 1% 50 ppm/K, 1k to 1M, pairs
oneshot two_names:
  width 2.31 ms ±6.5%
  timer cmos
  use C 10n 1%
  refs R R12 R13, C C7
oneshot one_name:
  width 2.31 ms ±6.5%
  timer cmos
  use C 10n 1%
  refs R R20
"""


def _solve(text: str) -> timespec.Result:
    return timespec.solve(timespec.parse(text), statistics=False, fixes=False)


@pytest.fixture(scope="module")
def pinned() -> timespec.Result:
    return _solve(PINNED)


# --------------------------------------------------------------------------
# the series of a pinned part


@pytest.mark.parametrize(
    ("value", "tolerance", "label"),
    [
        # IEC 60063: 4.7 is in E3, E6, E12 and E24 (not E48: 4.64, 4.87); 5 % is the
        # E24 tolerance, so a 470k 5 % part is an E24 part, not "E3" (issue 13).
        (470e3, 0.05, "E24"),
        # IEC 60063: 1.0 is in every series; at 5 % it is an E24 part, not "E96" (issue 13).
        (1e3, 0.05, "E24"),
        # IEC 60063: 1 % is the E96 tolerance, 0.5 % and tighter E192, 10 % E12, 20 % E6,
        # 2 % E48, above 20 % E3.
        (1e3, 0.01, "E96"),
        (1e3, 0.001, "E192"),
        (1e3, 0.10, "E12"),
        (1e3, 0.20, "E6"),
        (1e3, 0.02, "E48"),
        (1e3, 0.30, "E3"),
        # IEC 60063: 2.2 is in no three-digit series (E48/E96 have 2.21); a 1 % part of
        # an E24 value is an E24 part (tighter grades of E24 values: common practice).
        (2.2e3, 0.01, "E24"),
        # IEC 60063: 4.75 is only in E96 and E192; a 5 % part of it keeps the coarsest
        # series that holds its value, E96 (the tolerance column says it is looser).
        (4.75e3, 0.05, "E96"),
        # capacitors read the same tables: 330n 5 % (3.3 in E24), 1u 10 % (E12)
        (330e-9, 0.05, "E24"),
        (1e-6, 0.10, "E12"),
        # 1.234 is in no IEC 60063 series
        (1.234e3, 0.01, None),
    ],
)
def test_part_series(value: float, tolerance: float, label: str | None) -> None:
    assert part_series(value, tolerance) == label


def test_pinned_parts_carry_their_own_series(pinned: timespec.Result) -> None:
    # the policies are the defaults (E96 resistors, E12 capacitors): before issue 13 the
    # pinned 1k 5 % resistor was labelled with the policy's E96 and 470k 5 % with E3
    lamp = {p.ref: p for p in pinned.block("lamp_hold").parts}
    buzzer = {p.ref: p for p in pinned.block("buzzer_kick").parts}
    assert (lamp["R"].series, lamp["C"].series) == ("E24", "E24")
    assert (buzzer["R"].series, buzzer["C"].series) == ("E24", "E12")


def test_a_stated_series_wins() -> None:
    res = _solve(PINNED.replace("use R 470k 5%", "use R 470k 5% E12"))
    assert res.block("lamp_hold").best.design.part("R").series == "E12"  # type: ignore[union-attr]


# --------------------------------------------------------------------------
# the rows


def test_bom_has_one_row_per_part(pinned: timespec.Result) -> None:
    rows = bom_rows(pinned)
    assert [r[:4] for r in rows] == [
        ("R12", "lamp_hold", "R", "470 kΩ"),
        ("C7", "lamp_hold", "C", "330 nF"),
        ("R14", "buzzer_kick", "R", "1 kΩ"),
        # a part the refs statement does not name is designated <block>.<part>
        ("buzzer_kick.C", "buzzer_kick", "C", "1 µF"),
    ]
    assert all(len(r) == len(BOM_HEADERS) for r in rows)
    by = {r[0]: dict(zip(BOM_HEADERS, r, strict=True)) for r in rows}
    assert by["R12"]["Series"] == "E24" and by["R12"]["Tolerance"] == "±5 %"
    assert by["R12"]["Tempco or dielectric"] == "100 ppm/K"
    assert by["R12"]["Technology"] == "thick film"
    assert by["C7"]["Tempco or dielectric"] == "PP"
    assert by["C7"]["Technology"] == "polypropylene film"
    assert by["C7"]["Rated voltage"] == "—"  # film: no rating stated, none assumed
    assert by["buzzer_kick.C"]["Technology"] == "class 2 ceramic"
    # no rating stated: the DC-bias bound assumed twice the highest supply, 2 × 12.6 V
    assert by["buzzer_kick.C"]["Rated voltage"] == "25.2 V min (assumed)"
    assert {r["Pinned"] for r in by.values()} == {"yes"}
    assert by["R12"]["Verdict"] == pinned.block("lamp_hold").verdict


def test_stated_rating_is_shown() -> None:
    res = _solve(PINNED.replace("C 1u X7R 10%", "C 1u X7R 10% rated 50 V"))
    row = next(r for r in bom_rows(res) if r[0] == "buzzer_kick.C")
    assert row[BOM_HEADERS.index("Rated voltage")] == "50 V"


def test_infeasible_block_lists_its_closest_design_marked() -> None:
    res = _solve(INFEASIBLE)
    assert res.block("late_start").verdict == "infeasible"
    rows = bom_rows(res)
    assert [r[0] for r in rows] == ["R30", "late_start.C"]
    verdict = BOM_HEADERS.index("Verdict")
    assert {r[verdict] for r in rows} == {"infeasible: closest design"}
    assert {r[BOM_HEADERS.index("Pinned")] for r in rows} == {"no"}


def test_block_with_no_design_gives_one_row() -> None:
    # 150 ms needs RC near 0.14 s; these ranges reach 1 MΩ × 100 nF = 0.1 s
    res = _solve(
        "oneshot relay_hold:\n  width 150 ms ±8%\n  supply 12 V ±5%\n  refs R R1\n"
        "  capacitors E12 5% C0G, 100p to 100n\n"
    )
    assert res.block("relay_hold").best is None
    (row,) = bom_rows(res)
    assert row[:2] == ("—", "relay_hold")
    assert row[BOM_HEADERS.index("Verdict")] == "infeasible: no design"


def test_pairs_get_two_rows_and_two_designators() -> None:
    res = _solve(PAIRS)
    rows = bom_rows(res)
    value, note = BOM_HEADERS.index("Value"), BOM_HEADERS.index("Note")
    two = [r for r in rows if r[1] == "two_names"]
    # 100k + 110k = 210k in series (IEC 60063 E24 values), smaller first
    assert [(r[0], r[value]) for r in two] == [
        ("R12", "100 kΩ"),
        ("R13", "110 kΩ"),
        ("C7", "10 nF"),
    ]
    assert two[0][note] == "in series with R13: R = 210 kΩ"
    one = [r[0] for r in rows if r[1] == "one_name"]
    assert one == ["R20A", "R20B", "one_name.C"]  # IEEE 315 suffix letters (from memory)
    blk = res.block("two_names")
    part = blk.best.design.part("R")  # type: ignore[union-attr]
    assert designators(blk.block, part) == ("R12", "R13")
    doc = {b["name"]: b for b in result_to_dict(res)["blocks"]}
    (r,) = [p for p in doc["one_name"]["parts"] if p["ref"] == "R"]
    assert r["designator"] == "R20" and r["pair"]["designators"] == ["R20A", "R20B"]


def test_resistor_technology_follows_the_tempco_bound() -> None:
    # typical tempcos, thick film 100, metal film 50, thin film 25 ppm/K (from memory)
    def res(tc: float) -> Part:
        return Part("R", "resistance", 1e3, 0.01, "E96", tempco_ppm=tc)

    assert technology(res(200.0)) == "thick film"
    assert technology(res(100.0)) == "thick film"
    assert technology(res(50.0)) == "metal film"
    assert technology(res(25.0)) == "thin film"
    assert technology(res(10.0)) == "low-TCR thin film"
    cap = Part("C", "capacitance", 1e-9, 0.05, "E12", dielectric="C0G")
    assert technology(cap) == "class 1 ceramic"  # EIA-198: C0G is a class 1 code
    assert technology(Part("C", "capacitance", 1e-4, 0.2, "E6", dielectric="AL")) == (
        "aluminium electrolytic"
    )


# --------------------------------------------------------------------------
# formats


def test_csv_is_rfc4180_and_deterministic(pinned: timespec.Result) -> None:
    text = render_bom(pinned, "csv")
    assert text == render_bom(_solve(PINNED), "csv")  # the same spec, the same bytes
    # RFC 4180: CRLF line ends, a header row, every record with the same field count
    assert text.endswith("\r\n") and "\n" not in text.replace("\r\n", "")
    records = list(csv.reader(io.StringIO(text, newline="")))
    assert tuple(records[0]) == BOM_HEADERS
    assert len(records) == 5 and {len(r) for r in records} == {len(BOM_HEADERS)}
    # an empty cell, not a dash, where nothing applies
    c7 = next(r for r in records if r[0] == "C7")
    assert c7[BOM_HEADERS.index("Rated voltage")] == ""
    # RFC 4180: fields without a comma, quote or line break are written bare
    assert text.splitlines()[0] == ",".join(BOM_HEADERS)


def test_markdown_and_rest(pinned: timespec.Result) -> None:
    md = render_bom(pinned, "markdown", blocks=["lamp_hold"])
    lines = md.splitlines()
    assert lines[0] == "| " + " | ".join(BOM_HEADERS) + " |"
    assert len(lines) == 4 and lines[2].startswith("| R12 | lamp_hold | R | 470 kΩ | E24 |")
    rest = render_bom(pinned, "rest", title="Lamp BOM")
    assert rest.startswith(".. list-table:: Lamp BOM\n")
    assert "| R12" in rest


def test_cli_table_bom(tmp_path: Path) -> None:
    spec = tmp_path / "board.tspec"
    spec.write_text(PINNED, encoding="utf-8")
    out = io.StringIO()
    code = main(["table", str(spec), "--bom", "--format", "csv"], stdout=out)
    result = _solve(PINNED)
    assert code == (0 if result.ok else 1)
    assert out.getvalue() == render_bom(result, "csv")


def test_json_parts_carry_designators() -> None:
    doc = result_to_dict(_solve(PINNED))
    assert doc["format_minor"] == FORMAT_MINOR == 2
    blocks = {b["name"]: b for b in doc["blocks"]}
    lamp = {p["ref"]: p for p in blocks["lamp_hold"]["parts"]}
    assert (lamp["R"]["designator"], lamp["C"]["designator"]) == ("R12", "C7")
    buzzer = {p["ref"]: p for p in blocks["buzzer_kick"]["parts"]}
    assert buzzer["C"]["designator"] is None
    json.dumps(doc, allow_nan=False)
