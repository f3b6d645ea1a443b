"""The ``refs`` statement: board reference designators of a block's parts.

``refs R R12, C C7`` says that the block's part ``R`` is ``R12`` on the board and
its ``C`` is ``C7``; each comma-separated item is a part reference of the
circuit followed by its designator, the same shape as a pinned part in ``use``.
A part the solver may build from two standard values (``pairs``) can take a
second designator for the second part: ``refs R R12 R13``.

A designator is a class code of capital letters followed by a number from 1
(:data:`timespec.model.DESIGNATOR`), as reference designation has it (IEEE 315,
ASME Y14.44: class letters, then a number).  A resistor's code starts with ``R``
and a capacitor's with ``C``, which IEEE 315 and IEC 81346-2 (``RA``, ``CA``)
both keep.  The checks that need the whole spec live here too: a designator may
name one part only, across every block of a spec (:func:`check_unique`).

The lexer reads ``R12`` as an IEC 60062 RKM code (0.12 Ω); written exactly so in
a ``refs`` statement it is the designator ``R12``.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass

from timespec.errors import Pos, SpecValueError
from timespec.language.arguments import Reading, error_at, example_hint, type_name
from timespec.language.parser import Statement
from timespec.language.values import Quantity, Term, Word
from timespec.model import DESIGNATOR

__all__ = ["Designation", "check_unique", "read_refs"]

#: What a designator looks like, for hints.
DESIGNATOR_HINT = (
    "a designator is a class code in capital letters, then a number from 1 "
    "(IEEE 315 reference designation), e.g. R12 or C7"
)

#: The class code a part's designator must start with, by the first letter of its reference.
_CLASS_LETTER = {"R": ("R", "resistor"), "C": ("C", "capacitor")}

#: An RKM code that reads like a resistor designator (``R12``).
_RKM_DESIGNATOR = re.compile(r"R[0-9]+")


@dataclass(frozen=True)
class Designation:
    """One item of a ``refs`` statement.

    Attributes
    ----------
    ref
        The part reference in the circuit (``R``, ``RA``, ``C1`` ...).
    names
        Its board designators: one, or two for a series/parallel pair.
    pos
        Where the part reference was written.
    name_pos
        Where each designator was written.
    """

    ref: str
    names: tuple[str, ...]
    pos: Pos
    name_pos: tuple[Pos, ...]


def _designator(term: Term) -> tuple[str, Pos] | None:
    """The text of a term that stands for a designator, or ``None``.

    A word is its own text.  ``R12`` reaches here as an RKM code (a resistance);
    it counts as the designator only when written exactly so (``R12Ω`` or a signed
    ``+R12`` stays a resistance).
    """
    if isinstance(term, Word):
        return term.text, term.pos
    if isinstance(term, Quantity) and _RKM_DESIGNATOR.fullmatch(term.text):
        line, start = term.pos.source_line, term.pos.column - 1
        end = start + len(term.text)
        after = line[end : end + 1]
        if line[start:end] == term.text and after in ("", " ", "\t", "\f", ",", ";", "#"):
            return term.text, term.pos
    return None


def _check_name(ref: Word, name: str, pos: Pos) -> None:
    if not DESIGNATOR.fullmatch(name):
        upper = name.upper()
        hint = f"write it in capitals: {upper}" if DESIGNATOR.fullmatch(upper) else DESIGNATOR_HINT
        raise error_at(SpecValueError, f"{name!r} is not a reference designator", pos, hint)
    wanted = _CLASS_LETTER.get(ref.text[:1])
    if wanted is not None and not name.startswith(wanted[0]):
        letter, what = wanted
        number = name.lstrip("ABCDEFGHIJKLMNOPQRSTUVWXYZ")
        raise error_at(
            SpecValueError,
            f"{ref.text} is a {what}, but its designator {name} does not start with {letter}",
            pos,
            f"a {what}'s designator starts with {letter}, e.g. {letter}{number}",
        )


def _item(arg: tuple[Term, ...]) -> Designation:
    ref = arg[0]
    if not isinstance(ref, Word):
        raise error_at(
            SpecValueError,
            "each item starts with the part's reference in the circuit, e.g. R or C1",
            ref.pos,
            example_hint("refs"),
        )
    if len(arg) < 2:
        raise error_at(
            SpecValueError,
            f"part {ref.text} needs its board designator after it",
            ref.pos,
            f"write it like: refs {ref.text} {_CLASS_LETTER.get(ref.text[:1], ('U',))[0]}1",
        )
    if len(arg) > 3:
        raise error_at(
            SpecValueError,
            f"part {ref.text} takes one designator (two when it is a pair)",
            arg[3].pos,
            "separate parts with commas, e.g. refs R R12, C C7",
        )
    names: list[str] = []
    where: list[Pos] = []
    for term in arg[1:]:
        found = _designator(term)
        if found is None:
            raise error_at(
                SpecValueError,
                f"{type_name(term)} is not a reference designator",
                term.pos,
                DESIGNATOR_HINT,
            )
        name, pos = found
        _check_name(ref, name, pos)
        if name in names:
            raise error_at(SpecValueError, f"{name} is given twice for part {ref.text}", pos)
        names.append(name)
        where.append(pos)
    return Designation(ref.text, tuple(names), ref.pos, tuple(where))


def read_refs(stmt: Statement) -> Reading:
    """Read board designators: comma-separated part references, each with its designator.

    Parameters
    ----------
    stmt
        The ``refs`` statement.

    Returns
    -------
    Reading
        A ``"refs"`` reading holding a tuple of :class:`Designation`.

    Raises
    ------
    SpecError
        When an item has no designator or too many, a designator is not letters then
        a number, a resistor's designator does not start with R (a capacitor's with C),
        or a part or designator is given twice.
    """
    if not stmt.args:
        raise error_at(
            SpecValueError,
            "'refs' needs at least one part and its designator",
            stmt.pos,
            example_hint("refs"),
        )
    items = [_item(arg) for arg in stmt.args]
    seen: dict[str, Designation] = {}
    for item in items:
        if item.ref in seen:
            raise error_at(SpecValueError, f"part {item.ref} is given twice", item.pos)
        for name, pos in zip(item.names, item.name_pos, strict=True):
            other = next((o for o in seen.values() if name in o.names), None)
            if other is not None:
                raise error_at(
                    SpecValueError,
                    f"{name} is already the designator of part {other.ref}",
                    pos,
                    "each designator names one part on the board",
                )
        seen[item.ref] = item
    return Reading("refs", tuple(items))


def check_unique(items: Iterable[tuple[str, Designation]]) -> None:
    """Check that no designator names two parts, across all the blocks of a spec.

    Parameters
    ----------
    items
        ``(block name, designation)`` in the order written.

    Raises
    ------
    SpecValueError
        At the second use of a designator, naming the part and line of the first.
    """
    first: dict[str, tuple[str, str, Pos]] = {}
    for block, item in items:
        for name, pos in zip(item.names, item.name_pos, strict=True):
            if name in first:
                other_block, other_ref, other_pos = first[name]
                where = f"line {other_pos.line}"
                if other_pos.path != pos.path and other_pos.path is not None:
                    where = f"{other_pos.path}:{other_pos.line}"
                raise error_at(
                    SpecValueError,
                    f"designator {name} is already given to {other_block}.{other_ref} ({where})",
                    pos,
                    "each designator names one part on the board; give this part its own number",
                )
            first[name] = (block, item.ref, pos)
