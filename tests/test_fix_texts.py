"""Fix texts and the timer-class change: complete, one sentence, and verified by re-solving.

Scenarios are our own: a burn-in rack's slow heartbeat, a bench instrument's status
blinker and a soak-gate one-shot on a burn-in fixture.
"""

from __future__ import annotations

import math

import pytest

from timespec.design.fixes import COSTS, Fix, suggest_fixes, trim_design
from timespec.design.fixes import trimmer as trimmer_module
from timespec.design.fixes.changes import apply_changes, design_changes
from timespec.design.fixes.fix import fix_sentence, join_changes, parts_text, window_text
from timespec.design.fixes.trimmer import trim_with_change
from timespec.design.solver import solve_block
from timespec.language.assemble import parse
from timespec.model import Block

# Burn-in rack: a heartbeat every 100 s, on the rack's 12 V rail.
HEARTBEAT = "astable rack_heartbeat:\n  frequency 0.01 Hz ±10%\n  supply 12 V ±5%\n"
# Bench instrument: a 2 Hz status blinker, its designer's shelf of X7R.
BLINKER = (
    "astable bench_blink:\n  frequency 2 Hz ±10%\n  supply 12 V ±5%\n"
    "  ambient 0 degC to 50 degC\n  capacitors X7R 10% 1n to 10u\n"
)
# Burn-in fixture: a 180 ms soak gate with only small C0G parts allowed.
SOAK_GATE = (
    "oneshot soak_gate:\n  width 180 ms ±8%\n  supply 12 V ±5%\n"
    "  capacitors E12 5% C0G, 100p to 100n\n"
)

_CACHE: dict[str, tuple[Block, list[Fix]]] = {}


def _solved(text: str) -> tuple[Block, list[Fix]]:
    if text not in _CACHE:
        block = parse(text).blocks[0]
        _CACHE[text] = (block, suggest_fixes(block))
    return _CACHE[text]


def _block(text: str) -> Block:
    return parse(text).blocks[0]


def _check_claims(fixes: list[Fix]) -> None:
    """Every non-trimmer fix, re-solved from its block, meets and reaches its windows."""
    assert fixes
    for f in fixes:
        assert f.verdict == "meets"
        assert ", and:" not in f.what  # one sentence, not two glued together
        if "trimmer" in f.kind.split("+"):
            continue
        again = solve_block(f.block)
        assert again.verdict == "meets"
        assert again.best is not None
        for out in again.best.outputs:
            if out.required is not None:
                assert out.required.low <= out.low <= out.high <= out.required.high


# --------------------------------------------------------------------------
# the timer-class change


def test_timer_class_change_text_and_cost() -> None:
    block = _block(HEARTBEAT)
    assert block.timer is not None and block.timer.name == "bipolar"
    [change] = [c for c in design_changes(block, False) if c.kind == "timer-class"]
    assert change.text == "the cmos timer class instead of bipolar ('timer cmos')"
    # a class change is dearer than any single tolerance grade, cheaper than a trimmer
    assert COSTS["resistor-tolerance"] < change.cost < COSTS["trimmer"]
    assert COSTS["capacitor-tolerance"] < change.cost


def test_timer_class_change_sets_the_new_builtin_resistor_top() -> None:
    block = _block(HEARTBEAT)
    [change] = [c for c in design_changes(block, False) if c.kind == "timer-class"]
    new = apply_changes(block, (change,))
    assert new.timer is not None and new.timer.name == "cmos"
    # Threshold current times R must stay within 1 % of supply_low/3 (the model's rule):
    # bipolar 250 nA × 1 MΩ = 0.25 V, cmos 1 nA × 10 MΩ = 10 mV, both under
    # 1 % × 11.4 V / 3 = 38 mV only for cmos at 10 MΩ (threshold currents: generic
    # class datasheets, as timespec.parts.devices).
    assert block.resistors.high == pytest.approx(1e6)
    assert new.resistors.high == pytest.approx(10e6)
    assert 1e-9 * 10e6 <= 0.01 * 11.4 / 3 < 250e-9 * 10e6


def test_timer_class_change_keeps_a_stated_resistor_range() -> None:
    block = _block(HEARTBEAT + "  resistors E96 1% 100 ppm/K, 1k to 2M\n")
    [change] = [c for c in design_changes(block, False) if c.kind == "timer-class"]
    assert apply_changes(block, (change,)).resistors.high == pytest.approx(2e6)


@pytest.mark.parametrize(
    ("extra", "supply"),
    [
        # cmos class: 2-15 V; 15 V +5 % is 15.75 V (generic class datasheets)
        ("", "15 V ±5%"),
        # bipolar class: 4.5-16 V; 3.3 V -5 % is 3.135 V (generic class datasheets)
        ("  timer cmos\n", "3.3 V ±5%"),
    ],
)
def test_no_timer_class_that_misses_part_of_the_supply(extra: str, supply: str) -> None:
    text = f"astable rack_led:\n  frequency 1 Hz ±10%\n  supply {supply}\n{extra}"
    block = _block(text)
    assert not [c for c in design_changes(block, False) if c.kind == "timer-class"]


def test_no_timer_class_change_without_a_timer() -> None:
    text = (
        "delay fixture_settle:\n  delay 10 ms ±10%\n  supply 5 V ±5%\n"
        "  threshold 0.55 to 0.75 of supply\n"
    )
    block = _block(text)
    assert not [c for c in design_changes(block, True) if c.kind == "timer-class"]


def test_slow_heartbeat_is_fixed_by_the_cmos_class() -> None:
    # 0.01 Hz needs R·C near 1.44 / 0.01 Hz = 144 s (astable f = 1.44/((RA+2RB)·C),
    # 555 handbook formula): a bipolar class's 1 MΩ top needs C ≈ 48 µF, an
    # electrolytic whose leakage stalls the node; the cmos class's 10 MΩ top reaches it
    # with film.
    _, fixes = _solved(HEARTBEAT)
    _check_claims(fixes)
    timer_fixes = [f for f in fixes if "timer-class" in f.kind.split("+")]
    assert timer_fixes
    f = timer_fixes[0]
    assert "'timer cmos'" in f.what
    assert f.block.timer is not None and f.block.timer.name == "cmos"
    lo, hi = f.windows["frequency"]
    assert 0.009 <= lo <= hi <= 0.011
    caps = [p for p in f.parts if p.kind == "capacitance"]
    assert caps and all(p.dielectric not in ("AL", "TA") for p in caps)


# --------------------------------------------------------------------------
# sentences


def test_join_changes() -> None:
    assert join_changes([]) == ""
    assert join_changes(["a"]) == "a"
    assert join_changes(["a", "b"]) == "a and b"
    assert join_changes(["a", "b", "c"]) == "a, b and c"


def test_astable_fix_sentence_names_the_circuit_variant() -> None:
    _, fixes = _solved(BLINKER)
    _check_claims(fixes)
    f = fixes[0]
    res = solve_block(f.block)
    assert res.best is not None
    cand = res.best
    text = fix_sentence(f.block, ["PP capacitors (5 %) instead of X7R (10 %)"], cand)
    variant = cand.design.variant
    assert variant in ("classic", "diode", "feedback")
    assert text == (
        f"Use PP capacitors (5 %) instead of X7R (10 %): {variant} circuit with "
        f"{parts_text(cand.design.parts)} gives {window_text(cand)}."
    )
    # every part named with its value and technology
    for p in cand.design.parts:
        assert f"{p.ref} = " in text


def test_oneshot_fix_sentence_has_no_variant() -> None:
    _, fixes = _solved(SOAK_GATE)
    plain = [f for f in fixes if "trimmer" not in f.kind.split("+")]
    assert plain
    res = solve_block(plain[0].block)
    assert res.best is not None
    text = fix_sentence(plain[0].block, ["a", "b"], res.best)
    assert text.startswith("Use a and b: R = ")
    assert "circuit" not in text


def test_trimmer_with_a_range_change_reads_as_one_sentence() -> None:
    _, fixes = _solved(SOAK_GATE)
    _check_claims(fixes)
    [f] = [f for f in fixes if f.kind == "resistor-range+trimmer"]
    assert f.what.startswith(
        "Resistors from 100R to 10M instead of 1k to 1M, with R made of a fixed "
    )
    res = solve_block(f.block)
    assert res.best is not None
    trim = trim_design(f.block, res)
    assert trim is not None
    [cap] = [p for p in res.best.design.parts if p.kind == "capacitance"]
    # the kept capacitor is named with its value, grade and dielectric
    assert f" and {parts_text([cap])}, adjusted at 25 °C" in f.what
    assert f.what.endswith("inside 165.6 ms … 194.4 ms.")  # 180 ms ±8 %
    # One-shot width t = ln 3 · R · C (555 handbook formula): the total the fixed part
    # plus trimmer surely covers must reach the 180 ms target with the nominal C.
    t_lo = math.log(3.0) * trim.covered[0] * cap.value
    t_hi = math.log(3.0) * trim.covered[1] * cap.value
    assert t_lo <= 0.180 <= t_hi
    lo, hi = f.windows["width"]
    assert 0.1656 <= lo <= hi <= 0.1944


def test_trim_with_change_returns_at_once_for_an_astable(monkeypatch: pytest.MonkeyPatch) -> None:
    # a trimmer never suits an astable (trim_design: one-shot, delay, relaxation only)
    block = _block(BLINKER)

    def no_solve(b: Block) -> object:
        raise AssertionError("re-solved a block that takes no trimmer")

    monkeypatch.setattr(trimmer_module, "solve_block", no_solve)
    assert trim_with_change(block, design_changes(block, False)) is None
