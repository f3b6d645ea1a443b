"""Write pip constraints pinning every declared dependency to its lowest allowed version.

Used by ``.ci/run`` to check that the floors in pyproject.toml are true: the
suite must pass with exactly those versions installed.
"""

from __future__ import annotations

import re
import sys
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
FLOOR = re.compile(r"^\s*([A-Za-z0-9_.\-]+)\s*>=\s*([0-9][0-9A-Za-z.]*)\s*$")


def main() -> int:
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    groups = sys.argv[1:] or ["test"]
    wanted = list(project["dependencies"])
    for group in groups:
        wanted += project["optional-dependencies"][group]
    pins: dict[str, str] = {}
    for req in wanted:
        m = FLOOR.match(req)
        if m is None:
            print(f"lowest.py: cannot read a floor from {req!r}", file=sys.stderr)
            return 2
        pins[m.group(1).lower()] = m.group(2)
    for name, version in sorted(pins.items()):
        print(f"{name}=={version}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
