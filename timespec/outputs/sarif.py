"""A check run as SARIF 2.1.0, the OASIS standard format of static-analysis results.

Code-review platforms read SARIF and show each result inline, at its line, in
a pull request.  The log has one run; its tool is ``timespec`` (with its
version) and lists one rule per kind of result that occurs in the run
(``block-fails``, ``block-infeasible``, each design-rule finding code, each
kind of spec error), sorted by id; every result names its rule by id and
index, has the level ``error``, ``warning`` or ``note``, the message text, and
one physical location: the file as a URI relative to the current folder (an
absolute ``file:`` URI for a file outside it) and the region's start line and
column (columns counted in characters, ``columnKind: unicodeCodePoints``).

Reference: *Static Analysis Results Interchange Format (SARIF) Version
2.1.0*, OASIS Standard, 27 March 2020 (sections 3.13 sarifLog, 3.14 run,
3.18 tool, 3.19 toolComponent, 3.27 result, 3.28 location, 3.29
physicalLocation, 3.30 region, 3.49 reportingDescriptor).
"""

from __future__ import annotations

import json
import os
from pathlib import Path, PurePath
from typing import Any
from urllib.parse import quote

from timespec._version import __version__
from timespec.outputs.checkrun import CheckRun, Diagnostic, iter_diagnostics

__all__ = ["SARIF_SCHEMA", "SARIF_VERSION", "artifact_uri", "run_to_sarif", "sarif_json"]

#: The SARIF version written.
SARIF_VERSION = "2.1.0"
#: Where OASIS publishes the schema of that version (named in ``$schema``, never fetched).
SARIF_SCHEMA = (
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
)

#: What each fixed rule reports; a design-rule finding code describes itself.
_RULES: dict[str, str] = {
    "block-fails": "The pinned parts of a block do not meet a requirement at worst case.",
    "block-infeasible": "No design from the allowed parts meets a requirement at worst case.",
    "block-meets": "The block meets every requirement at worst case.",
    "spec-syntax": "The spec text does not follow the spec grammar.",
    "spec-value": "A statement's values make no sense.",
    "spec-unit": "A quantity has the wrong dimension or an unknown unit.",
    "spec-include": "An included file cannot be read or lies outside the allowed folder.",
    "spec-error": "A mistake in the spec.",
}


def artifact_uri(path: str, cwd: str | Path | None = None) -> str:
    """The SARIF ``artifactLocation.uri`` of a file.

    Parameters
    ----------
    path
        The file, as the run names it.
    cwd
        The folder URIs are relative to (default: the current folder).

    Returns
    -------
    str
        A relative URI reference with forward slashes (``boards/slot.tspec``,
        characters outside the URI set percent-encoded) for a file inside
        ``cwd``, else an absolute ``file:`` URI.
    """
    base = os.path.abspath(cwd if cwd is not None else os.getcwd())
    full = os.path.abspath(path)
    try:
        rel = os.path.relpath(full, base)
    except ValueError:  # another drive (Windows)
        rel = os.pardir
    if rel == os.pardir or rel.startswith(os.pardir + os.sep):
        return Path(full).as_uri()
    return quote(PurePath(rel).as_posix(), safe="/")


def _rule_text(rule: str) -> str:
    return _RULES.get(rule, f"Design rule '{rule}' of timespec's circuit families.")


def _result(d: Diagnostic, index: int, cwd: str | Path | None) -> dict[str, Any]:
    location: dict[str, Any] = {"artifactLocation": {"uri": artifact_uri(d.path, cwd)}}
    if d.line is not None:
        region: dict[str, Any] = {"startLine": d.line}
        if d.column is not None:
            region["startColumn"] = d.column
        location["region"] = region
    text = d.message if not d.hint else f"{d.message} (hint: {d.hint})"
    out: dict[str, Any] = {
        "ruleId": d.rule,
        "ruleIndex": index,
        "level": d.severity,
        "message": {"text": text},
        "locations": [{"physicalLocation": location}],
    }
    if d.block is not None:
        out["properties"] = {"block": d.block}
    return out


def run_to_sarif(run: CheckRun, *, cwd: str | Path | None = None) -> dict[str, Any]:
    """A SARIF 2.1.0 log of a check run.

    Parameters
    ----------
    run
        The run.
    cwd
        The folder artifact URIs are relative to (default: the current one).

    Returns
    -------
    dict
        The log: ``version``, ``$schema`` and one run with the tool, its
        rules, one result per located message and the invocation's exit code.
    """
    found = list(iter_diagnostics(run))
    levels: dict[str, str] = {}
    for d in found:
        levels.setdefault(d.rule, d.severity)
    ids = sorted(levels)
    index = {rule: i for i, rule in enumerate(ids)}
    rules = [
        {
            "id": rule,
            "shortDescription": {"text": _rule_text(rule)},
            "defaultConfiguration": {"level": levels[rule]},
        }
        for rule in ids
    ]
    return {
        "$schema": SARIF_SCHEMA,
        "version": SARIF_VERSION,
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "timespec",
                        "version": __version__,
                        "rules": rules,
                    }
                },
                "columnKind": "unicodeCodePoints",
                "invocations": [
                    {"executionSuccessful": True, "exitCode": run.exit_code},
                ],
                "results": [_result(d, index[d.rule], cwd) for d in found],
            }
        ],
    }


def sarif_json(run: CheckRun, *, cwd: str | Path | None = None) -> str:
    """The SARIF log as JSON text.

    Parameters
    ----------
    run
        The run.
    cwd
        The folder artifact URIs are relative to.

    Returns
    -------
    str
        The log, indented, ending with a newline.
    """
    return json.dumps(run_to_sarif(run, cwd=cwd), indent=2, ensure_ascii=False) + "\n"
