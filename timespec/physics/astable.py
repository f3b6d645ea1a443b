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
    "diode_forward_voltage",
    "diode_high_time",
    "diode_low_time",
    "discharge_current",
    "discharge_node",
    "duty",
    "feedback_high_time",
    "feedback_low_time",
    "frequency",
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
    v = as_float_array(v_supply)
    vd = as_float_array(v_diode)
    r_a = as_float_array(ra)
    r_b = as_float_array(rb)
    with np.errstate(divide="ignore", invalid="ignore"):
        v_x = v - vd - vd * (r_a / r_b)
    # Piece 1: diode on, from lo up to min(hi, v_x); piece 2: diode off, up to hi.
    v_switch = np.clip(v_x, lo, hi)
    t_on = charge_time(r_a, c, v - vd, lo, v_switch, i_drain)
    t_off = charge_time(r_a + r_b, c, v, v_switch, hi, i_drain)
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
