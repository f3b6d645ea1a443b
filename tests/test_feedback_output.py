"""The output-feedback astable's output stage: a source with resistance per side.

Scenario is our own (a status blinker on a bench power-supply front panel).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from timespec.analysis import nominal_inputs, worst_case
from timespec.families.astable import Astable, feedback
from timespec.families.astable.monotone import declarations
from timespec.language.assemble import parse
from timespec.model import Block
from timespec.parts.devices import TIMER_CLASSES
from timespec.physics.astable import feedback_output_currents

FAM = Astable()

POLICY = """  supply 12 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 100R to 1M
  capacitors E12 5% C0G, 1n to 1u
"""


def block(body: str = "", policy: str = POLICY) -> Block:
    text = "astable panel_blink:\n  frequency 2 kHz ±12%\n  circuit feedback\n  timer cmos\n"
    return parse(text + body + policy).blocks[0]


def with_timer(b: Block, **fields: object) -> Block:
    assert b.timer is not None
    return dataclasses.replace(b, timer=dataclasses.replace(b.timer, **fields))


def test_every_timer_class_has_output_stage_fields() -> None:
    for t in TIMER_CLASSES.values():
        for lo, hi in (t.r_out_high, t.r_out_low):
            assert 0.0 <= lo <= hi
        assert t.i_out_max > 0.0
    cmos = TIMER_CLASSES["cmos"]
    # REFERENCE.md: tens to a few hundred ohms per side (from memory); ±10 mA (from memory)
    assert cmos.r_out_high == (50.0, 300.0) and cmos.r_out_low == (50.0, 300.0)
    assert cmos.i_out_max == pytest.approx(10e-3)


def test_output_factors_carry_class_bands() -> None:
    b = block()
    design = FAM._design(b, "feedback", {"R": 10e3, "C": 10e-9})
    facs = {f.name: f for f in FAM.factors(b, design)}
    assert (facs["output.roh"].low, facs["output.roh"].high) == (50.0, 300.0)
    assert (facs["output.rol"].low, facs["output.rol"].high) == (50.0, 300.0)


def _ode_time(r: float, c: float, v_level: float, v0: float, v1: float, i_drain: float) -> float:
    """Time for the node to go from v0 to v1 by integrating its ODE (scipy solve_ivp).

    Node ODE: C·dv/dt = (V_level − v)/R − i_drain (Kirchhoff's current law at the
    capacitor node with the output modelled as a Thevenin source; RC charge law).
    """

    def rhs(_t: float, v: np.ndarray) -> np.ndarray:
        return np.array([((v_level - v[0]) / r - i_drain) / c])

    def hit(_t: float, v: np.ndarray) -> float:
        return float(v[0] - v1)

    hit.terminal = True  # type: ignore[attr-defined]
    tau = r * c
    sol = solve_ivp(rhs, (0.0, 50.0 * tau), [v0], events=hit, rtol=1e-10, atol=1e-12)
    assert sol.t_events[0].size == 1
    return float(sol.t_events[0][0])


@pytest.mark.parametrize(
    ("r", "roh", "rol", "i_drain"),
    [(2e3, 300.0, 80.0, 20e-6), (1e3, 50.0, 300.0, 0.0), (47e3, 150.0, 150.0, 5e-6)],
)
def test_half_periods_match_node_ode(r: float, roh: float, rol: float, i_drain: float) -> None:
    b = block()
    design = FAM._design(b, "feedback", {"R": r, "C": 10e-9})
    x = nominal_inputs(FAM.factors(b, design))
    v, k, c = 5.0, 0.66, 10e-9
    drop, v_ol = 0.05, 0.03
    for name in [n for n in x if n.endswith((".tol", ".tc", ".age", ".drift"))]:
        x[name] = np.zeros(1)
    x.update(
        {
            "R.value": np.array([r]),
            "C.value": np.array([c]),
            "supply": np.array([v]),
            "timer.ratio": np.array([k]),
            "timer.ith": np.array([i_drain]),
            "leak": np.zeros(1),
            "output.drop": np.array([drop]),
            "output.low": np.array([v_ol]),
            "output.roh": np.array([roh]),
            "output.rol": np.array([rol]),
        }
    )
    x["timer.delay"] = np.zeros(1)  # the output delay has its own test (test_timer_delay)
    th, tl = feedback.half_periods(x)
    # the node's stray (timer pins and board) adds to C
    c_node = c + float(x["stray"][0])
    # scipy solve_ivp of the node ODE, charge through R + R_oh toward V − drop ...
    th_ref = _ode_time(r + roh, c_node, v - drop, k * v / 2, k * v, i_drain)
    # ... and discharge through R + R_ol toward V_ol
    tl_ref = _ode_time(r + rol, c_node, v_ol, k * v, k * v / 2, i_drain)
    assert float(th[0]) == pytest.approx(th_ref, rel=1e-6)
    assert float(tl[0]) == pytest.approx(tl_ref, rel=1e-6)


def test_output_currents_ohms_law() -> None:
    # Ohm's law at the switching instant (capacitor voltage continuous): V − kV/2 and kV
    # across R + R_out (circuit-theory handbook).
    i_src, i_snk = feedback_output_currents(1e3, 100.0, 200.0, 12.0, 2.0 / 3.0)
    assert float(i_src) == pytest.approx((12.0 - 4.0) / 1100.0)
    assert float(i_snk) == pytest.approx(8.0 / 1200.0)


def _codes(b: Block, r: float) -> set[str]:
    design = FAM._design(b, "feedback", {"R": r, "C": 10e-9})
    return {f.code for f in FAM.findings(b, design, {})}


def test_output_current_rule_fires_for_small_r() -> None:
    b = block()
    # 12.6 V, k up to ~0.67, R_min = 465 Ω, R_out,min = 50 Ω: ≈ 16 mA > 10 mA
    assert "output-current-limit" in _codes(b, 470.0)
    # 10 kΩ: ≈ 0.9 mA, well inside
    assert "output-current-limit" not in _codes(b, 10e3)
    design = FAM._design(b, "feedback", {"R": 470.0, "C": 10e-9})
    (f,) = [g for g in FAM.findings(b, design, {}) if g.code == "output-current-limit"]
    assert f.severity == "warning"
    assert "mA" in f.message and "larger R" in f.message


def test_output_current_rule_at_the_limit() -> None:
    b = block()
    assert b.timer is not None
    k_lo, k_hi = b.timer.ratio_band
    v = b.conditions.supply.high
    # largest current by hand: high side V(1 − k_min/2), low side k_max·V (Ohm's law)
    for r in (600.0, 800.0, 1.2e3, 2e3):
        r_min = r * 0.99
        i_max = max(v * (1 - k_lo / 2) / (r_min + 50.0), k_hi * v / (r_min + 50.0))
        fired = "output-current-limit" in _codes(b, r)
        assert fired == (i_max > 10e-3), (r, i_max)


def _period_span(b: Block, r: float, c: float) -> tuple[float, float]:
    design = FAM._design(b, "feedback", {"R": r, "C": c})
    wc = worst_case(FAM.factors(b, design), FAM.evaluate(b, "feedback"))
    return wc["period"].low, wc["period"].high


def test_worst_case_widens_with_output_resistance() -> None:
    b = block()
    zero = with_timer(b, r_out_high=(0.0, 0.0), r_out_low=(0.0, 0.0))
    wide = with_timer(b, r_out_high=(50.0, 1000.0), r_out_low=(50.0, 1000.0))
    r, c = 2e3, 100e-9
    lo0, hi0 = _period_span(zero, r, c)
    lo1, hi1 = _period_span(b, r, c)
    lo2, hi2 = _period_span(wide, r, c)
    # series resistance only slows the RC law: the longest period grows with R_out,max,
    # the shortest with R_out,min (RC charge law)
    assert hi1 > hi0 and hi2 > hi1
    assert lo1 > lo0 and lo2 == pytest.approx(lo1)
    assert hi2 - lo2 > hi1 - lo1 > hi0 - lo0
    # relative size: R_out,max/R adds up to 300/2000 = 15 % to the series resistance
    assert hi1 / hi0 == pytest.approx((r * 1.01 + 300.0) / (r * 1.01), rel=0.02)


@settings(max_examples=8, deadline=None)
@given(r=st.floats(200.0, 5e3), c=st.floats(1e-9, 1e-6), supply=st.sampled_from([3.3, 5.0, 12.0]))
def test_declared_output_resistance_exact(r: float, c: float, supply: float) -> None:
    # The declared search must give EXACTLY the extremes of the full corner search
    # (brute-force check of the monotonicity proofs), with R small next to R_out.
    # The output-resistance proofs are those of the delay-free model: with the timer's
    # output delay the halves couple and the family declares only C, stray and delay.
    policy = POLICY.replace("12 V", f"{supply:g} V")
    b = block("  leakage 20 uA max\n", policy) if supply == 12.0 else block("", policy)
    delayed = FAM.factors(b, FAM._design(b, "feedback", {"R": r, "C": c}))
    undelayed = declarations(
        [dataclasses.replace(f, rising=(), falling=()) for f in delayed], "feedback"
    )
    assert not any(f.name == "output.roh" and f.rising for f in undelayed)
    b = with_timer(b, t_pd=(0.0, 0.0))
    design = FAM._design(b, "feedback", {"R": r, "C": c})
    plain = [dataclasses.replace(f, rising=(), falling=()) for f in FAM.factors(b, design)]
    facs = declarations(plain, "feedback")
    assert any(f.name == "output.roh" and f.rising for f in facs)
    model = FAM.evaluate(b, "feedback")
    fast = worst_case(facs, model)
    full = worst_case(plain, model)
    for name, e in full.items():
        got = fast[name]
        same_lo = got.low == e.low or (math.isnan(got.low) and math.isnan(e.low))
        same_hi = got.high == e.high or (math.isnan(got.high) and math.isnan(e.high))
        assert same_lo and same_hi, (name, got, e)


def test_solved_feedback_design_respects_output_limit() -> None:
    from timespec.design.solver import solve_block

    # 100 kHz with 10 nF to 100 nF: R of a few hundred ohms, near the current limit
    text = "astable panel_blink:\n  frequency 100 kHz ±12%\n  circuit feedback\n  timer cmos\n"
    b = parse(text + POLICY.replace("1n to 1u", "10n to 100n")).blocks[0]
    res = solve_block(b)
    assert res.best is not None
    design = res.best.design
    r = design.part("R")
    assert b.timer is not None
    v = b.conditions.supply.high
    k_lo, k_hi = b.timer.ratio_band
    r_min = r.value * (1 - r.tolerance)
    # Ohm's law at the switching instant (circuit-theory handbook)
    i_max = max(v * (1 - k_lo / 2), k_hi * v) / (r_min + 50.0)
    fired = "output-current-limit" in {f.code for f in res.best.findings}
    assert fired == (i_max > 10e-3)


def test_duty_range_covers_unequal_output_resistances_at_the_smallest_r() -> None:
    # first-order RC law (circuit-theory handbook): tH = (R + R_oh)·C·ln((V − kV/2)/(V − kV)),
    # tL = (R + R_ol)·C·ln(kV/(kV/2)) with rail-to-rail levels; at the policy's smallest R
    # with R_oh at the top of its band and R_ol at the bottom the duty rises above 50 %.
    from timespec.families.astable.feedback import feedback_duty_range

    b = block()
    t = b.timer
    assert t is not None
    r = b.resistors.low
    k = 2.0 / 3.0
    th = (r + t.r_out_high[1]) * math.log((1 - k / 2) / (1 - k))
    tl = (r + t.r_out_low[0]) * math.log(2.0)
    skewed = th / (th + tl)
    lo, hi = feedback_duty_range(b)
    assert lo <= 1 - skewed + 1e-12 and skewed - 1e-12 <= hi
