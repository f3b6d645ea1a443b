"""Tests of timespec.physics.pierce: Pierce crystal oscillator relations.

Checked against published crystal-oscillator design application notes (load
capacitance, pulling, critical transconductance, drive level), against the exact
Butterworth-Van Dyke crystal model solved numerically with complex impedances and
scipy's brentq root finder (an independent route), and against the parabolic law of
tuning-fork crystal datasheets (generic device class).
"""

from __future__ import annotations

import inspect
import math
from types import ModuleType

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import brentq

from timespec.physics import pierce
from timespec.physics.pierce import (
    budget_rss,
    budget_worst_case,
    critical_gm,
    critical_gm_caps,
    crystal_swing,
    drive_level,
    drive_level_from_output,
    equal_caps_for_load,
    gain_margin,
    load_capacitance,
    load_offset_ppm,
    load_resonance_exact,
    pull_sensitivity_ppm_per_pf,
    pulling_ppm,
    series_resistor,
    tuning_fork_ppm,
)

# Demo crystal (bench-instrument reference clock, our own scenario): 12 MHz fundamental,
# Cm = 4 fF, C0 = 1.5 pF, ESR = 60 ohm.
F_S = 12e6
C_M = 4e-15
C_0 = 1.5e-12
ESR = 60.0
L_M = 1.0 / ((2 * math.pi * F_S) ** 2 * C_M)  # motional inductance from fs and Cm


def crystal_impedance(w: float, esr: float = ESR) -> complex:
    """Butterworth-Van Dyke model: (R + jwL + 1/(jwCm)) in parallel with C0."""
    z_m = complex(esr, w * L_M - 1.0 / (w * C_M))
    z_0 = complex(0.0, -1.0 / (w * C_0))
    return z_m * z_0 / (z_m + z_0)


def load_resonance_numeric(c_load: float, esr: float = 0.0) -> float:
    """Frequency where the crystal's reactance cancels that of c_load in series (brentq)."""

    def reactance(f: float) -> float:
        w = 2 * math.pi * f
        return crystal_impedance(w, esr).imag - 1.0 / (w * c_load)

    lo, hi = bracket(c_load)
    return float(brentq(reactance, lo, hi, xtol=1e-9, rtol=1e-15))


def bracket(c_load: float) -> tuple[float, float]:
    """Frequencies where the crystal's reactance is well below / above 1/(w*c_load).

    Between series resonance and anti-resonance the crystal is inductive; its reactance
    matches a capacitance near fs*(1 + Cm/(2(C0 + C))), so loads of 3*c_load and
    c_load/3 bracket the root safely, away from both resonances (where ESR matters).
    """
    return (
        F_S * (1.0 + C_M / (2.0 * (C_0 + 3.0 * c_load))),
        F_S * (1.0 + C_M / (2.0 * (C_0 + c_load / 3.0))),
    )


def test_load_capacitance_formula() -> None:
    # Published crystal-oscillator design application notes: CL = C1*C2/(C1 + C2) + Cs.
    # Two 12 pF capacitors and 2 pF stray give 6 + 2 = 8 pF (by hand).
    assert float(load_capacitance(12e-12, 12e-12, 2e-12)) == pytest.approx(8e-12)
    # 10 pF and 22 pF with 3 pF stray: 220/32 + 3 = 9.875 pF (by hand).
    assert float(load_capacitance(10e-12, 22e-12, 3e-12)) == pytest.approx(9.875e-12)
    # Equal capacitors for a load: C = 2*(CL - Cs) (application notes).
    assert float(equal_caps_for_load(8e-12, 2e-12)) == pytest.approx(12e-12)
    assert np.isnan(equal_caps_for_load(2e-12, 2e-12))
    assert np.isnan(equal_caps_for_load(1e-12, 3e-12))
    round_trip = load_capacitance(equal_caps_for_load(9e-12, 4e-12), 10e-12, 4e-12)
    assert float(round_trip) == pytest.approx(9e-12)


@pytest.mark.parametrize("c_load", [6e-12, 8e-12, 10e-12, 12.5e-12, 16e-12, 20e-12])
def test_exact_load_resonance_matches_impedance_root(c_load: float) -> None:
    # Independent route: root of the BVD reactance plus the load (scipy brentq).
    assert float(load_resonance_exact(F_S, C_M, C_0, c_load)) == pytest.approx(
        load_resonance_numeric(c_load), rel=1e-13
    )


@pytest.mark.parametrize("c_load", [6e-12, 7e-12, 10e-12, 12.5e-12, 16e-12, 20e-12])
@pytest.mark.parametrize("c_ref", [8e-12, 18e-12])
def test_pulling_approximation_vs_exact(c_load: float, c_ref: float) -> None:
    # Application-note pulling formula vs the exact BVD load resonance: the first-order
    # form must agree to well within a few % of the pulling (1 % asserted).
    exact = (
        load_resonance_exact(F_S, C_M, C_0, c_load) / load_resonance_exact(F_S, C_M, C_0, c_ref)
        - 1.0
    ) * 1e6
    approx = pulling_ppm(C_M, C_0, c_load, c_ref)
    assert float(approx) == pytest.approx(float(exact), rel=1e-2)
    # Sign convention: less load than calibrated -> runs fast.
    assert (float(approx) > 0.0) == (c_load < c_ref)
    # Offset above series resonance: Cm/(2(C0 + CL)) (application notes).
    offset_exact = (load_resonance_exact(F_S, C_M, C_0, c_load) / F_S - 1.0) * 1e6
    assert float(load_offset_ppm(C_M, C_0, c_load)) == pytest.approx(float(offset_exact), rel=1e-2)


@pytest.mark.parametrize("c_load", [6e-12, 8e-12, 20e-12])
def test_pull_sensitivity_vs_numeric_derivative(c_load: float) -> None:
    # Application notes: S = -Cm/(2(C0 + CL)^2); checked against a central difference of
    # the exact load resonance (+-0.01 pF).
    h = 0.01e-12
    f_up = load_resonance_exact(F_S, C_M, C_0, c_load + h)
    f_dn = load_resonance_exact(F_S, C_M, C_0, c_load - h)
    f_0 = load_resonance_exact(F_S, C_M, C_0, c_load)
    numeric = float((f_up - f_dn) / f_0 * 1e6 / (2 * h) * 1e-12)
    assert float(pull_sensitivity_ppm_per_pf(C_M, C_0, c_load)) == pytest.approx(numeric, rel=1e-2)
    # By hand at 8 pF: -1e6*4e-15/(2*(9.5e-12)^2)*1e-12 = -22.16 ppm/pF.
    if c_load == 8e-12:
        assert float(pull_sensitivity_ppm_per_pf(C_M, C_0, c_load)) == pytest.approx(
            -22.16, rel=1e-3
        )


def test_critical_gm_by_hand() -> None:
    # Application notes: gm_crit = 4*ESR*(2*pi*f)^2*(C0 + CL)^2.  By hand, 60 ohm,
    # 12 MHz, C0 1.5 pF, CL 8 pF: w = 7.5398e7 rad/s, w^2 = 5.6849e15,
    # (9.5 pF)^2 = 9.025e-23 F^2 -> 240*5.6849e15*9.025e-23 = 1.2313e-4 A/V (0.123 mA/V).
    assert float(critical_gm(ESR, F_S, C_0, 8e-12)) == pytest.approx(1.2313e-4, rel=1e-4)
    # Gain margin: 1.5 mA/V available -> 12.2 (>= 5 is the usual target, common practice).
    assert float(gain_margin(1.5e-3, critical_gm(ESR, F_S, C_0, 8e-12))) == pytest.approx(
        12.182, rel=1e-3
    )


def pierce_gm_numeric(c1: float, c2: float, esr: float) -> float:
    """Critical gm from the Pierce stage's oscillation condition, solved numerically.

    Nodal analysis of the stage (any circuit-theory handbook): an inverting
    transconductance gm from the input node (C1 to ground) to the output node (C2 to
    ground), the crystal between them.  At s = j*w the determinant vanishes when the
    crystal impedance equals (gm + j*w*(C1 + C2))/(w^2*C1*C2): the imaginary part fixes
    w (brentq), the real part then gives gm.
    """

    def imaginary_mismatch(f: float) -> float:
        w = 2 * math.pi * f
        return crystal_impedance(w, esr).imag - (c1 + c2) / (w * c1 * c2)

    lo, hi = bracket(c1 * c2 / (c1 + c2))
    f = brentq(imaginary_mismatch, lo, hi, xtol=1e-9, rtol=1e-15)
    w = 2 * math.pi * f
    return float(crystal_impedance(w, esr).real * w**2 * c1 * c2)


@pytest.mark.parametrize(("c1", "c2"), [(16e-12, 16e-12), (12e-12, 22e-12), (27e-12, 10e-12)])
def test_critical_gm_vs_nodal_analysis(c1: float, c2: float) -> None:
    # Independent route: exact small-signal oscillation condition with the BVD model.
    numeric = pierce_gm_numeric(c1, c2, ESR)
    assert float(critical_gm_caps(ESR, F_S, C_0, c1, c2)) == pytest.approx(numeric, rel=1e-3)
    if c1 == c2:
        # Equal capacitors: the application-note formula with CL = C1/2.
        assert float(critical_gm(ESR, F_S, C_0, c1 / 2)) == pytest.approx(numeric, rel=1e-3)


@pytest.mark.parametrize(("c_load", "v_pp"), [(8e-12, 1.0), (12e-12, 0.4), (18e-12, 2.5)])
@pytest.mark.parametrize("esr", [1.0, ESR])
def test_drive_level_vs_bvd_model(c_load: float, v_pp: float, esr: float) -> None:
    # The application-note form (from memory) checked with the BVD model: at the load
    # resonance, put a sine of v_pp across the crystal and compute the motional-arm current
    # exactly; DL = ESR*I_rms^2.  The closed form neglects terms of order
    # (ESR*w*(C0 + CL))^2 (0.2-0.8 % for this crystal at 60 ohm), so the tolerance is
    # twice that term.
    f = load_resonance_numeric(c_load, esr)
    w = 2 * math.pi * f
    z_m = complex(esr, w * L_M - 1.0 / (w * C_M))
    i_rms = (v_pp / 2.0) / abs(z_m) / math.sqrt(2.0)
    second_order = (esr * w * (C_0 + c_load)) ** 2
    assert float(drive_level(esr, f, C_0, c_load, v_pp)) == pytest.approx(
        esr * i_rms**2, rel=2.0 * second_order + 1e-6
    )


def test_drive_level_by_hand() -> None:
    # 12 MHz, 9.5 pF total, 1 Vpp: I_rms = 7.5398e7*9.5e-12*1/(2*sqrt 2) = 253.2 uA;
    # 60 ohm * (253.2 uA)^2 = 3.85 uW (by hand).
    assert float(drive_level(ESR, F_S, C_0, 8e-12, 1.0)) == pytest.approx(3.848e-6, rel=1e-3)


def test_series_resistor() -> None:
    # Application notes: start with the reactance of C2; 12 MHz, 20 pF -> 663.1 ohm (by hand).
    assert float(series_resistor(12e6, 20e-12)) == pytest.approx(663.15, rel=1e-4)


def test_tuning_fork_parabola() -> None:
    # Tuning-fork crystal datasheets (generic device class): -0.034 ppm/K^2 about 25 degC.
    # 35 K either side: -0.034*35^2 = -41.65 ppm (by hand).
    np.testing.assert_allclose(tuning_fork_ppm(np.array([-10.0, 60.0])), -41.65, rtol=1e-12)
    assert float(tuning_fork_ppm(25.0)) == 0.0
    assert float(tuning_fork_ppm(45.0, turnover_c=20.0, k_ppm_per_k2=-0.04)) == pytest.approx(-25.0)


def test_budgets() -> None:
    # Common practice: worst case adds magnitudes, RSS adds squares.
    # (10, -20, 3) ppm -> 33 ppm worst case, sqrt(509) = 22.56 ppm RSS (by hand).
    assert float(budget_worst_case(10.0, -20.0, 3.0)) == pytest.approx(33.0)
    assert float(budget_rss(10.0, -20.0, 3.0)) == pytest.approx(22.561, rel=1e-4)
    assert float(budget_worst_case()) == 0.0
    assert float(budget_rss()) == 0.0
    vec = budget_worst_case(np.array([1.0, 2.0]), 3.0)
    np.testing.assert_allclose(vec, [4.0, 5.0])


# ---------------------------------------------------------------------------------------
# Properties (hypothesis).

pf = st.floats(min_value=4.0, max_value=30.0)
ppm = st.floats(min_value=-100.0, max_value=100.0)


@given(pf, pf)
def test_pulling_antisymmetric_and_transitive(a: float, b: float) -> None:
    p_ab = pulling_ppm(C_M, C_0, a * 1e-12, b * 1e-12)
    p_ba = pulling_ppm(C_M, C_0, b * 1e-12, a * 1e-12)
    assert float(p_ab + p_ba) == pytest.approx(0.0, abs=1e-9)
    # Pulling relative to a reference is the difference of the offsets.
    diff = load_offset_ppm(C_M, C_0, a * 1e-12) - load_offset_ppm(C_M, C_0, b * 1e-12)
    assert float(p_ab) == pytest.approx(float(diff), abs=1e-9)


@given(st.lists(ppm, min_size=1, max_size=6))
def test_rss_never_exceeds_worst_case(terms: list[float]) -> None:
    assert float(budget_rss(*terms)) <= float(budget_worst_case(*terms)) * (1 + 1e-12)
    assert float(budget_rss(*terms)) >= max(abs(t) for t in terms) * (1 - 1e-12)


@given(pf, pf, st.floats(0.0, 6.0))
def test_load_capacitance_symmetric_and_bounded(a: float, b: float, s: float) -> None:
    cl = float(load_capacitance(a, b, s))
    assert cl == pytest.approx(float(load_capacitance(b, a, s)))
    assert s < cl < min(a, b) + s  # series combination is below either capacitor


def check_docstrings(module: ModuleType) -> None:
    for name in module.__all__:
        obj = getattr(module, name)
        if not callable(obj):
            continue
        doc = inspect.getdoc(obj) or ""
        for section in ("Parameters", "Returns", "Notes", "References"):
            assert f"\n{section}\n" in doc, f"{name}: no {section} section"
        for param in inspect.signature(obj).parameters.values():
            prefix = "*" if param.kind is param.VAR_POSITIONAL else ""
            assert f"\n{prefix}{param.name} : " in doc, f"{name}: {param.name} undocumented"


def test_docstrings_complete() -> None:
    check_docstrings(pierce)


def test_output_swing_to_crystal_by_hand() -> None:
    # Pierce loop (application notes, from memory): V_x = V_out·(1 + C2/C1).
    # 3 V at the output, C1 = 10 pF, C2 = 15 pF: 3·2.5 = 7.5 Vpp across the crystal.
    assert float(crystal_swing(10e-12, 15e-12, 3.0)) == pytest.approx(7.5, rel=1e-12)
    # Equal 12 pF, 3 pF stray, 1 Vpp at the output: CL = 9 pF, V_x = 2 Vpp,
    # I_rms = 7.5398e7·(1.5 + 9)e-12·2/(2·sqrt 2) = 559.8 uA; 60 ohm·(559.8 uA)² =
    # 18.80 uW (by hand), four times the 1 Vpp-across-the-crystal reading.
    dl = float(drive_level_from_output(ESR, F_S, C_0, 12e-12, 12e-12, 3e-12, 1.0))
    assert dl == pytest.approx(18.80e-6, rel=1e-3)
    assert dl == pytest.approx(4 * float(drive_level(ESR, F_S, C_0, 9e-12, 1.0)), rel=1e-12)
