"""The package's structure: no import cycle, and no layer importing a higher one.

Every import of a timespec module counts, wherever it stands (module level,
inside a function, or under ``TYPE_CHECKING``): a lazy import is still a
dependency a reader must hold in their head.  The layer order is the one
DEVELOPERS.md describes; a new module must be given a place in it here.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "timespec"

#: Layers, lowest first.  A module may import modules of a lower layer, and of its
#: own group (its own folder, or the same top-level group); nothing else.
LAYERS: list[tuple[str, list[str]]] = [
    ("foundation", ["timespec._version", "timespec.errors", "timespec.units"]),
    ("parts", ["timespec.parts"]),
    ("physics", ["timespec.physics"]),
    ("analysis", ["timespec.analysis"]),
    ("model", ["timespec.model"]),
    ("numbers", ["timespec.numbers"]),
    ("language", ["timespec.language"]),
    ("families", ["timespec.families"]),
    ("design", ["timespec.design"]),
    ("outputs", ["timespec.outputs"]),
    (
        "top",
        [
            "timespec",
            "timespec.__main__",
            "timespec.api",
            "timespec.cli",
            "timespec.sphinxext",
        ],
    ),
]

#: Groups on one footing: neither may import the other.
SIBLINGS = {"parts", "physics", "analysis"}


def _module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


MODULES = _modules()


def _resolve(name: str) -> str | None:
    """The module an import names (``timespec.a.b`` may be a name in ``timespec.a``)."""
    while name:
        if name in MODULES:
            return name
        name = name.rpartition(".")[0]
    return None


def _imports(module: str) -> set[str]:
    """Every timespec module the module imports, anywhere in its text."""
    path = MODULES[module]
    tree = ast.parse(path.read_text(encoding="utf-8"))
    is_package = path.name == "__init__.py"
    found: set[str] = set()
    for node in ast.walk(tree):
        names: list[str] = []
        if isinstance(node, ast.Import):
            names = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = module.split(".")
                if not is_package:
                    anchor = anchor[:-1]
                anchor = anchor[: len(anchor) - (node.level - 1)]
                base = ".".join([*anchor, base] if base else anchor)
            names = [f"{base}.{a.name}" for a in node.names] or [base]
        for n in names:
            if n == "timespec" or n.startswith("timespec."):
                target = _resolve(n)
                if target is not None and target != module:
                    found.add(target)
    return found


GRAPH = {m: _imports(m) for m in MODULES}


def _layer(module: str) -> tuple[int, str]:
    best: tuple[int, str, int] | None = None
    for rank, (group, prefixes) in enumerate(LAYERS):
        for prefix in prefixes:
            matches = module == prefix or (
                prefix != "timespec" and module.startswith(prefix + ".")
            )
            if matches and (best is None or len(prefix) > best[2]):
                best = (rank, group, len(prefix))
    if best is None:
        raise AssertionError(f"{module} has no layer: give it one in tests/test_layers.py")
    return best[0], best[1]


def test_every_module_has_a_layer() -> None:
    for module in MODULES:
        _layer(module)


def test_the_walk_sees_imports() -> None:
    # Guard against a walk that finds nothing and so passes vacuously.
    assert "timespec.model" in GRAPH["timespec.language.assemble"]
    assert "timespec.physics.monostable" in GRAPH["timespec.families.oneshot"]
    assert sum(len(v) for v in GRAPH.values()) > 100


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan's algorithm)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    out: list[list[str]] = []
    counter = 0

    def visit(v: str) -> None:
        nonlocal counter
        index[v] = low[v] = counter
        counter += 1
        stack.append(v)
        on_stack.add(v)
        for w in sorted(graph.get(v, ())):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp: list[str] = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_cycle_finder_finds_a_cycle() -> None:
    assert _cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
    assert _cycles({"a": {"b"}, "b": set()}) == []


def test_no_import_cycle() -> None:
    assert _cycles(GRAPH) == []


@pytest.mark.parametrize("module", sorted(MODULES))
def test_layers_only_look_down(module: str) -> None:
    rank, group = _layer(module)
    wrong = []
    for target in sorted(GRAPH[module]):
        t_rank, t_group = _layer(target)
        if t_group == group:
            continue
        if t_rank >= rank or (group in SIBLINGS and t_group in SIBLINGS):
            wrong.append(f"{module} ({group}) imports {target} ({t_group})")
    assert wrong == []
