"""Sphinx configuration for the timespec documentation.

Build with ``sphinx-build -W -n -b html docs docs/_build/html`` (warnings are errors,
and so is every cross-reference that does not resolve).
"""

from __future__ import annotations

import dataclasses
import importlib
import inspect
import sys
from pathlib import Path
from typing import Any

import numpy as np
import numpy.typing as npt
from numpydoc.docscrape import NumpyDocString
from sphinx.util.nodes import make_refnode
from sphinx.util.typing import stringify_annotation

# Document the package in this checkout, installed or not.
ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

project = "timespec"
author = "timespec developers"
copyright = "2026, timespec developers"
release = "0.1.0"

extensions = ["sphinx.ext.autodoc", "numpydoc", "timespec.sphinxext"]

# numpydoc: no autosummary tables of class members (autodoc lists them).
numpydoc_show_class_members = False
numpydoc_class_members_toctree = False

exclude_patterns = ["_build"]
html_title = "timespec"

autodoc_member_order = "bysource"
autodoc_typehints = "signature"

# Every cross-reference must resolve (``sphinx-build -n``): the project's own
# names are documented (api.rst), the few outside names below are ignored, by
# exact name, because CI has no network to fetch their inventories.
nitpicky = True
nitpick_ignore = [
    # the standard library
    ("py:class", "pathlib.Path"),
    ("py:class", "collections.abc.Callable"),
    ("py:class", "collections.abc.Iterable"),
    ("py:class", "collections.abc.Iterator"),
    ("py:class", "collections.abc.Mapping"),
    ("py:class", "collections.abc.Sequence"),
    ("py:func", "dataclasses.replace"),
    ("py:mod", "csv"),
    ("py:mod", "math"),
    # pint and numpy
    ("py:class", "pint.Quantity"),
    ("py:class", "pint.UnitRegistry"),
    ("py:class", "numpy.ndarray"),
    ("py:class", "numpy.dtype"),
    ("py:class", "numpy.float64"),
    ("py:class", "numpy.int64"),
    ("py:class", "numpy.void"),
    ("py:class", "numpy.typing.ArrayLike"),
]

# A dataclass field with a ``default_factory`` shows its default as
# ``<factory>``, which is not Python: Sphinx then cannot parse the signature,
# splits it at every comma and links the pieces (``tuple[Candidate``).  Show
# the call that makes the default instead (``dict()``).
_FACTORY = "<factory>"


def _factory_defaults(what: str, obj: object, signature: str | None) -> str | None:
    if what != "class" or not signature or _FACTORY not in signature:
        return signature
    if not dataclasses.is_dataclass(obj):
        return signature
    for f in dataclasses.fields(obj):
        if f.init and f.default_factory is not dataclasses.MISSING:
            factory = getattr(f.default_factory, "__qualname__", "")
            shown = f"{factory}()" if factory.isidentifier() else "..."
            signature = signature.replace(_FACTORY, shown, 1)
    return signature


# numpy's ``NDArray[float64]`` spelled out at every argument of the physics is
# unreadable, and ``numpy.typing.ArrayLike`` expands to numpy-private protocols:
# show the aliases' names (the project's are documented in api.rst).  The texts
# replaced are what Sphinx itself makes of the aliases, so they follow the
# installed numpy and Sphinx.
_ALIASES = (
    (stringify_annotation(npt.NDArray[np.float64], "smart"), "~timespec.physics.FloatArray"),
    (stringify_annotation(npt.ArrayLike, "smart"), "~numpy.typing.ArrayLike"),
    ("float | ~timespec.physics.FloatArray", "~timespec.physics.ArrayLike"),
)


def _array_aliases(text: str | None) -> str | None:
    for spelled, name in _ALIASES:
        text = text.replace(spelled, name) if text else text
    return text


def _signature(
    app: object,
    what: str,
    name: str,
    obj: object,
    options: object,
    signature: str | None,
    return_annotation: str | None,
) -> tuple[str | None, str | None]:
    signature = _factory_defaults(what, obj, signature)
    return _array_aliases(signature), _array_aliases(return_annotation)


# The package re-exports its public names (``timespec.SpecError`` is
# ``timespec.errors.SpecError``; ``timespec.analysis.Factor`` is
# ``timespec.analysis.factors.Factor``).  The API page documents each object once,
# where it is defined; a reference through a re-export resolves to that entry,
# found by importing the name the way Python would.  An attribute is described
# in its class's docstring (Attributes, or a dataclass's Parameters), so
# ``:attr:`Factor.through``` links to the class.  A name that is not the
# package's, or whose object is documented nowhere, still fails the build.

_MISSING = object()


def _import(target: str) -> Any:
    parts = target.split(".")
    try:
        obj: Any = importlib.import_module(parts[0])
    except ImportError:
        return _MISSING
    for i, part in enumerate(parts[1:], start=2):
        if hasattr(obj, part):
            obj = getattr(obj, part)
            continue
        try:
            obj = importlib.import_module(".".join(parts[:i]))
        except ImportError:
            return _MISSING
    return obj


def _defined_at(target: str, documented: dict[str, Any]) -> str | None:
    obj = _import(target)
    if obj is _MISSING:
        return None
    if inspect.ismodule(obj):
        return obj.__name__
    module, qualname = getattr(obj, "__module__", None), getattr(obj, "__qualname__", None)
    if isinstance(module, str) and isinstance(qualname, str):
        return f"{module}.{qualname}"
    # data (a table, a constant): the documented module-level name bound to this object
    name = target.rsplit(".", 1)[-1]
    for full, entry in sorted(documented.items()):
        if entry.objtype == "data" and full.rsplit(".", 1)[-1] == name:
            home = sys.modules.get(full.rsplit(".", 1)[0])
            if home is not None and getattr(home, name, None) is obj:
                return full
    return None


def _described(obj: Any, section: str) -> set[str]:
    """The names a numpydoc section of a docstring describes (``low, high`` is two)."""
    doc = NumpyDocString(inspect.getdoc(obj) or "")
    return {n.strip() for item in doc[section] for n in item.name.split(",")}


def _attributes(cls: type) -> set[str]:
    """A class's documented attributes: its Attributes section, and for a dataclass
    the fields its Parameters section describes (the constructor's arguments)."""
    names = _described(cls, "Attributes")
    if dataclasses.is_dataclass(cls):
        fields = {f.name for f in dataclasses.fields(cls)}
        names |= fields & _described(cls, "Parameters")
    return names


def _field_owner(target: str, module: str, cls: str, documented: dict[str, Any]) -> str | None:
    """The documented class whose Attributes section describes the attribute ``target``."""
    owner, _, field = target.rpartition(".")
    if not owner:
        owner = cls
    path = owner if owner.startswith("timespec.") else f"{module}.{owner}"
    home = _defined_at(path, documented)
    if home is None or home not in documented:
        return None
    obj = _import(home)
    if inspect.isclass(obj) and field in _attributes(obj):
        return home
    return None


def _resolve_own_name(app: Any, env: Any, node: Any, contnode: Any) -> Any:
    target = node.get("reftarget", "")
    module = node.get("py:module") or ""
    ours = target.startswith("timespec.") or module.startswith("timespec")
    if node.get("refdomain") != "py" or not ours:
        return None
    py = env.get_domain("py")
    if node.get("reftype") == "attr" and module:
        owner = _field_owner(target, module, node.get("py:class") or "", py.objects)
        if owner is not None:
            entry = py.objects[owner]
            return make_refnode(
                app.builder, node.get("refdoc", ""), entry.docname, entry.node_id, contnode, owner
            )
    if not target.startswith("timespec.") and module.startswith("timespec"):
        target = f"{module}.{target}"  # a name relative to the module it is written in
    if not target.startswith("timespec."):
        return None
    entry = py.objects.get(target)
    if entry is not None:
        # documented as another kind of object: a type alias is data, used as a class
        # (Sphinx 7 does not link a class reference to data; later releases do)
        return make_refnode(
            app.builder, node.get("refdoc", ""), entry.docname, entry.node_id, contnode, target
        )
    home = _defined_at(target, py.objects)
    if home is None or home == target:
        return None
    return py.resolve_xref(
        env, node.get("refdoc", ""), app.builder, node["reftype"], home, node, contnode
    )


def setup(app: Any) -> None:
    app.connect("autodoc-process-signature", _signature)
    app.connect("missing-reference", _resolve_own_name)
