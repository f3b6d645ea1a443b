"""Waveforms: the timing capacitor and the output over one cycle, at the nominal design.

Every timing circuit timespec designs moves its capacitor along first-order
exponentials, one per phase: ``v(t) = v∞ + (v0 − v∞)·exp(−t/τ)`` toward an
asymptote ``v∞`` (the drain current already folded in, ``v∞ = V − i·R``) with
``τ = R·C``.  This module states each family's phases from the exact closed
forms of :mod:`timespec.physics` at the design's nominal inputs (every factor at
its nominal value) and samples those exponentials; nothing is integrated.

* ``oneshot``: idle at the discharge divider, the trigger at ``t = 0``, the
  charge toward the supply until the threshold plus the timer's output delay,
  then the fast discharge through the discharge transistor;
* ``delay``: the charge from the start voltage; the logic input reads high a
  gate delay after the crossing;
* ``astable`` and ``relaxation``: one steady cycle from a rising output edge,
  each half following its law for the output delay past its threshold (the
  turning points of :mod:`timespec.physics.timerdelay` and
  :func:`timespec.physics.relaxation.delayed_times`).  The steering-diode
  astable's charge is not one exponential: its time to each voltage is taken
  from the family's closed form (diode equation or constant drop) and sampled
  by voltage.

No waveform is drawn for a crystal block: its oscillation is a resonance, not a
capacitor charge (the frequency budget is in the report).

The chart marks the threshold levels, the required window of each timing output
(green) and its worst-case window (purple lines) on the time axis, at the edge
that ends the measured interval.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import numpy.typing as npt

from timespec.design.result import BlockResult, Candidate, Result
from timespec.errors import UsageError
from timespec.families import family
from timespec.families.astable.diode import DIODE
from timespec.families.inputs import apply_part, drain_current
from timespec.families.schmitt import threshold_centre, thresholds, width_knots
from timespec.outputs.figures import MEETS, REQUIRED, WORST, panel_chart
from timespec.physics import monostable
from timespec.physics.astable import (
    diode_equation_charge,
    diode_forward_voltage,
    diode_saturation_current,
    discharge_node,
    thermal_voltage,
)
from timespec.physics.rcdelay import charge_time, effective_target, threshold_from_time
from timespec.physics.timerdelay import diode_delayed_times, diode_equation_delayed_times

__all__ = [
    "Phase",
    "TimeMark",
    "Waveform",
    "block_waveform",
    "nominal_inputs",
    "waveform_chart",
]

FloatArray = npt.NDArray[np.float64]

_ZERO = np.zeros(1)


@dataclass(frozen=True)
class Phase:
    """One exponential stretch of the capacitor voltage, with the output level.

    Attributes
    ----------
    name
        What happens, e.g. ``"charge"``.
    start, duration
        Start time (from the trigger or the rising output edge) and length, s.
    v_start
        Capacitor voltage at ``start``, V.
    target
        The asymptote ``v∞`` (drain included), V.
    tau
        Time constant ``R·C``, s (``inf`` for a constant voltage, ``nan`` for a
        phase given by its curve).
    output
        Output level during the phase, V.
    curve
        For a phase that is not one exponential (the steering diode's charge):
        ``(time since start, volts)`` sampled from its closed form; ``target``
        and ``tau`` are then ``nan``.
    """

    name: str
    start: float
    duration: float
    v_start: float
    target: float
    tau: float
    output: float
    curve: tuple[FloatArray, FloatArray] | None = field(default=None, compare=False, repr=False)

    @property
    def end(self) -> float:
        """Time at which the phase ends, s."""
        return self.start + self.duration

    def voltage(self, t: FloatArray) -> FloatArray:
        """The capacitor voltage at times inside the phase.

        Parameters
        ----------
        t
            Times, s.

        Returns
        -------
        FloatArray
            ``target + (v_start − target)·exp(−(t − start)/tau)``, V.
        """
        if self.curve is not None:  # not one exponential: the closed form sampled by voltage
            since, volts = self.curve
            return np.interp(np.asarray(t, dtype=np.float64) - self.start, since, volts)
        decay = np.exp(-(np.asarray(t, dtype=np.float64) - self.start) / self.tau)
        return np.asarray(self.target + (self.v_start - self.target) * decay, dtype=np.float64)

    @property
    def v_end(self) -> float:
        """Capacitor voltage at the end of the phase, V."""
        return float(self.voltage(np.array([self.end]))[0])


@dataclass(frozen=True)
class TimeMark:
    """A timing output placed on the waveform's time axis.

    Attributes
    ----------
    name
        Output name, e.g. ``"width"``.
    origin
        Time the measured interval starts from, s (the interval's edge lies at
        ``origin + value``).
    required
        Required ``(low, high)`` of the edge's time, s (``±inf`` for an open side).
    worst
        Worst-case ``(low, high)`` of the edge's time, s.
    """

    name: str
    origin: float
    required: tuple[float, float]
    worst: tuple[float, float]


@dataclass(frozen=True)
class Waveform:
    """The capacitor and output of one block over one cycle or pulse.

    Attributes
    ----------
    block
        Block name.
    kind
        Block kind.
    supply
        Nominal supply, V.
    phases
        The exponential stretches, in time order, each starting where the
        previous ends.
    thresholds
        ``(label, volts)`` of each threshold the capacitor is compared with.
    marks
        The required and worst-case windows of the timing outputs.
    output_label
        What the output trace is.
    """

    block: str
    kind: str
    supply: float
    phases: tuple[Phase, ...]
    thresholds: tuple[tuple[str, float], ...]
    marks: tuple[TimeMark, ...]
    output_label: str = "output"

    def sample(self, per_phase: int = 200) -> tuple[FloatArray, FloatArray, FloatArray]:
        """Sample the capacitor voltage and the output.

        Parameters
        ----------
        per_phase
            Points per phase (both ends included).

        Returns
        -------
        tuple of FloatArray
            ``(t, capacitor, output)``: times (s) and volts; the output is
            constant within each phase, so a phase boundary appears twice in
            ``t`` (once at each level) and the steps are vertical.
        """
        ts: list[FloatArray] = []
        vs: list[FloatArray] = []
        outs: list[FloatArray] = []
        for p in self.phases:
            if p.curve is not None:
                t, v = p.curve[0] + p.start, p.curve[1]
            else:
                t = np.linspace(p.start, p.end, per_phase)
                v = p.voltage(t)
            ts.append(t)
            vs.append(v)
            outs.append(np.full(t.size, p.output))
        return np.concatenate(ts), np.concatenate(vs), np.concatenate(outs)


def nominal_inputs(result: BlockResult) -> dict[str, FloatArray]:
    """Every factor of a block's best design at its nominal value.

    Parameters
    ----------
    result
        A solved block with a design.

    Returns
    -------
    dict
        Factor name → one-element array.

    Raises
    ------
    UsageError
        When the block has no design.
    """
    if result.best is None:
        raise UsageError(f"block {result.block.name!r} has no design to plot")
    fam = family(result.block.kind)
    factors = list(result.factors) or fam.factors(result.block, result.best.design)
    return {f.name: np.array([f.nominal], dtype=np.float64) for f in factors}


def _f(a: Any) -> float:
    return float(np.asarray(a, dtype=np.float64).reshape(-1)[0])


def _marks(best: Candidate, period: float) -> tuple[TimeMark, ...]:
    """The timing outputs with a requirement, placed at the edge that ends each interval."""
    out: list[TimeMark] = []
    high = next((o.nominal for o in best.outputs if o.name == "high"), 0.0)
    for o in best.outputs:
        w = o.required
        if w is None:
            continue
        if o.name in ("width", "delay", "period", "high"):
            out.append(TimeMark(o.name, 0.0, (w.low, w.high), (o.low, o.high)))
        elif o.name == "low":
            out.append(TimeMark(o.name, high, (w.low, w.high), (o.low, o.high)))
        elif o.name == "frequency" and o.low > 0:
            inv = (1.0 / w.high if w.high > 0 else 0.0, 1.0 / w.low if w.low > 0 else math.inf)
            out.append(TimeMark("period (from frequency)", 0.0, inv, (1 / o.high, 1 / o.low)))
        elif o.name == "duty" and math.isfinite(period):
            req = (w.low * period, w.high * period)
            out.append(TimeMark("high (from duty)", 0.0, req, (o.low * period, o.high * period)))
    return tuple(out)


def _reach(marks: tuple[TimeMark, ...]) -> float:
    """The latest finite edge time any mark needs on the axis, s (0 without marks)."""
    ends = [m.origin + e for m in marks for e in (*m.required, *m.worst)]
    return max((e for e in ends if math.isfinite(e)), default=0.0)


def _oneshot(result: BlockResult, x: dict[str, FloatArray]) -> Waveform:
    block = result.block
    r = apply_part(x, "R")
    c = apply_part(x, "C") + x.get("stray", _ZERO)
    v = x["supply"]
    i = drain_current(x)
    ron = x["timer.ron"]
    td = _f(x.get("timer.delay", _ZERO))
    vth = x["control"] if "control" in x else x["timer.ratio"] * v
    v0 = _f(monostable.start_voltage(v, r, ron, i))
    t_c = _f(charge_time(r, c, v, v0, vth, i))
    if not math.isfinite(t_c):
        raise UsageError(f"block {block.name!r}: the capacitor never reaches the threshold")
    tau = _f(r * c)
    vs = _f(v)
    lead = 0.1 * (t_c + td)
    charge = Phase("charge", 0.0, t_c + td, v0, _f(effective_target(v, r, i)), tau, vs)
    v_n = _f(monostable.start_voltage(v, r, ron, i))
    r_n = _f(r * ron / (r + ron))
    assert result.best is not None
    marks = _marks(result.best, math.nan)
    tail = max(0.25 * (t_c + td), 1.05 * _reach(marks) - charge.end)
    phases = (
        Phase("idle", -lead, lead, v0, v0, math.inf, 0.0),
        charge,
        Phase("discharge", charge.end, tail, charge.v_end, v_n, _f(r_n * c), 0.0),
    )
    return Waveform(
        block.name, block.kind, vs, phases, (("threshold", _f(vth)),), marks, "timer output"
    )


def _delay(result: BlockResult, x: dict[str, FloatArray]) -> Waveform:
    block = result.block
    r = apply_part(x, "R")
    c = apply_part(x, "C") + x["stray"]
    v = x["supply"]
    win = block.window("threshold")
    assert win is not None
    vth = _f(x["threshold"] * v if win.kind == "ratio" else x["threshold"])
    i = x.get("leak", _ZERO)
    start = block.number("start") or 0.0
    t_c = _f(charge_time(r, c, v, start, vth, i))
    if not math.isfinite(t_c):
        raise UsageError(f"block {block.name!r}: the node never reaches the threshold")
    td = _f(x.get("gate.delay", _ZERO))
    tau = _f(r * c)
    target = _f(effective_target(v, r, i))
    assert result.best is not None
    marks = _marks(result.best, math.nan)
    first = Phase("charge", 0.0, t_c + td, start, target, tau, 0.0)
    tail = max(0.5 * (t_c + td), 1.05 * _reach(marks) - first.end)
    rest = Phase("charge", first.end, tail, first.v_end, target, tau, _f(v))
    return Waveform(
        block.name,
        block.kind,
        _f(v),
        (first, rest),
        (("threshold", vth),),
        marks,
        "logic input reads high",
    )


def _cycle(
    high: tuple[float, float, float],
    low: tuple[float, float, float],
    levels: tuple[float, float],
    td: float,
    outputs: tuple[float, float],
) -> tuple[Phase, Phase]:
    """One steady cycle: ``high``/``low`` = ``(R, C, target v∞)``, ``levels`` = (lower, upper)."""
    (r_h, c, vh), (r_l, _, vl) = high, low
    lo, hi = levels
    # each half follows its law for t_pd past its threshold (the delayed switching)
    v_top = _f(threshold_from_time(td, r_h, c, vh, hi))
    v_bot = _f(threshold_from_time(td, r_l, c, vl, lo))
    t_h = td + _f(charge_time(r_h, c, vh, v_bot, hi))
    t_l = td + _f(charge_time(r_l, c, vl, v_top, lo))
    if not (math.isfinite(t_h) and math.isfinite(t_l)):
        raise UsageError("the capacitor never reaches a threshold: the circuit does not oscillate")
    return (
        Phase("charge", 0.0, t_h, v_bot, vh, r_h * c, outputs[0]),
        Phase("discharge", t_h, t_l, v_top, vl, r_l * c, outputs[1]),
    )


def _diode_cycle(
    x: dict[str, FloatArray], levels: tuple[float, float], td: float, c: float
) -> tuple[Phase, Phase]:
    """The steering-diode astable: the charge through the diode, sampled by voltage.

    The discharge is the classic one (one exponential through ``RB`` into the
    discharge pin).  The charge is not: the time to reach each voltage comes
    from the family's own closed form (the diode equation,
    :func:`~timespec.physics.astable.diode_equation_charge`, or the constant
    drop's two exponentials), and the turning voltage at the top follows from
    the discharge law run backwards over the low time.
    """
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    ra, rb = apply_part(x, "RA"), apply_part(x, "RB")
    ron = x["timer.ron"]
    t_pd = np.array([td])
    cc = np.array([c])
    v_n, r_n = discharge_node(v, ra, ron)
    r_dis = rb + r_n
    lo = levels[0]
    if "diode.is" in x:
        is_t = diode_saturation_current(x["diode.is"], x["diode.n"], x["temp"], DIODE.eg, DIODE.xti)
        n_vt = x["diode.n"] * thermal_voltage(x["temp"])
        t_h, t_l = diode_equation_delayed_times(ra, rb, cc, v, k, is_t, n_vt, ron, i, t_pd)

        def charge(v_from: float, v_to: FloatArray) -> FloatArray:
            return diode_equation_charge(ra, cc, v, v_from, v_to, is_t, n_vt, i, rb)

    else:
        vd = diode_forward_voltage(x["diode.v25"], x["diode.tc"], x["temp"])
        t_h, t_l = diode_delayed_times(ra, rb, cc, v, k, vd, ron, i, t_pd)
        v_x = _f(v - vd - vd * (ra / rb))  # above it the diode is off: RA + RB charge

        def charge(v_from: float, v_to: FloatArray) -> FloatArray:
            switch = np.clip(v_x, v_from, v_to)
            on = charge_time(ra, cc, v - vd, v_from, switch, i)
            return np.asarray(on + charge_time(ra + rb, cc, v, switch, v_to, i), np.float64)

    th, tl = _f(t_h), _f(t_l)
    if not (math.isfinite(th) and math.isfinite(tl)):
        raise UsageError("the capacitor never reaches a threshold: the circuit does not oscillate")
    vl = _f(effective_target(v_n, r_dis, i))
    tau_l = _f(r_dis) * c
    v_bot = _f(threshold_from_time(td, r_dis, c, v_n, lo, i))
    v_top = vl + (v_bot - vl) * math.exp(tl / tau_l)
    volts = np.linspace(v_bot, v_top, 400)
    with np.errstate(all="ignore"):
        since = np.asarray(charge(v_bot, volts), dtype=np.float64).reshape(-1)
    since[0] = 0.0
    high = Phase("charge", 0.0, th, v_bot, math.nan, math.nan, _f(v), (since, volts))
    return high, Phase("discharge", th, tl, v_top, vl, tau_l, 0.0)


def _astable(result: BlockResult, x: dict[str, FloatArray]) -> Waveform:
    block, best = result.block, result.best
    assert best is not None
    variant = best.design.variant
    c = _f(apply_part(x, "C") + x.get("stray", _ZERO))
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    td = _f(x.get("timer.delay", _ZERO))
    levels = (_f(0.5 * k * v), _f(k * v))
    vs = _f(v)
    if variant == "classic":
        ra, rb = apply_part(x, "RA"), apply_part(x, "RB")
        v_n, r_n = discharge_node(v, ra, x["timer.ron"])
        r_h, r_l = ra + rb, rb + r_n
        vh, vl = effective_target(v, r_h, i), effective_target(v_n, r_l, i)
        out = (vs, 0.0)
    elif variant == "feedback":
        r = apply_part(x, "R")
        r_h, r_l = r + x.get("output.roh", _ZERO), r + x.get("output.rol", _ZERO)
        vh = effective_target(v - x["output.drop"], r_h, i)
        vl = effective_target(x["output.low"], r_l, i)
        out = (_f(v - x["output.drop"]), _f(x["output.low"]))
    else:
        phases = _diode_cycle(x, levels, td, c)
        return Waveform(
            block.name,
            block.kind,
            vs,
            phases,
            (("lower threshold", levels[0]), ("upper threshold", levels[1])),
            _marks(best, phases[1].end),
            "timer output",
        )
    phases = _cycle((_f(r_h), c, _f(vh)), (_f(r_l), c, _f(vl)), levels, td, out)
    period = phases[1].end
    return Waveform(
        block.name,
        block.kind,
        vs,
        phases,
        (("lower threshold", levels[0]), ("upper threshold", levels[1])),
        _marks(best, period),
        "timer output",
    )


def _relaxation(result: BlockResult, x: dict[str, FloatArray]) -> Waveform:
    block, best = result.block, result.best
    assert best is not None
    r = apply_part(x, "R")
    c = _f(apply_part(x, "C") + x["stray"])
    v = x["supply"]
    i = x["leak"]
    th = thresholds(block)
    us, ws = width_knots(th)
    w = np.interp(x["gate.hysteresis"], us, ws)
    centre = threshold_centre(th, w, x["gate.centre"], i * r / v)
    vt_plus, vt_minus = _f((centre + 0.5 * w) * v), _f((centre - 0.5 * w) * v)
    vh, vl = _f(effective_target(v, r, i)), _f(effective_target(0.0, r, i))
    td = _f(x["gate.delay"])
    phases = _cycle((_f(r), c, vh), (_f(r), c, vl), (vt_minus, vt_plus), td, (_f(v), 0.0))
    return Waveform(
        block.name,
        block.kind,
        _f(v),
        phases,
        (("falling threshold VT−", vt_minus), ("rising threshold VT+", vt_plus)),
        _marks(best, phases[1].end),
        "inverter output",
    )


_BUILDERS = {
    "oneshot": _oneshot,
    "delay": _delay,
    "astable": _astable,
    "relaxation": _relaxation,
}


def block_waveform(result: BlockResult) -> Waveform:
    """The nominal waveform of one solved block.

    Parameters
    ----------
    result
        A solved block with a design.

    Returns
    -------
    Waveform
        Its phases, thresholds and timing marks.

    Raises
    ------
    UsageError
        For a crystal block (no capacitor waveform), a block without a design, or
        one whose capacitor never reaches a threshold.
    """
    kind = result.block.kind
    builder = _BUILDERS.get(kind)
    if builder is None:
        raise UsageError(
            f"no waveform for {kind} blocks ({result.block.name!r}): "
            "a crystal resonates, it does not charge a capacitor to a threshold"
        )
    x = nominal_inputs(result)
    with np.errstate(all="ignore"):
        return builder(result, x)


def _time_unit(span: float) -> tuple[float, str]:
    for scale, unit in ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns")):
        if span >= 2 * scale:
            return scale, unit
    return 1e-9, "ns"


def _draw(ax: Any, wf: Waveform) -> None:
    t, vc, vo = wf.sample()
    scale, unit = _time_unit(float(t[-1] - t[0]))
    ts = t / scale
    ax.plot(ts, vo, color="#888888", linewidth=1.2, label=wf.output_label)
    ax.plot(ts, vc, color="#1f4e9a", linewidth=1.6, label="capacitor")
    for label, volts in wf.thresholds:
        ax.axhline(volts, color="#d07000", linestyle=":", linewidth=1)
        ax.text(ts[0], volts, f" {label} {volts:.3g} V", va="bottom", fontsize=7, color="#d07000")
    # the axis covers every finite window edge, up to twice the cycle (the trace ends at its end)
    span = float(t[-1] - t[0])
    lo_t = float(ts[0])
    hi_t = min(max(float(t[-1]), 1.03 * _reach(wf.marks)), float(t[0]) + 2.0 * span) / scale
    for n, mark in enumerate(wf.marks):
        y0, y1 = 1.02 + 0.07 * n, 1.07 + 0.07 * n
        rlo = max(mark.origin + mark.required[0], t[0]) / scale
        rhi = min(mark.origin + mark.required[1], hi_t * scale) / scale
        ax.fill_between(
            [rlo, rhi],
            [y0 * wf.supply] * 2,
            [y1 * wf.supply] * 2,
            color=REQUIRED,
            edgecolor=MEETS,
            linewidth=0.8,
        )
        for edge in mark.worst:
            e = (mark.origin + edge) / scale
            if math.isfinite(e):
                ax.plot([e, e], [y0 * wf.supply, y1 * wf.supply], color=WORST, linewidth=1.5)
        ax.text(hi_t, 0.5 * (y0 + y1) * wf.supply, f" {mark.name}", va="center", fontsize=7)
    ax.set_xlim(lo_t, hi_t)
    ax.set_ylim(-0.05 * wf.supply, (1.12 + 0.07 * len(wf.marks)) * wf.supply)
    ax.set_xlabel(f"time ({unit})")
    ax.set_ylabel("V")
    ax.set_title(f"{wf.block} ({wf.kind}) at nominal", fontsize=9)


def waveform_chart(result: Result, blocks: list[str] | None = None) -> Any:
    """Draw the nominal waveforms of a solved spec's blocks, one panel per block.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Block names to draw (default: every block that has a waveform; crystal
        blocks are left out).

    Returns
    -------
    matplotlib.figure.Figure
        The figure.

    Raises
    ------
    UsageError
        When a named block has no waveform, or no block has one.
    """
    if blocks:
        waves = [block_waveform(result.block(n)) for n in blocks]
    else:
        waves = []
        for b in result.blocks:
            try:
                waves.append(block_waveform(b))
            except UsageError:
                continue
    if not waves:
        raise UsageError(
            "nothing to plot: no block has a capacitor waveform (crystal blocks have none)"
        )
    return panel_chart(waves, _draw, _legend(), width=8.0, panel=2.9)


def _legend() -> tuple[list[Any], list[str]]:
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    entries: list[tuple[Any, str]] = [
        (Line2D([], [], color="#1f4e9a", linewidth=1.6), "capacitor"),
        (Line2D([], [], color="#888888", linewidth=1.2), "output"),
        (Line2D([], [], color="#d07000", linestyle=":"), "threshold"),
        (Patch(facecolor=REQUIRED, edgecolor=MEETS), "required window of the edge"),
        (Line2D([], [], color=WORST, linewidth=1.5), "worst-case edge"),
    ]
    return [h for h, _ in entries], [lbl for _, lbl in entries]
