"""timespec: timing requirements in plain text, solved into standard-value parts.

Write a requirement such as ``oneshot relay_hold: width 150 ms ±8% at supply
12 V ±5%`` in a spec file; timespec parses it into a typed model, chooses
IEC 60063 standard values that meet it at worst case over tolerance,
temperature, supply and ageing, and reports the statistics, the inputs that
drive the spread and what to change when it cannot be met.

The public API is small::

    import timespec
    spec = timespec.load("examples/burn_in_rack.tspec")
    result = timespec.solve(spec)
    best = result.block("relay_hold")
    best.part_values()            # {'R': <Quantity(619000.0, 'ohm')>, ...}

Attributes are imported lazily, so ``import timespec`` stays fast.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from timespec._version import __version__

__all__ = [
    "Result",
    "Spec",
    "SpecError",
    "__version__",
    "fixture_limits",
    "load",
    "parse",
    "solve",
]

if TYPE_CHECKING:  # pragma: no cover
    from timespec.api import load, parse, solve
    from timespec.design.limits import fixture_limits
    from timespec.design.result import Result
    from timespec.errors import SpecError
    from timespec.model import Spec

_LAZY = {
    "load": "timespec.api",
    "parse": "timespec.api",
    "solve": "timespec.api",
    "SpecError": "timespec.errors",
    "fixture_limits": "timespec.design.limits",
    "Spec": "timespec.model",
    "Result": "timespec.design.result",
}


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'timespec' has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
