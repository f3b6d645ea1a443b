"""Packaging: the built wheel carries the grammar and the JSON schemas, and works on its own."""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

from timespec.outputs.schemas import SCHEMA_NAMES

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture(scope="module")
def wheel(tmp_path_factory: pytest.TempPathFactory) -> Path:
    pytest.importorskip("hatchling")
    out = tmp_path_factory.mktemp("dist")
    subprocess.run(
        [
            sys.executable,
            "-m",
            "pip",
            "wheel",
            "--no-deps",
            "--no-build-isolation",
            "--quiet",
            "-w",
            str(out),
            str(ROOT),
        ],
        check=True,
    )
    (built,) = out.glob("timespec-*.whl")
    return built


def test_wheel_contains_grammar_and_marker(wheel: Path) -> None:
    names = zipfile.ZipFile(wheel).namelist()
    assert "timespec/_grammar/timespec.lark" in names
    assert "timespec/py.typed" in names
    assert any(n.endswith("entry_points.txt") for n in names)
    for schema in SCHEMA_NAMES:
        assert f"timespec/schemas/{schema}.schema.json" in names


def test_wheel_parses_a_spec_without_the_source_tree(wheel: Path, tmp_path: Path) -> None:
    site = tmp_path / "site"
    zipfile.ZipFile(wheel).extractall(site)
    code = (
        "import sys; sys.path.insert(0, sys.argv[1]);"
        "import timespec, timespec.language.parser as p;"
        "assert timespec.__file__.startswith(sys.argv[1]), timespec.__file__;"
        "s = timespec.parse('oneshot a: width 150 ms ±8% at supply 12 V ±5%');"
        "print(s.blocks[0].requirement('width').window.high)"
    )
    # Run from an empty folder so that the checkout's grammar/ cannot be found.
    proc = subprocess.run(
        [sys.executable, "-c", code, str(site)],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        check=False,
        env={"PATH": "/usr/bin:/bin", "PYTHONNOUSERSITE": "1"},
    )
    assert proc.returncode == 0, proc.stderr
    assert float(proc.stdout) == pytest.approx(0.162)


def test_wheel_loads_its_schemas_without_the_source_tree(wheel: Path, tmp_path: Path) -> None:
    site = tmp_path / "site"
    zipfile.ZipFile(wheel).extractall(site)
    code = (
        "import sys; sys.path.insert(0, sys.argv[1]);"
        "from timespec.outputs import schemas;"
        "assert schemas.__file__.startswith(sys.argv[1]), schemas.__file__;"
        "print(*[schemas.load_schema(n)['properties']['format']['const']"
        " for n in schemas.SCHEMA_NAMES])"
    )
    proc = subprocess.run(
        [sys.executable, "-c", code, str(site)],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        check=False,
        env={"PATH": "/usr/bin:/bin", "PYTHONNOUSERSITE": "1"},
    )
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.split() == list(SCHEMA_NAMES)
