"""The bridge contract: JSON in, JSON out, for the worker, the build and outside tools.

``catalog()`` lists the worksheets; ``compute(worksheet_id, inputs_json)`` computes one; the
job and report functions below take and give JSON too. None of them raises: any failure comes
back as ``{"ok": false, ...}`` with a message.

This module only converts JSON to Python and back. Worksheets are found and run by
:mod:`app.registry`; jobs files are :mod:`app.jobfile`, the demo job :mod:`app.demo` and
reports :mod:`app.report`. Nothing inside ``app/`` imports this module.
"""

from __future__ import annotations

import json
import traceback

from . import __version__, registry
from .registry import sheet, sheets  # noqa: F401  (outside tools look worksheets up here too)


def catalog() -> str:
    """JSON list of worksheet declarations (see DESIGN §1), each with its drawn form (``"form"``,
    :mod:`app.formview`); the one the app opens on carries ``"opening": true``."""
    from . import OPENING_SHEET, formview

    out = []
    for s in registry.sheets().values():
        d = s.declaration()
        d["form"] = formview.form_tree(s)
        if s.id == OPENING_SHEET:
            d["opening"] = True
        out.append(d)
    return json.dumps(out, ensure_ascii=False)


def compute(worksheet_id: str, inputs: str) -> str:
    """Compute one worksheet from a JSON object of field name → typed text. Never raises; an
    unexpected exception (also one writing the answer as JSON) gives
    :func:`app.registry.internal_failure`, marked ``"internal": true``."""
    try:
        if registry.sheet(worksheet_id) is None:
            return json.dumps(registry.failure(f"Unknown worksheet '{worksheet_id}'."), ensure_ascii=False)
        try:
            raw = json.loads(inputs) if isinstance(inputs, str) else dict(inputs)
        except ValueError:
            raw = None
        if not isinstance(raw, dict):
            return json.dumps(registry.failure("The inputs could not be read."), ensure_ascii=False)
        return json.dumps(registry.run(worksheet_id, raw), ensure_ascii=False, allow_nan=False)
    except Exception as exc:  # the contract: never raise across the bridge
        traceback.print_exc()
        return json.dumps(registry.internal_failure(exc), ensure_ascii=False)


def version() -> str:
    """The app's version string."""
    return __version__


# ---------------------------------------------------------------------------------------
# Jobs and reports. JSON strings in and out; none of these raises.


def _loads_or(text, default):
    if not isinstance(text, str) or not text.strip():
        return default
    try:
        return json.loads(text)
    except ValueError:
        return None


def report(job_json: str, fmt: str, options_json: str = "{}") -> str:
    """Render a job, or one entry of it, as a report.

    ``fmt``: 'html', 'text' or 'csv'. ``options_json``: ``{"entry_id", "date" (report date,
    YYYY-MM-DD; default today), "app_version" (default this app's), "paper" ('auto', 'a4',
    'letter'), "figures" (bool), "bom" (bool, CSV), "detail" ('full' or 'brief', text)}``.
    Returns ``{"ok", "text", "mime", "filename", "title"}`` or ``{"ok": false, "error"}``.
    """
    try:
        from . import report as _report
        from .jobfile import now_stamp

        job = _loads_or(job_json, None)
        if not isinstance(job, dict):
            return json.dumps({"ok": False, "error": "The job could not be read."})
        opts = _loads_or(options_json, {})
        if not isinstance(opts, dict):
            return json.dumps({"ok": False, "error": "The report options could not be read."})
        if fmt not in _report.FORMATS:
            return json.dumps({"ok": False, "error": "Unknown report format (use html, text or csv)."})
        date = str(opts.get("date") or now_stamp()[:10])[:40]
        app_version = str(opts.get("app_version") or __version__)[:50]
        entry_id = opts.get("entry_id")
        entry_name = ""
        if entry_id is not None:
            entry_id = str(entry_id)
            for e in job.get("entries") or []:
                if isinstance(e, dict) and e.get("id") == entry_id:
                    entry_name = str(e.get("name", "")) or "entry"
                    break
            else:
                return json.dumps({"ok": False, "error": "That entry is not in the job."})
        text = _report.render(
            job,
            fmt,
            app_version=app_version,
            date=date,
            entry_id=entry_id,
            paper=str(opts.get("paper", "auto")).lower(),
            figures=bool(opts.get("figures", True)),
            bom=bool(opts.get("bom", True)),
            detail=str(opts.get("detail", "full")),
        )
        return json.dumps(
            {
                "ok": True,
                "text": text,
                "mime": _report.FORMATS[fmt][0],
                "filename": _report.filename(job, fmt, date, entry_name),
                "title": _report.title_of(job, entry_name, date),
            },
            ensure_ascii=False,
        )
    except Exception as exc:  # the contract: never raise across the bridge
        traceback.print_exc()
        return json.dumps({"ok": False, "error": f"The report could not be made ({type(exc).__name__})."})


def validate_jobs(text: str) -> str:
    """Check an export file's text. ``{"ok": true, "jobs": [...], "app_version", "exported"}``
    or ``{"ok": false, "error": message naming the job, entry and field at fault}``."""
    try:
        from .jobfile import validate_export

        jobs, error = validate_export(text)
        if error:
            return json.dumps({"ok": False, "error": error}, ensure_ascii=False)
        head = json.loads(text.lstrip("\ufeff"))
        return json.dumps(
            {"ok": True, "jobs": jobs, "app_version": head["app_version"], "exported": head["exported"]},
            ensure_ascii=False,
        )
    except Exception as exc:
        traceback.print_exc()
        return json.dumps({"ok": False, "error": f"The file could not be read ({type(exc).__name__})."})


def demo_job() -> str:
    """JSON of an invented demo job using the worksheets this build has."""
    try:
        from . import demo

        return json.dumps(demo.demo_job(), ensure_ascii=False)
    except Exception:
        traceback.print_exc()
        return json.dumps(None)


def export_jobs(jobs_json: str, options_json: str = "{}") -> str:
    """Write an export file for a job (an object) or jobs (a list).

    ``options_json``: ``{"exported": ISO time (default now)}``. Returns ``{"ok": true,
    "text", "filename", "mime"}``; when a job would not import again, ``{"ok": false,
    "error", "text", "filename", "mime"}`` (the text is still given, so the shell may offer
    it as a rescue download)."""
    try:
        from . import jobfile as _jobs

        data = _loads_or(jobs_json, None)
        if isinstance(data, dict):
            data = [data]
        if not isinstance(data, list):
            return json.dumps({"ok": False, "error": "The jobs could not be read."})
        opts = _loads_or(options_json, {})
        opts = opts if isinstance(opts, dict) else {}
        exported = str(opts.get("exported") or _jobs.now_stamp())
        text = _jobs.make_export(data, __version__, exported)
        res = {"ok": True, "text": text, "filename": _jobs.export_filename(data, exported), "mime": "application/json"}
        _, error = _jobs.validate_export(text)
        if error:
            res.update(ok=False, error=error)
        return json.dumps(res, ensure_ascii=False)
    except Exception as exc:
        traceback.print_exc()
        return json.dumps({"ok": False, "error": f"The jobs could not be exported ({type(exc).__name__})."})


def time_call(name: str, runs: int = 10) -> str:
    """JSON of :func:`app.timings.time_call`: wall times [ms] of a named case run inside this engine
    (the benchmark's door; never raises)."""
    try:
        from . import timings

        return json.dumps(timings.time_call(str(name), int(runs)))
    except Exception as exc:  # noqa: BLE001 - the bridge never raises
        return json.dumps({"error": f"The timing could not be made ({type(exc).__name__})."})
