"""The package's error types.

Every mistake a user can make in a spec or on the command line surfaces as a
:class:`SpecError` (or a subclass).  The message names the file, line and
column, repeats the offending line with a caret under the column, and gives a
hint where one helps.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

__all__ = [
    "MAX_ERRORS",
    "Pos",
    "SpecEmptyError",
    "SpecError",
    "SpecErrors",
    "SpecIncludeError",
    "SpecSyntaxError",
    "SpecUnitError",
    "SpecValueError",
    "UsageError",
    "collect_errors",
]

#: At most this many mistakes of one spec are reported at once.
MAX_ERRORS = 20


@dataclass(frozen=True)
class Pos:
    """Where a piece of text stands.

    Attributes
    ----------
    path
        The file, or ``None`` for text given directly.
    line, column
        1-based position of the first character.
    source_line
        The whole line, for the caret display.
    """

    path: str | None
    line: int
    column: int
    source_line: str


class SpecError(ValueError):
    """Base class for every user-facing error of timespec.

    Parameters
    ----------
    message
        What is wrong, in one sentence.
    path
        The spec file, or ``None`` for text given directly.
    line, column
        1-based position of the offending text, or ``None`` when unknown.
    source_line
        The text of the offending line, repeated under the message.
    hint
        What to do about it, or ``None``.
    """

    def __init__(
        self,
        message: str,
        *,
        path: str | None = None,
        line: int | None = None,
        column: int | None = None,
        source_line: str | None = None,
        hint: str | None = None,
    ) -> None:
        super().__init__(message)
        self.message = message
        self.path = path
        self.line = line
        self.column = column
        self.source_line = source_line
        self.hint = hint

    def __reduce__(self) -> tuple[object, ...]:
        return (
            _rebuild,
            (
                type(self),
                self.message,
                self.path,
                self.line,
                self.column,
                self.source_line,
                self.hint,
            ),
        )

    @property
    def location(self) -> str:
        """``path:line:col`` (parts that are unknown are left out)."""
        where = self.path if self.path is not None else "<spec>"
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        return where

    def __str__(self) -> str:
        text = f"{self.location}: error: {self.message}"
        if self.source_line is not None:
            shown = self.source_line.rstrip("\n").expandtabs(1)
            text += f"\n    {shown}"
            if self.column is not None:
                text += "\n    " + " " * (self.column - 1) + "^"
        if self.hint:
            text += f"\n  hint: {self.hint}"
        return text


def _rebuild(
    cls: type[SpecError],
    message: str,
    path: str | None,
    line: int | None,
    column: int | None,
    source_line: str | None,
    hint: str | None,
) -> SpecError:
    return cls(message, path=path, line=line, column=column, source_line=source_line, hint=hint)


class SpecSyntaxError(SpecError):
    """The text does not follow the spec grammar."""


class SpecValueError(SpecError):
    """A statement is well formed but its values make no sense (an inverted range, say)."""


class SpecEmptyError(SpecValueError):
    """The spec has no blocks: a file of shared ``defaults:`` meant to be included.

    A tree check (``timespec check FOLDER``) skips such a file when it reaches it
    by walking a folder; named on its own it is an error like any other.
    """


class SpecUnitError(SpecError):
    """A quantity has the wrong dimension or an unknown unit."""


class SpecIncludeError(SpecError):
    """An ``include`` statement names a file that cannot be read or lies outside the spec root."""


class UsageError(SpecError):
    """The command line or an API call was used wrongly."""


class SpecErrors(SpecError):  # noqa: N818 - several SpecError at once
    """Several independent mistakes of one spec, reported at once.

    The exception's own message, position and hint are those of the first
    mistake, so code that reads one error keeps working; ``errors`` holds
    every mistake in the order of the text, at most :data:`MAX_ERRORS`.  Raised
    through :func:`collect_errors`, the exception is also an instance of the
    first mistake's class (a syntax error first makes it a
    :class:`SpecSyntaxError` too).

    Parameters
    ----------
    errors
        The mistakes, first one first (at least two, or one and ``truncated``).
    truncated
        Whether more mistakes followed the ones kept.

    Attributes
    ----------
    errors : tuple of SpecError
        Every mistake kept, each located.
    truncated : bool
        Whether more followed.
    """

    def __init__(self, errors: Iterable[SpecError], *, truncated: bool = False) -> None:
        kept = tuple(errors)
        if not kept:
            raise ValueError("SpecErrors needs at least one error")
        first = kept[0]
        super().__init__(
            first.message,
            path=first.path,
            line=first.line,
            column=first.column,
            source_line=first.source_line,
            hint=first.hint,
        )
        self.errors = kept
        self.truncated = truncated

    def __reduce__(self) -> tuple[object, ...]:
        return (_rebuild_several, (self.errors, self.truncated))

    def __str__(self) -> str:
        text = "\n".join(SpecError.__str__(e) for e in self.errors)
        if self.truncated:
            where = self.path if self.path is not None else "the spec"
            text += (
                f"\ntimespec: stopped after {len(self.errors)} mistakes in {where}; "
                "fix these and run it again"
            )
        return text


_SEVERAL: dict[type[SpecError], type[SpecErrors]] = {}


def _several(cls: type[SpecError]) -> type[SpecErrors]:
    """The class of several mistakes whose first is a ``cls``: both at once."""
    if cls is SpecError or issubclass(cls, SpecErrors):
        return SpecErrors
    if cls not in _SEVERAL:
        combined = type("SpecErrors", (SpecErrors, cls), {"__doc__": SpecErrors.__doc__})
        combined.__module__ = __name__
        _SEVERAL.setdefault(cls, combined)
    return _SEVERAL[cls]


def _rebuild_several(errors: tuple[SpecError, ...], truncated: bool) -> SpecError:
    return collect_errors(errors, truncated=truncated)


def collect_errors(errors: Iterable[SpecError], *, truncated: bool = False) -> SpecError:
    """One exception for the mistakes of a spec.

    Parameters
    ----------
    errors
        The mistakes in the order of the text; a :class:`SpecErrors` among them
        stands for its own mistakes.  Repeats (same place and message) are dropped
        and at most :data:`MAX_ERRORS` are kept.
    truncated
        Whether more mistakes followed.

    Returns
    -------
    SpecError
        The one mistake itself when there is exactly one (so a spec with one
        mistake reports exactly as it always did), else a :class:`SpecErrors`
        that is also an instance of the first mistake's class.
    """
    flat: list[SpecError] = []
    seen: set[tuple[object, ...]] = set()
    for err in errors:
        for one in err.errors if isinstance(err, SpecErrors) else (err,):
            key = (one.path, one.line, one.column, one.message)
            if key not in seen:
                seen.add(key)
                flat.append(one)
        truncated = truncated or (isinstance(err, SpecErrors) and err.truncated)
    if not flat:
        raise ValueError("collect_errors needs at least one error")
    if len(flat) > MAX_ERRORS:
        flat, truncated = flat[:MAX_ERRORS], True
    if len(flat) == 1 and not truncated:
        return flat[0]
    return _several(type(flat[0]))(flat, truncated=truncated)
