"""The hooks file at the repository root: two hooks whose entries are real commands.

The file is a YAML list of flat mappings (the format the pre-commit framework reads
from a hook repository).  It is read here by hand, without a YAML library, which
also keeps it in the plain subset: one ``key: value`` per line, no nesting, no
flow collections, no anchors.
"""

from __future__ import annotations

import re
import shlex
import tomllib
from pathlib import Path

import pytest

from timespec.cli import _build_parser

ROOT = Path(__file__).resolve().parent.parent
HOOKS = ROOT / ".pre-commit-hooks.yaml"

_ITEM = re.compile(r"^- ([a-z_]+): (.+)$")
_KEY = re.compile(r"^  ([a-z_]+): (.+)$")


def _hooks() -> list[dict[str, str]]:
    hooks: list[dict[str, str]] = []
    for number, line in enumerate(HOOKS.read_text(encoding="utf-8").splitlines(), 1):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        item = _ITEM.match(line)
        key = _KEY.match(line)
        if item:
            hooks.append({item.group(1): item.group(2)})
        elif key and hooks:
            assert key.group(1) not in hooks[-1], f"line {number}: {key.group(1)} twice"
            hooks[-1][key.group(1)] = key.group(2)
        else:
            raise AssertionError(f"line {number} is not a plain 'key: value' line: {line!r}")
    return hooks


HOOK_LIST = _hooks()
BY_ID = {hook["id"]: hook for hook in HOOK_LIST}


def test_the_file_holds_the_two_hooks() -> None:
    assert [hook["id"] for hook in HOOK_LIST] == ["timespec-check", "timespec-format"]


@pytest.mark.parametrize("hook_id", ["timespec-check", "timespec-format"])
def test_every_hook_has_the_fields_a_hook_needs(hook_id: str) -> None:
    hook = BY_ID[hook_id]
    # id, name, entry and language are the fields a hook repository must give
    # (pre-commit's documentation of .pre-commit-hooks.yaml, "common practice").
    assert {"id", "name", "entry", "language"} <= set(hook)
    assert hook["language"] == "python"
    assert hook["pass_filenames"] == "true"
    assert re.search(hook["files"], "boards/slot.tspec")
    assert not re.search(hook["files"], "boards/slot.tspec.bak")
    assert not re.search(hook["files"], "README.md")


def test_entries_run_the_installed_command() -> None:
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert meta["project"]["scripts"]["timespec"] == "timespec.cli:main"
    for hook in HOOK_LIST:
        assert shlex.split(hook["entry"])[0] == "timespec"


@pytest.mark.parametrize(
    ("hook_id", "words"),
    [("timespec-check", ["check"]), ("timespec-format", ["format", "--check"])],
)
def test_entries_are_commands_the_cli_accepts(hook_id: str, words: list[str]) -> None:
    entry = shlex.split(BY_ID[hook_id]["entry"])[1:]
    assert entry == words
    # pre-commit appends the staged file names to the entry.
    args = _build_parser().parse_args([*entry, "boards/slot.tspec"])
    assert args.command == words[0]
    # ... as many as are staged (pass_filenames).
    many = _build_parser().parse_args([*entry, "a.tspec", "b/c.tspec"])
    assert (many.specs if hook_id == "timespec-format" else many.paths) == ["a.tspec", "b/c.tspec"]
    if hook_id == "timespec-format":
        assert args.check is True
