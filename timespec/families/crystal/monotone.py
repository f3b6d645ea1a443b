"""Which factors move which crystal outputs monotonically, with the proofs."""

from __future__ import annotations

import dataclasses
import functools

from timespec.analysis import Factor
from timespec.model import Block

__all__ = ["declarations", "declare"]

#: Factors that raise both capacitors' values everywhere in the box (not the
#: tempco, which multiplies ``T − 25`` and changes sign across the ambient range).
_CAP_RISING = tuple(f"{c}.{p}" for c in ("C1", "C2") for p in ("tol", "age", "drift", "bias"))
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
    * ``drive = ESR·(2πf·Vpp/(2√2))²·((C0 + CL)·(1 + C2/C1))²`` with
      ``(C0 + CL)·(1 + C2/C1) = (C0 + Cs)·(1 + C2/C1) + C2``: it rises with ``C2``
      and ``Cs``, FALLS with ``C1`` (``∂/∂C1 = −(C0 + Cs)·C2/C1² ≤ 0``) and, when
      the swing is the supply, rises with the supply;
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
        if name.startswith("C1."):
            # The crystal's share of the output swing, 1 + C2/C1, falls with C1.
            out[name] = (("load",), (*caps_falling, "drive"))
        else:
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
        Factors from :meth:`~timespec.families.crystal.Crystal.factors`.

    Returns
    -------
    list of Factor
        The same factors, each carrying the outputs it provably raises or lowers;
        :func:`~timespec.analysis.worst_case` then gives exactly the same extremes
        from a smaller grid per group of outputs.

    Notes
    -----
    :meth:`~timespec.families.crystal.Crystal.factors` does not apply this by
    itself: on the family's small grid the extra searches (two per group of
    outputs) cost more than they save. It pays when the grid grows (more
    factors, or non-monotone ones searched on interior points).
    """
    decl = declarations(block)
    return [_declare(f, *decl.get(f.name, ((), ()))) for f in factors]
