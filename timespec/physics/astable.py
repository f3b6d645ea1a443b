"""555-type astable (free-running) timing.

Thresholds come from one internal divider: upper ``k*V`` and lower ``k*V/2`` with
``k = threshold_ratio`` (nominally 2/3).  Three circuit variants:

* classic: ``ra`` from the supply to the discharge pin, ``rb`` from the discharge pin to
  the capacitor; the capacitor charges through ``ra + rb`` and discharges through ``rb``
  into the discharge transistor (on-resistance ``r_on``);
* steering diode: as classic, with a diode across ``rb`` (anode at the discharge pin),
  so charging bypasses ``rb`` and duty cycles below 50 % become possible;
* output feedback (CMOS timers): one resistor from the output to the capacitor.

Pure vectorised functions in SI units; ``inf`` marks a threshold never reached.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet
from timespec.physics.rcdelay import charge_time

__all__ = [
    "TYPICAL_DIODE_TC_MV_PER_K",
    "TYPICAL_DIODE_V25",
    "classic_high_time",
    "classic_low_time",
    "diode_charge_currents",
    "diode_equation_charge",
    "diode_equation_high_time",
    "diode_forward_voltage",
    "diode_high_time",
    "diode_low_time",
    "diode_saturation_current",
    "discharge_current",
    "discharge_node",
    "duty",
    "feedback_high_time",
    "feedback_low_time",
    "feedback_output_currents",
    "frequency",
    "thermal_voltage",
]

TYPICAL_DIODE_V25: float = 0.65
"""Typical forward drop of a small-signal silicon diode at a few hundred uA, 25 degC, V.

Common practice (0.6-0.7 V)."""

TYPICAL_DIODE_TC_MV_PER_K: float = -2.0
"""Typical temperature coefficient of a silicon diode's forward drop, mV/K (common practice)."""


def _levels(v_supply: ArrayLike, threshold_ratio: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """Return the (lower, upper) threshold voltages ``k*V/2`` and ``k*V``."""
    upper = as_float_array(threshold_ratio) * as_float_array(v_supply)
    return as_float_array(0.5 * upper), upper


@quiet
def classic_high_time(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output-high time of the classic two-resistor astable.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Resistor from the discharge pin to the capacitor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k`` (lower is ``k/2``).
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        High time, s.

    Notes
    -----
    Charge through ``ra + rb`` toward ``V`` from ``k*V/2`` to ``k*V``:
    ``tH = (RA + RB)*C*ln((v_eff - kV/2)/(v_eff - kV))``, ``v_eff = V - i_drain*(RA + RB)``.
    Nominal (``k = 2/3``, no drain): ``(RA + RB)*C*ln 2``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook; thresholds from 555-type
    timer datasheets (generic device class).
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    r = as_float_array(ra) + as_float_array(rb)
    return charge_time(r, c, v_supply, lo, hi, i_drain)


@quiet
def discharge_node(
    v_supply: ArrayLike, ra: ArrayLike, r_on: ArrayLike
) -> tuple[FloatArray, FloatArray]:
    """Thevenin equivalent of the discharge pin while the discharge transistor is on.

    Parameters
    ----------
    v_supply : ArrayLike
        Supply voltage, V.
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    r_on : ArrayLike
        Discharge-transistor on-resistance, ohm.

    Returns
    -------
    tuple of FloatArray
        ``(v_n, r_n)``: open-circuit voltage (V) and source resistance (ohm).

    Notes
    -----
    ``v_n = V*r_on/(RA + r_on)``, ``r_n = RA*r_on/(RA + r_on)``.

    References
    ----------
    Thevenin's theorem, any circuit-theory handbook.
    """
    v = as_float_array(v_supply)
    r_a = as_float_array(ra)
    ron = as_float_array(r_on)
    with np.errstate(divide="ignore", invalid="ignore"):
        total = r_a + ron
        v_n = as_float_array(v * ron / total)
        r_n = as_float_array(r_a * ron / total)
    return v_n, r_n


@quiet
def classic_low_time(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    r_on: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output-low time of the classic astable, including discharge saturation.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Resistor from the discharge pin to the capacitor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    r_on : ArrayLike, optional
        Discharge-transistor on-resistance, ohm.  Default 0 (ideal switch).
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        Low time, s (``inf`` if the node settles above ``k*V/2``).

    Notes
    -----
    The transistor sinks both the capacitor current through ``rb`` and the current from
    the supply through ``ra``.  Seen from the capacitor the discharge pin is the Thevenin
    source of :func:`discharge_node`, so the capacitor discharges through
    ``RB + r_n`` toward ``v_n`` from ``kV`` to ``kV/2``:
    ``tL = (RB + r_n)*C*ln((kV - v_eff)/(kV/2 - v_eff))``,
    ``v_eff = v_n - i_drain*(RB + r_n)``.  With ``r_on = 0``: ``RB*C*ln 2``.

    References
    ----------
    First-order RC discharge law and Thevenin's theorem, any circuit-theory handbook;
    discharge saturation from 555-type timer datasheets (generic device class).
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v_n, r_n = discharge_node(v_supply, ra, r_on)
    r = as_float_array(rb) + r_n
    return charge_time(r, c, v_n, hi, lo, i_drain)


@quiet
def diode_high_time(
    ra: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    v_diode: ArrayLike,
    i_drain: ArrayLike = 0.0,
    rb: ArrayLike = np.inf,
) -> FloatArray:
    """Output-high time of the steering-diode astable.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    v_diode : ArrayLike
        Forward drop of the steering diode (constant-drop model), V.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.
    rb : ArrayLike, optional
        Discharge resistor in parallel with the diode, ohm.  Default ``inf``, which gives
        the plain closed form; a finite value adds the tail where the diode stops
        conducting (see Notes).

    Returns
    -------
    FloatArray
        High time, s.

    Notes
    -----
    While the diode conducts, all current through ``ra`` reaches the capacitor (``rb``
    in parallel with the diode returns its share to the same node), so the capacitor
    charges through ``RA`` toward ``V - v_diode``:
    ``tH = RA*C*ln((v_eff - kV/2)/(v_eff - kV))``, ``v_eff = V - v_diode - i_drain*RA``.

    The diode carries ``(V - v_diode - v)/RA - v_diode/RB``; it stops conducting when the
    capacitor passes ``v_x = V - v_diode - v_diode*RA/RB``.  Above ``v_x`` the capacitor
    charges through ``RA + RB`` toward ``V`` (the classic law).  The two pieces are
    added; with ``rb = inf`` only the first exists.

    References
    ----------
    First-order RC charging law and a constant-drop diode model, any circuit-theory
    handbook; the steering-diode circuit is common practice.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    return _drop_charge(ra, rb, c, v_supply, v_diode, lo, hi, i_drain)


def _drop_charge(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    v_diode: ArrayLike,
    v_from: ArrayLike,
    v_to: ArrayLike,
    i_drain: ArrayLike,
) -> FloatArray:
    """Constant-drop diode charge from ``v_from`` up to ``v_to`` (both pieces)."""
    v = as_float_array(v_supply)
    vd = as_float_array(v_diode)
    r_a = as_float_array(ra)
    r_b = as_float_array(rb)
    with np.errstate(divide="ignore", invalid="ignore"):
        v_x = v - vd - vd * (r_a / r_b)
    # Piece 1: diode on, up to min(v_to, v_x); piece 2: diode off, up to v_to.
    v_switch = np.clip(v_x, v_from, v_to)
    t_on = charge_time(r_a, c, v - vd, v_from, v_switch, i_drain)
    t_off = charge_time(r_a + r_b, c, v, v_switch, v_to, i_drain)
    return as_float_array(t_on + t_off)


@quiet
def diode_low_time(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    r_on: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output-low time of the steering-diode astable.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Discharge resistor (in parallel with the reverse-biased diode), ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    r_on : ArrayLike, optional
        Discharge-transistor on-resistance, ohm.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        Low time, s.

    Notes
    -----
    The diode is reverse biased while the capacitor discharges (the capacitor sits above
    the discharge pin), so the low time equals :func:`classic_low_time`.

    References
    ----------
    First-order RC discharge law and Thevenin's theorem, any circuit-theory handbook.
    """
    return classic_low_time(ra, rb, c, v_supply, threshold_ratio, r_on, i_drain)


@quiet
def feedback_high_time(
    r: ArrayLike,
    c: ArrayLike,
    v_high: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output-high time of the output-feedback astable (CMOS timer, one resistor).

    Parameters
    ----------
    r : ArrayLike
        Resistor from the output to the capacitor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_high : ArrayLike
        Output high level, V.
    v_supply : ArrayLike
        Supply voltage (sets the thresholds), V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        High time, s.

    Notes
    -----
    ``tH = R*C*ln((v_eff - kV/2)/(v_eff - kV))``, ``v_eff = v_high - i_drain*R``;
    rail-to-rail output and ``k = 2/3`` give ``R*C*ln 2`` (50 % duty).

    References
    ----------
    First-order RC charging law, any circuit-theory handbook; the circuit is common
    practice with CMOS 555-type timers.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    return charge_time(r, c, v_high, lo, hi, i_drain)


@quiet
def feedback_low_time(
    r: ArrayLike,
    c: ArrayLike,
    v_low: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output-low time of the output-feedback astable (CMOS timer, one resistor).

    Parameters
    ----------
    r : ArrayLike
        Resistor from the output to the capacitor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_low : ArrayLike
        Output low level, V.
    v_supply : ArrayLike
        Supply voltage (sets the thresholds), V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        Low time, s.

    Notes
    -----
    ``tL = R*C*ln((kV - v_eff)/(kV/2 - v_eff))``, ``v_eff = v_low - i_drain*R``.

    References
    ----------
    First-order RC discharge law, any circuit-theory handbook.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    return charge_time(r, c, v_low, hi, lo, i_drain)


def feedback_output_currents(
    r: ArrayLike,
    r_out_high: ArrayLike,
    r_out_low: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """Output currents of the output-feedback astable at the switching moments.

    Parameters
    ----------
    r : ArrayLike
        Resistor from the output to the capacitor, ohm.
    r_out_high : ArrayLike
        Output resistance of the high (sourcing) side, ohm.
    r_out_low : ArrayLike
        Output resistance of the low (sinking) side, ohm.
    v_supply : ArrayLike
        Supply voltage, V (rail-to-rail output levels assumed: the largest current).
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.

    Returns
    -------
    tuple of FloatArray
        ``(i_source, i_sink)``, A: ``(V − kV/2)/(R + R_oh)`` just after the output
        goes high (capacitor at the lower threshold) and ``kV/(R + R_ol)`` just
        after it goes low (capacitor at the upper threshold).

    Notes
    -----
    The largest currents of the cycle: the capacitor voltage is continuous, so
    just after a switch the whole gap between the new output level and the
    threshold the capacitor sits at falls across ``R + R_out``; it shrinks as
    the capacitor follows.

    References
    ----------
    Ohm's law across the series resistance at the switching instant (the
    capacitor voltage cannot jump); any circuit-theory handbook.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v = as_float_array(v_supply)
    i_src = (v - lo) / (as_float_array(r) + as_float_array(r_out_high))
    i_snk = hi / (as_float_array(r) + as_float_array(r_out_low))
    return i_src, i_snk


@quiet
def frequency(t_high: ArrayLike, t_low: ArrayLike) -> FloatArray:
    """Oscillation frequency from the two half-periods.

    Parameters
    ----------
    t_high : ArrayLike
        High time, s.
    t_low : ArrayLike
        Low time, s.

    Returns
    -------
    FloatArray
        ``1/(t_high + t_low)``, Hz (0 if either time is ``inf``).

    Notes
    -----
    ``f = 1/(tH + tL)``.

    References
    ----------
    Definition of frequency.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(1.0 / (as_float_array(t_high) + as_float_array(t_low)))


@quiet
def duty(t_high: ArrayLike, t_low: ArrayLike) -> FloatArray:
    """Duty cycle (fraction of the period the output is high).

    Parameters
    ----------
    t_high : ArrayLike
        High time, s.
    t_low : ArrayLike
        Low time, s.

    Returns
    -------
    FloatArray
        ``t_high/(t_high + t_low)``, between 0 and 1 (``nan`` if undefined).

    Notes
    -----
    ``D = tH/(tH + tL)``; the classic circuit gives ``(RA + RB)/(RA + 2RB)`` nominally.

    References
    ----------
    Definition of duty cycle, common practice.
    """
    th = as_float_array(t_high)
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(th / (th + as_float_array(t_low)))


@quiet
def diode_forward_voltage(v25: ArrayLike, tc_mv_per_k: ArrayLike, temp_c: ArrayLike) -> FloatArray:
    """Forward drop of a silicon diode at temperature, linear model.

    Parameters
    ----------
    v25 : ArrayLike
        Forward drop at 25 degC at the operating current, V (typical small-signal
        silicon diode at a few hundred uA: 0.6-0.7 V, see ``TYPICAL_DIODE_V25``).
    tc_mv_per_k : ArrayLike
        Temperature coefficient, mV/K (typically about -2, see
        ``TYPICAL_DIODE_TC_MV_PER_K``).
    temp_c : ArrayLike
        Junction temperature, degC.

    Returns
    -------
    FloatArray
        Forward drop, V.

    Notes
    -----
    ``Vf(T) = V25 + tc*1e-3*(T - 25)``.

    References
    ----------
    Common practice for silicon junctions (about -2 mV/K).
    """
    dt = as_float_array(temp_c) - 25.0
    return as_float_array(as_float_array(v25) + 1e-3 * as_float_array(tc_mv_per_k) * dt)


@quiet
def discharge_current(v_supply: ArrayLike, ra: ArrayLike) -> FloatArray:
    """Current the discharge pin sinks from the supply through ``ra`` while on.

    Parameters
    ----------
    v_supply : ArrayLike
        Supply voltage, V.
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.

    Returns
    -------
    FloatArray
        ``V/RA``, A (upper bound, ignoring the transistor's small saturation voltage).

    Notes
    -----
    ``I = V/RA``; design rule: keep it within the discharge pin's rated sink current
    so the saturation voltage stays near its datasheet value.

    References
    ----------
    Ohm's law; the sink-current rule from 555-type timer datasheets (generic device
    class).
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(as_float_array(v_supply) / as_float_array(ra))


#: Boltzmann constant over the elementary charge, V/K (CODATA 2018, exact in SI).
K_OVER_Q: float = 1.380649e-23 / 1.602176634e-19

#: Kelvin offset of the Celsius scale (SI).
ZERO_C: float = 273.15

#: Gauss-Legendre nodes and weights on [0, 1] for the RB correction of the diode charge.
_GL_X, _GL_W = np.polynomial.legendre.leggauss(12)
_GL_X = 0.5 * (_GL_X + 1.0)
_GL_W = 0.5 * _GL_W


@quiet
def thermal_voltage(temp_c: ArrayLike) -> FloatArray:
    """Thermal voltage ``Vt = k·T/q`` at a temperature.

    Parameters
    ----------
    temp_c : ArrayLike
        Temperature, degC.

    Returns
    -------
    FloatArray
        ``Vt``, V (25.69 mV at 25 degC).

    Notes
    -----
    ``Vt = k·(T + 273.15)/q``.

    References
    ----------
    CODATA 2018 values of the Boltzmann constant and the elementary charge.
    """
    return as_float_array(K_OVER_Q * (as_float_array(temp_c) + ZERO_C))


@quiet
def diode_saturation_current(
    is25: ArrayLike, n: ArrayLike, temp_c: ArrayLike, eg: float = 1.11, xti: float = 3.0
) -> FloatArray:
    """Saturation current of a junction diode at temperature.

    Parameters
    ----------
    is25 : ArrayLike
        Saturation current at 25 degC, A.
    n : ArrayLike
        Emission coefficient.
    temp_c : ArrayLike
        Junction temperature, degC.
    eg : float, optional
        Activation energy, eV (silicon 1.11).
    xti : float, optional
        Temperature exponent (junction diode 3).

    Returns
    -------
    FloatArray
        ``Is(T)``, A.

    Notes
    -----
    ``Is(T) = Is·(T/T0)^(XTI/n)·exp((Eg/(n·Vt(T)))·(T/T0 − 1))``, ``T0`` = 298.15 K.

    References
    ----------
    The usual temperature law of the junction-diode model (semiconductor device
    handbooks; circuit-simulator diode models).
    """
    t = as_float_array(temp_c) + ZERO_C
    t0 = 25.0 + ZERO_C
    nn = as_float_array(n)
    vt = K_OVER_Q * t
    ratio = t / t0
    return as_float_array(
        as_float_array(is25) * ratio ** (xti / nn) * np.exp(eg / (nn * vt) * (ratio - 1.0))
    )


def _node_drop(
    u: FloatArray, ra: FloatArray, g_b: FloatArray, i_s: FloatArray, nvt: FloatArray
) -> FloatArray:
    """Diode voltage ``vd`` with ``u = vd + RA·(Is·(exp(vd/nVt) − 1) + vd/RB)``, ``u ≥ 0``.

    Newton on ``y = vd/nVt``, started at the right of the root (``vd`` with the
    whole of ``u`` across ``RA``, so ``exp(y0) − 1 = u/(RA·Is)``); the function is
    convex and rising in ``y``, so the iteration falls monotonically onto the root.
    """
    y = np.log1p(np.maximum(u, 0.0) / (ra * i_s))
    slope0 = nvt * (1.0 + ra * g_b)
    for _ in range(8):
        e = np.exp(y)
        f = slope0 * y + ra * i_s * (e - 1.0) - u
        y = np.maximum(y - f / (slope0 + ra * i_s * e), 0.0)
    return as_float_array(nvt * y)


def _inv_exp_integral(
    beta: FloatArray, d1: FloatArray, d2: FloatArray, a: FloatArray
) -> FloatArray:
    """``∫ dx/(Is·e^(a·x) − β)`` between the points where ``Is·e^(a·x)`` is d2 and d1.

    Closed form ``(1/a)·(φ(q2)/D2 − φ(q1)/D1)``, ``q = β/D``, ``φ(q) = −ln(1 − q)/q``
    (``φ(0) = 1``), stable for ``β`` of either sign and near zero.
    """

    def phi(q: FloatArray) -> FloatArray:
        small = np.abs(q) < 1e-7
        qs = np.where(small, 0.5, q)
        return np.where(small, 1.0 + 0.5 * q, -np.log1p(-qs) / qs)

    return as_float_array((phi(beta / d2) / d2 - phi(beta / d1) / d1) / a)


@quiet
def diode_charge_currents(
    ra: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    is_t: ArrayLike,
    n_vt: ArrayLike,
    rb: ArrayLike = np.inf,
) -> tuple[FloatArray, FloatArray]:
    """Steering-diode forward current at the two thresholds of the charge.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    is_t : ArrayLike
        Diode saturation current at the junction temperature, A.
    n_vt : ArrayLike
        Emission coefficient times the thermal voltage, V.
    rb : ArrayLike, optional
        Resistor in parallel with the diode, ohm.  Default ``inf``.

    Returns
    -------
    tuple of FloatArray
        ``(I_lo, I_hi)``, A: diode current with the capacitor at ``kV/2`` and at
        ``kV`` (the largest and smallest of the charge).

    Notes
    -----
    ``V − v = vd + RA·(Is·(exp(vd/nVt) − 1) + vd/RB)`` is solved for ``vd`` at each
    threshold; the diode carries ``Is·(exp(vd/nVt) − 1)``.

    References
    ----------
    Diode equation and Kirchhoff's laws, any circuit-theory handbook.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v = as_float_array(v_supply)
    r_a = as_float_array(ra)
    g_b = 1.0 / as_float_array(rb)
    i_s = as_float_array(is_t)
    nvt = as_float_array(n_vt)
    out = []
    for vc in (lo, hi):
        vd = _node_drop(as_float_array(v - vc), r_a, g_b, i_s, nvt)
        out.append(as_float_array(i_s * np.expm1(vd / nvt)))
    return out[0], out[1]


@quiet
def diode_equation_high_time(
    ra: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    is_t: ArrayLike,
    n_vt: ArrayLike,
    i_drain: ArrayLike = 0.0,
    rb: ArrayLike = np.inf,
) -> FloatArray:
    """Output-high time of the steering-diode astable with the diode equation.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    is_t : ArrayLike
        Diode saturation current at the junction temperature, A
        (:func:`diode_saturation_current`).
    n_vt : ArrayLike
        Emission coefficient times the thermal voltage, V.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.
    rb : ArrayLike, optional
        Discharge resistor in parallel with the diode, ohm.  Default ``inf``.

    Returns
    -------
    FloatArray
        High time, s (``inf`` where the charge current at ``kV`` does not beat the
        drain).

    Notes
    -----
    All of the current through ``RA`` reaches the capacitor, through the diode
    or ``RB``: ``C·dv/dt = g``, ``g = I_A − i``, with the node equation
    ``V − v = vd + RA·I_A(vd)``, ``I_A(vd) = Is·(exp(vd/nVt) − 1) + vd/RB``.
    Parametrised by the diode voltage (``dv = −(1 + RA·I_A'(vd))·dvd``)::

        tH = C·[RA·ln(g1/g2) + ∫[vd2, vd1] dvd/(I_A(vd) − i)]

    with ``vd1``, ``vd2`` the drops at ``kV/2`` and ``kV`` (:func:`diode_charge_currents`).
    With ``RB = inf`` the integral is closed,
    ``(nVt/(Is + i))·ln((I1 − i)(I2 + Is)/((I2 − i)(I1 + Is)))``; with a finite
    ``RB`` the same closed form is taken at the ``RB`` current of ``vd2`` and the
    small remainder (the ``RB`` current's change over the charge) by 12-point
    Gauss-Legendre quadrature.  No switch-over point is needed: the exponential
    diode hands the current to ``RB`` smoothly where the classic law takes over.

    References
    ----------
    Diode equation (Shockley), first-order capacitor charge and Kirchhoff's laws,
    any circuit-theory handbook; the steering-diode circuit is common practice.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    return diode_equation_charge(ra, c, v_supply, lo, hi, is_t, n_vt, i_drain, rb)


@quiet
def diode_equation_charge(
    ra: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    v_from: ArrayLike,
    v_to: ArrayLike,
    is_t: ArrayLike,
    n_vt: ArrayLike,
    i_drain: ArrayLike = 0.0,
    rb: ArrayLike = np.inf,
) -> FloatArray:
    """Time the steering-diode astable's charge takes between two capacitor voltages.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    v_from : ArrayLike
        Capacitor voltage at the start of the interval, V.
    v_to : ArrayLike
        Capacitor voltage at its end, V (``v_from <= v_to``).
    is_t : ArrayLike
        Diode saturation current at the junction temperature, A.
    n_vt : ArrayLike
        Emission coefficient times the thermal voltage, V.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.
    rb : ArrayLike, optional
        Discharge resistor in parallel with the diode, ohm.  Default ``inf``.

    Returns
    -------
    FloatArray
        Time, s (``inf`` where the charge current at ``v_to`` does not beat the drain).

    Notes
    -----
    The integral of :func:`diode_equation_high_time` between any two voltages.

    References
    ----------
    Diode equation (Shockley), first-order capacitor charge and Kirchhoff's laws,
    any circuit-theory handbook.
    """
    lo = as_float_array(v_from)
    hi = as_float_array(v_to)
    v = as_float_array(v_supply)
    r_a = as_float_array(ra)
    g_b = 1.0 / as_float_array(rb)
    i_s = as_float_array(is_t)
    nvt = as_float_array(n_vt)
    i = as_float_array(i_drain)
    vd1 = _node_drop(as_float_array(v - lo), r_a, g_b, i_s, nvt)
    vd2 = _node_drop(as_float_array(v - hi), r_a, g_b, i_s, nvt)
    g1 = (v - lo - vd1) / r_a - i
    g2 = (v - hi - vd2) / r_a - i
    ok = (g2 > 0.0) & (g1 > 0.0)
    g1s = np.where(ok, g1, 1.0)
    g2s = np.where(ok, g2, 1.0)
    a = 1.0 / nvt
    d1 = i_s * np.exp(vd1 * a)
    d2 = i_s * np.exp(vd2 * a)
    beta = i_s + i - vd2 * g_b
    closed = _inv_exp_integral(beta, d1, d2, a)
    # remainder: ∫ [1/g − 1/h] with g = h + (vd − vd2)/RB, h = Is·e^(a·vd) − beta
    span = vd1 - vd2
    rest = np.zeros(np.broadcast(span, g_b, beta).shape)
    if np.any(g_b > 0.0):
        for xn, wn in zip(_GL_X, _GL_W, strict=True):
            x = vd2 + xn * span
            h = i_s * np.exp(x * a) - beta
            dg = (x - vd2) * g_b
            rest = rest - wn * dg / (h * (h + dg))
        rest = rest * span
    t = as_float_array(c) * (r_a * np.log(g1s / g2s) + closed + rest)
    return as_float_array(np.where(ok, t, np.inf))
