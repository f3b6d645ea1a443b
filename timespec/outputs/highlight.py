"""Pygments lexer for the timespec spec language.

Loaded by Pygments through the ``pygments.lexers`` entry point (aliases ``tspec`` and
``timespec``, files ``*.tspec``), so a Sphinx project that installs timespec can write
``.. code-block:: tspec``.  The word lists come from :mod:`timespec.language.vocabulary`,
so the highlighting cannot drift from the language.
"""

from __future__ import annotations

from typing import Any, ClassVar

from pygments.lexer import RegexLexer, bygroups, words  # type: ignore[import-untyped]
from pygments.token import (  # type: ignore[import-untyped]
    Comment,
    Keyword,
    Name,
    Number,
    Operator,
    Punctuation,
    String,
    Text,
    Whitespace,
)

from timespec.language.vocabulary import KEYWORDS
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES

__all__ = ["TimespecLexer"]

_KINDS: tuple[str, ...] = tuple(sorted({k for kw in KEYWORDS.values() for k in kw.kinds}))
_STATEMENTS: tuple[str, ...] = tuple(sorted(KEYWORDS))
_OPTIONS: tuple[str, ...] = tuple(sorted({*GATE_CLASSES, *TIMER_CLASSES}))
_JOINERS: tuple[str, ...] = ("to", "of", "min", "max", "at", "sigma")
_END = r"(?![A-Za-z0-9_\-])"
_UNIT = r"(?!(?:to|of|min|max|at|sigma)(?![A-Za-z0-9_]))[A-Za-z%°µμΩΩ℃][A-Za-z0-9%°µμΩΩ℃/^*·_]*"
#: Words that may follow a number after a space without being its unit.
_NOT_UNITS: tuple[str, ...] = (
    *_JOINERS,
    *_STATEMENTS,
    *_KINDS,
    *_OPTIONS,
    "pairs",
    "rated",
)
_SPACED_UNIT = (
    r"([ \t]+)(?!(?:" + "|".join(sorted(_NOT_UNITS, key=len, reverse=True)) + r")"
    r"(?![A-Za-z0-9_]))(?![CXYNZ]\d|E\d|PP\b|PET\b|AL\b)(" + _UNIT[_UNIT.index("[A-Za-z%") :] + ")"
)


class TimespecLexer(RegexLexer):  # type: ignore[misc]
    """Highlight timespec specs (``*.tspec``): blocks, statements, values and units."""

    name = "timespec"
    aliases: ClassVar[list[str]] = ["tspec", "timespec"]
    filenames: ClassVar[list[str]] = ["*.tspec"]
    mimetypes: ClassVar[list[str]] = ["text/x-timespec"]

    tokens: ClassVar[dict[str, list[Any]]] = {
        "root": [
            (r"[ \t\f]+", Whitespace),
            (r"\r?\n", Whitespace),
            (r"#[^\n]*", Comment.Single),
            (r'"[^"\n]*"', String.Double),
            (words(_KINDS, suffix=_END), Keyword.Namespace),
            (words(_JOINERS, suffix=_END), Operator.Word),
            (words(_STATEMENTS, suffix=_END), Keyword),
            (words(_OPTIONS, suffix=_END), Name.Builtin),
            (r"±|\+/-|\+-", Operator),
            (r"(\d+[RKkMGTpnuµμ]\d+|R\d+|\d+[RKkMGTpnuµμ])(?![A-Za-z0-9.%_])", Number),
            (r"(\d+(\.\d*)?|\.\d+)([eE][+\-]?\d+)?", Number, "unit"),
            (r"[A-Za-z_][A-Za-z0-9_\-]*", Name),
            (r"[:;,]", Punctuation),
            (r"[+\-]", Operator),
            (r".", Text),
        ],
        "unit": [
            (_UNIT, Keyword.Type, "#pop"),
            (_SPACED_UNIT, bygroups(Whitespace, Keyword.Type), "#pop"),
            (r"", Text, "#pop"),
        ],
    }
