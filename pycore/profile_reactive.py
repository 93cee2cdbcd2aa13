"""Reactive power from the columns a load-profile file gives, and the sentence that says how.

One signed kvar (or kvarh) column is read as is (+ lagging); lagging and leading columns apart
give Q = lag − lead; kVA with kW gives Q = √(S² − P²), taken as lagging because kVA carries no
sign; PF with kW gives Q = P·tan(acos PF), lagging. Power triangle (circuit theory; IEEE Std 141,
Red Book, power-factor chapter).
"""

from __future__ import annotations

import math

from .errors import InputError, guarded

PF_KVA_SLACK = 0.01
"""kVA may fall below kW by this fraction (meter rounding) and is then read as PF 1 (our own)."""
_Q_ROLES = {"kvar": ("kvar", "kvarh"), "lag_lead": ("kvar_lag", "kvarh_lag", "kvar_lead", "kvarh_lead"),
            "kva": ("kva", "kvah"), "pf": ("pf",)}


@guarded
def reactive(cols: dict, scale: dict, q_kind: str, P: list) -> tuple[list, list, dict]:
    """Q [kvar, + lagging] per interval from the columns that give it (``cols``: role → raw
    values, ``scale``: role → factor to kvar or kVA, 1/h for energy columns [1/h]), by
    ``q_kind`` ('kvar', 'lag_lead', 'kva', 'pf', see :func:`pycore.profile_columns.layout`), with
    P [kW] per interval. Returns (Q list, notes, {index: reason} for intervals whose Q cannot be
    found). Power triangle: Q = √(S² − P²), Q = P·tan(acos PF) (circuit theory)."""
    n = len(P)
    if (any(len(v) != n for v in cols.values()) or q_kind not in _Q_ROLES
            or not any(r in cols for r in _Q_ROLES[q_kind]) or any(r not in scale for r in cols)):
        raise InputError("The reactive-power columns do not match the readings.")
    notes: list[str] = []
    bad: dict[int, str] = {}
    if q_kind == "kvar":
        role = "kvar" if "kvar" in cols else "kvarh"
        k = scale[role]
        return [v * k for v in cols[role]], notes, bad
    if q_kind == "lag_lead":
        lag = next((r for r in ("kvar_lag", "kvarh_lag") if r in cols), None)
        lead = next((r for r in ("kvar_lead", "kvarh_lead") if r in cols), None)
        n = len(P)
        a = [v * scale[lag] for v in cols[lag]] if lag else [0.0] * n
        b = [v * scale[lead] for v in cols[lead]] if lead else [0.0] * n
        if not lead:
            notes.append("Only lagging kvar is given: leading kvar is taken as zero.")
        if not lag:
            notes.append("Only leading kvar is given: lagging kvar is taken as zero.")
        return [x - abs(y) for x, y in zip(a, b)], notes, bad
    if q_kind == "kva":
        role = "kva" if "kva" in cols else "kvah"
        k = scale[role]
        out = []
        for i, (p, s) in enumerate(zip(P, cols[role])):
            s *= k
            d = s * s - p * p
            if d < 0:
                if s < abs(p) * (1 - PF_KVA_SLACK):
                    bad[i] = "kVA below kW: not a possible reading"
                d = 0.0
            out.append(math.sqrt(d))
        notes.append("kvar is found from kVA and kW and taken as lagging (kVA carries no sign).")
        return out, notes, bad
    out = []
    pfs = cols["pf"]
    percent = all(1.0 < abs(v) <= 100.0 for v in pfs[:200] if v != 0)
    if percent:
        notes.append("Power factors above 1 are read as percentages.")
    for i, (p, pf) in enumerate(zip(P, pfs)):
        if percent:
            pf /= 100.0
        if pf <= 0 or pf > 1:
            bad[i] = ("negative power factor: the meter's sign convention (leading or export) is not known"
                      if pf < 0 else "power factor 0 or above 1: not a possible reading")
            out.append(0.0)
            continue
        out.append(p * math.sqrt(1 - pf * pf) / pf)
    notes.append("kvar is found from kW and power factor and taken as lagging.")
    return out, notes, bad


@guarded
def layout_words(p_role: str, q_kind: str, roles: list[str]) -> str:
    """A sentence saying where P and Q come from, for the 'what was understood' table."""
    if p_role not in ("kw", "kwh") or q_kind not in _Q_ROLES:
        raise InputError("Unknown layout.")
    p = "kW" if p_role == "kw" else "kWh per interval (÷ interval length)"
    q = {"kvar": "kvar" if "kvar" in roles else "kvarh per interval (÷ interval length)",
         "lag_lead": "lagging − leading " + ("kvarh" if any(r.startswith("kvarh") for r in roles) else "kvar"),
         "kva": "√(kVA² − kW²), lagging", "pf": "kW·tan(acos PF), lagging"}[q_kind]
    return f"P from {p}; Q from {q}"
