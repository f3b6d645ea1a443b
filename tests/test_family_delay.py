"""End-to-end tests of the ``delay`` family: spec text → solver → worst case and findings.

Outside sources: the first-order RC charging law ``v(t) = V + (V0 − V)·e^(−t/RC)``
(any circuit-theory handbook) and scipy's ODE integrator as an independent route.
Scenario: the reset line of a burn-in rack's slot controller (our own invention).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from timespec.analysis import Factor, worst_case
from timespec.design.solver import evaluate_design, solve_block
from timespec.families import family
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.families.delay import Delay
from timespec.families.protocol import FloatArray
from timespec.families.rcscale import aim_nominal
from timespec.language.assemble import parse
from timespec.model import Block, Window
from timespec.parts.devices import BOARD_STRAY, LOGIC_INPUT_CAPACITANCE
from timespec.parts.part import Design

#: Nominal stray at the node: the middle of the generic CMOS input pin band plus the
#: board band (timespec.parts.devices: input 2…10 pF [DS], board 1…5 pF [DS/Mem]).
STRAY_NOM = 0.5 * (LOGIC_INPUT_CAPACITANCE[0] + BOARD_STRAY[0]) + 0.5 * (
    LOGIC_INPUT_CAPACITANCE[1] + BOARD_STRAY[1]
)
STRAY_MAX = LOGIC_INPUT_CAPACITANCE[1] + BOARD_STRAY[1]
STRAY_MIN = LOGIC_INPUT_CAPACITANCE[0] + BOARD_STRAY[0]

RACK = """
delay slot_reset:
  supply 5 V ±5%
  ambient -10 degC to 60 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
  delay 20 ms to 45 ms
  threshold 0.55 to 0.75 of supply
  leakage 5 nA max
"""


def block_of(text: str) -> Block:
    return parse(text).blocks[0]


def design(block: Block, r: float, c: float) -> Design:
    return Design(
        (resistor_part("R", r, block.resistors), capacitor_part("C", c, block.capacitors))
    )


def nominal_delay(block: Block, r: float, c: float) -> float:
    fam = Delay()
    x = {f.name: np.array([f.nominal]) for f in fam.factors(block, design(block, r, c))}
    return float(fam.evaluate(block, "")(x)["delay"][0])


def codes(findings: object) -> set[str]:
    return {f.code for f in findings}  # type: ignore[attr-defined]


def sweep(factors: list[Factor], n: int, seed: int) -> dict[str, FloatArray]:
    """Random points of the factor box, a third of each factor's draws at an end."""
    rng = np.random.default_rng(seed)
    out: dict[str, FloatArray] = {}
    for f in factors:
        if f.distribution == "fixed":
            out[f.name] = np.full(n, f.nominal)
            continue
        u = rng.uniform(f.low, f.high, n)
        end = np.where(rng.random(n) < 0.5, f.low, f.high)
        out[f.name] = np.where(rng.random(n) < 1 / 3, end, u)
    return out


def test_registered() -> None:
    assert isinstance(family("delay"), Delay)


# -- physics at nominal ------------------------------------------------------


def test_nominal_is_first_order_rc_law() -> None:
    # First-order RC charging law (any circuit-theory handbook): from 0 V toward V,
    # the node reaches k·V after t = R·C·ln(1/(1 − k)); C includes the nominal stray.
    blk = block_of("delay d:\n supply 5 V\n delay 10 ms to 30 ms\n threshold 0.6 of supply\n")
    r, c = 200e3, 100e-9
    assert nominal_delay(blk, r, c) == pytest.approx(
        r * (c + STRAY_NOM) * math.log(1 / (1 - 0.6)), rel=1e-12
    )


def test_nominal_with_start_voltage() -> None:
    # Same law from a start voltage V0: t = R·C·ln((V − V0)/(V − Vth)) (any circuit-theory
    # handbook); threshold in volts here.
    blk = block_of("delay d:\n supply 5 V\n delay 10 ms to 30 ms\n threshold 3 V\n start 0.5 V\n")
    r, c = 200e3, 100e-9
    assert nominal_delay(blk, r, c) == pytest.approx(
        r * (c + STRAY_NOM) * math.log(4.5 / 2.0), rel=1e-12
    )


def test_leakage_against_ode() -> None:
    # Independent route: integrate C dv/dt = (V − v)/R − i with scipy (numerical ODE
    # integration) and compare with the family's worst-case high (full leakage drain,
    # largest stray at the node added to C).
    text = (
        "delay d:\n supply 5 V\n delay 10 ms to 60 ms\n threshold 0.7 of supply\n"
        " leakage 1 uA max\n resistors E96 0%, 1k to 1M\n capacitors E12 0% C0G\n"
    )
    blk = block_of(text)
    r, c, i = 1e6, 10e-9, 1e-6
    fam = Delay()
    ex = worst_case(fam.factors(blk, design(blk, r, c)), fam.evaluate(blk, ""))["delay"]

    def hit(t: float, y: FloatArray) -> float:
        return float(y[0]) - 3.5

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        lambda t, y: [((5.0 - y[0]) / r - i) / (c + STRAY_MAX)],
        (0.0, 1.0),
        [0.0],
        rtol=1e-11,
        atol=1e-12,
        events=hit,
        method="DOP853",
    )
    assert ex.high == pytest.approx(float(sol.t_events[0][0]), rel=1e-7)


# -- solving -----------------------------------------------------------------


def test_solves_and_encloses_dense_sweep() -> None:
    blk = block_of(RACK)
    res = solve_block(blk)
    assert res.verdict == "meets"
    assert res.best is not None
    out = res.best.output("delay")
    assert 0.020 <= out.low < out.high <= 0.045
    fam = Delay()
    factors = fam.factors(blk, res.best.design)
    y = fam.evaluate(blk, "")(sweep(factors, 200_000, 7))["delay"]
    # Every model input is monotone (module notes): the corners must enclose the sweep.
    assert y.min() >= out.low * (1 - 1e-12)
    assert y.max() <= out.high * (1 + 1e-12)
    assert {"supply-taken-as-step", "discharge-between-cycles"} <= codes(res.best.findings)


def test_threshold_in_volts_equals_fraction_on_a_fixed_supply() -> None:
    # With an exact supply, 0.6 of 5 V and 3 V are the same threshold.
    ratio = block_of("delay d:\n supply 5 V\n delay 10 ms to 30 ms\n threshold 0.6 of supply\n")
    volts = block_of("delay d:\n supply 5 V\n delay 10 ms to 30 ms\n threshold 3 V\n")
    assert nominal_delay(ratio, 150e3, 68e-9) == pytest.approx(nominal_delay(volts, 150e3, 68e-9))


def test_threshold_in_volts_on_a_varying_supply_warns_and_spreads_more() -> None:
    # 1 pA of leakage (negligible: i·R ~ 0.15 µV) replaces the assumed ±1 µA input bound.
    ratio = block_of(
        "delay d:\n supply 4.5 V to 5.5 V\n delay 10 ms to 30 ms\n threshold 0.5 to 0.6 of supply\n"
        " leakage 1 pA max\n"
    )
    volts = block_of(
        "delay d:\n supply 4.5 V to 5.5 V\n delay 10 ms to 30 ms\n threshold 2.5 V to 3 V\n"
        " leakage 1 pA max\n"
    )
    cr = evaluate_design(ratio, design(ratio, 150e3, 68e-9))
    cv = evaluate_design(volts, design(volts, 150e3, 68e-9))
    assert "threshold-in-volts" in codes(cv.findings)
    assert "threshold-in-volts" not in codes(cr.findings)
    # A ratiometric threshold makes the delay independent of the supply (RC law, any
    # circuit-theory handbook: t = RC·ln(1/(1 − k)) holds for every V), so the window
    # with volts is strictly wider.
    wr, wv = cr.output("delay"), cv.output("delay")
    assert wv.high - wv.low > wr.high - wr.low
    assert wr.low == pytest.approx(
        150e3 * 0.99 * (68e-9 * 0.95 + STRAY_MIN) * math.log(1 / 0.5), rel=1e-3
    )


def test_infeasible_gives_closest_design() -> None:
    # The threshold band alone spreads ln(1/(1 − k)) over 0.80…1.39 (RC law): ±2 % is out of reach.
    blk = block_of(RACK.replace("delay 20 ms to 45 ms", "delay 30 ms ±2%"))
    res = solve_block(blk)
    assert res.verdict == "infeasible"
    assert res.best is not None
    out = res.best.output("delay")
    # the closest design straddles the window
    assert out.low < 0.0294 and out.high > 0.0306


def test_pinned_is_checked_not_chosen() -> None:
    blk = block_of(RACK + "  use R 390k, C 82n\n")
    res = solve_block(blk)
    assert res.mode == "checked"
    assert res.best is not None
    assert res.best.design.part("R").value == 390e3
    assert res.best.design.part("C").value == 82e-9
    out = res.best.output("delay")
    assert res.verdict == ("meets" if out.low >= 0.020 and out.high <= 0.045 else "fails")


def test_pinned_capacitor_chooses_resistor() -> None:
    blk = block_of(RACK + "  use C 47n\n")
    res = solve_block(blk)
    assert res.best is not None
    assert res.best.design.part("C").value == 47e-9
    assert res.best.design.part("C").pinned
    assert not res.best.design.part("R").pinned


# -- design rules --------------------------------------------------------------


def test_leakage_that_stalls_the_charge_is_an_error() -> None:
    # 20 µA through 100 kΩ drops 2 V: the node settles at 2.75 V, below 0.75 × 5.25 V.
    blk = block_of(RACK.replace("leakage 5 nA max", "leakage 20 uA max"))
    cand = evaluate_design(blk, design(blk, 100e3, 100e-9))
    assert math.isinf(cand.output("delay").high)
    assert "threshold-never-reached" in codes(cand.findings)
    assert not cand.meets


def test_start_above_threshold_is_an_error() -> None:
    blk = block_of(RACK + "  start 3 V\n")
    cand = evaluate_design(blk, design(blk, 390e3, 82e-9))
    assert "start-above-threshold" in codes(cand.findings)


def test_aim_centres_the_worst_case() -> None:
    w = Window(20e-3, 40e-3, "time")
    aim = aim_nominal(w, 0.8, 1.3)
    assert 0.5 * (aim * 0.8 + aim * 1.3) == pytest.approx(30e-3)
    assert aim_nominal(Window(0.0, 40e-3, "time"), 0.8, 1.25) == pytest.approx(0.9 * 40e-3 / 1.25)
    assert aim_nominal(Window(20e-3, math.inf, "time"), 0.8, 1.25) == pytest.approx(
        1.1 * 20e-3 / 0.8
    )


# -- properties ------------------------------------------------------------------


@settings(max_examples=25, deadline=None)
@given(
    k=st.floats(0.1, 10.0),
    r=st.floats(1e3, 1e6),
    c=st.floats(1e-10, 1e-6),
)
def test_delay_scales_with_capacitance(k: float, r: float, c: float) -> None:
    # t = R·(C + Cs)·ln(...) with the drain entering only through i·R (RC law with a
    # Thevenin shift, any circuit-theory handbook): the delay is proportional to C + Cs.
    blk = block_of(RACK)
    assert nominal_delay(blk, r, k * c) / (k * c + STRAY_NOM) == pytest.approx(
        nominal_delay(blk, r, c) / (c + STRAY_NOM), rel=1e-9
    )


@settings(max_examples=25, deadline=None)
@given(
    r=st.sampled_from([4.7e3, 100e3, 1e6]),
    c=st.sampled_from([1e-9, 100e-9, 2.2e-6]),
    threshold=st.sampled_from(["0.55 to 0.75 of supply", "0.5 of supply", "2 V to 3 V"]),
    start=st.sampled_from(["", "  start 0.4 V\n", "  start -0.3 V\n", "  start 2.8 V\n"]),
    leak=st.sampled_from(["", "  leakage 5 nA max\n", "  leakage 2 uA max\n"]),
    caps=st.sampled_from(
        ["E12 5% C0G, 100p to 10u", "E6 20% AL, 1u to 100u", "E6 10% X7R, 10n to 10u"]
    ),
)
def test_declared_monotone_factors_give_the_full_worst_case(
    r: float, c: float, threshold: str, start: str, leak: str, caps: str
) -> None:
    # The delay's declared rising/falling factors let the search skip half of each
    # declared axis; the result must equal the exhaustive corner search exactly (the
    # proof beside DELAY_RISING_BELOW and in `declarations`, checked here by brute
    # force), including designs whose node never reaches the threshold (inf) and
    # starts above part of the threshold band (nothing but C declared then).
    import dataclasses

    text = (
        "delay d:\n  supply 4.5 V to 5.5 V\n  ambient -20 degC to 85 degC\n"
        "  resistors E96 1% 100 ppm/K, 1k to 10M\n"
        f"  capacitors {caps}\n  delay 10 ms to 30 ms\n  threshold {threshold}\n  life 10 years\n"
        + start
        + leak
    )
    blk = block_of(text)
    fam = Delay()
    cap = capacitor_part("C", c, blk.capacitors)
    d = Design((resistor_part("R", r, blk.resistors), cap))
    facs = fam.factors(blk, d)
    assert any(f.rising for f in facs)
    plain = [dataclasses.replace(f, rising=(), falling=()) for f in facs]
    fast = worst_case(facs, fam.evaluate(blk, ""))["delay"]
    full = worst_case(plain, fam.evaluate(blk, ""))["delay"]
    assert (fast.low, fast.high) == (full.low, full.high)
