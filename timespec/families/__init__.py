"""Circuit families: one module per kind of block.

Each family states its own physics (through :mod:`timespec.physics`), its
candidate narrowing and its design rules.  What they share: the protocol
(:mod:`~timespec.families.protocol`), candidate parts from the policies
(:mod:`~timespec.families.candidates`), factors for parts, conditions and timer
classes (:mod:`~timespec.families.inputs`), capacitor leakage and dielectric
rules (:mod:`~timespec.families.capacitors`) and aiming at a requirement
(:mod:`~timespec.families.goals`).  :func:`family` looks one up by block kind.
May import analysis, physics, parts, the model, numbers, units and errors.
"""

from __future__ import annotations

from timespec.families.astable import Astable
from timespec.families.crystal import Crystal
from timespec.families.delay import Delay
from timespec.families.oneshot import OneShot
from timespec.families.protocol import Family
from timespec.families.relaxation import Relaxation

__all__ = ["FAMILIES", "family"]

#: Family objects by block kind.
FAMILIES: dict[str, Family] = {
    "oneshot": OneShot(),
    "delay": Delay(),
    "relaxation": Relaxation(),
    "astable": Astable(),
    "crystal": Crystal(),
}


def family(kind: str) -> Family:
    """Return the family that handles a block kind.

    Parameters
    ----------
    kind
        Block kind, e.g. ``"oneshot"``.

    Returns
    -------
    Family
        The family.

    Raises
    ------
    KeyError
        When no family handles the kind (yet).
    """
    return FAMILIES[kind]
