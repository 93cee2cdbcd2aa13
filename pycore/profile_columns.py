"""What each column of a load-profile file holds: roles, names in headers, roles typed by a user,
and the layouts they make.

A role says what a column holds and in which unit: average demand over the interval (kW, kvar,
kVA), energy in the interval (kWh, kvarh, kVAh, converted to demand with the interval length:
kW = kWh / h), power factor, or the time stamp (one column, or a date column and a time column).
Reactive power is positive when lagging (inductive), as most meters register it.
"""

from __future__ import annotations

import re

from .errors import InputError, guarded

ROLE_WORDS = {
    "time": "date and time",
    "date": "date",
    "clock": "time of day",
    "kw": "kW (demand)",
    "kwh": "kWh in the interval",
    "kvar": "kvar (+ lagging)",
    "kvarh": "kvarh in the interval (+ lagging)",
    "kvar_lag": "kvar lagging",
    "kvar_lead": "kvar leading",
    "kvarh_lag": "kvarh lagging",
    "kvarh_lead": "kvarh leading",
    "kva": "kVA",
    "kvah": "kVAh in the interval",
    "pf": "power factor",
    "skip": "not used",
}
ENERGY_ROLES = frozenset({"kwh", "kvarh", "kvarh_lag", "kvarh_lead", "kvah"})
TIME_ROLES = frozenset({"time", "date", "clock"})
P_ROLES = ("kw", "kwh")
Q_ROLES = ("kvar", "kvarh", "kvar_lag", "kvarh_lag", "kvar_lead", "kvarh_lead", "kva", "kvah", "pf")

# what a user may type for each role (compared with spaces, '_', '-' and '(' ')' removed)
_TYPED = {
    "time": "time timestamp datetime date/time stamp",
    "date": "date day",
    "clock": "clock timeofday hour hh:mm",
    "kw": "kw p demand w mw",
    "kwh": "kwh wh mwh",
    "kvar": "kvar q var mvar",
    "kvarh": "kvarh varh mvarh",
    "kvar_lag": "kvarlag kvarlagging kvarind kvarinductive",
    "kvar_lead": "kvarlead kvarleading kvarcap kvarcapacitive",
    "kvarh_lag": "kvarhlag kvarhlagging kvarhind kvarhinductive",
    "kvarh_lead": "kvarhlead kvarhleading kvarhcap kvarhcapacitive",
    "kva": "kva s va mva",
    "kvah": "kvah vah mvah",
    "pf": "pf powerfactor cosphi cosφ cos",
    "skip": "skip - x ignore none no unused",
}
_TYPED_MAP = {w: role for role, words in _TYPED.items() for w in words.split()}
# scale to kilo units for a role word typed or found in a header with another prefix
_SCALE = {"w": 0.001, "wh": 0.001, "var": 0.001, "varh": 0.001, "va": 0.001, "vah": 0.001,
          "mw": 1000.0, "mwh": 1000.0, "mvar": 1000.0, "mvarh": 1000.0, "mva": 1000.0, "mvah": 1000.0}

_UNIT = re.compile(r"(?<![a-z])([km]?)(varh|vah|wh|var|va|w)(?![a-z])")
_LEAD = re.compile(r"lead|leading|\bcap\b|capacitive")
_LAG = re.compile(r"\blag|lagging|\bind\b|inductive")
_PF = re.compile(r"\bpf\b|power ?factor|\bcos\b|cos ?(phi|φ|ϕ)")


def _compact(word: str) -> str:
    return re.sub(r"[\s_\-()\[\]]+", "", word.lower())


@guarded
def parse_roles(text: str) -> list[tuple[str, float]]:
    """Column roles as a user types them, in column order, separated by commas or semicolons:
    e.g. ``time, kW, kvar`` or ``date; time; kWh; kvarh lag; kvarh lead; -`` (``-`` or ``skip``
    for a column not used). Returns ``[(role, scale to kilo units)]``. A 'time' typed after a
    'date' is the time of day. Raises :class:`InputError` naming a word it does not know."""
    items = [t.strip() for t in re.split(r"[,;\t]", text or "")]
    while items and not items[-1]:
        items.pop()
    out: list[tuple[str, float]] = []
    for i, item in enumerate(items, 1):
        key = _compact(item) or "-"
        role = _TYPED_MAP.get(key)
        if role is None:
            known = "time, date, kW, kWh, kvar, kvarh, kvar lag, kvar lead, kvarh lag, kvarh lead, kVA, kVAh, PF, skip"
            raise InputError(f"Column {i}: '{item[:20]}' is not a column role; use {known}.")
        if role == "time" and any(r == "date" for r, _ in out):
            role = "clock"
        out.append((role, _SCALE.get(key, 1.0)))
    if not out:
        raise InputError("No column roles given.")
    return out


@guarded
def header_role(name: str) -> tuple[str, float] | None:
    """The role a header name suggests, with the scale to kilo units (``'Demand (MW)'`` →
    ``('kw', 1000)``), or None when the name says nothing usable (e.g. 'Status')."""
    s = name.strip().lower()
    if not s:
        return None
    if _PF.search(s):
        return "pf", 1.0
    m = _UNIT.search(s)
    if m:
        prefix, unit = m.group(1), m.group(2)
        scale = {"k": 1.0, "m": 1000.0, "": 0.001}[prefix]
        role = {"w": "kw", "wh": "kwh", "var": "kvar", "varh": "kvarh", "va": "kva", "vah": "kvah"}[unit]
        if role in ("kvar", "kvarh"):
            if _LEAD.search(s):
                role += "_lead"
            elif _LAG.search(s):
                role += "_lag"
        return role, scale
    words = set(re.findall(r"[a-z]+", s))
    if "reactive" in words:
        return "kvar", 1.0
    if "apparent" in words:
        return "kva", 1.0
    if words & {"active", "real", "demand"} or s in ("p", "power"):
        return "kw", 1.0
    if s == "q":
        return "kvar", 1.0
    if s == "s":
        return "kva", 1.0
    return None


@guarded
def layout(roles: list[str]) -> tuple[str, str]:
    """The roles that give P and Q, as ``(p_role, q_kind)``: q_kind is 'kvar' (one signed
    column), 'lag_lead' (lagging and leading in separate columns), 'kva' or 'pf'. Raises
    :class:`InputError` when no column gives P or none gives Q."""
    have = set(roles)
    p_role = next((r for r in P_ROLES if r in have), None)
    if p_role is None:
        raise InputError("No column gives kW or kWh: set the column roles (e.g. time, kW, kvar).")
    if have & {"kvar", "kvarh"}:
        q_kind = "kvar"
    elif have & {"kvar_lag", "kvarh_lag", "kvar_lead", "kvarh_lead"}:
        q_kind = "lag_lead"
    elif have & {"kva", "kvah"}:
        q_kind = "kva"
    elif "pf" in have:
        q_kind = "pf"
    else:
        raise InputError("No column gives kvar, kvarh, kVA or power factor: set the column roles "
                         "(e.g. time, kW, kvar).")
    return p_role, q_kind
