"""The typed, frozen model of a spec.

Everything here is plain SI floats (°C for temperatures, fractions for
tolerances) and validates itself on construction.  The parser and the
statement table build these; the solver and analysis read them.  Nothing in
this module knows about text.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass, field

from timespec.errors import Pos
from timespec.parts.devices import GateClass, TimerClass

__all__ = [
    "BLOCK_KINDS",
    "BUILTIN_CAPACITORS",
    "DESIGNATOR",
    "MAX_SAMPLES",
    "MAX_SEED",
    "Block",
    "CapacitorPolicy",
    "Conditions",
    "Fixture",
    "PinnedPart",
    "Requirement",
    "ResistorPolicy",
    "Spec",
    "Statistics",
    "Window",
    "builtin_resistor_high",
]

#: The circuit families a block can describe.
BLOCK_KINDS = ("oneshot", "astable", "delay", "relaxation", "crystal")

#: A board reference designator: a class code of one to four capital letters, then a
#: number from 1 with no leading zero (``R12``, ``C7``; IEEE 315 / ASME Y14.44 reference
#: designation, letters then number; the length limits are common practice).
DESIGNATOR = re.compile(r"[A-Z]{1,4}[1-9][0-9]{0,5}")


@dataclass(frozen=True)
class Window:
    """An interval of one quantity, in SI units.

    Attributes
    ----------
    low, high
        The ends; ``-inf``/``inf`` for an open side.
    kind
        Kind of quantity (see :data:`timespec.units.KINDS`).
    nominal
        The value the interval was written around, if any.
    """

    low: float
    high: float
    kind: str
    nominal: float | None = None

    def __post_init__(self) -> None:
        if math.isnan(self.low) or math.isnan(self.high):
            raise ValueError("a window end is not a number")
        if self.low > self.high:
            raise ValueError(f"the window is inverted: {self.low:g} > {self.high:g}")
        if self.nominal is not None and not (self.low <= self.nominal <= self.high):
            raise ValueError("the nominal value lies outside its own window")

    @property
    def centre(self) -> float:
        """The nominal value if given, else the midpoint (or the finite end of a bound)."""
        if self.nominal is not None:
            return self.nominal
        if math.isinf(self.low) and math.isinf(self.high):
            return 0.0
        if math.isinf(self.high):
            return self.low
        if math.isinf(self.low):
            return self.high
        return 0.5 * (self.low + self.high)

    def contains(self, low: float, high: float) -> bool:
        """Whether ``[low, high]`` lies inside this window.

        Parameters
        ----------
        low, high
            The interval to test.

        Returns
        -------
        bool
            True when both ends are inside (ends included).
        """
        return self.low <= low and high <= self.high


@dataclass(frozen=True)
class Requirement:
    """One required window of a measured quantity, e.g. the width of a one-shot.

    Attributes
    ----------
    quantity
        What is measured: ``"width"``, ``"frequency"``, ``"duty"``, ``"delay"``, ...
    window
        Where it must stay.
    pos
        The statement that asked for it.
    """

    quantity: str
    window: Window
    pos: Pos | None = field(default=None, compare=False)


@dataclass(frozen=True)
class ResistorPolicy:
    """Which resistors the solver may use and how they behave.

    Attributes
    ----------
    series
        IEC 60063 series name.
    tolerance
        Relative tolerance (0.01 for ±1 %).
    tempco_ppm
        Temperature coefficient bound, ±ppm/K.
    low, high
        Allowed values, Ω.
    pairs
        Whether two standard values in series or parallel may stand for one part.
    ageing
        Bound on the relative drift per year (fraction).
    """

    series: str = "E96"
    tolerance: float = 0.01
    tempco_ppm: float = 100.0
    low: float = 1e3
    high: float = 1e6
    pairs: bool = False
    ageing: float = 0.0

    def __post_init__(self) -> None:
        _check_policy(self.tolerance, self.low, self.high, self.ageing)
        if self.tempco_ppm < 0:
            raise ValueError("a tempco bound is written as a size, e.g. 100 ppm/K")


@dataclass(frozen=True)
class CapacitorPolicy:
    """Which capacitors the solver may use and how they behave.

    Attributes
    ----------
    series
        IEC 60063 series name.
    tolerance
        Relative tolerance.
    dielectric
        Dielectric class name (EIA-198 code, or film / electrolytic kind).
    low, high
        Allowed values, F.
    pairs
        Whether two standard values in series or parallel may stand for one part.
    ageing
        Bound on the relative drift per year (fraction).
    rated_voltage
        Rated DC voltage of the capacitors, V, or ``None`` for the default rating class
        (a multiple of the highest supply, see
        :data:`timespec.families.capacitors.CLASS2_RATING_FACTOR`); sets the DC-bias loss
        of class 2 ceramics.
    leakage
        The capacitors' leakage rating ``(k, floor)``: ``max(k·C·V_rated, floor)``
        with C in µF and V in V giving µA (the datasheet form "0.01 CV or 3 µA"),
        ``floor`` in A; ``(0, I)`` for a plain bound ``I``.  ``None``: the built-in
        rule for electrolytics, none for ceramics and film
        (:func:`timespec.families.capacitors.capacitor_leakage`).
    """

    series: str = "E12"
    tolerance: float = 0.05
    dielectric: str = "C0G"
    low: float = 100e-12
    high: float = 100e-9
    pairs: bool = False
    ageing: float = 0.0
    rated_voltage: float | None = None
    leakage: tuple[float, float] | None = None

    def __post_init__(self) -> None:
        _check_policy(self.tolerance, self.low, self.high, self.ageing)
        _check_rating(self.rated_voltage)
        _check_leakage(self.leakage)


def _check_leakage(leakage: tuple[float, float] | None) -> None:
    if leakage is not None and not all(math.isfinite(v) and v >= 0 for v in leakage):
        raise ValueError("a leakage rating is a size, e.g. leakage 0.01 of CV or 3 uA")


def _check_rating(rated: float | None) -> None:
    if rated is not None and not (math.isfinite(rated) and rated > 0):
        raise ValueError("a rated voltage must be a positive, finite voltage, e.g. 25 V")


def _check_policy(tolerance: float, low: float, high: float, ageing: float) -> None:
    if not (0.0 <= tolerance < 1.0):
        raise ValueError(f"a part tolerance must lie between 0 and 100 %, not {tolerance:.4g}")
    if not (0.0 < low <= high):
        raise ValueError("the allowed value range must be positive and not inverted")
    if ageing < 0:
        raise ValueError("an ageing bound is written as a size, e.g. 0.1 %/year")


#: The built-in capacitor technologies, used when no ``capacitors`` statement is given
#: (crystal blocks keep the single :class:`CapacitorPolicy` default).  The solver picks
#: across them and prefers the steadier dielectric when several meet
#: (:func:`timespec.parts.dielectrics.steadiness`).  Grades and value ranges are common
#: practice, from memory: C0G chip ceramics in 5 % up to about 10 nF in small cases;
#: polypropylene film in 2 % precision grades from 1 nF to about 2.2 µF; polyester film in
#: 5 % above that to about 10 µF; aluminium electrolytics in 20 % and E6 values from
#: 1 µF, with the class leakage rule 0.01·CV or 3 µA
#: (:data:`timespec.families.capacitors.ELECTROLYTIC_LEAKAGE`).
BUILTIN_CAPACITORS: tuple[CapacitorPolicy, ...] = (
    CapacitorPolicy(series="E12", tolerance=0.05, dielectric="C0G", low=100e-12, high=10e-9),
    CapacitorPolicy(series="E24", tolerance=0.02, dielectric="PP", low=1e-9, high=2.2e-6),
    CapacitorPolicy(series="E12", tolerance=0.05, dielectric="PET", low=1.2e-6, high=10e-6),
    CapacitorPolicy(series="E6", tolerance=0.20, dielectric="AL", low=1e-6, high=4.7e-3),
)

#: Tops of the built-in resistor range of a timer block: the classic 1 MΩ, or 10 MΩ when
#: the timer class's worst threshold current through it drops at most
#: :data:`THRESHOLD_DROP_SHARE` of the threshold's headroom (common practice: the input
#: current of a timing node should stay a small fraction of its charge current).
RESISTOR_TOPS: tuple[float, float] = (1e6, 10e6)
#: Largest share of the threshold headroom (a third of the lowest supply) that the
#: threshold current may drop across the built-in top resistor (common practice).
THRESHOLD_DROP_SHARE = 0.01


def builtin_resistor_high(timer: TimerClass | None, supply_low: float) -> float:
    """The top of the built-in resistor range for a block's timer class.

    Parameters
    ----------
    timer
        The block's timer class, or ``None`` (no timer: the classic top).
    supply_low
        The lowest supply, V.

    Returns
    -------
    float
        Ω: 10 MΩ when ``i_threshold_max · 10 MΩ`` is at most 1 % of ``supply_low / 3``
        (a CMOS class), else 1 MΩ (a bipolar class, whose 250 nA would drop 2.5 V).
    """
    low, high = RESISTOR_TOPS
    if timer is None:
        return low
    headroom = supply_low / 3.0
    return high if timer.i_threshold_max * high <= THRESHOLD_DROP_SHARE * headroom else low


@dataclass(frozen=True)
class PinnedPart:
    """A part the spec fixes: verified, not chosen.

    Attributes
    ----------
    ref
        Reference in the circuit (``R``, ``RA``, ``C1`` ...).
    kind
        ``"resistance"`` or ``"capacitance"``.
    value
        Ω or F.
    tolerance
        Relative tolerance, or ``None`` for the policy's.
    series
        The series it was taken from, if stated.
    tempco_ppm
        Resistor tempco bound (±ppm/K), or ``None`` for the policy's.
    dielectric
        Capacitor dielectric, or ``None`` for the policy's.
    pos
        Where it was written.
    rated_voltage
        Capacitor rated DC voltage, V, or ``None`` for the policy's.
    leakage
        Capacitor leakage rating ``(k, floor)`` as for
        :attr:`CapacitorPolicy.leakage`, or ``None`` for the policy's.
    """

    ref: str
    kind: str
    value: float
    tolerance: float | None = None
    series: str | None = None
    tempco_ppm: float | None = None
    dielectric: str | None = None
    pos: Pos | None = field(default=None, compare=False)
    rated_voltage: float | None = None
    leakage: tuple[float, float] | None = None

    def __post_init__(self) -> None:
        if not (self.value > 0 and math.isfinite(self.value)):
            raise ValueError(f"part {self.ref} must have a positive value")
        if self.tolerance is not None and not (0.0 <= self.tolerance < 1.0):
            raise ValueError(f"part {self.ref} has a tolerance outside 0…100 %")
        if self.rated_voltage is not None and self.kind != "capacitance":
            raise ValueError(f"part {self.ref} is not a capacitor; only capacitors are rated")
        if self.leakage is not None and self.kind != "capacitance":
            raise ValueError(f"part {self.ref} is not a capacitor; only capacitors leak here")
        _check_rating(self.rated_voltage)
        _check_leakage(self.leakage)


#: Most Monte Carlo samples a run may ask for (about 15 s for a small spec; the
#: percentiles and yield are long settled by then).
MAX_SAMPLES = 10_000_000

#: Largest Monte Carlo seed (a 63-bit whole number).
MAX_SEED = 2**63 - 1


@dataclass(frozen=True)
class Statistics:
    """How Monte Carlo samples the parts.

    Attributes
    ----------
    samples
        Number of Monte Carlo samples.
    seed
        Random seed; the same seed gives byte-identical results.
    distribution
        ``"uniform"`` within tolerance, or ``"normal"`` truncated at the tolerance.
    sigmas
        For ``"normal"``: how many standard deviations the tolerance spans.
    """

    samples: int = 20_000
    seed: int = 2026
    distribution: str = "uniform"
    sigmas: float = 3.0

    def __post_init__(self) -> None:
        if not (1 <= self.samples <= MAX_SAMPLES):
            raise ValueError(f"the sample count must lie from 1 to {MAX_SAMPLES:,}")
        if not (0 <= self.seed <= MAX_SEED):
            raise ValueError("the seed must lie from 0 to 2**63 - 1")
        if self.distribution not in ("uniform", "normal"):
            raise ValueError("the spread is 'uniform' or 'normal'")
        if not self.sigmas > 0:
            raise ValueError("the number of sigmas must be positive")


@dataclass(frozen=True)
class Conditions:
    """Operating conditions of a block.

    Attributes
    ----------
    supply
        Supply voltage window, V.
    ambient_low, ambient_high
        Ambient temperature range, °C.
    life_years
        Service life for ageing, years.
    """

    supply: Window
    ambient_low: float = 25.0
    ambient_high: float = 25.0
    life_years: float = 0.0

    def __post_init__(self) -> None:
        if self.supply.low <= 0:
            raise ValueError("the supply must be positive")
        if self.ambient_low > self.ambient_high:
            raise ValueError("the ambient range is inverted")
        if self.life_years < 0:
            raise ValueError("the life must not be negative")


@dataclass(frozen=True)
class Block:
    """One circuit to design or check.

    Attributes
    ----------
    kind
        One of :data:`BLOCK_KINDS`.
    name
        The block's name from its header.
    requirements
        What must hold.
    conditions
        Supply, ambient range, life.
    resistors, capacitors
        Part policies.
    timer
        Timer class for 555-type blocks, else ``None``.
    gate
        Schmitt-inverter class for relaxation blocks, else ``None``.
    pinned
        Parts the spec fixes.
    settings
        Family-specific settings by statement keyword: a :class:`Window`, a
        float (SI), or a word.
    statistics
        Monte Carlo settings.
    pos
        Position of the header.
    positions
        Where each statement keyword was written, for messages.
    refs
        Board reference designators by part reference (``{"R": ("R12",), "C": ("C7",)}``),
        from the ``refs`` statement; a second designator names the second part of a
        series/parallel pair.  Empty when the spec gives none.
    capacitor_options
        Further capacitor technologies the solver may choose from besides
        ``capacitors`` (each with its own series, tolerance, dielectric and value
        range); empty when there is one.  See :meth:`capacitor_policies`.
    """

    kind: str
    name: str
    requirements: tuple[Requirement, ...]
    conditions: Conditions
    resistors: ResistorPolicy
    capacitors: CapacitorPolicy
    timer: TimerClass | None = None
    gate: GateClass | None = None
    pinned: tuple[PinnedPart, ...] = ()
    settings: Mapping[str, Window | float | str] = field(default_factory=dict)
    statistics: Statistics = Statistics()
    pos: Pos | None = field(default=None, compare=False)
    positions: Mapping[str, Pos] = field(default_factory=dict, compare=False)
    refs: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    capacitor_options: tuple[CapacitorPolicy, ...] = ()

    def __post_init__(self) -> None:
        if self.kind not in BLOCK_KINDS:
            raise ValueError(f"unknown block kind {self.kind!r}")
        for ref, names in self.refs.items():
            if not 1 <= len(names) <= 2:
                raise ValueError(f"part {ref} takes one designator (two for a pair)")
            for name in names:
                if not DESIGNATOR.fullmatch(name):
                    raise ValueError(f"{name!r} is not a reference designator such as R12")

    def requirement(self, quantity: str) -> Requirement | None:
        """Return the requirement on a quantity, or ``None``.

        Parameters
        ----------
        quantity
            e.g. ``"width"``.

        Returns
        -------
        Requirement or None
            The requirement, when the block states one.
        """
        for req in self.requirements:
            if req.quantity == quantity:
                return req
        return None

    def window(self, key: str) -> Window | None:
        """A window setting, or ``None`` when absent.

        Parameters
        ----------
        key
            Statement keyword.

        Returns
        -------
        Window or None
            The setting.
        """
        value = self.settings.get(key)
        return value if isinstance(value, Window) else None

    def number(self, key: str) -> float | None:
        """A numeric setting in SI units, or ``None`` when absent.

        Parameters
        ----------
        key
            Statement keyword.

        Returns
        -------
        float or None
            The setting.
        """
        value = self.settings.get(key)
        return float(value) if isinstance(value, float | int) else None

    def word(self, key: str) -> str | None:
        """A word setting, or ``None`` when absent.

        Parameters
        ----------
        key
            Statement keyword.

        Returns
        -------
        str or None
            The setting.
        """
        value = self.settings.get(key)
        return value if isinstance(value, str) else None

    def capacitor_policies(self) -> tuple[CapacitorPolicy, ...]:
        """Every capacitor technology the solver may use, ``capacitors`` first.

        Returns
        -------
        tuple of CapacitorPolicy
            ``(capacitors, *capacitor_options)``.
        """
        return (self.capacitors, *self.capacitor_options)

    def pinned_part(self, ref: str) -> PinnedPart | None:
        """The pinned part with this reference, or ``None``.

        Parameters
        ----------
        ref
            Part reference, e.g. ``"R"``.

        Returns
        -------
        PinnedPart or None
            The part.
        """
        for part in self.pinned:
            if part.ref == ref:
                return part
        return None


#: How a fixture turns the required window into pass/fail limits.
DECISIONS = ("guarded", "simple", "expected")


@dataclass(frozen=True)
class Fixture:
    """The test fixture that measures the timing of built units.

    Attributes
    ----------
    clock
        Nominal frequency of the fixture's capture clock, Hz.
    clock_ppm
        Bound on the capture clock's frequency error (fraction, 50e-6 for ±50 ppm).
    uncertainty
        Bound on every other measurement error (trigger latency, jitter), s.
    decision
        ``"guarded"`` — accept only inside the requirement narrowed by the
        measurement uncertainty (guarded acceptance, ILAC-G8:2019, w = U);
        ``"simple"`` — accept inside the requirement (w = 0);
        ``"expected"`` — accept inside the design's worst-case window widened by
        the uncertainty, so that every unit built as designed passes and
        assembly faults are caught.
    """

    clock: float
    clock_ppm: float = 0.0
    uncertainty: float = 0.0
    decision: str = "guarded"

    def __post_init__(self) -> None:
        if not (self.clock > 0 and math.isfinite(self.clock)):
            raise ValueError("the fixture clock must be a positive frequency")
        if not (0 <= self.clock_ppm < 0.1):
            raise ValueError("the fixture clock tolerance must lie between 0 and 10 %")
        if self.uncertainty < 0:
            raise ValueError("the measurement uncertainty is written as a size")
        if self.decision not in DECISIONS:
            raise ValueError(f"the decision rule is one of {', '.join(DECISIONS)}")


@dataclass(frozen=True)
class Spec:
    """A parsed spec: its blocks in the order written.

    Attributes
    ----------
    blocks
        The circuits.
    path
        The file it came from, if any.
    fixture
        The test fixture, when the spec has a ``fixture:`` section.
    """

    blocks: tuple[Block, ...]
    path: str | None = None
    fixture: Fixture | None = None

    def block(self, name: str) -> Block:
        """Return the block with this name.

        Parameters
        ----------
        name
            The block name.

        Returns
        -------
        Block
            The block.

        Raises
        ------
        KeyError
            When no block has that name.
        """
        for blk in self.blocks:
            if blk.name == name:
                return blk
        raise KeyError(name)
