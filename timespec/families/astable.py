"""The ``astable`` family: a 555-type free-running oscillator.

Three circuit variants (``Design.variant``), chosen automatically or pinned with
``circuit classic|diode|feedback``:

* ``classic`` — parts ``RA`` (supply to discharge pin), ``RB`` (discharge pin to
  capacitor) and ``C``.  The capacitor charges through ``RA + RB`` and discharges
  through ``RB``, so the duty cycle ``(RA + RB)/(RA + 2·RB)`` is always above 50 %.
* ``diode`` — the same three parts with a steering diode across ``RB``: the
  capacitor charges through ``RA`` alone (toward the supply less the diode drop)
  and discharges through ``RB``, so any duty cycle is possible.  The diode drop
  is a band at 25 °C (``diode 0.55 V to 0.75 V``) plus a tempco, so the high
  time depends on supply and temperature; both are modelled.
* ``feedback`` — parts ``R`` (output to capacitor) and ``C``; needs a timer whose
  output swings to the rails (the CMOS class).  Duty cycle close to 50 %, set by
  the output levels and the threshold ratio.

Outputs, every time: ``frequency``, ``period``, ``duty``, ``high``, ``low``.

Second-order effects modelled (see :mod:`timespec.physics.astable`): the timer
class's threshold-ratio band, discharge on-resistance (the discharge pin is a
Thevenin source of ``RA`` against ``r_on``), threshold input current and node
leakage, the class's timing drift with temperature and supply, the diode drop
and its tempco, the output levels of the feedback circuit, part tolerance,
tempco or dielectric drift, and ageing.

Candidate narrowing: target high and low times come from the requirements; for
every allowed capacitor the continuous resistor pair is solved in closed form
from nominal physics, refined twice with the full nominal model, and each
resistor is snapped to both standard neighbours (at most four designs per
capacitor).  All triples are never enumerated.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Callable, Mapping

import numpy as np

from timespec.analysis import Factor, worst_case
from timespec.errors import SpecValueError
from timespec.families.astable_monotone import declared
from timespec.families.candidates import candidate_values, capacitor_part, resistor_part, snap
from timespec.families.capacitors import dielectric_findings, node_leakage
from timespec.families.goals import target, window_score
from timespec.families.inputs import (
    apply_part,
    condition_factors,
    drain_current,
    part_factors,
    scaled_time,
    supply_nominal_factor,
    timer_factors,
)
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.model import Block, PinnedPart, Window
from timespec.numbers import format_quantity
from timespec.parts.part import Design, Part
from timespec.parts.rkm import format_rkm
from timespec.physics import astable

__all__ = [
    "DEFAULT_DUTY",
    "DIODE_DROP_BAND",
    "DIODE_TC_BAND",
    "FEEDBACK_LOW_MAX",
    "KEEP",
    "KEEP_PER_VARIANT",
    "RAIL_OUTPUT_SHARE",
    "VARIANTS",
    "Astable",
    "duty_band",
    "feedback_duty_range",
    "reachable_variants",
    "time_targets",
]

#: Circuit variants, in the order the solver prefers them on a tie.
VARIANTS: tuple[str, ...] = ("classic", "diode", "feedback")

#: Default forward-drop band of the steering diode at 25 °C, V: a small-signal
#: silicon diode between about 0.1 mA and a few mA (common practice).
DIODE_DROP_BAND: tuple[float, float] = (0.55, 0.75)

#: Band of the diode drop's temperature coefficient, mV/K: about −2 mV/K for a
#: silicon junction (common practice), spread ±20 % with current (from memory).
DIODE_TC_BAND: tuple[float, float] = (-2.4, -1.6)

#: Output low level of a CMOS timer sinking the feedback resistor's current
#: (well under 1 mA), V (from memory; generic CMOS output stages).
FEEDBACK_LOW_MAX: float = 0.05

#: The feedback circuit needs ``output_drop`` at most this share of the lowest
#: supply: a rail-to-rail (CMOS) output (common practice).
RAIL_OUTPUT_SHARE: float = 0.05

#: Duty cycle aimed at when the requirements leave it free: classic with
#: ``RA = RB`` (2/3, equal resistors, common practice); diode and feedback: a
#: square wave.
DEFAULT_DUTY: Mapping[str, float] = {"classic": 2.0 / 3.0, "diode": 0.5, "feedback": 0.5}

#: Candidates handed to the solver (best screening scores over all variants) …
KEEP = 8
#: … and at least this many of each variant considered.
KEEP_PER_VARIANT = 3

_Run = Callable[..., dict[str, FloatArray]]

_REFS: Mapping[str, tuple[str, ...]] = {
    "classic": ("RA", "RB", "C"),
    "diode": ("RA", "RB", "C"),
    "feedback": ("R", "C"),
}


def _ohms(r: float) -> str:
    return f"{format_rkm(r, 'resistance')}Ω"


def _pct(d: float) -> str:
    return f"{d * 100:.3g} %"


# --------------------------------------------------------------------------
# requirements → targets


def _period_window(block: Block) -> Window | None:
    """The period window from a ``period`` or ``frequency`` requirement."""
    req = block.requirement("period")
    if req is not None:
        return req.window
    req = block.requirement("frequency")
    if req is None:
        return None
    w = req.window
    low = 1.0 / w.high if w.high > 0 and math.isfinite(w.high) else 0.0
    high = 1.0 / w.low if w.low > 0 else math.inf
    return Window(low, high, "time")


def duty_band(block: Block) -> tuple[float, float]:
    """The duty cycles the requirements allow (duty, high/low, high or low with a period).

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of float
        ``(low, high)`` within ``[0, 1]``; ``low > high`` when the requirements
        contradict each other; ``(0, 1)`` when nothing limits the duty cycle.

    Notes
    -----
    ``D = tH/(tH + tL) = tH/T``.  Each pair of requirements that fixes the duty
    cycle narrows the band: a duty window directly; high and low windows give
    ``tH_min/(tH_min + tL_max)`` … ``tH_max/(tH_max + tL_min)``; a high (low)
    window with a period window gives ``tH/T`` (``1 − tL/T``) at the ends.
    """
    lo, hi = 0.0, 1.0
    req = block.requirement("duty")
    if req is not None:
        lo, hi = max(lo, req.window.low), min(hi, req.window.high)
    h = block.requirement("high")
    lw = block.requirement("low")
    p = _period_window(block)
    if h is not None and lw is not None:
        lo = max(lo, _ratio(h.window.low, h.window.low + lw.window.high))
        hi = min(hi, _ratio(h.window.high, h.window.high + lw.window.low))
    if h is not None and p is not None:
        lo = max(lo, _ratio(h.window.low, p.high))
        hi = min(hi, _ratio(h.window.high, p.low))
    if lw is not None and p is not None:
        lo = max(lo, 1.0 - _ratio(lw.window.high, p.low))
        hi = min(hi, 1.0 - _ratio(lw.window.low, p.high))
    return (max(0.0, lo), min(1.0, hi))


def _ratio(a: float, b: float) -> float:
    """``a/b`` clipped into [0, 1], with infinities read as limits."""
    if math.isinf(a):
        return 1.0
    if b <= 0 or math.isinf(b):
        return 0.0 if b > 0 or a <= 0 else 1.0
    return min(1.0, max(0.0, a / b))


def time_targets(
    block: Block, variant: str, scale: Mapping[str, float] | None = None
) -> tuple[float, float]:
    """High and low times a design of this variant should aim at.

    Parameters
    ----------
    block
        An astable block.
    variant
        ``"classic"``, ``"diode"`` or ``"feedback"``.
    scale
        Optional factor per requirement name applied to its target (the solver
        aims the nominal off-centre so that the worst-case window is centred).

    Returns
    -------
    tuple of float
        ``(tH, tL)``, s.

    Notes
    -----
    Both ``high`` and ``low`` given: their targets.  One of them with a period
    (``period``, or ``1/frequency``): the other is ``T − t``.  Otherwise the
    duty target ``D`` (the ``duty`` requirement, else :data:`DEFAULT_DUTY` of
    the variant) splits the given time: ``tL = tH·(1 − D)/D``, or
    ``tH = D·T`` and ``tL = (1 − D)·T``.
    """
    sc = scale or {}

    def aim(name: str) -> float | None:
        req = block.requirement(name)
        return None if req is None else target(req.window) * sc.get(name, 1.0)

    period = aim("period")
    f = aim("frequency")
    if period is None and f is not None:
        period = 1.0 / f
    d = aim("duty")
    d = DEFAULT_DUTY[variant] if d is None else d
    d = min(max(d, 1e-3), 1.0 - 1e-3)
    th = aim("high")
    tl = aim("low")
    if th is not None and tl is not None:
        return th, tl
    if th is not None:
        if period is not None and period > th:
            return th, period - th
        return th, th * (1.0 - d) / d
    if tl is not None:
        if period is not None and period > tl:
            return period - tl, tl
        return tl * d / (1.0 - d), tl
    assert period is not None, "an astable needs frequency, period, high or low"
    return d * period, (1.0 - d) * period


# --------------------------------------------------------------------------
# variants


def _rail_output(block: Block) -> bool:
    """Whether the timer's output high level sits close enough to the rail."""
    t = block.timer
    assert t is not None
    return t.output_drop <= RAIL_OUTPUT_SHARE * block.conditions.supply.low


def feedback_duty_range(block: Block) -> tuple[float, float]:
    """Duty cycles the output-feedback circuit can run at with this timer class.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of float
        ``(low, high)`` over the threshold-ratio band, output drop ``0…output_drop``,
        output low ``0…FEEDBACK_LOW_MAX`` and the supply window; ``(nan, nan)``
        when the output never reaches the upper threshold anywhere.

    Notes
    -----
    ``tH ∝ ln((V_oh − kV/2)/(V_oh − kV))``, ``tL ∝ ln((kV − V_ol)/(kV/2 − V_ol))``,
    ``D = tH/(tH + tL)``: 50 % with rail-to-rail levels and ``k = 2/3``.
    """
    t = block.timer
    assert t is not None
    grid = itertools.product(
        t.ratio_band,
        (0.0, t.output_drop),
        (0.0, FEEDBACK_LOW_MAX),
        (block.conditions.supply.low, block.conditions.supply.high),
    )
    k, drop, vl, v = (np.array(col, dtype=np.float64) for col in zip(*grid, strict=True))
    th = astable.feedback_high_time(1.0, 1.0, v - drop, v, k)
    tl = astable.feedback_low_time(1.0, 1.0, vl, v, k)
    d = astable.duty(th, tl)
    ok = np.isfinite(th) & np.isfinite(tl)
    if not ok.any():
        return (math.nan, math.nan)
    return (float(d[ok].min()), float(d[ok].max()))


def _reaches(block: Block, variant: str, band: tuple[float, float]) -> bool:
    lo, hi = band
    if lo > hi:
        return variant == "diode"
    if variant == "classic":
        return hi > 0.5
    if variant == "feedback":
        f_lo, f_hi = feedback_duty_range(block)
        return _rail_output(block) and f_lo <= hi and lo <= f_hi
    return True


def reachable_variants(block: Block) -> tuple[str, ...]:
    """The circuit variants the solver considers for a block.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of str
        The pinned ``circuit`` when given; otherwise every variant that can
        reach the required duty cycle (classic only above 50 %, feedback only
        with a rail-to-rail timer output and a duty band near 50 %, diode
        always), restricted to those whose part references fit the pinned parts.

    Raises
    ------
    SpecValueError
        When pinned part references do not fit the pinned circuit (``R`` with
        ``circuit classic``, ``RA`` with ``circuit feedback``).
    """
    pinned_circuit = block.word("circuit")
    refs = {p.ref for p in block.pinned}
    if pinned_circuit is not None:
        wrong = sorted(refs - set(_REFS[pinned_circuit]))
        if wrong:
            part = block.pinned_part(wrong[0])
            hint = (
                "the feedback circuit has parts R and C: write 'use R …, C …'"
                if pinned_circuit == "feedback"
                else "the classic and diode circuits have parts RA, RB and C"
            )
            raise _error(
                f"part {wrong[0]} does not exist in the {pinned_circuit} astable circuit",
                part,
                hint,
            )
        return (pinned_circuit,)
    if "R" in refs and refs & {"RA", "RB"}:
        part = block.pinned_part("R")
        raise _error(
            "an astable has either R (feedback circuit) or RA and RB (classic, diode), not both",
            part,
            "pin the parts of one circuit",
        )
    band = duty_band(block)
    options = [v for v in VARIANTS if refs <= set(_REFS[v])]
    found = tuple(v for v in options if _reaches(block, v, band))
    if found:
        return found
    if "R" in refs:
        return ("feedback",)
    return ("diode",)


def _error(message: str, part: PinnedPart | None, hint: str) -> SpecValueError:
    pos = part.pos if part is not None else None
    if pos is None:
        return SpecValueError(message, hint=hint)
    return SpecValueError(
        message,
        path=pos.path,
        line=pos.line,
        column=pos.column,
        source_line=pos.source_line,
        hint=hint,
    )


def _discharge_ra_min(block: Block) -> float:
    """Smallest RA the discharge pin tolerates: ``V_max / i_discharge_max``."""
    t = block.timer
    assert t is not None
    return block.conditions.supply.high / t.i_discharge_max


def _outputs(th: FloatArray, tl: FloatArray) -> dict[str, FloatArray]:
    """All five outputs from the two half-periods (``inf`` when it stalls)."""
    period = np.asarray(th + tl, dtype=np.float64)
    finite = np.isfinite(period)
    with np.errstate(divide="ignore", invalid="ignore"):
        freq = np.where(finite, 1.0 / np.where(finite, period, 1.0), 0.0)
        duty = np.where(finite, th / np.where(finite, period, 1.0), np.inf)
    nan = np.isnan(period)
    return {
        "frequency": np.where(nan, np.nan, freq),
        "period": period,
        "duty": np.where(nan, np.nan, duty),
        "high": np.asarray(th, dtype=np.float64),
        "low": np.asarray(tl, dtype=np.float64),
    }


# --------------------------------------------------------------------------
# the family


class Astable:
    """555-type astable family (classic, steering-diode and output-feedback circuits)."""

    kind = "astable"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: frequency, period, duty cycle, high and low time.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``frequency``, ``period``, ``duty``, ``high``, ``low``.
        """
        return (
            Output("frequency", "frequency", "frequency"),
            Output("period", "time", "period"),
            Output("duty", "ratio", "duty cycle"),
            Output("high", "time", "high time"),
            Output("low", "time", "low time"),
        )

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``RA``, ``RB``, ``C`` (classic, diode) or ``R``, ``C`` (feedback).

        Returns
        -------
        list of Factor
            Parts, conditions, timer class and leakage; for the diode circuit
            ``diode.v25`` (drop at 25 °C, V) and ``diode.tc`` (mV/K); for the
            feedback circuit ``output.drop`` (high level below the supply, V) and
            ``output.low`` (low level, V).  The discharge on-resistance is left
            out of the feedback circuit, which does not use the discharge pin.
        """
        t = block.timer
        assert t is not None
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        out.append(supply_nominal_factor(block))
        timer = timer_factors(block, leakage=node_leakage(block, design))
        if design.variant == "feedback":
            timer = [f for f in timer if f.name != "timer.ron"]
            drop = t.output_drop
            out.extend(timer)
            out.append(
                Factor(
                    "output.drop",
                    f"{t.name} output high below supply (0…{drop:g} V)",
                    0.5 * drop,
                    0.0,
                    drop,
                    group="timer",
                )
            )
            out.append(
                Factor(
                    "output.low",
                    f"{t.name} output low level (0…{FEEDBACK_LOW_MAX:g} V)",
                    0.5 * FEEDBACK_LOW_MAX,
                    0.0,
                    FEEDBACK_LOW_MAX,
                    group="timer",
                )
            )
            return declared(out, "feedback")
        out.extend(timer)
        if design.variant == "diode":
            lo, hi = _diode_band(block)
            tc_lo, tc_hi = DIODE_TC_BAND
            out.append(
                Factor(
                    "diode.v25",
                    f"diode drop at 25 °C ({lo:g}…{hi:g} V)",
                    0.5 * (lo + hi),
                    lo,
                    hi,
                    group="diode",
                )
            )
            out.append(
                Factor(
                    "diode.tc",
                    f"diode drop tempco ({tc_lo:g}…{tc_hi:g} mV/K)",
                    0.5 * (tc_lo + tc_hi),
                    tc_lo,
                    tc_hi,
                    group="diode",
                )
            )
        return declared(out, design.variant)

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """The vectorised model of one circuit variant.

        Parameters
        ----------
        block
            The block.
        variant
            ``"classic"``, ``"diode"`` or ``"feedback"``.

        Returns
        -------
        Evaluate
            Samples → ``{"frequency", "period", "duty", "high", "low"}``; ``period``,
            ``high``, ``low`` and ``duty`` are ``inf`` (``frequency`` 0) where a
            threshold is never reached.

        Notes
        -----
        Classic: :func:`~timespec.physics.astable.classic_high_time` and
        :func:`~timespec.physics.astable.classic_low_time`; diode: the drop
        ``V25 + tc·(T − 25)`` into
        :func:`~timespec.physics.astable.diode_high_time` (with the tail where
        the diode stops conducting) and the classic low time; feedback:
        output levels ``V − drop`` and ``V_ol``.  Both half-periods get the
        timer's temperature and supply drift (:func:`scaled_time`); then
        ``T = tH + tL``, ``f = 1/T``, ``D = tH/T``.
        """
        if variant not in VARIANTS:
            raise ValueError(f"unknown astable variant {variant!r}")

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            c = apply_part(x, "C")
            v = x["supply"]
            k = x["timer.ratio"]
            i = drain_current(x)
            if variant == "feedback":
                r = apply_part(x, "R")
                th = astable.feedback_high_time(r, c, v - x["output.drop"], v, k, i)
                tl = astable.feedback_low_time(r, c, x["output.low"], v, k, i)
            else:
                ra = apply_part(x, "RA")
                rb = apply_part(x, "RB")
                ron = x["timer.ron"]
                if variant == "classic":
                    th = astable.classic_high_time(ra, rb, c, v, k, i)
                else:
                    vd = astable.diode_forward_voltage(x["diode.v25"], x["diode.tc"], x["temp"])
                    th = astable.diode_high_time(ra, c, v, k, vd, i, rb)
                tl = astable.classic_low_time(ra, rb, c, v, k, ron, i)
            return _outputs(scaled_time(x, th), scaled_time(x, tl))

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate designs for every variant considered, narrowed analytically.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Candidates (classic first, then diode, then feedback); pinned parts kept.

        Raises
        ------
        SpecValueError
            When pinned part references do not fit the pinned circuit.

        Notes
        -----
        For each allowed capacitor (or the pinned one) the continuous resistors
        that put the nominal high and low times on target are found in closed
        form — classic ``RB = tL/(C·g_L)``, ``RA + RB = tH/(C·g_H)``; diode
        ``RA = tH/(C·g_H')``, ``RB = tL/(C·g_L)``; feedback
        ``R = T/(C·(g_H + g_L))`` with the nominal gains ``g`` (``ln 2`` for an
        ideal timer) — then refined twice against the full nominal model, and
        each is snapped to both standard neighbours: at most four designs per
        capacitor.  ``RA`` never goes below ``V_max/i_discharge_max``; where
        the classic circuit cannot reach the duty target, ``RA`` sits at that
        floor and ``RB`` keeps the period (the closest design).  With a
        resistor pinned, the free one is solved from each target it can meet
        (classic: from ``tL`` and from ``tH``) and snapped.

        The targets are then corrected so that the *worst-case* window, not
        the nominal, is centred: one probe design gets the full worst case,
        which gives ``nominal/middle`` per requirement and the extreme corners;
        the narrowing is repeated with the corrected targets and every
        candidate is scored at nominal and at the probe's corners (an
        approximation of the solver's ranking).  The best :data:`KEEP` go to
        the solver, at least :data:`KEEP_PER_VARIANT` of each variant.
        """
        pools: list[tuple[str, FloatArray, FloatArray]] = []
        for variant in reachable_variants(block):
            pins = [block.pinned_part(ref) for ref in _REFS[variant]]
            if all(p is not None for p in pins):
                pools.append((variant, np.zeros((1, len(pins))), np.zeros(1)))
                continue
            rows, score = self._rows(block, variant, None)
            if rows.shape[0] == 0:
                continue
            scale, corners = self._probe(block, variant, rows[int(np.argmin(score))])
            rows, _ = self._rows(block, variant, scale)
            if rows.shape[0] == 0:
                continue
            pools.append((variant, rows, self._corner_score(block, variant, rows, corners)))
        return self._keep(block, pools)

    def _keep(self, block: Block, pools: list[tuple[str, FloatArray, FloatArray]]) -> list[Design]:
        """The best :data:`KEEP` rows overall, at least :data:`KEEP_PER_VARIANT` of each variant."""
        chosen: list[tuple[float, int, int]] = []  # (score, pool, row)
        rest: list[tuple[float, int, int]] = []
        for p, (_, _, score) in enumerate(pools):
            order = np.argsort(score, kind="stable")
            chosen.extend((float(score[i]), p, int(i)) for i in order[:KEEP_PER_VARIANT])
            rest.extend((float(score[i]), p, int(i)) for i in order[KEEP_PER_VARIANT:])
        rest.sort()
        chosen.extend(rest[: max(0, KEEP - len(chosen))])
        chosen.sort(key=lambda c: (c[1], c[0]))
        designs = []
        for _, p, i in chosen:
            variant, rows, _ = pools[p]
            row = rows[i]
            values = dict(zip(_REFS[variant], (float(v) for v in row), strict=True))
            designs.append(self._design(block, variant, values))
        return designs

    def _probe(
        self, block: Block, variant: str, row: FloatArray
    ) -> tuple[dict[str, float], list[Mapping[str, float]]]:
        """Full worst case of one probe design: aim corrections and extreme corners.

        Returns
        -------
        tuple
            Per requirement ``nominal/middle`` of the worst-case window (aiming
            the nominal at ``target·ratio`` centres the window; the ratio is
            nearly the same for every candidate of a variant), and the factor
            values of every extreme corner (the same corners are extreme for
            every candidate of a variant: the sensitivities share their signs).
        """
        values = dict(zip(_REFS[variant], map(float, row), strict=True))
        facs = self.factors(block, self._design(block, variant, values))
        extremes = worst_case(facs, self.evaluate(block, variant))
        scale: dict[str, float] = {}
        for req in block.requirements:
            e = extremes[req.quantity]
            mid = 0.5 * (e.low + e.high)
            if math.isfinite(mid) and mid > 0 and math.isfinite(e.nominal) and e.nominal > 0:
                scale[req.quantity] = e.nominal / mid
        corners = [at for e in extremes.values() for at in (e.low_at, e.high_at)]
        return scale, corners

    def _corner_score(
        self, block: Block, variant: str, rows: FloatArray, corners: list[Mapping[str, float]]
    ) -> FloatArray:
        """Approximate solver ranking of every row from the probe's extreme corners.

        Notes
        -----
        Each row is evaluated at nominal and at the probe's extreme corners
        (``1 + 2·outputs`` points); the spread of those values stands for its
        worst-case window.  Score: ``10⁶·excess + centring`` with the solver's
        definitions (relative excursion outside the window, then distance of
        the window's middle from the requirement's middle in half-widths).
        """
        run = self._nominal_model(block, variant)
        n, k = rows.shape[0], len(corners) + 1
        values = {ref: np.repeat(rows[:, j], k) for j, ref in enumerate(_REFS[variant])}
        extra: dict[str, FloatArray] = {}
        names = sorted({name for c in corners for name in c})
        for name in names:
            col = np.array([np.nan] + [c.get(name, np.nan) for c in corners])
            extra[name] = np.tile(col, n)
        out = run(values, extra)
        score = np.zeros(n)
        for req in block.requirements:
            y = np.asarray(out[req.quantity], dtype=np.float64).reshape(n, k)
            with np.errstate(invalid="ignore"):
                lo, hi = y.min(axis=1), y.max(axis=1)
            w = req.window
            finite = math.isfinite(w.high - w.low) and w.high > w.low
            span = (w.high - w.low) if finite else (abs(w.centre) or 1.0)
            exc = (np.maximum(0.0, w.low - lo) + np.maximum(0.0, hi - w.high)) / span
            exc = np.where(np.isfinite(lo) & np.isfinite(hi), exc, np.inf)
            cen = np.zeros(n)
            if finite:
                cen = np.abs(0.5 * (lo + hi) - 0.5 * (w.low + w.high)) / (0.5 * (w.high - w.low))
            cen = np.where(np.isfinite(cen), cen, np.inf)
            score = np.maximum(score, 1e6 * exc + cen)
        return np.asarray(np.nan_to_num(score, nan=np.inf), dtype=np.float64)

    def _nominal_model(self, block: Block, variant: str) -> _Run:
        """Nominal model: part values (by ref) → outputs, everything else nominal."""
        rp, cp = block.resistors, block.capacitors
        parts = tuple(
            capacitor_part(ref, 1.0, cp) if ref == "C" else resistor_part(ref, 1.0, rp)
            for ref in _REFS[variant]
        )
        nominal = {f.name: f.nominal for f in self.factors(block, Design(parts, variant))}
        model = self.evaluate(block, variant)

        def run(
            values: Mapping[str, FloatArray], extra: Mapping[str, FloatArray] | None = None
        ) -> dict[str, FloatArray]:
            n = max(np.size(v) for v in values.values())
            x = {k: np.full(n, v) for k, v in nominal.items()}
            for ref, val in values.items():
                x[f"{ref}.value"] = np.broadcast_to(np.asarray(val, dtype=np.float64), (n,)).copy()
            for name, col in (extra or {}).items():
                if name in x:
                    x[name] = np.where(np.isnan(col), x[name], col)
            return model(x)

        return run

    def _rows(
        self, block: Block, variant: str, scale: Mapping[str, float] | None
    ) -> tuple[FloatArray, FloatArray]:
        """Candidate part values (one row per design, columns in ``_REFS`` order) and
        their nominal screening score (smaller is better)."""
        pins = {ref: block.pinned_part(ref) for ref in _REFS[variant]}
        cp = block.capacitors
        pin_c = pins["C"]
        cs = (
            np.array([pin_c.value])
            if pin_c is not None
            else candidate_values(cp.series, cp.low, cp.high)
        )
        empty = (np.zeros((0, len(pins))), np.zeros(0))
        if cs.size == 0:
            return empty
        th, tl = time_targets(block, variant, scale)
        run = self._nominal_model(block, variant)
        options: dict[str, list[FloatArray]] = {}
        if variant == "feedback":
            options["R"] = self._feedback_options(block, run, cs, th + tl)
        else:
            options.update(self._pair_options(block, variant, run, cs, th, tl))
        refs = [r for r in _REFS[variant] if r != "C"]
        rows = np.concatenate(
            [
                np.column_stack([*combo, cs])
                for combo in itertools.product(*(options[r] for r in refs))
            ]
        )
        ok = np.all(np.isfinite(rows), axis=1)
        if "RA" in refs and pins["RA"] is None:
            ok &= rows[:, 0] >= _discharge_ra_min(block) * (1 - 1e-9)
        rows = np.unique(rows[ok], axis=0)
        if rows.shape[0] == 0:
            return empty
        out = run({ref: rows[:, j] for j, ref in enumerate(_REFS[variant])})
        sc = scale or {}
        score = np.zeros(rows.shape[0])
        for req in block.requirements:
            predicted = np.asarray(out[req.quantity]) / sc.get(req.quantity, 1.0)
            w = window_score(predicted, req.window)
            score = np.maximum(score, np.where(np.isfinite(w), w, np.inf))
        return rows, score

    def _design(self, block: Block, variant: str, values: Mapping[str, float]) -> Design:
        rp, cp = block.resistors, block.capacitors
        parts: list[Part] = []
        for ref in _REFS[variant]:
            pin = block.pinned_part(ref)
            if ref == "C":
                parts.append(capacitor_part(ref, values.get(ref, 0.0), cp, pin))
            else:
                parts.append(resistor_part(ref, values.get(ref, 0.0), rp, pin))
        return Design(tuple(parts), variant)

    def _feedback_options(
        self,
        block: Block,
        run: _Run,
        cs: FloatArray,
        period: float,
    ) -> list[FloatArray]:
        rp = block.resistors
        pin = block.pinned_part("R")
        if pin is not None:
            return [np.full(cs.shape, pin.value)]
        g = run({"R": np.ones(1), "C": np.ones(1)})["period"][0]
        r = period / (cs * g)
        for _ in range(2):
            t = run({"R": r, "C": cs})["period"]
            r = r * _safe_ratio(period, t)
        return list(snap(rp.series, r, rp.low, rp.high))

    def _pair_options(
        self,
        block: Block,
        variant: str,
        run: _Run,
        cs: FloatArray,
        th: float,
        tl: float,
    ) -> dict[str, list[FloatArray]]:
        """Standard-value options for RA and RB at each capacitor."""
        rp = block.resistors
        ra_low = max(rp.low, _discharge_ra_min(block))
        pin_a, pin_b = block.pinned_part("RA"), block.pinned_part("RB")
        # nominal gains g = t/(R·C) from the full model at a probe (R ≫ r_on)
        probe = run({"RA": np.array([1e5]), "RB": np.array([1e5]), "C": np.array([1e-6])})
        g_l = float(probe["low"][0]) / (1e5 * 1e-6)
        if variant == "classic":
            g_h = float(probe["high"][0]) / (2e5 * 1e-6)
        else:
            probe = run({"RA": np.array([1e5]), "RB": np.array([1e12]), "C": np.array([1e-6])})
            g_h = float(probe["high"][0]) / (1e5 * 1e-6)
        with np.errstate(divide="ignore", invalid="ignore"):
            if pin_a is None and pin_b is None:
                ra, rb = self._solve_pair(variant, run, cs, th, tl, g_h, g_l, ra_low)
                return {
                    "RA": list(snap(rp.series, ra, ra_low, rp.high)),
                    "RB": list(snap(rp.series, rb, rp.low, rp.high)),
                }
            if pin_a is not None:
                ra_v = pin_a.value
                rb_opts = [tl / (cs * g_l)]
                if variant == "classic":
                    rb_opts.append(th / (cs * g_h) - ra_v)
                    rb_opts.append(((th + tl) / cs - ra_v * g_h) / (g_h + g_l))
                out_b: list[FloatArray] = []
                for rb in rb_opts:
                    out_b.extend(snap(rp.series, rb, rp.low, rp.high))
                opts = {"RA": [np.full(cs.shape, ra_v)], "RB": out_b}
                if pin_b is not None:
                    opts["RB"] = [np.full(cs.shape, pin_b.value)]
                return opts
            assert pin_b is not None
            rb_v = pin_b.value
            if variant == "classic":
                ra_opts = [th / (cs * g_h) - rb_v, ((th + tl) / cs - rb_v * (g_h + g_l)) / g_h]
            else:
                ra_opts = [th / (cs * g_h)]
            out_a: list[FloatArray] = []
            for ra in ra_opts:
                ra = np.where(ra < ra_low, ra_low, ra)
                out_a.extend(snap(rp.series, ra, ra_low, rp.high))
            return {"RA": out_a, "RB": [np.full(cs.shape, rb_v)]}

    @staticmethod
    def _solve_pair(
        variant: str,
        run: _Run,
        cs: FloatArray,
        th: float,
        tl: float,
        g_h: float,
        g_l: float,
        ra_low: float,
    ) -> tuple[FloatArray, FloatArray]:
        """Continuous (RA, RB) per capacitor: closed form, then two model corrections."""
        period = th + tl
        rb = tl / (cs * g_l)
        if variant == "classic":
            ra = th / (cs * g_h) - rb
            floor = ra < ra_low
            # classic cannot go below the duty of RA at its floor: keep the period instead
            rb = np.where(floor, (period / cs - ra_low * g_h) / (g_h + g_l), rb)
            ra = np.where(floor, ra_low, ra)
            for _ in range(2):
                out = run({"RA": ra, "RB": rb, "C": cs})
                s = (ra + rb) * _safe_ratio(th, out["high"])
                rb_t = rb * _safe_ratio(tl, out["low"])
                rb_p = rb * _safe_ratio(period, out["period"])
                rb = np.where(floor, rb_p, rb_t)
                ra = np.where(floor, ra_low, s - rb)
            return ra, rb
        ra = th / (cs * g_h)
        for _ in range(2):
            out = run({"RA": ra, "RB": rb, "C": cs})
            ra = ra * _safe_ratio(th, out["high"])
            rb = rb * _safe_ratio(tl, out["low"])
        return ra, rb

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of an astable.

        Parameters
        ----------
        block
            The block.
        design
            The design.
        extremes
            Worst-case ``(low, high)`` of each output.

        Returns
        -------
        list of Finding
            Duty cycle out of the circuit's reach, feedback circuit on a timer
            without rail-to-rail output, no oscillation at some corner, discharge
            current above the class limit (with the smallest RA), frequency above
            the class limit, timing resistor below the class's useful minimum,
            and the capacitor's dielectric.
        """
        timer = block.timer
        assert timer is not None
        out: list[Finding] = []
        variant = design.variant
        out.extend(_duty_findings(block, variant))
        if variant == "feedback" and not _rail_output(block):
            out.append(
                Finding(
                    "error",
                    "feedback-needs-rail-output",
                    f"the feedback circuit charges the capacitor from the timer output, but the "
                    f"{timer.name} timer class's output sits up to {timer.output_drop:g} V below "
                    f"the supply ({block.conditions.supply.low:g} V at the lowest), so the high "
                    "time depends on load and supply. Use 'timer cmos', or 'circuit classic' / "
                    "'circuit diode'.",
                )
            )
        hi_ex = extremes.get("high", (0.0, 0.0))
        lo_ex = extremes.get("low", (0.0, 0.0))
        if not (math.isfinite(hi_ex[1]) and math.isfinite(lo_ex[1])):
            which = "upper" if not math.isfinite(hi_ex[1]) else "lower"
            cause = {
                "diode": "the supply less the diode drop, or the drain through the resistors,",
                "feedback": "the output level, or the drain through R,",
                "classic": "the drain (threshold current and leakage) through the resistors",
            }[variant]
            out.append(
                Finding(
                    "error",
                    "does-not-oscillate",
                    f"at some corner the capacitor never reaches the {which} threshold: {cause} "
                    "keeps it short. Use smaller resistors with a larger capacitor, or a higher "
                    "supply.",
                )
            )
        if variant in ("classic", "diode"):
            ra = design.part("RA")
            v_max = block.conditions.supply.high
            i_dis = float(astable.discharge_current(v_max, ra.value * (1 - ra.tolerance)))
            if i_dis > timer.i_discharge_max:
                ra_min = v_max / timer.i_discharge_max
                out.append(
                    Finding(
                        "error",
                        "discharge-current",
                        f"the discharge pin sinks {i_dis * 1e3:.3g} mA from the supply through "
                        f"RA = {_ohms(ra.value)} at {v_max:g} V, above the {timer.name} class "
                        f"limit of {timer.i_discharge_max * 1e3:.3g} mA. Make RA at least "
                        f"{_ohms(ra_min / (1 - ra.tolerance))} (with its tolerance).",
                    )
                )
        f_hi = extremes.get("frequency", (0.0, 0.0))[1]
        if math.isfinite(f_hi) and f_hi > timer.f_max:
            advice = (
                "Use 'timer cmos' (about 1 MHz) or a lower frequency."
                if timer.name != "cmos"
                else "A 555-type timer is the wrong circuit here: use a Schmitt-inverter "
                "relaxation oscillator or a crystal, or a lower frequency."
            )
            out.append(
                Finding(
                    "error",
                    "frequency-above-class",
                    f"the design runs at up to {format_quantity(f_hi, 'frequency')}, "
                    f"above the {format_quantity(timer.f_max, 'frequency')} "
                    f"the {timer.name} timer class is used at. {advice}",
                )
            )
        small = [p for p in design.parts if p.ref in ("RB", "R") and p.value < timer.r_min]
        for p in small:
            out.append(
                Finding(
                    "warning",
                    "resistor-too-small",
                    f"{p.ref} = {_ohms(p.value)} is below {_ohms(timer.r_min)}: the discharge "
                    "transistor (or output) carries needless current and its saturation "
                    "shifts the timing. Prefer a larger resistor with a smaller capacitor.",
                )
            )
        out.extend(dielectric_findings(block, design.part("C")))
        return out


def _duty_findings(block: Block, variant: str) -> list[Finding]:
    """Error when the requirements ask for a duty cycle the circuit cannot make."""
    lo, hi = duty_band(block)
    if lo > hi:
        return [
            Finding(
                "error",
                "duty-contradiction",
                f"the requirements contradict each other: together they ask for a duty cycle "
                f"of at least {_pct(lo)} and at most {_pct(hi)}. Relax one of them.",
            )
        ]
    if variant == "classic" and hi <= 0.5:
        return [
            Finding(
                "error",
                "duty-out-of-reach",
                f"the requirements ask for a duty cycle of {_pct(lo)}…{_pct(hi)}, but the "
                "classic two-resistor circuit always runs above 50 % (its duty cycle is "
                "(RA + RB)/(RA + 2·RB)). Write 'circuit diode' (a steering diode across RB "
                "reaches any duty cycle), or leave out 'circuit' and let the solver choose.",
            )
        ]
    if variant == "feedback":
        f_lo, f_hi = feedback_duty_range(block)
        if not (f_lo <= hi and lo <= f_hi):
            return [
                Finding(
                    "error",
                    "duty-out-of-reach",
                    f"the requirements ask for a duty cycle of {_pct(lo)}…{_pct(hi)}, but the "
                    f"output-feedback circuit runs near 50 % ({_pct(f_lo)}…{_pct(f_hi)} with "
                    "this timer class). Write 'circuit diode' for any duty cycle, or "
                    "'circuit classic' above 50 %.",
                )
            ]
    return []


def _diode_band(block: Block) -> tuple[float, float]:
    w = block.window("diode")
    if w is None:
        return DIODE_DROP_BAND
    return (w.low, w.high)


def _safe_ratio(goal: float, t: FloatArray) -> FloatArray:
    """``goal/t`` where ``t`` is a usable time, else nan (the candidate is dropped)."""
    t = np.asarray(t, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.asarray(np.where(np.isfinite(t) & (t > 0), goal / t, np.nan), dtype=np.float64)
