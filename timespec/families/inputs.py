"""The varying inputs of a design: part, operating-condition and timer-class factors.

Each helper builds :class:`~timespec.analysis.Factor` objects for one source of
variation, or applies sampled factors to a value, so each family states only
its own physics.  Temperature and supply are single shared factors, so parts
are correlated through them.
"""

from __future__ import annotations

import numpy as np

from timespec.analysis import Factor
from timespec.families.capacitors import class2_losses
from timespec.families.protocol import FloatArray, Inputs
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts import dielectrics
from timespec.parts.part import Part

__all__ = [
    "REFERENCE_C",
    "apply_part",
    "condition_factors",
    "drain_current",
    "part_factors",
    "scaled_time",
    "supply_nominal_factor",
    "threshold_current",
    "timer_factors",
]

REFERENCE_C = 25.0  # °C, where tolerances and tempcos are referred to
#: A tempco raises its part's value above the reference temperature, lowers it below.
_TEMPCO_PIVOT = ("temp", REFERENCE_C)


def _tol_distribution(block: Block) -> tuple[str, float]:
    return block.statistics.distribution, block.statistics.sigmas


def part_factors(block: Block, part: Part) -> list[Factor]:
    """Factors of one part: its value (fixed), tolerance, temperature and ageing.

    Parameters
    ----------
    block
        The block (for the ambient range, life and spread).
    part
        The part.

    Returns
    -------
    list of Factor
        ``<ref>.value`` (fixed), ``<ref>.tol``, and ``<ref>.tc`` (linear tempco,
        ppm/K, multiplied by the temperature offset) or ``<ref>.drift`` (class 2
        and electrolytic envelope), ``<ref>.age`` where a life and an ageing
        rate are given (for class 2 ceramics also their logarithmic ageing), and
        ``<ref>.bias`` (class 2 DC-bias loss, ``−bound…0``).

    Notes
    -----
    Class 2 ceramics (see :func:`timespec.families.capacitors.class2_losses`): the
    ageing factor spans ``−max(stated·years, rate·log10(t_life / 24 h))…+stated·years``
    (both bound the same drift, so they are not added), and the DC-bias factor
    ``−L(V_supply,max / V_rated)…0``; both are one-sided losses whose zero end is a new
    part (or no bias), so a part just after assembly is covered too.

    The tempco is a factor of its own and the temperature is shared by all
    parts, so parts of one board see one temperature (a systematic, correlated
    effect), while each part's coefficient varies within its band.

    Every factor but the value reaches the model only through :func:`apply_part`
    and says so (``through`` the part's reference, the tempco turning at 25 °C), so
    the worst-case search ties them (``through`` of :class:`timespec.analysis.Factor`).
    """
    dist, sigmas = _tol_distribution(block)
    ref = part.ref
    out = [
        Factor(
            f"{ref}.value", f"{ref} value", part.value, part.value, part.value, "fixed", group=ref
        ),
        Factor(
            f"{ref}.tol",
            f"{ref} tolerance (±{part.tolerance * 100:g} %)",
            0.0,
            -part.tolerance,
            part.tolerance,
            dist,  # type: ignore[arg-type]
            sigmas,
            group=ref,
            through=ref,
        ),
    ]
    cond = block.conditions
    span = cond.ambient_high > REFERENCE_C or cond.ambient_low < REFERENCE_C
    if part.kind == "resistance":
        tc = part.tempco_ppm or 0.0
        out.append(
            Factor(
                f"{ref}.tc",
                f"{ref} tempco (±{tc:g} ppm/K)",
                0.0,
                -tc,
                tc,
                group=ref,
                through=ref,
                pivot=_TEMPCO_PIVOT,
            )
        )
    else:
        assert part.dielectric is not None
        d = dielectrics.dielectric(part.dielectric)
        if d.linear:
            lo, hi = d.tc_ppm_low, d.tc_ppm_high
            mid = min(max(0.0, lo), hi)
            out.append(
                Factor(
                    f"{ref}.tc",
                    f"{ref} {d.name} tempco ({lo:g}…{hi:g} ppm/K)",
                    mid,
                    lo,
                    hi,
                    group=ref,
                    through=ref,
                    pivot=_TEMPCO_PIVOT,
                )
            )
        elif span:
            lo, hi = d.drift_low, d.drift_high
            out.append(
                Factor(
                    f"{ref}.drift",
                    f"{ref} {d.name} change over temperature ({lo * 100:+g}…{hi * 100:+g} %)",
                    0.0,
                    lo,
                    hi,
                    group=ref,
                    through=ref,
                )
            )
    age = part.ageing * cond.life_years
    losses = class2_losses(block, part) if part.kind == "capacitance" else None
    # A class 2 ceramic's logarithmic ageing and a stated ageing rate bound the same drift:
    # the loss side takes the larger of the two (never their sum), the gain side the stated.
    age_low = max(age, losses.ageing) if losses is not None else age
    if age_low > 0 or age > 0:
        if losses is not None and losses.ageing > age:
            gain = f"+{age * 100:.3g}" if age > 0 else "0"
            what = (
                f"−{age_low * 100:.3g}…{gain} %, {losses.rate * 100:g} %/decade-hour after reflow"
            )
        else:
            what = f"±{age * 100:.3g} %"
        out.append(
            Factor(
                f"{ref}.age",
                f"{ref} ageing over {cond.life_years:g} years ({what})",
                0.0,
                -age_low,
                age,
                group=ref,
                through=ref,
            )
        )
    if losses is not None and losses.bias > 0:
        out.append(
            Factor(
                f"{ref}.bias",
                f"{ref} DC-bias loss (0…−{losses.bias * 100:.3g} % at "
                f"{format_quantity(losses.volts, 'voltage')} on "
                f"{format_quantity(losses.rated, 'voltage')} rated)",
                0.0,
                -losses.bias,
                0.0,
                group=ref,
                through=ref,
            )
        )
    return out


def apply_part(x: Inputs, ref: str) -> FloatArray:
    """The actual value of a part for samples of its factors and the temperature.

    Parameters
    ----------
    x
        Factor samples (must hold ``<ref>.value``, ``<ref>.tol`` and ``temp``).
    ref
        Part reference.

    Returns
    -------
    FloatArray
        ``value·(1 + tol)·(1 + tc·1e-6·(T − 25))·(1 + drift)·(1 + age)·(1 + bias)``.
    """
    v = x[f"{ref}.value"] * (1.0 + x[f"{ref}.tol"])
    tc = x.get(f"{ref}.tc")
    if tc is not None:
        v = v * (1.0 + tc * 1e-6 * (x["temp"] - REFERENCE_C))
    drift = x.get(f"{ref}.drift")
    if drift is not None:
        v = v * (1.0 + drift)
    age = x.get(f"{ref}.age")
    if age is not None:
        v = v * (1.0 + age)
    bias = x.get(f"{ref}.bias")
    if bias is not None:
        v = v * (1.0 + bias)
    return np.asarray(v, dtype=np.float64)


def condition_factors(block: Block) -> list[Factor]:
    """Operating conditions: ambient temperature and supply voltage.

    Parameters
    ----------
    block
        The block.

    Returns
    -------
    list of Factor
        ``temp`` (°C, uniform over the ambient range, nominal 25 °C clipped into
        it) and ``supply`` (V, uniform over the supply window).

    Notes
    -----
    Monte Carlo draws the operating point uniformly over its range: the yield
    is the share of (unit, operating point) pairs in spec.  Worst-case covers
    every corner regardless.
    """
    c = block.conditions
    t_nom = min(max(REFERENCE_C, c.ambient_low), c.ambient_high)
    s = c.supply
    return [
        Factor(
            "temp",
            f"ambient ({c.ambient_low:g}…{c.ambient_high:g} °C)",
            t_nom,
            c.ambient_low,
            c.ambient_high,
            group="operating",
        ),
        Factor(
            "supply", f"supply ({s.low:g}…{s.high:g} V)", s.centre, s.low, s.high, group="operating"
        ),
    ]


def timer_factors(block: Block, *, leakage: float = 0.0) -> list[Factor]:
    """Factors of a 555-type timer class, and the timing node's leakage.

    Parameters
    ----------
    block
        A one-shot or astable block (``block.timer`` set).
    leakage
        Extra leakage bound at the timing node, A (capacitor and board).

    Returns
    -------
    list of Factor
        ``timer.ratio`` (upper threshold / supply), ``timer.drift`` (ppm/K of
        timing), ``timer.vco`` (timing change per volt away from nominal),
        ``timer.ron`` (discharge on-resistance, Ω), ``timer.ith`` (threshold
        input current, A) and ``leak`` (A).
    """
    t = block.timer
    assert t is not None
    i_th = threshold_current(block)
    k_lo, k_hi = t.ratio_band
    k_nom = min(max(2.0 / 3.0, k_lo), k_hi)
    out = [
        Factor(
            "timer.ratio",
            f"{t.name} timer threshold ratio (±{t.initial * 100:g} % timing)",
            k_nom,
            k_lo,
            k_hi,
            group="timer",
        ),
        Factor(
            "timer.drift",
            f"{t.name} timer drift (±{t.drift_ppm:g} ppm/K)",
            0.0,
            -t.drift_ppm,
            t.drift_ppm,
            group="timer",
        ),
        Factor(
            "timer.vco",
            f"{t.name} timer supply sensitivity (±{t.supply_drift * 100:g} %/V)",
            0.0,
            -t.supply_drift,
            t.supply_drift,
            group="timer",
        ),
        Factor(
            "timer.ron",
            f"{t.name} discharge on-resistance (0…{t.r_on_max:.3g} Ω)",
            0.4 * t.r_on_max,
            0.0,
            t.r_on_max,
            group="timer",
        ),
        Factor(
            "timer.ith",
            f"{t.name} threshold input current (0…{format_quantity(i_th, 'current')})",
            0.4 * i_th,
            0.0,
            i_th,
            group="timer",
        ),
    ]
    if leakage > 0:
        out.append(
            Factor(
                "leak",
                f"node leakage (0…{format_quantity(leakage, 'current')})",
                0.0,
                0.0,
                leakage,
                group="leakage",
            )
        )
    return out


def threshold_current(block: Block) -> float:
    """The timer's threshold-current bound over the block's ambient range, A.

    Parameters
    ----------
    block
        A one-shot or astable block (``block.timer`` set).

    Returns
    -------
    float
        :meth:`~timespec.parts.devices.TimerClass.threshold_current_max`: the class
        bound, widened where the ambient leaves the range it is quoted over.
    """
    t = block.timer
    assert t is not None
    c = block.conditions
    return t.threshold_current_max(c.ambient_low, c.ambient_high)


def scaled_time(x: Inputs, t: FloatArray) -> FloatArray:
    """Apply the timer class's temperature and supply drift to a time.

    Parameters
    ----------
    x
        Factor samples (``timer.drift``, ``timer.vco``, ``temp``, ``supply``,
        and the nominal supply in ``supply.nominal``).
    t
        Times from the ideal circuit.

    Returns
    -------
    FloatArray
        ``t·(1 + drift·1e-6·(T − 25))·(1 + vco·(V − V_nom))``.
    """
    out = t * (1.0 + x["timer.drift"] * 1e-6 * (x["temp"] - REFERENCE_C))
    out = out * (1.0 + x["timer.vco"] * (x["supply"] - x["supply.nominal"]))
    return np.asarray(out, dtype=np.float64)


def supply_nominal_factor(block: Block) -> Factor:
    """The nominal supply as a fixed factor (the reference of the supply drift).

    Parameters
    ----------
    block
        The block.

    Returns
    -------
    Factor
        ``supply.nominal``, fixed.
    """
    v = block.conditions.supply.centre
    return Factor("supply.nominal", "nominal supply", v, v, v, "fixed", group="operating")


def drain_current(x: Inputs) -> FloatArray:
    """Total current drawn from a timing node: threshold input current plus leakage.

    Parameters
    ----------
    x
        Factor samples.

    Returns
    -------
    FloatArray
        A.
    """
    i = x.get("timer.ith", np.zeros(1)) + x.get("leak", np.zeros(1))
    return np.asarray(i, dtype=np.float64)
