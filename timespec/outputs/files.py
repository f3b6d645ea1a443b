"""Writing output files so that nothing is lost.

Every file timespec writes (``--output``, ``format --write``, ``plot``) goes
through :func:`write_bytes_safely`:

* the new content goes to a temporary file in the destination's own folder,
  is flushed and fsynced, then renamed over the destination in one step, so a
  reader sees the old file or the whole new one, never a part;
* the destination keeps its permission bits (a new file gets those the umask
  gives an ordinary new file, not the 0600 of a temporary file);
* a symlink is written *through*: its target gets the new text and the link
  stays a link;
* a hard-linked file is rewritten in place (every name keeps seeing the same
  file) because a rename would split the link; that write is not atomic, and
  the message says nothing about it because nothing is lost: the old content
  is replaced only once the whole new content is in memory;
* folders, devices, pipes, sockets and other non-regular files are refused
  with a clear error, never replaced;
* the temporary file is removed on any failure and on SIGTERM/SIGINT.
"""

from __future__ import annotations

import contextlib
import os
import signal
import stat
import tempfile
from collections.abc import Iterator
from pathlib import Path
from types import FrameType
from typing import Any

from timespec.errors import UsageError
from timespec.language.sources import file_kind

_Handler = Any  # what signal.getsignal returns: a callable, SIG_DFL, SIG_IGN or None

__all__ = ["write_bytes_safely", "write_text_safely"]


def write_text_safely(path: str | Path, text: str) -> None:
    """Write UTF-8 text to a file safely (see :func:`write_bytes_safely`).

    Parameters
    ----------
    path
        Destination.
    text
        Content.

    Raises
    ------
    UsageError
        When the destination cannot be written (see :func:`write_bytes_safely`).
    """
    write_bytes_safely(path, text.encode("utf-8"))


def write_bytes_safely(path: str | Path, data: bytes) -> None:
    """Replace a file's content with ``data`` so that readers never see a part.

    Parameters
    ----------
    path
        Destination: a regular file, a symlink to one, or a new name in an
        existing folder.
    data
        Content.

    Raises
    ------
    UsageError
        When the folder does not exist, the destination is a folder, a device,
        a pipe or another non-regular file, or the write fails (the message names
        the path and the reason; the destination is unchanged).
    """
    shown = str(path)
    dest = _resolve(Path(path), shown)
    folder = dest.parent
    if not folder.is_dir():
        raise UsageError(f"cannot write {shown!r}: folder {str(folder)!r} does not exist")
    try:
        st: os.stat_result | None = dest.stat()
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise UsageError(f"cannot write {shown!r}: {exc.strerror}") from None
    if st is not None and not stat.S_ISREG(st.st_mode):
        kind = file_kind(st.st_mode)
        raise UsageError(f"cannot write {shown!r}: it is {kind}, not a regular file")
    if st is not None and st.st_nlink > 1:
        _rewrite_in_place(dest, data, shown)
        return
    mode = stat.S_IMODE(st.st_mode) if st is not None else _new_file_mode()
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise UsageError(f"cannot write {shown!r}: {exc.strerror}") from None
    try:
        with _removed_on_signal(tmp), os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
            os.fchmod(fh.fileno(), mode)
            if st is not None:
                with contextlib.suppress(OSError):  # keep the owner where we may
                    os.fchown(fh.fileno(), st.st_uid, st.st_gid)
            fh.close()
            os.replace(tmp, dest)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise UsageError(f"cannot write {shown!r}: {exc.strerror or exc}") from None
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    _fsync_folder(folder)


def _resolve(path: Path, shown: str) -> Path:
    """The file a write to ``path`` must reach: symlinks followed to their target."""
    if not path.is_symlink():
        return path
    try:
        return path.resolve(strict=False)
    except (OSError, RuntimeError) as exc:
        raise UsageError(f"cannot write {shown!r}: the symlink does not resolve ({exc})") from None


def _new_file_mode() -> int:
    """Permission bits an ordinary new file gets under the current umask."""
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _rewrite_in_place(dest: Path, data: bytes, shown: str) -> None:
    """Rewrite a hard-linked file through its own inode, so every link sees the change."""
    try:
        with open(dest, "r+b") as fh:
            fh.write(data)
            fh.truncate()
            fh.flush()
            os.fsync(fh.fileno())
    except OSError as exc:
        raise UsageError(f"cannot write {shown!r}: {exc.strerror or exc}") from None


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable where the platform allows it."""
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


@contextlib.contextmanager
def _removed_on_signal(tmp: str) -> Iterator[None]:
    """Remove ``tmp`` if SIGTERM or SIGINT arrives while the block runs.

    Handlers are only installed from the main thread (Python allows no other);
    elsewhere the ``except BaseException`` of the caller still removes it on
    ``KeyboardInterrupt``.
    """
    import threading

    if threading.current_thread() is not threading.main_thread():
        yield
        return
    previous: dict[signal.Signals, _Handler] = {}

    def handler(signum: int, frame: FrameType | None) -> None:
        Path(tmp).unlink(missing_ok=True)
        sig = signal.Signals(signum)
        old = previous.get(sig)
        if sig == signal.SIGINT and not callable(old):
            raise KeyboardInterrupt
        if callable(old):
            old(signum, frame)
            return
        signal.signal(sig, signal.SIG_DFL)
        os.kill(os.getpid(), signum)

    for sig in (signal.SIGTERM, signal.SIGINT):
        previous[sig] = signal.getsignal(sig)
        signal.signal(sig, handler)
    try:
        yield
    finally:
        for sig, old in previous.items():
            signal.signal(sig, old)
