"""Reading spec files with bounds: regular files only, a size cap, UTF-8 with or without a BOM.

Every spec file timespec reads (the top spec, each ``include``, a file given to
``timespec format``) goes through :func:`read_spec_file`, so that a named pipe
cannot hang the tool, ``/dev/zero`` cannot fill the memory, and a byte-order
mark written by an editor is accepted.  The limits on includes (depth, and how
many files one spec may pull in, counting repeats) live here too, so that a
spec that includes a file twice at every level fails at once instead of doubling
its work per level.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass
from pathlib import Path

__all__ = [
    "BOM",
    "MAX_INCLUDES",
    "MAX_INCLUDE_DEPTH",
    "MAX_SPEC_BYTES",
    "SourceError",
    "SpecText",
    "file_kind",
    "read_spec_file",
]

#: Largest spec file read, bytes (a spec of tens of thousands of lines fits).
MAX_SPEC_BYTES = 4 * 1024 * 1024

#: Deepest chain of ``include`` statements (top spec at depth 0).
MAX_INCLUDE_DEPTH = 32

#: Most included files one spec may pull in, counting each repeat.
MAX_INCLUDES = 1000

#: The UTF-8 byte-order mark some editors write at the start of a file.
BOM = "\ufeff"


class SourceError(Exception):
    """A spec file cannot be read; ``reason`` completes "cannot read <file>: ..."."""

    def __init__(self, reason: str) -> None:
        super().__init__(reason)
        self.reason = reason


@dataclass(frozen=True)
class SpecText:
    """A spec file's text.

    Attributes
    ----------
    text
        The text, without a leading byte-order mark.
    bom
        Whether the file started with one (``timespec format`` writes it back).
    """

    text: str
    bom: bool


def read_spec_file(path: Path) -> SpecText:
    """Read a spec file: a regular file of at most :data:`MAX_SPEC_BYTES`, UTF-8.

    Parameters
    ----------
    path
        The file.

    Returns
    -------
    SpecText
        Its text (a leading BOM removed and noted).

    Raises
    ------
    FileNotFoundError
        When there is no such file.
    SourceError
        When it is a folder, a device, a pipe or another non-regular file, is
        larger than the cap, is not UTF-8, or the system refuses to read it;
        ``reason`` says which.
    """
    try:
        # O_NONBLOCK: opening a named pipe must not wait for a writer.
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except FileNotFoundError:
        raise
    except IsADirectoryError:
        raise SourceError("it is a folder, not a spec file") from None
    except OSError as exc:
        raise SourceError(str(exc.strerror or exc)) from None
    try:
        st = os.fstat(fd)
        if stat.S_ISDIR(st.st_mode):
            raise SourceError("it is a folder, not a spec file")
        if not stat.S_ISREG(st.st_mode):
            raise SourceError(f"it is {file_kind(st.st_mode)}, not a regular file")
        if st.st_size > MAX_SPEC_BYTES:
            raise SourceError(
                f"it is {st.st_size:,} bytes; spec files are limited to "
                f"{MAX_SPEC_BYTES:,} bytes (split it with 'include')"
            )
        data = _read_at_most(fd, MAX_SPEC_BYTES + 1)
    except OSError as exc:
        raise SourceError(str(exc.strerror or exc)) from None
    finally:
        os.close(fd)
    if len(data) > MAX_SPEC_BYTES:
        raise SourceError(f"it grew past the limit of {MAX_SPEC_BYTES:,} bytes while being read")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise SourceError(f"it is not UTF-8 text ({exc.reason} at byte {exc.start})") from None
    if text.startswith(BOM):
        return SpecText(text[1:], True)
    return SpecText(text, False)


def _read_at_most(fd: int, limit: int) -> bytes:
    chunks: list[bytes] = []
    total = 0
    while total < limit:
        chunk = os.read(fd, min(1 << 16, limit - total))
        if not chunk:
            break
        chunks.append(chunk)
        total += len(chunk)
    return b"".join(chunks)


def file_kind(mode: int) -> str:
    """What a non-regular file is, in words, from its ``st_mode``.

    Parameters
    ----------
    mode
        ``os.stat_result.st_mode``.

    Returns
    -------
    str
        ``"a folder"``, ``"a device"``, ``"a named pipe"``, ``"a socket"`` or
        ``"not a regular file"``.
    """
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISFIFO(mode):
        return "a named pipe"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"
