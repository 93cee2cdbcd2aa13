"""The bridge contract: JSON in, JSON out, for the worker, the shell and the tests.

``catalog()`` lists the worksheets; ``compute(worksheet_id, inputs_json)`` computes one.
Neither raises: any failure comes back as ``{"ok": false, ...}`` with a message.
"""

from __future__ import annotations

import importlib
import json
import pkgutil
import traceback

from . import __version__
from .sheet import Worksheet

_SHEETS: dict[str, Worksheet] = {}


def _load() -> dict[str, Worksheet]:
    if not _SHEETS:
        from . import sheets

        found = []
        for info in pkgutil.iter_modules(sheets.__path__):
            mod = importlib.import_module(f"{sheets.__name__}.{info.name}")
            sheet = getattr(mod, "SHEET", None)
            if isinstance(sheet, Worksheet):
                found.append(sheet)
        for s in sorted(found, key=lambda s: (s.order, s.id)):
            _SHEETS[s.id] = s
    return _SHEETS


def sheets() -> dict[str, Worksheet]:
    """All worksheets by id, in display order."""
    return _load()


def catalog() -> str:
    """JSON list of worksheet declarations (see DESIGN §1)."""
    return json.dumps([s.declaration() for s in _load().values()], ensure_ascii=False)


def compute(worksheet_id: str, inputs: str) -> str:
    """Compute one worksheet from a JSON object of field name → typed text. Never raises."""
    try:
        sheet = _load().get(worksheet_id)
        if sheet is None:
            return json.dumps(_failure(f"Unknown worksheet '{worksheet_id}'."), ensure_ascii=False)
        try:
            raw = json.loads(inputs) if isinstance(inputs, str) else dict(inputs)
        except ValueError:
            return json.dumps(_failure("The inputs could not be read."), ensure_ascii=False)
        if not isinstance(raw, dict):
            return json.dumps(_failure("The inputs could not be read."), ensure_ascii=False)
        return json.dumps(sheet.run(raw), ensure_ascii=False, allow_nan=False)
    except Exception as exc:  # the contract: never raise across the bridge
        traceback.print_exc()
        return json.dumps(
            _failure(f"Internal error ({type(exc).__name__}). Please report it with the inputs used."),
            ensure_ascii=False,
        )


def _failure(message: str) -> dict:
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


def version() -> str:
    """The app's version string."""
    return __version__
