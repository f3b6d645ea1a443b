"""Test-wide settings."""

from __future__ import annotations

import os

from hypothesis import settings

# Property tests: no per-example deadline (CI machines are shared and their timing
# varies; performance is measured in bench/, never asserted here).  On CI the
# examples are derived from the test names, so a run is repeatable.
settings.register_profile("timespec", deadline=None, print_blob=True)
settings.register_profile("timespec-ci", deadline=None, print_blob=True, derandomize=True)
settings.load_profile("timespec-ci" if os.environ.get("CI") else "timespec")
