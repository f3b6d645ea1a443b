"""What a part is: one chosen or pinned resistor or capacitor, and a design made of parts.

Plain data shared by every layer above: the families build them from the
policies (:mod:`timespec.families.candidates`), the solver ranks designs, and
the outputs print them.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Design", "Part"]


@dataclass(frozen=True)
class Part:
    """One chosen or pinned part.

    Attributes
    ----------
    ref
        Reference in the circuit (``R``, ``C``, ``RA`` ...).
    kind
        ``"resistance"`` or ``"capacitance"``.
    value
        Ω or F.
    tolerance
        Relative tolerance.
    series
        IEC 60063 series it comes from, or ``None`` for an off-series pinned value.
    tempco_ppm
        Resistor tempco bound (±ppm/K), ``None`` for capacitors.
    dielectric
        Capacitor dielectric, ``None`` for resistors.
    pinned
        Whether the spec fixed it.
    ageing
        Relative drift per year bound.
    pair
        ``(a, b, how)`` when the part is two standard values ``a <= b`` joined in
        ``"series"`` or ``"parallel"`` (``value`` is then the combined value and
        ``tolerance`` the pair's worst-case tolerance); ``None`` for a single part.
    """

    ref: str
    kind: str
    value: float
    tolerance: float
    series: str | None
    tempco_ppm: float | None = None
    dielectric: str | None = None
    pinned: bool = False
    ageing: float = 0.0
    pair: tuple[float, float, str] | None = None

    @property
    def count(self) -> int:
        """How many physical parts this stands for (2 for a pair)."""
        return 1 if self.pair is None else 2


@dataclass(frozen=True)
class Design:
    """A set of parts (and a circuit variant, where the family has several).

    Attributes
    ----------
    parts
        The parts, in the family's order.
    variant
        Circuit variant, e.g. ``"diode"`` for an astable; empty when there is one.
    """

    parts: tuple[Part, ...]
    variant: str = ""

    def part(self, ref: str) -> Part:
        """Return the part with this reference.

        Parameters
        ----------
        ref
            Part reference.

        Returns
        -------
        Part
            The part.

        Raises
        ------
        KeyError
            When the design has no such part.
        """
        for p in self.parts:
            if p.ref == ref:
                return p
        raise KeyError(ref)
