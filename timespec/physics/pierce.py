"""Pierce crystal oscillator: load capacitors, pulling, gain margin, drive level, ppm budget.

The crystal is the Butterworth-Van Dyke model: a motional arm (``L``, ``c_motional``,
``esr``) in parallel with the shunt capacitance ``c_shunt`` (C0).  The oscillator's two
load capacitors ``c1``, ``c2`` in series, plus stray capacitance, form the load
capacitance ``CL`` the crystal sees.

Pure vectorised functions in SI units (F, ohm, Hz, S, W); frequency offsets in ppm.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet

__all__ = [
    "budget_rss",
    "budget_worst_case",
    "critical_gm",
    "critical_gm_caps",
    "crystal_swing",
    "drive_level",
    "drive_level_from_output",
    "equal_caps_for_load",
    "gain_margin",
    "load_capacitance",
    "load_offset_ppm",
    "load_resonance_exact",
    "pull_sensitivity_ppm_per_pf",
    "pulling_ppm",
    "series_resistor",
    "tuning_fork_ppm",
]

_TWO_PI = 2.0 * np.pi


@quiet
def load_capacitance(c1: ArrayLike, c2: ArrayLike, c_stray: ArrayLike) -> FloatArray:
    """Load capacitance presented to the crystal by a Pierce stage.

    Parameters
    ----------
    c1 : ArrayLike
        Capacitor from the amplifier input to ground, F.
    c2 : ArrayLike
        Capacitor from the amplifier output to ground, F.
    c_stray : ArrayLike
        Stray capacitance (pins, traces) in parallel with the crystal, F.

    Returns
    -------
    FloatArray
        ``CL``, F.

    Notes
    -----
    ``CL = C1*C2/(C1 + C2) + Cs``.

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    a = as_float_array(c1)
    b = as_float_array(c2)
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(a * b / (a + b) + as_float_array(c_stray))


@quiet
def equal_caps_for_load(c_load: ArrayLike, c_stray: ArrayLike) -> FloatArray:
    """Value of two equal load capacitors that give a required load capacitance.

    Parameters
    ----------
    c_load : ArrayLike
        Load capacitance the crystal is specified for, F.
    c_stray : ArrayLike
        Expected stray capacitance, F.

    Returns
    -------
    FloatArray
        ``C1 = C2``, F; ``nan`` where ``c_load <= c_stray`` (no capacitor value can do it).

    Notes
    -----
    ``C1 = C2 = 2*(CL - Cs)``.

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    diff = as_float_array(c_load) - as_float_array(c_stray)
    return as_float_array(np.where(diff > 0.0, 2.0 * diff, np.nan))


@quiet
def load_offset_ppm(c_motional: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike) -> FloatArray:
    """Offset of the load-resonant frequency above the series resonance, ppm.

    Parameters
    ----------
    c_motional : ArrayLike
        Motional capacitance ``Cm``, F.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance ``CL``, F.

    Returns
    -------
    FloatArray
        ``(fL - fs)/fs`` in ppm (first order).

    Notes
    -----
    ``1e6*Cm/(2*(C0 + CL))``, the first-order expansion of
    ``sqrt(1 + Cm/(C0 + CL))``.

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    total = as_float_array(c_shunt) + as_float_array(c_load)
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(1e6 * as_float_array(c_motional) / (2.0 * total))


@quiet
def pulling_ppm(
    c_motional: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike, c_load_ref: ArrayLike
) -> FloatArray:
    """Frequency offset of a crystal run at ``c_load`` instead of its calibration load.

    Parameters
    ----------
    c_motional : ArrayLike
        Motional capacitance ``Cm``, F.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance actually presented, F.
    c_load_ref : ArrayLike
        Load capacitance the crystal was calibrated at, F.

    Returns
    -------
    FloatArray
        Offset in ppm; positive means the oscillator runs fast (load too small).

    Notes
    -----
    ``1e6*(Cm/2)*(1/(C0 + CL) - 1/(C0 + CL_ref))`` (first order in ``Cm/(C0 + CL)``).

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    return as_float_array(
        load_offset_ppm(c_motional, c_shunt, c_load)
        - load_offset_ppm(c_motional, c_shunt, c_load_ref)
    )


@quiet
def pull_sensitivity_ppm_per_pf(
    c_motional: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike
) -> FloatArray:
    """Trim sensitivity: change of frequency per picofarad of load, ppm/pF.

    Parameters
    ----------
    c_motional : ArrayLike
        Motional capacitance ``Cm``, F.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance ``CL``, F.

    Returns
    -------
    FloatArray
        ``d(ppm)/d(CL)`` per pF (negative: more load, lower frequency).

    Notes
    -----
    ``S = -1e6*Cm/(2*(C0 + CL)**2) * 1e-12``.

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    total = as_float_array(c_shunt) + as_float_array(c_load)
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(-1e6 * as_float_array(c_motional) / (2.0 * total**2) * 1e-12)


@quiet
def load_resonance_exact(
    f_series: ArrayLike, c_motional: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike
) -> FloatArray:
    """Exact load-resonant frequency of the lossless Butterworth-Van Dyke model.

    Parameters
    ----------
    f_series : ArrayLike
        Series-resonant frequency ``fs``, Hz.
    c_motional : ArrayLike
        Motional capacitance ``Cm``, F.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance ``CL`` in series with the crystal, F.

    Returns
    -------
    FloatArray
        ``fL``, Hz.

    Notes
    -----
    ``L = 1/((2*pi*fs)**2*Cm)`` and
    ``fL = 1/(2*pi*sqrt(L*Cm*(C0 + CL)/(Cm + C0 + CL)))``, i.e. the motional ``L``
    resonating with ``Cm`` in series with ``C0 + CL``.

    References
    ----------
    Butterworth-Van Dyke equivalent circuit of a quartz resonator, series/parallel
    resonance of an LC network (any circuit-theory handbook).
    """
    fs = as_float_array(f_series)
    cm = as_float_array(c_motional)
    ct = as_float_array(c_shunt) + as_float_array(c_load)
    with np.errstate(divide="ignore", invalid="ignore"):
        inductance = 1.0 / ((_TWO_PI * fs) ** 2 * cm)
        c_eff = cm * ct / (cm + ct)
        return as_float_array(1.0 / (_TWO_PI * np.sqrt(inductance * c_eff)))


@quiet
def critical_gm(esr: ArrayLike, f: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike) -> FloatArray:
    """Transconductance at which a Pierce stage just sustains oscillation.

    Parameters
    ----------
    esr : ArrayLike
        Crystal equivalent series resistance, ohm.
    f : ArrayLike
        Oscillation frequency, Hz.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance ``CL``, F.

    Returns
    -------
    FloatArray
        ``gm_crit``, A/V.

    Notes
    -----
    ``gm_crit = 4*ESR*(2*pi*f)**2*(C0 + CL)**2``.  Exact (to first order in ESR) for
    equal load capacitors; see :func:`critical_gm_caps` for unequal ones.

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    w = _TWO_PI * as_float_array(f)
    total = as_float_array(c_shunt) + as_float_array(c_load)
    return as_float_array(4.0 * as_float_array(esr) * w**2 * total**2)


@quiet
def critical_gm_caps(
    esr: ArrayLike, f: ArrayLike, c_shunt: ArrayLike, c1: ArrayLike, c2: ArrayLike
) -> FloatArray:
    """Critical transconductance for possibly unequal load capacitors.

    Parameters
    ----------
    esr : ArrayLike
        Crystal equivalent series resistance, ohm.
    f : ArrayLike
        Oscillation frequency, Hz.
    c_shunt : ArrayLike
        Shunt capacitance ``C0`` (include stray across the crystal here), F.
    c1 : ArrayLike
        Total capacitance from the amplifier input to ground, F.
    c2 : ArrayLike
        Total capacitance from the amplifier output to ground, F.

    Returns
    -------
    FloatArray
        ``gm_crit``, A/V.

    Notes
    -----
    With ``CL = C1*C2/(C1 + C2)``:
    ``gm_crit = ESR*(2*pi*f)**2*(C0 + CL)**2*(C1 + C2)**2/(C1*C2)``.  It follows from the
    small-signal loop: the stage presents ``Z = (gm + j*w*(C1 + C2))/(w**2*C1*C2)`` to the
    crystal, and the crystal's terminal resistance at load resonance is
    ``ESR*((C0 + CL)/CL)**2``.  Equal capacitors give ``4*ESR*w**2*(C0 + CL)**2``.

    References
    ----------
    Derived here from nodal analysis of the Pierce stage with the Butterworth-Van Dyke
    crystal model (first order in ESR); agrees with published crystal-oscillator design
    application notes for equal capacitors.
    """
    w = _TWO_PI * as_float_array(f)
    a = as_float_array(c1)
    b = as_float_array(c2)
    with np.errstate(divide="ignore", invalid="ignore"):
        cl = a * b / (a + b)
        total = as_float_array(c_shunt) + cl
        return as_float_array(as_float_array(esr) * w**2 * total**2 * (a + b) ** 2 / (a * b))


@quiet
def gain_margin(gm: ArrayLike, gm_crit: ArrayLike) -> FloatArray:
    """Gain margin of a Pierce oscillator.

    Parameters
    ----------
    gm : ArrayLike
        Available transconductance of the amplifier, A/V.
    gm_crit : ArrayLike
        Critical transconductance from :func:`critical_gm`, A/V.

    Returns
    -------
    FloatArray
        ``gm/gm_crit`` (dimensionless).

    Notes
    -----
    ``margin = gm/gm_crit``; at least 5 is the usual design target for reliable
    start-up over life and temperature.

    References
    ----------
    Published crystal-oscillator design application notes; the target of 5 is common
    practice.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(as_float_array(gm) / as_float_array(gm_crit))


@quiet
def drive_level(
    esr: ArrayLike, f: ArrayLike, c_shunt: ArrayLike, c_load: ArrayLike, v_pp: ArrayLike
) -> FloatArray:
    """Power dissipated in the crystal for a given voltage swing across it.

    Parameters
    ----------
    esr : ArrayLike
        Crystal equivalent series resistance, ohm.
    f : ArrayLike
        Oscillation frequency, Hz.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c_load : ArrayLike
        Load capacitance ``CL``, F.
    v_pp : ArrayLike
        Peak-to-peak sine voltage across the crystal, V.

    Returns
    -------
    FloatArray
        Drive level, W.

    Notes
    -----
    ``I_rms = 2*pi*f*(C0 + CL)*v_pp/(2*sqrt(2))`` and ``DL = ESR*I_rms**2``.  The
    application-note form was recalled from memory; it is confirmed by the
    Butterworth-Van Dyke model: at load resonance the crystal terminals look like
    ``1/(w*CL)`` of inductive reactance, so the motional-arm current is the terminal
    current plus the shunt current, ``w*(C0 + CL)*V``.  First order in ESR: terms of
    order ``(ESR*w*(C0 + CL))**2`` are neglected (well under 1 % for usual crystals).

    References
    ----------
    Published crystal-oscillator design application notes (from memory), confirmed
    with the Butterworth-Van Dyke model.
    """
    w = _TWO_PI * as_float_array(f)
    total = as_float_array(c_shunt) + as_float_array(c_load)
    i_rms = w * total * as_float_array(v_pp) / (2.0 * np.sqrt(2.0))
    return as_float_array(as_float_array(esr) * i_rms**2)


@quiet
def crystal_swing(c1: ArrayLike, c2: ArrayLike, v_out_pp: ArrayLike) -> FloatArray:
    """Peak-to-peak voltage across the crystal for a given swing at the amplifier output.

    Parameters
    ----------
    c1 : ArrayLike
        Capacitor from the amplifier input to ground, F.
    c2 : ArrayLike
        Capacitor from the amplifier output to ground, F.
    v_out_pp : ArrayLike
        Peak-to-peak sine voltage at the amplifier output node, V.

    Returns
    -------
    FloatArray
        ``V_x = v_out_pp*(1 + C2/C1)``, V (twice the output swing for equal capacitors).

    Notes
    -----
    At load resonance one loop current ``I`` flows through ``C2``, the crystal and
    ``C1`` (the amplifier input draws nothing): ``V_out = I/(w*C2)``,
    ``V_in = I/(w*C1)`` in opposite phase, so the crystal (with the stray across it)
    sees ``V_in + V_out = V_out*(1 + C2/C1)``.  Exact for the lossless network; the
    crystal's loss adds terms of order ``(ESR*w*(C0 + CL))**2``.

    References
    ----------
    Published crystal-oscillator design application notes (the Pierce loop, from
    memory); confirmed by nodal analysis of the network (any circuit-theory handbook).
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = as_float_array(c2) / as_float_array(c1)
        return as_float_array(as_float_array(v_out_pp) * (1.0 + ratio))


@quiet
def drive_level_from_output(
    esr: ArrayLike,
    f: ArrayLike,
    c_shunt: ArrayLike,
    c1: ArrayLike,
    c2: ArrayLike,
    c_stray: ArrayLike,
    v_out_pp: ArrayLike,
) -> FloatArray:
    """Power dissipated in the crystal of a Pierce stage for a given output-node swing.

    Parameters
    ----------
    esr : ArrayLike
        Crystal equivalent series resistance, ohm.
    f : ArrayLike
        Oscillation (load-resonant) frequency, Hz.
    c_shunt : ArrayLike
        Shunt capacitance ``C0``, F.
    c1 : ArrayLike
        Capacitor from the amplifier input to ground, F.
    c2 : ArrayLike
        Capacitor from the amplifier output to ground, F.
    c_stray : ArrayLike
        Stray capacitance in parallel with the crystal, F.
    v_out_pp : ArrayLike
        Peak-to-peak sine voltage at the amplifier output node, V (a rail-to-rail
        inverter: the supply).

    Returns
    -------
    FloatArray
        Drive level, W.

    Notes
    -----
    Loop current ``I = w*C2*V_out`` (the amplifier input draws nothing); crystal
    voltage ``V_x = V_out*(1 + C2/C1)`` (:func:`crystal_swing`); at load resonance the
    crystal with the stray across it is inductive, ``1/(w*C1*C2/(C1 + C2))``, so the
    motional current is the loop current plus the current of ``C0 + Cs``:
    ``I_m = w*(C0 + CL)*V_x`` with ``CL = C1*C2/(C1 + C2) + Cs``.  Then
    ``I_m,rms = w*(C0 + CL)*V_out,pp*(1 + C2/C1)/(2*sqrt(2))`` and
    ``DL = ESR*I_m,rms**2``: four times :func:`drive_level` at the output swing for
    equal capacitors.  Exact for the lossless network.  With loss, the network driven
    at its output node carries a smaller motional current: the closed form reads high
    by ``u**2*(1 + k)**2`` to first order, ``u = ESR*w*(C0 + CL)``,
    ``k = (C0 + CL)*(C1 + C2)/C1**2`` (0.2 % to 25 % for usual crystals), and never
    reads low, a safe bound against a drive limit.

    References
    ----------
    Published crystal-oscillator design application notes (the Pierce loop and drive
    level, from memory); confirmed by an exact nodal solution of the network with the
    Butterworth-Van Dyke crystal model (any circuit-theory handbook).
    """
    cl = load_capacitance(c1, c2, c_stray)
    v_x = crystal_swing(c1, c2, v_out_pp)
    return drive_level(esr, f, c_shunt, cl, v_x)


@quiet
def series_resistor(f: ArrayLike, c2: ArrayLike) -> FloatArray:
    """Starting value of the drive-limiting resistor at the amplifier output.

    Parameters
    ----------
    f : ArrayLike
        Oscillation frequency, Hz.
    c2 : ArrayLike
        Output-side load capacitor, F.

    Returns
    -------
    FloatArray
        ``1/(2*pi*f*C2)``, ohm.

    Notes
    -----
    The resistor equal to the reactance of ``C2`` forms a first-order low-pass that
    halves the drive power; adjust on the bench (it also lowers the gain margin).

    References
    ----------
    Published crystal-oscillator design application notes.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(1.0 / (_TWO_PI * as_float_array(f) * as_float_array(c2)))


@quiet
def tuning_fork_ppm(
    temp_c: ArrayLike, turnover_c: ArrayLike = 25.0, k_ppm_per_k2: ArrayLike = -0.034
) -> FloatArray:
    """Frequency deviation of a 32.768 kHz tuning-fork crystal with temperature.

    Parameters
    ----------
    temp_c : ArrayLike
        Temperature, degC.
    turnover_c : ArrayLike, optional
        Turnover temperature, degC.  Default 25.
    k_ppm_per_k2 : ArrayLike, optional
        Parabolic coefficient, ppm/K^2.  Default -0.034.

    Returns
    -------
    FloatArray
        Deviation, ppm (never positive for the default coefficient).

    Notes
    -----
    ``df/f = k*(T - T0)**2``.

    References
    ----------
    Tuning-fork crystal datasheets (generic device class).
    """
    dt = as_float_array(temp_c) - as_float_array(turnover_c)
    return as_float_array(as_float_array(k_ppm_per_k2) * dt**2)


@quiet
def budget_worst_case(*terms_ppm: ArrayLike) -> FloatArray:
    """Guaranteed frequency error: sum of the magnitudes of all terms.

    Parameters
    ----------
    *terms_ppm : ArrayLike
        Error terms, ppm (calibration, temperature, ageing, load mismatch...).

    Returns
    -------
    FloatArray
        ``sum(|term|)``, ppm (0 for no terms).

    Notes
    -----
    Linear sum of magnitudes: a bound that holds whatever the signs.

    References
    ----------
    Common practice for frequency budgets.
    """
    total = as_float_array(0.0)
    for term in terms_ppm:
        total = as_float_array(total + np.abs(as_float_array(term)))
    return total


@quiet
def budget_rss(*terms_ppm: ArrayLike) -> FloatArray:
    """Statistical frequency error: root sum of squares of all terms.

    Parameters
    ----------
    *terms_ppm : ArrayLike
        Independent error terms, ppm.

    Returns
    -------
    FloatArray
        ``sqrt(sum(term**2))``, ppm (0 for no terms).

    Notes
    -----
    Valid for independent terms; correlated ones (one part's temperature drift and its
    ageing, say) should be added linearly first.

    References
    ----------
    Common practice for frequency budgets; root-sum-square combination as in the GUM
    (JCGM 100) law of propagation for uncorrelated inputs.
    """
    total = as_float_array(0.0)
    for term in terms_ppm:
        # hypot avoids underflow and overflow of the squares.
        total = as_float_array(np.hypot(total, as_float_array(term)))
    return total
