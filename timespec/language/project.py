"""The project a spec belongs to: its root folder and project-wide options.

A project is marked by a file in a folder above the spec (or beside it): a
``timespec.toml``, or a ``pyproject.toml`` with a ``[tool.timespec]`` table.
The nearest such folder upward is the project's *root*; ``include`` may reach
any file under it and nothing outside it (symlinks resolved).  Without a
project file, the root is the top spec's own folder, as it always was.

The project file may set::

    samples = 50000              # default Monte Carlo sample count
    seed = 7                     # default Monte Carlo seed
    exclude = ["vendor", "old/**/*.tspec"]   # paths a tree walk skips

Precedence of ``samples`` and ``seed``, highest first: the command line (or the
arguments of :func:`timespec.solve`), the spec's own statements (in a block
or in ``defaults:``), the project file, the built-in defaults.

Every mistake in a project file is a :class:`~timespec.errors.SpecError` that
names the file and the key, with the line found by a simple scan.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath
from typing import Any

from timespec.errors import Pos, SpecError, SpecSyntaxError, SpecValueError
from timespec.language.arguments import did_you_mean
from timespec.language.sources import SourceError, read_spec_file
from timespec.model import MAX_SAMPLES, MAX_SEED

__all__ = [
    "PROJECT_FILE",
    "PROJECT_KEYS",
    "PYPROJECT_FILE",
    "Project",
    "glob_matches",
    "project_for",
    "read_project_file",
]

#: The project file of its own.
PROJECT_FILE = "timespec.toml"

#: The Python packaging file, whose ``[tool.timespec]`` table marks a project too.
PYPROJECT_FILE = "pyproject.toml"

#: The keys a project file may set, with what each holds (for hints).
PROJECT_KEYS: dict[str, str] = {
    "samples": f"a whole number from 1 to {MAX_SAMPLES:,}",
    "seed": "a whole number from 0 to 2**63 - 1",
    "exclude": 'a list of glob patterns relative to the root, e.g. ["vendor", "old/**"]',
}


@dataclass(frozen=True)
class Project:
    """The project of a spec or a folder.

    Attributes
    ----------
    root
        The folder ``include`` may not leave, symlinks resolved.
    samples
        Default Monte Carlo sample count, or ``None`` for the built-in one.
    seed
        Default Monte Carlo seed, or ``None`` for the built-in one.
    exclude
        Glob patterns, relative to the root, of files and folders a tree walk
        skips (see :meth:`excludes`).
    file
        The project file (``timespec.toml`` or ``pyproject.toml``), or ``None``
        when no project file was found and the root is the spec's folder.
    """

    root: Path
    samples: int | None = None
    seed: int | None = None
    exclude: tuple[str, ...] = ()
    file: Path | None = None
    _folder: Path | None = field(default=None, repr=False, compare=False)

    def relative(self, path: str | Path) -> str | None:
        """Where a path lies under the root, or ``None`` when it lies outside.

        Parameters
        ----------
        path
            A file or folder, absolute or relative to the working folder.

        Returns
        -------
        str or None
            The path relative to the root, segments separated by ``/`` (``.``
            for the root itself).
        """
        lexical = Path(os.path.abspath(path))
        for base, target in ((self._folder, lexical), (self.root, Path(path).resolve())):
            if base is None:
                continue
            try:
                return target.relative_to(base).as_posix()
            except ValueError:
                continue
        return None

    def excludes(self, path: str | Path) -> bool:
        """Whether a tree walk skips this file or folder.

        A path is skipped when an ``exclude`` pattern matches it or one of the
        folders it lies in, each written relative to the root: ``"vendor"``
        skips the folder ``vendor`` and everything in it, ``"**/draft"`` every
        folder named ``draft``, ``"old/*.tspec"`` the spec files directly in
        ``old``.  ``*`` and ``?`` stay inside one path segment, ``**`` spans
        any number of segments.

        Parameters
        ----------
        path
            A file or folder.

        Returns
        -------
        bool
            ``True`` when a pattern matches it or one of its folders under the
            root; ``False`` for paths outside the root.
        """
        rel = self.relative(path)
        if rel is None or not self.exclude or rel == ".":
            return False
        parts = rel.split("/")
        prefixes = ["/".join(parts[: i + 1]) for i in range(len(parts))]
        return any(glob_matches(p, prefix) for p in self.exclude for prefix in prefixes)


def glob_matches(pattern: str, path: str) -> bool:
    """Whether a ``/``-separated relative path matches a glob pattern.

    Parameters
    ----------
    pattern
        ``*`` (any characters but ``/``), ``?`` (one character but ``/``),
        ``[abc]`` (one of), ``**`` as a whole segment (any number of segments,
        none included).
    path
        The path, segments separated by ``/``.

    Returns
    -------
    bool
        Whether the whole path matches.
    """
    return _glob_regex(pattern).fullmatch(path) is not None


_GLOB_CACHE: dict[str, re.Pattern[str]] = {}


def _glob_regex(pattern: str) -> re.Pattern[str]:
    cached = _GLOB_CACHE.get(pattern)
    if cached is not None:
        return cached
    out: list[str] = []
    segments = pattern.strip("/").split("/")
    for i, seg in enumerate(segments):
        last = i == len(segments) - 1
        if seg == "**":
            out.append(".*" if last else "(?:[^/]+/)*")
            continue
        out.append(_segment_regex(seg))
        if not last:
            out.append("/")
    compiled = re.compile("".join(out))
    _GLOB_CACHE[pattern] = compiled
    return compiled


def _segment_regex(seg: str) -> str:
    out: list[str] = []
    i = 0
    while i < len(seg):
        ch = seg[i]
        if ch == "*":
            out.append("[^/]*")
        elif ch == "?":
            out.append("[^/]")
        elif ch == "[":
            end = seg.find("]", i + 2)
            if end < 0:
                out.append(re.escape(ch))
            else:
                body = seg[i + 1 : end]
                negate = body.startswith("!")
                body = body[1:] if negate else body
                out.append("[" + ("^" if negate else "") + body.replace("\\", "\\\\") + "]")
                i = end
        else:
            out.append(re.escape(ch))
        i += 1
    return "".join(out)


#: Parsed project files, keyed by path and (inode, size, modification time).
_READ_CACHE: dict[Path, tuple[tuple[int, int, int], dict[str, Any] | None]] = {}


def project_for(path: str | Path) -> Project:
    """The project a spec file or a folder belongs to.

    Parameters
    ----------
    path
        A spec file (the search starts in its folder) or a folder (the search
        starts there).  The folders are those of the path as written, made
        absolute; the root found is then resolved (symlinks followed).

    Returns
    -------
    Project
        From the nearest folder upward holding ``timespec.toml`` or a
        ``pyproject.toml`` with a ``[tool.timespec]`` table; without one, a
        project rooted at the spec's own folder (or the folder given), with no
        options.

    Raises
    ------
    SpecError
        When the project file cannot be read, is not valid TOML, or sets an
        unknown key or a value of the wrong type or outside its range; the
        message names the file, the key and (found by a scan) its line.
    """
    p = Path(path)
    start = Path(os.path.abspath(p))
    if not start.is_dir():
        start = start.parent
    for folder in (start, *start.parents):
        here = str(folder)
        has_own = os.path.exists(os.path.join(here, PROJECT_FILE))
        has_packaging = os.path.isfile(os.path.join(here, PYPROJECT_FILE))
        if not (has_own or has_packaging):
            continue
        own = folder / PROJECT_FILE
        packaging = folder / PYPROJECT_FILE
        table = _table(packaging, tool=True) if has_packaging else None
        if has_own:
            if table is not None:
                raise SpecValueError(
                    f"two project files in {str(folder)!r}: {PROJECT_FILE} and a "
                    f"[tool.timespec] table in {PYPROJECT_FILE}",
                    path=str(own),
                    hint=f"keep the options in one of them: remove [tool.timespec] or "
                    f"{PROJECT_FILE}",
                )
            options = _table(own, tool=False)
            return _project(folder, own, options or {})
        if table is not None:
            return _project(folder, packaging, table)
    return Project(root=start.resolve(), _folder=start)


def read_project_file(path: str | Path) -> Project:
    """Read one project file: a ``timespec.toml`` or a ``pyproject.toml``.

    Parameters
    ----------
    path
        The file; its folder is the project's root.

    Returns
    -------
    Project
        The root and options (a ``pyproject.toml`` without a
        ``[tool.timespec]`` table sets none).

    Raises
    ------
    SpecError
        As :func:`project_for`.
    """
    file = Path(os.path.abspath(path))
    options = _table(file, tool=file.name == PYPROJECT_FILE)
    return _project(file.parent, file, options or {})


def _project(folder: Path, file: Path, options: dict[str, Any]) -> Project:
    where = "[tool.timespec]" if file.name == PYPROJECT_FILE else None
    for key in options:
        if key not in PROJECT_KEYS:
            hint = did_you_mean(key, list(PROJECT_KEYS))
            raise _error(
                file,
                where,
                key,
                f"unknown project option {key!r}",
                hint or "project options are " + ", ".join(PROJECT_KEYS),
            )
    samples = _whole(file, where, options, "samples", 1, MAX_SAMPLES)
    seed = _whole(file, where, options, "seed", 0, MAX_SEED)
    exclude = _patterns(file, where, options)
    return Project(
        root=folder.resolve(),
        samples=samples,
        seed=seed,
        exclude=exclude,
        file=file,
        _folder=folder,
    )


def _whole(
    file: Path,
    where: str | None,
    options: dict[str, Any],
    key: str,
    minimum: int,
    maximum: int,
) -> int | None:
    if key not in options:
        return None
    value = options[key]
    if isinstance(value, bool) or not isinstance(value, int):
        raise _error(
            file,
            where,
            key,
            f"project option {key!r} must be a whole number, not {_toml_type(value)}",
            f"write it like: {key} = {'50000' if key == 'samples' else '7'}",
        )
    if not (minimum <= value <= maximum):
        raise _error(
            file,
            where,
            key,
            f"project option {key!r} must lie from {minimum} to {maximum:,}, not {value:,}",
            f"allowed: {minimum} to {maximum:,}",
        )
    return value


def _patterns(file: Path, where: str | None, options: dict[str, Any]) -> tuple[str, ...]:
    if "exclude" not in options:
        return ()
    value = options["exclude"]
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise _error(
            file,
            where,
            "exclude",
            f"project option 'exclude' must be a list of strings, not {_toml_type(value)}",
            'write it like: exclude = ["vendor", "old/**"]',
        )
    for pattern in value:
        pure = PurePosixPath(pattern)
        if not pattern.strip() or pure.is_absolute() or ".." in pure.parts or "\\" in pattern:
            raise _error(
                file,
                where,
                "exclude",
                f"exclude pattern {pattern!r} is not a relative path under the root",
                "write patterns relative to the project folder, with '/' and no '..'",
            )
    return tuple(value)


def _toml_type(value: object) -> str:
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a decimal number"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, list):
        return "a list" if value else "an empty list"
    if isinstance(value, dict):
        return "a table"
    return "a date or time"


def _text(file: Path) -> str:
    try:
        return read_spec_file(file).text
    except FileNotFoundError:
        raise SpecValueError(f"no such project file: {str(file)!r}", path=str(file)) from None
    except SourceError as exc:
        raise SpecValueError(
            f"cannot read project file {str(file)!r}: {exc.reason}", path=str(file)
        ) from None


def _table(file: Path, *, tool: bool) -> dict[str, Any] | None:
    """The options in a project file; ``None`` for a pyproject without the table."""
    try:
        st = os.stat(file)
    except FileNotFoundError:
        raise SpecValueError(f"no such project file: {str(file)!r}", path=str(file)) from None
    except OSError as exc:
        raise SpecValueError(
            f"cannot read project file {str(file)!r}: {exc.strerror or exc}", path=str(file)
        ) from None
    stamp = (st.st_ino, st.st_size, st.st_mtime_ns)
    cached = _READ_CACHE.get(file)
    if cached is not None and cached[0] == stamp:
        return cached[1]
    options = _parse_table(file, tool=tool)
    _READ_CACHE[file] = (stamp, options)
    return options


def _parse_table(file: Path, *, tool: bool) -> dict[str, Any] | None:
    text = _text(file)
    if tool and "timespec" not in text:
        return None  # a packaging file of another project: not ours to judge
    import tomllib

    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        found = re.search(r"\(at line (\d+), column (\d+)\)", message)
        line = int(found.group(1)) if found else None
        column = int(found.group(2)) if found else None
        lines = text.splitlines()
        source = lines[line - 1] if line is not None and 0 < line <= len(lines) else None
        raise SpecSyntaxError(
            f"the project file is not valid TOML: {re.sub(r' ?[(]at line.*[)]', '', message)}",
            path=str(file),
            line=line,
            column=column,
            source_line=source,
            hint="see https://toml.io for the syntax",
        ) from None
    if not tool:
        return data
    section = data.get("tool", {})
    if not isinstance(section, dict) or "timespec" not in section:
        return None
    table = section["timespec"]
    if not isinstance(table, dict):
        raise _error(
            file,
            None,
            "timespec",
            f"'tool.timespec' must be a table, not {_toml_type(table)}",
            "write the options under a '[tool.timespec]' header",
        )
    return table


def _error(file: Path, where: str | None, key: str, message: str, hint: str | None) -> SpecError:
    """An error naming the file and the key, at the key's line when a scan finds it."""
    text = _text(file)
    shown = f"{where} {key}" if where else key
    pos = _find_key(file, text, where, key)
    full = f"{message} (key {shown!r})" if pos is None else message
    if pos is None:
        return SpecValueError(full, path=str(file), hint=hint)
    return SpecValueError(
        full,
        path=pos.path,
        line=pos.line,
        column=pos.column,
        source_line=pos.source_line,
        hint=hint,
    )


def _find_key(file: Path, text: str, where: str | None, key: str) -> Pos | None:
    """The first line setting ``key`` (after the ``where`` header, if given)."""
    lines = text.splitlines()
    start = 0
    if where is not None:
        header = re.compile(r"^\s*\[\s*tool\s*\.\s*timespec\s*\]\s*(#.*)?$")
        for i, line in enumerate(lines):
            if header.match(line):
                start = i + 1
                break
    name = r"(?:\"" + re.escape(key) + r"\"|" + re.escape(key) + r")"
    assignment = re.compile(r"^(\s*)" + name + r"\s*=")
    table = re.compile(r"^(\s*)\[\s*" + name + r"\s*\]")
    next_header = re.compile(r"^\s*\[\[?\s*[A-Za-z0-9_\"']")
    for pattern in (assignment, table):
        for i in range(start, len(lines)):
            if where is not None and next_header.match(lines[i]):
                break
            found = pattern.match(lines[i])
            if found:
                return Pos(str(file), i + 1, len(found.group(1)) + 1, lines[i])
    return None
