"""End-to-end command-line tests on real spec files."""

from __future__ import annotations

import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from timespec.cli import main

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "examples" / "burn_in_rack.tspec"


def run(*args: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(args), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def test_demo_solves_and_meets() -> None:
    code, out, err = run("solve", str(DEMO), "--samples", "2000")
    assert code == 0, out + err
    assert "relay_hold" in out and "MEETS" in out
    assert "worst case" in out
    assert "Traceback" not in err


def test_json_contract() -> None:
    code, out, _ = run("solve", str(DEMO), "--json", "--samples", "1000", "--seed", "3")
    assert code == 0
    doc = json.loads(out)
    assert doc["format"] == "timespec-result" and doc["format_version"] == 1
    assert isinstance(doc["blocks"], list) and doc["blocks"]
    for block in doc["blocks"]:
        for key in (
            "name",
            "kind",
            "verdict",
            "quantity",
            "unit",
            "required",
            "nominal",
            "worst_case",
            "parts",
        ):
            assert key in block
        assert block["verdict"] in ("meets", "fails", "infeasible")
        assert set(block["required"]) == {"low", "high"}
        assert {"low", "high"} <= set(block["worst_case"])
        for part in block["parts"]:
            assert set(part) >= {"ref", "value", "unit", "series", "tolerance"}
            assert part["unit"] in ("ohm", "F")
            assert isinstance(part["value"], float)
    hold = next(b for b in doc["blocks"] if b["name"] == "relay_hold")
    assert hold["unit"] == "s" and hold["quantity"] == "width"
    assert hold["required"]["low"] == pytest.approx(0.138)


def test_same_seed_same_bytes() -> None:
    a = run("solve", str(DEMO), "--json", "--samples", "3000", "--seed", "11")[1]
    b = run("solve", str(DEMO), "--json", "--samples", "3000", "--seed", "11")[1]
    assert a == b


def test_spec_error_exit_2_no_traceback(tmp_path: Path) -> None:
    bad = tmp_path / "bad.tspec"
    bad.write_text("oneshot a:\n  widht 150 ms ±8%\n  supply 12 V\n", encoding="utf-8")
    code, out, err = run("solve", str(bad))
    assert code == 2
    assert out == ""
    assert err == (
        f"{bad}:2:3: error: unknown statement 'widht' in a oneshot block\n"
        "      widht 150 ms ±8%\n"
        "      ^\n"
        "  hint: did you mean 'width'?\n"
    )


def test_usage_errors_exit_2() -> None:
    code, _, err = run("solve")
    assert code == 2 and err.startswith("timespec: error: the following arguments are required")
    code, _, err = run("solve", str(DEMO), "--samples", "0")
    assert code == 2 and "must be at least 1" in err
    code, _, err = run("frobnicate")
    assert code == 2 and "invalid choice" in err


def test_missing_file_exit_2(tmp_path: Path) -> None:
    code, _, err = run("check", str(tmp_path / "none.tspec"))
    assert code == 2 and "no such spec file" in err


def test_check_exits_1_when_a_pinned_design_misses(tmp_path: Path) -> None:
    spec = tmp_path / "board.tspec"
    spec.write_text(
        "oneshot hold:\n  width 150 ms ±8%\n  supply 12 V ±5%\n  timer cmos\n"
        "  resistors E96 1% 50 ppm/K\n  capacitors E12 2% PP, 10n to 1u\n  use R 560k, C 220n\n",
        encoding="utf-8",
    )
    code, out, _ = run("check", str(spec))
    assert code == 1
    # one compiler-style line at the failing requirement ('width', line 2 column 3)
    assert out.startswith(f"{spec}:2:3: error: block 'hold' fails: width is ")
    assert out.endswith("checked 1 file, 1 block: 0 meet, 1 fail, 0 infeasible; 0 spec errors\n")
    spec.write_text(spec.read_text().replace("560k", "619k"), encoding="utf-8")
    code, out, _ = run("check", str(spec))
    assert code == 0
    assert ": error: " not in out
    assert out.endswith("checked 1 file, 1 block: 1 meet, 0 fail, 0 infeasible; 0 spec errors\n")


def test_output_file_is_written_atomically(tmp_path: Path) -> None:
    dest = tmp_path / "report.json"
    code, out, _ = run("solve", str(DEMO), "--json", "--samples", "500", "-o", str(dest))
    assert code == 0 and out == ""
    json.loads(dest.read_text(encoding="utf-8"))
    assert [p.name for p in tmp_path.iterdir()] == ["report.json"]


def test_failed_run_leaves_no_partial_file(tmp_path: Path) -> None:
    bad = tmp_path / "bad.tspec"
    bad.write_text("oneshot a: width 1 ms ±5% at supply 99 V\n", encoding="utf-8")
    dest = tmp_path / "out.txt"
    code, _, _ = run("solve", str(bad), "-o", str(dest))
    assert code == 2
    assert not dest.exists()


def test_output_into_missing_folder_is_a_usage_error(tmp_path: Path) -> None:
    code, _, err = run("solve", str(DEMO), "--no-statistics", "-o", str(tmp_path / "no" / "x.txt"))
    assert code == 2 and "does not exist" in err


def test_python_dash_m_entry_point() -> None:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run(
        [sys.executable, "-m", "timespec", "check", str(DEMO)],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        check=False,
    )
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.endswith("blocks: 3 meet, 0 fail, 0 infeasible; 0 spec errors\n")
