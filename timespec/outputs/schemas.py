"""The JSON Schemas of the documents timespec writes, shipped in the package.

Every JSON document timespec emits names its layout in ``format`` and its
version in ``format_version`` (major) and ``format_minor``; for each layout the
package carries a JSON Schema (draft 2020-12) under ``timespec/schemas/``.  The
documents and the compatibility promise are described in the documentation
page *JSON documents* (``docs/json.rst``).

A shipped schema is *open*: it lists and types every key of the layout and
requires the keys of 1.0, but allows keys it does not list, because a later
minor version may add keys and a reader of the major version must keep
working.  :func:`load_schema` with ``closed=True`` gives the same schema with
every listed-key object closed (``additionalProperties: false``): a document
of exactly the minor version the schema describes validates against it, and
the package's own tests use it to prove that no emitted key is undocumented.

Validation itself needs the third-party ``jsonschema`` package, which timespec
does not depend on::

    import jsonschema
    from timespec.outputs.schemas import load_schema

    jsonschema.Draft202012Validator(load_schema(doc["format"])).validate(doc)
"""

from __future__ import annotations

import json
from importlib import resources
from typing import Any

__all__ = ["MINOR_KEYWORD", "SCHEMA_NAMES", "load_schema", "schema_minor", "schema_text"]

#: The layouts that have a schema: the ``format`` value of each document.
SCHEMA_NAMES: tuple[str, ...] = (
    "timespec-result",
    "timespec-limits",
    "timespec-diff",
    "timespec-check-run",
)

#: The schema annotation naming the ``format_minor`` a schema describes.
MINOR_KEYWORD = "x-timespec-format-minor"


def schema_text(name: str) -> str:
    """The text of one shipped schema file.

    Parameters
    ----------
    name
        A document's ``format`` value, one of :data:`SCHEMA_NAMES`
        (e.g. ``"timespec-result"``).

    Returns
    -------
    str
        The JSON text of ``timespec/schemas/<name>.schema.json``.

    Raises
    ------
    KeyError
        When there is no schema of that name (the message lists the names).
    """
    if name not in SCHEMA_NAMES:
        raise KeyError(f"no schema named {name!r}; the schemas are {', '.join(SCHEMA_NAMES)}")
    resource = resources.files("timespec").joinpath("schemas", f"{name}.schema.json")
    return resource.read_text(encoding="utf-8")


def load_schema(name: str, *, closed: bool = False) -> dict[str, Any]:
    """One shipped JSON Schema (draft 2020-12), as a mapping.

    Parameters
    ----------
    name
        A document's ``format`` value, one of :data:`SCHEMA_NAMES`.
    closed
        ``False`` (default): the schema as shipped, which allows keys it does
        not list, so it validates documents of any minor version of its major
        version.  ``True``: every object that lists its keys also forbids
        others (``additionalProperties: false``), so only keys of the minor
        version the schema describes (:func:`schema_minor`) pass.

    Returns
    -------
    dict
        A fresh mapping (the caller may change it).

    Raises
    ------
    KeyError
        When there is no schema of that name.

    Examples
    --------
    >>> load_schema("timespec-result")["properties"]["format"]
    {'const': 'timespec-result', 'description': 'Names the layout.'}
    """
    schema: dict[str, Any] = json.loads(schema_text(name))
    return _closed(schema) if closed else schema


def schema_minor(name: str) -> int:
    """The ``format_minor`` of the layout a shipped schema describes.

    Parameters
    ----------
    name
        A document's ``format`` value, one of :data:`SCHEMA_NAMES`.

    Returns
    -------
    int
        The minor version (a document of a later minor version still validates
        against the open schema).

    Raises
    ------
    KeyError
        When there is no schema of that name.
    """
    return int(load_schema(name)[MINOR_KEYWORD])


def _closed(node: Any) -> Any:
    """A copy of a schema in which every object listing ``properties`` forbids others."""
    if isinstance(node, list):
        return [_closed(item) for item in node]
    if not isinstance(node, dict):
        return node
    out = {key: _closed(value) for key, value in node.items()}
    lists_keys = isinstance(out.get("properties"), dict)
    if lists_keys and "additionalProperties" not in out and "unevaluatedProperties" not in out:
        out["additionalProperties"] = False
    return out
