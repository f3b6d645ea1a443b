"""Readers of part choices: part policies, pinned parts and part classes.

The ``resistors`` and ``capacitors`` policies (series, tolerance, tempco or
dielectric, value range, pairs, ageing, and for capacitors a rated voltage
``rated 25 V``), the parts pinned by ``use``, and the
``timer`` and ``gate`` classes.  Like the readers of
:mod:`timespec.language.readers`, each takes a parsed
:class:`~timespec.language.parser.Statement` and returns a
:class:`~timespec.language.arguments.Reading`, or raises a positioned
:class:`~timespec.errors.SpecError`.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from typing import Any

from timespec.errors import Pos, SpecUnitError, SpecValueError
from timespec.language.arguments import (
    KIND_NAMES,
    Reader,
    Reading,
    check_kind,
    did_you_mean,
    error_at,
    example_hint,
    single_term,
    type_name,
    window_of,
)
from timespec.language.parser import Statement
from timespec.language.values import Fraction, Quantity, Range, Term, Tolerance, Word
from timespec.model import PinnedPart
from timespec.parts import dielectrics, series
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES

__all__ = ["read_gate", "read_policy", "read_timer", "read_use"]


def _series_name(word: Word) -> str | None:
    """The standard series a word names, if any.

    Parameters
    ----------
    word
        The word, e.g. ``E96`` or ``e24``.

    Returns
    -------
    str or None
        The series name in capitals, or ``None`` when the word names none.
    """
    name = word.text.upper()
    return name if name in series.SERIES_NAMES else None


def _policy_items(stmt: Statement, part: str, terms: Sequence[Term]) -> dict[str, Any]:
    """Read policy or part items: series, tolerance, tempco/dielectric, range, pairs, ageing.

    Parameters
    ----------
    stmt
        The statement they stand in (``resistors``, ``capacitors`` or ``use``).
    part
        ``"resistors"`` or ``"capacitors"``.
    terms
        The item terms.

    Returns
    -------
    dict
        The fields given, by name (``series``, ``tolerance``, ``tempco_ppm``,
        ``dielectric``, ``low`` and ``high``, ``pairs``, ``ageing``,
        ``rated_voltage``).

    Raises
    ------
    SpecError
        When an item is unknown, out of range or given twice.
    """
    fields: dict[str, Any] = {}
    is_res = part == "resistors"

    def put(key: str, value: Any, pos: Pos) -> None:
        if key in fields:
            raise error_at(SpecValueError, f"the {key.replace('_', ' ')} is given twice", pos)
        fields[key] = value

    rated_word: Word | None = None
    leak_word: Word | None = None
    floor_word: Word | None = None
    for term in terms:
        if rated_word is not None:
            put("rated_voltage", _rating(rated_word, term), rated_word.pos)
            rated_word = None
            continue
        if floor_word is not None:
            k = fields["leakage"][0]
            fields["leakage"] = (k, _leak_current(floor_word, term))
            floor_word = None
            continue
        if leak_word is not None:
            put("leakage", _leak_rating(leak_word, term), leak_word.pos)
            leak_word = None
            continue
        if (
            isinstance(term, Word)
            and term.text.lower() == "or"
            and "leakage" in fields
            and fields["leakage"][1] == 0.0
        ):
            floor_word = term
            continue
        if isinstance(term, Word) and term.text.lower() == "leakage" and not is_res:
            leak_word = term
            continue
        if isinstance(term, Word) and term.text.lower() == "rated":
            if is_res:
                raise error_at(
                    SpecValueError,
                    "a resistor policy takes no rated voltage",
                    term.pos,
                    "'rated 25 V' belongs to capacitors, e.g. capacitors X7R 10%, rated 25 V",
                )
            rated_word = term
            continue
        if isinstance(term, Word):
            name = _series_name(term)
            if name is not None:
                put("series", name, term.pos)
            elif term.text.lower() == "pairs":
                put("pairs", True, term.pos)
            elif (
                stmt.keyword == "use"
                and re.fullmatch(r"[RC][A-Z0-9]*", term.text)
                and (is_res or term.text not in dielectrics.known_names())
            ):
                raise error_at(
                    SpecValueError,
                    f"{term.text!r} looks like the next part, but no comma stands before it",
                    term.pos,
                    "separate pinned parts with commas, e.g. use R 4k7, C 10u",
                )
            elif not is_res:
                try:
                    dielectric = dielectrics.dielectric(term.text)
                except ValueError:
                    raise error_at(
                        SpecValueError,
                        f"unknown word {term.text!r} in a capacitor policy",
                        term.pos,
                        did_you_mean(
                            term.text,
                            [*series.SERIES_NAMES, *dielectrics.known_names(), "pairs"],
                        )
                        or "expected a series (E12), a dielectric (C0G, X7R), a tolerance"
                        " (5%), a range (1n to 1u) or 'pairs'",
                    ) from None
                put("dielectric", dielectric.name, term.pos)
            else:
                raise error_at(
                    SpecValueError,
                    f"unknown word {term.text!r} in a resistor policy",
                    term.pos,
                    did_you_mean(term.text, [*series.SERIES_NAMES, "pairs"])
                    or "expected a series (E96), a tolerance (1%), a tempco (100 ppm/K),"
                    " a range (1k to 1M) or 'pairs'",
                )
        elif isinstance(term, Quantity | Tolerance):
            if isinstance(term, Tolerance):
                if term.minus.value != term.plus.value or term.minus.kind != "ratio":
                    raise error_at(
                        SpecValueError,
                        "part tolerances are symmetric and relative, e.g. 1%",
                        term.pos,
                    )
                q = term.plus
            else:
                q = term
            if q.kind == "ratio":
                if not 0 <= q.value < 1:
                    raise error_at(
                        SpecValueError, "a part tolerance lies between 0 % and 100 %", q.pos
                    )
                put("tolerance", q.value, q.pos)
            elif q.kind == "tempco" and is_res:
                put("tempco_ppm", round(abs(q.value) * 1e6, 9), q.pos)
            elif q.kind == "rate":
                put("ageing", abs(q.value), q.pos)
            else:
                hint = (
                    "expected a tolerance (1%), a tempco (100 ppm/K), a range "
                    "or ageing (0.1 %/year)"
                )
                if q.kind == "tempco":
                    hint = "a capacitor's temperature behaviour comes from its dielectric, e.g. C0G"
                elif q.kind == "voltage" and not is_res:
                    hint = f"a capacitor's rated voltage is written 'rated {q.text}'"
                raise error_at(
                    SpecUnitError,
                    f"{q.text!r} ({KIND_NAMES.get(q.kind, q.kind)}) has no meaning in a "
                    f"{'resistor' if is_res else 'capacitor'} policy",
                    q.pos,
                    hint,
                )
        elif isinstance(term, Range):
            want = "resistance" if is_res else "capacitance"
            win = window_of(term, [want], stmt.keyword, exact_ok=True)
            if win.low <= 0:
                raise error_at(SpecValueError, "part values must be positive", term.pos)
            put("low", win.low, term.pos)
            fields["high"] = win.high
        else:
            raise error_at(
                SpecValueError,
                f"{type_name(term)} has no meaning in a part policy",
                term.pos,
                example_hint(stmt.keyword),
            )
    if rated_word is not None:
        raise error_at(
            SpecValueError,
            "'rated' needs a voltage after it",
            rated_word.pos,
            "write the capacitor's rated DC voltage, e.g. rated 25 V",
        )
    for word in (leak_word, floor_word):
        if word is not None:
            raise error_at(SpecValueError, f"'{word.text}' needs a value after it", word.pos, _LEAK)
    return fields


_LEAK = "write the datasheet's leakage rating, e.g. leakage 0.01 of CV or 3 uA, or leakage 5 uA"


def _leak_current(word: Word, term: Term) -> float:
    """A leakage current after ``leakage`` or ``or``: positive, finite, in amperes."""
    if not (isinstance(term, Quantity) and term.kind == "current"):
        raise error_at(
            SpecValueError,
            f"'{word.text}' here needs a current, not {type_name(term)}",
            term.pos,
            _LEAK,
        )
    if not (math.isfinite(term.value) and 0 < term.value <= 1.0):
        raise error_at(
            SpecValueError, f"a leakage rating of {term.text!r} makes no sense", term.pos, _LEAK
        )
    return term.value


def _leak_rating(word: Word, term: Term) -> tuple[float, float]:
    """``leakage 0.01 of CV`` (the k·C·V rule: µA per µF and volt) or ``leakage 5 uA``."""
    if isinstance(term, Fraction):
        inner = term.inner
        if term.of.upper() != "CV" or not isinstance(inner, Quantity) or inner.kind is not None:
            raise error_at(
                SpecValueError,
                f"a leakage rule is written 'k of CV', not {term.of!r}",
                term.pos,
                _LEAK,
            )
        k = inner.value
        if not (math.isfinite(k) and 0 < k <= 10.0):
            raise error_at(
                SpecValueError,
                f"a leakage constant of {k:g} makes no sense (0…10)",
                term.pos,
                _LEAK,
            )
        return (k, 0.0)
    return (0.0, _leak_current(word, term))


def _rating(word: Word, term: Term) -> float:
    """The rated voltage written after ``rated``: a positive, finite voltage.

    Parameters
    ----------
    word
        The ``rated`` word (for messages).
    term
        The term after it.

    Returns
    -------
    float
        V.

    Raises
    ------
    SpecError
        When the term is not a single voltage, or is negative, zero or not finite.
    """
    hint = "write the capacitor's rated DC voltage, e.g. rated 25 V"
    if not isinstance(term, Quantity):
        raise error_at(
            SpecValueError,
            f"'{word.text}' needs a single voltage, not {type_name(term)}",
            term.pos,
            hint,
        )
    if term.kind != "voltage":
        what = "a bare number" if term.kind is None else KIND_NAMES.get(term.kind, term.kind)
        raise error_at(
            SpecUnitError,
            f"a rated voltage is a voltage, but {term.text!r} is {what}",
            term.pos,
            hint,
        )
    if not (math.isfinite(term.value) and term.value > 0):
        raise error_at(
            SpecValueError,
            f"a rated voltage is positive and finite, not {term.text!r}",
            term.pos,
            hint,
        )
    return term.value


def read_policy(part: str) -> Reader:
    """A reader of a part policy: the items allowed for resistors or capacitors.

    Parameters
    ----------
    part
        ``"resistors"`` or ``"capacitors"``.

    Returns
    -------
    Reader
        Reads the statement into a reading whose target is ``part``.
    """

    def read(stmt: Statement) -> Reading:
        if not stmt.args:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' needs at least one item",
                stmt.pos,
                example_hint(stmt.keyword),
            )
        terms = [t for arg in stmt.args for t in arg]
        groups = _technologies(stmt, part, terms)
        if len(groups) == 1:
            return Reading(part, _policy_items(stmt, part, groups[0]))
        return Reading(part, tuple(_policy_items(stmt, part, g) for g in groups))

    return read


def _technologies(stmt: Statement, part: str, terms: Sequence[Term]) -> list[list[Term]]:
    """Split a policy's items at the word ``or``: one group per capacitor technology.

    ``capacitors C0G 5% 100p to 10n, or PP 2% E24 1n to 1u`` lists two technologies.
    An ``or`` between a ``k of CV`` leakage rule and a current is the rule's floor
    (``leakage 0.01 of CV or 3 uA``), not a new technology.

    Parameters
    ----------
    stmt
        The policy statement (for messages).
    part
        ``"resistors"`` or ``"capacitors"``.
    terms
        Every item term of the statement.

    Returns
    -------
    list of list of Term
        One group of items per technology, in the order written.

    Raises
    ------
    SpecError
        When ``or`` stands in a resistor policy, or at either end or twice in a row.
    """
    groups: list[list[Term]] = [[]]
    for i, term in enumerate(terms):
        if not (isinstance(term, Word) and term.text.lower() == "or"):
            groups[-1].append(term)
            continue
        nxt = terms[i + 1] if i + 1 < len(terms) else None
        if i > 0 and isinstance(terms[i - 1], Fraction) and isinstance(nxt, Quantity):
            groups[-1].append(term)  # the floor of a leakage rule
            continue
        if part == "resistors":
            raise error_at(
                SpecValueError,
                "a resistor policy describes one kind of resistor; 'or' lists capacitor "
                "technologies",
                term.pos,
                "give one resistor policy, e.g. resistors E96 1% 100 ppm/K, 1k to 1M",
            )
        if not groups[-1] or nxt is None:
            raise error_at(
                SpecValueError,
                f"'or' in '{stmt.keyword}' stands between two capacitor technologies",
                term.pos,
                "e.g. capacitors C0G 5% 100p to 10n, or PP 2% E24 1n to 1u",
            )
        groups.append([])
    return groups


def read_use(stmt: Statement) -> Reading:
    """Read pinned parts: comma-separated references with a value and items.

    Parameters
    ----------
    stmt
        The ``use`` statement.

    Returns
    -------
    Reading
        A ``"pinned"`` reading holding a tuple of :class:`~timespec.model.PinnedPart`.
    """
    if not stmt.args:
        raise error_at(
            SpecValueError, "'use' needs at least one part", stmt.pos, example_hint("use")
        )
    parts: list[PinnedPart] = []
    for arg in stmt.args:
        ref = arg[0]
        if not isinstance(ref, Word):
            raise error_at(
                SpecValueError,
                "each part starts with its reference, e.g. R or C1",
                ref.pos,
                example_hint("use"),
            )
        if len(arg) < 2 or not isinstance(arg[1], Quantity):
            raise error_at(
                SpecValueError,
                f"part {ref.text} needs a value after its reference",
                arg[1].pos if len(arg) > 1 else ref.pos,
                example_hint("use"),
            )
        value = arg[1]
        letter = ref.text[0].upper()
        want = {"R": "resistance", "C": "capacitance"}.get(letter)
        if want is None:
            raise error_at(
                SpecValueError,
                f"part reference {ref.text!r} must start with R (resistor) or C (capacitor)",
                ref.pos,
            )
        if value.kind is None:
            value = Quantity(value.value, want, value.text, value.pos)
        if value.kind != want:
            raise error_at(
                SpecUnitError,
                f"{ref.text} is a {'resistor' if want == 'resistance' else 'capacitor'}, "
                f"but {value.text!r} is {KIND_NAMES.get(value.kind, value.kind)}",
                value.pos,
            )
        fields = _policy_items(stmt, "resistors" if want == "resistance" else "capacitors", arg[2:])
        for bad in ("low", "pairs", "ageing"):
            if bad in fields:
                raise error_at(
                    SpecValueError,
                    "a pinned part takes a tolerance, series and tempco or dielectric, "
                    f"not a {bad}",
                    ref.pos,
                )
        try:
            parts.append(
                PinnedPart(
                    ref=ref.text,
                    kind=want,
                    value=value.value,
                    tolerance=fields.get("tolerance"),
                    series=fields.get("series"),
                    tempco_ppm=fields.get("tempco_ppm"),
                    dielectric=fields.get("dielectric"),
                    pos=ref.pos,
                    rated_voltage=fields.get("rated_voltage"),
                    leakage=fields.get("leakage"),
                )
            )
        except ValueError as exc:
            raise error_at(SpecValueError, str(exc), ref.pos) from None
    refs = [p.ref for p in parts]
    for i, p in enumerate(parts):
        if p.ref in refs[:i]:
            raise error_at(SpecValueError, f"part {p.ref} is pinned twice", p.pos)
    return Reading("pinned", tuple(parts))


def read_timer(stmt: Statement) -> Reading:
    """Read the timer class and its optional ``initial`` and ``drift`` overrides.

    Parameters
    ----------
    stmt
        The ``timer`` statement.

    Returns
    -------
    Reading
        A ``"timer"`` reading holding (class name, overrides).
    """
    if not stmt.args or not isinstance(stmt.args[0][0], Word):
        raise error_at(
            SpecValueError,
            "'timer' needs a class: bipolar or cmos",
            stmt.pos,
            example_hint("timer"),
        )
    word = stmt.args[0][0]
    name = word.text.lower()
    if name not in TIMER_CLASSES:
        raise error_at(
            SpecValueError,
            f"unknown timer class {word.text!r}",
            word.pos,
            did_you_mean(word.text, list(TIMER_CLASSES)) or "the classes are bipolar and cmos",
        )
    overrides: dict[str, float] = {}
    rest = [stmt.args[0][1:], *stmt.args[1:]]
    for arg in rest:
        if not arg:
            continue
        head = arg[0]
        if not (isinstance(head, Word) and head.text in ("initial", "drift") and len(arg) == 2):
            raise error_at(
                SpecValueError,
                "after the timer class come 'initial ±3%' and 'drift ±150 ppm/K'",
                head.pos,
                example_hint("timer"),
            )
        value = arg[1]
        q = value.plus if isinstance(value, Tolerance) else value
        if not isinstance(q, Quantity):
            raise error_at(SpecValueError, f"'{head.text}' needs a value", value.pos)
        if head.text == "initial":
            check_kind(q, ["ratio"], "timer")
            overrides["initial"] = abs(q.value)
        else:
            check_kind(q, ["tempco"], "timer")
            overrides["drift_ppm"] = round(abs(q.value) * 1e6, 9)
    return Reading("timer", (name, overrides))


def read_gate(stmt: Statement) -> Reading:
    """Read the Schmitt-inverter class.

    Parameters
    ----------
    stmt
        The ``gate`` statement.

    Returns
    -------
    Reading
        A ``"gate"`` reading holding the class name.
    """
    term = single_term(stmt, "a Schmitt-inverter class: " + " or ".join(GATE_CLASSES))
    if not isinstance(term, Word) or term.text.lower() not in GATE_CLASSES:
        text = term.text if isinstance(term, Word) else ""
        raise error_at(
            SpecValueError,
            f"unknown gate class {text!r}" if text else "'gate' needs a class name",
            term.pos,
            did_you_mean(text, list(GATE_CLASSES)) or "the classes are " + ", ".join(GATE_CLASSES),
        )
    return Reading("gate", term.text.lower())
