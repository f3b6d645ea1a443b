"""A block whose only problem is a design rule is not offered a trimmer (issue 10 items 3, 4).

A trigger held low longer than the pulse keeps a 555-type one-shot's output high
until the trigger returns (the trigger comparator overrides the threshold; generic
timer datasheets, common practice), so no part value or trimming fixes it: the
notes must say that the windows are met and which rule breaks, and no fix may be
proposed that leaves the rule broken.
"""

from __future__ import annotations

import timespec
from timespec.language.assemble import parse

# Our own scenario: a door-switch debounce on a test rack, with too long a trigger.
_SPEC = """oneshot door_debounce:
  width 5 ms ±10%
  trigger 8 ms
  supply 12 V ±5%
  ambient 0 degC to 50 degC
"""


def test_trigger_problem_gets_no_trimmer_and_a_true_cause() -> None:
    result = timespec.solve(parse(_SPEC), statistics=False)
    (block,) = result.blocks
    assert block.verdict == "infeasible" and block.best is not None
    assert block.best.excess == 0
    assert any(f.code == "trigger-outlasts-pulse" for f in block.best.findings)
    fixes = block.extra.get("fixes", ())
    assert all(f.kind != "trimmer" for f in fixes)
    for fix in fixes:  # any fix offered was re-solved to a design that meets
        assert fix.verdict == "meets"
    text = " ".join(block.notes)
    assert "keeps every window" in text
    assert "trigger-outlasts-pulse" in text
    assert "less spread" not in text
