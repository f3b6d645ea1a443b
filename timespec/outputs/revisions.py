"""Read a spec as it was at a git revision (for ``timespec diff REV1..REV2 -- PATH``).

The file is read with ``git show REV:PATH`` in the repository that holds
``PATH``, and so is every file it includes, at the same revision: the included
files are found by reading the ``include`` statements of each file fetched,
resolved against that file's folder inside the repository.  The project files
that may set the include root (``timespec.toml``, ``pyproject.toml``) in the
spec's folder and every folder above it up to the repository's top are fetched
too when the revision has them.  Everything is written to a private temporary
folder laid out like the repository, loaded from there with the ordinary
:func:`timespec.language.assemble.load`, and removed; a spec mistake is
reported at ``REV:PATH:line:col``.

Nothing here changes the repository: only ``git rev-parse`` and ``git show``
run, with the repository as working folder.
"""

from __future__ import annotations

import dataclasses
import os
import posixpath
import subprocess
import tempfile
from pathlib import Path, PurePosixPath

from timespec.errors import SpecError, UsageError
from timespec.language.assemble import load
from timespec.language.parser import Statement, parse_entries
from timespec.language.values import Text
from timespec.model import Spec

__all__ = ["MAX_FETCHED", "load_at_revision", "split_range"]

#: At most this many spec files are fetched from one revision (the top spec and includes).
MAX_FETCHED = 64

#: Project files that may decide the include root, fetched from every folder above the spec.
_PROJECT_FILES = ("timespec.toml", "pyproject.toml")


def split_range(text: str) -> tuple[str | None, str | None] | None:
    """Split ``REV1..REV2`` into its sides.

    Parameters
    ----------
    text
        The argument as written.

    Returns
    -------
    tuple or None
        ``(old, new)``; an empty side is ``None`` and stands for the file as it is
        in the working tree (``main..`` compares ``main`` with the uncommitted
        file).  ``None`` when ``text`` has no ``..``.

    Raises
    ------
    UsageError
        For ``..`` alone, more than one ``..``, or a side that starts with ``-``.
    """
    if ".." not in text:
        return None
    old, _sep, new = text.partition("..")
    if ".." in new or new.startswith("."):
        raise UsageError(f"{text!r}: write one range with two dots, REV1..REV2")
    if not old and not new:
        raise UsageError("'..' names no revision: write REV1..REV2, e.g. main..HEAD")
    for side in (old, new):
        if side.startswith("-"):
            raise UsageError(f"{side!r} is not a revision")
    return (old or None, new or None)


def _git(repo: Path, *args: str) -> str:
    """Run git in ``repo``; its message becomes a :class:`UsageError` when it fails."""
    try:
        done = subprocess.run(
            ["git", *args],
            cwd=repo,
            capture_output=True,
            text=True,
            encoding="utf-8",
            errors="replace",
            check=False,
        )
    except FileNotFoundError:
        raise UsageError(
            "comparing revisions needs git, which is not installed or not on PATH"
        ) from None
    if done.returncode != 0:
        message = done.stderr.strip() or f"exit status {done.returncode}"
        raise UsageError(f"git {args[0]} failed: {message}")
    return done.stdout


def _repository(path: Path) -> tuple[Path, PurePosixPath]:
    """The repository's top folder and the path of ``path`` inside it."""
    folder = path.absolute().parent
    while not folder.is_dir() and folder != folder.parent:
        folder = folder.parent
    top = Path(_git(folder, "rev-parse", "--show-toplevel").strip()).resolve()
    full = (folder.resolve() / path.name).absolute()
    try:
        inside = full.relative_to(top)
    except ValueError:
        raise UsageError(f"{str(path)!r} is not inside the git repository {str(top)!r}") from None
    return top, PurePosixPath(inside.as_posix())


def _show(top: Path, rev: str, inside: PurePosixPath) -> str:
    return _git(top, "show", f"{rev}:{inside.as_posix()}")


def _includes(text: str, inside: PurePosixPath) -> list[PurePosixPath]:
    """Repository paths of the files one spec text includes (none when it does not parse)."""
    try:
        entries = parse_entries(text, str(inside))
    except SpecError:
        return []  # the load below reports the mistake where it is
    out = []
    for entry in entries:
        if isinstance(entry, Statement) and entry.keyword == "include":
            for arg in entry.args:
                for term in arg:
                    if isinstance(term, Text):
                        joined = posixpath.normpath(posixpath.join(str(inside.parent), term.text))
                        if not joined.startswith("..") and not posixpath.isabs(joined):
                            out.append(PurePosixPath(joined))
    return out


def _fetch(top: Path, rev: str, inside: PurePosixPath, into: Path) -> None:
    """Write the spec, its includes and the project files of ``rev`` under ``into``."""
    pending = [inside]
    seen: set[PurePosixPath] = set()
    first = True
    while pending and len(seen) < MAX_FETCHED:
        current = pending.pop()
        if current in seen:
            continue
        seen.add(current)
        try:
            text = _show(top, rev, current)
        except UsageError:
            if first:
                raise
            continue  # a missing include: the load reports it at its statement
        first = False
        target = into / Path(*current.parts)
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_text(text, encoding="utf-8")
        pending.extend(_includes(text, current))
    folder = inside.parent
    while True:
        for name in _PROJECT_FILES:
            try:
                text = _show(top, rev, folder / name)
            except UsageError:
                continue
            target = into / Path(*folder.parts) / name
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_text(text, encoding="utf-8")
        if folder == folder.parent or str(folder) in ("", "."):
            break
        folder = folder.parent


def load_at_revision(rev: str, path: str | Path) -> Spec:
    """Load a spec file as it was at a git revision, includes from the same revision.

    Parameters
    ----------
    rev
        Any revision git understands (``main``, ``HEAD~2``, a commit hash, a tag).
    path
        The spec file's path in the working tree (it need not exist there now).

    Returns
    -------
    Spec
        The parsed spec; its ``path`` is ``"REV:PATH"`` (``PATH`` inside the repository).

    Raises
    ------
    UsageError
        When git is missing, ``path`` is not in a repository, or git cannot show
        the revision or the file (git's own message is included).
    SpecError
        For a mistake in the spec at that revision, located at ``REV:PATH:line:col``.
    """
    if rev.startswith("-"):
        raise UsageError(f"{rev!r} is not a revision")
    top, inside = _repository(Path(path))
    with tempfile.TemporaryDirectory(prefix="timespec-rev-") as tmp:
        into = Path(tmp).resolve()
        _fetch(top, rev, inside, into)
        try:
            spec = load(into / Path(*inside.parts))
        except SpecError as exc:
            _relabel(exc, into, rev)
            raise
    label = f"{rev}:{inside.as_posix()}"
    return dataclasses.replace(spec, path=label)


def _relabel(exc: SpecError, into: Path, rev: str) -> None:
    """Point an error at ``REV:PATH`` instead of the temporary copy."""
    prefix = str(into) + os.sep
    if exc.path is not None and exc.path.startswith(prefix):
        exc.path = f"{rev}:" + PurePosixPath(Path(exc.path[len(prefix) :]).as_posix()).as_posix()
    exc.message = exc.message.replace(prefix, f"{rev}:")
