"""Pick the blocks to explain, solve them and write their derivation (the CLI's one call)."""

from __future__ import annotations

import dataclasses
import difflib
from collections.abc import Sequence

from timespec.design.solver import solve
from timespec.errors import UsageError
from timespec.model import Spec
from timespec.outputs.explain.derive import Derivation, derive

__all__ = ["check_blocks", "explain_spec"]


def check_blocks(spec: Spec, names: Sequence[str]) -> list[str]:
    """The block names asked for, checked against the spec.

    Parameters
    ----------
    spec
        The parsed spec.
    names
        Block names (empty: every block).

    Returns
    -------
    list of str
        The names, in the order asked for (every block, in spec order, when none).

    Raises
    ------
    UsageError
        When a name is not a block of the spec: the message starts with the spec
        file and lists its blocks (and the nearest name, when one is close).
    """
    known = [b.name for b in spec.blocks]
    if not names:
        return known
    for name in names:
        if name not in known:
            near = difflib.get_close_matches(name, known, n=1)
            guess = f"did you mean {near[0]!r}? " if near else ""
            where = f"{spec.path}: " if spec.path else ""
            raise UsageError(
                f"{where}no block named {name!r}; {guess}its blocks are: {', '.join(known)}"
            )
    return list(dict.fromkeys(names))


def explain_spec(spec: Spec, names: Sequence[str] = ()) -> Derivation:
    """Solve the named blocks (worst case only) and derive each output.

    Parameters
    ----------
    spec
        The parsed spec.
    names
        Block names (empty: every block).

    Returns
    -------
    Derivation
        The derivation of those blocks, in the order asked for.

    Raises
    ------
    UsageError
        When a name is not a block of the spec (see :func:`check_blocks`).
    """
    chosen = check_blocks(spec, names)
    sub = dataclasses.replace(spec, blocks=tuple(spec.block(n) for n in chosen))
    return derive(solve(sub))
