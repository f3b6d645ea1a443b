"""``timespec check --sarif``: a SARIF 2.1.0 log that code-review platforms can read.

The structure is checked against a compact subset of the SARIF 2.1.0 schema written
here from the required properties of the OASIS standard (Static Analysis Results
Interchange Format Version 2.1.0, OASIS Standard, 27 March 2020: 3.13 sarifLog
requires ``version`` "2.1.0" and ``runs``; 3.14 run requires ``tool``; 3.18/3.19
tool requires ``driver`` with ``name``; 3.27 result requires ``message``, 3.11
message has ``text``; 3.28-3.30 location, physicalLocation with
``artifactLocation.uri`` and region with ``startLine`` >= 1, ``startColumn`` >= 1;
3.27.10 level is one of none, note, warning, error; 3.49 reportingDescriptor
requires ``id``).  Nothing is downloaded.
"""

from __future__ import annotations

import io
import json
from pathlib import Path
from typing import Any

import pytest

from timespec._version import __version__
from timespec.cli import main
from timespec.outputs.sarif import artifact_uri

jsonschema = pytest.importorskip("jsonschema")

from test_check_tree import SLOT_HEATER, SLOT_HOLD, TREE, _position  # noqa: E402

_MESSAGE = {
    "type": "object",
    "required": ["text"],
    "properties": {"text": {"type": "string", "minLength": 1}},
}
_REGION = {
    "type": "object",
    "required": ["startLine"],
    "properties": {
        "startLine": {"type": "integer", "minimum": 1},
        "startColumn": {"type": "integer", "minimum": 1},
    },
}
_PHYSICAL = {
    "type": "object",
    "required": ["artifactLocation"],
    "properties": {
        "artifactLocation": {
            "type": "object",
            "required": ["uri"],
            "properties": {"uri": {"type": "string", "format": "uri-reference"}},
        },
        "region": _REGION,
    },
}
_RESULT = {
    "type": "object",
    "required": ["message"],
    "properties": {
        "ruleId": {"type": "string"},
        "ruleIndex": {"type": "integer", "minimum": -1},
        "level": {"enum": ["none", "note", "warning", "error"]},
        "message": _MESSAGE,
        "locations": {
            "type": "array",
            "items": {
                "type": "object",
                "properties": {"physicalLocation": _PHYSICAL},
            },
        },
    },
}
SARIF_SUBSET: dict[str, Any] = {
    "$schema": "https://json-schema.org/draft/2020-12/schema",
    "type": "object",
    "required": ["version", "runs"],
    "properties": {
        "$schema": {"type": "string", "format": "uri"},
        "version": {"const": "2.1.0"},
        "runs": {
            "type": "array",
            "items": {
                "type": "object",
                "required": ["tool"],
                "properties": {
                    "tool": {
                        "type": "object",
                        "required": ["driver"],
                        "properties": {
                            "driver": {
                                "type": "object",
                                "required": ["name"],
                                "properties": {
                                    "name": {"type": "string"},
                                    "version": {"type": "string"},
                                    "rules": {
                                        "type": "array",
                                        "items": {
                                            "type": "object",
                                            "required": ["id"],
                                            "properties": {
                                                "id": {"type": "string"},
                                                "shortDescription": _MESSAGE,
                                                "defaultConfiguration": {
                                                    "type": "object",
                                                    "properties": {
                                                        "level": {
                                                            "enum": [
                                                                "none",
                                                                "note",
                                                                "warning",
                                                                "error",
                                                            ]
                                                        }
                                                    },
                                                },
                                            },
                                        },
                                    },
                                },
                            }
                        },
                    },
                    "columnKind": {"enum": ["utf16CodeUnits", "unicodeCodePoints"]},
                    "results": {"type": "array", "items": _RESULT},
                },
            },
        },
    },
}


def run(*args: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(args), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture()
def rack(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    for rel, text in TREE.items():
        path = tmp_path / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def _log(*args: str) -> tuple[int, dict[str, Any]]:
    code, out, err = run("check", *args, "--sarif")
    assert err == ""
    log = json.loads(out)
    jsonschema.Draft202012Validator(
        SARIF_SUBSET, format_checker=jsonschema.Draft202012Validator.FORMAT_CHECKER
    ).validate(log)
    return code, log


def test_subset_schema_is_a_valid_schema() -> None:
    jsonschema.Draft202012Validator.check_schema(SARIF_SUBSET)


def test_tree_log_has_one_run_with_every_result_located(rack: Path) -> None:
    code, log = _log("rack")
    assert code == 2
    (only,) = log["runs"]
    driver = only["tool"]["driver"]
    assert driver["name"] == "timespec" and driver["version"] == __version__
    ids = [r["id"] for r in driver["rules"]]
    assert ids == sorted(set(ids))
    assert set(ids) == {"block-fails", "block-infeasible", "spec-value", "leakage-shifts-delay"}
    where = {}
    for res in only["results"]:
        assert driver["rules"][res["ruleIndex"]]["id"] == res["ruleId"]
        (loc,) = res["locations"]
        phys = loc["physicalLocation"]
        region = phys["region"]
        where[res["ruleId"]] = (
            phys["artifactLocation"]["uri"],
            region["startLine"],
            region["startColumn"],
            res["level"],
        )
    assert where == {
        "block-fails": ("rack/slots/a/hold.tspec", *_position(SLOT_HOLD, "width"), "error"),
        "block-infeasible": (
            "rack/slots/b/heater.tspec",
            *_position(SLOT_HEATER, "width"),
            "error",
        ),
        "spec-value": ("rack/slots/b/lamp.tspec", 2, 3, "error"),
        "leakage-shifts-delay": ("rack/slots/c/reset.tspec", 7, 1, "warning"),
    }
    assert only["invocations"] == [{"executionSuccessful": True, "exitCode": 2}]
    spec_error = next(r for r in only["results"] if r["ruleId"] == "spec-value")
    assert spec_error["message"]["text"] == (
        "unknown statement 'widht' in a oneshot block (hint: did you mean 'width'?)"
    )


def test_results_match_the_text_lines(rack: Path) -> None:
    _code, log = _log("rack")
    text = run("check", "rack")[1].splitlines()
    lines = [ln for ln in text if ln.startswith("rack/")]
    assert len(lines) == len(log["runs"][0]["results"])
    for line, res in zip(lines, log["runs"][0]["results"], strict=True):
        assert res["message"]["text"].split(" (hint:")[0] in line
        assert line.endswith(f"[{res['ruleId']}]")


def test_clean_tree_gives_a_log_without_results(rack: Path) -> None:
    code, log = _log("rack/controller.tspec")
    assert code == 0
    assert log["runs"][0]["results"] == [] and log["runs"][0]["tool"]["driver"]["rules"] == []


def test_pool_and_serial_logs_are_identical(rack: Path) -> None:
    assert run("check", "rack", "--sarif", "-j", "1") == run("check", "rack", "--sarif", "-j", "2")


def test_sarif_and_json_exclude_each_other(rack: Path) -> None:
    code, _, err = run("check", "rack", "--sarif", "--json")
    assert code == 2 and "not allowed with argument" in err


def test_uris_are_relative_with_forward_slashes_or_absolute_file_uris(tmp_path: Path) -> None:
    inside = tmp_path / "boards" / "slot 3" / "hold.tspec"
    assert artifact_uri(str(inside), tmp_path) == "boards/slot%203/hold.tspec"
    assert artifact_uri("boards/hold.tspec", Path.cwd()) == "boards/hold.tspec"
    outside = tmp_path.parent / "elsewhere.tspec"
    assert artifact_uri(str(outside), tmp_path) == outside.as_uri()
    assert outside.as_uri().startswith("file:///")
