"""Sphinx configuration for the timespec documentation.

Build with ``sphinx-build -W -b html docs docs/_build/html`` (warnings are errors).
"""

from __future__ import annotations

import sys
from pathlib import Path

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

autodoc_member_order = "bysource"
autodoc_typehints = "signature"

# Cross-references to third-party types (numpy, pint) are not resolved.
nitpicky = False

exclude_patterns = ["_build"]
html_title = "timespec"
