"""Every JSON document timespec writes validates against the schema shipped for it.

The validator is the third-party ``jsonschema`` package, an implementation of the
JSON Schema 2020-12 standard (json-schema.org, draft 2020-12: Core and Validation),
so the check stands outside timespec.  Each document is validated twice: against
the schema as shipped (open: later minor versions may add keys) and against its
closed form (``additionalProperties: false`` wherever keys are listed), which fails
on any emitted key the schema, and so the docs page, does not describe.
"""

from __future__ import annotations

import copy
import io
import json
import re
from pathlib import Path
from typing import Any

import pytest

jsonschema = pytest.importorskip("jsonschema")

import timespec  # noqa: E402
from timespec.analysis.stats import CAPABILITY_MIN_SAMPLES  # noqa: E402
from timespec.cli import main  # noqa: E402
from timespec.design.limits import fixture_limits, limits_to_dict  # noqa: E402
from timespec.model import BLOCK_KINDS  # noqa: E402
from timespec.outputs.jsondoc import FORMAT_MINOR, FORMAT_VERSION, result_to_json  # noqa: E402
from timespec.outputs.schemas import (  # noqa: E402
    MINOR_KEYWORD,
    SCHEMA_NAMES,
    load_schema,
    schema_minor,
    schema_text,
)

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.tspec"))
WITH_FIXTURE = [p for p in EXAMPLES if "\nfixture:" in p.read_text(encoding="utf-8")]
SCHEMA_DIR = ROOT / "timespec" / "schemas"
DOCS_PAGE = ROOT / "docs" / "json.rst"

# An invented scenario: the controller board of a bench-top reflow oven, one block
# per family and per verdict (pinned meets and fails, solved meets, infeasible with
# and without a fix), a series pair, board designators, a one-sided requirement and
# a capture fixture.
MIX = """
defaults:
  supply 5 V ±5%
  ambient 0 degC to 55 degC
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
  timer cmos

oneshot door_hold:
  width 150 ms ±20%
  use R 150k 1%, C 1u PP 2%
  refs R R12, C C7

oneshot fan_kick:
  width 15 ms ±2%
  use R 150k 1%, C 1u PP 2%

oneshot heater_pulse:
  width 10 ms ±3%
  ambient 0 degC to 70 degC

oneshot too_tight:
  width 120 ms ±0.2%

oneshot buzzer_gate:
  width 2.31 ms ±6.5%
  resistors E24 1% 50 ppm/K, 1k to 1M, pairs
  capacitors E12 1% C0G
  use C 10n 1%
  refs R R20 R21, C C9

astable stir_clock:
  frequency 2 kHz ±12%
  duty 30% ±5%

delay fan_start:
  delay 15 ms to 60 ms
  threshold 0.4 to 0.6 of supply

delay soak_min:
  delay 20 ms min
  threshold 0.5 to 0.7 of supply

relaxation panel_scan:
  frequency 100 Hz to 3 kHz
  gate highspeed

crystal sensor_clock:
  frequency 12 MHz
  load 12 pF
  stray 2 pF to 4 pF
  shunt 2 pF
  motional 6 fF
  esr 50 ohm max
  drive 300 uW max
  gm 12 mA/V
  swing 2 V
  tolerance ±15 ppm
  stability ±25 ppm
  aging ±3 ppm/year
  accuracy ±100 ppm

fixture:
  clock 16 MHz ±50 ppm
  uncertainty 2 us
  decision guarded
"""

# A capture clock too coarse for a narrow window: the fixture cannot decide, and
# the limits document writes its acceptance window and counts as null.
COARSE = """
fixture:
  clock 1 kHz ±100 ppm
  uncertainty 3 ms
oneshot blip:
  width 25 ms ±8%
  supply 5 V ±5%
  timer cmos
  capacitors E12 2% PP, 10n to 1u
"""


def _validate(doc: dict[str, Any]) -> None:
    """Validate a document against its open and its closed schema (raises on failure)."""
    name = doc["format"]
    for closed in (False, True):
        schema = load_schema(name, closed=closed)
        jsonschema.Draft202012Validator(schema).validate(doc)


def _run(*argv: str) -> tuple[int, dict[str, Any]]:
    out = io.StringIO()
    code = main(list(argv), stdout=out, stderr=io.StringIO())
    return code, json.loads(out.getvalue())


@pytest.fixture(scope="module")
def mix_solved() -> dict[str, Any]:
    result = timespec.solve(timespec.parse(MIX), samples=500, seed=5)
    return dict(json.loads(result_to_json(result)))


@pytest.fixture(scope="module")
def mix_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("specs") / "oven.tspec"
    path.write_text(MIX, encoding="utf-8")
    return path


# --------------------------------------------------------------------------
# the schemas themselves


@pytest.mark.parametrize("name", SCHEMA_NAMES)
def test_schema_is_a_valid_draft_2020_12_schema(name: str) -> None:
    for closed in (False, True):
        schema = load_schema(name, closed=closed)
        jsonschema.Draft202012Validator.check_schema(schema)
        assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    assert load_schema(name)["properties"]["format"] == {
        "const": name,
        "description": "Names the layout.",
    }


def test_every_shipped_file_is_named_and_every_name_shipped() -> None:
    files = sorted(p.name for p in SCHEMA_DIR.glob("*.schema.json"))
    assert files == sorted(f"{n}.schema.json" for n in SCHEMA_NAMES)
    for name in SCHEMA_NAMES:
        assert json.loads(schema_text(name)) == load_schema(name)


def test_unknown_schema_name_lists_the_names() -> None:
    with pytest.raises(KeyError, match="timespec-result, timespec-limits"):
        load_schema("timespec-nothing")


def test_closed_form_closes_only_objects_that_list_keys() -> None:
    open_ = load_schema("timespec-result")
    closed = load_schema("timespec-result", closed=True)
    assert "additionalProperties" not in open_
    assert closed["additionalProperties"] is False
    assert closed["$defs"]["part"]["additionalProperties"] is False
    # maps keyed by output name keep their value schema
    contributors = closed["$defs"]["block"]["properties"]["contributors"]
    assert contributors["additionalProperties"]["type"] == "array"
    assert load_schema("timespec-result") == open_  # a fresh copy each time


def test_schema_describes_the_minor_version_written() -> None:
    # When a minor version adds keys, the schema (and the docs page) must follow.
    assert schema_minor("timespec-result") == FORMAT_MINOR
    assert load_schema("timespec-result")["properties"]["format_version"]["const"] == (
        FORMAT_VERSION
    )
    doc = limits_to_dict([])
    assert schema_minor("timespec-limits") == doc["format_minor"]
    assert (
        load_schema("timespec-limits")["properties"]["format_version"]["const"]
        == (doc["format_version"])
    )


def _property_names(node: Any) -> set[str]:
    found: set[str] = set()
    if isinstance(node, dict):
        for key, value in node.items():
            if key == "properties" and isinstance(value, dict):
                found |= set(value)
            found |= _property_names(value)
    elif isinstance(node, list):
        for item in node:
            found |= _property_names(item)
    return found


@pytest.mark.parametrize("name", SCHEMA_NAMES)
def test_docs_page_names_every_key_and_the_schema(name: str) -> None:
    page = DOCS_PAGE.read_text(encoding="utf-8")
    keys = _property_names(load_schema(name))
    missing = sorted(k for k in keys if f"``{k}``" not in page)
    assert not missing, f"docs/json.rst does not describe {missing}"
    assert f"{name}.schema.json" in page
    assert MINOR_KEYWORD in page


# --------------------------------------------------------------------------
# every document timespec writes


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.name)
def test_solve_json_of_every_example_validates(example: Path) -> None:
    # enough samples for the percentile capability to be computed, not null
    _code, doc = _run("solve", str(example), "--json", "--samples", str(CAPABILITY_MIN_SAMPLES))
    _validate(doc)
    assert doc["spec"] == str(example)
    caps = [
        o["capability"]
        for b in doc["blocks"]
        if b["statistics"] and b["statistics"]["monte_carlo"]
        for o in b["statistics"]["monte_carlo"]["outputs"].values()
    ]
    assert any(c is not None for c in caps)


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.name)
def test_check_and_no_statistics_json_of_every_example_validate(example: Path) -> None:
    _code, run = _run("check", str(example), "--json")
    _validate(run)  # the run document; its one file's result document inside it
    checked = run["files"][0]["result"]
    _validate(checked)
    assert all(b["statistics"] is None for b in checked["blocks"])
    _code, bare = _run("solve", str(example), "--json", "--no-statistics")
    _validate(bare)


def test_mix_covers_every_family_verdict_and_mode(mix_solved: dict[str, Any]) -> None:
    _validate(mix_solved)
    blocks = {b["name"]: b for b in mix_solved["blocks"]}
    assert mix_solved["spec"] is None  # parsed from text
    assert {b["kind"] for b in blocks.values()} == set(BLOCK_KINDS)
    assert {b["verdict"] for b in blocks.values()} == {"meets", "fails", "infeasible"}
    assert {b["mode"] for b in blocks.values()} == {"solved", "checked"}
    assert blocks["fan_kick"]["verdict"] == "fails" and blocks["fan_kick"]["mode"] == "checked"
    assert blocks["heater_pulse"]["verdict"] == "infeasible" and blocks["heater_pulse"]["fixes"]
    assert blocks["too_tight"]["verdict"] == "infeasible"
    assert [p["designator"] for p in blocks["door_hold"]["parts"]] == ["R12", "C7"]
    (pair,) = [p["pair"] for p in blocks["buzzer_gate"]["parts"] if p["pair"]]
    assert pair["designators"] == ["R20", "R21"]
    assert blocks["soak_min"]["required"]["high"] is None
    assert {f["severity"] for b in blocks.values() for f in b["findings"]} >= {"warning", "note"}
    assert all(b["statistics"] is not None for b in blocks.values() if b["parts"])


def test_mix_check_json_validates(mix_file: Path) -> None:
    code, run = _run("check", str(mix_file), "--json")
    assert code == 1  # a pinned design fails and a block is infeasible
    _validate(run)
    doc = run["files"][0]["result"]
    _validate(doc)
    assert {b["verdict"] for b in doc["blocks"]} == {"meets", "fails", "infeasible"}


@pytest.mark.parametrize("decision", ["guarded", "simple", "expected"])
def test_limits_json_validates_for_every_decision_rule(mix_file: Path, decision: str) -> None:
    _code, doc = _run("limits", str(mix_file), "--json", "--decision", decision)
    _validate(doc)
    # an output nothing is required of falls back to the expected rule
    rules = {lim["decision"] for lim in doc["limits"]}
    assert decision in rules and rules <= {decision, "expected"}


@pytest.mark.parametrize("example", WITH_FIXTURE, ids=lambda p: p.name)
def test_limits_json_of_every_example_with_a_fixture_validates(example: Path) -> None:
    assert timespec.load(example).fixture is not None
    _code, doc = _run("limits", str(example), "--json")
    _validate(doc)


def test_limits_json_of_an_undecidable_fixture_validates() -> None:
    result = timespec.solve(timespec.parse(COARSE), statistics=False, fixes=False)
    doc = json.loads(json.dumps(limits_to_dict(fixture_limits(result)), allow_nan=False))
    _validate(doc)
    assert any(lim["accept"] is None and lim["counts"] is None for lim in doc["limits"])


# --------------------------------------------------------------------------
# the schemas reject what they must


def _first_error(doc: dict[str, Any], closed: bool = False) -> str:
    schema = load_schema(doc["format"], closed=closed)
    errors = list(jsonschema.Draft202012Validator(schema).iter_errors(doc))
    assert errors, "the document should not validate"
    return "; ".join(e.message for e in errors)


def test_wrong_verdict_fails(mix_solved: dict[str, Any]) -> None:
    doc = copy.deepcopy(mix_solved)
    doc["blocks"][0]["verdict"] = "passes"
    assert "'passes' is not one of" in _first_error(doc)


def test_wrong_enums_fail(mix_solved: dict[str, Any]) -> None:
    doc = copy.deepcopy(mix_solved)
    doc["blocks"][0]["mode"] = "guessed"
    assert "'guessed' is not one of" in _first_error(doc)
    doc = copy.deepcopy(mix_solved)
    finding = next(b for b in doc["blocks"] if b["findings"])["findings"][0]
    finding["severity"] = "fatal"
    assert "'fatal' is not one of" in _first_error(doc)


def test_missing_key_fails(mix_solved: dict[str, Any]) -> None:
    doc = copy.deepcopy(mix_solved)
    del doc["blocks"][0]["parts"][0]["tolerance"]
    assert "'tolerance' is a required property" in _first_error(doc)
    doc = copy.deepcopy(mix_solved)
    del doc["ok"]
    assert "'ok' is a required property" in _first_error(doc)


def test_wrong_type_and_major_version_fail(mix_solved: dict[str, Any]) -> None:
    doc = copy.deepcopy(mix_solved)
    doc["blocks"][0]["parts"][0]["value"] = "150k"
    assert "is not of type" in _first_error(doc)
    doc = copy.deepcopy(mix_solved)
    doc["format_version"] = 2
    assert "1 was expected" in _first_error(doc)


def test_added_key_passes_open_and_fails_closed(mix_solved: dict[str, Any]) -> None:
    # A later minor version may add keys: the shipped (open) schema accepts them, the
    # closed form used here to keep the schema complete does not.
    doc = copy.deepcopy(mix_solved)
    doc["blocks"][0]["parts"][0]["footprint"] = "0603"
    doc["format_minor"] = FORMAT_MINOR + 1
    jsonschema.Draft202012Validator(load_schema("timespec-result")).validate(doc)
    assert re.search(r"'footprint' was unexpected", _first_error(doc, closed=True))


def test_limits_negative(mix_file: Path) -> None:
    _code, doc = _run("limits", str(mix_file), "--json")
    bad = copy.deepcopy(doc)
    bad["limits"][0]["decision"] = "lenient"
    assert "'lenient' is not one of" in _first_error(bad)
    bad = copy.deepcopy(doc)
    del bad["limits"][0]["clock_hz"]
    assert "'clock_hz' is a required property" in _first_error(bad)
    bad = copy.deepcopy(doc)
    bad["limits"][0]["counts"] = {"low": 1.5, "high": 2}  # counts are whole numbers
    assert "is not valid under any of the given schemas" in _first_error(bad)
