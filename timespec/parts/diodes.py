"""Generic diode classes: the steering diode of the 555-type astable.

A parameter set for a *class* of device, not for any one product.  The forward
characteristic is the diode equation ``I = Is(T)·(exp(Vd/(n·Vt)) − 1)`` with
the saturation current ``Is`` and the emission coefficient ``n`` given as bands
at 25 °C, and the usual temperature law of ``Is``::

    Is(T) = Is·(T/T0)^(XTI/n)·exp((Eg/(n·Vt(T)))·(T/T0 − 1)),   Vt = k·T/q

Each number says where it came from (as in :mod:`timespec.parts.devices`):
``[DS]`` generic device-class datasheets, ``[CP]`` common practice, ``[Mem]``
from memory, not confirmed against a document.  The equation holds only over a
range of forward current (below it, reverse leakage and generation current;
above it, the series resistance): that range is a
:class:`~timespec.parts.validity.Held`.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.parts.validity import Held

__all__ = ["DIODE_CLASSES", "SMALL_SIGNAL", "DiodeClass", "diode_class"]


@dataclass(frozen=True)
class DiodeClass:
    """Diode-equation parameters of a generic diode class (SI units).

    Attributes
    ----------
    name
        Class name.
    is_band
        Saturation current at 25 °C, ``(low, high)``, A.
    n_band
        Emission coefficient, ``(low, high)``.
    eg
        Activation energy of ``Is`` (silicon band gap), eV.
    xti
        Temperature exponent of ``Is``.
    held
        Forward-current range over which the equation with these bands holds.
    """

    name: str
    is_band: tuple[float, float]
    n_band: tuple[float, float]
    eg: float
    xti: float
    held: Held


#: Small-signal silicon switching diode class.
SMALL_SIGNAL = DiodeClass(
    name="small-signal silicon",
    # [Txt/Mem] Is ≈ 2–5 nA and n ≈ 1.8–2 for the small-signal class: forward drop
    # ≈ 0.36–0.44 V at 10 µA and ≈ 0.57–0.67 V at 1 mA (25 °C), as the reference
    # sheet gives (≈ 0.4 V at 10–20 µA, 0.6–0.7 V at 1–10 mA).
    is_band=(2e-9, 5e-9),
    n_band=(1.8, 2.0),
    eg=1.11,  # [Txt] silicon band gap, eV (the usual diode-model value)
    xti=3.0,  # [Txt] temperature exponent of Is for a junction diode (usual model value)
    held=Held(
        "small-signal silicon diode equation (Is 2…5 nA, n 1.8…2)",
        "diode forward current",
        1e-6,  # [Mem] below ~1 µA reverse leakage and generation current compete
        10e-3,  # [Mem] above ~10 mA the series resistance adds a visible drop
        "current",
        "[Mem] generic small-signal silicon diode class",
    ),
)

#: Diode classes by name.
DIODE_CLASSES: dict[str, DiodeClass] = {"small-signal": SMALL_SIGNAL}


def diode_class(name: str) -> DiodeClass:
    """Look up a diode class by name.

    Parameters
    ----------
    name
        ``"small-signal"``.

    Returns
    -------
    DiodeClass
        The class parameters.

    Raises
    ------
    KeyError
        When the name is unknown.
    """
    return DIODE_CLASSES[name.lower()]
