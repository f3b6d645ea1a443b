"""A block with every part pinned and no requirement: the board as built (issue 10 item 6).

It is reported with its nominal, worst case, statistics and findings, and exits 0
when nothing fails; its numbers are those of the same parts checked against any
requirement (the requirement only adds the verdict).  A design-rule error still
fails it, and a block that pins only some parts still needs its requirement.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import pytest

import timespec
from timespec.design.solver import solve_block
from timespec.errors import SpecError
from timespec.language.assemble import parse

# Our own scenario: characterising the timers of an inherited burn-in rack board.
AS_BUILT = {
    "oneshot": ("oneshot slot_hold:\n  use R 470k 5%, C 100n 5% C0G\n", "width 50 ms ±90%"),
    "astable": (
        "astable slot_blink:\n  use RA 10k 1%, RB 47k 1%, C 1u 10% X7R\n  circuit classic\n",
        "frequency 14 Hz ±90%",
    ),
    "delay": (
        "delay slot_reset:\n  use R 100k 5%, C 1u 5% PP\n  threshold 0.55 to 0.75 of supply\n",
        "delay 100 ms ±90%",
    ),
    "relaxation": (
        "relaxation slot_clock:\n  use R 10k 1%, C 10n 5% C0G\n",
        "frequency 5 kHz ±90%",
    ),
}
CONDITIONS = "  supply 5 V ±5%\n  ambient 0 degC to 50 degC\n"


@pytest.mark.parametrize("kind", sorted(AS_BUILT))
def test_as_built_block_reports_the_circuit(kind: str) -> None:
    head, requirement = AS_BUILT[kind]
    (bare,) = parse(head + CONDITIONS).blocks
    (checked,) = parse(head + CONDITIONS + f"  {requirement}\n").blocks
    assert not bare.requirements
    got, ref = solve_block(bare), solve_block(checked)
    assert got.verdict == "meets" and got.mode == "checked"
    assert got.best is not None and ref.best is not None
    for o, r in zip(got.best.outputs, ref.best.outputs, strict=True):
        assert o.name == r.name
        for a, b in ((o.nominal, r.nominal), (o.low, r.low), (o.high, r.high)):
            assert a == b or (math.isnan(a) and math.isnan(b))
    # statistics too: Monte Carlo of the circuit as built
    (stats,) = timespec.solve(parse(head + CONDITIONS)).blocks
    assert stats.monte_carlo is not None and stats.monte_carlo.samples > 0


def test_as_built_cli_exits_0_and_says_so(tmp_path: Path) -> None:
    spec = tmp_path / "rack.tspec"
    spec.write_text(AS_BUILT["oneshot"][0] + CONDITIONS, encoding="utf-8")
    run = subprocess.run(
        [sys.executable, "-m", "timespec", "check", str(spec)],
        capture_output=True,
        text=True,
        check=False,
    )
    assert run.returncode == 0, run.stderr
    solve = subprocess.run(
        [sys.executable, "-m", "timespec", "solve", str(spec)],
        capture_output=True,
        text=True,
        check=False,
    )
    assert solve.returncode == 0 and "AS BUILT" in solve.stdout


def test_as_built_design_rule_error_still_fails() -> None:
    # 10 MΩ with a bipolar timer's threshold current: the capacitor never reaches 2/3 V
    text = "oneshot slot_stuck:\n  use R 10M 5%, C 100n 5% C0G\n  supply 5 V ±5%\n"
    (block,) = parse(text).blocks
    assert solve_block(block).verdict != "meets"


def test_partly_pinned_block_still_needs_its_requirement() -> None:
    with pytest.raises(SpecError, match="no 'width' statement") as err:
        parse("oneshot slot_half:\n  use R 470k 5%\n  supply 5 V ±5%\n")
    assert "pin every part" in str(err.value)
