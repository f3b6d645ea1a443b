"""Tests for the documentation: the Sphinx build, the directives, and numpydoc docstrings."""

from __future__ import annotations

import html
import inspect
import re
import subprocess
import sys
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import pytest

from timespec.language.vocabulary import KEYWORDS

ROOT = Path(__file__).resolve().parent.parent
DOCS = ROOT / "docs"


def _sphinx(src: Path, out: Path, *extra: str) -> subprocess.CompletedProcess[str]:
    """Run sphinx-build with warnings as errors, the package in this checkout importable.

    ``-n`` (nitpicky) makes every unresolved cross-reference a warning too, so a
    link to a name the API page does not document fails the build.
    """
    env = {**__import__("os").environ, "PYTHONPATH": str(ROOT)}
    return subprocess.run(
        [
            sys.executable,
            "-m",
            "sphinx",
            "-W",
            "-n",
            "--keep-going",
            "-b",
            "html",
            *extra,
            str(src),
            str(out),
        ],
        capture_output=True,
        text=True,
        env=env,
        cwd=str(ROOT),
        timeout=300,
        check=False,
    )


def _text(page: Path) -> str:
    """Visible text of an HTML page, roughly: tags dropped, entities decoded."""
    return html.unescape(re.sub(r"<[^>]+>", "", page.read_text(encoding="utf-8")))


@pytest.fixture(scope="module")
def built_docs(tmp_path_factory: pytest.TempPathFactory) -> Path:
    pytest.importorskip("sphinx")
    pytest.importorskip("numpydoc")
    out = tmp_path_factory.mktemp("html")
    doctrees = tmp_path_factory.mktemp("doctrees")
    proc = _sphinx(DOCS, out, "-E", "-d", str(doctrees))
    assert proc.returncode == 0, proc.stdout[-3000:] + proc.stderr[-3000:]
    return out


def test_docs_build_with_warnings_as_errors(built_docs: Path) -> None:
    # built with -W -n: no warning, and no cross-reference left unresolved
    for page in (
        "index",
        "quickstart",
        "language",
        "physics",
        "analysis",
        "safety",
        "api",
        "tables",
    ):
        assert (built_docs / f"{page}.html").is_file(), page


def test_language_reference_lists_every_statement(built_docs: Path) -> None:
    text = _text(built_docs / "language.html")
    for kw in KEYWORDS.values():
        assert kw.example in text, kw.name
        assert kw.meaning in text, kw.name


def test_physics_page_lists_device_marks(built_docs: Path) -> None:
    from timespec.parts import devices

    text = _text(built_docs / "physics.html")
    for classes in (devices.TIMER_CLASSES, devices.GATE_CLASSES):
        for obj in classes.values():
            for field in obj.__dataclass_fields__:
                if field != "name":
                    assert field in text, field
    assert "[Mem]" in text and "[DS]" in text and "[CP]" in text


def test_tables_page_renders_the_demo_spec(built_docs: Path) -> None:
    from timespec.design.solver import solve
    from timespec.language.assemble import load

    text = _text(built_docs / "tables.html")
    for header in ("Block", "Circuit", "Parts", "Required", "Nominal", "Worst case", "Verdict"):
        assert header in text
    for block in solve(load(ROOT / "examples" / "burn_in_rack.tspec")).blocks:
        assert block.block.name in text


def test_safety_page_carries_the_caution(built_docs: Path) -> None:
    text = _text(built_docs / "safety.html")
    assert "not a safety function" in text
    assert "IEC 61508" in text and "ISO 13849" in text


# --------------------------------------------------------------------------
# the timespec-table directive in a small project of its own


def _project(tmp: Path, spec: str, page: str) -> Path:
    src = tmp / "src"
    src.mkdir()
    (src / "conf.py").write_text('extensions = ["timespec.sphinxext"]\n', encoding="utf-8")
    (src / "board.tspec").write_text(spec, encoding="utf-8")
    (src / "index.rst").write_text("Board\n=====\n\n" + page, encoding="utf-8")
    return src


GOOD = "oneshot relay_hold: width 15 ms ±12% at supply 12 V ±5%\n"


def test_directive_renders_and_tracks_the_spec(tmp_path: Path) -> None:
    pytest.importorskip("sphinx")
    src = _project(tmp_path, GOOD, ".. timespec-table:: board.tspec\n   :title: Parts\n")
    out = tmp_path / "out"
    first = _sphinx(src, out)
    assert first.returncode == 0, first.stderr
    text = _text(out / "index.html")
    assert "relay_hold" in text and "width 15 ms ±12 %" in text
    # editing only the spec must rebuild the page (the spec is a noted dependency)
    (src / "board.tspec").write_text(GOOD.replace("15 ms", "16 ms"), encoding="utf-8")
    second = _sphinx(src, out)
    assert second.returncode == 0, second.stderr
    assert "1 changed" in second.stdout
    assert "width 16 ms ±12 %" in _text(out / "index.html")


def test_directive_reports_spec_errors_at_the_spec_line(tmp_path: Path) -> None:
    pytest.importorskip("sphinx")
    spec = "oneshot relay_hold:\n  width 15 ms ±12%\n  widht 3 ms\n  supply 12 V\n"
    src = _project(tmp_path, spec, ".. timespec-table:: board.tspec\n")
    proc = _sphinx(src, tmp_path / "out")
    assert proc.returncode != 0
    assert "board.tspec:3: WARNING: unknown statement 'widht'" in proc.stderr
    assert "did you mean 'width'?" in proc.stderr
    assert "Traceback" not in proc.stderr + proc.stdout


def test_directive_reports_unknown_blocks(tmp_path: Path) -> None:
    pytest.importorskip("sphinx")
    src = _project(tmp_path, GOOD, ".. timespec-table:: board.tspec\n   :blocks: relay, x\n")
    proc = _sphinx(src, tmp_path / "out")
    assert proc.returncode != 0
    assert "has no block named 'relay', 'x'; its blocks are relay_hold" in proc.stderr


def test_statement_rows_cover_every_keyword() -> None:
    pytest.importorskip("sphinx")
    from timespec.model import BLOCK_KINDS
    from timespec.sphinxext import statement_rows

    everything = {row[0].strip("`") for row in statement_rows()}
    assert everything == set(KEYWORDS)
    own = set()
    for kind in BLOCK_KINDS:
        own |= {row[0].strip("`") for row in statement_rows([kind], only=True)}
    assert "width" in own and "accuracy" in own and "supply" not in own
    with pytest.raises(ValueError, match="unknown block kind"):
        statement_rows(["oneshoot"])


# --------------------------------------------------------------------------
# numpydoc docstrings of the public API


def _public_objects() -> Iterator[tuple[str, Any]]:
    import timespec.outputs.tables

    names = [
        (f"timespec.{n}", getattr(timespec, n)) for n in timespec.__all__ if not n.startswith("_")
    ]
    names += [
        (f"timespec.outputs.tables.{n}", getattr(timespec.outputs.tables, n))
        for n in timespec.outputs.tables.__all__
    ]
    try:
        import timespec.sphinxext
    except ImportError:  # pragma: no cover - sphinx is an optional extra
        pass
    else:
        names += [
            (f"timespec.sphinxext.{n}", getattr(timespec.sphinxext, n))
            for n in timespec.sphinxext.__all__
        ]
    for name, obj in names:
        if inspect.isfunction(obj) or inspect.isclass(obj):
            yield name, obj


def _documented(doc: str, sections: tuple[str, ...]) -> set[str]:
    from numpydoc.docscrape import NumpyDocString

    parsed = NumpyDocString(doc)
    names: set[str] = set()
    for section in sections:
        for item in parsed[section]:
            names |= {n.strip().lstrip("*") for n in item.name.split(",")}
    return names


def _params(func: Callable[..., Any]) -> list[str]:
    sig = inspect.signature(func)
    return [p.name for p in sig.parameters.values() if p.name not in ("self", "cls")]


def _check_function(name: str, func: Callable[..., Any]) -> list[str]:
    doc = inspect.getdoc(func)
    if not doc:
        return [f"{name}: no docstring"]
    params = _params(func)
    if not params:
        return []
    documented = _documented(doc, ("Parameters",))
    missing = [p for p in params if p not in documented]
    extra = sorted(documented - set(params))
    out = []
    if missing:
        out.append(f"{name}: parameters not in a Parameters section: {missing}")
    if extra:
        out.append(f"{name}: documents parameters it does not take: {extra}")
    return out


def _check_class(name: str, cls: type) -> list[str]:
    doc = inspect.getdoc(cls)
    if not doc:
        return [f"{name}: no docstring"]
    problems: list[str] = []
    # the constructor's parameters, documented by the class that defines __init__
    owner = next((k for k in cls.__mro__ if "__init__" in vars(k)), object)
    if owner.__module__.startswith("timespec"):
        documented = _documented(inspect.getdoc(owner) or "", ("Parameters", "Attributes"))
        missing = [p for p in _params(owner.__init__) if p not in documented]  # type: ignore[misc]
        if missing:
            problems.append(f"{name}: constructor parameters not documented: {missing}")
    for attr, member in vars(cls).items():
        if attr.startswith("_") or not inspect.isfunction(member):
            continue
        problems += _check_function(f"{name}.{attr}", member)
    return problems


def test_public_api_has_numpydoc_docstrings() -> None:
    pytest.importorskip("numpydoc")
    problems: list[str] = []
    seen = 0
    for name, obj in _public_objects():
        seen += 1
        problems += _check_class(name, obj) if inspect.isclass(obj) else _check_function(name, obj)
    assert seen >= 10
    assert not problems, "\n".join(problems)


# --------------------------------------------------------------------------
# the docs' own name resolution (docs/conf.py): re-exports and attributes resolve
# to where the object is documented, and nothing else does


@pytest.fixture(scope="module")
def docs_conf() -> Any:
    pytest.importorskip("sphinx")
    pytest.importorskip("numpydoc")
    import importlib.util

    spec = importlib.util.spec_from_file_location("_timespec_docs_conf", DOCS / "conf.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_conf_resolves_a_reexport_to_its_definition(docs_conf: Any) -> None:
    assert docs_conf._defined_at("timespec.SpecError", {}) == "timespec.errors.SpecError"
    assert (
        docs_conf._defined_at("timespec.analysis.Factor", {}) == "timespec.analysis.factors.Factor"
    )
    assert docs_conf._defined_at("timespec.analysis.factors", {}) == "timespec.analysis.factors"
    assert docs_conf._defined_at("timespec.no_such_name", {}) is None
    assert docs_conf._defined_at("timespec.analysis.NoSuchClass", {}) is None


def test_conf_links_an_attribute_only_when_its_class_describes_it(docs_conf: Any) -> None:
    documented = {"timespec.analysis.factors.Factor": object()}
    owner = docs_conf._field_owner
    home = "timespec.analysis.factors.Factor"
    # ``Factor`` as the module it is written in sees it: worstcase imports it, units does not
    assert owner("Factor.through", "timespec.analysis.worstcase", "", documented) == home
    assert owner("Factor.through", "timespec.units", "", documented) is None
    assert owner("through", "timespec.analysis.factors", "Factor", documented) == home
    assert owner("timespec.analysis.Factor.through", "timespec.x", "", documented) == home
    assert owner("through_typo", "timespec.analysis.factors", "Factor", documented) is None
    assert owner("through", "timespec.analysis.factors", "Factor", {}) is None  # undocumented


def test_conf_shows_array_aliases_by_name(docs_conf: Any) -> None:
    import numpy as np
    import numpy.typing as npt
    from sphinx.util.typing import stringify_annotation

    spelled = stringify_annotation(npt.NDArray[np.float64], "smart")
    assert (
        docs_conf._array_aliases(f"(r: float | {spelled}) ") == "(r: ~timespec.physics.ArrayLike) "
    )
    assert docs_conf._array_aliases(spelled) == "~timespec.physics.FloatArray"
