"""The ``crystal`` family: the two load capacitors of a Pierce crystal oscillator.

Parts: ``C1`` (amplifier input to ground) and ``C2`` (amplifier output to ground).
Outputs:

* ``accuracy`` — total frequency error over life, a fraction: the crystal's
  calibration tolerance, its stability over the ambient range, its ageing over
  the block's life, and the pulling caused by a load that differs from the one
  the crystal is calibrated at.  All four add linearly (a plain sum), so the
  worst case from the corner engine is the exact sum of their extremes;
* ``pulling`` — the load-mismatch part alone, a fraction;
* ``load`` — the load capacitance the crystal sees, ``C1·C2/(C1 + C2) + Cs``, F;
* ``gain_margin`` — ``gm / gm_crit`` (when the amplifier's ``gm`` is stated),
  or ``gm_needed`` — the transconductance giving a margin of 5 (when it is not);
* ``drive`` — power dissipated in the crystal, W.

Choices where the statements are silent (documented here and in messages):

* **stray**: 3 pF to 5 pF when absent (common practice for pins plus a short
  trace; published application notes quote 2 pF to 5 pF);
* **swing** (peak-to-peak voltage across the crystal, for the drive level): the
  supply window when absent, i.e. a rail-to-rail CMOS inverter swing (common
  practice); the block's supply defaults to 3.3 V when not stated;
* **capacitor range**: the policy's range clipped to 1 pF … 100 pF (load
  capacitors of crystals are a few pF to a few tens of pF; the package-wide
  default range 100 pF … 100 nF is meant for RC timing); when the clipped range
  is empty, 1 pF … 100 pF is used;
* **ESR** is held at its stated maximum (the bound is what a datasheet
  guarantees, and it is the worst value for both gain margin and drive level);
  ``C0``, ``Cm`` and the frequency are fixed crystal constants;
* the crystal's **temperature stability** band is an independent factor (its
  shape over temperature is not stated, so it cannot be tied to the ambient),
  while the capacitors' tempco follows the shared ambient factor.
"""

from __future__ import annotations

import dataclasses
import functools
import itertools
import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from timespec.analysis import Factor, is_varying, rss, worst_case
from timespec.families.candidates import capacitor_part
from timespec.families.capacitors import dielectric_findings
from timespec.families.inputs import apply_part, condition_factors, part_factors
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.model import Block, CapacitorPolicy, Window
from timespec.parts import series
from timespec.parts.part import Design, Part
from timespec.physics import pierce

__all__ = [
    "CAP_HIGH",
    "CAP_LOW",
    "DEFAULT_STRAY",
    "MIN_GAIN_MARGIN",
    "Budget",
    "Crystal",
    "accuracy_budget",
    "capacitor_policy",
    "declarations",
    "declare",
    "stray_window",
]

#: Smallest load capacitor considered when the policy does not say (F).
CAP_LOW = 1e-12
#: Largest load capacitor considered when the policy does not say (F).
CAP_HIGH = 100e-12
#: Stray capacitance assumed when the block gives none (F); common practice.
DEFAULT_STRAY = Window(3e-12, 5e-12, "capacitance")
#: Gain margin below which start-up is not trusted; common practice.
MIN_GAIN_MARGIN = 5.0

_PPM = 1e-6


def stray_window(block: Block) -> Window:
    """The stray capacitance window of a crystal block.

    Parameters
    ----------
    block
        A crystal block.

    Returns
    -------
    Window
        The ``stray`` setting, or :data:`DEFAULT_STRAY` (3 pF to 5 pF, common
        practice) when absent.
    """
    return block.window("stray") or DEFAULT_STRAY


def capacitor_policy(block: Block) -> CapacitorPolicy:
    """The block's capacitor policy with its value range clipped to crystal loads.

    Parameters
    ----------
    block
        A crystal block.

    Returns
    -------
    CapacitorPolicy
        Same series, tolerance, dielectric and ageing.  Range 1 pF … 100 pF when
        the policy has the package-wide default range (none written); otherwise
        ``[max(low, 1 pF), min(high, 100 pF)]``, or 1 pF … 100 pF when that is empty.

    Notes
    -----
    The package-wide default range (100 pF … 100 nF) suits RC timing, not the few
    pF to tens of pF of crystal load capacitors; a range written for crystals
    (inside 1 pF … 100 pF) is kept as written, a range written for RC timing in a
    shared ``defaults:`` section is clipped.
    """
    p = block.capacitors
    default = CapacitorPolicy()
    if (p.low, p.high) == (default.low, default.high):
        low, high = CAP_LOW, CAP_HIGH
    else:
        low, high = max(p.low, CAP_LOW), min(p.high, CAP_HIGH)
        if low > high:
            low, high = CAP_LOW, CAP_HIGH
    return CapacitorPolicy(
        series=p.series,
        tolerance=p.tolerance,
        dielectric=p.dielectric,
        low=low,
        high=high,
        pairs=False,
        ageing=p.ageing,
    )


def _band(block: Block, key: str) -> Window:
    w = block.window(key)
    return w if w is not None else Window(0.0, 0.0, "ratio", 0.0)


def _ageing(block: Block) -> Window:
    """Ageing per year times the life (a ±3 ppm/year crystal over 5 years: ±15 ppm)."""
    w = _band(block, "aging")
    years = block.conditions.life_years
    return Window(w.low * years, w.high * years, "ratio", 0.0 if w.low <= 0 <= w.high else None)


def _needed(block: Block, key: str) -> float:
    value = block.number(key)
    if value is None:
        raise ValueError(f"crystal block {block.name!r} has no {key!r} statement")
    return value


def _band_factor(name: str, label: str, w: Window) -> Factor:
    nominal = min(max(0.0, w.low), w.high)
    return Factor(name, label, nominal, w.low, w.high, group="crystal")


def _ppm(x: float) -> str:
    return f"{x / _PPM:.3g} ppm"


def _ohms(r: float) -> str:
    return f"{r / 1e3:.3g} kΩ" if r >= 1e3 else f"{r:.3g} Ω"


def _pf(c: float) -> str:
    return f"{c * 1e12:.3g} pF"


@dataclass(frozen=True)
class Budget:
    """The frequency-error budget of one design over life, as fractions.

    Attributes
    ----------
    calibration, temperature, ageing, pulling
        Half-width (largest magnitude) of each term; ``pulling`` from the
        worst-case engine.
    worst_case
        Largest magnitude of the total from the worst-case engine (the exact
        extreme of the linear sum).
    rss
        The nominal offset (a systematic error, added linearly) plus the root sum
        of squares of every factor's contribution ``|∂y/∂x|·h`` (sensitivity from
        :func:`timespec.analysis.rss` times the factor's half-range).
    """

    calibration: float
    temperature: float
    ageing: float
    pulling: float
    worst_case: float
    rss: float


def _budget(
    block: Block,
    factors: list[Factor],
    model: Evaluate,
    accuracy: tuple[float, float],
    pulling: tuple[float, float],
) -> Budget:
    spread = rss([f for f in factors if is_varying(f)], _accuracy_only(factors, model))["accuracy"]
    half = {f.name: 0.5 * (f.high - f.low) for f in factors}
    terms = [c.sensitivity * half[c.name] for c in spread.contributions if half[c.name] > 0]
    nominal = spread.nominal

    def mag(w: Window) -> float:
        return max(abs(w.low), abs(w.high))

    return Budget(
        calibration=mag(_band(block, "tolerance")),
        temperature=mag(_band(block, "stability")),
        ageing=mag(_ageing(block)),
        pulling=max(abs(pulling[0]), abs(pulling[1])),
        worst_case=max(abs(accuracy[0]), abs(accuracy[1])),
        rss=abs(nominal) + (float(pierce.budget_rss(*terms)) if terms else 0.0),
    )


def _accuracy_only(factors: list[Factor], model: Evaluate) -> Evaluate:
    """Wrap a model: fixed factors left out of the inputs take their nominal values,
    and only ``accuracy`` is returned (what the RSS budget needs)."""
    fixed = {f.name: f.nominal for f in factors if not is_varying(f)}

    def evaluate(x: Inputs) -> dict[str, FloatArray]:
        full = dict(x)
        for name, value in fixed.items():
            full.setdefault(name, np.full(1, value))
        return {"accuracy": model(full)["accuracy"]}

    return evaluate


def accuracy_budget(block: Block, design: Design) -> Budget:
    """Worst-case and RSS frequency-error budget of a design.

    Parameters
    ----------
    block
        A crystal block.
    design
        Parts ``C1`` and ``C2``.

    Returns
    -------
    Budget
        The terms, their exact worst-case sum and their RSS, as fractions.

    Notes
    -----
    Worst case: the extremes of ``cal + temp + age + pull`` over every corner
    (exact, the sum is linear in each term).  RSS:
    ``|y_nom| + sqrt(sum_i (c_i·h_i)**2)`` with ``y_nom`` the nominal error (the
    load offset of the chosen standard values), ``c_i`` the first-order
    sensitivity and ``h_i`` the half-range of factor ``i``: the usual
    statistical stack-up, with the systematic offset added linearly.

    References
    ----------
    Sum for a guarantee, root-sum-square for a statistical figure: common practice
    for frequency budgets; first-order sensitivities as in JCGM 100 (GUM) 5.1.2.
    """
    fam = Crystal()
    factors = fam.factors(block, design)
    model = fam.evaluate(block, design.variant)
    ex = worst_case(factors, model)
    return _budget(
        block,
        factors,
        model,
        (ex["accuracy"].low, ex["accuracy"].high),
        (ex["pulling"].low, ex["pulling"].high),
    )


#: Factors that raise both capacitors' values everywhere in the box (not the
#: tempco, which multiplies ``T − 25`` and changes sign across the ambient range).
_CAP_RISING = ("C1.tol", "C1.age", "C1.drift", "C2.tol", "C2.age", "C2.drift")
#: The crystal's own ppm bands.
_XTAL = ("xtal.cal", "xtal.temp", "xtal.age")


def declarations(block: Block) -> dict[str, tuple[tuple[str, ...], tuple[str, ...]]]:
    """Outputs provably non-decreasing and non-increasing in each factor, over the box.

    Parameters
    ----------
    block
        A crystal block.

    Returns
    -------
    dict of str to (tuple of str, tuple of str)
        Factor name → ``(rising outputs, falling outputs)``; factors not listed
        declare nothing.

    Notes
    -----
    With every part value positive (each of ``1 + tol``, ``1 + drift``, ``1 + age``
    and ``1 + tc·ΔT`` is), ``Cm > 0``, ``C0 + CL > 0`` and a positive swing:

    * ``CL = C1·C2/(C1 + C2) + Cs`` rises with ``C1``, ``C2`` (``∂/∂C1 =
      (C2/(C1 + C2))² > 0``) and ``Cs``: so ``load`` rises in the capacitors'
      tolerance, ageing and drift and in the stray;
    * ``pulling = Cm/(2·(C0 + CL)) − const`` falls as ``CL`` rises, and so does
      ``accuracy = cal + temp + age + pulling``, which rises with each ppm band
      (coefficient 1);
    * ``drive = ESR·(2πf·(C0 + CL)·Vpp/(2√2))²`` rises with ``CL`` and, when the
      swing is the supply, with the supply;
    * ``gm_crit = ESR·ω²·(C0 + Cs + C1·C2/(C1 + C2))²·(C1 + C2)²/(C1·C2)`` rises
      with ``Cs``, so ``gain_margin = gm/gm_crit`` falls and ``gm_needed`` rises.
      It is NOT monotone in ``C1`` (its log-derivative has the sign of
      ``C1·(C0' + C2) − C0'·C2``, negative for a small C1), so the capacitors are
      not declared for it;
    * an output that does not read a factor at all (``load``, ``pulling``,
      ``gain_margin`` in the crystal bands or the supply; ``drive`` in the crystal
      bands) is exactly constant in it, hence both rising and falling: it is
      declared with the sign of the outputs it shares a grid with (``pulling``
      with ``accuracy``; ``load`` with ``drive``), so fewer grids are searched.

    The ambient is never declared: it acts through the tempcos' ``T − 25``.

    References
    ----------
    Load capacitance, pulling and drive level: published crystal-oscillator design
    application notes (see :mod:`timespec.physics.pierce`); the signs are our own
    derivatives, checked against an exhaustive corner search in the tests.
    """
    gain = "gain_margin" if block.number("gm") is not None else "gm_needed"
    pull_ok = (block.number("motional") or 0.0) > 0.0
    caps_rising = ("load", "drive")
    caps_falling = ("pulling", "accuracy") if pull_ok else ()
    out: dict[str, tuple[tuple[str, ...], tuple[str, ...]]] = {}
    for name in _CAP_RISING:
        out[name] = (caps_rising, caps_falling)
    stray_rising = caps_rising + ((gain,) if gain == "gm_needed" else ())
    stray_falling = caps_falling + ((gain,) if gain == "gain_margin" else ())
    out["stray"] = (stray_rising, stray_falling)
    for name in _XTAL:
        out[name] = (("accuracy", "pulling", "load", "drive", gain), ())
    # The drive rises with the supply when the swing is the supply, and does not read
    # it when a swing is stated; nothing else reads the supply.
    out["supply"] = (("accuracy", "pulling", "load", "drive", gain), ())
    return out


@functools.lru_cache(maxsize=4096)
def _declare(factor: Factor, rising: tuple[str, ...], falling: tuple[str, ...]) -> Factor:
    if not (rising or falling):
        return factor
    return dataclasses.replace(factor, rising=rising, falling=falling)


def declare(block: Block, factors: list[Factor]) -> list[Factor]:
    """The factors with their monotone outputs declared (see :func:`declarations`).

    Parameters
    ----------
    block
        A crystal block.
    factors
        Factors from :meth:`Crystal.factors`.

    Returns
    -------
    list of Factor
        The same factors, each carrying the outputs it provably raises or lowers;
        :func:`~timespec.analysis.worst_case` then gives exactly the same extremes
        from a smaller grid per group of outputs.

    Notes
    -----
    :meth:`Crystal.factors` does not apply this by itself: on the family's small
    grid the extra searches (two per group of outputs) cost more than they save.
    It pays when the grid grows (more factors, or non-monotone ones searched on
    interior points).
    """
    decl = declarations(block)
    return [_declare(f, *decl.get(f.name, ((), ()))) for f in factors]


class Crystal:
    """Pierce crystal oscillator family (load capacitors, ppm budget, gain, drive)."""

    kind = "crystal"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: accuracy, pulling, load, gain margin (or gm needed), drive.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``accuracy``, ``pulling`` (fractions), ``load`` (F), ``gain_margin``
            (dimensionless; ``gm_needed`` in A/V when the block states no ``gm``)
            and ``drive`` (W).
        """
        gain = (
            Output("gain_margin", "factor", "gain margin gm/gm_crit")
            if block.number("gm") is not None
            else Output("gm_needed", "transconductance", f"gm for a margin of {MIN_GAIN_MARGIN:g}")
        )
        return (
            Output("accuracy", "ratio", "frequency error over life"),
            Output("pulling", "ratio", "pulling by load mismatch"),
            Output("load", "capacitance", "load capacitance seen by the crystal"),
            gain,
            Output("drive", "power", "crystal drive level"),
        )

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``C1`` and ``C2``.

        Returns
        -------
        list of Factor
            Both capacitors (value, tolerance, tempco or drift, ageing), the
            ambient and supply, the stray capacitance, and the crystal's
            calibration, stability and ageing bands.
        """
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        s = stray_window(block)
        out.append(
            Factor(
                "stray",
                f"stray capacitance ({_pf(s.low)}…{_pf(s.high)})",
                s.centre,
                s.low,
                s.high,
                group="board",
            )
        )
        tol, stab, age = _band(block, "tolerance"), _band(block, "stability"), _ageing(block)
        years = block.conditions.life_years
        out.append(
            _band_factor("xtal.cal", f"crystal calibration ({_ppm(tol.low)}…{_ppm(tol.high)})", tol)
        )
        out.append(
            _band_factor(
                "xtal.temp",
                f"crystal stability over temperature ({_ppm(stab.low)}…{_ppm(stab.high)})",
                stab,
            )
        )
        out.append(
            _band_factor(
                "xtal.age",
                f"crystal ageing over {years:g} years ({_ppm(age.low)}…{_ppm(age.high)})",
                age,
            )
        )
        # Not declared here (see :func:`declare`): every group of outputs with
        # declarations costs two searches instead of one, and on this family's small
        # grid (9 to 12 two-level factors) that overhead outweighs the points saved
        # (one design's worst case took 0.6 ms plain, 1.9 ms declared).
        return out

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """The vectorised model.

        Parameters
        ----------
        block
            The block.
        variant
            Unused (one circuit).

        Returns
        -------
        Evaluate
            Samples → ``accuracy``, ``pulling``, ``load``, ``gain_margin`` or
            ``gm_needed``, ``drive``.

        Notes
        -----
        ``CL = C1·C2/(C1 + C2) + Cs``; pulling
        ``(Cm/2)·(1/(C0 + CL) − 1/(C0 + CL_spec))``; accuracy
        ``cal + temp + age + pulling``; ``gm_crit`` from
        :func:`timespec.physics.pierce.critical_gm_caps` with the stray counted
        with ``C0`` (equal capacitors: ``4·ESR·(2πf)²·(C0 + CL)²``); drive
        ``ESR·(2πf·(C0 + CL)·Vpp/(2√2))²``.  The gain margin is monotone in each
        capacitor for the near-equal pairs this family builds, so its corners are
        exact.
        """
        f = _needed(block, "frequency")
        cl_spec = _needed(block, "load")
        c0 = _needed(block, "shunt")
        cm = _needed(block, "motional")
        esr = _needed(block, "esr")
        gm = block.number("gm")
        swing = block.number("swing")
        # pulling = offset(CL) − offset(CL_spec), the second term a constant
        offset_spec = float(pierce.load_offset_ppm(cm, c0, cl_spec))

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            c1 = apply_part(x, "C1")
            c2 = apply_part(x, "C2")
            cs = x["stray"]
            cl = pierce.load_capacitance(c1, c2, cs)
            pull = (pierce.load_offset_ppm(cm, c0, cl) - offset_spec) * _PPM
            acc = x["xtal.cal"] + x["xtal.temp"] + x["xtal.age"] + pull
            gm_crit = pierce.critical_gm_caps(esr, f, c0 + cs, c1, c2)
            vpp = x["supply"] if swing is None else swing
            drive = pierce.drive_level(esr, f, c0, cl, vpp)
            out = {"accuracy": acc, "pulling": pull, "load": cl, "drive": drive}
            if gm is None:
                out["gm_needed"] = MIN_GAIN_MARGIN * gm_crit
            else:
                out["gain_margin"] = pierce.gain_margin(gm, gm_crit)
            return out

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate (C1, C2) pairs around ``2·(CL − Cs_mid)``.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Equal pairs from both standard neighbours of the ideal value, and the
            unequal pair of adjacent values between them (which centres the load
            between the two equal pairs); pinned parts are kept as given.  When the
            load is at or below the stray capacitance, the smallest allowed pair
            (the closest a design can come; the findings say why it fails).

        Notes
        -----
        Equal capacitors: ``C1 = C2 = 2·(CL − Cs)`` with ``Cs`` the middle of the
        stray window.  With one capacitor pinned, the other solves
        ``C1·C2/(C1 + C2) = CL − Cs`` and is snapped to both neighbours.  Of an
        unequal pair the larger goes on C2 (load and ``gm_crit`` are symmetric in
        the two, so the order is a labelling choice).
        """
        policy = capacitor_policy(block)
        cl_spec = _needed(block, "load")
        cs = stray_window(block).centre
        pin1, pin2 = block.pinned_part("C1"), block.pinned_part("C2")
        if pin1 is not None and pin2 is not None:
            return [
                Design(
                    (capacitor_part("C1", 0, policy, pin1), capacitor_part("C2", 0, policy, pin2))
                )
            ]
        series_cap = cl_spec - cs
        if pin1 is not None or pin2 is not None:
            pinned = pin1 if pin1 is not None else pin2
            assert pinned is not None
            other = "C2" if pin1 is not None else "C1"
            values: list[float] = []
            if series_cap > 0 and pinned.value > series_cap:
                ideal = pinned.value * series_cap / (pinned.value - series_cap)
                values = _neighbours(policy, ideal)
            if not values:
                values = [float(v) for v in _allowed(policy)[:1]]
            out = []
            for v in values:
                free = capacitor_part(other, v, policy)
                fixed = capacitor_part(pinned.ref, 0, policy, pinned)
                pair = (fixed, free) if pinned.ref == "C1" else (free, fixed)
                out.append(Design(pair))
            return out
        if series_cap <= 0:
            smallest = _allowed(policy)[:1]
            return [_pair(policy, float(v), float(v)) for v in smallest]
        vals = _neighbours(policy, 2.0 * series_cap)
        if len(vals) == 1:
            vals = _around(policy, vals[0])
        designs = [_pair(policy, v, v) for v in vals]
        designs += [_pair(policy, a, b) for a, b in itertools.pairwise(vals)]
        return designs

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of a Pierce oscillator.

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
            Load against stray, gain margin, drive level (with a series resistor
            suggestion), unequal capacitors, the ppm budget, and the dielectrics.
        """
        out: list[Finding] = []
        c1, c2 = design.part("C1"), design.part("C2")
        cl_spec = _needed(block, "load")
        f = _needed(block, "frequency")
        s = stray_window(block)
        out.extend(_load_findings(block, cl_spec, s, capacitor_policy(block)))
        out.extend(_gain_findings(block, extremes))
        out.extend(_drive_findings(block, extremes, f, c2))
        if not math.isclose(c1.value, c2.value, rel_tol=1e-9):
            out.append(
                Finding(
                    "note",
                    "unequal-caps",
                    f"C1 = {_pf(c1.value)} and C2 = {_pf(c2.value)} differ: the pair centres the "
                    f"load better than equal standard values; swapping them does not change the "
                    "load or the gain margin.",
                )
            )
        factors = self.factors(block, design)
        b = _budget(
            block,
            factors,
            self.evaluate(block, design.variant),
            extremes["accuracy"],
            extremes["pulling"],
        )
        out.append(
            Finding(
                "note",
                "ppm-budget",
                f"frequency error over {block.conditions.life_years:g} years: worst case "
                f"±{_ppm(b.worst_case)} (calibration {_ppm(b.calibration)} + temperature "
                f"{_ppm(b.temperature)} + ageing {_ppm(b.ageing)} + load pulling "
                f"{_ppm(b.pulling)}), RSS ±{_ppm(b.rss)}.",
            )
        )
        for part in (c1, c2):
            out.extend(dielectric_findings(block, part))
        return out


# --------------------------------------------------------------------------
# helpers


def _allowed(policy: CapacitorPolicy) -> FloatArray:
    return _values(policy.series, policy.low, policy.high)


@functools.lru_cache(maxsize=64)
def _values(name: str, low: float, high: float) -> FloatArray:
    out = np.asarray(series.values_between(name, low, high), dtype=np.float64)
    out.setflags(write=False)
    return out


def _neighbours(policy: CapacitorPolicy, x: float) -> list[float]:
    """Standard values just below and above ``x`` inside the policy range (one if x is one)."""
    allowed = _allowed(policy)
    if allowed.size == 0:
        return []
    if x <= allowed[0]:
        return [float(allowed[0])]
    if x >= allowed[-1]:
        return [float(allowed[-1])]
    below, above = series.neighbours(policy.series, x)
    return sorted({below, above})


def _around(policy: CapacitorPolicy, v: float) -> list[float]:
    """A standard value and its neighbours in the series, inside the policy range."""
    allowed = [float(a) for a in _allowed(policy)]
    i = min(range(len(allowed)), key=lambda k: abs(allowed[k] - v))
    return allowed[max(0, i - 1) : i + 2]


def _pair(policy: CapacitorPolicy, a: float, b: float) -> Design:
    return Design((capacitor_part("C1", a, policy), capacitor_part("C2", b, policy)))


def _load_findings(
    block: Block, cl_spec: float, s: Window, policy: CapacitorPolicy
) -> list[Finding]:
    smallest = float(_allowed(policy)[0]) if _allowed(policy).size else policy.low
    where = "" if block.window("stray") is not None else " (assumed; state 'stray' to set it)"
    if cl_spec <= s.centre:
        need_load = s.high + smallest / 2.0
        need_stray = cl_spec - smallest / 2.0
        lower = (
            f"or cut the stray below {_pf(need_stray)} (shorter traces, smaller pads)"
            if need_stray > 0
            else "no realistic stray is small enough for this crystal"
        )
        return [
            Finding(
                "error",
                "load-below-stray",
                f"the crystal wants a load of {_pf(cl_spec)} but the stray capacitance alone is "
                f"{_pf(s.low)}…{_pf(s.high)}{where}: C1·C2/(C1 + C2) would have to be "
                f"{_pf(cl_spec - s.centre)} or less, i.e. negative. Choose a crystal specified "
                f"for a load of at least {_pf(need_load)} {lower}.",
            )
        ]
    if cl_spec < s.high:
        return [
            Finding(
                "warning",
                "load-near-stray",
                f"the crystal's load {_pf(cl_spec)} is below the highest stray {_pf(s.high)}"
                f"{where}: on a board at that stray no capacitor value reaches the load, and the "
                "pulling term carries it. A crystal for a larger load is more robust.",
            )
        ]
    return []


def _gain_findings(block: Block, extremes: Mapping[str, tuple[float, float]]) -> list[Finding]:
    gm = block.number("gm")
    if gm is None:
        need = extremes["gm_needed"][1]
        return [
            Finding(
                "note",
                "gm-needed",
                f"the amplifier needs gm ≥ {need * 1e3:.3g} mA/V for a gain margin of "
                f"{MIN_GAIN_MARGIN:g} at worst case (common practice); state 'gm' to check it.",
            )
        ]
    low = extremes["gain_margin"][0]
    if low >= MIN_GAIN_MARGIN:
        return []
    gm_crit = gm / low if low > 0 else math.inf
    return [
        Finding(
            "error",
            "low-gain-margin",
            f"the gain margin falls to {low:.3g} at worst case (gm {gm * 1e3:.3g} mA/V over "
            f"gm_crit {gm_crit * 1e3:.3g} mA/V); at least {MIN_GAIN_MARGIN:g} is common practice "
            "for reliable start-up. Use an amplifier with gm ≥ "
            f"{MIN_GAIN_MARGIN * gm_crit * 1e3:.3g} mA/V, a crystal with lower ESR, "
            "or a crystal for a smaller load (smaller C1, C2).",
        )
    ]


def _drive_findings(
    block: Block, extremes: Mapping[str, tuple[float, float]], f: float, c2: Part
) -> list[Finding]:
    limit = block.number("drive")
    high = extremes["drive"][1]
    if limit is None or high <= limit:
        return []
    r = float(pierce.series_resistor(f, c2.value))
    r_std = series.nearest("E12", r)
    swing = block.number("swing")
    basis = (
        f"a {swing:g} Vpp swing"
        if swing is not None
        else f"a rail-to-rail swing of up to {block.conditions.supply.high:g} V (state 'swing')"
    )
    return [
        Finding(
            "error",
            "overdrive",
            f"the crystal may dissipate {high * 1e6:.4g} µW with {basis}, above its "
            f"{limit * 1e6:.3g} µW limit. Add a series resistor of about "
            f"{_ohms(r_std)} (the reactance of C2 = {_pf(c2.value)} at "
            f"{f / 1e6:.6g} MHz, a starting value) between the amplifier output and C2, then "
            "confirm the drive on the bench; it also lowers the gain margin.",
        )
    ]
