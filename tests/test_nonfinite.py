"""A model that leaves floating-point range gives a located error, never a verdict."""

from __future__ import annotations

import numpy as np
import pytest

from timespec import parse
from timespec.design.solver import solve_block
from timespec.errors import SpecError
from timespec.families.oneshot import OneShot

SPEC = """defaults:
  supply 12 V ±5%
  resistors E24 1%, 1k to 1M
  capacitors E12 5% C0G, 1n to 100n
  timer cmos
oneshot blank:
  width 1 ms ±10%
"""


@pytest.mark.parametrize("bad", [np.nan, np.inf])
def test_non_finite_model_output_is_an_error_not_a_verdict(
    monkeypatch: pytest.MonkeyPatch, bad: float
) -> None:
    # fault injection: the width comes out NaN (never an answer) or infinite on a
    # pinned design whose requirement would otherwise read as met
    original = OneShot.evaluate

    def broken(self: OneShot, block: object, variant: str):  # type: ignore[no-untyped-def]
        model = original(self, block, variant)  # type: ignore[arg-type]

        def evaluate(x):  # type: ignore[no-untyped-def]
            out = model(x)
            return {k: np.full_like(v, bad) for k, v in out.items()}

        return evaluate

    monkeypatch.setattr(OneShot, "evaluate", broken)
    spec = parse(SPEC + "  use R 8k2 1%, C 100n 5%\n", "t.tspec")
    block = spec.blocks[0]
    if bad == np.inf:
        # an infinite width FAILS a two-sided requirement honestly (a threshold never
        # reached); it must not become a MEETS
        try:
            res = solve_block(block)
        except SpecError as err:
            assert str(err).startswith("t.tspec:")
        else:
            assert res.verdict != "meets"
        return
    with pytest.raises(SpecError) as info:
        solve_block(block)
    text = str(info.value)
    assert text.startswith("t.tspec:6:") and "not a finite number" in text
