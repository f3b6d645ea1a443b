"""Output files are written safely: mode kept, links honoured, odd files refused, nothing partial.

The expectations are POSIX file semantics (rename replaces a directory entry,
hard links share one inode, chmod bits, umask) as the Python ``os`` module
documents them: common practice for safe file replacement.
"""

from __future__ import annotations

import io
import os
import stat
import subprocess
import sys
from pathlib import Path

import pytest

from timespec.cli import main
from timespec.errors import UsageError
from timespec.outputs.files import write_bytes_safely, write_text_safely

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "examples" / "burn_in_rack.tspec"

posix = pytest.mark.skipif(os.name != "posix", reason="POSIX file semantics")


def _mode(p: Path) -> int:
    return stat.S_IMODE(p.stat().st_mode)


def _leftovers(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.endswith(".tmp")]


@posix
def test_existing_mode_is_kept(tmp_path: Path) -> None:
    f = tmp_path / "report.txt"
    f.write_text("old")
    f.chmod(0o640)
    write_text_safely(f, "new")
    assert f.read_text() == "new"
    assert _mode(f) == 0o640


@posix
def test_new_file_honours_the_umask(tmp_path: Path) -> None:
    old = os.umask(0o027)
    try:
        write_text_safely(tmp_path / "new.txt", "x")
    finally:
        os.umask(old)
    assert _mode(tmp_path / "new.txt") == 0o640  # 0o666 & ~0o027


@posix
def test_symlink_is_written_through(tmp_path: Path) -> None:
    target = tmp_path / "real.txt"
    target.write_text("old")
    link = tmp_path / "link.txt"
    link.symlink_to(target)
    write_text_safely(link, "new")
    assert link.is_symlink()
    assert target.read_text() == "new"


@posix
def test_hard_links_stay_one_file(tmp_path: Path) -> None:
    a = tmp_path / "a.txt"
    a.write_text("old old old")
    b = tmp_path / "b.txt"
    os.link(a, b)
    write_text_safely(a, "new")
    assert b.read_text() == "new"
    assert a.stat().st_ino == b.stat().st_ino


def test_folder_is_refused(tmp_path: Path) -> None:
    with pytest.raises(UsageError, match="is a folder"):
        write_text_safely(tmp_path, "x")
    assert _leftovers(tmp_path) == []


@posix
def test_pipe_is_refused(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    with pytest.raises(UsageError, match="named pipe"):
        write_text_safely(fifo, "x")


@posix
def test_device_is_refused() -> None:
    with pytest.raises(UsageError, match="a device"):
        write_text_safely("/dev/null", "x")


def test_missing_folder_is_a_clear_error(tmp_path: Path) -> None:
    with pytest.raises(UsageError, match="does not exist"):
        write_text_safely(tmp_path / "no" / "x.txt", "x")


def test_failure_leaves_old_content_and_no_temporary(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    f = tmp_path / "out.txt"
    f.write_text("old")

    def broken(fd: int) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", broken)
    with pytest.raises(UsageError, match="No space left"):
        write_bytes_safely(f, b"new")
    assert f.read_text() == "old"
    assert _leftovers(tmp_path) == []


@posix
def test_sigterm_removes_the_temporary(tmp_path: Path) -> None:
    # The write is interrupted by SIGTERM between writing and renaming.
    script = f"""
import os, signal
from timespec.outputs.files import write_bytes_safely
os.fsync = lambda fd: os.kill(os.getpid(), signal.SIGTERM)
write_bytes_safely({str(tmp_path / "out.txt")!r}, b"new")
"""
    (tmp_path / "out.txt").write_text("old")
    proc = subprocess.run([sys.executable, "-c", script], capture_output=True, check=False)
    assert proc.returncode == -15
    assert (tmp_path / "out.txt").read_text() == "old"
    assert _leftovers(tmp_path) == []


def test_cli_output_to_a_folder_is_exit_2_without_traceback(tmp_path: Path) -> None:
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(DEMO), "--output", str(tmp_path)], stdout=out, stderr=err)
    assert code == 2
    assert "is a folder" in err.getvalue()
    assert "Traceback" not in err.getvalue()


def test_unexpected_error_is_exit_3_with_one_line(monkeypatch: pytest.MonkeyPatch) -> None:
    from timespec import api

    def boom(*args: object, **kwargs: object) -> None:
        raise RuntimeError("solver exploded")

    monkeypatch.setattr(api, "solve", boom)
    monkeypatch.delenv("TIMESPEC_DEBUG", raising=False)
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(DEMO)], stdout=out, stderr=err)
    assert code == 3
    text = err.getvalue()
    assert text.count("\n") == 1
    assert "bug in timespec" in text and "RuntimeError: solver exploded" in text
    assert "Traceback" not in text
    err = io.StringIO()
    assert main(["--debug", "check", str(DEMO)], stdout=out, stderr=err) == 3
    assert "Traceback" in err.getvalue()


def test_ascii_console_gets_ascii_instead_of_a_crash() -> None:
    env = {**os.environ, "PYTHONIOENCODING": "ascii"}
    proc = subprocess.run(
        [sys.executable, "-m", "timespec", "check", str(DEMO)],
        capture_output=True,
        env=env,
        check=False,
    )
    assert proc.returncode in (0, 1), proc.stderr
    assert b"Traceback" not in proc.stderr
    proc.stdout.decode("ascii")  # pure ASCII


def test_table_exits_1_when_a_block_is_infeasible(tmp_path: Path) -> None:
    spec = tmp_path / "s.tspec"
    spec.write_text(
        "oneshot impossible:\n  width 10 ms ±0.01%\n  supply 5 V\n", encoding="utf-8"
    )
    out, err = io.StringIO(), io.StringIO()
    assert main(["table", str(spec)], stdout=out, stderr=err) == 1
