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
import json

from . import OPENING_SHEET, __version__, registry

#: the worksheet whose default result proves a restored interpreter computes as a fresh one
PROBE_SHEET = OPENING_SHEET


def probe() -> str:
    """SHA-256 (hex) of the probe worksheet's result on its default inputs, as the JSON text
    the bridge gives for it."""
    text = json.dumps(registry.run(PROBE_SHEET, {}), ensure_ascii=False, allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def prepare() -> str:
    """Import every worksheet and report path and run each once on its defaults, so a snapshot
    holds them compiled and initialised. Returns :func:`probe` for the snapshot's label."""
    from . import demo, jobfile, report

    for sheet_id in registry.sheets():
        registry.run(sheet_id, {})
    job = demo.demo_job()
    for fmt in ("html", "text", "csv"):
        report.render(job, fmt, app_version=__version__, date="2000-01-01")
    text = jobfile.make_export([job], __version__, "2000-01-01T00:00:00Z")
    jobfile.validate_export(text)
    jobfile.validate_export("{}")
    return probe()
