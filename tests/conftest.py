"""Shared test set-up: the repository root and tests/ are importable (shared helpers are in
tests/helpers.py), and the one ``dist`` fixture.
"""

import os
import sys

import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
for p in (ROOT, os.path.join(ROOT, "tests")):
    if p not in sys.path:
        sys.path.insert(0, p)


@pytest.fixture(scope="session")
def dist():
    """The built app (dist/), built once per session; with FIELDPHASOR_DIST_BUILT set (the
    caller has just built it) an existing build is used as it is."""
    import build

    if not (os.environ.get("FIELDPHASOR_DIST_BUILT") and os.path.exists(os.path.join(build.DIST, "sw.js"))):
        build.build(quiet=True)
    return build.DIST
