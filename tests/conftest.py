"""Test-wide settings: hypothesis explores freely on a desk and repeats itself in CI."""

from __future__ import annotations

import os

from hypothesis import settings

# CI runs the same examples every time (derandomize), so a red run is reproducible and a green one
# is not luck; a developer's run explores new examples and keeps failures in .hypothesis/.
settings.register_profile("ci", derandomize=True, database=None, print_blob=True)
settings.register_profile("explore")
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "explore"))
