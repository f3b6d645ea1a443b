"""Drive level of a Pierce stage checked against an exact nodal solution of its network.

The closed form (:func:`timespec.physics.pierce.drive_level_from_output`) takes the
swing at the amplifier OUTPUT node and puts ``V_out·(1 + C2/C1)`` across the crystal
(the Pierce loop: published crystal-oscillator application notes, from memory).  Here
the same network is solved exactly by modified nodal analysis with complex
admittances (any circuit-theory handbook):

* node ``in``: ``C1`` to ground (the amplifier input draws nothing);
* node ``out``: ``C2`` to ground, driven by an ideal sinusoidal source of the given
  amplitude (the amplifier output);
* between them the crystal's Butterworth-Van Dyke model (series ``R_m``-``L_m``-``C_m``
  in parallel with ``C0``) and the stray capacitance across it; ``L_m`` from the series
  resonance of ``C_m`` at the crystal frequency.

At the load-resonant frequency (found here as the zero of the lossless loop
reactance with a root finder, not from the package) the motional current gives the
exact drive level ``R_m·|I_m|²/2``.  Scenario: our own 12 MHz and 25 MHz crystals.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from timespec.physics.pierce import crystal_swing, drive_level, drive_level_from_output

F_S = 12e6
C_M = 4e-15
C_0 = 1.5e-12


def _lm(f_s: float, c_m: float) -> float:
    # Series resonance of the motional arm at the crystal frequency: w_s² = 1/(L_m·C_m).
    return 1.0 / ((2 * math.pi * f_s) ** 2 * c_m)


def _load_resonance(f_s: float, c_m: float, c0: float, cs: float, c1: float, c2: float) -> float:
    # Oscillation frequency of the lossless loop: the total reactance of
    # (crystal ∥ stray) in series with C1 and C2 vanishes (Barkhausen phase condition of
    # the Pierce loop, application notes from memory; root found numerically).
    l_m = _lm(f_s, c_m)

    def loop_reactance(f: float) -> float:
        w = 2 * math.pi * f
        y_x = 1.0 / complex(0.0, w * l_m - 1.0 / (w * c_m)) + 1j * w * (c0 + cs)
        z = 1.0 / y_x + 1.0 / (1j * w * c1) + 1.0 / (1j * w * c2)
        return z.imag

    # Just above the series resonance the arm is inductive; the root lies below the
    # parallel resonance with C0 + Cs.
    lo = f_s * (1 + 1e-9)
    hi = f_s * math.sqrt(1 + c_m / (c0 + cs)) * (1 - 1e-9) if c0 + cs > 0 else f_s * 1.01
    return float(brentq(loop_reactance, lo, hi, xtol=1e-12, rtol=1e-15, maxiter=500))


def _nodal(
    f: float,
    r_m: float,
    l_m: float,
    c_m: float,
    c0: float,
    cs: float,
    c1: float,
    c2: float,
    v_amp: float,
) -> tuple[complex, complex, complex]:
    # Modified nodal analysis (circuit-theory handbook): unknowns V_in, V_out and the
    # source current; rows are KCL at in and out, and the source equation V_out = v_amp.
    w = 2 * math.pi * f
    z_m = complex(r_m, w * l_m - 1.0 / (w * c_m))
    y_x = 1.0 / z_m + 1j * w * (c0 + cs)
    y1 = 1j * w * c1
    y2 = 1j * w * c2
    a = np.array(
        [
            [y_x + y1, -y_x, 0.0],
            [-y_x, y_x + y2, -1.0],
            [0.0, 1.0, 0.0],
        ],
        dtype=complex,
    )
    b = np.array([0.0, 0.0, v_amp], dtype=complex)
    v_in, v_out, _i_src = np.linalg.solve(a, b)
    i_m = (v_out - v_in) / z_m
    return complex(v_in), complex(v_out), complex(i_m)


CASES = [
    # (c1, c2, cs, c0, v_out_pp): equal, unequal both ways, no C0/stray, a large swing.
    (12e-12, 12e-12, 3.5e-12, C_0, 3.3),
    (10e-12, 15e-12, 3.0e-12, C_0, 3.0),
    (22e-12, 8.2e-12, 4.0e-12, C_0, 1.8),
    (18e-12, 18e-12, 0.0, 0.0, 5.0),
    (33e-12, 27e-12, 5.0e-12, 7e-12, 5.5),
]


@pytest.mark.parametrize(("c1", "c2", "cs", "c0", "v_pp"), CASES)
def test_lossless_limit_is_exact(c1: float, c2: float, cs: float, c0: float, v_pp: float) -> None:
    # With a vanishing ESR (1 mΩ) the closed form is exact for the network: crystal
    # voltage V_out·(1 + C2/C1), motional current w·(C0 + CL)·V_x.  Neglected terms are
    # of order (R·w·(C0 + CL))² ≈ 1e-14, so a relative tolerance of 1e-8 leaves only
    # the root finder and floating point.
    r_m = 1e-3
    f = _load_resonance(F_S, C_M, c0, cs, c1, c2)
    v_in, v_out, i_m = _nodal(f, r_m, _lm(F_S, C_M), C_M, c0, cs, c1, c2, v_pp / 2)
    assert abs(v_out - v_in) * 2 == pytest.approx(float(crystal_swing(c1, c2, v_pp)), rel=1e-8)
    # The input node swings in antiphase, C2/C1 times the output (Pierce loop).
    # (The ratio's imaginary part, ~1e-6 here, is the first-order phase of the 1 mΩ
    # loss; its magnitude and real part are second order.)
    ratio = v_in / v_out
    assert ratio.real == pytest.approx(-c2 / c1, rel=1e-8)
    assert abs(ratio.imag) < 1e-5
    exact = r_m * abs(i_m) ** 2 / 2  # R·I_peak²/2 = R·I_rms²
    closed = float(drive_level_from_output(r_m, f, c0, c1, c2, cs, v_pp))
    assert closed == pytest.approx(exact, rel=1e-8)


@pytest.mark.parametrize(("c1", "c2", "cs", "c0", "v_pp"), CASES)
@pytest.mark.parametrize("esr", [30.0, 60.0, 100.0])
def test_with_esr_first_order_and_conservative(
    c1: float, c2: float, cs: float, c0: float, v_pp: float, esr: float
) -> None:
    # A real ESR loads the driven network.  Solving the same nodal equations by hand
    # (KCL at ``in``): I_m = V_out·Y_m/D with D = 1 + Y_x/(j·w·C1); with u = ESR·w·(C0 + CL)
    # and k = (C0 + CL)·(C1 + C2)/C1², closed/exact = (1 + u²)·|D|²/D0² = 1 + u²·(1 + k)²
    # + O(u⁴), and Re D >= D0 = C1/(C1 + C2) for any ESR, so the closed form never reads
    # low (a safe bound for a drive limit).  Tolerance: 1.5·u²·(1 + k)² (the second-order
    # term, 0.2 %-25 % here, with room for its O(u⁴) remainder).
    f = _load_resonance(F_S, C_M, c0, cs, c1, c2)
    _v_in, _v_out, i_m = _nodal(f, esr, _lm(F_S, C_M), C_M, c0, cs, c1, c2, v_pp / 2)
    exact = esr * abs(i_m) ** 2 / 2
    cl = c1 * c2 / (c1 + c2) + cs
    u = esr * 2 * math.pi * f * (c0 + cl)
    k = (c0 + cl) * (c1 + c2) / c1**2
    second_order = u**2 * (1 + k) ** 2
    closed = float(drive_level_from_output(esr, f, c0, c1, c2, cs, v_pp))
    assert closed >= exact * (1 - 1e-12)
    assert closed / exact - 1 == pytest.approx(second_order, rel=0.5, abs=1e-8)


def test_equal_caps_quadruple_the_naive_reading() -> None:
    # Equal capacitors: the crystal sees twice either node's swing, so four times the
    # power of a reading that takes the output swing as the crystal's voltage.
    f = _load_resonance(F_S, C_M, C_0, 3.5e-12, 12e-12, 12e-12)
    cl = 6e-12 + 3.5e-12
    naive = float(drive_level(60.0, f, C_0, cl, 3.3))
    new = float(drive_level_from_output(60.0, f, C_0, 12e-12, 12e-12, 3.5e-12, 3.3))
    assert new == pytest.approx(4.0 * naive, rel=1e-12)


def test_vectorised_over_a_grid() -> None:
    # One call over arrays equals the per-point exact nodal solutions (25 MHz crystal,
    # 10 fF motional, lossless limit as above).
    f_s, c_m, r_m = 25e6, 10e-15, 1e-3
    c1 = np.array([6.8e-12, 10e-12, 15e-12, 22e-12])
    c2 = np.array([8.2e-12, 10e-12, 12e-12, 18e-12])
    cs, c0, v_pp = 2.5e-12, 2.0e-12, 3.0
    freqs = np.array(
        [_load_resonance(f_s, c_m, c0, cs, float(a), float(b)) for a, b in zip(c1, c2, strict=True)]
    )
    closed = drive_level_from_output(r_m, freqs, c0, c1, c2, cs, v_pp)
    for k in range(c1.size):
        _vi, _vo, i_m = _nodal(
            float(freqs[k]), r_m, _lm(f_s, c_m), c_m, c0, cs, float(c1[k]), float(c2[k]), v_pp / 2
        )
        assert float(closed[k]) == pytest.approx(r_m * abs(i_m) ** 2 / 2, rel=1e-8)
