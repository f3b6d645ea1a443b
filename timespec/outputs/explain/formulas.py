"""The formula each family computes, and its named terms, evaluated by the family's own code.

For every block kind a *formula* gives the lines a reviewer reads (the law the
family's ``evaluate`` applies, with strays, delays, drains and the timer's drift
written out) and a function that returns the value of every symbol of those
lines for factor samples.  Each symbol is computed by the same helper the family
uses (:func:`~timespec.families.inputs.apply_part`,
:func:`~timespec.families.inputs.drain_current`,
:func:`~timespec.families.inputs.scaled_time`, the variant's ``half_periods``,
the functions of :mod:`timespec.physics`), never by a second copy of the
physics; the output itself is always taken from the family's ``evaluate``
(see :mod:`timespec.outputs.explain.derive`).  The tests recompute every output
from the printed symbols with plain math, so these lines cannot drift from the
model unnoticed.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from timespec.families.astable import classic, diode, feedback
from timespec.families.crystal.settings import MIN_GAIN_MARGIN, PPM, needed
from timespec.families.inputs import REFERENCE_C, apply_part, drain_current, scaled_time
from timespec.families.protocol import FloatArray, Inputs
from timespec.families.schmitt import threshold_centre, thresholds, width_knots
from timespec.model import Block
from timespec.parts.part import Design, Part
from timespec.physics import astable as astable_physics
from timespec.physics import monostable, pierce, rcdelay, relaxation

__all__ = ["Formula", "Term", "formula", "part_line"]

Values = Callable[[Inputs], dict[str, FloatArray]]


@dataclass(frozen=True)
class Term:
    """One symbol of a formula.

    Attributes
    ----------
    symbol
        As written in the formula lines (``"R"``, ``"VT+"``).
    meaning
        What it is, in words.
    kind
        Kind of quantity for formatting (:data:`timespec.units.KINDS`), ``"ppm/K"``
        for a temperature coefficient, ``None`` for a plain number.
    """

    symbol: str
    meaning: str
    kind: str | None


@dataclass(frozen=True)
class Formula:
    """The law a family applies, as lines, symbols and their values.

    Attributes
    ----------
    heads
        Output name → the line that gives it (``"width = s·t_c + t_pd"``).
    lines
        The equations the heads rest on, in reading order (``"a = b·c"``; several
        on one line are separated by ``";  "``).
    terms
        Every symbol of the lines, in the order to list them.
    values
        Factor samples → symbol → values (the family's own helpers).
    notes
        Words on the parts of the law that are not written as an equation here.
    """

    heads: Mapping[str, str]
    lines: tuple[str, ...]
    terms: tuple[Term, ...]
    values: Values
    notes: tuple[str, ...] = ()


_ZERO = np.zeros(1)


def _f(a: object) -> FloatArray:
    return np.asarray(a, dtype=np.float64)


def part_line(part: Part, factor_names: frozenset[str]) -> str:
    """The line that turns a part's nominal value into its value at a corner.

    Parameters
    ----------
    part
        The part.
    factor_names
        Names of the design's factors (which terms the part has).

    Returns
    -------
    str
        E.g. ``"R = R.value·(1 + R.tol)·(1 + R.tc·1e-6·(T − 25 °C))·(1 + R.age)"``,
        the product :func:`~timespec.families.inputs.apply_part` forms.
    """
    ref = part.ref
    out = f"{ref} = {ref}.value·(1 + {ref}.tol)"
    if f"{ref}.tc" in factor_names:
        out += f"·(1 + {ref}.tc·1e-6·(T − {REFERENCE_C:g} °C))"
    for extra in ("drift", "age", "bias"):
        if f"{ref}.{extra}" in factor_names:
            out += f"·(1 + {ref}.{extra})"
    return out


# --------------------------------------------------------------------------
# shared pieces of the 555-type timer

_SCALE_LINE = f"s = (1 + a·1e-6·(T − {REFERENCE_C:g} °C))·(1 + b·(V − V_nom))"
_TIMER_TERMS = (
    Term("T", "ambient temperature", "temperature"),
    Term("a", "timer class timing drift", "ppm/K"),
    Term("b", "timer class timing change per volt of supply", None),
    Term("V_nom", "nominal supply", "voltage"),
    Term("s", "timer drift factor (applied to the whole timing)", None),
)


def _timer_values(x: Inputs) -> dict[str, FloatArray]:
    ones = np.ones_like(_f(x["supply"]))
    return {
        "T": _f(x["temp"]),
        "a": _f(x["timer.drift"]),
        "b": _f(x["timer.vco"]),
        "V_nom": _f(x["supply.nominal"]),
        "s": scaled_time(x, ones),
    }


def _oneshot(block: Block, design: Design) -> Formula:
    forced = block.window("control") is not None
    vth = "Vc" if forced else "k·V"
    lines = (
        f"t_c = R·(C + Cs)·ln((V' − v0)/(V' − {vth}))",
        "V' = V − i·R",
        "v0 = V·r_on/(R + r_on) − i·R·r_on/(R + r_on)",
        _SCALE_LINE,
    )
    terms = (
        Term("R", "timing resistor at this corner", "resistance"),
        Term("C", "timing capacitor at this corner", "capacitance"),
        Term("Cs", "timer pins and board stray on the timing node", "capacitance"),
        Term("V", "supply", "voltage"),
        Term("Vc", "voltage forced on the control pin", "voltage")
        if forced
        else Term("k", "upper threshold as a fraction of the supply", None),
        Term("r_on", "discharge transistor on-resistance", "resistance"),
        Term("i", "current drawn from the node (threshold input plus leakage)", "current"),
        Term("V'", "charging target less the drain through R", "voltage"),
        Term("v0", "capacitor voltage held by the discharge transistor", "voltage"),
        Term("t_c", "charge time from v0 to the threshold", "time"),
        *_TIMER_TERMS,
        Term("t_pd", "timer delay from the threshold crossing to the output edge", "time"),
    )

    def values(x: Inputs) -> dict[str, FloatArray]:
        r = apply_part(x, "R")
        c = apply_part(x, "C")
        cs = _f(x.get("stray", _ZERO))
        v = _f(x["supply"])
        i = drain_current(x)
        ron = _f(x["timer.ron"])
        out = {"R": r, "C": c, "Cs": cs, "V": v, "r_on": ron, "i": i}
        if forced:
            out["Vc"] = _f(x["control"])
            t_c = monostable.width_control(r, c + cs, v, x["control"], ron, i)
        else:
            out["k"] = _f(x["timer.ratio"])
            t_c = monostable.width(r, c + cs, v, x["timer.ratio"], ron, i)
        out["V'"] = rcdelay.effective_target(v, r, i)
        out["v0"] = monostable.start_voltage(v, r, ron, i)
        out["t_c"] = t_c
        out.update(_timer_values(x))
        out["t_pd"] = _f(x.get("timer.delay", _ZERO))
        return out

    return Formula({"width": "width = s·t_c + t_pd"}, lines, terms, values)


_ASTABLE_HEADS = {
    "frequency": "frequency = 1/(s·(tH + tL))",
    "period": "period = s·(tH + tL)",
    "duty": "duty = tH/(tH + tL)",
    "high": "high = s·tH",
    "low": "low = s·tL",
}

_HALF_PERIODS: Mapping[str, Callable[[Inputs], tuple[FloatArray, FloatArray]]] = {
    "classic": classic.half_periods,
    "diode": diode.half_periods,
    "feedback": feedback.half_periods,
}


def _astable(block: Block, design: Design) -> Formula:
    variant = design.variant
    half = _HALF_PERIODS[variant]
    common = (
        Term("C", "timing capacitor at this corner", "capacitance"),
        Term("Cs", "timer pins and board stray on the timing node", "capacitance"),
        Term("V", "supply", "voltage"),
        Term("k", "upper threshold as a fraction of the supply (lower: k/2)", None),
        Term("i", "current drawn from the node (threshold input plus leakage)", "current"),
        Term("t_pd", "timer delay from a threshold crossing to the switching", "time"),
    )
    notes: tuple[str, ...] = ()
    if variant == "classic":
        lines: tuple[str, ...] = (
            "tH = t_pd + (RA + RB)·(C + Cs)·ln((Vc' − v_bot)/(Vc' − k·V))",
            "tL = t_pd + (RB + r_n)·(C + Cs)·ln((Vd' − v_top)/(Vd' − k·V/2))",
            "Vc' = V − i·(RA + RB);  Vd' = v_n − i·(RB + r_n)",
            "v_n = V·r_on/(RA + r_on);  r_n = RA·r_on/(RA + r_on)",
            "v_top = Vc' + (k·V − Vc')·exp(−t_pd/((RA + RB)·(C + Cs)))",
            "v_bot = Vd' + (k·V/2 − Vd')·exp(−t_pd/((RB + r_n)·(C + Cs)))",
            _SCALE_LINE,
        )
        own: tuple[Term, ...] = (
            Term("RA", "resistor from the supply to the discharge pin", "resistance"),
            Term("RB", "resistor from the discharge pin to the capacitor", "resistance"),
            *common,
            Term("r_on", "discharge transistor on-resistance", "resistance"),
            Term("v_n", "discharge pin open-circuit voltage while it sinks", "voltage"),
            Term("r_n", "discharge pin source resistance while it sinks", "resistance"),
            Term("Vc'", "charging target less the drain", "voltage"),
            Term("Vd'", "discharging target less the drain", "voltage"),
            Term("v_top", "turning voltage t_pd past the upper threshold", "voltage"),
            Term("v_bot", "turning voltage t_pd past the lower threshold", "voltage"),
        )
    elif variant == "diode":
        stated = block.window("diode") is not None
        drop = (
            "Vd = V25 + tc·1e-3·(T − 25 °C)"
            if stated
            else "Vd = nVt·ln(1 + I/Is_T), I the charging current at each instant"
        )
        notes = (
            "tH = t_pd + charge of C + Cs through RA toward V − Vd, from k·V/2 (less the "
            f"undershoot) to k·V; {drop}  (families.astable.diode.half_periods)",
            "tL = t_pd + discharge of C + Cs through RB + r_n toward v_n, from k·V (plus the "
            "overshoot) to k·V/2",
        )
        diode_terms: tuple[Term, ...] = (
            (
                Term("V25", "diode drop at 25 °C", "voltage"),
                Term("tc", "diode drop tempco, mV/K", None),
                Term("Vd", "diode drop at this corner's temperature", "voltage"),
            )
            if stated
            else (
                Term("Is_T", "diode saturation current at this corner's temperature", "current"),
                Term("nVt", "emission coefficient times the thermal voltage kT/q", "voltage"),
            )
        )
        lines = (*(("Vd = V25 + tc·1e-3·(T − 25 °C)",) if stated else ()), _SCALE_LINE)
        own = (
            Term("RA", "charging resistor (in series with the steering diode)", "resistance"),
            Term("RB", "discharging resistor", "resistance"),
            *common,
            Term("r_on", "discharge transistor on-resistance", "resistance"),
            *diode_terms,
        )
    else:
        notes = (
            "tH = t_pd + charge of C + Cs through R + R_oh toward V − V_drop, from k·V/2 "
            "(less the undershoot) to k·V  (families.astable.feedback.half_periods)",
            "tL = t_pd + discharge of C + Cs through R + R_ol toward V_ol, from k·V (plus "
            "the overshoot) to k·V/2",
        )
        lines = (_SCALE_LINE,)
        own = (Term("R", "timing resistor from the output", "resistance"), *common)
    terms = (
        *own,
        Term("tH", "high time before the timer's drift", "time"),
        Term("tL", "low time before the timer's drift", "time"),
        *_TIMER_TERMS,
    )

    def values(x: Inputs) -> dict[str, FloatArray]:
        v = _f(x["supply"])
        k = _f(x["timer.ratio"])
        i = drain_current(x)
        c = apply_part(x, "C")
        cs = _f(x.get("stray", _ZERO))
        td = _f(x.get("timer.delay", _ZERO))
        out = {"C": c, "Cs": cs, "V": v, "k": k, "i": i, "t_pd": td}
        if variant == "feedback":
            out["R"] = apply_part(x, "R")
        else:
            ra, rb = apply_part(x, "RA"), apply_part(x, "RB")
            ron = _f(x["timer.ron"])
            out.update({"RA": ra, "RB": rb, "r_on": ron})
        if variant == "classic":
            v_n, r_n = astable_physics.discharge_node(v, out["RA"], out["r_on"])
            r_ch = out["RA"] + out["RB"]
            r_dis = out["RB"] + r_n
            ct = c + cs
            out["v_n"], out["r_n"] = v_n, r_n
            out["Vc'"] = rcdelay.effective_target(v, r_ch, i)
            out["Vd'"] = rcdelay.effective_target(v_n, r_dis, i)
            out["v_top"] = rcdelay.threshold_from_time(td, r_ch, ct, v, k * v, i)
            out["v_bot"] = rcdelay.threshold_from_time(td, r_dis, ct, v_n, 0.5 * k * v, i)
        if variant == "diode":
            temp = _f(x["temp"])
            if "diode.v25" in x:
                out["V25"], out["tc"] = _f(x["diode.v25"]), _f(x["diode.tc"])
                out["Vd"] = astable_physics.diode_forward_voltage(
                    x["diode.v25"], x["diode.tc"], temp
                )
            else:
                out["Is_T"] = astable_physics.diode_saturation_current(
                    x["diode.is"], x["diode.n"], temp, diode.DIODE.eg, diode.DIODE.xti
                )
                out["nVt"] = _f(x["diode.n"]) * astable_physics.thermal_voltage(temp)
        t_h, t_l = half(x)
        out["tH"], out["tL"] = _f(t_h), _f(t_l)
        out.update(_timer_values(x))
        return out

    return Formula(_ASTABLE_HEADS, lines, terms, values, notes)


def _delay(block: Block, design: Design) -> Formula:
    win = block.window("threshold")
    ratio = win is not None and win.kind == "ratio"
    start = block.number("start") or 0.0
    gated = block.gate is not None
    lines = (
        "t_c = R·(C + Cs)·ln((V' − V0)/(V' − Vth))",
        "V' = V − i·R",
        *(("Vth = k·V",) if ratio else ()),
    )
    terms = (
        Term("R", "resistor at this corner", "resistance"),
        Term("C", "capacitor at this corner", "capacitance"),
        Term("Cs", "input pin and board stray on the node", "capacitance"),
        Term("V", "supply (the charging target)", "voltage"),
        *((Term("k", "input threshold as a fraction of the supply", None),) if ratio else ()),
        Term("Vth", "input threshold", "voltage"),
        Term("V0", "capacitor voltage at the start", "voltage"),
        Term("i", "leakage drawn from the node (either sign)", "current"),
        Term("V'", "charging target less the leakage through R", "voltage"),
        Term("t_c", "charge time from V0 to the threshold", "time"),
        *((Term("t_pd", "gate propagation delay", "time"),) if gated else ()),
    )

    def values(x: Inputs) -> dict[str, FloatArray]:
        r = apply_part(x, "R")
        c = apply_part(x, "C")
        cs = _f(x["stray"])
        v = _f(x["supply"])
        i = _f(x.get("leak", _ZERO)) * np.ones_like(v)
        vth = x["threshold"] * v if ratio else _f(x["threshold"])
        out = {"R": r, "C": c, "Cs": cs, "V": v, "Vth": _f(vth), "i": i}
        if ratio:
            out["k"] = _f(x["threshold"])
        out["V0"] = np.full_like(v, start)
        out["V'"] = rcdelay.effective_target(v, r, i)
        out["t_c"] = rcdelay.charge_time(r, c + cs, v, start, vth, i)
        if gated:
            out["t_pd"] = _f(x["gate.delay"])
        return out

    head = "delay = t_c + t_pd" if gated else "delay = t_c"
    return Formula({"delay": head}, lines, terms, values)


def _relaxation(block: Block, design: Design) -> Formula:
    th = thresholds(block)
    us, ws = width_knots(th)
    lines = (
        "tH = t_pd + R·(C + Cs)·ln((Vh' − v_bot)/(Vh' − VT+))",
        "tL = t_pd + R·(C + Cs)·ln((v_top − Vl')/(VT− − Vl'))",
        "Vh' = V − i·R;  Vl' = −i·R",
        "v_top = Vh' + (VT+ − Vh')·exp(−t_pd/(R·(C + Cs)))",
        "v_bot = Vl' + (VT− − Vl')·exp(−t_pd/(R·(C + Cs)))",
        "VT+ = (m + w/2)·V;  VT− = (m − w/2)·V",
    )
    notes = (
        "w = the gate class's hysteresis at position u of its band; m = the threshold "
        "centre at position g of its range at that w, shifted by i·R/V "
        "(families.schmitt.threshold_centre)",
    )
    terms = (
        Term("R", "feedback resistor at this corner", "resistance"),
        Term("C", "timing capacitor at this corner", "capacitance"),
        Term("Cs", "input pin and board stray on the node", "capacitance"),
        Term("V", "supply", "voltage"),
        Term("i", "leakage drawn from the node (either sign)", "current"),
        Term("u", "position in the class's hysteresis band (0…1)", None),
        Term("g", "position in the class's threshold-centre range (−1…1)", None),
        Term("w", "hysteresis VT+ − VT− as a fraction of the supply", None),
        Term("m", "threshold centre as a fraction of the supply", None),
        Term("VT+", "rising input threshold", "voltage"),
        Term("VT−", "falling input threshold", "voltage"),
        Term("Vh'", "charging target less the leakage through R", "voltage"),
        Term("Vl'", "discharging target less the leakage through R", "voltage"),
        Term("v_top", "turning voltage t_pd past VT+", "voltage"),
        Term("v_bot", "turning voltage t_pd past VT−", "voltage"),
        Term("t_pd", "gate propagation delay", "time"),
        Term("tH", "output-high time", "time"),
        Term("tL", "output-low time", "time"),
    )

    def values(x: Inputs) -> dict[str, FloatArray]:
        r = apply_part(x, "R")
        c = apply_part(x, "C")
        cs = _f(x["stray"])
        v = _f(x["supply"])
        i = _f(x["leak"]) * np.ones_like(v)
        w = _f(np.interp(x["gate.hysteresis"], us, ws))
        m = _f(threshold_centre(th, w, x["gate.centre"], i * r / v))
        vt_p, vt_m = (m + 0.5 * w) * v, (m - 0.5 * w) * v
        td = _f(x["gate.delay"])
        ct = c + cs
        t_h, t_l = relaxation.delayed_times(r, ct, v, 0.0, vt_p, vt_m, td, i)
        return {
            "R": r,
            "C": c,
            "Cs": cs,
            "V": v,
            "i": i,
            "u": _f(x["gate.hysteresis"]),
            "g": _f(x["gate.centre"]),
            "w": w,
            "m": m,
            "VT+": _f(vt_p),
            "VT−": _f(vt_m),
            "Vh'": rcdelay.effective_target(v, r, i),
            "Vl'": rcdelay.effective_target(np.zeros_like(v), r, i),
            "v_top": rcdelay.threshold_from_time(td, r, ct, v, vt_p, i),
            "v_bot": rcdelay.threshold_from_time(td, r, ct, 0.0, vt_m, i),
            "t_pd": td,
            "tH": _f(t_h),
            "tL": _f(t_l),
        }

    heads = {
        "frequency": "frequency = 1/(tH + tL)",
        "period": "period = tH + tL",
        "duty": "duty = tH/(tH + tL)",
        "high": "high = tH",
        "low": "low = tL",
    }
    return Formula(heads, lines, terms, values, notes)


def _crystal(block: Block, design: Design) -> Formula:
    f = needed(block, "frequency")
    cl_spec = needed(block, "load")
    c0 = needed(block, "shunt")
    cm = needed(block, "motional")
    esr = needed(block, "esr")
    gm = block.number("gm")
    swing = block.number("swing")
    lines = (
        "CL = C1·C2/(C1 + C2) + Cs",
        "pulling = (Cm/2)·(1/(C0 + CL) − 1/(C0 + CL_spec))",
        "gm_crit = ESR·(2π·f)²·(C0 + Cs + C1·C2/(C1 + C2))²·(C1 + C2)²/(C1·C2)",
    )
    terms = (
        Term("C1", "input-side load capacitor at this corner", "capacitance"),
        Term("C2", "output-side load capacitor at this corner", "capacitance"),
        Term("Cs", "stray capacitance (pins and board)", "capacitance"),
        Term("CL", "load capacitance the crystal sees", "capacitance"),
        Term("CL_spec", "load capacitance the crystal is calibrated at", "capacitance"),
        Term("C0", "crystal shunt capacitance", "capacitance"),
        Term("Cm", "crystal motional capacitance", "capacitance"),
        Term("ESR", "crystal equivalent series resistance", "resistance"),
        Term("f", "crystal frequency", "frequency"),
        Term("Vpp", "peak-to-peak swing at the amplifier output", "voltage"),
        Term("cal", "crystal calibration tolerance at this corner", "ppm"),
        Term("temp", "crystal stability over temperature at this corner", "ppm"),
        Term("age", "crystal ageing over the life at this corner", "ppm"),
        Term("pulling", "frequency pulled by the load capacitance", "ppm"),
        Term("gm_crit", "critical transconductance for oscillation", "transconductance"),
        *((Term("gm", "amplifier transconductance", "transconductance"),) if gm else ()),
    )
    heads = {
        "accuracy": "accuracy = cal + temp + age + pulling",
        "pulling": "pulling = (Cm/2)·(1/(C0 + CL) − 1/(C0 + CL_spec))",
        "load": "load = C1·C2/(C1 + C2) + Cs",
        "gain_margin": "gain_margin = gm/gm_crit",
        "gm_needed": f"gm_needed = {MIN_GAIN_MARGIN:g}·gm_crit",
        "drive": "drive = ESR·(2π·f·(C0 + CL)·Vpp·(1 + C2/C1)/(2·√2))²",
    }

    def values(x: Inputs) -> dict[str, FloatArray]:
        c1 = apply_part(x, "C1")
        c2 = apply_part(x, "C2")
        cs = _f(x["stray"])
        ones = np.ones_like(c1)
        cl = pierce.load_capacitance(c1, c2, cs)
        pull = (pierce.load_offset_ppm(cm, c0, cl) - pierce.load_offset_ppm(cm, c0, cl_spec)) * PPM
        vpp = _f(x["supply"]) if swing is None else swing * ones
        out = {
            "C1": c1,
            "C2": c2,
            "Cs": cs,
            "CL": cl,
            "CL_spec": cl_spec * ones,
            "C0": c0 * ones,
            "Cm": cm * ones,
            "ESR": esr * ones,
            "f": f * ones,
            "Vpp": _f(vpp),
            "cal": _f(x["xtal.cal"]),
            "temp": _f(x["xtal.temp"]),
            "age": _f(x["xtal.age"]),
            "pulling": _f(pull),
            "gm_crit": pierce.critical_gm_caps(esr, f, c0 + cs, c1, c2),
        }
        if gm is not None:
            out["gm"] = gm * ones
        return out

    return Formula(heads, lines, terms, values)


_BUILDERS: Mapping[str, Callable[[Block, Design], Formula]] = {
    "oneshot": _oneshot,
    "astable": _astable,
    "delay": _delay,
    "relaxation": _relaxation,
    "crystal": _crystal,
}


def formula(block: Block, design: Design) -> Formula | None:
    """The formula of a block's circuit, or ``None`` for a kind without one here.

    Parameters
    ----------
    block
        The block.
    design
        Its design (the astable's variant picks the lines).

    Returns
    -------
    Formula or None
        Lines, symbols and the function that evaluates them.
    """
    build = _BUILDERS.get(block.kind)
    return build(block, design) if build is not None else None
