"""One-shot family end to end: model, solver, worst case, design rules."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import timespec
from timespec.analysis import nominal_inputs
from timespec.design.solver import evaluate_design, rank_key, solve_block
from timespec.families import family
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.parts.part import Design

SPEC = """
defaults:
  supply 12 V ±5%
  ambient -10 degC to 60 degC
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
  timer cmos
oneshot relay_hold:
  width 150 ms ±8%
  trigger 2 ms, spacing 1 s
"""


def block(text: str = SPEC, name: str | None = None) -> timespec.model.Block:
    spec = timespec.parse(text)
    return spec.block(name) if name else spec.blocks[0]


def sample_box(factors: list, n: int, rng: np.random.Generator) -> dict[str, np.ndarray]:
    return {f.name: rng.uniform(f.low, f.high, n) for f in factors}


def test_solved_design_meets_and_is_standard() -> None:
    res = solve_block(block())
    assert res.verdict == "meets"
    assert res.mode == "solved"
    r, c = res.best.design.part("R"), res.best.design.part("C")  # type: ignore[union-attr]
    # IEC 60063: chosen values are members of the policy's series.
    assert timespec.parts.series.is_member("E96", r.value)
    assert timespec.parts.series.is_member("E12", c.value)
    out = res.best.output("width")  # type: ignore[union-attr]
    assert 0.138 <= out.low <= out.nominal <= out.high <= 0.162


def test_ln3_law_at_nominal_thresholds() -> None:
    # Common practice / 555-type timer datasheets: t = R*C*ln 3 = 1.0986 RC at the 2/3 threshold.
    blk = block()
    fam = family("oneshot")
    d = Design(
        (resistor_part("R", 100e3, blk.resistors), capacitor_part("C", 1e-6, blk.capacitors))
    )
    x = nominal_inputs(fam.factors(blk, d))
    x["timer.ratio"] = np.array([2.0 / 3.0])
    x["timer.ron"] = np.array([0.0])
    x["timer.ith"] = np.array([0.0])
    x["stray"] = np.array([0.0])
    x["timer.delay"] = np.array([0.0])
    w = fam.evaluate(blk, "")(x)["width"][0]
    assert w == pytest.approx(math.log(3.0) * 0.1, rel=1e-12)
    assert w == pytest.approx(1.0986 * 0.1, rel=1e-4)


def test_worst_case_encloses_dense_sweep() -> None:
    # Extreme-value analysis must bound every point of the tolerance box (common practice).
    blk = block()
    res = solve_block(blk)
    assert res.best is not None
    fam = family("oneshot")
    facs = fam.factors(blk, res.best.design)
    rng = np.random.default_rng(7)
    x = sample_box(facs, 200_000, rng)
    w = fam.evaluate(blk, "")(x)["width"]
    out = res.best.output("width")
    assert w.min() >= out.low * (1 - 1e-12)
    assert w.max() <= out.high * (1 + 1e-12)
    # and the corners are reached: the sweep comes close to both ends
    assert w.min() < out.low + 0.5 * (out.nominal - out.low)


def test_matches_scipy_integration_at_the_extreme_corner() -> None:
    # Independent route: integrate C dv/dt = (V - v)/R - i from the discharge start voltage
    # with scipy's ODE solver and find the threshold crossing (scipy.integrate.solve_ivp).
    from scipy.integrate import solve_ivp

    blk = block()
    res = solve_block(blk)
    assert res.best is not None
    out = res.best.output("width")
    fam = family("oneshot")
    facs = fam.factors(blk, res.best.design)
    from timespec.analysis import worst_case

    ex = worst_case(facs, fam.evaluate(blk, ""))["width"]
    at = {f.name: f.nominal for f in facs} | dict(ex.high_at)
    dt = at["temp"] - 25.0
    r = at["R.value"] * (1 + at["R.tol"]) * (1 + at["R.tc"] * 1e-6 * dt)
    # the timer's pins and the board add their stray to C
    c = at["C.value"] * (1 + at["C.tol"]) * (1 + at["C.tc"] * 1e-6 * dt) + at["stray"]
    v = at["supply"]
    i = at["timer.ith"] + at.get("leak", 0.0)
    ron = at["timer.ron"]
    v0 = (v - i * r) * ron / (r + ron)  # node settles on the R / r_on divider, drain included
    vth = at["timer.ratio"] * v

    def rhs(_t: float, y: np.ndarray) -> list[float]:
        return [((v - y[0]) / r - i) / c]

    def hit(_t: float, y: np.ndarray) -> float:
        return y[0] - vth

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(rhs, (0, 10 * r * c), [v0], events=hit, rtol=1e-11, atol=1e-12, method="DOP853")
    t_ode = sol.t_events[0][0]
    scale = (1 + at["timer.drift"] * 1e-6 * dt) * (1 + at["timer.vco"] * (v - at["supply.nominal"]))
    # the output falls the timer's delay after the crossing
    assert t_ode * scale + at["timer.delay"] == pytest.approx(out.high, rel=1e-7)


@settings(max_examples=25, deadline=None)
@given(k=st.floats(0.1, 10.0))
def test_width_scales_with_capacitance(k: float) -> None:
    # Scaling law of the RC charge (first-order RC law): the charge time ∝ the node's
    # whole capacitance (C and its stray) when nothing else changes; the output delay
    # adds to it.
    blk = block()
    fam = family("oneshot")
    d = Design(
        (resistor_part("R", 100e3, blk.resistors), capacitor_part("C", 1e-7, blk.capacitors))
    )
    x = nominal_inputs(fam.factors(blk, d))
    td = float(x["timer.delay"][0])
    w1 = fam.evaluate(blk, "")(x)["width"][0]
    x["C.value"] = x["C.value"] * k
    x["stray"] = x["stray"] * k
    w2 = fam.evaluate(blk, "")(x)["width"][0]
    assert w2 - td == pytest.approx(k * (w1 - td), rel=1e-12)


def test_pinned_design_is_checked_not_chosen() -> None:
    res = solve_block(block(SPEC + "  use R 619k, C 220n\n"))
    assert res.mode == "checked"
    assert res.verdict == "meets"
    assert res.best is not None and res.best.design.part("R").pinned


def test_pinned_design_that_misses_fails() -> None:
    res = solve_block(block(SPEC + "  use R 560k, C 220n\n"))
    assert res.mode == "checked"
    assert res.verdict == "fails"


def test_partly_pinned_chooses_the_rest() -> None:
    res = solve_block(block(SPEC + "  use C 220n\n"))
    assert res.mode == "solved"
    assert res.best is not None
    assert res.best.design.part("C").value == pytest.approx(220e-9)
    assert not res.best.design.part("R").pinned
    assert res.verdict == "meets"


def test_infeasible_shows_the_closest_design() -> None:
    text = SPEC.replace("width 150 ms ±8%", "width 150 ms ±2%")
    res = solve_block(block(text))
    assert res.verdict == "infeasible"
    assert res.best is not None
    out = res.best.output("width")
    assert not out.meets
    # the note names the binding cause: the worst-case spread is wider than ±2 %
    assert res.notes and any(
        n.startswith("the pulse width window is ±2 % but the closest design's worst-case spread")
        for n in res.notes
    )
    assert not any("none of the" in n for n in res.notes)


def test_trigger_longer_than_pulse_is_a_rule_error() -> None:
    text = SPEC.replace("trigger 2 ms, spacing 1 s", "trigger 200 ms")
    res = solve_block(block(text))
    assert res.best is not None
    codes = [f.code for f in res.best.findings]
    assert "trigger-outlasts-pulse" in codes
    assert res.verdict != "meets"


def test_retrigger_before_recovery_is_a_rule_error() -> None:
    text = SPEC.replace("spacing 1 s", "spacing 100 ms")
    res = solve_block(block(text))
    assert res.best is not None
    assert "retrigger-before-recovery" in [f.code for f in res.best.findings]


def test_leakage_that_stalls_the_charge_is_reported() -> None:
    # With 20 µA drawn from the node, 2 MΩ can never lift it to 2/3 of 11.4 V.
    text = SPEC + "  leakage 20 uA max\n  use R 2M, C 68n\n"
    res = solve_block(block(text))
    assert res.best is not None
    assert "drain-stalls-charge" in [f.code for f in res.best.findings]
    assert res.verdict == "fails"
    assert math.isinf(res.best.output("width").high)


def test_class2_dielectric_is_flagged() -> None:
    text = SPEC.replace("capacitors E12 2% PP, 10n to 1u", "capacitors E6 10% X7R, 10n to 10u")
    text = text.replace("±8%", "±40%")
    res = solve_block(block(text))
    assert res.best is not None
    assert "imprecise-dielectric" in [f.code for f in res.best.findings]


def test_solver_agrees_with_brute_force_on_all_pairs() -> None:
    # The analytic narrowing must find the same best design as trying every pair.
    text = SPEC.replace("1k to 2M", "100k to 1M").replace("10n to 1u", "100n to 470n")
    blk = block(text)
    res = solve_block(blk)
    assert res.best is not None
    rs = timespec.parts.series.values_between("E96", 100e3, 1e6)
    cs = timespec.parts.series.values_between("E12", 100e-9, 470e-9)
    every = [
        evaluate_design(
            blk,
            Design(
                (
                    resistor_part("R", float(r), blk.resistors),
                    capacitor_part("C", float(c), blk.capacitors),
                )
            ),
        )
        for r in rs
        for c in cs
    ]
    brute = min(every, key=rank_key)
    assert [p.value for p in brute.design.parts] == [p.value for p in res.best.design.parts]


def test_control_voltage_sets_the_threshold() -> None:
    # Control pin forced: t = R*C*ln(V/(V - Vc)) (555-type timer datasheets).
    text = SPEC + "  control 6 V ±1%\n  use R 619k, C 220n\n"
    blk = block(text)
    fam = family("oneshot")
    res = solve_block(blk)
    assert res.best is not None
    x = nominal_inputs(fam.factors(blk, res.best.design))
    x["timer.ron"] = np.array([0.0])
    x["timer.ith"] = np.array([0.0])
    x["stray"] = np.array([0.0])
    x["timer.delay"] = np.array([0.0])
    w = fam.evaluate(blk, "")(x)["width"][0]
    assert w == pytest.approx(619e3 * 220e-9 * math.log(12.0 / 6.0), rel=1e-12)


def test_electrolytic_leakage_enters_the_worst_case() -> None:
    # Aluminium electrolytic datasheets (generic class): leakage up to 0.01·C·V µA or 3 µA,
    # whichever is greater; timespec adds it to the timing node without being told.
    from timespec.families.capacitors import capacitor_leakage

    blk = block(SPEC.replace("capacitors E12 2% PP, 10n to 1u", "capacitors E6 20% AL, 1u to 100u"))
    c = capacitor_part("C", 10e-6, blk.capacitors)
    # 10 µF, rated 2 × 12.6 V: 0.01 · 10 · 25.2 = 2.52 µA < 3 µA floor; doubled above 60 °C → no.
    assert capacitor_leakage(blk, c) == pytest.approx(3e-6)
    big = capacitor_part("C", 100e-6, blk.capacitors)
    assert capacitor_leakage(blk, big) == pytest.approx(0.01 * 100 * 25.2 * 1e-6)
    film = capacitor_part("C", 1e-6, block().capacitors)
    assert capacitor_leakage(block(), film) == 0.0
    fam = family("oneshot")
    d = Design((resistor_part("R", 100e3, blk.resistors), big))
    names = {f.name: f for f in fam.factors(blk, d)}
    assert names["leak"].high == pytest.approx(0.01 * 100 * 25.2 * 1e-6)


def test_unstated_conditions_are_noted() -> None:
    res = solve_block(block("oneshot a: width 150 ms ±8% at supply 12 V; timer cmos"))
    assert any("no ambient range stated" in n for n in res.notes)
    assert any("taken as exactly 12 V" in n for n in res.notes)
    assert not [n for n in solve_block(block()).notes if "ambient" in n or "exactly" in n]


@settings(max_examples=20, deadline=None)
@given(
    r=st.sampled_from([1e3, 47e3, 619e3, 2e6]),
    c=st.sampled_from([10e-9, 220e-9, 1e-6]),
    leak=st.sampled_from(["", "  leakage 1 uA max\n"]),
    control=st.sampled_from(["", "  control 7 V ±3%\n"]),
    caps=st.sampled_from(["", "  capacitors E12 10% X7R rated 16 V, 10n to 1u\n"]),
)
def test_declared_monotone_factors_give_the_full_worst_case(
    r: float, c: float, leak: str, control: str, caps: str
) -> None:
    # The width's declared rising/falling factors let the search skip half of each
    # declared axis; the result must equal the exhaustive corner search (the proof in
    # WIDTH_RISING's comment, checked here by brute force).
    import dataclasses

    from timespec.analysis import worst_case

    blk = block(SPEC + leak + control + caps)
    fam = family("oneshot")
    d = Design((resistor_part("R", r, blk.resistors), capacitor_part("C", c, blk.capacitors)))
    facs = fam.factors(blk, d)
    assert any(f.rising for f in facs)
    # a class 2 capacitor's DC-bias loss is declared with the rest of C (regression)
    assert all(f.rising for f in facs if f.name == "C.bias")
    plain = [dataclasses.replace(f, rising=(), falling=()) for f in facs]
    fast = worst_case(facs, fam.evaluate(blk, ""))["width"]
    full = worst_case(plain, fam.evaluate(blk, ""))["width"]
    assert (fast.low, fast.high) == (full.low, full.high)


@pytest.mark.parametrize("c", [100e-12, 1e-9, 1e-6])
def test_stray_and_output_delay_lengthen_the_pulse_as_an_ode_says(c: float) -> None:
    # scipy solve_ivp of the timing node C_total·dv/dt = (V − v)/R − i with the timer's
    # pins and the board in C_total = C + Cs; the output falls t_pd after the crossing
    # of the upper threshold (the charge starts on the edge that raises the output).
    from scipy.integrate import solve_ivp

    blk = block()
    fam = family("oneshot")
    d = Design((resistor_part("R", 47e3, blk.resistors), capacitor_part("C", c, blk.capacitors)))
    facs = fam.factors(blk, d)
    names = {f.name: f for f in facs}
    assert names["stray"].high > names["stray"].low > 0.0
    assert names["timer.delay"].high > names["timer.delay"].low > 0.0
    x = nominal_inputs(facs)
    x["timer.ron"] = np.array([0.0])
    x["timer.drift"] = np.array([0.0])
    x["timer.vco"] = np.array([0.0])
    cs, td = float(x["stray"][0]), float(x["timer.delay"][0])
    v, k, i = float(x["supply"][0]), float(x["timer.ratio"][0]), float(x["timer.ith"][0])
    c_eff = float(x["C.value"][0] * (1 + x["C.tol"][0])) + cs
    r_eff = float(x["R.value"][0] * (1 + x["R.tol"][0]))

    def hit(_t: float, y: np.ndarray) -> float:
        return float(y[0] - k * v)

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        lambda _t, y: [((v - y[0]) / r_eff - i) / c_eff],
        (0.0, 10.0 * r_eff * c_eff),
        [0.0],
        events=hit,
        rtol=1e-11,
        atol=1e-12 * v,
    )
    expected = float(sol.t_events[0][0]) + td
    w = fam.evaluate(blk, "")(x)["width"][0]
    assert w == pytest.approx(expected, rel=1e-8)


def test_small_capacitor_on_a_timer_node_is_warned() -> None:
    # common practice: a timing capacitor within 10x the node's stray (timer pins and
    # board, a few pF each) makes the timing depend on the layout
    blk = block()
    fam = family("oneshot")
    d = Design(
        (resistor_part("R", 1e6, blk.resistors), capacitor_part("C", 100e-12, blk.capacitors))
    )
    found = fam.findings(blk, d, {"width": (1e-4, 1.2e-4)})
    assert any(f.code == "stray-comparable" and "timer pins" in f.message for f in found)
    d = Design((resistor_part("R", 1e5, blk.resistors), capacitor_part("C", 1e-6, blk.capacitors)))
    found = fam.findings(blk, d, {"width": (0.1, 0.12)})
    assert not any(f.code == "stray-comparable" for f in found)
