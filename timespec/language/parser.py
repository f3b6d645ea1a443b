"""Spec text → a flat list of headers and statements, with positions.

The grammar (``grammar/timespec.lark``) is loaded once, lazily.  The lark tree
is turned into :class:`Header` and :class:`Statement` entries whose arguments
are the value classes of :mod:`timespec.language.values`.  Meaning — which statement
belongs where and what its values stand for — is the business of
:mod:`timespec.language.statements`; this module only reads.

Every failure leaves as a :class:`~timespec.errors.SpecError` subclass with the
file, line, column, the line itself and a hint.  No lark or pint exception
escapes.
"""

from __future__ import annotations

import functools
import re
import threading
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any

from lark import Lark, Token, Transformer
from lark.exceptions import (
    UnexpectedCharacters,
    UnexpectedEOF,
    UnexpectedInput,
    UnexpectedToken,
    VisitError,
)

from timespec.errors import (
    MAX_ERRORS,
    Pos,
    SpecError,
    SpecSyntaxError,
    SpecUnitError,
    collect_errors,
)
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
from timespec.model import BLOCK_KINDS
from timespec.parts.rkm import parse_rkm
from timespec.units import unit_info

__all__ = [
    "Broken",
    "Entry",
    "Header",
    "Statement",
    "grammar_text",
    "parse_entries",
    "parse_recovering",
    "source_lines",
]

SECONDS_PER_YEAR = 365.25 * 24 * 3600.0


@dataclass(frozen=True)
class Header:
    """A block header, ``oneshot relay_hold:`` or ``defaults:``.

    Attributes
    ----------
    kind
        The first word (block kind or section name).
    name
        The block's name, or ``None`` for a section such as ``defaults``.
    pos
        Position of the kind word.
    name_pos
        Position of the name, or ``None``.
    """

    kind: str
    name: str | None
    pos: Pos
    name_pos: Pos | None


@dataclass(frozen=True)
class Statement:
    """One statement: a keyword and its comma-separated arguments.

    Attributes
    ----------
    keyword
        The first word.
    args
        Each argument is the run of terms between commas.
    pos
        Position of the keyword.
    """

    keyword: str
    args: tuple[tuple[Term, ...], ...]
    pos: Pos


Entry = Header | Statement


@dataclass(frozen=True)
class Broken:
    """A line that could not be read, in place of its entries.

    Only :func:`parse_recovering` gives these; the assembler reports the error
    and keeps the mistake from causing others.

    Attributes
    ----------
    error
        The mistake, located.
    kind
        ``"header"`` when the line opens a block (its statements are then not
        checked: they would only repeat the mistake), ``"statement"`` for a
        statement line (the block it stands in is then not checked as a whole),
        ``"include"`` for an include that could not be followed (then no block
        is checked as a whole: the missing file may have held its defaults).
    """

    error: SpecError
    kind: str


def grammar_text() -> str:
    """Return the text of the spec grammar.

    The wheel carries the grammar as ``timespec/_grammar/timespec.lark``; a
    source checkout reads it from the top-level ``grammar/`` folder.

    Returns
    -------
    str
        The lark grammar.
    """
    packaged = resources.files("timespec").joinpath("_grammar", "timespec.lark")
    if packaged.is_file():
        return packaged.read_text(encoding="utf-8")
    here = Path(__file__).resolve().parents[2] / "grammar" / "timespec.lark"
    return here.read_text(encoding="utf-8")


@functools.cache
def _lark() -> Lark:
    """The plain parser (builds a lark tree); the benchmarks' baseline."""
    return Lark(grammar_text(), parser="lalr", lexer="contextual", maybe_placeholders=False)


_LOCK = threading.Lock()


@functools.cache
def _inline() -> tuple[Lark, _Builder]:
    """The parser with the builder applied during parsing (no intermediate tree)."""
    builder = _Builder()
    parser = Lark(
        grammar_text(),
        parser="lalr",
        lexer="contextual",
        maybe_placeholders=False,
        transformer=builder,
    )
    return parser, builder


# Characters that look alike but that pint or the grammar would not take.
# Each replacement has the same length, so columns stay right.
_LOOKALIKES = str.maketrans({"−": "-", "–": "-", "\u00a0": " ", "μ": "µ"})

#: Multiplier letters of IEC 60062 RKM codes, when written after a decimal number.
_RKM_LETTERS = frozenset("RKkMGTpnuµμ")

_PER_YEAR = re.compile(r"^(?P<num>.+)/(years?|yr|a)$")


class _Builder(Transformer[Token, Any]):
    """Turn the lark tree into entries.  One method per grammar rule."""

    def __init__(self) -> None:
        super().__init__()
        self._path: str | None = None
        self._lines: list[str] = []

    def reset(self, path: str | None, lines: list[str]) -> None:
        """Set the file name and lines of the text about to be parsed."""
        self._path = path
        self._lines = lines

    # -- positions --------------------------------------------------------
    def _pos(self, line: int, column: int) -> Pos:
        text = self._lines[line - 1] if 0 < line <= len(self._lines) else ""
        return Pos(self._path, line, column, text)

    def _tpos(self, tok: Token) -> Pos:
        return self._pos(tok.line or 1, tok.column or 1)

    # -- structure ----------------------------------------------------------
    def start(self, children: list[Any]) -> list[Entry]:
        out: list[Entry] = []
        for child in children:
            if isinstance(child, list):
                out.extend(child)
            elif isinstance(child, Header | Statement):
                out.append(child)
        return out

    def header(self, children: list[Any]) -> list[Entry]:
        words = [c for c in children if isinstance(c, Token) and c.type == "WORD"]
        stmts = [c for c in children if isinstance(c, Statement)]
        kind = words[0]
        name = words[1] if len(words) > 1 else None
        head = Header(
            str(kind),
            str(name) if name is not None else None,
            self._tpos(kind),
            self._tpos(name) if name is not None else None,
        )
        return [head, *stmts]

    def statement(self, children: list[Any]) -> Statement:
        keyword = children[0]
        args = tuple(tuple(a) for a in children[1:])
        return Statement(str(keyword), args, self._tpos(keyword))

    def arg(self, children: list[Any]) -> list[Term]:
        return list(children)

    # -- terms ----------------------------------------------------------------
    def word(self, children: list[Token]) -> Word:
        return Word(str(children[0]), self._tpos(children[0]))

    def text(self, children: list[Token]) -> Text:
        return Text(str(children[0])[1:-1], self._tpos(children[0]))

    def toleranced(self, children: list[Any]) -> Toleranced:
        return Toleranced(children[0], children[1], children[0].pos)

    def range(self, children: list[Any]) -> Range:
        return Range(_inherit_unit(children[0], children[1]), children[1], children[0].pos)

    def fraction_range(self, children: list[Any]) -> Fraction:
        pos = children[0].pos
        low = _inherit_unit(children[0], children[1])
        return Fraction(Range(low, children[1], pos), str(children[2]), pos)

    def fraction_toleranced(self, children: list[Any]) -> Fraction:
        pos = children[0].pos
        return Fraction(Toleranced(children[0], children[1], pos), str(children[2]), pos)

    def fraction(self, children: list[Any]) -> Fraction:
        return Fraction(children[0], str(children[1]), children[0].pos)

    def at_least(self, children: list[Any]) -> Bound:
        return Bound(children[0], "min", children[0].pos)

    def at_most(self, children: list[Any]) -> Bound:
        return Bound(children[0], "max", children[0].pos)

    def bare_tolerance(self, children: list[Any]) -> Tolerance:
        tol: Tolerance = children[0]
        return tol

    def tol_symmetric(self, children: list[Any]) -> Tolerance:
        q: Quantity = children[1]
        return Tolerance(q, q, self._tpos(children[0]))

    def tol_asymmetric(self, children: list[Any]) -> Tolerance:
        # the plus part is positioned at its "+" already
        plus: Quantity = children[0]
        return Tolerance(children[1], plus, plus.pos)

    # -- quantities ----------------------------------------------------------
    def _quantity(self, number: Token, unit: Token | None, sign: float, start: Token) -> Quantity:
        magnitude = sign * float(number)
        gap = "" if unit is not None and str(unit) == "%" else " "
        text = (
            ("-" if sign < 0 else "") + str(number) + (f"{gap}{unit}" if unit is not None else "")
        )
        if unit is None:
            return Quantity(magnitude, None, text, self._tpos(start))
        if str(unit) in _RKM_LETTERS and not (str(unit) == "K" and not _adjacent(number, unit)):
            return self._decimal_rkm(number, unit, sign, start)
        per_year = _PER_YEAR.match(str(unit))
        unit_text = per_year.group("num") if per_year else str(unit)
        try:
            info = unit_info(unit_text)
        except ValueError as exc:
            raise _positioned(SpecUnitError, str(exc), self._tpos(unit), None) from None
        if info.kind is None:
            raise _positioned(
                SpecUnitError,
                f"unit {str(unit)!r} is not one timespec uses (dimension {info.dimensionality})",
                self._tpos(unit),
                "timespec reads times, frequencies, resistance, capacitance, voltage, "
                "current, power, temperature, %, ppm and ppm/K",
            )
        value = magnitude * info.scale + info.offset
        kind: str = info.kind
        if per_year:
            if kind != "ratio":
                raise _positioned(
                    SpecUnitError,
                    f"a rate per year must be a ratio such as ppm/year or %/year, not {unit}",
                    self._tpos(unit),
                    None,
                )
            kind = "rate"
        return Quantity(value, kind, text, self._tpos(start))

    def _decimal_rkm(self, number: Token, unit: Token, sign: float, start: Token) -> Quantity:
        """``4.7k`` or ``4.7 k``: a value with a bare multiplier letter."""
        code = f"{number}{unit}"
        if not _adjacent(number, unit) or sign < 0:
            raise _positioned(
                SpecUnitError,
                f"{str(unit)!r} on its own is not a unit",
                self._tpos(unit),
                f"write the value as an RKM code without spaces ({code}) or with a full unit "
                f"('{number} k{'ohm' if str(unit) in 'kKMGR' else 'F'}')",
            )
        try:
            value, dimension = parse_rkm(code)
        except ValueError as exc:
            raise _positioned(SpecUnitError, str(exc), self._tpos(start), None) from None
        return Quantity(value, dimension, code, self._tpos(start))

    def number(self, children: list[Token]) -> Quantity:
        unit = children[1] if len(children) > 1 else None
        return self._quantity(children[0], unit, 1.0, children[0])

    def negative(self, children: list[Token]) -> Quantity:
        unit = children[1] if len(children) > 1 else None
        q = self._quantity(children[0], unit, -1.0, children[0])
        pos = q.pos
        return Quantity(
            q.value,
            q.kind,
            q.text,
            Pos(pos.path, pos.line, max(1, pos.column - 1), pos.source_line),
        )

    def positive(self, children: list[Token]) -> Quantity:
        unit = children[1] if len(children) > 1 else None
        return self._signed_plus(self._quantity(children[0], unit, 1.0, children[0]))

    def minutes(self, children: list[Token]) -> Quantity:
        return self._quantity(children[0], _minute_token(children[0]), 1.0, children[0])

    def negative_minutes(self, children: list[Token]) -> Quantity:
        return self.negative([children[0], _minute_token(children[0])])

    def positive_minutes(self, children: list[Token]) -> Quantity:
        return self.positive([children[0], _minute_token(children[0])])

    def positive_rkm(self, children: list[Token]) -> Quantity:
        return self._signed_plus(self.rkm(children))

    @staticmethod
    def _signed_plus(q: Quantity) -> Quantity:
        """A quantity written with a ``+``: the same value, positioned at the sign."""
        pos = q.pos
        return Quantity(
            q.value,
            q.kind,
            q.text,
            Pos(pos.path, pos.line, max(1, pos.column - 1), pos.source_line),
        )

    def rkm(self, children: list[Token]) -> Quantity:
        tok = children[0]
        code = _OHM_SUFFIX.sub("", str(tok))
        try:
            value, dimension = parse_rkm(code)
        except ValueError as exc:
            raise _positioned(SpecUnitError, str(exc), self._tpos(tok), None) from None
        if code != str(tok) and dimension != "resistance":
            raise _positioned(
                SpecUnitError,
                f"{str(tok)!r} puts the ohm sign on a {dimension} code",
                self._tpos(tok),
                f"write the code alone ({code}) or give the unit of a {dimension}",
            )
        return Quantity(value, dimension, code, self._tpos(tok))


#: The ohm sign (or word) that may be glued to an RKM code: ``4k7Ω``, ``100kohm``.
_OHM_SUFFIX = re.compile(r"(Ω|\u2126|ohms?)$")


def _minute_token(number: Token) -> Token:
    """The unit token of ``2 min``, which the grammar reads as a keyword."""
    return Token.new_borrow_pos("UNIT", "min", number)


_LEADING_NUMBER = re.compile(r"-?(\d+(\.\d*)?|\.\d+)([eE][+\-]?\d+)?\s*")


def _inherit_unit(low: Quantity, high: Quantity) -> Quantity:
    """The first end of a range with the unit of the second when it was left off.

    ``20 to 40 ms`` means 20 ms to 40 ms, ``-50 to 100 ppm`` means −50 ppm to
    100 ppm, ``3 to 5 pF`` 3 pF to 5 pF: the second end's unit (with its scale
    and offset) applies to a bare first end, for every kind of quantity.  A first
    end with a unit of its own, or a second end without one (or an RKM code such
    as ``4k7``, which carries no separate unit), is left as written.
    """
    if low.kind is not None or high.kind is None:
        return low
    m = _LEADING_NUMBER.match(high.text)
    if m is None or m.end() >= len(high.text):
        return low
    unit = high.text[m.end() :]
    per_year = _PER_YEAR.match(unit)
    try:
        info = unit_info(per_year.group("num") if per_year else unit)
    except ValueError:
        return low
    if info.kind is None:
        return low
    kind = "rate" if per_year else info.kind
    gap = "" if unit == "%" else " "
    return Quantity(low.value * info.scale + info.offset, kind, f"{low.text}{gap}{unit}", low.pos)


def _adjacent(first: Token, second: Token) -> bool:
    return first.end_pos is not None and first.end_pos == second.start_pos


def _positioned(cls: type[SpecError], message: str, pos: Pos, hint: str | None) -> SpecError:
    return cls(
        message,
        path=pos.path,
        line=pos.line,
        column=pos.column,
        source_line=pos.source_line,
        hint=hint,
    )


_TERMINAL_NAMES = {
    "NUMBER": "a number",
    "UNIT": "a unit",
    "WORD": "a word",
    "STRING": "a quoted file name",
    "RKM": "a value such as 4k7",
    "PLUSMINUS": "±",
    "_NL": "the end of the line",
    "COLON": "':'",
    "COMMA": "','",
    "SEMICOLON": "';'",
    "PLUS": "'+'",
    "MINUS": "'-'",
    "TO": "'to'",
    "OF": "'of'",
    "MIN": "'min'",
    "MAX": "'max'",
    "AT": "'at'",
    "$END": "the end of the file",
}


def _expected_text(expected: set[str] | frozenset[str]) -> str:
    names = sorted({_TERMINAL_NAMES.get(e, e.lower()) for e in expected})
    if not names:
        return "something else"
    if len(names) == 1:
        return names[0]
    return ", ".join(names[:-1]) + " or " + names[-1]


def _syntax_hint(line: str, column: int, got: str) -> str | None:
    before = line[: column - 1].rstrip()
    if before.endswith(("±", "+-", "+/-")):
        return "a tolerance needs a size after ±, e.g. ±5% or ±2 ms"
    head = re.match(r"\s*([A-Za-z_]\w*)\s*:", line)
    if head and head.group(1) in KEYWORDS:
        return f"statements take no ':'; write it like: {KEYWORDS[head.group(1)].example}"
    if got == ":":
        return "a block header is '<kind> <name>:' on a line of its own, e.g. 'oneshot relay_hold:'"
    if before.endswith(" to") or before.endswith("\tto"):
        return "a range needs both ends, e.g. '20 ms to 40 ms'"
    if got == ".":
        return (
            "write decimals with a digit before the point, e.g. 0.5, "
            "and RKM codes without one, e.g. 4k7"
        )
    if got and (got[0].isdigit() or got[0] == "-") and re.search(r"[A-Za-z]$", before):
        return None
    if got == ",":
        return "a comma separates the arguments of a statement; something is missing before it"
    return None


def source_lines(text: str) -> list[str]:
    """The lines of spec text, as the grammar counts them.

    Parameters
    ----------
    text
        Spec text.

    Returns
    -------
    list of str
        The text split at ``\\n`` only (a ``\\r`` right before it is dropped);
        no trailing empty line for text that ends with a newline.

    Notes
    -----
    The one definition of a line everywhere in timespec (error positions,
    carets, ``timespec format``): a line ends at LF or CR LF, as in the grammar's
    ``_NL``.  A form feed, a lone CR, U+0085, U+2028 or U+2029 is an ordinary
    character inside a line (``str.splitlines`` would split at each of them).
    """
    parts = text.split("\n")
    if parts and parts[-1] == "":
        parts.pop()
    return [p[:-1] if p.endswith("\r") else p for p in parts]


def _convert_lark_error(exc: UnexpectedInput, text: str, path: str | None) -> SpecSyntaxError:
    lines = source_lines(text) or [""]
    line = getattr(exc, "line", None) or 1
    column = getattr(exc, "column", None) or 1
    if isinstance(exc, UnexpectedEOF) or (line == -1):
        line = len(lines)
        column = len(lines[-1]) + 1
    source = lines[line - 1] if 0 < line <= len(lines) else ""
    if isinstance(exc, UnexpectedCharacters):
        got = source[column - 1] if column - 1 < len(source) else ""
        message = f"unexpected character {got!r}" if got else "unexpected end of the line"
        allowed = exc.allowed or set()
        if allowed:
            message += f"; expected {_expected_text(allowed)}"
    elif isinstance(exc, UnexpectedToken):
        tok = exc.token
        got = str(tok) if tok.type != "$END" else ""
        if tok.type == "_NL":
            message = "the line ends too early"
            got = "\n"
            # point just past the last character of the line
            column = len(source.rstrip()) + 1
        elif tok.type == "$END":
            message = "the file ends too early"
        else:
            message = f"unexpected {got!r}"
        expected = {e for e in exc.expected if not e.startswith("__")}
        if expected:
            message += f"; expected {_expected_text(expected)}"
    else:
        got = ""
        message = "the spec ends too early"
    hint = _syntax_hint(source, column, got)
    return SpecSyntaxError(
        message, path=path, line=line, column=column, source_line=source, hint=hint
    )


def _prepare(text: str) -> str:
    text = text.translate(_LOOKALIKES)
    if text and not text.endswith("\n"):
        text += "\n"
    return text


def _parse_once(text: str, original: str, path: str | None) -> list[Entry]:
    """One parse of ``text``; errors are located in ``original`` (same lines and columns)."""
    parser, _builder = _inline()
    try:
        entries: list[Entry] = parser.parse(text)  # type: ignore[assignment]
    except UnexpectedInput as exc:
        raise _convert_lark_error(exc, original, path) from None
    except VisitError as exc:
        inner = exc.orig_exc
        if isinstance(inner, SpecError):
            raise inner from None
        raise SpecSyntaxError(f"could not read the spec: {inner}", path=path) from None
    return entries


def parse_entries(text: str, path: str | None = None) -> list[Entry]:
    """Parse spec text into headers and statements.

    Parameters
    ----------
    text
        The spec text.
    path
        The file it came from, used in error messages.

    Returns
    -------
    list of Header or Statement
        In the order written; a one-line block gives its header then its statements.

    Raises
    ------
    SpecSyntaxError
        When the text does not follow the grammar.
    SpecUnitError
        When a unit is unknown or not one timespec uses.

    Notes
    -----
    A text with several mistakes raises them all at once, as a
    :class:`~timespec.errors.SpecErrors` that is also the first one's class
    (see :func:`parse_recovering`); a text with one raises that one.
    """
    found = parse_recovering(text, path)
    broken = [e.error for e in found if isinstance(e, Broken)]
    if broken:
        raise collect_errors(broken[:MAX_ERRORS], truncated=len(broken) > MAX_ERRORS)
    return [e for e in found if not isinstance(e, Broken)]


#: A section or block word that opens a header line.
_SECTIONS = frozenset((*BLOCK_KINDS, "defaults", "fixture"))
_HEADER_FORM = re.compile(r"\s*([A-Za-z_][A-Za-z0-9_\-]*)(\s+[A-Za-z_][A-Za-z0-9_\-]*)?\s*:")
_FIRST_WORD = re.compile(r"\s*([A-Za-z_][A-Za-z0-9_\-]*)")


def _opens_block(line: str) -> bool:
    """Whether a line that could not be read was meant as a block header.

    It is when it starts with a block kind or section word (``delay`` is also a
    statement: then only with a ``:``), or has the header form ``word [word]:``
    with a first word that is no statement keyword.
    """
    code = line.split("#", 1)[0]
    first = _FIRST_WORD.match(code)
    if first is None:
        return False
    word = first.group(1)
    if word in _SECTIONS and (word not in KEYWORDS or ":" in code):
        return True
    return _HEADER_FORM.match(code) is not None and word not in KEYWORDS


def parse_recovering(text: str, path: str | None = None) -> list[Entry | Broken]:
    """Parse spec text, reading past the lines that have mistakes.

    Parameters
    ----------
    text
        The spec text.
    path
        The file it came from, used in error messages.

    Returns
    -------
    list of Header, Statement or Broken
        The entries in the order written, with a :class:`Broken` in place of
        each line that could not be read.  Reading stops after one more than
        :data:`~timespec.errors.MAX_ERRORS` broken lines (so a caller knows that
        more followed); the entries before the last broken line are kept.

    Notes
    -----
    A statement is one line and the grammar is a list of lines, so a mistake
    stays on its line and the lines after it parse on their own.  The text is
    parsed whole (the only parse of a text without mistakes); when line *L*
    fails, the lines before it are parsed (they form a complete prefix) and
    parsing goes on from line *L* + 1, with *L* newlines in front so that every
    line and column keeps its place.  Each pass starts past the last mistake,
    so the loop ends, and the result is deterministic; all of it costs about
    two parses of the file however many mistakes it has.
    """
    global _LAST_BROKEN
    text = _prepare(text)
    last = _LAST_BROKEN
    if last is not None and last[0] == text and last[1] == path:
        return list(last[2])
    lines = source_lines(text)
    broken: list[Broken] = []
    entries: list[Entry] = []
    _parser, builder = _inline()
    with _LOCK:
        builder.reset(path, lines)
        _read_lines(text, lines, path, 1, len(lines), entries, broken)
    if not broken:
        return list(entries)
    merged = _merge(entries, broken)
    # A text with mistakes is often read twice in a row (parse_entries raises, then
    # the assembler reads past the mistakes): the second read is this copy.
    _LAST_BROKEN = (text, path, tuple(merged))
    return merged


_LAST_BROKEN: tuple[str, str | None, tuple[Entry | Broken, ...]] | None = None


def _segment(lines: list[str], first: int, last: int) -> str:
    """Lines ``first`` to ``last`` (1-based, inclusive), in their places."""
    return "\n" * (first - 1) + "".join(ln + "\n" for ln in lines[first - 1 : last])


def _read_lines(
    text: str,
    lines: list[str],
    path: str | None,
    first: int,
    last: int,
    entries: list[Entry],
    broken: list[Broken],
) -> None:
    """Parse lines ``first`` to ``last`` into ``entries``, a mistake into ``broken``."""
    while first <= last and len(broken) <= MAX_ERRORS:
        try:
            entries.extend(_parse_once(_segment(lines, first, last), text, path))
            return
        except SpecError as exc:
            line = exc.line
            if line is None or not first <= line <= last:
                # not on a line of this stretch: nothing to read past
                broken.append(Broken(exc, "statement"))
                return
            if line > first:
                _read_lines(text, lines, path, first, line - 1, entries, broken)
            broken.append(Broken(exc, "header" if _opens_block(lines[line - 1]) else "statement"))
            first = line + 1


def _merge(entries: list[Entry], broken: list[Broken]) -> list[Entry | Broken]:
    """The entries with each broken line put in its place, by line."""
    marks = sorted(broken, key=lambda b: b.error.line or 0)
    out: list[Entry | Broken] = []
    i = 0
    for entry in entries:
        while i < len(marks) and (marks[i].error.line or 0) < entry.pos.line:
            out.append(marks[i])
            i += 1
        out.append(entry)
    out.extend(marks[i:])
    return out
