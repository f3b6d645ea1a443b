"""The logic input an RC node feeds: default leakage, stray capacitance, gate-class ranges."""

from __future__ import annotations

import timespec
from timespec.design.solver import solve_block


def _solve(text: str):  # type: ignore[no-untyped-def]
    return solve_block(timespec.parse(text).blocks[0])


DELAY = (
    "delay por:\n  delay 40 ms to 60 ms\n  supply 5 V ±5%\n"
    "  threshold 0.57 to 0.63 of supply\n"
    "  resistors E96 1%, 1k to 10M\n  capacitors E12 5% PP, 1n to 1u\n"
)


def test_unstated_leakage_is_the_cmos_input_bound_and_is_said() -> None:
    res = _solve(DELAY)
    assert res.best is not None
    codes = {f.code for f in res.best.findings}
    assert "input-leakage-assumed" in codes
    note = next(f for f in res.best.findings if f.code == "input-leakage-assumed")
    assert "1 µA" in note.message


def test_unstated_leakage_keeps_the_resistor_where_1ua_does_not_move_the_delay() -> None:
    # Regression: with zero leakage assumed the solver took multi-megohm resistors,
    # where ±1 µA (the usual CMOS input bound over temperature [DS]) moves the node
    # by volts: 1 µA · 1 MΩ = 1 V against a 5 V supply.
    res = _solve(DELAY)
    assert res.best is not None and res.verdict == "meets"
    assert res.best.design.part("R").value < 1e6


def test_default_leakage_widens_the_window_of_a_pinned_design() -> None:
    # The node settles at V ∓ i·R instead of V (RC charge law with a constant
    # current [Txt]), so both signs of 1 µA must widen the worst case of a pinned
    # 470 kΩ design against 1 pA.
    pinned = DELAY + "  use R 470k 1%, C 100n PP 5%\n"
    wide = _solve(pinned).best
    narrow = _solve(pinned + "  leakage 1 pA max\n").best
    assert wide is not None and narrow is not None
    (w,) = [o for o in wide.outputs if o.name == "delay"]
    (n,) = [o for o in narrow.outputs if o.name == "delay"]
    assert w.low < n.low and w.high > n.high
    v, i, r = 5.25, 1e-6, 470e3 * 1.01
    assert (n.low - w.low) / n.low > 0.5 * (i * r / v) * 0.1  # at least a tenth of first order


def test_stated_leakage_replaces_the_default() -> None:
    res = _solve(DELAY + "  leakage 10 nA max\n")
    assert res.best is not None
    assert "input-leakage-assumed" not in {f.code for f in res.best.findings}


def test_small_capacitor_beside_the_stray_is_warned() -> None:
    text = (
        "delay quick:\n  delay 2 us to 3 us\n  supply 5 V ±5%\n"
        "  threshold 0.45 to 0.55 of supply\n  use R 22k 1%, C 100p C0G 5%\n"
    )
    res = _solve(text)
    assert res.best is not None
    assert "stray-comparable" in {f.code for f in res.best.findings}


_DELAY = """defaults:
  supply 5 V ±5%
  gate metalgate
delay por:
  delay 15 ms to 60 ms
  threshold 0.4 to 0.6 of supply
"""


def test_a_delay_block_may_name_the_gate_that_watches_it() -> None:
    # regression: 'gate' was refused in a delay block although the family models the
    # gate's leakage, pin capacitance and propagation delay (class datasheets [DS])
    spec = timespec.parse(_DELAY + "  gate highspeed\n", "t.tspec")
    block = spec.blocks[0]
    assert block.gate is not None and block.gate.name == "highspeed"
    res = solve_block(block)
    names = {f.name for f in res.factors}
    assert "gate.delay" in names


def test_a_default_gate_does_not_move_a_delay_block() -> None:
    # the defaults' gate is for the relaxation oscillators; a delay block's input is a
    # generic CMOS input unless the block says otherwise
    block = timespec.parse(_DELAY, "t.tspec").blocks[0]
    assert block.gate is None
