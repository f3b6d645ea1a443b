"""The shipped demo specs, end to end (our own invented scenarios)."""

from __future__ import annotations

import io
import json
import re
from pathlib import Path

import pytest

from timespec.cli import main

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.tspec"))


@pytest.mark.parametrize("spec", EXAMPLES, ids=[p.name for p in EXAMPLES])
def test_demo_meets_every_requirement(spec: Path) -> None:
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(spec)], stdout=out, stderr=err)
    assert code == 0, out.getvalue() + err.getvalue()


def test_bench_instrument_uses_every_family() -> None:
    out = io.StringIO()
    code = main(
        ["solve", str(ROOT / "examples" / "bench_instrument.tspec"), "--json", "--samples", "500"],
        stdout=out,
        stderr=io.StringIO(),
    )
    assert code == 0
    doc = json.loads(out.getvalue())
    kinds = {b["kind"] for b in doc["blocks"]}
    assert kinds == {"oneshot", "astable", "delay", "relaxation", "crystal"}
    circuits = {b["circuit"] for b in doc["blocks"] if b["kind"] == "astable"}
    assert len(circuits) == 2  # two astable variants are exercised
    for block in doc["blocks"]:
        assert block["verdict"] == "meets"
        assert block["statistics"]["monte_carlo"]["samples"] == 500


def test_readme_commands_name_shipped_files() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    named = set(re.findall(r"examples/[\w.]+\.tspec", readme))
    assert named
    for name in named:
        assert (ROOT / name).is_file(), name
    assert "python -m pytest" in readme
