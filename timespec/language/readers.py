"""Statement readers: how each statement's arguments become model values.

Each reader takes a parsed :class:`~timespec.language.parser.Statement`, checks the kind
and shape of its arguments, and returns a :class:`Reading` — or raises a
positioned :class:`~timespec.errors.SpecError` naming what is wrong and how
to write it.  The table that says which keyword uses which reader, and in
which blocks, is :mod:`timespec.language.statements`.
"""

from __future__ import annotations

import math
import re
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
from timespec.model import PinnedPart, Requirement, Window
from timespec.parts import dielectrics, series
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES

__all__ = [
    "KIND_NAMES",
    "Reader",
    "Reading",
    "did_you_mean",
    "error_at",
    "read_ambient",
    "read_choice",
    "read_clock",
    "read_count",
    "read_gate",
    "read_include",
    "read_level",
    "read_life",
    "read_limit",
    "read_policy",
    "read_ppm",
    "read_requirement",
    "read_span",
    "read_spread",
    "read_supply",
    "read_timer",
    "read_trigger",
    "read_use",
]


def _example(keyword: str) -> str:
    """The example statement of a keyword, from the table."""
    kw = KEYWORDS.get(keyword)
    return kw.example if kw else keyword


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


Reader = Callable[[Statement], Reading]


# --------------------------------------------------------------------------
# argument helpers


def _type_name(term: Term) -> str:
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


def _pos_of(term: Term) -> Pos:
    return term.pos


def _single(stmt: Statement, what: str) -> Term:
    if not stmt.args:
        raise error_at(
            SpecValueError, f"'{stmt.keyword}' needs {what}", stmt.pos, _example_hint(stmt.keyword)
        )
    if len(stmt.args) > 1 or len(stmt.args[0]) > 1:
        extra = stmt.args[0][1] if len(stmt.args[0]) > 1 else stmt.args[1][0]
        raise error_at(
            SpecValueError,
            f"'{stmt.keyword}' takes one value; this is one too many",
            _pos_of(extra),
            _example_hint(stmt.keyword),
        )
    return stmt.args[0][0]


def _example_hint(keyword: str) -> str | None:
    kw = KEYWORDS.get(keyword)
    return f"write it like: {kw.example}" if kw else None


def _check_kind(q: Quantity, kinds: Sequence[str | None], keyword: str) -> None:
    if q.kind in kinds:
        return
    want = " or ".join(KIND_NAMES.get(k, str(k)) for k in kinds)
    if q.kind is None:
        raise error_at(
            SpecUnitError,
            f"'{keyword}' needs {want}; {q.text!r} has no unit",
            q.pos,
            _example_hint(keyword),
        )
    raise error_at(
        SpecUnitError,
        f"'{keyword}' needs {want}, but {q.text!r} is {KIND_NAMES.get(q.kind, q.kind)}",
        q.pos,
        _example_hint(keyword),
    )


def _tolerance_span(nominal: Quantity, tol: Tolerance, keyword: str) -> tuple[float, float]:
    """Absolute (minus, plus) deviation of a toleranced value."""
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
                _example_hint(keyword),
            )
    return (out[0], out[1])


def _window(term: Term, kinds: Sequence[str | None], keyword: str, *, exact_ok: bool) -> Window:
    """Read a value term as a window of one of ``kinds``."""
    try:
        if isinstance(term, Toleranced):
            _check_kind(term.nominal, kinds, keyword)
            minus, plus = _tolerance_span(term.nominal, term.tolerance, keyword)
            n = term.nominal.value
            return Window(n - minus, n + plus, str(term.nominal.kind), n)
        if isinstance(term, Range):
            low, high = term.low, term.high
            if low.kind is None and high.kind is not None:
                low = Quantity(low.value, high.kind, low.text, low.pos)
            _check_kind(low, kinds, keyword)
            _check_kind(high, kinds, keyword)
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
            _check_kind(q, kinds, keyword)
            if term.side == "min":
                return Window(q.value, math.inf, str(q.kind))
            return Window(-math.inf, q.value, str(q.kind))
        if isinstance(term, Quantity):
            _check_kind(term, kinds, keyword)
            if not exact_ok:
                raise error_at(
                    SpecValueError,
                    f"'{keyword}' needs a tolerance or a range, not an exact value",
                    term.pos,
                    _example_hint(keyword),
                )
            return Window(term.value, term.value, str(term.kind), term.value)
    except ValueError as exc:
        if isinstance(exc, SpecError):
            raise
        raise error_at(SpecValueError, str(exc), _pos_of(term)) from None
    raise error_at(
        SpecValueError,
        f"'{keyword}' needs {' or '.join(KIND_NAMES.get(k, str(k)) for k in kinds)}"
        f" with a tolerance or range, not {_type_name(term)}",
        _pos_of(term),
        _example_hint(keyword),
    )


def _quantity(term: Term, kinds: Sequence[str | None], keyword: str) -> Quantity:
    if not isinstance(term, Quantity):
        raise error_at(
            SpecValueError,
            f"'{keyword}' needs {' or '.join(KIND_NAMES.get(k, str(k)) for k in kinds)},"
            f" not {_type_name(term)}",
            _pos_of(term),
            _example_hint(keyword),
        )
    _check_kind(term, kinds, keyword)
    return term


def _positive(q: Quantity, keyword: str) -> float:
    if not q.value > 0:
        raise error_at(SpecValueError, f"'{keyword}' must be positive", q.pos)
    return q.value


# --------------------------------------------------------------------------
# readers


def read_requirement(quantity: str, kinds: Sequence[str]) -> Reader:
    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "a window, e.g. " + _example(stmt.keyword))
        win = _window(term, kinds, stmt.keyword, exact_ok=False)
        if (
            quantity == "duty"
            and not (win.low >= 0.0 and win.high <= 1.0)
            and not (math.isinf(win.low) or math.isinf(win.high))
        ):
            raise error_at(
                SpecValueError,
                "a duty cycle lies between 0 % and 100 %",
                _pos_of(term),
            )
        if win.kind != "ratio" and win.low <= 0 and not math.isinf(win.low):
            raise error_at(SpecValueError, f"'{stmt.keyword}' must stay above zero", _pos_of(term))
        if win.kind != "ratio" and math.isinf(win.low):
            win = Window(0.0, win.high, win.kind, win.nominal)
        return Reading("requirement", Requirement(quantity, win, stmt.pos))

    return read


def read_supply(stmt: Statement) -> Reading:
    term = _single(stmt, "a supply voltage, e.g. 12 V ±5%")
    win = _window(term, ["voltage"], "supply", exact_ok=True)
    if win.low <= 0:
        raise error_at(SpecValueError, "the supply must be above 0 V", _pos_of(term))
    return Reading("supply", win)


def read_ambient(stmt: Statement) -> Reading:
    term = _single(stmt, "a temperature range, e.g. -10 degC to 60 degC")
    win = _window(term, ["temperature"], "ambient", exact_ok=True)
    if math.isinf(win.low) or math.isinf(win.high):
        raise error_at(SpecValueError, "the ambient range needs both ends", _pos_of(term))
    if win.low < -273.15:
        raise error_at(SpecValueError, "the ambient lies below absolute zero", _pos_of(term))
    return Reading("ambient", (win.low, win.high))


def read_life(stmt: Statement) -> Reading:
    q = _quantity(_single(stmt, "a service life, e.g. 5 years"), ["time"], "life")
    if q.value < 0:
        raise error_at(SpecValueError, "the life must not be negative", q.pos)
    return Reading("life", q.value / (365.25 * 24 * 3600.0))


def _series_name(word: Word) -> str | None:
    name = word.text.upper()
    return name if name in series.SERIES_NAMES else None


def _policy_items(stmt: Statement, part: str, terms: Sequence[Term]) -> dict[str, Any]:
    """Read policy or part items: series, tolerance, tempco/dielectric, range, pairs, ageing."""
    fields: dict[str, Any] = {}
    is_res = part == "resistors"

    def put(key: str, value: Any, pos: Pos) -> None:
        if key in fields:
            raise error_at(SpecValueError, f"the {key.replace('_', ' ')} is given twice", pos)
        fields[key] = value

    for term in terms:
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
                        _did_you_mean(
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
                    _did_you_mean(term.text, [*series.SERIES_NAMES, "pairs"])
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
                raise error_at(
                    SpecUnitError,
                    f"{q.text!r} ({KIND_NAMES.get(q.kind, q.kind)}) has no meaning in a "
                    f"{'resistor' if is_res else 'capacitor'} policy",
                    q.pos,
                    hint,
                )
        elif isinstance(term, Range):
            want = "resistance" if is_res else "capacitance"
            win = _window(term, [want], stmt.keyword, exact_ok=True)
            if win.low <= 0:
                raise error_at(SpecValueError, "part values must be positive", term.pos)
            put("low", win.low, term.pos)
            fields["high"] = win.high
        else:
            raise error_at(
                SpecValueError,
                f"{_type_name(term)} has no meaning in a part policy",
                _pos_of(term),
                _example_hint(stmt.keyword),
            )
    return fields


def read_policy(part: str) -> Reader:
    def read(stmt: Statement) -> Reading:
        if not stmt.args:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' needs at least one item",
                stmt.pos,
                _example_hint(stmt.keyword),
            )
        terms = [t for arg in stmt.args for t in arg]
        return Reading(part, _policy_items(stmt, part, terms))

    return read


def read_use(stmt: Statement) -> Reading:
    if not stmt.args:
        raise error_at(
            SpecValueError, "'use' needs at least one part", stmt.pos, _example_hint("use")
        )
    parts: list[PinnedPart] = []
    for arg in stmt.args:
        ref = arg[0]
        if not isinstance(ref, Word):
            raise error_at(
                SpecValueError,
                "each part starts with its reference, e.g. R or C1",
                _pos_of(ref),
                _example_hint("use"),
            )
        if len(arg) < 2 or not isinstance(arg[1], Quantity):
            raise error_at(
                SpecValueError,
                f"part {ref.text} needs a value after its reference",
                _pos_of(arg[1]) if len(arg) > 1 else ref.pos,
                _example_hint("use"),
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
    if not stmt.args or not isinstance(stmt.args[0][0], Word):
        raise error_at(
            SpecValueError,
            "'timer' needs a class: bipolar or cmos",
            stmt.pos,
            _example_hint("timer"),
        )
    word = stmt.args[0][0]
    name = word.text.lower()
    if name not in TIMER_CLASSES:
        raise error_at(
            SpecValueError,
            f"unknown timer class {word.text!r}",
            word.pos,
            _did_you_mean(word.text, list(TIMER_CLASSES)) or "the classes are bipolar and cmos",
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
                _pos_of(head),
                _example_hint("timer"),
            )
        value = arg[1]
        q = value.plus if isinstance(value, Tolerance) else value
        if not isinstance(q, Quantity):
            raise error_at(SpecValueError, f"'{head.text}' needs a value", _pos_of(value))
        if head.text == "initial":
            _check_kind(q, ["ratio"], "timer")
            overrides["initial"] = abs(q.value)
        else:
            _check_kind(q, ["tempco"], "timer")
            overrides["drift_ppm"] = round(abs(q.value) * 1e6, 9)
    return Reading("timer", (name, overrides))


def read_gate(stmt: Statement) -> Reading:
    term = _single(stmt, "a Schmitt-inverter class: " + " or ".join(GATE_CLASSES))
    if not isinstance(term, Word) or term.text.lower() not in GATE_CLASSES:
        text = term.text if isinstance(term, Word) else ""
        raise error_at(
            SpecValueError,
            f"unknown gate class {text!r}" if text else "'gate' needs a class name",
            _pos_of(term),
            _did_you_mean(text, list(GATE_CLASSES)) or "the classes are " + ", ".join(GATE_CLASSES),
        )
    return Reading("gate", term.text.lower())


def read_choice(options: Sequence[str]) -> Reader:
    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "one of " + ", ".join(options))
        if not isinstance(term, Word) or term.text.lower() not in options:
            text = term.text if isinstance(term, Word) else ""
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' takes one of {', '.join(options)}",
                _pos_of(term),
                _did_you_mean(text, list(options)) if text else None,
            )
        return Reading("setting", term.text.lower())

    return read


def read_span(kinds: Sequence[str], *, fraction_of: str | None = None) -> Reader:
    """A window setting (a condition, not a requirement); may be exact."""

    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "a value, e.g. " + _example(stmt.keyword))
        if isinstance(term, Fraction):
            if fraction_of is None or term.of.lower() != fraction_of:
                raise error_at(
                    SpecValueError,
                    f"'{stmt.keyword}' can be a share of {fraction_of}, not of {term.of!r}"
                    if fraction_of
                    else f"'{stmt.keyword}' is not a share of anything",
                    term.pos,
                    _example_hint(stmt.keyword),
                )
            inner = term.inner
            win = _window(inner, ["ratio", None], stmt.keyword, exact_ok=True)
            win = Window(win.low, win.high, "ratio", win.nominal)
            if not (win.low > 0 and win.high < 1):
                raise error_at(
                    SpecValueError, f"a share of the {fraction_of} lies between 0 and 1", term.pos
                )
            return Reading("setting", win)
        win = _window(term, kinds, stmt.keyword, exact_ok=True)
        return Reading("setting", win)

    return read


def read_level(kinds: Sequence[str], *, positive: bool = True) -> Reader:
    def read(stmt: Statement) -> Reading:
        q = _quantity(_single(stmt, KIND_NAMES.get(kinds[0], "a value")), kinds, stmt.keyword)
        if positive:
            _positive(q, stmt.keyword)
        return Reading("setting", q.value)

    return read


def read_limit(kinds: Sequence[str]) -> Reader:
    """An upper limit: ``60 ohm max`` or a plain value read as a maximum."""

    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "a limit, e.g. " + _example(stmt.keyword))
        if isinstance(term, Bound):
            if term.side != "max":
                raise error_at(
                    SpecValueError, f"'{stmt.keyword}' is an upper limit: write 'max'", term.pos
                )
            q = term.quantity
        else:
            q = _quantity(term, kinds, stmt.keyword)
        _check_kind(q, kinds, stmt.keyword)
        _positive(q, stmt.keyword)
        return Reading("setting", q.value)

    return read


def read_ppm(*, rate: bool = False, requirement: str | None = None) -> Reader:
    """A symmetric or asymmetric ppm band: ``±10 ppm``; ``±3 ppm/year`` when ``rate``."""

    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "a band, e.g. " + _example(stmt.keyword))
        want = "rate" if rate else "ratio"
        if isinstance(term, Tolerance):
            for side in (term.minus, term.plus):
                _check_kind(side, [want], stmt.keyword)
            win = Window(-term.minus.value, term.plus.value, "ratio", 0.0)
        elif isinstance(term, Range | Bound | Quantity):
            win = _window(term, [want], stmt.keyword, exact_ok=False)
            win = Window(win.low, win.high, "ratio", win.nominal)
        else:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' needs a band such as {_example(stmt.keyword).split(' ', 1)[1]}",
                _pos_of(term),
            )
        if requirement is not None:
            return Reading("requirement", Requirement(requirement, win, stmt.pos))
        return Reading("setting", win)

    return read


def read_trigger(stmt: Statement) -> Reading:
    if not stmt.args:
        raise error_at(
            SpecValueError,
            "'trigger' needs the trigger pulse length",
            stmt.pos,
            _example_hint("trigger"),
        )
    first = stmt.args[0]
    if len(first) != 1:
        raise error_at(
            SpecValueError,
            "'trigger' starts with one time",
            _pos_of(first[-1]),
            _example_hint("trigger"),
        )
    q = _quantity(first[0], ["time"], "trigger")
    out: dict[str, float] = {"trigger": _positive(q, "trigger")}
    for arg in stmt.args[1:]:
        head = arg[0]
        if not (isinstance(head, Word) and head.text == "spacing" and len(arg) == 2):
            raise error_at(
                SpecValueError,
                "after the trigger length comes 'spacing <time>' (shortest time between triggers)",
                _pos_of(head),
                _example_hint("trigger"),
            )
        s = _quantity(arg[1], ["time"], "trigger")
        out["spacing"] = _positive(s, "trigger")
    return Reading("setting", out)


def read_count(minimum: int) -> Reader:
    def read(stmt: Statement) -> Reading:
        term = _single(stmt, "a whole number")
        if not (isinstance(term, Quantity) and term.kind is None and term.value.is_integer()):
            raise error_at(SpecValueError, f"'{stmt.keyword}' needs a whole number", _pos_of(term))
        if term.value < minimum:
            raise error_at(SpecValueError, f"'{stmt.keyword}' must be at least {minimum}", term.pos)
        return Reading("statistics", {stmt.keyword: int(term.value)})

    return read


def read_spread(stmt: Statement) -> Reading:
    if not stmt.args or not isinstance(stmt.args[0][0], Word):
        raise error_at(
            SpecValueError, "'spread' needs uniform or normal", stmt.pos, _example_hint("spread")
        )
    word = stmt.args[0][0]
    name = word.text.lower()
    if name not in ("uniform", "normal"):
        raise error_at(
            SpecValueError,
            f"unknown spread {word.text!r}",
            word.pos,
            _did_you_mean(word.text, ["uniform", "normal"]) or "use uniform or normal",
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
                _pos_of(first),
            )
        assert isinstance(first, Quantity)
        out["sigmas"] = first.value
    return Reading("statistics", out)


def read_clock(stmt: Statement) -> Reading:
    term = _single(stmt, "a clock frequency with its tolerance, e.g. 16 MHz ±50 ppm")
    win = _window(term, ["frequency"], "clock", exact_ok=True)
    if not win.low > 0:
        raise error_at(SpecValueError, "the fixture clock must be above 0 Hz", _pos_of(term))
    nominal = win.centre
    spread = max(nominal - win.low, win.high - nominal) / nominal
    return Reading("setting", {"clock": nominal, "clock_ppm": spread})


def read_include(stmt: Statement) -> Reading:
    term = _single(stmt, 'a quoted file name, e.g. include "common.tspec"')
    if not isinstance(term, Text):
        raise error_at(
            SpecValueError,
            "'include' needs a quoted file name",
            _pos_of(term),
            'write it like: include "common.tspec"',
        )
    return Reading("include", term)


def _did_you_mean(word: str, options: Sequence[str]) -> str | None:
    import difflib

    lowered = {o.lower(): o for o in options}
    close = difflib.get_close_matches(word.lower(), list(lowered), n=3, cutoff=0.6)
    if not close:
        return None
    return "did you mean " + " or ".join(repr(lowered[c]) for c in close) + "?"


did_you_mean = _did_you_mean
