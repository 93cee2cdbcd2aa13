"""Warm-up and self-check for the interpreter memory snapshot the browser keeps per build.

Booting Pyodide spends most of its time initialising CPython and importing modules. After the
first session the worker starts a second, short-lived worker that boots a fresh interpreter,
installs this build's wheel, calls :func:`prepare` and then saves the interpreter's memory
(Pyodide's ``makeMemorySnapshot``) in Cache Storage under the wheel's SHA-256 and the Pyodide
version, with the :func:`probe` digest beside it. Later starts restore that memory instead of
booting, run :func:`probe` again and use the snapshot only when the digests match; otherwise
they discard it and boot normally.

:func:`prepare` runs with no user data: it imports every module the app can reach and runs
each worksheet on its own default inputs, so nothing a user typed is ever in a snapshot.
"""

from __future__ import annotations

import hashlib

from . import OPENING_SHEET, bridge

#: the worksheet whose default result proves a restored interpreter computes as a fresh one
PROBE_SHEET = OPENING_SHEET


def probe() -> str:
    """SHA-256 (hex) of the probe worksheet's result on its default inputs."""
    return hashlib.sha256(bridge.compute(PROBE_SHEET, "{}").encode("utf-8")).hexdigest()


def prepare() -> str:
    """Import every worksheet and report path and run each once on its defaults, so a snapshot
    holds them compiled and initialised. Returns :func:`probe` for the snapshot's label."""
    for sheet_id in bridge.sheets():
        bridge.compute(sheet_id, "{}")
    demo = bridge.demo_job()
    for fmt in ("html", "text", "csv"):
        bridge.report(demo, fmt, '{"date": "2000-01-01"}')
    bridge.export_jobs(demo, '{"exported": "2000-01-01T00:00:00Z"}')
    bridge.validate_jobs("{}")
    return probe()
