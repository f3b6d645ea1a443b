"""Generic device classes: 555-type timers and Schmitt-trigger inverters.

These are parameter sets for *classes* of device, not for any one product.
Each number says where it came from:

* **[DS]** — typical of the generic device-class datasheets of several makers;
* **[CP]** — common practice, no single source;
* **[Mem]** — from memory, not confirmed against a document; override it in the
  spec when your part's datasheet says otherwise.

A spec can override the timing-accuracy figures of a timer class
(``timer cmos, initial ±2%, drift ±100 ppm/K``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from timespec.parts.validity import Held

__all__ = [
    "BOARD_STRAY",
    "GATE_CLASSES",
    "LOGIC_INPUT_CAPACITANCE",
    "LOGIC_INPUT_LEAKAGE",
    "TIMER_CLASSES",
    "GateClass",
    "TimerClass",
    "gate_class",
    "ratio_band_from_initial",
    "timer_class",
]


def ratio_band_from_initial(initial: float) -> tuple[float, float]:
    """Upper-threshold ratio band that reproduces a guaranteed monostable timing error.

    Parameters
    ----------
    initial
        The guaranteed initial timing error of the monostable, as a fraction
        (0.03 for ±3 %).

    Returns
    -------
    tuple of float
        ``(k_low, k_high)``, the upper threshold as a fraction of the supply.

    Notes
    -----
    The two thresholds of a 555-type timer come from one resistor divider, so
    they track each other; the datasheet threshold-voltage window (e.g.
    8.8–11.2 V at 15 V) is far wider than the guaranteed timing error and would
    grossly overstate the spread.  We therefore use the guaranteed timing error
    and find the threshold ratio k that reproduces it: the monostable width is
    ``RC·ln(1/(1 − k))`` (start at 0 V), nominal ``RC·ln 3`` at k = 2/3, so
    ``k = 1 − 3^−(1 ± initial)``.
    """
    low = 1.0 - 3.0 ** (-(1.0 - initial))
    high = 1.0 - 3.0 ** (-(1.0 + initial))
    return (low, high)


@dataclass(frozen=True)
class TimerClass:
    """Parameters of a generic 555-type timer class (SI units).

    Attributes
    ----------
    name
        ``"bipolar"`` or ``"cmos"``.
    supply_min, supply_max
        Supply range, V.  [DS]
    initial
        Guaranteed initial monostable timing error (fraction).  [DS]
    drift_ppm
        Bound on the timing drift with temperature, ±ppm/K.  [DS]
    supply_drift
        Bound on the timing change per volt of supply away from nominal, ±1/V.  [Mem]
    r_on_max
        Discharge transistor on-resistance bound, Ω, from the saturation
        voltage at the stated test current.  [DS]
    i_threshold_max
        Threshold-pin input current bound, A (drains the timing node).  [DS]
    i_discharge_max
        Largest current the discharge pin should sink in an astable, A.  [Mem]
    f_max
        Highest astable frequency the class is used at, Hz.  [Mem]
    r_min
        Smallest timing resistor worth using, Ω.  [CP]
    output_drop
        Output high level below the supply at light load, V (feedback astable).  [Mem]
    r_out_high, r_out_low
        Output resistance band ``(low, high)`` of the high side (sourcing) and of
        the low side (sinking), Ω: the output as a source with this resistance
        behind its light-load level (feedback astable).  [Mem]
    i_out_max
        Largest output current the class should source or sink, A.  [Mem]/[DS]
    r_on_test_current
        Discharge current at which the saturation voltage behind ``r_on_max`` is
        specified, A.  [DS]
    t_pd
        Delay band ``(min, max)`` from a threshold crossing to the output edge
        (comparator and flip-flop), s, at supplies of 5 V and above.  [Mem]
    c_node
        Capacitance the timer's own pins add to the timing node, band
        ``(min, max)``, F (threshold with trigger or discharge).  [Mem]
    ith_ambient
        Ambient range ``(low, high)``, °C, over which ``i_threshold_max`` is
        quoted (:attr:`ith_held`).  [Mem]
    ith_grows
        Which side the threshold current grows beyond that range: ``"hot"`` (a
        CMOS input's junction leakage, about doubling every 10 K [CP]) or
        ``"cold"`` (a bipolar input's base current, about doubling over 80 K as
        the current gain falls [Mem]); on the other side it falls, so the quoted
        bound stays a bound there (:meth:`threshold_current_max`).
    drift_ambient
        Ambient range, °C, over which the drift bound ``drift_ppm`` is quoted
        (:attr:`drift_held`).  [Mem]
    supply_drift_supply
        Supply range, V, over which ``supply_drift`` is quoted
        (:attr:`supply_drift_held`).  [Mem]
    """

    name: str
    supply_min: float
    supply_max: float
    initial: float
    drift_ppm: float
    supply_drift: float
    r_on_max: float
    i_threshold_max: float
    i_discharge_max: float
    f_max: float
    r_min: float
    output_drop: float
    r_out_high: tuple[float, float] = (50.0, 300.0)
    r_out_low: tuple[float, float] = (50.0, 300.0)
    i_out_max: float = 10e-3
    r_on_test_current: float = 4.5e-3
    t_pd: tuple[float, float] = (50e-9, 300e-9)
    c_node: tuple[float, float] = (2e-12, 10e-12)
    ith_ambient: tuple[float, float] = (0.0, 70.0)
    ith_grows: str = "cold"
    drift_ambient: tuple[float, float] = (-55.0, 125.0)
    supply_drift_supply: tuple[float, float] = (4.5, 16.0)

    def threshold_current_max(self, ambient_low: float, ambient_high: float) -> float:
        """Threshold-pin input current bound over an ambient range, A.

        Parameters
        ----------
        ambient_low, ambient_high
            The design's ambient range, °C.

        Returns
        -------
        float
            ``i_threshold_max`` inside :attr:`ith_ambient`; beyond it, on the side
            where the current grows (:attr:`ith_grows`), ``i_threshold_max`` times
            ``2^(ΔT/10 K)`` (hot: junction leakage about doubles every 10 K [CP])
            or ``2^(ΔT/80 K)`` (cold: a bipolar base current about doubles from
            25 °C to −55 °C [Mem]), ``ΔT`` the distance past the range's end.
        """
        lo, hi = self.ith_ambient
        if self.ith_grows == "hot":
            excess, doubling = max(0.0, ambient_high - hi), 10.0
        else:
            excess, doubling = max(0.0, lo - ambient_low), 80.0
        return self.i_threshold_max * math.pow(2.0, excess / doubling)

    @property
    def ith_held(self) -> Held:
        """Where ``i_threshold_max`` holds: the ambient range it is quoted over.

        Returns
        -------
        Held
            :attr:`ith_ambient`; beyond it the model widens the bound
            (:meth:`threshold_current_max`).  [Mem]
        """
        return Held(
            f"{self.name} timer threshold current ≤ {_amps(self.i_threshold_max)}",
            "ambient",
            self.ith_ambient[0],
            self.ith_ambient[1],
            "temperature",
            "[Mem] generic class datasheets quote it over this range",
        )

    @property
    def drift_held(self) -> Held:
        """Where the drift bound ``drift_ppm`` holds.

        Returns
        -------
        Held
            :attr:`drift_ambient`.  [Mem]
        """
        return Held(
            f"{self.name} timer drift ±{self.drift_ppm:g} ppm/K",
            "ambient",
            self.drift_ambient[0],
            self.drift_ambient[1],
            "temperature",
            "[Mem] generic class datasheets quote it over this range",
        )

    @property
    def supply_drift_held(self) -> Held:
        """Where the supply sensitivity ``supply_drift`` holds.

        Returns
        -------
        Held
            :attr:`supply_drift_supply`.  [Mem]
        """
        return Held(
            f"{self.name} timer supply sensitivity ±{self.supply_drift * 100:g} %/V",
            "supply",
            self.supply_drift_supply[0],
            self.supply_drift_supply[1],
            "voltage",
            "[Mem] generic class datasheets quote it over this supply range",
        )

    def delay_band(self, supply_low: float) -> tuple[float, float]:
        """Threshold-to-output delay band at the design's lowest supply, s.

        Parameters
        ----------
        supply_low
            The lowest supply of the design, V.

        Returns
        -------
        tuple of float
            :attr:`t_pd`; for the CMOS class below 5 V its top grows as
            ``(5 V / supply_low)²`` (CMOS delay grows about as the square of the
            drive lost at a lower supply [Mem]); the bipolar class is used from
            4.5 V only and is taken as quoted.
        """
        lo, hi = self.t_pd
        if self.name == "cmos" and 0.0 < supply_low < 5.0:
            hi *= (5.0 / supply_low) ** 2
        return lo, hi

    @property
    def r_on_held(self) -> Held:
        """Where ``r_on_max`` holds: discharge currents up to its test current.

        Returns
        -------
        Held
            The saturation voltage is specified at :attr:`r_on_test_current`;
            read as a resistance it holds up to that current (a transistor's
            saturation voltage grows faster than linearly above it).  [DS]
        """
        return Held(
            f"{self.name} timer discharge on-resistance ≤ {self.r_on_max:.3g} Ω",
            "discharge current",
            0.0,
            self.r_on_test_current,
            "current",
            "[DS] saturation voltage specified at the test current",
        )

    @property
    def ratio_band(self) -> tuple[float, float]:
        """Upper threshold ratio band (see :func:`ratio_band_from_initial`)."""
        return ratio_band_from_initial(self.initial)

    def with_overrides(
        self, *, initial: float | None = None, drift_ppm: float | None = None
    ) -> TimerClass:
        """Return a copy with the accuracy figures a spec overrides.

        Parameters
        ----------
        initial
            New initial timing error (fraction), or ``None`` to keep.
        drift_ppm
            New temperature drift bound (ppm/K), or ``None`` to keep.

        Returns
        -------
        TimerClass
            The modified class.
        """
        return replace(
            self,
            initial=self.initial if initial is None else initial,
            drift_ppm=self.drift_ppm if drift_ppm is None else drift_ppm,
        )


def _amps(i: float) -> str:
    """A current in words for a constant's description (``0.25 µA``, ``1 nA``)."""
    for scale, unit in ((1e-3, "mA"), (1e-6, "µA"), (1e-9, "nA")):
        if i >= scale:
            return f"{i / scale:.3g} {unit}"
    return f"{i / 1e-12:.3g} pA"


TIMER_CLASSES: dict[str, TimerClass] = {
    "bipolar": TimerClass(
        name="bipolar",
        supply_min=4.5,  # [DS] 4.5–16 V
        supply_max=16.0,  # [DS]
        initial=0.03,  # [DS] monostable initial error 1 % typ, 3 % max
        drift_ppm=150.0,  # [DS] 30–150 ppm/°C; we take the conservative end
        supply_drift=0.001,  # [Mem] about 0.1 %/V for the monostable
        r_on_max=0.2 / 4.5e-3,  # [DS] 0.2 V max saturation at 4.5 mA (5 V supply)
        i_threshold_max=0.25e-6,  # [DS] 0.1 µA typ, 0.25 µA max
        i_discharge_max=15e-3,  # [Mem]
        f_max=300e3,  # [Mem] a few hundred kHz
        r_min=1e3,  # [CP]
        output_drop=1.7,  # [Mem] bipolar output stage sits 1.4–2 V below the supply
        # Not rail-to-rail, so unused by the feedback circuit; output_drop models its
        # high level.  Bands kept for completeness.
        r_out_high=(5.0, 20.0),  # [Mem] emitter-follower high side, a few to tens of Ω
        r_out_low=(5.0, 20.0),  # [Mem] saturated low side
        i_out_max=200e-3,  # [DS] 200 mA source/sink
        # [Mem] output edge some 100 ns after the threshold crossing, rise/fall
        # 100 ns typ, 300 ns max [DS]; the 50 ns floor is [Mem].
        t_pd=(50e-9, 300e-9),
        c_node=(2e-12, 10e-12),  # [Mem] a few pF per pin, two pins on the node
        ith_ambient=(0.0, 70.0),  # [Mem] commercial-grade figure
        ith_grows="cold",  # [Mem] a base current: rises as the current gain falls when cold
        drift_ambient=(-55.0, 125.0),  # [Mem] the bound of the wide-range grade
        supply_drift_supply=(4.5, 16.0),  # [Mem] quoted across the class's supply range
    ),
    "cmos": TimerClass(
        name="cmos",
        supply_min=2.0,  # [DS] 2–15 V
        supply_max=15.0,  # [DS]
        initial=0.03,  # [Mem] generic CMOS class quotes 1–2 % typ; we bound it like bipolar
        drift_ppm=150.0,  # [DS] upper end of 30–150 ppm/°C
        supply_drift=0.003,  # [Mem] about 0.3 %/V
        r_on_max=0.5 / 4.5e-3,  # [DS] 0.5 V max saturation; test current taken as 4.5 mA [Mem]
        i_threshold_max=1e-9,  # [DS] ~10 pA typ; 1 nA bound over temperature [Mem]
        i_discharge_max=10e-3,  # [Mem]
        f_max=1e6,  # [Mem] about 1 MHz
        r_min=1e3,  # [CP]
        output_drop=0.1,  # [Mem] CMOS output swings close to the rail at light load
        r_out_high=(50.0, 300.0),  # [Mem] tens to a few hundred Ω per side (REFERENCE.md)
        r_out_low=(50.0, 300.0),  # [Mem]
        i_out_max=10e-3,  # [Mem] ±10 mA
        t_pd=(50e-9, 400e-9),  # [Mem] a few hundred ns at 5 V, slower at 2 V
        c_node=(2e-12, 10e-12),  # [Mem] a few pF per pin, two pins on the node
        ith_ambient=(-40.0, 85.0),  # [Mem] the 1 nA bound is an industrial-range figure
        ith_grows="hot",  # [CP] junction leakage about doubles every 10 K
        drift_ambient=(-40.0, 85.0),  # [Mem]
        supply_drift_supply=(4.5, 15.0),  # [Mem] quoted on a 5 V rail and up; larger at 2–3 V
    ),
}


def timer_class(name: str) -> TimerClass:
    """Look up a timer class by name.

    Parameters
    ----------
    name
        ``"bipolar"`` or ``"cmos"`` (case-insensitive).

    Returns
    -------
    TimerClass
        The class parameters.

    Raises
    ------
    KeyError
        When the name is unknown.
    """
    return TIMER_CLASSES[name.lower()]


#: Board stray capacitance at a timing node (pad, trace, a via), F: "a few pF".  [DS/Mem]
BOARD_STRAY: tuple[float, float] = (1e-12, 5e-12)
#: Pin capacitance of a generic CMOS logic input, F (typ about 3–5 pF, max 10 pF).  [DS]
LOGIC_INPUT_CAPACITANCE: tuple[float, float] = (2e-12, 10e-12)
#: Input leakage bound of a generic CMOS logic input over temperature, A (either sign).  [DS]
LOGIC_INPUT_LEAKAGE = 1e-6


@dataclass(frozen=True)
class GateClass:
    """Thresholds and limits of a generic Schmitt-trigger inverter class.

    Thresholds are fractions of the supply: ``(min, typ, max)``.

    Attributes
    ----------
    name
        Class name used in specs.
    rising, falling
        Positive-going (VT+) and negative-going (VT−) thresholds.  [DS]
    hysteresis_min
        Smallest VT+ − VT−, fraction of the supply.  [DS/Mem]
    supply_min, supply_max
        Supply range, V.  [DS]
    i_input_max
        Input leakage bound, A (either sign).  [DS]
    f_max
        Highest frequency the class is used at as an RC oscillator, Hz, at
        :attr:`quoted_supply`.  [Mem]
    r_min, r_max
        Usable feedback resistor range, Ω.  [CP]
    t_pd
        Propagation delay band ``(min, max)`` input to output, s, at
        :attr:`quoted_supply` over the class's temperature range.  [DS/Mem]
    c_input
        Input (pin) capacitance band ``(min, max)``, F.  [DS]
    quoted_supply
        The supply the threshold fractions, the delay and ``f_max`` are quoted at, V.  [DS]
    thresholds_held
        Supply range over which the threshold fractions hold.
    speed_held
        Supply range over which ``t_pd`` and ``f_max`` hold as quoted; below it
        the gate is slower (see :meth:`slowdown`).
    leakage_held
        Ambient range over which ``i_input_max`` is guaranteed.
    """

    name: str
    rising: tuple[float, float, float]
    falling: tuple[float, float, float]
    hysteresis_min: float
    supply_min: float
    supply_max: float
    i_input_max: float
    f_max: float
    r_min: float
    r_max: float
    t_pd: tuple[float, float]
    c_input: tuple[float, float]
    quoted_supply: float
    thresholds_held: Held
    speed_held: Held
    leakage_held: Held

    def slowdown(self, supply_low: float) -> float:
        """Factor by which the propagation delay grows (and ``f_max`` shrinks) at a supply.

        Parameters
        ----------
        supply_low
            The lowest supply of the design, V.

        Returns
        -------
        float
            ``1`` inside :attr:`speed_held`; below it ``(V_low_held / supply_low)²``.

        Notes
        -----
        CMOS gate delay grows roughly as the square of the drive lost at a lower
        supply; for the high-speed class this gives about 5× from 4.5 V to 2 V,
        as the class's datasheets show for the maximum delay [DS/Mem].
        """
        low = self.speed_held.low
        if supply_low >= low or supply_low <= 0.0:
            return 1.0
        return (low / supply_low) ** 2


GATE_CLASSES: dict[str, GateClass] = {
    "highspeed": GateClass(
        name="highspeed",
        rising=(0.38, 0.52, 0.70),  # [DS] high-speed CMOS Schmitt inverter at 4.5 V
        falling=(0.20, 0.34, 0.44),  # [DS]
        hysteresis_min=0.16 / 4.5,  # [Mem] about 0.16 V minimum at 4.5 V
        supply_min=2.0,  # [DS]
        supply_max=6.0,  # [DS]
        i_input_max=1e-6,  # [DS] ±1 µA over temperature
        f_max=10e6,  # [Mem]
        r_min=1e3,  # [CP]
        r_max=1e6,  # [CP] leakage sets the top
        # [DS] about 15 ns typ, 48 ns max at 4.5 V, 50 pF load, −55…125 °C; the 5 ns
        # floor is [Mem] (datasheets give no minimum).
        t_pd=(5e-9, 48e-9),
        c_input=(2e-12, 10e-12),  # [DS] 3.5 pF typ, 10 pF max
        quoted_supply=4.5,  # [DS]
        thresholds_held=Held(
            "highspeed threshold fractions VT+ 0.38…0.70, VT− 0.20…0.44",
            "supply",
            4.5,
            6.0,
            "voltage",
            "[DS] quoted at 4.5 V and 6 V; at 2 V the shares differ",
        ),
        speed_held=Held(
            "highspeed propagation delay ≤ 48 ns and f_max 10 MHz",
            "supply",
            4.5,
            math.inf,
            "voltage",
            "[DS] quoted at 4.5 V; about 5× slower at 2 V",
        ),
        leakage_held=Held(
            "highspeed input leakage ±1 µA",
            "ambient",
            -55.0,
            125.0,
            "temperature",
            "[DS] guaranteed over −55…125 °C",
        ),
    ),
    "metalgate": GateClass(
        name="metalgate",
        rising=(0.60, 0.72, 0.86),  # [DS] metal-gate CMOS Schmitt inverter at 5 V
        falling=(0.14, 0.28, 0.40),  # [DS]
        hysteresis_min=0.3 / 5.0,  # [Mem] about 0.3 V minimum at 5 V
        supply_min=3.0,  # [DS]
        supply_max=18.0,  # [DS]
        i_input_max=1e-6,  # [DS] bound quoted over temperature; typically far lower
        f_max=1e6,  # [Mem]
        r_min=10e3,  # [CP]
        r_max=10e6,  # [CP]
        # [DS] about 140 ns typ, 280 ns max at 5 V, 25 °C, 50 pF load; 400 ns over
        # temperature and 50 ns floor are [Mem].
        t_pd=(50e-9, 400e-9),
        c_input=(3e-12, 7.5e-12),  # [DS] 5 pF typ, 7.5 pF max
        quoted_supply=5.0,  # [DS]
        thresholds_held=Held(
            "metalgate threshold fractions VT+ 0.60…0.86, VT− 0.14…0.40",
            "supply",
            4.5,
            5.5,
            "voltage",
            "[DS] quoted at 5 V; the shares differ at 10 V and 15 V [Mem]",
        ),
        speed_held=Held(
            "metalgate propagation delay ≤ 400 ns and f_max 1 MHz",
            "supply",
            5.0,
            math.inf,
            "voltage",
            "[DS] quoted at 5 V; faster at 10 V and 15 V, slower below 5 V",
        ),
        leakage_held=Held(
            "metalgate input leakage ±1 µA",
            "ambient",
            -55.0,
            125.0,
            "temperature",
            "[DS] guaranteed over the full temperature range",
        ),
    ),
}


def gate_class(name: str) -> GateClass:
    """Look up a Schmitt-inverter class by name.

    Parameters
    ----------
    name
        ``"highspeed"`` or ``"metalgate"`` (case-insensitive).

    Returns
    -------
    GateClass
        The class parameters.

    Raises
    ------
    KeyError
        When the name is unknown.
    """
    return GATE_CLASSES[name.lower()]
