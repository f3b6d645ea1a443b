"""The package's error types.

Every mistake a user can make in a spec or on the command line surfaces as a
:class:`SpecError` (or a subclass).  The message names the file, line and
column, repeats the offending line with a caret under the column, and gives a
hint where one helps.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Pos",
    "SpecError",
    "SpecIncludeError",
    "SpecSyntaxError",
    "SpecUnitError",
    "SpecValueError",
    "UsageError",
]


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


class SpecUnitError(SpecError):
    """A quantity has the wrong dimension or an unknown unit."""


class SpecIncludeError(SpecError):
    """An ``include`` statement names a file that cannot be read or lies outside the spec root."""


class UsageError(SpecError):
    """The command line or an API call was used wrongly."""
