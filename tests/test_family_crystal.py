"""End-to-end tests of the ``crystal`` family (Pierce load capacitors, ppm budget).

Scenarios are our own: the reference clock of a bench frequency counter and the
clock of a burn-in rack's slot controller.  Physics expectations name their source
beside each check: published crystal-oscillator design application notes (load
capacitance, pulling, gm_crit, drive level, series resistor), the exact
Butterworth-Van Dyke load resonance (``pierce.load_resonance_exact``, itself checked
against a numerical impedance root in ``test_physics_pierce.py``), EIA-198 (C0G
band), hand computations, and the ``uncertainties`` package for first-order
propagation.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from uncertainties import ufloat

from timespec.analysis import Factor, FloatArray, is_varying, rss, worst_case
from timespec.design.solver import evaluate_design, solve_block
from timespec.families import family
from timespec.families.crystal import (
    CAP_HIGH,
    CAP_LOW,
    MIN_GAIN_MARGIN,
    Crystal,
    accuracy_budget,
    capacitor_policy,
    declare,
    stray_window,
)
from timespec.families.inputs import apply_part
from timespec.language.assemble import parse
from timespec.model import Block
from timespec.parts import series
from timespec.parts.part import Design
from timespec.physics import pierce

PPM = 1e-6

# Bench frequency counter reference (our scenario): 12 MHz crystal for an 8 pF load.
COUNTER = """
crystal counter_ref:
  frequency 12 MHz
  load 8 pF
  stray 3 pF to 4 pF
  shunt 1.5 pF
  motional 4 fF
  esr 60 ohm max
  tolerance ±10 ppm
  stability ±20 ppm
  aging ±3 ppm/year
  accuracy ±{acc} ppm
  gm {gm}
  swing 3 V
  drive {drive}
  life 5 years
  ambient -20 degC to 70 degC
{extra}
"""


def block_of(
    acc: float = 100.0,
    gm: str = "5 mA/V",
    drive: str = "200 uW max",
    extra: str = "",
    text: str = COUNTER,
) -> Block:
    spec = text.format(acc=acc, gm=gm, drive=drive, extra=extra)
    lines = [ln for ln in spec.splitlines() if not ln.rstrip().endswith("{gm}")]
    return parse("\n".join(lines)).blocks[0]


def without(text: str, keyword: str) -> str:
    return "\n".join(ln for ln in text.splitlines() if not ln.strip().startswith(keyword))


def codes(findings: object) -> set[str]:
    return {f.code for f in findings}  # type: ignore[attr-defined]


def test_registered() -> None:
    assert isinstance(family("crystal"), Crystal)


def test_solves_and_meets() -> None:
    result = solve_block(block_of())
    assert result.verdict == "meets"
    assert result.mode == "solved"
    best = result.best
    assert best is not None
    c1, c2 = best.design.part("C1"), best.design.part("C2")
    # Equal caps 2·(CL − Cs) = 2·(8 − 3.5) = 9 pF (application notes); E12 neighbours
    # are 8.2 pF and 10 pF, so the pair is built from those (IEC 60063 E12).
    assert {c1.value, c2.value} <= {8.2e-12, 10e-12}
    assert c1.dielectric == "C0G" and c2.dielectric == "C0G"  # default policy
    # Nominal load by hand: C1·C2/(C1 + C2) + 3.5 pF.
    load = best.output("load")
    assert load.nominal == pytest.approx(c1.value * c2.value / (c1.value + c2.value) + 3.5e-12)
    assert "ppm-budget" in codes(best.findings)


def test_candidates_bracket_the_ideal_value() -> None:
    designs = Crystal().candidates(block_of())
    pairs = {(d.part("C1").value, d.part("C2").value) for d in designs}
    # Equal pairs from both E12 neighbours of 9 pF and the unequal adjacent pair.
    assert pairs == {(8.2e-12, 8.2e-12), (10e-12, 10e-12), (8.2e-12, 10e-12)}


def test_pulling_and_load_against_exact_resonance() -> None:
    # The family's first-order pulling against the exact Butterworth-Van Dyke load
    # resonance: (fL(CL)/fL(CL_spec) − 1); first order in Cm/(C0 + CL) ≈ 4e-4, so the
    # two agree to 1 % of the pulling (application-note approximation).
    blk = block_of()
    fam = Crystal()
    for design in fam.candidates(blk):
        factors = fam.factors(blk, design)
        model = fam.evaluate(blk, design.variant)
        rng = np.random.default_rng(7)
        x = _samples(factors, rng, 200)
        out = model(x)
        c1 = x["C1.value"] * (1 + x["C1.tol"])
        c2 = x["C2.value"] * (1 + x["C2.tol"])
        c1 = c1 * (1 + x["C1.tc"] * 1e-6 * (x["temp"] - 25.0))
        c2 = c2 * (1 + x["C2.tc"] * 1e-6 * (x["temp"] - 25.0))
        # Load capacitance, application notes: series pair plus the stray in parallel.
        cl = c1 * c2 / (c1 + c2) + x["stray"]
        np.testing.assert_allclose(out["load"], cl, rtol=1e-12)
        exact = (
            pierce.load_resonance_exact(12e6, 4e-15, 1.5e-12, cl)
            / pierce.load_resonance_exact(12e6, 4e-15, 1.5e-12, 8e-12)
            - 1.0
        )
        np.testing.assert_allclose(out["pulling"], exact, rtol=1e-2, atol=1e-9)


def test_accuracy_worst_case_is_the_plain_sum() -> None:
    blk = block_of()
    design = Design(
        (
            Crystal().candidates(blk)[0].part("C1"),
            Crystal().candidates(blk)[0].part("C2"),
        )
    )
    cand = evaluate_design(blk, design)
    acc = cand.output("accuracy")
    pull = cand.output("pulling")
    c = design.part("C1").value  # an equal pair
    assert design.part("C2").value == c
    # Hand computation: ±5 % tolerance; C0G 0 ± 30 ppm/K (EIA-198) over 25 → −20 / 70 °C,
    # i.e. at most ±30 ppm/K · 45 K = ±1350 ppm; stray 3…4 pF.
    c_lo = c * 0.95 * (1 - 30e-6 * 45)
    c_hi = c * 1.05 * (1 + 30e-6 * 45)
    cl_lo, cl_hi = c_lo / 2 + 3e-12, c_hi / 2 + 4e-12

    # Pulling (application notes): (Cm/2)(1/(C0 + CL) − 1/(C0 + CL_spec)).
    def pulling(cl: float) -> float:
        return 4e-15 / 2 * (1 / (1.5e-12 + cl) - 1 / (1.5e-12 + 8e-12))

    assert pull.high == pytest.approx(pulling(cl_lo), rel=1e-9)
    assert pull.low == pytest.approx(pulling(cl_hi), rel=1e-9)
    # The worst case is the plain sum of every term's extreme (all terms add linearly):
    # calibration 10 + stability 20 + ageing 3·5 years + pulling (common practice).
    assert acc.high == pytest.approx((10 + 20 + 15) * PPM + pulling(cl_lo), rel=1e-9)
    assert acc.low == pytest.approx(-(10 + 20 + 15) * PPM + pulling(cl_hi), rel=1e-9)
    budget = accuracy_budget(blk, design)
    assert budget.worst_case == pytest.approx(max(abs(acc.low), abs(acc.high)))
    assert (budget.calibration, budget.temperature, budget.ageing) == pytest.approx(
        (10 * PPM, 20 * PPM, 15 * PPM)
    )
    # With symmetric crystal bands, the worst case is budget_worst_case of the four
    # half-widths (sum of magnitudes, common practice).
    assert budget.worst_case == pytest.approx(
        float(pierce.budget_worst_case(10, 20, 15, budget.pulling / PPM)) * PPM, rel=1e-9
    )


def test_rss_budget_matches_budget_rss_and_uncertainties() -> None:
    blk = block_of()
    fam = Crystal()
    design = fam.candidates(blk)[0]
    factors = fam.factors(blk, design)
    model = fam.evaluate(blk, design.variant)
    budget = accuracy_budget(blk, design)
    spread = rss(factors, model)
    nominal = spread["accuracy"].nominal
    # The pulling part of the RSS, from the engine (uniform factors: h = √3·σ, GUM 4.3.7).
    pull_rss = math.sqrt(3.0) * spread["pulling"].sigma
    # budget_rss of the four terms (root sum of squares, common practice) plus the
    # nominal offset added linearly.
    expected = abs(nominal) + float(pierce.budget_rss(10 * PPM, 20 * PPM, 15 * PPM, pull_rss))
    assert budget.rss == pytest.approx(expected, rel=1e-6)
    # Independent first-order propagation with the `uncertainties` package: the same
    # model written with ufloats (σ = h/√3 for uniform bands, GUM 4.3.7).
    s3 = math.sqrt(3.0)
    c = design.part("C1").value
    tol1 = ufloat(0.0, 0.05 / s3)
    tol2 = ufloat(0.0, 0.05 / s3)
    stray = ufloat(3.5e-12, 0.5e-12 / s3)
    cal = ufloat(0.0, 10 * PPM / s3)
    stab = ufloat(0.0, 20 * PPM / s3)
    age = ufloat(0.0, 15 * PPM / s3)
    c1, c2 = c * (1 + tol1), c * (1 + tol2)
    cl = c1 * c2 / (c1 + c2) + stray
    acc = cal + stab + age + 4e-15 / 2 * (1 / (1.5e-12 + cl) - 1 / (1.5e-12 + 8e-12))
    # The tempco × temperature term has zero first-order sensitivity at 25 °C, so it
    # is absent from both routes.
    assert spread["accuracy"].sigma == pytest.approx(acc.std_dev, rel=1e-4)
    assert budget.rss - abs(nominal) == pytest.approx(s3 * acc.std_dev, rel=1e-4)


def test_worst_case_encloses_random_sweep() -> None:
    blk = block_of()
    fam = Crystal()
    result = solve_block(blk)
    assert result.best is not None
    design = result.best.design
    factors = fam.factors(blk, design)
    x = _samples(factors, np.random.default_rng(11), 20_000)
    out = fam.evaluate(blk, design.variant)(x)
    for o in result.best.outputs:
        span = o.high - o.low
        assert out[o.name].min() >= o.low - 1e-9 * span
        assert out[o.name].max() <= o.high + 1e-9 * span


def test_infeasible_accuracy() -> None:
    # ±10 ppm total with a ±10 ppm calibration and ±20 ppm stability: impossible.
    result = solve_block(block_of(acc=10))
    assert result.verdict == "infeasible"
    assert result.best is not None  # the closest design is shown
    assert result.best.output("accuracy").high > 10 * PPM


def test_load_below_stray_is_an_error() -> None:
    text = COUNTER.replace("load 8 pF", "load 3 pF")
    text = text.replace("stray 3 pF to 4 pF", "stray 2 pF to 5 pF")
    result = solve_block(block_of(text=text))
    assert result.verdict == "infeasible"
    assert result.best is not None
    errors = [f for f in result.best.findings if f.code == "load-below-stray"]
    assert len(errors) == 1 and errors[0].severity == "error"
    # Says why and what works: smallest E12 value in 1 pF…100 pF is 1 pF, so a load of
    # at least 5 pF + 0.5 pF, or a stray below 3 pF − 0.5 pF.
    assert "negative" in errors[0].message
    assert "5.5 pF" in errors[0].message
    assert "2.5 pF" in errors[0].message


def test_load_near_stray_warns() -> None:
    text = COUNTER.replace("load 8 pF", "load 6 pF")
    text = text.replace("stray 3 pF to 4 pF", "stray 2 pF to 7 pF")
    cand = solve_block(block_of(acc=1000, text=text)).best
    assert cand is not None
    assert "load-near-stray" in codes(cand.findings)


def test_overdrive_suggests_series_resistor() -> None:
    blk = block_of(drive="20 uW max")
    result = solve_block(blk)
    assert result.best is not None
    found = [f for f in result.best.findings if f.code == "overdrive"]
    assert len(found) == 1 and found[0].severity == "error"
    assert result.verdict == "infeasible"
    # Series resistor ≈ 1/(2πf·C2) (application notes), snapped to E12.
    c2 = result.best.design.part("C2").value
    r = 1 / (2 * math.pi * 12e6 * c2)
    r_std = series.nearest("E12", r)
    shown = f"{r_std / 1e3:.3g} kΩ" if r_std >= 1e3 else f"{r_std:.3g} Ω"
    assert shown in found[0].message
    # Drive at its worst corner, by the Pierce-loop formula written out here
    # (application notes, from memory; checked against an exact nodal solution in
    # test_pierce_network.py): the 3 Vpp output swing puts 3·(1 + C2/C1) across the
    # crystal.
    d = _drive_by_corners(blk, result.best.design, lambda supply: 3.0)
    assert result.best.output("drive").high == pytest.approx(d, rel=1e-9)
    # About four times the old reading that took the swing as the crystal's voltage
    # (equal capacitors double the crystal voltage).
    cl_hi = result.best.output("load").high
    old = 60 * (2 * math.pi * 12e6 * (1.5e-12 + cl_hi) * 3 / (2 * math.sqrt(2))) ** 2
    assert 3.5 * old < d < 6.0 * old


def _drive_by_corners(blk: Block, design: Design, vpp_of: Callable[[float], float]) -> float:
    # Largest drive over every corner of the factor box, with the closed form of the
    # Pierce loop written out independently of timespec.physics (application notes,
    # from memory): DL = ESR·(2πf·(C0 + CL)·Vout·(1 + C2/C1)/(2√2))².  Every factor
    # enters monotonically (the tempco scales both C0G capacitors alike), so the
    # corners hold the maximum.
    import itertools

    facs = Crystal().factors(blk, design)
    varying = [f for f in facs if is_varying(f)]
    fixed = {f.name: f.nominal for f in facs if not is_varying(f)}
    best = 0.0
    for corner in itertools.product(*[(f.low, f.high) for f in varying]):
        x = dict(fixed)
        x.update({f.name: v for f, v in zip(varying, corner, strict=True)})
        arrays = {k: np.asarray(v, dtype=float) for k, v in x.items()}
        c1 = float(apply_part(arrays, "C1"))
        c2 = float(apply_part(arrays, "C2"))
        cl = c1 * c2 / (c1 + c2) + x["stray"]
        v_x = vpp_of(x["supply"]) * (1 + c2 / c1)
        i_rms = 2 * math.pi * 12e6 * (1.5e-12 + cl) * v_x / (2 * math.sqrt(2))
        best = max(best, 60 * i_rms**2)
    return best


def test_gain_margin_and_gm_crit() -> None:
    blk = block_of()
    fam = Crystal()
    design = Design(
        (
            fam.candidates(blk)[0].part("C1"),
            fam.candidates(blk)[0].part("C2"),
        )
    )
    cand = evaluate_design(blk, design)
    c = design.part("C1").value
    # Equal capacitors: gm_crit = 4·ESR·(2πf)²·(C0 + CL)² (application notes), stray
    # counted in CL; nominal stray 3.5 pF.
    cl = c / 2 + 3.5e-12
    gm_crit = 4 * 60 * (2 * math.pi * 12e6) ** 2 * (1.5e-12 + cl) ** 2
    assert cand.output("gain_margin").nominal == pytest.approx(5e-3 / gm_crit, rel=1e-9)
    # A weak amplifier: margin below 5 (common practice) is an error.
    weak = solve_block(block_of(gm="0.3 mA/V"))
    assert weak.best is not None
    low = [f for f in weak.best.findings if f.code == "low-gain-margin"]
    assert len(low) == 1 and low[0].severity == "error"
    assert weak.best.output("gain_margin").low < MIN_GAIN_MARGIN
    assert weak.verdict == "infeasible"


def test_without_gm_reports_the_gm_needed() -> None:
    blk = block_of(gm="{gm}")
    assert blk.number("gm") is None
    names = [o.name for o in Crystal().outputs(blk)]
    assert "gm_needed" in names and "gain_margin" not in names
    cand = solve_block(blk).best
    assert cand is not None
    need = cand.output("gm_needed")
    assert need.kind == "transconductance"
    note = [f for f in cand.findings if f.code == "gm-needed"]
    assert len(note) == 1 and note[0].severity == "note"
    # 5 × gm_crit (common practice for the margin).
    c1 = cand.design.part("C1").value
    c2 = cand.design.part("C2").value
    crit = pierce.critical_gm_caps(60, 12e6, 1.5e-12 + 3.5e-12, c1, c2)
    assert need.nominal == pytest.approx(5 * float(crit), rel=1e-9)


def test_pinned_pair_is_checked_not_chosen() -> None:
    blk = block_of(extra="  use C1 12p, C2 15p 2%")
    result = solve_block(blk)
    assert result.mode == "checked"
    assert result.best is not None
    d = result.best.design
    assert (d.part("C1").value, d.part("C2").value) == (12e-12, 15e-12)
    assert d.part("C1").pinned and d.part("C2").pinned
    assert d.part("C2").tolerance == 0.02
    assert "unequal-caps" in codes(result.best.findings)
    # 12p and 15p: 6.67 + 3.5 = 10.2 pF against 8 pF → −46 ppm pulling at nominal
    # (application notes); with 45 ppm of crystal terms it cannot meet ±50 ppm.
    assert solve_block(block_of(acc=50, extra="  use C1 12p, C2 15p 2%")).verdict == "fails"


def test_one_pinned_capacitor_solves_the_other() -> None:
    blk = block_of(extra="  use C2 12p")
    designs = Crystal().candidates(blk)
    # 12p in series with C1 must give 4.5 pF: C1 = 12·4.5/(12 − 4.5) = 7.2 pF → E12 6.8, 8.2.
    assert sorted(d.part("C1").value for d in designs) == [6.8e-12, 8.2e-12]
    assert all(d.part("C2").pinned and d.part("C2").value == 12e-12 for d in designs)
    assert solve_block(blk).mode == "solved"


def test_defaults_stray_and_policy() -> None:
    blk = block_of(text=without(COUNTER, "stray"))
    s = stray_window(blk)
    assert (s.low, s.high) == (3e-12, 5e-12)  # common practice default
    p = capacitor_policy(blk)
    assert (p.low, p.high) == (CAP_LOW, CAP_HIGH)
    # An RC-timing range from shared defaults is clipped to crystal loads.
    shared = "defaults:\n  capacitors E24 2% C0G, 1n to 100n\n" + COUNTER
    p2 = capacitor_policy(block_of(text=shared))
    assert (p2.series, p2.tolerance, p2.low, p2.high) == ("E24", 0.02, CAP_LOW, CAP_HIGH)
    # A range written for crystals is kept.
    own = block_of(extra="  capacitors E24 2% C0G, 4.7p to 33p")
    assert (capacitor_policy(own).low, capacitor_policy(own).high) == (4.7e-12, 33e-12)


def test_swing_defaults_to_the_supply() -> None:
    text = without(COUNTER, "swing")
    blk = block_of(text=text.replace("life 5 years", "life 5 years\n  supply 5 V ±10%"))
    cand = solve_block(blk).best
    assert cand is not None
    # Rail-to-rail swing at the output node, up to the highest supply 5.5 V (common
    # practice); the Pierce-loop drive formula from application notes.
    d = _drive_by_corners(blk, cand.design, lambda supply: supply)
    assert cand.output("drive").high == pytest.approx(d, rel=1e-9)
    assert blk.conditions.supply.high == pytest.approx(5.5)


def test_imprecise_dielectric_is_flagged() -> None:
    cand = solve_block(block_of(extra="  capacitors E12 10% X7R")).best
    assert cand is not None
    assert "imprecise-dielectric" in codes(cand.findings)


@settings(max_examples=15, deadline=None)
@given(load=st.sampled_from([6e-12, 8e-12, 9e-12, 10e-12, 12.5e-12, 18e-12, 20e-12]))
def test_equal_pairs_bracket_the_load(load: float) -> None:
    # Invariant: the two equal standard pairs put the nominal load on both sides of the
    # crystal's load (C = 2·(CL − Cs) snapped down and up, application notes).
    text = COUNTER.replace("load 8 pF", f"load {load * 1e12:g} pF")
    blk = block_of(text=text)
    loads = []
    for d in Crystal().candidates(blk):
        a, b = d.part("C1").value, d.part("C2").value
        if a == b:
            loads.append(float(pierce.load_capacitance(a, b, 3.5e-12)))
    assert min(loads) <= load * (1 + 1e-9)
    assert max(loads) >= load * (1 - 1e-9)


def _samples(factors: list[Factor], rng: np.random.Generator, n: int) -> dict[str, FloatArray]:
    x: dict[str, FloatArray] = {}
    for f in factors:
        if is_varying(f):
            x[f.name] = rng.uniform(f.low, f.high, n)
            x[f.name][:2] = (f.low, f.high)
        else:
            x[f.name] = np.full(n, f.nominal)
    return x


def test_worst_case_engine_agrees_with_budget_helper() -> None:
    blk = block_of()
    fam = Crystal()
    design = fam.candidates(blk)[1]
    ex = worst_case(fam.factors(blk, design), fam.evaluate(blk, design.variant))
    b = accuracy_budget(blk, design)
    assert b.pulling == pytest.approx(max(abs(ex["pulling"].low), abs(ex["pulling"].high)))


@settings(max_examples=25, deadline=None)
@given(
    c1=st.sampled_from([2.2e-12, 8.2e-12, 15e-12, 47e-12]),
    c2=st.sampled_from([3.3e-12, 10e-12, 22e-12]),
    gm=st.sampled_from(["5 mA/V", "{gm}"]),
    swing=st.booleans(),
    extra=st.sampled_from(
        [
            "",
            "  supply 3 V to 3.6 V\n  capacitors E12 5% X7R, 1p to 100p\n",
            "  supply 1.8 V to 5.5 V\n  capacitors E24 2% C0G, 1p to 100p\n  stray 1 pF to 6 pF",
        ]
    ),
)
def test_declared_monotone_factors_give_the_full_worst_case(
    c1: float, c2: float, gm: str, swing: bool, extra: str
) -> None:
    # The declared rising/falling factors (argument in `declarations`) let the search
    # skip half of each declared axis; the result must equal the exhaustive corner
    # search exactly, for every output, with and without a stated gm and swing and
    # for unequal and very small capacitors (where gm_crit is not monotone in C1,
    # which is therefore not declared for the gain).
    import dataclasses

    from timespec.families.candidates import capacitor_part

    text = COUNTER if swing else without(COUNTER, "swing")
    if "stray" in extra:
        text = without(text, "stray")
    blk = block_of(gm=gm, extra=extra, text=text)
    policy = capacitor_policy(blk)
    d = Design((capacitor_part("C1", c1, policy), capacitor_part("C2", c2, policy)))
    fam = Crystal()
    facs = declare(blk, fam.factors(blk, d))
    assert any(f.rising for f in facs)
    plain = [dataclasses.replace(f, rising=(), falling=()) for f in facs]
    fast = worst_case(facs, fam.evaluate(blk, ""))
    full = worst_case(plain, fam.evaluate(blk, ""))
    assert fast.keys() == full.keys()
    for key in full:
        assert (fast[key].low, fast[key].high) == (full[key].low, full[key].high), key
