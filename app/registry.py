"""The worksheet registry: finding worksheets and running one from a Python dict.

Each module ``app/sheets/<id>.py`` defines ``SHEET = Worksheet(id=<id>, ...)``. :func:`sheet`
imports only that one module until the full catalog is asked for (:func:`sheets`), so the
first result in the browser pays for the worksheet on screen alone. :func:`run` computes one
worksheet from a dict of field name → typed text and returns the outcome dict of the bridge
contract (DESIGN §1); it never raises.

A failure the computation did not mean (an unexpected exception: a bug) comes back as
:func:`internal_failure`: ``ok: false``, the message :data:`INTERNAL_ERROR` in ``"error"``, and
the extension key ``"internal": true``, present on no other outcome. Tests and tools tell a bug
from a refused input by that key, never by the message's wording.

Jobs, reports, the snapshot warm-up and the tests use this module; :mod:`app.bridge` is only
the JSON door for the worker, the build and outside tools.
"""

from __future__ import annotations

import importlib
import pkgutil
import traceback
from typing import Any, Optional

from .sheet import Worksheet

_SHEETS: dict[str, Worksheet] = {}  # the full catalog, in display order, once loaded
_ONE: dict[str, Worksheet] = {}  # worksheets imported one by one before that

INTERNAL_ERROR = "Internal error ({}). Please report it with the inputs used."


def _load() -> dict[str, Worksheet]:
    if not _SHEETS:
        from . import sheets as package

        found = []
        for info in pkgutil.iter_modules(package.__path__):
            mod = importlib.import_module(f"{package.__name__}.{info.name}")
            ws = getattr(mod, "SHEET", None)
            if isinstance(ws, Worksheet):
                found.append(ws)
        for ws in sorted(found, key=lambda s: (s.order, s.id)):
            _SHEETS[ws.id] = ws
    return _SHEETS


def sheet(worksheet_id: Any) -> Optional[Worksheet]:
    """One worksheet by id, or None. Until the catalog is loaded this imports only the
    worksheet's own module (``app/sheets/<id>.py``)."""
    if not isinstance(worksheet_id, str):
        return None
    if _SHEETS:
        return _SHEETS.get(worksheet_id)
    if worksheet_id in _ONE:
        return _ONE[worksheet_id]
    if not worksheet_id.isidentifier() or worksheet_id.startswith("_"):
        return None
    try:
        mod = importlib.import_module(f"{__package__}.sheets.{worksheet_id}")
    except ImportError:
        return None
    found = getattr(mod, "SHEET", None)
    if isinstance(found, Worksheet) and found.id == worksheet_id:
        _ONE[worksheet_id] = found
        return found
    return None


def sheets() -> dict[str, Worksheet]:
    """All worksheets by id, in display order (imports every worksheet module)."""
    return _load()


def failure(message: str) -> dict:
    """An outcome with no results and one message about the whole computation."""
    return {
        "ok": False,
        "results": [],
        "tables": [],
        "field_errors": {},
        "warnings": [],
        "cautions": [],
        "figures": [],
        "error": message,
    }


def internal_failure(exc: BaseException) -> dict:
    """The outcome for an unexpected exception (a bug): :func:`failure` with the message
    :data:`INTERNAL_ERROR` naming the exception's type, marked ``"internal": true``."""
    out = failure(INTERNAL_ERROR.format(type(exc).__name__))
    out["internal"] = True
    return out


def run(worksheet_id: str, inputs: Any, *, echo: bool = False) -> dict:
    """Compute one worksheet from a dict of field name → typed text; the outcome dict.

    With ``echo`` the outcome also holds ``"inputs"``: what the computation read from each
    visible field (see :meth:`app.sheet.Worksheet.run`). Never raises: an unknown worksheet,
    inputs that are not a dict or a failure inside the computation come back as
    ``{"ok": false, "error": ...}``; an unexpected exception also carries ``"internal": true``
    (:func:`internal_failure`).
    """
    try:
        ws = sheet(worksheet_id)
        if ws is None:
            return failure(f"Unknown worksheet '{worksheet_id}'.")
        if not isinstance(inputs, dict):
            return failure("The inputs could not be read.")
        return ws.run(inputs, echo=echo)
    except Exception as exc:  # the contract: a computation never raises
        traceback.print_exc()
        return internal_failure(exc)
