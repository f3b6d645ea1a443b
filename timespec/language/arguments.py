"""Typed reading of a statement's arguments, shared by every reader.

A reader (:mod:`timespec.language.readers`, :mod:`timespec.language.policies`)
takes a parsed :class:`~timespec.language.parser.Statement` and returns a
:class:`Reading`.  The checks they all share live here: the one-value shape
(:func:`single_term`), the kind of a quantity (:func:`check_kind`,
:func:`quantity_of`), windows from tolerances, ranges and bounds
(:func:`window_of`), and the positioned errors with their hints
(:func:`error_at`, :func:`example_hint`, :func:`did_you_mean`).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

from timespec.errors import Pos, SpecError, SpecUnitError, SpecValueError
from timespec.language.parser import Statement
from timespec.language.values import (
    Bound,
    Fraction,
    Quantity,
    Range,
    Term,
    Text,
    Tolerance,
    Toleranced,
    Word,
)
from timespec.language.vocabulary import KEYWORDS
from timespec.model import Window

__all__ = [
    "KIND_NAMES",
    "Reader",
    "Reading",
    "check_kind",
    "did_you_mean",
    "error_at",
    "example_hint",
    "example_of",
    "positive_value",
    "quantity_of",
    "single_term",
    "tolerance_span",
    "type_name",
    "window_of",
]


def example_of(keyword: str) -> str:
    """The example statement of a keyword, from the table.

    Parameters
    ----------
    keyword
        The statement keyword.

    Returns
    -------
    str
        Its example, or the keyword itself when it is not in the table.
    """
    kw = KEYWORDS.get(keyword)
    return kw.example if kw else keyword


#: What each quantity kind is called in error messages (``None``: no unit).
KIND_NAMES = {
    "time": "a time (s)",
    "frequency": "a frequency (Hz)",
    "resistance": "a resistance (Ω)",
    "capacitance": "a capacitance (F)",
    "voltage": "a voltage (V)",
    "current": "a current (A)",
    "power": "a power (W)",
    "transconductance": "a transconductance (A/V)",
    "temperature": "a temperature (°C)",
    "tempco": "a temperature coefficient (ppm/K)",
    "ratio": "a ratio (% or ppm)",
    "rate": "a rate per year (ppm/year, %/year)",
    None: "a plain number",
}


def error_at(
    cls: type[SpecError], message: str, pos: Pos | None, hint: str | None = None
) -> SpecError:
    """Build a positioned error.

    Parameters
    ----------
    cls
        The error class.
    message
        What is wrong.
    pos
        Where, or ``None``.
    hint
        What to do, or ``None``.

    Returns
    -------
    SpecError
        The error, ready to raise.
    """
    if pos is None:
        return cls(message, hint=hint)
    return cls(
        message,
        path=pos.path,
        line=pos.line,
        column=pos.column,
        source_line=pos.source_line,
        hint=hint,
    )


@dataclass(frozen=True)
class Reading:
    """What a statement contributes to its block.

    Attributes
    ----------
    target
        Which part of the block it sets: ``"requirement"``, ``"supply"``,
        ``"ambient"``, ``"life"``, ``"resistors"``, ``"capacitors"``,
        ``"timer"``, ``"gate"``, ``"pinned"``, ``"statistics"``, ``"setting"``,
        or ``"include"``.
    value
        The model value.
    """

    target: str
    value: Any


#: A reader: one parsed statement in, what it contributes out.
Reader = Callable[[Statement], Reading]


# --------------------------------------------------------------------------
# argument helpers


def type_name(term: Term) -> str:
    """What a term is, as error messages name it.

    Parameters
    ----------
    term
        A parsed argument term.

    Returns
    -------
    str
        For example ``"a time (s)"``, ``"a word"`` or ``"a range"``.
    """
    if isinstance(term, Quantity):
        return KIND_NAMES.get(term.kind, term.kind or "a number")
    return {
        Word: "a word",
        Text: "a quoted string",
        Range: "a range",
        Bound: "a bound",
        Toleranced: "a value with a tolerance",
        Tolerance: "a tolerance",
        Fraction: "a fraction",
    }.get(type(term), "a value")


def single_term(stmt: Statement, what: str) -> Term:
    """The one argument term of a statement that takes exactly one value.

    Parameters
    ----------
    stmt
        The parsed statement.
    what
        What the statement needs, for the message when it has no argument.

    Returns
    -------
    Term
        Its only term.

    Raises
    ------
    SpecValueError
        When it has no argument or more than one term.
    """
    if not stmt.args:
        raise error_at(
            SpecValueError, f"'{stmt.keyword}' needs {what}", stmt.pos, example_hint(stmt.keyword)
        )
    if len(stmt.args) > 1 or len(stmt.args[0]) > 1:
        extra = stmt.args[0][1] if len(stmt.args[0]) > 1 else stmt.args[1][0]
        raise error_at(
            SpecValueError,
            f"'{stmt.keyword}' takes one value; this is one too many",
            extra.pos,
            example_hint(stmt.keyword),
        )
    return stmt.args[0][0]


def example_hint(keyword: str) -> str | None:
    """The hint that shows a keyword's example statement.

    Parameters
    ----------
    keyword
        The statement keyword.

    Returns
    -------
    str or None
        ``"write it like: <example>"``, or ``None`` for an unknown keyword.
    """
    kw = KEYWORDS.get(keyword)
    return f"write it like: {kw.example}" if kw else None


def check_kind(q: Quantity, kinds: Sequence[str | None], keyword: str) -> None:
    """Check that a quantity is of one of the kinds a keyword takes.

    Parameters
    ----------
    q
        The quantity.
    kinds
        The kinds allowed (``None``: a plain number).
    keyword
        The statement keyword, for the message and hint.

    Raises
    ------
    SpecUnitError
        When its kind is not among ``kinds``.
    """
    if q.kind in kinds:
        return
    want = " or ".join(KIND_NAMES.get(k, str(k)) for k in kinds)
    if q.kind is None:
        raise error_at(
            SpecUnitError,
            f"'{keyword}' needs {want}; {q.text!r} has no unit",
            q.pos,
            example_hint(keyword),
        )
    raise error_at(
        SpecUnitError,
        f"'{keyword}' needs {want}, but {q.text!r} is {KIND_NAMES.get(q.kind, q.kind)}",
        q.pos,
        example_hint(keyword),
    )


def tolerance_span(nominal: Quantity, tol: Tolerance, keyword: str) -> tuple[float, float]:
    """Absolute (minus, plus) deviation of a toleranced value.

    Parameters
    ----------
    nominal
        The nominal value.
    tol
        Its tolerance, relative (%) or in the nominal's unit.
    keyword
        The statement keyword, for the hint.

    Returns
    -------
    tuple of float
        The deviations below and above the nominal, both >= 0.

    Raises
    ------
    SpecError
        When a side is negative or its unit does not fit the nominal.
    """
    out = []
    for side in (tol.minus, tol.plus):
        if side.value < 0:
            raise error_at(
                SpecValueError, "a tolerance is written as a size, not a negative number", side.pos
            )
        if side.kind == "ratio" and nominal.kind != "ratio":
            out.append(abs(nominal.value) * side.value)
        elif side.kind == nominal.kind:
            out.append(side.value)
        else:
            raise error_at(
                SpecUnitError,
                f"the tolerance {side.text!r} does not fit {nominal.text!r}: "
                f"write it in % or in {KIND_NAMES.get(nominal.kind, 'the same unit')}",
                side.pos,
                example_hint(keyword),
            )
    return (out[0], out[1])


def window_of(term: Term, kinds: Sequence[str | None], keyword: str, *, exact_ok: bool) -> Window:
    """Read a value term as a window of one of ``kinds``.

    Parameters
    ----------
    term
        A toleranced value, a range, a bound, or (when ``exact_ok``) a quantity.
    kinds
        The kinds allowed.
    keyword
        The statement keyword, for messages and hints.
    exact_ok
        Whether an exact value (a zero-width window) is allowed.

    Returns
    -------
    Window
        The window; a bound leaves its other end infinite.

    Raises
    ------
    SpecError
        When the term is of the wrong kind or shape, or the range is inverted.
    """
    try:
        if isinstance(term, Toleranced):
            check_kind(term.nominal, kinds, keyword)
            minus, plus = tolerance_span(term.nominal, term.tolerance, keyword)
            n = term.nominal.value
            return Window(n - minus, n + plus, str(term.nominal.kind), n)
        if isinstance(term, Range):
            low, high = term.low, term.high  # the parser gave a bare first end the unit
            check_kind(low, kinds, keyword)
            check_kind(high, kinds, keyword)
            if low.kind != high.kind:
                raise error_at(
                    SpecUnitError,
                    f"the two ends of the range differ in kind: {low.text!r} and {high.text!r}",
                    high.pos,
                )
            if low.value > high.value:
                raise error_at(
                    SpecValueError,
                    f"the range is inverted: {low.text} is above {high.text}",
                    term.pos,
                    "write the lower end first",
                )
            return Window(low.value, high.value, str(low.kind))
        if isinstance(term, Bound):
            q = term.quantity
            check_kind(q, kinds, keyword)
            if term.side == "min":
                return Window(q.value, math.inf, str(q.kind))
            return Window(-math.inf, q.value, str(q.kind))
        if isinstance(term, Quantity):
            check_kind(term, kinds, keyword)
            if not exact_ok:
                raise error_at(
                    SpecValueError,
                    f"'{keyword}' needs a tolerance or a range, not an exact value",
                    term.pos,
                    example_hint(keyword),
                )
            return Window(term.value, term.value, str(term.kind), term.value)
    except ValueError as exc:
        if isinstance(exc, SpecError):
            raise
        raise error_at(SpecValueError, str(exc), term.pos) from None
    raise error_at(
        SpecValueError,
        f"'{keyword}' needs {' or '.join(KIND_NAMES.get(k, str(k)) for k in kinds)}"
        f" with a tolerance or range, not {type_name(term)}",
        term.pos,
        example_hint(keyword),
    )


def quantity_of(term: Term, kinds: Sequence[str | None], keyword: str) -> Quantity:
    """Read a term as a plain quantity of one of ``kinds``.

    Parameters
    ----------
    term
        The term.
    kinds
        The kinds allowed.
    keyword
        The statement keyword, for messages and hints.

    Returns
    -------
    Quantity
        The term itself.

    Raises
    ------
    SpecError
        When it is not a quantity, or not of one of ``kinds``.
    """
    if not isinstance(term, Quantity):
        raise error_at(
            SpecValueError,
            f"'{keyword}' needs {' or '.join(KIND_NAMES.get(k, str(k)) for k in kinds)},"
            f" not {type_name(term)}",
            term.pos,
            example_hint(keyword),
        )
    check_kind(term, kinds, keyword)
    return term


def positive_value(q: Quantity, keyword: str) -> float:
    """The value of a quantity that must be positive.

    Parameters
    ----------
    q
        The quantity.
    keyword
        The statement keyword, for the message.

    Returns
    -------
    float
        Its value.

    Raises
    ------
    SpecValueError
        When it is not above zero.
    """
    if not q.value > 0:
        raise error_at(SpecValueError, f"'{keyword}' must be positive", q.pos)
    return q.value


def did_you_mean(word: str, options: Sequence[str]) -> str | None:
    """A hint naming the options closest to a mistyped word.

    Parameters
    ----------
    word
        What was written.
    options
        What could have been meant.

    Returns
    -------
    str or None
        ``"did you mean 'x' or 'y'?"``, or ``None`` when nothing is close.
    """
    import difflib

    lowered = {o.lower(): o for o in options}
    close = difflib.get_close_matches(word.lower(), list(lowered), n=3, cutoff=0.6)
    if not close:
        return None
    return "did you mean " + " or ".join(repr(lowered[c]) for c in close) + "?"
