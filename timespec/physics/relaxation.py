"""Schmitt-inverter RC relaxation oscillator.

One resistor ``r`` from the inverter output back to its input, one capacitor ``c`` from
the input to ground.  The output swings rail to rail (``v_high``, ``v_low``); the input
thresholds are ``vt_plus`` (rising) and ``vt_minus`` (falling), given in volts, with
``vt_plus > vt_minus``.  While the output is high the capacitor charges from
``vt_minus`` to ``vt_plus``; while low it discharges back.

Pure vectorised functions in SI units; ``inf`` marks a threshold never reached.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet
from timespec.physics.rcdelay import charge_time, threshold_from_time

__all__ = ["delayed_times", "duty", "frequency", "high_time", "low_time", "period"]


@quiet
def high_time(
    r: ArrayLike,
    c: ArrayLike,
    v_high: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Time the output stays high (capacitor rising from VT- to VT+).

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_high : ArrayLike
        Output high level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    i_drain : ArrayLike, optional
        Constant current leaving the input node (input leakage), A.  Default 0.

    Returns
    -------
    FloatArray
        High time, s (``inf`` if VT+ is at or above the effective target).

    Notes
    -----
    ``tH = R*C*ln((v_eff - VT-)/(v_eff - VT+))``, ``v_eff = v_high - i_drain*R``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook.
    """
    return charge_time(r, c, v_high, vt_minus, vt_plus, i_drain)


@quiet
def low_time(
    r: ArrayLike,
    c: ArrayLike,
    v_low: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Time the output stays low (capacitor falling from VT+ to VT-).

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_low : ArrayLike
        Output low level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    i_drain : ArrayLike, optional
        Constant current leaving the input node, A.  Default 0.

    Returns
    -------
    FloatArray
        Low time, s (``inf`` if VT- is at or below the effective target).

    Notes
    -----
    ``tL = R*C*ln((VT+ - v_eff)/(VT- - v_eff))``, ``v_eff = v_low - i_drain*R``; with
    ``v_low = 0`` and no drain, ``R*C*ln(VT+/VT-)``.

    References
    ----------
    First-order RC discharge law, any circuit-theory handbook.
    """
    return charge_time(r, c, v_low, vt_plus, vt_minus, i_drain)


@quiet
def period(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    v_low: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Oscillation period of the Schmitt-inverter RC oscillator.

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, used as the output high level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    v_low : ArrayLike, optional
        Output low level, V.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the input node, A.  Default 0.

    Returns
    -------
    FloatArray
        Period, s (``inf`` if the circuit does not oscillate).

    Notes
    -----
    ``T = tH + tL``; with ``v_low = 0`` and no drain
    ``T = R*C*[ln(VT+/VT-) + ln((V - VT-)/(V - VT+))]``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook.
    """
    t_h = high_time(r, c, v_supply, vt_plus, vt_minus, i_drain)
    t_l = low_time(r, c, v_low, vt_plus, vt_minus, i_drain)
    return as_float_array(t_h + t_l)


@quiet
def frequency(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    v_low: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Oscillation frequency of the Schmitt-inverter RC oscillator.

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, used as the output high level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    v_low : ArrayLike, optional
        Output low level, V.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the input node, A.  Default 0.

    Returns
    -------
    FloatArray
        ``1/T``, Hz (0 if the circuit does not oscillate).

    Notes
    -----
    ``f = 1/T`` with ``T`` from :func:`period`.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook.
    """
    t = period(r, c, v_supply, vt_plus, vt_minus, v_low, i_drain)
    with np.errstate(divide="ignore"):
        return as_float_array(1.0 / t)


@quiet
def duty(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    v_low: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Fraction of the period the output is high.

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, used as the output high level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    v_low : ArrayLike, optional
        Output low level, V.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the input node, A.  Default 0.

    Returns
    -------
    FloatArray
        ``tH/(tH + tL)`` (``nan`` if undefined).

    Notes
    -----
    ``D = tH/(tH + tL)``.

    References
    ----------
    Definition of duty cycle, common practice.
    """
    t_h = high_time(r, c, v_supply, vt_plus, vt_minus, i_drain)
    t_l = low_time(r, c, v_low, vt_plus, vt_minus, i_drain)
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(t_h / (t_h + t_l))


@quiet
def delayed_times(
    r: ArrayLike,
    c: ArrayLike,
    v_high: ArrayLike,
    v_low: ArrayLike,
    vt_plus: ArrayLike,
    vt_minus: ArrayLike,
    t_pd: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> tuple[FloatArray, FloatArray]:
    """High and low times of the steady oscillation with a gate propagation delay.

    Parameters
    ----------
    r : ArrayLike
        Feedback resistor, ohm.
    c : ArrayLike
        Timing capacitor (stray included), F.
    v_high : ArrayLike
        Output high level, V.
    v_low : ArrayLike
        Output low level, V.
    vt_plus : ArrayLike
        Rising input threshold, V.
    vt_minus : ArrayLike
        Falling input threshold, V.
    t_pd : ArrayLike
        Propagation delay from a threshold crossing at the input to the output
        edge, s (``>= 0``; the same for both edges).
    i_drain : ArrayLike, optional
        Constant current leaving the input node, A.  Default 0.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s (``inf`` where a threshold is never reached).

    Notes
    -----
    The output switches ``t_pd`` after the input crosses a threshold, and the
    capacitor keeps moving toward the old target meanwhile, so it overshoots:
    it turns at ``v_top = v(t_pd)`` charging from VT+ toward ``v_high − i·R`` and
    at ``v_bot = v(t_pd)`` discharging from VT− toward ``v_low − i·R``.  In the
    steady cycle ::

        tH = t_pd + R·C·ln((Vh' − v_bot)/(Vh' − VT+))
        tL = t_pd + R·C·ln((v_top − Vl')/(VT− − Vl'))

    with ``Vh' = v_high − i·R``, ``Vl' = v_low − i·R``.  With ``t_pd = 0`` they are
    :func:`high_time` and :func:`low_time`; for ``t_pd ≪ R·C`` each half grows by
    about ``t_pd`` plus the overshoot's share.

    References
    ----------
    First-order RC charge and discharge laws, any circuit-theory handbook,
    applied piecewise to the delayed switching (our own composition, checked
    against scipy ``solve_ivp`` with a delayed comparator in the tests).
    """
    td = as_float_array(t_pd)
    v_top = threshold_from_time(td, r, c, v_high, vt_plus, i_drain)
    v_bot = threshold_from_time(td, r, c, v_low, vt_minus, i_drain)
    t_h = td + charge_time(r, c, v_high, v_bot, vt_plus, i_drain)
    t_l = td + charge_time(r, c, v_low, v_top, vt_minus, i_drain)
    return as_float_array(t_h), as_float_array(t_l)
