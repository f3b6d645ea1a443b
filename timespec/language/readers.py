"""Readers of requirements, conditions and block settings.

Each reader takes a parsed :class:`~timespec.language.parser.Statement`, checks the
kind and shape of its arguments, and returns a :class:`~timespec.language.arguments.Reading`
— or raises a positioned :class:`~timespec.errors.SpecError` saying what is wrong and
how to write it.  Here: requirement windows; supply, ambient, life; settings (spans,
levels, limits, ppm bands, trigger, clock, choices); statistics; includes.  Parts are
read in :mod:`timespec.language.policies`, the shared checks are in
:mod:`timespec.language.arguments`, and :mod:`timespec.language.statements` pairs readers
with keywords.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from timespec.errors import SpecValueError
from timespec.language.arguments import (
    KIND_NAMES,
    Reader,
    Reading,
    check_kind,
    did_you_mean,
    error_at,
    example_hint,
    example_of,
    positive_value,
    quantity_of,
    single_term,
    window_of,
)
from timespec.language.bounds import check_bounds
from timespec.language.parser import Statement
from timespec.language.values import Bound, Fraction, Quantity, Range, Text, Tolerance, Word
from timespec.model import Requirement, Window

__all__ = [
    "read_ageing",
    "read_ambient",
    "read_choice",
    "read_clock",
    "read_count",
    "read_include",
    "read_level",
    "read_life",
    "read_limit",
    "read_ppm",
    "read_requirement",
    "read_span",
    "read_spread",
    "read_supply",
    "read_trigger",
]


def read_requirement(quantity: str, kinds: Sequence[str]) -> Reader:
    """A requirement reader: a window (never exact) on ``quantity``.

    Parameters
    ----------
    quantity
        The requirement's quantity, e.g. ``"width"`` or ``"duty"``.
    kinds
        The kinds its window may be written in.

    Returns
    -------
    Reader
        Reads the statement into a ``"requirement"`` reading.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "a window, e.g. " + example_of(stmt.keyword))
        win = window_of(term, kinds, stmt.keyword, exact_ok=False)
        if (
            quantity == "duty"
            and not (win.low >= 0.0 and win.high <= 1.0)
            and not (math.isinf(win.low) or math.isinf(win.high))
        ):
            raise error_at(SpecValueError, "a duty cycle lies between 0 % and 100 %", term.pos)
        if win.kind != "ratio" and win.low <= 0 and not math.isinf(win.low):
            raise error_at(SpecValueError, f"'{stmt.keyword}' must stay above zero", term.pos)
        if win.kind != "ratio" and math.isinf(win.low):
            win = Window(0.0, win.high, win.kind, win.nominal)
        return Reading("requirement", Requirement(quantity, win, stmt.pos))

    return read


def read_supply(stmt: Statement) -> Reading:
    """Read the supply voltage, exact or as a window above 0 V.

    Parameters
    ----------
    stmt
        The ``supply`` statement.

    Returns
    -------
    Reading
        A ``"supply"`` reading holding a voltage window.
    """
    term = single_term(stmt, "a supply voltage, e.g. 12 V ±5%")
    win = window_of(term, ["voltage"], "supply", exact_ok=True)
    if win.low <= 0:
        raise error_at(SpecValueError, "the supply must be above 0 V", term.pos)
    return Reading("supply", win)


def read_ambient(stmt: Statement) -> Reading:
    """Read the ambient temperature range (both ends, above absolute zero).

    Parameters
    ----------
    stmt
        The ``ambient`` statement.

    Returns
    -------
    Reading
        An ``"ambient"`` reading holding (lowest, highest) in °C.
    """
    term = single_term(stmt, "a temperature range, e.g. -10 degC to 60 degC")
    win = window_of(term, ["temperature"], "ambient", exact_ok=True)
    if not isinstance(term, Bound):
        check_bounds(stmt, "defaults")  # an infinite end is not a missing one
    if math.isinf(win.low) or math.isinf(win.high):
        raise error_at(SpecValueError, "the ambient range needs both ends", term.pos)
    if win.low < -273.15:
        raise error_at(SpecValueError, "the ambient lies below absolute zero", term.pos)
    return Reading("ambient", (win.low, win.high))


def read_life(stmt: Statement) -> Reading:
    """Read the service life.

    Parameters
    ----------
    stmt
        The ``life`` statement.

    Returns
    -------
    Reading
        A ``"life"`` reading holding the life in years.
    """
    q = quantity_of(single_term(stmt, "a service life, e.g. 5 years"), ["time"], "life")
    if q.value < 0:
        raise error_at(SpecValueError, "the life must not be negative", q.pos)
    return Reading("life", q.value / (365.25 * 24 * 3600.0))


def read_choice(options: Sequence[str]) -> Reader:
    """A reader of one word out of a fixed list.

    Parameters
    ----------
    options
        The words allowed (lower case).

    Returns
    -------
    Reader
        Reads the statement into a ``"setting"`` reading holding the word.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "one of " + ", ".join(options))
        if not isinstance(term, Word) or term.text.lower() not in options:
            text = term.text if isinstance(term, Word) else ""
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' takes one of {', '.join(options)}",
                term.pos,
                did_you_mean(text, list(options)) if text else None,
            )
        return Reading("setting", term.text.lower())

    return read


def read_span(kinds: Sequence[str], *, fraction_of: str | None = None) -> Reader:
    """A window setting (a condition, not a requirement); may be exact.

    Parameters
    ----------
    kinds
        The kinds its window may be written in.
    fraction_of
        What it may be written as a share of (e.g. ``"supply"``), or ``None``.

    Returns
    -------
    Reader
        Reads the statement into a ``"setting"`` reading holding a window.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "a value, e.g. " + example_of(stmt.keyword))
        if isinstance(term, Fraction):
            if fraction_of is None or term.of.lower() != fraction_of:
                raise error_at(
                    SpecValueError,
                    f"'{stmt.keyword}' can be a share of {fraction_of}, not of {term.of!r}"
                    if fraction_of
                    else f"'{stmt.keyword}' is not a share of anything",
                    term.pos,
                    example_hint(stmt.keyword),
                )
            inner = term.inner
            win = window_of(inner, ["ratio", None], stmt.keyword, exact_ok=True)
            win = Window(win.low, win.high, "ratio", win.nominal)
            if not (win.low > 0 and win.high < 1):
                raise error_at(
                    SpecValueError, f"a share of the {fraction_of} lies between 0 and 1", term.pos
                )
            return Reading("setting", win)
        win = window_of(term, kinds, stmt.keyword, exact_ok=True)
        return Reading("setting", win)

    return read


def read_level(kinds: Sequence[str], *, positive: bool = True, hint: str | None = None) -> Reader:
    """A reader of one plain value.

    Parameters
    ----------
    kinds
        The kinds it may be written in.
    positive
        Whether it must be above zero.
    hint
        The hint of a value given in the wrong form, when the keyword's general
        example would mislead (a crystal's ``frequency`` is not a requirement).

    Returns
    -------
    Reader
        Reads the statement into a ``"setting"`` reading holding the value.
    """

    def read(stmt: Statement) -> Reading:
        try:
            term = single_term(stmt, KIND_NAMES.get(kinds[0], "a value"))
            q = quantity_of(term, kinds, stmt.keyword)
        except SpecValueError as exc:
            if hint is None:
                raise
            raise SpecValueError(
                exc.message,
                path=exc.path,
                line=exc.line,
                column=exc.column,
                source_line=exc.source_line,
                hint=hint,
            ) from None
        if positive:
            positive_value(q, stmt.keyword)
        return Reading("setting", q.value)

    return read


def read_limit(kinds: Sequence[str]) -> Reader:
    """An upper limit: ``60 ohm max`` or a plain value read as a maximum.

    Parameters
    ----------
    kinds
        The kinds it may be written in.

    Returns
    -------
    Reader
        Reads the statement into a ``"setting"`` reading holding the limit.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "a limit, e.g. " + example_of(stmt.keyword))
        if isinstance(term, Bound):
            if term.side != "max":
                raise error_at(
                    SpecValueError, f"'{stmt.keyword}' is an upper limit: write 'max'", term.pos
                )
            q = term.quantity
        else:
            q = quantity_of(term, kinds, stmt.keyword)
        check_kind(q, kinds, stmt.keyword)
        positive_value(q, stmt.keyword)
        return Reading("setting", q.value)

    return read


def read_ppm(*, rate: bool = False, requirement: str | None = None) -> Reader:
    """A symmetric or asymmetric ppm band: ``±10 ppm``; ``±3 ppm/year`` when ``rate``.

    Parameters
    ----------
    rate
        Whether the band is a rate per year.
    requirement
        The requirement it states, or ``None`` for a setting.

    Returns
    -------
    Reader
        Reads the statement into a ``"requirement"`` or ``"setting"`` reading.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "a band, e.g. " + example_of(stmt.keyword))
        want = "rate" if rate else "ratio"
        if isinstance(term, Tolerance):
            for side in (term.minus, term.plus):
                check_kind(side, [want], stmt.keyword)
            win = Window(-term.minus.value, term.plus.value, "ratio", 0.0)
        elif isinstance(term, Range | Bound | Quantity):
            win = window_of(term, [want], stmt.keyword, exact_ok=False)
            win = Window(win.low, win.high, "ratio", win.nominal)
        else:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' needs a band such as "
                f"{example_of(stmt.keyword).split(' ', 1)[1]}",
                term.pos,
            )
        if requirement is not None:
            return Reading("requirement", Requirement(requirement, win, stmt.pos))
        return Reading("setting", win)

    return read


def read_ageing(stmt: Statement) -> Reading:
    """A crystal's ageing: a rate (``±3 ppm/year``) or a total over a period
    (``±10 ppm over 10 years``), as datasheets give either.

    Parameters
    ----------
    stmt
        The ``aging`` statement.

    Returns
    -------
    Reading
        A ``"setting"`` reading holding ``aging`` (the band, a fraction; per year
        for a rate) and ``aging_period`` (s; 0 for a rate).
    """
    args = stmt.args
    word = args[0][1] if len(args) == 1 and len(args[0]) == 3 else None
    if isinstance(word, Word):
        band_term, _, period_term = args[0]
        if word.text.lower() != "over":
            raise error_at(
                SpecValueError,
                f"after the ageing band comes 'over <period>', not {word.text!r}",
                word.pos,
                "e.g. 'aging ±10 ppm over 10 years' or 'aging ±3 ppm/year'",
            )
        band = read_ppm()(Statement(stmt.keyword, ((band_term,),), stmt.pos)).value
        period = quantity_of(period_term, ["time"], stmt.keyword)
        return Reading(
            "setting", {"aging": band, "aging_period": positive_value(period, stmt.keyword)}
        )
    band = read_ppm(rate=True)(stmt).value
    return Reading("setting", {"aging": band, "aging_period": 0.0})


def read_trigger(stmt: Statement) -> Reading:
    """Read the trigger pulse length and, optionally, the shortest trigger spacing.

    Parameters
    ----------
    stmt
        The ``trigger`` statement.

    Returns
    -------
    Reading
        A ``"setting"`` reading holding ``trigger`` (and ``spacing``) in seconds.
    """
    if not stmt.args:
        raise error_at(
            SpecValueError,
            "'trigger' needs the trigger pulse length",
            stmt.pos,
            example_hint("trigger"),
        )
    first = stmt.args[0]
    if len(first) != 1:
        raise error_at(
            SpecValueError,
            "'trigger' starts with one time",
            first[-1].pos,
            example_hint("trigger"),
        )
    q = quantity_of(first[0], ["time"], "trigger")
    out: dict[str, float] = {"trigger": positive_value(q, "trigger")}
    for arg in stmt.args[1:]:
        head = arg[0]
        if not (isinstance(head, Word) and head.text == "spacing" and len(arg) == 2):
            raise error_at(
                SpecValueError,
                "after the trigger length comes 'spacing <time>' (shortest time between triggers)",
                head.pos,
                example_hint("trigger"),
            )
        s = quantity_of(arg[1], ["time"], "trigger")
        out["spacing"] = positive_value(s, "trigger")
    return Reading("setting", out)


def read_count(minimum: int, maximum: int) -> Reader:
    """A reader of a whole number from ``minimum`` to ``maximum``.

    Parameters
    ----------
    minimum
        The smallest number allowed.
    maximum
        The largest number allowed.

    Returns
    -------
    Reader
        Reads the statement into a ``"statistics"`` reading keyed by its keyword.
    """

    def read(stmt: Statement) -> Reading:
        term = single_term(stmt, "a whole number")
        if not (isinstance(term, Quantity) and term.kind is None and term.value.is_integer()):
            raise error_at(SpecValueError, f"'{stmt.keyword}' needs a whole number", term.pos)
        if term.value < minimum:
            raise error_at(SpecValueError, f"'{stmt.keyword}' must be at least {minimum}", term.pos)
        if term.value > maximum:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' must be at most {maximum:,}",
                term.pos,
                f"allowed: {minimum} to {maximum:,}",
            )
        return Reading("statistics", {stmt.keyword: int(term.value)})

    return read


def read_spread(stmt: Statement) -> Reading:
    """Read the Monte Carlo spread: uniform, or normal with its sigmas.

    Parameters
    ----------
    stmt
        The ``spread`` statement.

    Returns
    -------
    Reading
        A ``"statistics"`` reading holding ``distribution`` (and ``sigmas``).
    """
    if not stmt.args or not isinstance(stmt.args[0][0], Word):
        raise error_at(
            SpecValueError, "'spread' needs uniform or normal", stmt.pos, example_hint("spread")
        )
    word = stmt.args[0][0]
    name = word.text.lower()
    if name not in ("uniform", "normal"):
        raise error_at(
            SpecValueError,
            f"unknown spread {word.text!r}",
            word.pos,
            did_you_mean(word.text, ["uniform", "normal"]) or "use uniform or normal",
        )
    out: dict[str, Any] = {"distribution": name}
    rest = list(stmt.args[0][1:]) + [t for a in stmt.args[1:] for t in a]
    if rest:
        first = rest[0]
        ok = (
            name == "normal"
            and isinstance(first, Quantity)
            and first.kind is None
            and first.value > 0
            and (
                len(rest) == 1
                or (len(rest) == 2 and isinstance(rest[1], Word) and rest[1].text == "sigma")
            )
        )
        if not ok:
            raise error_at(
                SpecValueError,
                "a normal spread takes how many sigmas the tolerance spans, e.g. 'normal 3 sigma'",
                first.pos,
            )
        assert isinstance(first, Quantity)
        out["sigmas"] = first.value
    return Reading("statistics", out)


def read_clock(stmt: Statement) -> Reading:
    """Read the fixture clock frequency with its tolerance.

    Parameters
    ----------
    stmt
        The ``clock`` statement.

    Returns
    -------
    Reading
        A ``"setting"`` reading holding ``clock`` (Hz) and ``clock_ppm``.
    """
    term = single_term(stmt, "a clock frequency with its tolerance, e.g. 16 MHz ±50 ppm")
    win = window_of(term, ["frequency"], "clock", exact_ok=True)
    if not win.low > 0:
        raise error_at(SpecValueError, "the fixture clock must be above 0 Hz", term.pos)
    nominal = win.centre
    spread = max(nominal - win.low, win.high - nominal) / nominal
    return Reading("setting", {"clock": nominal, "clock_ppm": spread})


def read_include(stmt: Statement) -> Reading:
    """Read the quoted file name of an include.

    Parameters
    ----------
    stmt
        The ``include`` statement.

    Returns
    -------
    Reading
        An ``"include"`` reading holding the quoted text.
    """
    term = single_term(stmt, 'a quoted file name, e.g. include "common.tspec"')
    if not isinstance(term, Text):
        raise error_at(
            SpecValueError,
            "'include' needs a quoted file name",
            term.pos,
            'write it like: include "common.tspec"',
        )
    return Reading("include", term)
