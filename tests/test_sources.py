"""Spec files are read with bounds: regular files only, a size cap, includes parsed once.

Expectations are POSIX file semantics (named pipes, character devices) and the
UTF-8 byte-order mark EF BB BF of the Unicode Standard (section 23.8): common
practice for text tools.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import pytest

import timespec
from timespec.errors import SpecIncludeError
from timespec.language import sources
from timespec.language.canonical import layout_file

BLOCK = "oneshot hold:\n  width 10 ms ±10%\n  supply 5 V\n"

posix = pytest.mark.skipif(os.name != "posix", reason="POSIX file kinds")


def test_byte_order_mark_is_accepted(tmp_path: Path) -> None:
    f = tmp_path / "bom.tspec"
    f.write_bytes(b"\xef\xbb\xbf" + BLOCK.encode())
    assert timespec.load(f).blocks[0].name == "hold"
    assert timespec.parse("\ufeff" + BLOCK).blocks[0].name == "hold"


def test_format_keeps_the_byte_order_mark(tmp_path: Path) -> None:
    f = tmp_path / "bom.tspec"
    f.write_bytes(b"\xef\xbb\xbf" + b"oneshot hold:\n    width 10 ms +-10%\n  supply 5 V\n")
    before, after = layout_file(f)
    assert before.startswith("\ufeff") and after.startswith("\ufeff")
    assert after.count("\ufeff") == 1


@posix
def test_named_pipe_is_refused_without_waiting(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.tspec"
    os.mkfifo(fifo)
    with pytest.raises(SpecIncludeError, match="named pipe"):
        timespec.load(fifo)


@posix
def test_device_is_refused() -> None:
    with pytest.raises(SpecIncludeError, match="a device"):
        timespec.load("/dev/zero")


def test_folder_is_refused(tmp_path: Path) -> None:
    with pytest.raises(SpecIncludeError, match="folder"):
        timespec.load(tmp_path)


def test_oversized_file_is_refused(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(sources, "MAX_SPEC_BYTES", 64)
    f = tmp_path / "big.tspec"
    f.write_text(BLOCK + "# " + "x" * 100 + "\n")
    with pytest.raises(SpecIncludeError, match="limited to 64 bytes"):
        timespec.load(f)


def test_not_utf8_is_a_clear_error(tmp_path: Path) -> None:
    f = tmp_path / "latin.tspec"
    f.write_bytes(BLOCK.replace("±", "+-").encode() + b"# caf\xe9\n")
    with pytest.raises(SpecIncludeError, match="not UTF-8"):
        timespec.load(f)


@posix
def test_included_pipe_is_refused_at_the_include(tmp_path: Path) -> None:
    os.mkfifo(tmp_path / "shared.tspec")
    top = tmp_path / "top.tspec"
    top.write_text('include "shared.tspec"\n' + BLOCK)
    with pytest.raises(SpecIncludeError, match="named pipe") as info:
        timespec.load(top)
    assert info.value.line == 1


def test_deep_include_chain_is_a_located_error(tmp_path: Path) -> None:
    depth = sources.MAX_INCLUDE_DEPTH + 5
    for i in range(depth):
        (tmp_path / f"f{i}.tspec").write_text(f'include "f{i + 1}.tspec"\n')
    (tmp_path / f"f{depth}.tspec").write_text(BLOCK)
    with pytest.raises(SpecIncludeError, match="nest deeper"):
        timespec.load(tmp_path / "f0.tspec")


def test_doubling_includes_fail_fast(tmp_path: Path) -> None:
    # Each file includes the next twice: 2**16 expansions if nothing stops it.
    levels = 16
    for i in range(levels):
        nxt = f"f{i + 1}.tspec"
        (tmp_path / f"f{i}.tspec").write_text(f'include "{nxt}"\ninclude "{nxt}"\n')
    (tmp_path / f"f{levels}.tspec").write_text("defaults:\n  supply 5 V\n")
    start = time.perf_counter()
    with pytest.raises(SpecIncludeError, match="more than 1000 included files"):
        timespec.load(tmp_path / "f0.tspec")
    # Not a timing assertion on the tool's speed, only a guard against the
    # exponential blow-up the bound exists for (2**16 parses took seconds).
    assert time.perf_counter() - start < 30


def test_shared_file_included_twice_is_parsed_once(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from timespec.language import assemble

    calls: list[str | None] = []
    real = assemble.parse_entries

    def counting(text: str, path: str | None = None) -> list[object]:
        calls.append(path)
        return real(text, path)  # type: ignore[return-value]

    monkeypatch.setattr(assemble, "parse_entries", counting)
    (tmp_path / "common.tspec").write_text("# shared notes, no statements\n")
    (tmp_path / "a.tspec").write_text('include "common.tspec"\n')
    top = tmp_path / "top.tspec"
    top.write_text('include "common.tspec"\ninclude "a.tspec"\n' + BLOCK)
    timespec.load(top)
    assert sum(1 for c in calls if c and c.endswith("common.tspec")) == 1


def test_samples_are_capped_with_a_located_error() -> None:
    from timespec.errors import SpecValueError
    from timespec.model import MAX_SAMPLES

    with pytest.raises(SpecValueError, match="at most 10,000,000") as info:
        timespec.parse(BLOCK + f"  samples {MAX_SAMPLES + 1}\n")
    assert info.value.line == 4
    assert timespec.parse(BLOCK + f"  samples {MAX_SAMPLES}\n").blocks[0].statistics.samples == (
        MAX_SAMPLES
    )


def test_cli_samples_are_capped() -> None:
    import io

    from timespec.cli import main

    err = io.StringIO()
    code = main(["solve", "x.tspec", "--samples", str(10**9)], stdout=io.StringIO(), stderr=err)
    assert code == 2 and "at most 10,000,000" in err.getvalue()


def test_api_samples_are_capped() -> None:
    from timespec.model import MAX_SAMPLES

    spec = timespec.parse(BLOCK)
    with pytest.raises(ValueError, match="samples must lie from 1 to 10,000,000"):
        timespec.solve(spec, samples=MAX_SAMPLES + 1)
