"""The astable family end to end: spec text → solver → worst case and design rules.

Scenarios are our own (front-panel blinkers and a fan-tach simulator on a
burn-in rack).
"""

from __future__ import annotations

import math
import sys

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

import timespec
from timespec.analysis import nominal_inputs, worst_case
from timespec.design.solver import solve_block
from timespec.errors import SpecValueError
from timespec.families.astable import Astable, duty_band, reachable_variants
from timespec.families.astable.monotone import declarations
from timespec.language.assemble import parse
from timespec.model import Block
from timespec.parts.part import Design

FAM = Astable()

POLICY = """  supply 12 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E12 5% C0G, 1n to 100n
"""


def block(body: str, policy: str = POLICY) -> Block:
    return parse("astable rack_blink:\n" + body + policy).blocks[0]


def codes(result_findings: object) -> set[str]:
    return {f.code for f in result_findings}  # type: ignore[attr-defined]


# --------------------------------------------------------------------------
# nominal relations


def test_classic_nominal_relations() -> None:
    b = block("  frequency 2 kHz ±12%\n  duty 65% ±5%\n  circuit classic\n")
    res = solve_block(b)
    assert res.verdict == "meets"
    assert res.best is not None
    design = res.best.design
    assert design.variant == "classic"
    ra, rb, c = (design.part(r).value for r in ("RA", "RB", "C"))
    x = nominal_inputs(FAM.factors(b, design))
    # timer spreads to the ideal timer: thresholds 2/3 and 1/3 of the supply, ideal switch,
    # no threshold current
    x["timer.ratio"] = np.array([2.0 / 3.0])
    x["timer.ron"] = np.array([0.0])
    x["timer.ith"] = np.array([0.0])
    x["stray"] = np.array([0.0])  # the ideal law has no node stray
    x["timer.delay"] = np.array([0.0])  # nor an output delay
    out = FAM.evaluate(b, "classic")(x)
    # common practice: f = 1/(ln 2·(RA + 2RB)·C) ≈ 1.443/((RA + 2RB)·C)
    assert out["frequency"][0] == pytest.approx(1.0 / (math.log(2) * (ra + 2 * rb) * c), rel=1e-9)
    assert out["frequency"][0] == pytest.approx(1.443 / ((ra + 2 * rb) * c), rel=1e-3)
    # common practice: duty = (RA + RB)/(RA + 2RB); tH = (RA + RB)·C·ln 2, tL = RB·C·ln 2
    assert out["duty"][0] == pytest.approx((ra + rb) / (ra + 2 * rb), rel=1e-9)
    assert out["high"][0] == pytest.approx((ra + rb) * c * math.log(2), rel=1e-9)
    assert out["low"][0] == pytest.approx(rb * c * math.log(2), rel=1e-9)
    assert out["period"][0] == pytest.approx(1.0 / out["frequency"][0], rel=1e-12)


def test_solved_design_reports_every_output() -> None:
    res = solve_block(block("  period 500 us ±12%\n  duty 65% ±5%\n"))
    assert res.best is not None
    assert {o.name for o in res.best.outputs} == {"frequency", "period", "duty", "high", "low"}


# --------------------------------------------------------------------------
# worst case encloses a dense random sweep of the factor box


SWEEP_CASES = [
    ("classic", "  frequency 2 kHz ±12%\n  duty 65% ±5%\n  circuit classic\n", POLICY),
    ("diode", "  frequency 2 kHz ±12%\n  duty 30% ±5%\n  circuit diode\n", POLICY),
    (
        "feedback",
        "  frequency 2 kHz ±12%\n  duty 50% ±4%\n  circuit feedback\n  timer cmos\n",
        POLICY.replace("12 V ±5%", "5 V ±10%"),
    ),
]


@pytest.mark.parametrize(("variant", "body", "policy"), SWEEP_CASES)
def test_worst_case_encloses_random_sweep(variant: str, body: str, policy: str) -> None:
    b = block(body, policy)
    res = solve_block(b)
    assert res.best is not None
    design = res.best.design
    assert design.variant == variant
    facs = FAM.factors(b, design)
    model = FAM.evaluate(b, variant)
    ex = worst_case(facs, model)
    rng = np.random.default_rng(7)
    n = 40_000
    x = {
        f.name: (np.full(n, f.nominal) if f.low == f.high else rng.uniform(f.low, f.high, n))
        for f in facs
    }
    out = model(x)
    for name, e in ex.items():
        y = out[name]
        assert np.all(np.isfinite(y))
        span = e.high - e.low
        # corners bound a model monotone in each factor (extreme-value analysis, common practice)
        assert y.min() >= e.low - 1e-9 * span, name
        assert y.max() <= e.high + 1e-9 * span, name


# --------------------------------------------------------------------------
# variant choice and unreachable duty


def test_classic_cannot_make_thirty_percent() -> None:
    res = solve_block(block("  frequency 2 kHz ±12%\n  duty 30% ±5%\n  circuit classic\n"))
    assert res.verdict == "infeasible"
    assert res.best is not None
    found = {f.code: f for f in res.best.findings}
    assert "duty-out-of-reach" in found
    msg = found["duty-out-of-reach"].message
    assert "above 50 %" in msg and "circuit diode" in msg
    # the closest design puts RA at its floor: duty as low as the circuit allows (about 50 %,
    # a little under with the discharge on-resistance in series with RB)
    assert res.best.design.part("RA").value == 1e3
    assert res.best.output("duty").nominal == pytest.approx(0.5, abs=0.02)


def test_automatic_choice_for_thirty_percent_is_diode() -> None:
    b = block("  frequency 2 kHz ±12%\n  duty 30% ±5%\n")
    assert reachable_variants(b) == ("diode",)
    res = solve_block(b)
    assert res.verdict == "meets"
    assert res.best is not None and res.best.design.variant == "diode"
    assert [p.ref for p in res.best.design.parts] == ["RA", "RB", "C"]


def test_fifty_percent_with_cmos_can_use_feedback() -> None:
    policy = POLICY.replace("12 V ±5%", "5 V ±10%")
    b = block("  frequency 2 kHz ±12%\n  duty 50% ±4%\n  timer cmos\n", policy)
    assert "feedback" in reachable_variants(b)
    res = solve_block(
        block("  frequency 2 kHz ±12%\n  duty 50% ±4%\n  timer cmos\n  circuit feedback\n", policy)
    )
    assert res.verdict == "meets"
    assert res.best is not None and res.best.design.variant == "feedback"
    assert [p.ref for p in res.best.design.parts] == ["R", "C"]


def test_feedback_not_offered_with_bipolar_timer() -> None:
    b = block("  frequency 2 kHz ±12%\n  duty 50% ±4%\n  timer bipolar\n")
    assert "feedback" not in reachable_variants(b)
    res = solve_block(
        block("  frequency 2 kHz ±12%\n  duty 50% ±10%\n  timer bipolar\n  circuit feedback\n")
    )
    assert res.verdict == "infeasible"
    assert res.best is not None
    assert "feedback-needs-rail-output" in codes(res.best.findings)


def test_duty_band_from_high_and_low() -> None:
    # D = tH/(tH + tL): 1 ms high, 3 ms low → 25 % (definition of duty cycle)
    b = block("  high 1 ms ±10%\n  low 3 ms ±10%\n")
    lo, hi = duty_band(b)
    assert lo == pytest.approx(0.9 / (0.9 + 3.3))
    assert hi == pytest.approx(1.1 / (1.1 + 2.7))
    assert "classic" not in reachable_variants(b)


# --------------------------------------------------------------------------
# design rules


def test_frequency_beyond_bipolar_class_is_an_error() -> None:
    res = solve_block(
        block(
            "  frequency 600 kHz ±15%\n  timer bipolar\n",
            POLICY.replace("1n to 100n", "100p to 100n"),
        )
    )
    assert res.verdict == "infeasible"
    assert res.best is not None
    found = {f.code: f for f in res.best.findings}
    assert "frequency-above-class" in found
    assert "timer cmos" in found["frequency-above-class"].message


def test_discharge_current_limit_names_minimum_ra() -> None:
    # 12.6 V / 470 Ω ≈ 27 mA through the discharge pin (Ohm's law), above the class limit
    res = solve_block(block("  frequency 2 kHz ±30%\n  use RA 470, RB 10k, C 33n\n"))
    assert res.mode == "checked"
    assert res.verdict == "fails"
    assert res.best is not None
    found = {f.code: f for f in res.best.findings}
    assert "discharge-current" in found
    assert "at least" in found["discharge-current"].message


def test_small_discharge_resistor_is_a_warning() -> None:
    res = solve_block(block("  frequency 20 kHz ±30%\n  use RA 10k, RB 820, C 33n\n"))
    assert res.best is not None
    found = {f.code: f.severity for f in res.best.findings}
    assert found.get("resistor-too-small") == "warning"


def test_pinned_design_is_checked_not_rechosen() -> None:
    b = block(
        "  frequency 2 kHz ±12%\n  duty 65% ±5%\n  circuit classic\n  use RA 26k7, RB 30k9, C 8n2\n"
    )
    res = solve_block(b)
    assert res.mode == "checked"
    assert res.verdict == "meets"
    assert res.best is not None
    assert [p.value for p in res.best.design.parts] == [26.7e3, 30.9e3, 8.2e-9]


def test_partly_pinned_capacitor_is_kept() -> None:
    res = solve_block(block("  frequency 2 kHz ±12%\n  duty 30% ±5%\n  use C 10n\n"))
    assert res.best is not None
    assert res.best.design.part("C").value == 10e-9
    assert res.best.design.part("C").pinned
    assert res.mode == "solved"


def test_pinned_refs_must_fit_the_circuit() -> None:
    with pytest.raises(SpecValueError, match="does not exist in the feedback"):
        FAM.candidates(block("  frequency 2 kHz ±12%\n  circuit feedback\n  use RA 10k\n"))


def test_solver_completes_for_each_circuit() -> None:
    # speed sanity only: every automatic case finishes and names a variant
    for body in (
        "  frequency 2 kHz ±12%\n",
        "  high 1 ms ±10%\n  low 3 ms ±10%\n",
        "  period 1 ms ±12%\n  duty 70% ±5%\n",
    ):
        res = solve_block(block(body))
        assert res.best is not None
        assert res.best.design.variant in ("classic", "diode", "feedback")


# --------------------------------------------------------------------------
# properties


@settings(max_examples=15, deadline=None)
@given(
    k=st.floats(0.1, 10.0),
    ra=st.floats(2e3, 500e3),
    rb=st.floats(2e3, 500e3),
    variant=st.sampled_from(["classic", "diode"]),
)
def test_times_scale_with_capacitance(k: float, ra: float, rb: float, variant: str) -> None:
    # first-order RC law (any circuit-theory handbook): every time is proportional to the
    # node's whole capacitance (C and its stray) with the output delay scaled alike (a
    # change of time unit), so the duty cycle does not depend on it
    b = block("  frequency 2 kHz ±12%\n")
    design = FAM._design(b, variant, {"RA": ra, "RB": rb, "C": 10e-9})
    x = nominal_inputs(FAM.factors(b, design))
    model = FAM.evaluate(b, variant)
    one = model(x)
    x["C.value"] = x["C.value"] * k
    x["stray"] = x["stray"] * k
    x["timer.delay"] = x["timer.delay"] * k  # the delay is a time too: scale it with RC
    scaled = model(x)
    assert scaled["period"][0] == pytest.approx(k * one["period"][0], rel=1e-9)
    assert scaled["duty"][0] == pytest.approx(one["duty"][0], rel=1e-9)


def test_stalled_oscillator_reports_inf_not_nan() -> None:
    b = block(
        "  frequency 2 kHz ±12%\n  timer bipolar\n  circuit feedback\n",
        POLICY.replace("12 V ±5%", "5 V ±10%"),
    )
    design = Design(FAM._design(b, "feedback", {"R": 10e3, "C": 10e-9}).parts, "feedback")
    x = nominal_inputs(FAM.factors(b, design))
    x["output.drop"] = np.array([1.7])  # bipolar output 1.7 V down: 2.8 V < upper threshold 3 V
    x["supply"] = np.array([4.5])
    out = FAM.evaluate(b, "feedback")(x)
    assert math.isinf(out["high"][0]) and math.isinf(out["duty"][0])
    assert out["frequency"][0] == 0.0


# --------------------------------------------------------------------------
# declared monotone factors (the proofs beside ALWAYS / GUARDED in the family)

DECLARE_POLICIES = [
    POLICY,
    # wide temperature, life, class-2 ceramic (drift and ageing factors), stated leakage
    """  supply 5 V ±10%
  ambient -40 degC to 85 degC
  life 10 years
  resistors E96 1% 100 ppm/K, 1k to 1M
  capacitors E6 10% X7R, 1n to 1u
  leakage 20 nA max
""",
    # aluminium electrolytic: its own leakage bound (µA) enters as the ``leak`` factor
    """  supply 9 V ±10%
  ambient -20 degC to 70 degC
  life 5 years
  resistors E24 5% 200 ppm/K, 1k to 1M
  capacitors E6 20% AL, 1u to 100u
""",
    # class 2 ceramic on a low rating: the DC-bias loss enters as the ``C.bias`` factor
    """  supply 12 V ±5%
  ambient 0 degC to 70 degC
  life 10 years
  resistors E24 1% 100 ppm/K, 1k to 1M
  capacitors E6 10% X7R rated 16 V, 1n to 1u
""",
]


def _same(a: float, b: float) -> bool:
    # Equal to a few units in the last place: two corners that differ only in factors an
    # output does not depend on (the feedback circuit's low-side output resistance for
    # its high time) give the same value, but through a differently ordered
    # floating-point evaluation (found by the lowest-dependency run: 2.4e-16 apart).
    # A wrong monotonicity proof moves an extreme by far more.
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return math.isclose(a, b, rel_tol=4 * sys.float_info.epsilon, abs_tol=0.0)


def _check_declarations_exact(
    variant: str, policy: str, timer: str, values: dict[str, float]
) -> None:
    # The declared search must give EXACTLY the extremes of the full corner search
    # (brute-force check of the monotonicity proofs in the family module).
    import dataclasses

    circuit = f"  circuit {variant}\n  timer {timer}\n"
    b0 = block("  frequency 2 kHz ±12%\n" + circuit, policy)
    assert b0.timer is not None
    # with the class's output delay (C, stray and delay declared) and without it (every
    # proof of the delay-free model)
    undelayed = dataclasses.replace(b0, timer=dataclasses.replace(b0.timer, t_pd=(0.0, 0.0)))
    for b in (b0, undelayed):
        design = FAM._design(b, variant, values)
        plain = [dataclasses.replace(f, rising=(), falling=()) for f in FAM.factors(b, design)]
        # every proven declaration, also those the family drops when they would not pay
        facs = declarations(plain, variant)
        assert any(f.rising or f.falling for f in facs)
        model = FAM.evaluate(b, variant)
        fast = worst_case(facs, model)
        full = worst_case(plain, model)
        for name, e in full.items():
            got = fast[name]
            assert _same(got.low, e.low) and _same(got.high, e.high), (name, got, e)


def _capacitor(policy: str, share: float) -> float:
    """A capacitor inside the policy's range (1 µF…100 µF electrolytic, else 1 nF…1 µF)."""
    return 1e-6 * (1.0 + 99.0 * share) if "AL" in policy else 1e-9 * (1.0 + 999.0 * share)


_DECLARE_CASES = {
    "policy": st.sampled_from(range(len(DECLARE_POLICIES))),
    "timer": st.sampled_from(["bipolar", "cmos"]),
    "ra": st.floats(1e3, 1e6),
    "rb": st.floats(1e3, 1e6),
    "share": st.floats(0.0, 1.0),
}


@settings(max_examples=6, deadline=None)
@given(**_DECLARE_CASES)
def test_declared_monotone_factors_exact_classic(
    policy: int, timer: str, ra: float, rb: float, share: float
) -> None:
    text = DECLARE_POLICIES[policy]
    values = {"RA": ra, "RB": rb, "C": _capacitor(text, share)}
    _check_declarations_exact("classic", text, timer, values)


@settings(max_examples=6, deadline=None)
@given(**_DECLARE_CASES)
def test_declared_monotone_factors_exact_diode(
    policy: int, timer: str, ra: float, rb: float, share: float
) -> None:
    text = DECLARE_POLICIES[policy]
    values = {"RA": ra, "RB": rb, "C": _capacitor(text, share)}
    _check_declarations_exact("diode", text, timer, values)


@settings(max_examples=6, deadline=None)
@given(**_DECLARE_CASES)
@example(policy=2, timer="cmos", ra=50503.38893508019, rb=1e3, share=0.0)  # electrolytic
def test_declared_monotone_factors_exact_feedback(
    policy: int, timer: str, ra: float, rb: float, share: float
) -> None:
    # rb unused: the feedback circuit has one resistor
    text = DECLARE_POLICIES[policy]
    values = {"R": ra, "C": _capacitor(text, share)}
    _check_declarations_exact("feedback", text, timer, values)


def test_discharge_current_past_the_on_resistance_test_current_is_reported() -> None:
    # The discharge saturation voltage of the timer classes is specified at 4.5 mA
    # (generic 555-type datasheets); read as a resistance it holds up to there.
    # RA 1k at 5.25 V sinks 5.25 mA, plus the capacitor's k·V/RB through RB.
    text = (
        "astable fast:\n  frequency 10 kHz ±50%\n  supply 5 V ±5%\n"
        "  use RA 1k 1%, RB 2k2 1%, C 22n C0G 5%\n"
    )
    res = solve_block(timespec.parse(text).blocks[0])
    assert res.best is not None
    (f,) = [x for x in res.best.findings if x.code == "discharge-on-resistance-range"]
    k_hi = 1.0 - 3.0**-1.03  # bipolar class: ±3 % initial error as a threshold ratio
    i_peak = 5.25 / 990.0 + k_hi * 5.25 / (2200 * 0.99)
    assert "4.5 mA" in f.message
    assert f"{i_peak / 4.5e-3:.3g}×" in f.message


def test_light_discharge_current_gives_no_on_resistance_finding() -> None:
    text = (
        "astable slow:\n  frequency 10 Hz ±50%\n  supply 5 V ±5%\n"
        "  use RA 100k 1%, RB 100k 1%, C 470n C0G 5%\n"
    )
    res = solve_block(timespec.parse(text).blocks[0])
    assert res.best is not None
    assert "discharge-on-resistance-range" not in {x.code for x in res.best.findings}
