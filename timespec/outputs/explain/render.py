"""Write a derivation as plain text, reStructuredText or Markdown.

Every number is written with twelve significant figures and its SI unit, so a
reviewer (or a test) can redo each line with a calculator and land on the
printed result.  The reST form uses rubrics, literal blocks and list tables
only (no section titles), so it can be included anywhere in a document and
parsed inside a directive.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass

from timespec.numbers import PPM_OUTPUTS, format_quantity, format_window
from timespec.outputs.explain.derive import BlockDerivation, Derivation, OutputDerivation

__all__ = ["DIGITS", "FORMS", "format_value", "render_derivation", "substitute"]

#: The forms :func:`render_derivation` writes.
FORMS = ("text", "rst", "md")

#: Significant figures of every printed number.
DIGITS = 12

_CORNER_TITLES = ("nominal", "low corner", "high corner")


def format_value(value: float, kind: str | None, *, ratio: str = "%") -> str:
    """One number with its unit, to twelve significant figures (``DIGITS``).

    Parameters
    ----------
    value
        SI value (°C for temperatures, a fraction for ratios, ppm/K for ``"ppm/K"``).
    kind
        Kind of quantity (:data:`timespec.units.KINDS`), ``"ppm/K"``, ``"ppm"`` (a
        fraction written in ppm) or ``None`` for a plain number.
    ratio
        How a ``"ratio"`` is written: ``"%"`` or ``"ppm"``.

    Returns
    -------
    str
        E.g. ``"124.24 kΩ"``, ``"0.666666666667"``, ``"-150 ppm/K"``, ``"-1 %"``.
    """
    if kind is None:
        return _plain(value)
    if kind == "ppm/K":
        return f"{_plain(value)} ppm/K"
    if kind == "ppm":
        return format_quantity(value, "ratio", ratio="ppm", digits=DIGITS)
    if kind == "ratio":
        return format_quantity(
            value, "ratio", ratio="ppm" if ratio == "ppm" else "%", digits=DIGITS
        )
    return format_quantity(value, kind, digits=DIGITS)


def _plain(value: float) -> str:
    if math.isinf(value):
        return "∞" if value > 0 else "−∞"
    if value == 0:
        return "0"
    return f"{value:.{DIGITS}g}"


def _output_ratio(o: OutputDerivation) -> str:
    return "ppm" if o.name in PPM_OUTPUTS else "%"


def _result(o: OutputDerivation, value: float) -> str:
    return format_value(value, o.kind, ratio=_output_ratio(o))


_EDGE = r"A-Za-z0-9_'.°"


def _pattern(names: Iterable[str]) -> re.Pattern[str] | None:
    """A regex matching any of the symbols as a whole token (longest first)."""
    ordered = sorted(set(names), key=len, reverse=True)
    if not ordered:
        return None
    return re.compile("|".join(rf"(?<![{_EDGE}]){re.escape(n)}(?![A-Za-z0-9_'.])" for n in ordered))


def substitute(line: str, values: Mapping[str, str]) -> str:
    """Write the numbers in place of the symbols of one equation's right side.

    Parameters
    ----------
    line
        ``"lhs = rhs"``.
    values
        Symbol → formatted value.

    Returns
    -------
    str
        The right side with every symbol replaced by its value (negative values
        and values with a compound unit such as ``mA/V`` in parentheses); the
        left side is kept.
    """
    lhs, sep, rhs = line.partition(" = ")
    pattern = _pattern(values)
    if not sep or pattern is None:
        return line

    def repl(m: re.Match[str]) -> str:
        text = values[m.group(0)]
        return f"({text})" if text.startswith(("-", "−")) or "/" in text else text

    return f"{lhs} = {pattern.sub(repl, rhs)}"


def _equations(o: OutputDerivation) -> list[str]:
    """The head and the equations it (or a note) needs, directly or through another."""
    eqs: list[str] = []
    for line in (o.head, *o.lines):
        for part in line.split(";  "):
            if part.strip() and part.strip() not in eqs:
                eqs.append(part.strip())
    pattern = _pattern(s.symbol for s in o.symbols)
    if pattern is None or not eqs:
        return eqs
    by_lhs = {eq.partition(" = ")[0]: eq for eq in eqs[1:]}
    needed: set[str] = set()
    todo = [eqs[0], *(f"_ = {n}" for n in o.notes)]  # what the notes speak of counts too
    while todo:
        rhs = todo.pop().partition(" = ")[2]
        for name in pattern.findall(rhs):
            if name in by_lhs and name not in needed:
                needed.add(name)
                todo.append(by_lhs[name])
    return [eqs[0], *(eq for eq in eqs[1:] if eq.partition(" = ")[0] in needed)]


def _worked(o: OutputDerivation, j: int) -> list[str]:
    """The equations with the numbers of point ``j`` substituted, each with its value."""
    values = {s.symbol: format_value(s.values[j], s.kind) for s in o.symbols}
    known = {s.symbol: s for s in o.symbols}
    eqs = _equations(o)
    out: list[str] = []
    for eq in [*eqs[1:][::-1], eqs[0]]:
        lhs = eq.partition(" = ")[0]
        if lhs == o.name:
            tail = _result(o, o.results[j])
        elif lhs in known:
            tail = values[lhs]
        else:
            tail = ""
        text = substitute(eq, {k: v for k, v in values.items() if k != lhs})
        same = text.partition(" = ")[2] == tail
        out.append(f"{text} = {tail}" if tail and not same else text)
    return out


def _verdict_line(o: OutputDerivation) -> str:
    nom, lo, hi = o.results
    ratio = _output_ratio(o)
    text = (
        f"{o.name}: {_result(o, nom)} at nominal, {_result(o, lo)} at the low corner, "
        f"{_result(o, hi)} at the high corner"
    )
    if o.required is not None:
        req = format_window(o.required, ratio=ratio)  # type: ignore[arg-type]
        text += f"; required {req}: {'meets' if o.meets else 'does not meet'}"
    return text


def _agreement(o: OutputDerivation) -> str:
    if o.agrees:
        return "the model at these three points gives the solver's nominal and worst case"
    nom, lo, hi = o.solver
    return (
        "the solver's numbers differ: "
        f"{_result(o, nom)}, {_result(o, lo)}, {_result(o, hi)} (please report this)"
    )


def _input_rows(o: OutputDerivation) -> list[tuple[str, ...]]:
    return [(i.name, *(format_value(v, i.kind) for v in i.values), i.label) for i in o.inputs]


def _symbol_rows(o: OutputDerivation) -> list[tuple[str, ...]]:
    """The symbols the output's equations use, at the three points."""
    pattern = _pattern(s.symbol for s in o.symbols)
    text = " ".join([*_equations(o), *o.notes])
    used = set(pattern.findall(text)) if pattern is not None else set()
    return [
        (s.symbol, *(format_value(v, s.kind) for v in s.values), s.meaning)
        for s in o.symbols
        if s.symbol in used
    ]


def _constant_rows(b: BlockDerivation) -> list[tuple[str, ...]]:
    return [(c.name, c.value, c.source, c.holds or "—") for c in b.constants]


_INPUT_HEAD = ("factor", *_CORNER_TITLES, "what")
_SYMBOL_HEAD = ("symbol", *_CORNER_TITLES, "meaning")
_CONSTANT_HEAD = ("constant", "value", "source", "holds for")


def _title(b: BlockDerivation) -> str:
    variant = f", {b.variant} circuit" if b.variant else ""
    return f"{b.name} ({b.kind}{variant}): {b.verdict}"


def _output_title(o: OutputDerivation) -> str:
    return f"{o.name}: {o.label}"


def _corner_note(o: OutputDerivation, j: int) -> str:
    if j == 0:
        return "at nominal"
    where = o.low_corner if j == 1 else o.high_corner
    return f"at the {_CORNER_TITLES[j]}" + (f" ({where})" if where else "")


# --------------------------------------------------------------------------
# plain text


def _text_table(head: Sequence[str], rows: Iterable[Sequence[str]], indent: str) -> list[str]:
    rows = [tuple(head), *(tuple(r) for r in rows)]
    widths = [max(len(r[k]) for r in rows) for k in range(len(head))]
    out = []
    for r in rows:
        cells = [c.ljust(widths[k]) for k, c in enumerate(r)]
        out.append((indent + "  ".join(cells)).rstrip())
    return out


def _text_output(o: OutputDerivation) -> list[str]:
    out = [_output_title(o), "-" * len(_output_title(o))]
    if o.head:
        out.append("formula:")
        out.extend(f"    {eq}" for eq in _equations(o))
        out.extend(f"    ({n})" for n in o.notes)
    out.append("parts at a corner:")
    out.extend(f"    {p}" for p in o.parts)
    out.append("inputs (the factors of the worst-case search):")
    out.extend(_text_table(_INPUT_HEAD, _input_rows(o), "    "))
    if o.symbols:
        out.append("symbols:")
        out.extend(_text_table(_SYMBOL_HEAD, _symbol_rows(o), "    "))
        for j in range(3):
            out.append(f"worked {_corner_note(o, j)}:")
            out.extend(f"    {line}" for line in _worked(o, j))
    out.append("result:")
    out.append(f"    {_verdict_line(o)}")
    out.append(f"    ({_agreement(o)})")
    return out


def _text_block(b: BlockDerivation) -> list[str]:
    title = _title(b)
    out = [title, "=" * len(title)]
    if b.parts:
        out.append("parts: " + "; ".join(b.parts))
    out.extend(f"note: {n}" for n in b.notes)
    for o in b.outputs:
        out.append("")
        out.extend(_text_output(o))
    if b.constants:
        out.extend(["", "constants and their sources:"])
        for c in b.constants:
            out.append(f"    {c.name} = {c.value}")
            out.append(f"        source: {c.source}")
            if c.holds:
                out.append(f"        holds for: {c.holds}")
    if b.findings:
        out.extend(["", "findings:"])
        out.extend(f"    {f.severity} {f.code}: {f.message}" for f in b.findings)
    return out


# --------------------------------------------------------------------------
# reST


def _rst_escape(text: str) -> str:
    text = text.replace("\\", "\\\\")
    for ch in "*`|":
        text = text.replace(ch, "\\" + ch)
    return re.sub(r"_(?=\s|$|[),;:])", r"\\_", text)


def _rst_table(head: Sequence[str], rows: Iterable[Sequence[str]]) -> list[str]:
    out = [".. list-table::", "   :header-rows: 1", ""]
    for r in (head, *rows):
        first = True
        for cell in r:
            text = _rst_escape(cell) if cell else "\\ "
            out.append(f"   {'* -' if first else '  -'} {text}")
            first = False
    out.append("")
    return out


def _rst_literal(lines: Iterable[str]) -> list[str]:
    body = [f"   {line}" for line in lines]
    return ["::", "", *body, ""] if body else []


def _rst_block(b: BlockDerivation) -> list[str]:
    out = [f".. rubric:: {_rst_escape(_title(b))}", ""]
    if b.parts:
        out.extend([f"Parts: {_rst_escape('; '.join(b.parts))}", ""])
    for n in b.notes:
        out.extend([f"Note: {_rst_escape(n)}", ""])
    for o in b.outputs:
        out.extend(_marked_output(o, _RST))
    if b.constants:
        out.extend([f"Constants of {_rst_escape(b.name)} and their sources:", ""])
        out.extend(_rst_table(_CONSTANT_HEAD, _constant_rows(b)))
    if b.findings:
        out.extend(["Findings:", ""])
        out.extend(f"* {f.severity} ``{f.code}``: {_rst_escape(f.message)}" for f in b.findings)
        out.append("")
    return out


# --------------------------------------------------------------------------
# Markdown


def _md_escape(text: str) -> str:
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("*", "\\*").replace("_", "\\_")


def _md_table(head: Sequence[str], rows: Iterable[Sequence[str]]) -> list[str]:
    out = ["| " + " | ".join(_md_escape(h) for h in head) + " |"]
    out.append("|" + "|".join("---" for _ in head) + "|")
    out.extend("| " + " | ".join(_md_escape(c) for c in r) + " |" for r in rows)
    out.append("")
    return out


def _md_code(lines: Iterable[str]) -> list[str]:
    body = list(lines)
    return ["```text", *body, "```", ""] if body else []


def _md_block(b: BlockDerivation) -> list[str]:
    out = [f"## {_md_escape(_title(b))}", ""]
    if b.parts:
        out.extend([f"Parts: {_md_escape('; '.join(b.parts))}", ""])
    for n in b.notes:
        out.extend([f"Note: {_md_escape(n)}", ""])
    for o in b.outputs:
        out.extend(_marked_output(o, _MD))
    if b.constants:
        out.extend(["Constants and their sources:", ""])
        out.extend(_md_table(_CONSTANT_HEAD, _constant_rows(b)))
    if b.findings:
        out.extend(["Findings:", ""])
        out.extend(f"* {f.severity} `{f.code}`: {_md_escape(f.message)}" for f in b.findings)
        out.append("")
    return out


def render_derivation(derivation: Derivation, form: str = "text") -> str:
    """Write a derivation for people.

    Parameters
    ----------
    derivation
        From :func:`timespec.outputs.explain.derive`.
    form
        ``"text"`` (a terminal or a review comment), ``"rst"`` (rubrics, literal
        blocks and list tables, to include in Sphinx docs) or ``"md"`` (headings,
        fenced blocks and pipe tables).

    Returns
    -------
    str
        The text, ending with a newline.

    Raises
    ------
    ValueError
        For an unknown form.
    """
    if form not in FORMS:
        raise ValueError(f"unknown form {form!r}; use one of {', '.join(FORMS)}")
    lines: list[str] = []
    where = f" of {derivation.source}" if derivation.source else ""
    if form == "text":
        lines.append(f"Derivation{where}: every output at nominal and at its worst-case corners")
        for b in derivation.blocks:
            lines.append("")
            lines.extend(_text_block(b))
    elif form == "rst":
        for b in derivation.blocks:
            lines.extend(_rst_block(b))
    else:
        lines.extend([f"# Derivation{_md_escape(where)}", ""])
        for b in derivation.blocks:
            lines.extend(_md_block(b))
    while lines and not lines[-1]:
        lines.pop()
    return "\n".join(lines) + "\n"


# --------------------------------------------------------------------------
# one output in a markup (reST or Markdown)


@dataclass(frozen=True)
class _Markup:
    """How a markup writes an output's heading, plain text, code and tables."""

    heading: Callable[[str], str]
    escape: Callable[[str], str]
    code: Callable[[Iterable[str]], list[str]]
    table: Callable[[Sequence[str], Iterable[Sequence[str]]], list[str]]


def _marked_output(o: OutputDerivation, m: _Markup) -> list[str]:
    out = [m.heading(_output_title(o)), ""]
    if o.head:
        out.extend(["Formula:", ""])
        out.extend(m.code([*_equations(o), *(f"({n})" for n in o.notes)]))
    out.extend(["Parts at a corner:", ""])
    out.extend(m.code(o.parts))
    out.extend(["Inputs (the factors of the worst-case search):", ""])
    out.extend(m.table(_INPUT_HEAD, _input_rows(o)))
    if o.symbols:
        out.extend(["Symbols:", ""])
        out.extend(m.table(_SYMBOL_HEAD, _symbol_rows(o)))
        for j in range(3):
            out.extend([f"Worked {m.escape(_corner_note(o, j))}:", ""])
            out.extend(m.code(_worked(o, j)))
    out.extend([f"Result: {m.escape(_verdict_line(o))} ({m.escape(_agreement(o))}).", ""])
    return out


_RST = _Markup(lambda t: f"**{_rst_escape(t)}**", _rst_escape, _rst_literal, _rst_table)
_MD = _Markup(lambda t: f"### {_md_escape(t)}", _md_escape, _md_code, _md_table)
