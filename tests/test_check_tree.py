"""``timespec check PATH...`` over a tree of spec files, end to end through the CLI.

The scenario is invented: the slot boards of a burn-in rack, each slot's timing in its
own spec file in nested folders, plus the rack controller.  One slot keeps a pinned
one-shot that no longer holds its window, one asks for a pulse no standard parts can
hold over its temperature range, one has a typing mistake, and one has a power-on
delay whose leakage earns a design-rule warning.
"""

from __future__ import annotations

import io
import json
import math
import multiprocessing
import re
from pathlib import Path
from typing import Any

import pytest

from timespec.cli import main
from timespec.outputs import checkrun

jsonschema = pytest.importorskip("jsonschema")

from timespec.outputs.schemas import load_schema  # noqa: E402

CONTROLLER = """\
defaults:
  supply 5 V ±5%
  ambient 0 degC to 55 degC
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
  timer cmos

oneshot door_hold:
  width 150 ms ±20%
  use R 150k 1%, C 1u PP 2%

oneshot fan_kick:
  width 40 ms ±10%
"""

# Pinned parts that give RC·ln 3 = 135.5 ms against a 138 ms … 162 ms window.
SLOT_HOLD = """\
oneshot hold:
  width 150 ms ±8%
  supply 12 V ±5%
  timer cmos
  resistors E96 1% 50 ppm/K
  capacitors E12 2% PP, 10n to 1u
  use R 560k, C 220n
"""

# ±3 % over 0 … 70 °C with 2 % capacitors: no standard pair holds it.
SLOT_HEATER = """\
defaults:
  supply 5 V ±5%
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
  timer cmos

oneshot heater_pulse:
  ambient 0 degC to 70 degC
  width 10 ms ±3%
"""

SLOT_TYPO = """\
oneshot lamp:
  widht 150 ms ±8%
  supply 12 V
"""

SLOT_RESET = """\
defaults:
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  timer cmos

delay power_on_reset:
  delay 15 ms to 60 ms
  threshold 0.4 to 0.6 of supply
  capacitors E6 10% PET, 10n to 2u2
  leakage 1 uA max
"""

TREE = {
    "rack/controller.tspec": CONTROLLER,
    "rack/slots/a/hold.tspec": SLOT_HOLD,
    "rack/slots/b/heater.tspec": SLOT_HEATER,
    "rack/slots/b/lamp.tspec": SLOT_TYPO,
    "rack/slots/c/reset.tspec": SLOT_RESET,
    "rack/.spare/ignored.tspec": SLOT_TYPO,  # dot folders are skipped
    "rack/slots/readme.txt": "not a spec\n",
}

# The walk order: sorted by path parts inside the named folder.
ORDER = [
    "rack/controller.tspec",
    "rack/slots/a/hold.tspec",
    "rack/slots/b/heater.tspec",
    "rack/slots/b/lamp.tspec",
    "rack/slots/c/reset.tspec",
]


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


def _position(text: str, statement: str) -> tuple[int, int]:
    """Line and column (1-based) of the first line starting with ``statement``."""
    for number, line in enumerate(text.splitlines(), start=1):
        if line.strip().startswith(statement):
            return number, len(line) - len(line.lstrip()) + 1
    raise AssertionError(statement)


def _validate(doc: dict[str, Any]) -> None:
    for closed in (False, True):
        jsonschema.Draft202012Validator(load_schema(doc["format"], closed=closed)).validate(doc)


# --------------------------------------------------------------------------
# which files


def test_folder_walk_is_sorted_recursive_and_skips_dot_folders(rack: Path) -> None:
    assert checkrun.collect_specs(["rack"]) == tuple(ORDER)


def test_arguments_keep_their_order_and_a_file_is_checked_once(rack: Path) -> None:
    got = checkrun.collect_specs(["rack/slots/c/reset.tspec", "rack/slots", "./rack"])
    assert got == (
        "rack/slots/c/reset.tspec",
        "rack/slots/a/hold.tspec",
        "rack/slots/b/heater.tspec",
        "rack/slots/b/lamp.tspec",
        "rack/controller.tspec",
    )


def test_missing_path_is_a_usage_error_before_any_solving(rack: Path) -> None:
    code, out, err = run("check", "rack", "rack/slots/z")
    assert (code, out) == (2, "")
    assert err == "timespec: error: no such spec file or folder: 'rack/slots/z'\n"


def test_non_spec_file_named_explicitly_is_a_usage_error(rack: Path) -> None:
    code, out, err = run("check", "rack/slots/readme.txt")
    assert (code, out) == (2, "")
    assert err.startswith("timespec: error: 'rack/slots/readme.txt' is not a spec file")
    assert ".tspec" in err


def test_folder_without_specs_is_a_usage_error(rack: Path) -> None:
    (rack / "empty").mkdir()
    code, _, err = run("check", "empty")
    assert code == 2 and err == "timespec: error: no .tspec files in the folder 'empty'\n"


# --------------------------------------------------------------------------
# compiler-style lines


def test_tree_text_locates_every_problem(rack: Path) -> None:
    code, out, err = run("check", "rack", "--jobs", "1")
    assert code == 2 and err == ""  # a spec error anywhere wins over failing blocks
    lines = out.splitlines()
    hold_line, hold_col = _position(SLOT_HOLD, "width")
    heater_line, heater_col = _position(SLOT_HEATER, "width")
    reset_line, reset_col = _position(SLOT_RESET, "delay power_on_reset")
    located = [ln for ln in lines if re.match(r"^\S+:\d+:\d+: (error|warning|note): ", ln)]
    assert [ln.split(": ")[0] for ln in located] == [
        f"rack/slots/a/hold.tspec:{hold_line}:{hold_col}",
        f"rack/slots/b/heater.tspec:{heater_line}:{heater_col}",
        "rack/slots/b/lamp.tspec:2:3",
        f"rack/slots/c/reset.tspec:{reset_line}:{reset_col}",
    ]
    hold = located[0]
    assert hold.startswith(
        f"rack/slots/a/hold.tspec:{hold_line}:{hold_col}: error: block 'hold' fails: width is "
    )
    assert hold.endswith("with its pinned parts R 560k, C 220n [block-fails]")
    assert located[1].startswith(
        f"rack/slots/b/heater.tspec:{heater_line}:{heater_col}: error: block 'heater_pulse' is "
        "infeasible: no design from the allowed parts keeps width inside "
    )
    assert located[1].endswith("[block-infeasible]")
    # the spec error keeps its line, caret and hint (the same text as 'timespec solve')
    at = lines.index(located[2])
    assert lines[at : at + 4] == [
        "rack/slots/b/lamp.tspec:2:3: error: unknown statement 'widht' in a oneshot block "
        "[spec-value]",
        "      widht 150 ms ±8%",
        "      ^",
        "  hint: did you mean 'width'?",
    ]
    assert located[3].startswith(
        f"rack/slots/c/reset.tspec:{reset_line}:{reset_col}: warning: block 'power_on_reset': "
    )
    assert located[3].endswith("[leakage-shifts-delay]")
    assert lines[-1] == "checked 5 files, 5 blocks: 3 meet, 1 fail, 1 infeasible; 1 spec error"


def test_failing_window_is_the_one_the_pinned_parts_give(rack: Path) -> None:
    _code, out, _ = run("check", "rack/slots/a/hold.tspec", "--json")
    block = json.loads(out)["files"][0]["result"]["blocks"][0]
    low, high = block["worst_case"]["low"], block["worst_case"]["high"]
    # Handbook 555-type monostable: t = R·C·ln 3 (thresholds at 1/3 and 2/3 of the
    # supply); the nominal pulse of the pinned parts lies inside the worst-case window
    # and below the required 138 ms, so the block must fail.
    nominal = 560e3 * 220e-9 * math.log(3.0)
    assert low < nominal < high and nominal < 0.138
    text = run("check", "rack/slots/a/hold.tspec")[1]
    assert f"{(0.138 - low) * 1e3:.4g} ms low" in text  # the shortfall is the JSON's


def test_exit_codes_over_a_run(rack: Path) -> None:
    assert run("check", "rack/controller.tspec")[0] == 0
    assert run("check", "rack/controller.tspec", "rack/slots/c")[0] == 0  # a warning only
    assert run("check", "rack/controller.tspec", "rack/slots/a")[0] == 1
    assert run("check", "rack/slots/b/heater.tspec")[0] == 1
    assert run("check", "rack/slots/b/lamp.tspec", "rack/controller.tspec")[0] == 2


def test_spec_error_does_not_stop_the_other_files(rack: Path) -> None:
    code, out, _ = run("check", "rack/slots/b/lamp.tspec", "rack/controller.tspec")
    assert code == 2
    assert out.splitlines()[-1] == (
        "checked 2 files, 2 blocks: 2 meet, 0 fail, 0 infeasible; 1 spec error"
    )


def test_verbose_adds_a_note_per_met_block(rack: Path) -> None:
    _code, out, _ = run("check", "rack/controller.tspec", "-v")
    notes = [ln for ln in out.splitlines() if ": note: " in ln and ln.endswith("[block-meets]")]
    door_line, door_col = _position(CONTROLLER, "oneshot door_hold")
    fan_line, fan_col = _position(CONTROLLER, "oneshot fan_kick")
    assert [n.split(": ")[0] for n in notes] == [
        f"rack/controller.tspec:{door_line}:{door_col}",
        f"rack/controller.tspec:{fan_line}:{fan_col}",
    ]
    assert "block 'door_hold' meets: width " in notes[0] and "R 150k, C 1u" in notes[0]
    quiet = run("check", "rack/controller.tspec")[1]
    assert ": note: " not in quiet


def test_output_file(rack: Path) -> None:
    code, out, _ = run("check", "rack/slots/a", "-o", "report.txt")
    assert code == 1 and out == ""
    assert (
        (rack / "report.txt")
        .read_text(encoding="utf-8")
        .endswith("checked 1 file, 1 block: 0 meet, 1 fail, 0 infeasible; 0 spec errors\n")
    )


# --------------------------------------------------------------------------
# the run document


def test_run_document_validates_and_locates(rack: Path) -> None:
    code, out, _ = run("check", "rack", "--json")
    assert code == 2
    doc = json.loads(out)
    _validate(doc)
    assert doc["exit_code"] == 2 and doc["ok"] is False
    assert doc["summary"] == {
        "files": 5,
        "blocks": 5,
        "meets": 3,
        "fails": 1,
        "infeasible": 1,
        "spec_errors": 1,
    }
    files = {f["path"]: f for f in doc["files"]}
    assert [f["path"] for f in doc["files"]] == ORDER
    for f in doc["files"]:
        if f["result"] is not None:
            _validate(f["result"])  # each file's own result document
            assert f["result"]["spec"] == f["path"]
    lamp = files["rack/slots/b/lamp.tspec"]
    assert lamp["result"] is None and lamp["ok"] is False and lamp["diagnostics"] == []
    assert lamp["errors"] == [
        {
            "path": "rack/slots/b/lamp.tspec",
            "line": 2,
            "column": 3,
            "kind": "spec-value",
            "message": "unknown statement 'widht' in a oneshot block",
            "hint": "did you mean 'width'?",
        }
    ]
    hold = files["rack/slots/a/hold.tspec"]
    (diag,) = hold["diagnostics"]
    assert (diag["line"], diag["column"]) == _position(SLOT_HOLD, "width")
    assert (diag["severity"], diag["rule"], diag["block"]) == ("error", "block-fails", "hold")
    assert hold["result"]["blocks"][0]["verdict"] == "fails"
    heater = files["rack/slots/b/heater.tspec"]["result"]["blocks"][0]
    assert heater["verdict"] == "infeasible" and heater["parts"]  # the closest design
    reset = files["rack/slots/c/reset.tspec"]
    assert reset["ok"] is True
    warnings = [f for f in reset["result"]["blocks"][0]["findings"] if f["severity"] == "warning"]
    assert [d["rule"] for d in reset["diagnostics"]] == [f["code"] for f in warnings]


def test_one_file_run_document_holds_the_result_document(rack: Path) -> None:
    code, out, _ = run("check", "rack/controller.tspec", "--json")
    assert code == 0
    doc = json.loads(out)
    _validate(doc)
    (entry,) = doc["files"]
    solved = json.loads(run("solve", "rack/controller.tspec", "--json", "--no-statistics")[1])
    assert [b["name"] for b in entry["result"]["blocks"]] == ["door_hold", "fan_kick"]
    for checked, full in zip(entry["result"]["blocks"], solved["blocks"], strict=True):
        assert checked["parts"] == full["parts"] and checked["outputs"] == full["outputs"]


def test_run_document_with_only_a_spec_error_is_written(rack: Path) -> None:
    code, out, _ = run("check", "rack/slots/b/lamp.tspec", "--json")
    assert code == 2
    doc = json.loads(out)
    _validate(doc)
    assert doc["summary"]["blocks"] == 0 and doc["summary"]["spec_errors"] == 1


def test_run_schema_rejects_what_it_must(rack: Path) -> None:
    doc = json.loads(run("check", "rack", "--json")[1])
    schema = load_schema("timespec-check-run")
    bad = json.loads(json.dumps(doc))
    bad["files"][1]["diagnostics"][0]["severity"] = "fatal"
    assert not jsonschema.Draft202012Validator(schema).is_valid(bad)
    bad = json.loads(json.dumps(doc))
    del bad["files"][3]["errors"][0]["hint"]
    assert not jsonschema.Draft202012Validator(schema).is_valid(bad)
    bad = json.loads(json.dumps(doc))
    bad["exit_code"] = 3
    assert not jsonschema.Draft202012Validator(schema).is_valid(bad)


# --------------------------------------------------------------------------
# the pool


def test_pool_and_serial_give_the_same_bytes(rack: Path) -> None:
    for form in ([], ["--json"], ["--sarif"], ["-v"]):
        serial = run("check", "rack", "--jobs", "1", *form)
        pooled = run("check", "rack", "--jobs", "2", *form)
        assert serial == pooled, form


def test_pool_is_used_above_the_threshold(rack: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    made: list[int] = []
    real = checkrun.ProcessPoolExecutor

    class Spy(real):  # type: ignore[misc, valid-type]
        def __init__(self, max_workers: int, **kwargs: Any) -> None:
            made.append(max_workers)
            super().__init__(max_workers, **kwargs)

    monkeypatch.setattr(checkrun, "ProcessPoolExecutor", Spy)
    monkeypatch.setattr(checkrun, "_processors", lambda: 2)
    monkeypatch.setattr(checkrun, "POOL_MIN_BLOCKS", 3)
    monkeypatch.setattr(checkrun, "POOL_MIN_BLOCKS_SPAWN", 3)
    auto = run("check", "rack")
    assert made == [2]  # 5 blocks, threshold 3: a pool of both processors
    made.clear()
    assert run("check", "rack/slots/a", "rack/slots/c")[0] == 1
    assert made == []  # 2 blocks: below the threshold, solved here
    assert run("check", "rack", "--jobs", "1") == auto and made == []


def test_every_mistake_of_a_file_is_located(rack: Path) -> None:
    (rack / "rack" / "slots" / "b" / "lamp.tspec").write_text(
        SLOT_TYPO + "oneshot spare:\n  width 20 ms ±8%\n  supply 12 Q\n", encoding="utf-8"
    )
    code, out, _ = run("check", "rack/slots/b/lamp.tspec")
    assert code == 2
    located = [ln.split(": error: ")[0] for ln in out.splitlines() if ": error: " in ln]
    assert located == ["rack/slots/b/lamp.tspec:2:3", "rack/slots/b/lamp.tspec:6:13"]
    assert out.splitlines()[-1].endswith("; 2 spec errors")
    doc = json.loads(run("check", "rack/slots/b/lamp.tspec", "--json")[1])
    _validate(doc)
    assert [(e["line"], e["column"]) for e in doc["files"][0]["errors"]] == [(2, 3), (6, 13)]


def test_spawned_workers_give_the_same_bytes(rack: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # Where fork is not used (macOS, Windows) workers start a fresh interpreter: the
    # tasks (blocks and the solve function) must survive pickling there.
    serial = run("check", "rack/controller.tspec", "rack/slots/a", "--json", "-j", "1")
    monkeypatch.setattr(
        checkrun,
        "_context",
        lambda: (multiprocessing.get_context("spawn"), checkrun.POOL_MIN_BLOCKS_SPAWN),
    )
    spawned = run("check", "rack/controller.tspec", "rack/slots/a", "--json", "-j", "2")
    assert spawned == serial


def _boom(spec: object, **kwargs: object) -> None:
    raise RuntimeError("solver exploded in a worker")


def test_bug_in_a_worker_is_exit_3_with_one_line(
    rack: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from timespec import api

    monkeypatch.setattr(api, "solve", _boom)
    monkeypatch.delenv("TIMESPEC_DEBUG", raising=False)
    code, out, err = run("check", "rack", "--jobs", "2")
    assert (code, out) == (3, "")
    assert err.count("\n") == 1
    assert "RuntimeError: solver exploded in a worker" in err and "bug in timespec" in err
