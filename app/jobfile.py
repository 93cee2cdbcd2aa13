"""Site jobs as files: the export format and its validation on import.

A job is what the shell keeps in IndexedDB, exactly::

    {"id", "site", "date": "YYYY-MM-DD" or "", "notes", "created", "updated",
     "entries": [{"id", "name", "worksheet", "inputs": {field: text}, "updated"}]}

An export file wraps a list of jobs::

    {"format": "fieldphasor-jobs", "version": 1, "app_version", "exported", "jobs": [...]}

:func:`validate_export` checks every field of such a file and either returns the jobs,
unchanged, or one message naming the job, entry and field at fault. It never returns a
partial list: the shell imports all of a file or nothing.
"""

from __future__ import annotations

import datetime as _dt
import json
import re
import unicodedata
from typing import Any, Optional

from . import registry

FORMAT = "fieldphasor-jobs"
VERSION = 1

# Limits (characters unless stated). Generous for a day on site, small enough for a phone.
MAX_FILE_CHARS = 50_000_000
MAX_JOBS = 10_000
MAX_ENTRIES = 1000  # per job
MAX_SITE = 200
MAX_NOTES = 20_000
MAX_NAME = 200  # entry name
MAX_INPUTS = 300  # fields per entry
MAX_INPUT_VALUE = 100_000
MAX_ID = 100
MAX_APP_VERSION = 50

JOB_KEYS = ("id", "site", "date", "notes", "created", "updated", "entries")
ENTRY_KEYS = ("id", "name", "worksheet", "inputs", "updated")
FILE_KEYS = ("format", "version", "app_version", "exported", "jobs")

_ID = re.compile(r"[A-Za-z0-9][A-Za-z0-9._:-]*\Z")
_FIELD_NAME = re.compile(r"[A-Za-z][A-Za-z0-9_]*\Z")
_DATE = re.compile(r"(\d{4})-(\d{2})-(\d{2})\Z")
_STAMP = re.compile(
    r"(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,9}))?)?(Z|[+-](\d{2}):(\d{2}))?\Z"
)


class _Bad(Exception):
    """One validation failure; the message is shown to the user as it is."""


# ---------------------------------------------------------------------------------------
# small checks


def _quote(text: str, limit: int = 40, marks: bool = True) -> str:
    """User text shortened and cleaned for a message (the shell shows it as text)."""
    clean = "".join(ch if unicodedata.category(ch)[0] != "C" else " " for ch in text)
    clean = " ".join(clean.split())
    if len(clean) > limit:
        clean = clean[: limit - 1] + "…"
    return f"'{clean}'" if marks else clean


def _utf8_ok(text: str) -> bool:
    try:
        text.encode("utf-8")
    except UnicodeEncodeError:  # a lone surrogate (\ud800 in JSON) cannot be stored or shared
        return False
    return True


def _string(where: str, key: str, value: Any, limit: int, *, empty: bool = True) -> str:
    if not isinstance(value, str):
        raise _Bad(f"{where}: '{key}' must be text, not {_json_type(value)}.")
    if not empty and not value:
        raise _Bad(f"{where}: '{key}' is empty.")
    if len(value) > limit:
        raise _Bad(f"{where}: '{key}' is {len(value)} characters long; at most {limit} are allowed.")
    if not _utf8_ok(value):
        raise _Bad(f"{where}: '{key}' holds a broken character (an unpaired surrogate); the file is damaged.")
    return value


def _ident(where: str, key: str, value: Any) -> str:
    _string(where, key, value, MAX_ID, empty=False)
    if not _ID.match(value):
        raise _Bad(
            f"{where}: '{key}' is {_quote(value)}, which is not a valid id "
            "(letters, digits and . _ : - only, starting with a letter or digit)."
        )
    return value


def _date(where: str, key: str, value: Any) -> str:
    _string(where, key, value, 10)
    if value == "":
        return value
    m = _DATE.match(value)
    if not m:
        raise _Bad(f"{where}: '{key}' is {_quote(value)}, which is not a date written YYYY-MM-DD.")
    try:
        _dt.date(int(m[1]), int(m[2]), int(m[3]))
    except ValueError:
        raise _Bad(f"{where}: '{key}' is {_quote(value)}, which is not a real calendar date.") from None
    return value


def _stamp(where: str, key: str, value: Any) -> str:
    """An ISO 8601 date and time as JavaScript's toISOString writes it (offsets allowed)."""
    _string(where, key, value, 40, empty=False)
    m = _STAMP.match(value)
    ok = bool(m)
    if m:
        try:
            _dt.datetime(int(m[1]), int(m[2]), int(m[3]), int(m[4]), int(m[5]), int(m[6] or 0))
        except ValueError:
            ok = False
        if m[9] is not None and (int(m[9]) > 23 or int(m[10]) > 59):
            ok = False
    if not ok:
        raise _Bad(
            f"{where}: '{key}' is {_quote(value)}, which is not an ISO date and time "
            "(like 2025-03-14T09:26:53.589Z)."
        )
    return value


def _keys(where: str, obj: dict, allowed: tuple) -> None:
    for k in allowed:
        if k not in obj:
            raise _Bad(f"{where}: the field '{k}' is missing.")
    extra = [k for k in obj if k not in allowed]
    if extra:
        raise _Bad(f"{where}: unknown field {_quote(extra[0])}; this app does not read it.")


def _json_type(value: Any) -> str:
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "an object"
    return type(value).__name__


# ---------------------------------------------------------------------------------------
# jobs and entries


def _job_label(i: int, job: Any) -> str:
    site = job.get("site") if isinstance(job, dict) else None
    if isinstance(site, str) and site.strip():
        return f"Job {i} (site {_quote(site)})"
    return f"Job {i}"


def _entry_label(job_where: str, k: int, entry: Any) -> str:
    name = entry.get("name") if isinstance(entry, dict) else None
    if isinstance(name, str) and name.strip():
        return f"{job_where}, entry {k} ({_quote(name)})"
    return f"{job_where}, entry {k}"


def _check_entry(where: str, entry: Any, known: dict) -> None:
    if not isinstance(entry, dict):
        raise _Bad(f"{where}: must be an object, not {_json_type(entry)}.")
    _keys(where, entry, ENTRY_KEYS)
    _ident(where, "id", entry["id"])
    _string(where, "name", entry["name"], MAX_NAME)
    ws = entry["worksheet"]
    _string(where, "worksheet", ws, MAX_ID, empty=False)
    if ws not in known:
        names = ", ".join(known) or "none"
        raise _Bad(
            f"{where}: worksheet {_quote(ws)} is not in this version of Fieldphasor "
            f"(it has: {names}). Update the app, or remove that entry from the file."
        )
    inputs = entry["inputs"]
    if not isinstance(inputs, dict):
        raise _Bad(f"{where}: 'inputs' must be an object of field name → text, not {_json_type(inputs)}.")
    if len(inputs) > MAX_INPUTS:
        raise _Bad(f"{where}: 'inputs' has {len(inputs)} fields; at most {MAX_INPUTS} are allowed.")
    fields = {f.name: f for f in known[ws].fields}
    for name, value in inputs.items():
        if name not in fields and (len(name) > 64 or not _FIELD_NAME.match(name)):
            raise _Bad(f"{where}: input name {_quote(name)} is not a valid field name.")
        if not isinstance(value, str):
            raise _Bad(f"{where}: input '{name}' must be text, not {_json_type(value)}.")
        limit = input_limit(fields.get(name))
        if len(value) > limit:
            raise _Bad(f"{where}: input '{name}' is {len(value)} characters long; at most {limit} are allowed.")
        if not _utf8_ok(value):
            raise _Bad(f"{where}: input '{name}' holds a broken character (an unpaired surrogate).")
    _stamp(where, "updated", entry["updated"])


def input_limit(field) -> int:
    """Longest text kept for one input [characters]: :data:`MAX_INPUT_VALUE`, or for a field drawn as
    a file (a load profile opened from the device) the limit its reader states (``max_chars``)."""
    if field is not None and field.widget == "file" and field.max_chars:
        return max(MAX_INPUT_VALUE, field.max_chars)
    return MAX_INPUT_VALUE


def check_job(job: Any, index: int = 1, known: Optional[dict] = None) -> Optional[str]:
    """Check one job object. Returns None when valid, else a message naming the field."""
    if known is None:
        known = _known_sheets()
    try:
        _check_job(job, index, known)
    except _Bad as e:
        return str(e)
    return None


def _check_job(job: Any, i: int, known: dict) -> None:
    where = _job_label(i, job)
    if not isinstance(job, dict):
        raise _Bad(f"{where}: must be an object, not {_json_type(job)}.")
    _keys(where, job, JOB_KEYS)
    _ident(where, "id", job["id"])
    _string(where, "site", job["site"], MAX_SITE)
    _date(where, "date", job["date"])
    _string(where, "notes", job["notes"], MAX_NOTES)
    _stamp(where, "created", job["created"])
    _stamp(where, "updated", job["updated"])
    entries = job["entries"]
    if not isinstance(entries, list):
        raise _Bad(f"{where}: 'entries' must be a list, not {_json_type(entries)}.")
    if len(entries) > MAX_ENTRIES:
        raise _Bad(f"{where}: {len(entries)} entries; at most {MAX_ENTRIES} are allowed in one job.")
    seen: dict[str, int] = {}
    for k, entry in enumerate(entries, 1):
        ew = _entry_label(where, k, entry)
        _check_entry(ew, entry, known)
        eid = entry["id"]
        if eid in seen:
            raise _Bad(f"{ew}: id {_quote(eid)} is already used by entry {seen[eid]} of the same job.")
        seen[eid] = k


def _known_sheets() -> dict:
    return registry.sheets()


# ---------------------------------------------------------------------------------------
# files


def _no_duplicate_keys(pairs):
    out = {}
    for k, v in pairs:
        if k in out:
            raise _Bad(f"The file has the key {_quote(k)} twice in one object; it is damaged or was edited by hand.")
        out[k] = v
    return out


def _no_constants(name):
    raise _Bad(f"The file holds {name}, which is not valid JSON; it is damaged or was not written by Fieldphasor.")


def validate_export(text: Any) -> tuple[Optional[list], Optional[str]]:
    """Read an export file. Returns ``(jobs, None)`` when every field of every job is
    valid, else ``(None, message)`` with one clear message naming the job, entry and
    field at fault. Never raises."""
    try:
        return _validate(text), None
    except _Bad as e:
        return None, str(e)
    except Exception as e:  # never raises: the shell shows the message
        return None, f"The file could not be read ({type(e).__name__})."


def _validate(text: Any) -> list:
    if isinstance(text, (bytes, bytearray)):
        try:
            text = bytes(text).decode("utf-8")
        except UnicodeDecodeError:
            raise _Bad("The file is not UTF-8 text; it is not a Fieldphasor jobs file.") from None
    if not isinstance(text, str):
        raise _Bad("No file text was given.")
    if len(text) > MAX_FILE_CHARS:
        raise _Bad(f"The file is too large ({len(text)} characters; at most {MAX_FILE_CHARS}).")
    text = text.lstrip("\ufeff")
    if not text.strip():
        raise _Bad("The file is empty.")
    try:
        data = json.loads(text, object_pairs_hook=_no_duplicate_keys, parse_constant=_no_constants)
    except RecursionError:
        raise _Bad("The file is nested too deeply to be a Fieldphasor jobs file.") from None
    except json.JSONDecodeError as e:
        if e.pos >= len(text.rstrip()) or e.msg.startswith("Unterminated string"):
            raise _Bad(
                "The file ends too early: it is truncated (perhaps a download or copy was cut short). "
                "Export it again from the device that made it."
            ) from None
        raise _Bad(
            f"The file is not valid JSON (line {e.lineno}, column {e.colno}: {e.msg}); "
            "it is damaged or is not a Fieldphasor jobs file."
        ) from None
    if not isinstance(data, dict) or data.get("format") != FORMAT:
        raise _Bad(
            "This is not a Fieldphasor jobs file (it lacks the marker \"format\": \"fieldphasor-jobs\"). "
            "Choose a file exported from Fieldphasor."
        )
    version = data.get("version")
    if isinstance(version, bool) or not isinstance(version, int):
        raise _Bad("The file's 'version' is missing or is not a whole number; the file is damaged.")
    if version > VERSION:
        made_by = data.get("app_version")
        by = f" by Fieldphasor {_quote(made_by, 30, marks=False)}" if isinstance(made_by, str) and made_by else ""
        raise _Bad(
            f"This file was written{by} in jobs-file version {version}; this app reads version {VERSION} "
            "and older. Update the app, then import the file again."
        )
    if version < 1:
        raise _Bad(f"The file's version {version} is not one Fieldphasor ever wrote; the file is damaged.")
    _keys("The file", data, FILE_KEYS)
    _string("The file", "app_version", data["app_version"], MAX_APP_VERSION)
    _stamp("The file", "exported", data["exported"])
    jobs = data["jobs"]
    if not isinstance(jobs, list):
        raise _Bad(f"The file: 'jobs' must be a list, not {_json_type(jobs)}.")
    if len(jobs) > MAX_JOBS:
        raise _Bad(f"The file holds {len(jobs)} jobs; at most {MAX_JOBS} can be imported at once.")
    known = _known_sheets()
    seen: dict[str, int] = {}
    for i, job in enumerate(jobs, 1):
        _check_job(job, i, known)
        if job["id"] in seen:
            raise _Bad(f"{_job_label(i, job)}: id {_quote(job['id'])} is already used by job {seen[job['id']]}.")
        seen[job["id"]] = i
    return jobs


def make_export(jobs: list, app_version: str, exported: str) -> str:
    """The text of an export file holding ``jobs`` (written as given, in order)."""
    doc = {"format": FORMAT, "version": VERSION, "app_version": app_version, "exported": exported, "jobs": jobs}
    return json.dumps(doc, ensure_ascii=False, indent=1, allow_nan=False) + "\n"


def slug(text: str, limit: int = 40, fallback: str = "job") -> str:
    """A file-name-safe ASCII slug of user text: 'Panel B / Feeder 3' → 'panel-b-feeder-3'."""
    t = unicodedata.normalize("NFKD", str(text)).encode("ascii", "ignore").decode("ascii").lower()
    t = re.sub(r"[^a-z0-9]+", "-", t).strip("-")[:limit].strip("-")
    return t or fallback


def export_filename(jobs: list, exported: str) -> str:
    day = exported[:10] if _DATE.match(exported[:10]) else "export"
    if len(jobs) == 1 and isinstance(jobs[0], dict):
        return f"fieldphasor-job-{slug(jobs[0].get('site', ''))}-{day}.json"
    return f"fieldphasor-jobs-{day}.json"


def now_stamp() -> str:
    """The current UTC time as JavaScript's toISOString writes it."""
    t = _dt.datetime.now(_dt.timezone.utc)
    return t.strftime("%Y-%m-%dT%H:%M:%S.") + f"{t.microsecond // 1000:03d}Z"
