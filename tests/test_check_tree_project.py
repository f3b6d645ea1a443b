"""A tree check honours the project file: excluded folders are not walked, and a file
of shared defaults that other specs include is not checked on its own."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

# Our own scenario: a burn-in rack repository with shared defaults and a drafts folder.
COMMON = "defaults:\n  supply 12 V ±5%\n  ambient 0 degC to 50 degC\n"
SLOT = 'include "../../common.tspec"\n\noneshot slot_hold:\n  width 20 ms ±20%\n'
DRAFT = "oneshot broken:\n  width 20 ms ±10\n"


def _tree(root: Path) -> None:
    (root / "timespec.toml").write_text('exclude = ["drafts"]\n', encoding="utf-8")
    (root / "common.tspec").write_text(COMMON, encoding="utf-8")
    slot = root / "boards" / "slot"
    slot.mkdir(parents=True)
    (slot / "slot.tspec").write_text(SLOT, encoding="utf-8")
    (root / "drafts").mkdir()
    (root / "drafts" / "wip.tspec").write_text(DRAFT, encoding="utf-8")


def _check(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "timespec", "check", *args],
        capture_output=True,
        text=True,
        cwd=cwd,
        check=False,
    )


def test_walk_skips_excluded_folders_and_shared_defaults(tmp_path: Path) -> None:
    _tree(tmp_path)
    run = _check(".", cwd=tmp_path)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "checked 1 file, 1 block: 1 meet" in run.stdout
    assert "wip.tspec" not in run.stdout and "common.tspec" not in run.stdout


def test_named_files_are_checked_even_if_excluded_or_empty(tmp_path: Path) -> None:
    _tree(tmp_path)
    run = _check("drafts/wip.tspec", cwd=tmp_path)
    assert run.returncode == 2 and "wip.tspec:2:" in run.stdout + run.stderr
    run = _check("common.tspec", cwd=tmp_path)
    assert run.returncode == 2 and "the spec has no blocks" in run.stdout + run.stderr


def test_a_cut_short_list_of_mistakes_says_so(tmp_path: Path) -> None:
    lines = ["oneshot a:", "  width 10 ms ±5%", "  supply 12 V"]
    lines += [f"  widht{i} 3" for i in range(25)]
    (tmp_path / "many.tspec").write_text("\n".join(lines) + "\n", encoding="utf-8")
    run = _check("many.tspec", cwd=tmp_path)
    assert run.returncode == 2
    assert "note: stopped after 20 mistakes" in run.stdout
    assert "20 spec errors" in run.stdout
