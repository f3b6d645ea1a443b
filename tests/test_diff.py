"""``timespec diff``: two specs, or one spec at two git revisions, compared for review.

Invented scenario: the slot timer board of a burn-in rack (a soak one-shot per
slot, a fan settle one-shot, a power-good RC delay, a lamp blinker).
"""

from __future__ import annotations

import io
import json
import math
import shutil
import subprocess
from pathlib import Path
from typing import Any

import pytest

import timespec
from timespec.cli import main
from timespec.outputs.diff import (
    DIFF_FORMAT,
    DIFF_MINOR,
    Diff,
    diff_results,
    diff_to_dict,
    output_margin,
    render_diff,
)
from timespec.outputs.revisions import split_range
from timespec.outputs.schemas import load_schema, schema_minor

BOARD = """\
defaults:
  supply 12 V ±5%
  ambient 10 degC to 70 degC
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 10% PP, 10n to 1u
  timer cmos

oneshot slot_soak:
  width 200 ms ±15%
  use R 180k 1%, C 1u PP 2%

oneshot fan_settle:
  width 40 ms ±20%

delay power_good:
  delay 5 ms to 20 ms
  threshold 0.4 to 0.6 of supply

oneshot lamp_blink:
  width 300 ms ±10%
"""


def _edit(text: str, *pairs: tuple[str, str]) -> str:
    for old, new in pairs:
        assert old in text, old
        text = text.replace(old, new)
    return text


def _diff(old: str, new: str, margin_drop: float | None = None) -> Diff:
    a = timespec.solve(timespec.parse(old), statistics=False, fixes=False)
    b = timespec.solve(timespec.parse(new), statistics=False, fixes=False)
    return diff_results(a, b, old_label="old", new_label="new", margin_drop=margin_drop)


def _run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def _validate(doc: dict[str, Any]) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    for closed in (False, True):
        jsonschema.Draft202012Validator(load_schema(DIFF_FORMAT, closed=closed)).validate(doc)


def _block(diff: Diff, name: str) -> Any:
    return next(b for b in diff.blocks if b.name == name)


# --------------------------------------------------------------------------
# the margin


def test_margin_is_the_room_to_the_nearest_edge_in_half_widths() -> None:
    result = timespec.solve(timespec.parse(BOARD), statistics=False, fixes=False)
    out = result.block("slot_soak").best.outputs[0]  # type: ignore[union-attr]
    w = out.required
    assert w is not None
    # 200 ms ±15 %: 170 ms to 230 ms, half-width 30 ms (the definition in docs/review.rst)
    assert math.isclose(w.low, 0.170) and math.isclose(w.high, 0.230)
    expected = min(out.low - 0.170, 0.230 - out.high) / 0.030
    assert output_margin(out) == pytest.approx(expected, rel=1e-12)
    # The nominal width of a 555-type one-shot is R C ln 3 (an RC charging from 0 to 2/3
    # of the supply, v = V (1 - exp(-t/RC)); handbook formula): 180 k x 1 uF x ln 3.
    assert out.nominal == pytest.approx(180e3 * 1e-6 * math.log(3.0), rel=0.01)


def test_one_sided_margin_is_relative_to_the_bound() -> None:
    spec = timespec.parse(
        "delay hold_off:\n  delay 20 ms min\n  threshold 0.5 to 0.7 of supply\n"
        "  supply 5 V ±5%\n  ambient 0 degC to 50 degC\n"
    )
    out = timespec.solve(spec, statistics=False, fixes=False).blocks[0].best.outputs[0]  # type: ignore[union-attr]
    assert out.required is not None and math.isinf(out.required.high)
    assert output_margin(out) == pytest.approx((out.low - 0.020) / 0.020, rel=1e-12)


# --------------------------------------------------------------------------
# crafted pairs


def test_same_spec_is_all_unchanged_and_not_worse() -> None:
    diff = _diff(BOARD, BOARD, margin_drop=0.0)
    assert {b.status for b in diff.blocks} == {"unchanged"}
    assert not diff.worse
    text = render_diff(diff)
    assert text.splitlines()[-1] == "unchanged: slot_soak, fan_settle, power_good, lamp_blink"


def test_tighter_capacitor_policy_is_better() -> None:
    new = _edit(BOARD, ("capacitors E12 10% PP", "capacitors E12 2% PP"))
    diff = _diff(BOARD, new, margin_drop=0.0)
    fan = _block(diff, "fan_settle")
    assert fan.status == "changed" and "capacitors" in fan.inputs
    assert fan.old_verdict == fan.new_verdict == "meets"
    assert fan.new_margin > fan.old_margin  # a 2 % capacitor leaves more room than a 10 % one
    assert not fan.worse and not diff.worse
    # the pinned soak block does not take its parts from the policy, so only its
    # statements differ: it counts as changed with the same numbers
    soak = _block(diff, "slot_soak")
    assert soak.parts == () and not any(o.changed for o in soak.outputs)


def test_wider_tolerance_drops_the_margin_and_fails_a_threshold(tmp_path: Path) -> None:
    new = _edit(BOARD, ("use R 180k 1%", "use R 180k 2%"))
    diff = _diff(BOARD, new)
    soak = _block(diff, "slot_soak")
    assert soak.old_verdict == soak.new_verdict == "meets"
    (part,) = soak.parts
    assert part.ref == "R" and part.fields == ("tolerance",)
    drop = soak.old_margin - soak.new_margin
    # First order: the width is proportional to R (t = R C ln 3), so one more percent of
    # resistor tolerance moves each worst-case end by about 1 % of the nominal width,
    # 0.01 x 197.75 ms, out of a 30 ms half-width: about 6.6 % of it.
    assert drop == pytest.approx(0.01 * 180e3 * 1e-6 * math.log(3.0) / 0.030, rel=0.1)
    old_path, new_path = _write(tmp_path, "old.tspec", BOARD), _write(tmp_path, "new.tspec", new)
    assert _run("diff", str(old_path), str(new_path))[0] == 0  # only verdicts decide
    code, out, _ = _run("diff", str(old_path), str(new_path), "--margin-drop", "5%")
    assert code == 1
    assert "slot_soak (oneshot): changed — WORSE" in out
    assert "  worse: margin fell by 6." in out
    assert _run("diff", str(old_path), str(new_path), "--margin-drop", "10")[0] == 0


def test_added_removed_and_renamed_blocks() -> None:
    new = _edit(
        BOARD,
        ("oneshot lamp_blink:", "oneshot beacon_blink:"),
        ("delay power_good:\n  delay 5 ms to 20 ms\n  threshold 0.4 to 0.6 of supply\n", ""),
    )
    new += "\noneshot door_latch:\n  width 80 ms ±25%\n"
    diff = _diff(BOARD, new, margin_drop=0.0)
    status = {b.name: (b.status, b.old_name, b.worse) for b in diff.blocks}
    assert status == {
        "slot_soak": ("unchanged", None, False),
        "fan_settle": ("unchanged", None, False),
        "beacon_blink": ("renamed", "lamp_blink", False),
        "door_latch": ("added", None, False),  # new and meets: not worse
        "power_good": ("removed", None, False),  # removed: reported, not worse
    }
    assert [b.name for b in diff.blocks][-1] == "power_good"  # removed blocks come last
    assert not diff.worse
    latch = _block(diff, "door_latch")
    assert latch.old_verdict is None and latch.new_verdict == "meets"
    text = render_diff(diff)
    assert "beacon_blink (oneshot): renamed from lamp_blink" in text
    assert "power_good (delay): removed" in text
    assert text.splitlines()[-1] == "unchanged: slot_soak, fan_settle"


def test_new_block_that_does_not_meet_is_worse() -> None:
    new = BOARD + "\noneshot door_latch:\n  width 120 ms ±0.2%\n"
    diff = _diff(BOARD, new)
    latch = _block(diff, "door_latch")
    assert latch.status == "added" and latch.new_verdict == "infeasible" and latch.worse
    assert latch.reasons == ("a new block that does not meet (verdict infeasible)",)


def test_meets_to_infeasible_is_worse_and_exits_1(tmp_path: Path) -> None:
    new = _edit(BOARD, ("width 40 ms ±20%", "width 40 ms ±0.2%"))
    diff = _diff(BOARD, new)
    fan = _block(diff, "fan_settle")
    assert (fan.old_verdict, fan.new_verdict) == ("meets", "infeasible")
    assert fan.worse and fan.reasons == ("verdict meets -> infeasible",)
    (req,) = fan.requirements
    assert (req.quantity, req.old, req.new) == ("width", "40 ms ±20 %", "40 ms ±0.2 %")
    (out,) = fan.outputs
    assert out.old is not None and out.new is not None
    assert out.old.margin is not None and out.old.margin >= 0
    assert out.new.margin is not None and out.new.margin < 0
    old_path, new_path = _write(tmp_path, "a.tspec", BOARD), _write(tmp_path, "b.tspec", new)
    code, text, err = _run("diff", str(old_path), str(new_path))
    assert (code, err) == (1, "")
    assert "  worse: verdict meets -> infeasible" in text
    assert " *width required    40 ms ±20 %" in text


def test_markdown_has_a_table_per_changed_block() -> None:
    new = _edit(
        BOARD, ("width 40 ms ±20%", "width 40 ms ±0.2%"), ("use R 180k 1%", "use R 180k 2%")
    )
    md = render_diff(_diff(BOARD, new), "md")
    lines = md.splitlines()
    assert lines[0] == "### timespec diff `old` → `new`"
    assert lines[2].startswith("**1 block worse:** `fan_settle`.")
    assert lines.count("| | old | new |") == 2  # slot_soak and fan_settle
    assert lines.count("|---|---|---|") == 2
    assert "| verdict | meets | **infeasible** |" in lines
    assert "| width required | 40 ms ±20 % | **40 ms ±0.2 %** |" in lines
    assert lines[-1] == "Unchanged: `power_good`, `lamp_blink`."


def test_json_document_validates_against_its_schema() -> None:
    new = _edit(
        BOARD,
        ("width 40 ms ±20%", "width 40 ms ±0.2%"),
        ("oneshot lamp_blink:", "oneshot beacon_blink:"),
        ("use R 180k 1%", "use R 180k 2%"),
    )
    new += "\noneshot door_latch:\n  width 80 ms ±25%\n"
    doc = json.loads(json.dumps(diff_to_dict(_diff(BOARD, new, 0.05)), allow_nan=False))
    _validate(doc)
    assert (doc["format"], doc["format_version"], doc["format_minor"]) == (DIFF_FORMAT, 1, 0)
    assert schema_minor(DIFF_FORMAT) == DIFF_MINOR
    assert doc["worse"] is True and doc["margin_drop"] == 0.05
    statuses = {b["status"] for b in doc["blocks"]}
    assert statuses == {"changed", "renamed", "added", "unchanged"}


def test_cli_json_validates_and_rejects_a_bad_verdict(tmp_path: Path) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    new = _edit(BOARD, ("width 40 ms ±20%", "width 40 ms ±0.2%"))
    a, b = _write(tmp_path, "a.tspec", BOARD), _write(tmp_path, "b.tspec", new)
    code, out, _ = _run("diff", str(a), str(b), "--json")
    assert code == 1
    doc = json.loads(out)
    _validate(doc)
    doc["blocks"][0]["verdict"]["new"] = "passes"
    errors = list(jsonschema.Draft202012Validator(load_schema(DIFF_FORMAT)).iter_errors(doc))
    assert errors


# --------------------------------------------------------------------------
# command-line mistakes


@pytest.mark.parametrize(
    ("argv", "message"),
    [
        (["diff", "only.tspec"], "diff takes OLD NEW (two spec files) or REV1..REV2 -- PATH"),
        (["diff", "a..b..c", "x.tspec"], "write one range with two dots"),
        (["diff", "a...b", "x.tspec"], "write one range with two dots"),
        (["diff", "..", "x.tspec"], "'..' names no revision"),
        (["diff", "a..b", "--", "x.tspec", "--json"], "options go before '--'"),
        (["diff", "a", "b", "--margin-drop", "lots"], "is not a percentage such as 5%"),
        (["diff", "a", "b", "--margin-drop=-3%"], "must be a finite size of at least 0%"),
    ],
)
def test_usage_mistakes_exit_2(argv: list[str], message: str) -> None:
    code, out, err = _run(*argv)
    assert code == 2 and out == ""
    assert message in err


def test_missing_file_exits_2(tmp_path: Path) -> None:
    a = _write(tmp_path, "a.tspec", BOARD)
    code, _, err = _run("diff", str(a), str(tmp_path / "none.tspec"))
    assert code == 2 and "no such spec file" in err


def test_split_range() -> None:
    assert split_range("main..HEAD") == ("main", "HEAD")
    assert split_range("main..") == ("main", None)
    assert split_range("..HEAD") == (None, "HEAD")
    assert split_range("boards/slot.tspec") is None


# --------------------------------------------------------------------------
# git revisions

needs_git = pytest.mark.skipif(shutil.which("git") is None, reason="git is not installed")


def _git(repo: Path, *args: str) -> None:
    subprocess.run(
        ["git", "-c", "user.name=Rack Test", "-c", "user.email=rack@example.invalid", *args],
        cwd=repo,
        check=True,
        capture_output=True,
    )


COMMON_OLD = "defaults:\n  supply 12 V ±5%\n  ambient 10 degC to 70 degC\n  timer cmos\n"
SLOT = """\
include "../shared/common.tspec"

oneshot slot_soak:
  width 200 ms ±15%
  use R 180k 1%, C 1u PP 2%

oneshot fan_settle:
  width 40 ms ±20%
  capacitors E12 5% PP, 10n to 1u
"""


@pytest.fixture
def repo(tmp_path: Path) -> Path:
    root = tmp_path / "rack"
    root.mkdir()
    _git(root, "init", "-q")
    _write(root, "timespec.toml", "")  # the project root for includes, where that applies
    _write(root, "shared/common.tspec", COMMON_OLD)
    _write(root, "boards/slot.tspec", SLOT)
    _git(root, "add", ".")
    _git(root, "commit", "-q", "-m", "slot board")
    # second commit: the soak capacitor becomes a 10 % class-2 ceramic, and the shared
    # defaults move the ambient range
    _write(root, "boards/slot.tspec", _edit(SLOT, ("C 1u PP 2%", "C 1u X7R 10%")))
    _write(root, "shared/common.tspec", _edit(COMMON_OLD, ("70 degC", "85 degC")))
    _git(root, "commit", "-q", "-a", "-m", "cheaper soak capacitor")
    return root


@needs_git
def test_git_range_reads_both_revisions_and_their_includes(repo: Path) -> None:
    path = repo / "boards" / "slot.tspec"
    # the working tree holds neither revision: both must come from git
    path.write_text("this is not a spec\n", encoding="utf-8")
    (repo / "shared" / "common.tspec").unlink()
    code, out, err = _run("diff", "HEAD~1..HEAD", "--", str(path))
    assert err == ""
    assert code == 1  # the soak block no longer meets with a 10 % ceramic
    lines = out.splitlines()
    assert lines[0] == "timespec diff HEAD~1:boards/slot.tspec -> HEAD:boards/slot.tspec"
    assert "slot_soak (oneshot): changed — WORSE" in lines
    assert "  worse: verdict meets -> fails" in lines
    # the included defaults were read at each revision: the ambient change shows
    assert "  statements changed: supply/ambient/life" in lines


@needs_git
def test_git_range_against_the_working_tree(repo: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(repo)
    code, out, _ = _run("diff", "--form", "md", "HEAD..", "--", "boards/slot.tspec")
    assert code == 0
    assert out.splitlines()[0] == (
        "### timespec diff `HEAD:boards/slot.tspec` → `boards/slot.tspec (working tree)`"
    )
    assert "**No block got worse.**" in out
    assert out.splitlines()[-1] == "Unchanged: `slot_soak`, `fan_settle`."
    code, out, _ = _run("diff", "--json", "HEAD~1..", "--", "boards/slot.tspec")
    doc = json.loads(out)
    _validate(doc)
    assert code == 1 and doc["new"]["label"] == "boards/slot.tspec (working tree)"


@needs_git
def test_git_mistakes_exit_2_with_gits_message(repo: Path, tmp_path: Path) -> None:
    path = str(repo / "boards" / "slot.tspec")
    code, out, err = _run("diff", "no-such-branch..HEAD", "--", path)
    assert (code, out) == (2, "")
    assert err.startswith("timespec: error: git show failed: fatal: ")
    assert "no-such-branch" in err
    code, _, err = _run("diff", "HEAD~1..HEAD", "--", str(repo / "boards" / "none.tspec"))
    assert code == 2 and "boards/none.tspec" in err and "git show failed" in err
    outside = _write(tmp_path / "loose", "x.tspec", BOARD)
    code, _, err = _run("diff", "HEAD~1..HEAD", "--", str(outside))
    assert code == 2 and "git rev-parse failed" in err


@needs_git
def test_spec_mistake_at_a_revision_is_located_there(repo: Path) -> None:
    path = repo / "boards" / "slot.tspec"
    path.write_text(SLOT.replace("width 40 ms ±20%", "width 40 ms ±20% soon"), "utf-8")
    _git(repo, "commit", "-q", "-a", "-m", "typo")
    code, out, err = _run("diff", "HEAD~1..HEAD", "--", str(path))
    assert (code, out) == (2, "")
    assert err.startswith("HEAD:boards/slot.tspec:8:20: error: ")
