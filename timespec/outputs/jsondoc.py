"""The JSON document of a solved spec: a versioned contract other tools rely on.

The documentation page *JSON documents* (``docs/json.rst``) describes every key
(type, unit, meaning) and the compatibility promise; the JSON Schema shipped as
``timespec/schemas/timespec-result.schema.json`` (loaded by
:func:`timespec.outputs.schemas.load_schema`) checks it, and describes the
``format_minor`` written here: a change of layout updates all three.

Layout (``format_version`` 1, ``format_minor`` 2)::

    {
      "format": "timespec-result",
      "format_version": 1,
      "format_minor": 2,
      "timespec_version": "0.1.0",
      "spec": "examples/burn_in_rack.tspec",
      "ok": true,
      "blocks": [
        {
          "name": "relay_hold", "kind": "oneshot",
          "verdict": "meets" | "fails" | "infeasible",
          "mode": "solved" | "checked",
          "quantity": "width", "unit": "s",
          "required": {"low": 0.138, "high": 0.162},
          "nominal": 0.1496,
          "worst_case": {"low": 0.1383, "high": 0.1616,
                         "low_corner": "...", "high_corner": "..."},
          "parts": [{"ref": "R", "designator": "R12", "value": 619000.0, "unit": "ohm",
                     "series": "E96", "tolerance": 0.01, "tempco_ppm": 50.0,
                     "dielectric": null, "pinned": false, "pair": null}, ...],
          "circuit": "",
          "outputs": [ {"name", "unit", "required", "nominal", "worst_case", "meets"}, ... ],
          "findings": [{"severity", "code", "message"}],
          "statistics": {"rss": {...}, "monte_carlo": {...}} | null,
          "contributors": {"width": [{"name", "label", "share", "sensitivity",
                                      "rss_share", "first_order", "total",
                                      "first_order_se", "total_se"}]},
          "alternatives": [{"circuit", "parts", "outputs", "reason"}],
          "fixes": [{"kind", "what", "cost", "worst_case"}],
          "notes": ["..."]
        }
      ]
    }

All values are floats in SI base units (s, Hz, ohm, F, V, A, W; ratios as
fractions, so 50 ppm is 5e-05).  ``quantity``/``required``/``nominal``/
``worst_case`` describe the block's first requirement; ``outputs`` lists every
computed quantity.  Infinite values (a bound, or a threshold never reached)
are written as ``null``.

``statistics.monte_carlo.outputs.<name>`` holds ``mean``, ``std``, ``min``,
``max``, ``percentiles``, ``within``, ``cpk``, ``cpk_normal`` and ``capability``
(``{"method": "percentile", "cp", "cpk", "lower", "upper", "samples"}`` or
``null``); ``statistics.monte_carlo.drivers`` is ``{"method", "samples"}``.

Format minor versions (each keeps every key of the one before):

* **1.0**: the first layout.
* **1.1**: ``format_minor`` added.  ``cpk`` is now the percentile-method index
  (ISO 22514-2 style, from at least 7408 samples, else ``null``), which holds
  for skewed and bounded outputs and never claims less than 1 when every
  sample is inside the window; the former normal-theory value
  ``min(U − μ, μ − L) / 3σ`` moved to ``cpk_normal``, and ``capability`` gives
  both sides and ``Cp``.  ``contributors[...].share`` is now the variance-based
  driver share ``(S_i + S_Ti)/2`` normalised to sum to 1 (Sobol first-order and
  total indices from a pick-and-freeze design), which credits inputs that act
  through interactions, such as a tempco with the ambient, that the
  first-order share (still given, as ``rss_share``) reads as 0; the list is
  ordered by it.  ``first_order``, ``total`` and their standard errors are
  added.  ``statistics.monte_carlo.drivers`` names the method.
* **1.2**: every part (of the design and of the alternatives) carries
  ``designator``, its board reference designator from the block's ``refs``
  statement (``"R12"``), ``null`` when the spec gives none; a pair's ``pair``
  carries ``designators``, the two parts' designators (the second from ``refs``,
  else the first with the suffixes A and B), ``null`` when the spec gives none.
  A pinned part's ``series`` is the IEC 60063 series of its value and tolerance
  (``470k 5%`` is E24), no longer the coarsest series holding the value.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from typing import Any

from timespec._version import __version__
from timespec.analysis import DRIVER_METHOD, Capability
from timespec.design.result import BlockResult, Candidate, OutputResult, Result
from timespec.model import Block
from timespec.outputs.tables import designators
from timespec.parts.part import Part
from timespec.units import kind_symbol

__all__ = ["FORMAT_MINOR", "FORMAT_VERSION", "result_to_dict", "result_to_json", "strict_json"]

#: Bumped when a key changes meaning or disappears; adding keys does not bump it.
FORMAT_VERSION = 1
#: Bumped when keys are added or a value is estimated by a sounder method (see the
#: module notes); a reader of ``format_version`` 1 keeps working.
FORMAT_MINOR = 2


def _num(x: float) -> float | None:
    return float(x) if math.isfinite(x) else None


def _unit(kind: str) -> str:
    try:
        return kind_symbol(kind)
    except KeyError:
        return ""


def _part(p: Part, block: Block) -> dict[str, Any]:
    pair = getattr(p, "pair", None)
    names = block.refs.get(p.ref, ())
    pair_names = list(designators(block, p)) if pair and names else None
    return {
        "ref": p.ref,
        "designator": names[0] if names else None,
        "value": p.value,
        "unit": _unit(p.kind),
        "series": p.series,
        "tolerance": p.tolerance,
        "tempco_ppm": p.tempco_ppm,
        "dielectric": p.dielectric,
        "pinned": p.pinned,
        "pair": (
            {"a": pair[0], "b": pair[1], "how": pair[2], "designators": pair_names}
            if pair
            else None
        ),
    }


def _output(o: OutputResult) -> dict[str, Any]:
    return {
        "name": o.name,
        "unit": _unit(o.kind),
        "required": (
            {"low": _num(o.required.low), "high": _num(o.required.high)} if o.required else None
        ),
        "nominal": _num(o.nominal),
        "worst_case": {
            "low": _num(o.low),
            "high": _num(o.high),
            "low_corner": o.low_corner,
            "high_corner": o.high_corner,
        },
        "meets": o.meets,
    }


def _candidate(c: Candidate, block: Block) -> dict[str, Any]:
    return {
        "circuit": c.design.variant,
        "parts": [_part(p, block) for p in c.design.parts],
        "outputs": [_output(o) for o in c.outputs],
        "meets": c.meets,
        "reason": c.rank_reason,
    }


def _statistics(b: BlockResult) -> dict[str, Any] | None:
    if not b.rss and b.monte_carlo is None:
        return None
    out: dict[str, Any] = {
        "rss": {
            name: {"nominal": _num(r.nominal), "sigma": _num(r.sigma)} for name, r in b.rss.items()
        }
    }
    mc = b.monte_carlo
    if mc is not None:
        out["monte_carlo"] = {
            "samples": mc.samples,
            "seed": mc.seed,
            "yield": mc.yield_fraction,
            "yield_interval": list(mc.yield_interval),
            "passed": mc.passed,
            "outputs": {
                name: {
                    "mean": _num(s.mean),
                    "std": _num(s.std),
                    "min": _num(s.minimum),
                    "max": _num(s.maximum),
                    "percentiles": {f"{k:g}": _num(v) for k, v in s.percentiles.items()},
                    "within": s.within,
                    "cpk": _num(s.capability.cpk) if s.capability is not None else None,
                    "cpk_normal": _num(s.cpk) if s.cpk is not None else None,
                    "capability": _capability(s.capability),
                }
                for name, s in mc.outputs.items()
            },
            "drivers": (
                {"method": DRIVER_METHOD, "samples": mc.driver_samples} if mc.drivers else None
            ),
        }
    else:
        out["monte_carlo"] = None
    return out


def _capability(c: Capability | None) -> dict[str, Any] | None:
    if c is None:
        return None
    return {
        "method": c.method,
        "cp": _num(c.cp) if c.cp is not None else None,
        "cpk": _num(c.cpk),
        "lower": _num(c.lower) if c.lower is not None else None,
        "upper": _num(c.upper) if c.upper is not None else None,
        "samples": c.samples,
    }


def _contributors(b: BlockResult) -> dict[str, list[dict[str, Any]]]:
    drivers = b.monte_carlo.drivers if b.monte_carlo is not None else {}
    out: dict[str, list[dict[str, Any]]] = {}
    for name, r in b.rss.items():
        first = {c.name: c for c in r.contributions}
        shares = drivers.get(name)
        if not shares:  # no variance decomposition: the first-order shares
            out[name] = [
                {
                    "name": c.name,
                    "label": c.label,
                    "share": _num(c.share),
                    "sensitivity": _num(c.sensitivity),
                    "rss_share": _num(c.share),
                }
                for c in r.contributions
            ]
            continue
        rows = []
        for d in shares:
            c = first.get(d.name)
            rows.append(
                {
                    "name": d.name,
                    "label": d.label,
                    "share": _num(d.share),
                    "sensitivity": _num(c.sensitivity) if c is not None else None,
                    "rss_share": _num(c.share) if c is not None else None,
                    "first_order": _num(d.first_order),
                    "total": _num(d.total),
                    "first_order_se": _num(d.first_order_se),
                    "total_se": _num(d.total_se),
                }
            )
        # inputs that do not vary: in the first-order list, not in the decomposition
        rows += [
            {
                "name": c.name,
                "label": c.label,
                "share": 0.0,
                "sensitivity": _num(c.sensitivity),
                "rss_share": _num(c.share),
                "first_order": 0.0,
                "total": 0.0,
                "first_order_se": 0.0,
                "total_se": 0.0,
            }
            for c in r.contributions
            if all(c.name != d.name for d in shares)
        ]
        out[name] = rows
    return out


def block_to_dict(b: BlockResult) -> dict[str, Any]:
    """The JSON object of one block.

    Parameters
    ----------
    b
        The block's result.

    Returns
    -------
    dict
        JSON-ready mapping (see the module docstring for the layout).
    """
    best = b.best
    first = b.block.requirements[0] if b.block.requirements else None
    primary: OutputResult | None = None
    if best is not None and first is not None:
        primary = best.output(first.quantity)
    fixes = b.extra.get("fixes", ())
    doc: dict[str, Any] = {
        "name": b.block.name,
        "kind": b.block.kind,
        "verdict": b.verdict,
        "mode": b.mode,
        "quantity": first.quantity if first else None,
        "unit": _unit(first.window.kind) if first else None,
        "required": (
            {"low": _num(first.window.low), "high": _num(first.window.high)} if first else None
        ),
        "nominal": _num(primary.nominal) if primary else None,
        "worst_case": (
            {
                "low": _num(primary.low),
                "high": _num(primary.high),
                "low_corner": primary.low_corner,
                "high_corner": primary.high_corner,
            }
            if primary
            else None
        ),
        "parts": [_part(p, b.block) for p in best.design.parts] if best else [],
        "circuit": best.design.variant if best else "",
        "outputs": [_output(o) for o in best.outputs] if best else [],
        "findings": [
            {"severity": f.severity, "code": f.code, "message": f.message}
            for f in (best.findings if best else ())
        ],
        "statistics": _statistics(b),
        "contributors": _contributors(b),
        "alternatives": [_candidate(c, b.block) for c in b.alternatives],
        "fixes": [
            {
                "kind": getattr(f, "kind", ""),
                "what": getattr(f, "what", str(f)),
                "cost": getattr(f, "cost", None),
                "worst_case": {
                    name: {"low": _num(lo), "high": _num(hi)}
                    for name, (lo, hi) in getattr(f, "windows", {}).items()
                },
            }
            for f in fixes
        ],
        "notes": list(b.notes),
    }
    return doc


def result_to_dict(result: Result) -> dict[str, Any]:
    """The whole JSON document as a mapping.

    Parameters
    ----------
    result
        The solved spec.

    Returns
    -------
    dict
        JSON-ready mapping.
    """
    return {
        "format": "timespec-result",
        "format_version": FORMAT_VERSION,
        "format_minor": FORMAT_MINOR,
        "timespec_version": __version__,
        "spec": result.spec.path,
        "ok": result.ok,
        "blocks": [block_to_dict(b) for b in result.blocks],
    }


def result_to_json(result: Result, *, indent: int | None = 2) -> str:
    """The JSON document as text (strict JSON: no NaN or Infinity).

    Parameters
    ----------
    result
        The solved spec.
    indent
        Indentation, or ``None`` for one line.

    Returns
    -------
    str
        The document, ending with a newline.
    """
    return strict_json(result_to_dict(result), indent=indent)


def strict_json(doc: Any, *, indent: int | None = 2) -> str:
    """A document as strict JSON text: infinite and NaN floats written as ``null``.

    Parameters
    ----------
    doc
        Dicts, lists, tuples, strings, numbers, booleans and ``None``.
    indent
        Indentation, or ``None`` for one line.

    Returns
    -------
    str
        The text, ending with a newline (the layout every timespec document uses).
    """
    return json.dumps(_clean(doc), indent=indent, allow_nan=False) + "\n"


def _clean(obj: Any) -> Any:
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, Mapping):
        return {str(k): _clean(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple):
        return [_clean(v) for v in obj]
    return obj
