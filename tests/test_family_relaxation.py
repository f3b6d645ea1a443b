"""End-to-end tests of the ``relaxation`` family (Schmitt-inverter RC oscillator).

Outside sources: the Schmitt-inverter oscillator relation for a rail-to-rail output,
``T = R·C·[ln(VT+/VT−) + ln((V − VT−)/(V − VT+))]``, which follows from the first-order
RC charge and discharge laws (any circuit-theory handbook); threshold bands are the
generic device-class datasheet figures recorded in ``timespec.parts.devices``.
Scenario: the status blinker and a ticking clock of a bench instrument (our own invention).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.analysis import Factor, worst_case
from timespec.design.solver import evaluate_design, solve_block
from timespec.families import family
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.families.inputs import apply_part
from timespec.families.protocol import FloatArray
from timespec.families.relaxation import Relaxation
from timespec.families.schmitt import thresholds, width_knots
from timespec.language.assemble import parse
from timespec.model import Block
from timespec.parts.part import Design
from timespec.physics import relaxation as rx

BENCH = """
relaxation status_tick:
  supply 5 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 100p to 100n
  frequency 200 Hz to 3 kHz
"""


def block_of(text: str) -> Block:
    return parse(text).blocks[0]


def design(block: Block, r: float, c: float) -> Design:
    return Design(
        (resistor_part("R", r, block.resistors), capacitor_part("C", c, block.capacitors))
    )


def nominal(block: Block, r: float, c: float, *, ideal: bool = True) -> dict[str, float]:
    """Outputs at the nominal point; ``ideal`` sets the stray and the gate delay to 0."""
    fam = Relaxation()
    x = {f.name: np.array([f.nominal]) for f in fam.factors(block, design(block, r, c))}
    if ideal:
        x["stray"] = np.zeros(1)
        x["gate.delay"] = np.zeros(1)
    return {k: float(v[0]) for k, v in fam.evaluate(block, "")(x).items()}


def codes(findings: object) -> set[str]:
    return {f.code for f in findings}  # type: ignore[attr-defined]


def box_sweep(factors: list[Factor], n: int, seed: int) -> dict[str, FloatArray]:
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


def physical_sweep(block: Block, dsg: Design, n: int, seed: int) -> dict[str, FloatArray]:
    """Outputs over random feasible thresholds drawn directly in volts-per-supply.

    VT+ and VT− are drawn in their bands (a fifth at a band end, a fifth on the
    minimum-hysteresis edge), pairs closer than the minimum hysteresis are rejected, and
    the leakage is drawn over its signed range; the physics module computes the outputs
    (an independent route around the family's parametrisation).
    """
    rng = np.random.default_rng(seed)
    th = thresholds(block)
    gate = block.gate
    assert gate is not None
    p = rng.uniform(th.rise_low, th.rise_high, n)
    m = rng.uniform(th.fall_low, th.fall_high, n)
    p = np.where(rng.random(n) < 0.2, np.where(rng.random(n) < 0.5, th.rise_low, th.rise_high), p)
    m = np.where(rng.random(n) < 0.2, np.where(rng.random(n) < 0.5, th.fall_low, th.fall_high), m)
    m = np.where(rng.random(n) < 0.2, p - th.hysteresis_min, m)
    keep = (p - m >= th.hysteresis_min * (1 - 1e-12)) & (m >= th.fall_low) & (m <= th.fall_high)
    p, m = p[keep], m[keep]
    k = p.size
    fam = Relaxation()
    parts = {f.name: f for f in fam.factors(block, dsg)}
    x = box_sweep(
        [f for name, f in parts.items() if not name.startswith(("gate.h", "gate.c", "leak"))],
        k,
        seed,
    )
    i_lo, i_hi = parts["leak"].low, parts["leak"].high
    i = rng.uniform(i_lo, i_hi, k)
    i = np.where(rng.random(k) < 0.3, np.where(rng.random(k) < 0.5, i_lo, i_hi), i)
    r, c, v = apply_part(x, "R"), apply_part(x, "C") + x["stray"], x["supply"]
    t_h, t_l = rx.delayed_times(r, c, v, 0.0, p * v, m * v, x["gate.delay"], i)
    t = t_h + t_l
    return {"period": t, "frequency": 1.0 / t, "high": t_h, "low": t_l, "duty": t_h / t}


def assert_encloses(lo: float, hi: float, y: FloatArray) -> None:
    assert np.isfinite(y).all()
    assert y.min() >= lo * (1 - 1e-12)
    assert y.max() <= hi * (1 + 1e-12)


def test_registered() -> None:
    assert isinstance(family("relaxation"), Relaxation)


# -- physics at nominal ------------------------------------------------------


@pytest.mark.parametrize(("gate", "p", "m"), [("highspeed", 0.52, 0.34), ("metalgate", 0.72, 0.28)])
def test_nominal_is_schmitt_oscillator_relation(gate: str, p: float, m: float) -> None:
    # Schmitt-inverter oscillator, rail-to-rail output (first-order RC laws, any
    # circuit-theory handbook): tH = RC·ln((1 − m)/(1 − p)), tL = RC·ln(p/m) with the
    # thresholds p, m as shares of the supply (typical class values, timespec.parts.devices [DS]).
    blk = block_of(BENCH.replace("supply 5 V ±5%", "supply 5 V ±5%\n  gate " + gate))
    r, c = 47e3, 10e-9
    got = nominal(blk, r, c)
    t_h = r * c * math.log((1 - m) / (1 - p))
    t_l = r * c * math.log(p / m)
    assert got["high"] == pytest.approx(t_h, rel=1e-12)
    assert got["low"] == pytest.approx(t_l, rel=1e-12)
    assert got["period"] == pytest.approx(t_h + t_l, rel=1e-12)
    assert got["frequency"] == pytest.approx(1 / (t_h + t_l), rel=1e-12)
    assert got["duty"] == pytest.approx(t_h / (t_h + t_l), rel=1e-12)


def test_overrides_in_fraction_and_volts_agree_on_an_exact_supply() -> None:
    base = "relaxation x:\n supply 5 V\n frequency 1 kHz ±50%\n"
    frac = block_of(base + " rising 0.5 to 0.6 of supply\n falling 0.3 to 0.4 of supply\n")
    volt = block_of(base + " rising 2.5 V to 3 V\n falling 1.5 V to 2 V\n")
    a, b = thresholds(frac), thresholds(volt)
    for name in ("rise_low", "rise_high", "fall_low", "fall_high", "rise_typ", "fall_typ"):
        assert getattr(a, name) == pytest.approx(getattr(b, name))
    assert nominal(frac, 33e3, 22e-9)["period"] == pytest.approx(
        nominal(volt, 33e3, 22e-9)["period"]
    )


# -- worst case honesty ----------------------------------------------------------


@pytest.mark.parametrize(
    ("extra", "r"),
    [
        ("", 47.5e3),
        ("  gate metalgate\n", 470e3),
        ("  rising 0.45 to 0.6 of supply\n  falling 0.4 to 0.5 of supply\n", 330e3),
        ("  leakage 100 nA max\n", 680e3),
    ],
)
def test_worst_case_encloses_dense_feasible_sweeps(extra: str, r: float) -> None:
    blk = block_of(BENCH + extra)
    fam = Relaxation()
    dsg = design(blk, r, 10e-9)
    factors = fam.factors(blk, dsg)
    model = fam.evaluate(blk, "")
    ex = worst_case(factors, model)
    box = model(box_sweep(factors, 100_000, 3))
    phys = physical_sweep(blk, dsg, 100_000, 4)
    for name in ("frequency", "period", "duty", "high", "low"):
        assert_encloses(ex[name].low, ex[name].high, box[name])
        assert_encloses(ex[name].low, ex[name].high, phys[name])


def test_worst_case_reaches_the_minimum_hysteresis_kink() -> None:
    # The shortest period of the high-speed class lies where VT− = VT−max and
    # VT+ = VT−max + minimum hysteresis (a corner of the feasible set, not of the band
    # box); the relation above gives it in closed form.
    blk = block_of("relaxation x:\n supply 5 V\n frequency 1 kHz ±50%\n")
    fam = Relaxation()
    r, c = 10e3, 10e-9
    th = thresholds(blk)
    f = [
        x
        if x.group != "R" and x.group != "C" and x.name not in ("leak", "stray", "gate.delay")
        else Factor(x.name, x.label, x.nominal, x.nominal, x.nominal, "fixed", group=x.group)
        for x in fam.factors(blk, design(blk, r, c))
    ]
    f = [
        Factor(x.name, x.label, 0.0, 0.0, 0.0, "fixed") if x.name in ("stray", "gate.delay") else x
        for x in f
    ]
    ex = worst_case(f, fam.evaluate(blk, ""))["period"]
    m = th.fall_high
    p = m + th.hysteresis_min
    assert ex.low == pytest.approx(
        r * c * (math.log(p / m) + math.log((1 - m) / (1 - p))), rel=1e-12
    )
    pm, mm = th.rise_high, th.fall_low
    assert ex.high == pytest.approx(
        r * c * (math.log(pm / mm) + math.log((1 - mm) / (1 - pm))), rel=1e-12
    )


# -- solving -----------------------------------------------------------------


def test_wide_window_solves_centred() -> None:
    res = solve_block(block_of(BENCH))
    assert res.best is not None
    out = res.best.output("frequency")
    # the raw class spread is about 16:1 in period; 200 Hz…3 kHz is 15:1
    mid = 0.5 * (out.low + out.high)
    assert mid == pytest.approx(1600.0, rel=0.1)
    assert "thresholds-dominate" in codes(res.best.findings)


def test_tight_window_is_infeasible_and_says_why() -> None:
    blk = block_of(BENCH.replace("frequency 200 Hz to 3 kHz", "frequency 1 kHz ±5%"))
    res = solve_block(blk)
    assert res.verdict == "infeasible"
    assert res.best is not None
    note = next(f for f in res.best.findings if f.code == "thresholds-dominate")
    share = float(note.message.split("cause ")[1].split(" %")[0])
    assert share >= 90
    assert "555-type timer" in note.message


def test_pinned_is_checked_not_chosen() -> None:
    blk = block_of(BENCH + "  use R 100k, C 4n7\n")
    res = solve_block(blk)
    assert res.mode == "checked"
    assert res.best is not None
    assert res.best.design.part("R").value == 100e3
    assert res.best.design.part("C").value == 4.7e-9
    out = res.best.output("frequency")
    assert res.verdict == ("meets" if out.low >= 200 and out.high <= 3000 else "fails")


# -- design rules --------------------------------------------------------------


def test_frequency_above_class_limit_is_an_error() -> None:
    # metal-gate class: f_max 1 MHz [Mem, timespec.parts.devices]; 10 kΩ · 100 pF runs above it
    blk = block_of(
        "relaxation fast:\n supply 5 V\n gate metalgate\n frequency 1 MHz ±50%\n"
        " use R 10k, C 100p\n"
    )
    cand = evaluate_design(blk, design(blk, 10e3, 100e-12))
    assert "frequency-above-gate-limit" in codes(cand.findings)
    assert not cand.meets


def test_resistor_outside_class_range() -> None:
    blk = block_of(BENCH.replace("1k to 1M", "100 ohm to 10M"))
    low = evaluate_design(blk, design(blk, 470.0, 100e-9))
    high = evaluate_design(blk, design(blk, 2.2e6, 1e-9))
    assert "resistor-below-gate-range" in codes(low.findings)
    assert "resistor-above-gate-range" in codes(high.findings)
    assert not high.meets


def test_overlapping_bands_are_an_error_without_nan() -> None:
    blk = block_of(BENCH + "  rising 0.3 to 0.4 of supply\n  falling 0.39 to 0.45 of supply\n")
    cand = evaluate_design(blk, design(blk, 47e3, 10e-9))
    assert "thresholds-overlap" in codes(cand.findings)
    for o in cand.outputs:
        assert not math.isnan(o.low) and not math.isnan(o.high)


def test_width_knots_sit_on_grid_nodes() -> None:
    us, ws = width_knots(thresholds(block_of(BENCH)))
    assert us[0] == 0.0 and us[-1] == 1.0
    assert np.all(np.diff(us) > 0) and np.all(np.diff(ws) > 0)
    assert np.allclose(us * 8, np.round(us * 8))


# -- properties ------------------------------------------------------------------


@settings(max_examples=25, deadline=None)
@given(k=st.floats(0.1, 10.0), r=st.floats(1e3, 1e6), c=st.floats(1e-10, 1e-6))
def test_period_scales_with_capacitance(k: float, r: float, c: float) -> None:
    # T = R·C·[...] (Schmitt oscillator relation): scaling C by k scales the period by k.
    blk = block_of(BENCH)
    assert nominal(blk, r, k * c)["period"] == pytest.approx(
        k * nominal(blk, r, c)["period"], rel=1e-9
    )
