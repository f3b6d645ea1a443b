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

from dataclasses import dataclass, replace

__all__ = [
    "GATE_CLASSES",
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
        Highest frequency the class is used at as an RC oscillator, Hz.  [Mem]
    r_min, r_max
        Usable feedback resistor range, Ω.  [CP]
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
