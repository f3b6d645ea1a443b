"""Canonical layout of spec text (``timespec format``).

The layout is rebuilt from what the parser read, so it cannot drift from the
grammar: headers at the left margin, statements indented by two spaces, one
space between terms, ``±`` for every symmetric tolerance, ``, `` between
arguments, a space between a number and its unit (none before ``%``), RKM
codes as written.  Comments, blank lines (runs folded to one) and the
one-line form are kept; statements that shared a line keep sharing it.

Before the new text is returned it is parsed again and the resulting model
compared with the original's: a layout that changed the meaning of a spec is
an internal error, never a silent rewrite.
"""

from __future__ import annotations

import itertools
from pathlib import Path

from timespec.errors import SpecError
from timespec.language.parser import Entry, Header, Statement, parse_entries, source_lines
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

__all__ = ["layout", "layout_file", "term_text"]

INDENT = "  "


def _tolerance(tol: Tolerance) -> str:
    minus, plus = tol.minus, tol.plus
    if minus.text == plus.text:
        return f"±{plus.text}"
    return f"+{plus.text} -{minus.text}"


def term_text(term: Term) -> str:
    """The canonical text of one parsed term.

    Parameters
    ----------
    term
        A value, word or string as the parser read it.

    Returns
    -------
    str
        e.g. ``"150 ms ±8%"``, ``"20 ms to 40 ms"``, ``"0.55 to 0.75 of supply"``.
    """
    if isinstance(term, Quantity):
        return term.text
    if isinstance(term, Toleranced):
        return f"{term.nominal.text} {_tolerance(term.tolerance)}"
    if isinstance(term, Tolerance):
        return _tolerance(term)
    if isinstance(term, Range):
        return f"{term.low.text} to {term.high.text}"
    if isinstance(term, Bound):
        return f"{term.quantity.text} {term.side}"
    if isinstance(term, Fraction):
        return f"{term_text(term.inner)} of {term.of}"
    if isinstance(term, Word):
        return term.text
    if isinstance(term, Text):
        return f'"{term.text}"'
    raise TypeError(f"not a term: {term!r}")  # pragma: no cover - the parser makes no others


def _statement_text(stmt: Statement) -> str:
    args = ", ".join(" ".join(term_text(t) for t in arg) for arg in stmt.args)
    return f"{stmt.keyword} {args}" if args else stmt.keyword


def _split_comment(line: str) -> tuple[str, str]:
    """Code and comment of one line (``#`` inside a quoted string does not count)."""
    quoted = False
    for i, ch in enumerate(line):
        if ch == '"':
            quoted = not quoted
        elif ch == "#" and not quoted:
            return line[:i], line[i:].rstrip()
    return line, ""


def _joiner(source: str, before: Statement, after: Statement) -> str:
    """Keep ``at`` where the writer used it between two statements on one line."""
    between = source[before.pos.column - 1 : after.pos.column - 1]
    words = between.split()
    return " at " if words and words[-1] == "at" else "; "


def layout(text: str, path: str | None = None) -> str:
    """Lay spec text out canonically.

    Parameters
    ----------
    text
        The spec text.
    path
        File name for error messages.

    Returns
    -------
    str
        The text in canonical layout, ending with one newline.

    Raises
    ------
    SpecError
        When the text does not parse (nothing is rewritten then).
    """
    entries = parse_entries(text, path)
    by_line: dict[int, list[Entry]] = {}
    for entry in entries:
        by_line.setdefault(entry.pos.line, []).append(entry)
    lines = source_lines(text)
    out: list[str] = []
    in_block = False
    for number, raw in enumerate(lines, start=1):
        _code, comment = _split_comment(raw)
        here = by_line.get(number, [])
        if not here:
            if comment:
                indent = INDENT if in_block and raw[:1].isspace() else ""
                out.append(indent + comment)
            elif out and out[-1] != "":
                out.append("")
            continue
        parts: list[str] = []
        indent = INDENT if in_block else ""
        stmts: list[Statement] = []
        for entry in here:
            if isinstance(entry, Header):
                in_block = entry.kind != "include"
                indent = ""
                head = entry.kind + (f" {entry.name}" if entry.name else "") + ":"
                parts.append(head)
            else:
                if entry.keyword == "include":
                    in_block = False
                    indent = ""
                stmts.append(entry)
        if stmts:
            body = _statement_text(stmts[0])
            for prev, stmt in itertools.pairwise(stmts):
                body += _joiner(raw, prev, stmt) + _statement_text(stmt)
            parts.append(body)
        line = indent + " ".join(parts)
        if comment:
            line += "  " + comment
        out.append(line)
    while out and out[-1] == "":
        out.pop()
    result = "\n".join(out) + "\n"
    _check_same_meaning(text, result, path)
    return result


def _meaning(text: str, path: str | None) -> list[tuple[object, ...]]:
    """What the entries say, positions left out."""
    out: list[tuple[object, ...]] = []
    for entry in parse_entries(text, path):
        if isinstance(entry, Header):
            out.append(("header", entry.kind, entry.name))
        else:
            out.append(
                ("statement", entry.keyword, tuple(tuple(_value(t) for t in a) for a in entry.args))
            )
    return out


def _value(term: Term) -> object:
    if isinstance(term, Quantity):
        return ("q", term.value, term.kind)
    if isinstance(term, Toleranced):
        return ("tol", _value(term.nominal), _value(term.tolerance))
    if isinstance(term, Tolerance):
        return ("pm", _value(term.minus), _value(term.plus))
    if isinstance(term, Range):
        return ("range", _value(term.low), _value(term.high))
    if isinstance(term, Bound):
        return ("bound", _value(term.quantity), term.side)
    if isinstance(term, Fraction):
        return ("of", _value(term.inner), term.of)
    if isinstance(term, Word | Text):
        return (type(term).__name__, term.text)
    raise TypeError(f"not a term: {term!r}")  # pragma: no cover


def _check_same_meaning(before: str, after: str, path: str | None) -> None:
    if _meaning(before, path) != _meaning(after, path):  # pragma: no cover - a bug if reached
        raise SpecError(
            "internal error: the canonical layout would change the spec's meaning; "
            "the file was left as it is",
            path=path,
            hint="please report this with the spec file",
        )


def layout_file(path: str | Path) -> tuple[str, str]:
    """Read a spec file and lay it out.

    Parameters
    ----------
    path
        The spec file.

    Returns
    -------
    tuple of str
        ``(original, canonical)`` text.

    Raises
    ------
    SpecError
        When the file cannot be read or does not parse.
    """
    from timespec.errors import SpecIncludeError
    from timespec.language.sources import BOM, SourceError, read_spec_file

    p = Path(path)
    try:
        source = read_spec_file(p)
    except FileNotFoundError:
        raise SpecIncludeError(f"no such spec file: {str(p)!r}", path=str(p)) from None
    except SourceError as exc:
        raise SpecIncludeError(f"cannot read {str(p)!r}: {exc.reason}", path=str(p)) from None
    mark = BOM if source.bom else ""  # a byte-order mark is kept as it was
    return mark + source.text, mark + layout(source.text, str(p))
