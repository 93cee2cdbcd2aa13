"""The demo job: an invented plant for trying Fieldphasor, built from the worksheets this build has.

Every entry is checked by running its worksheet (through :mod:`app.registry`) before it is
offered, so the demo never shows an entry that does not compute.
"""

from __future__ import annotations

import json
import uuid
from typing import Optional

from . import registry
from .jobfile import now_stamp

DEMO_SITE = "Demo — Quillmoor Paper Mill, Finishing Hall (invented plant)"
DEMO_NOTES = (
    "DEMO DATA: an invented plant for trying Fieldphasor; none of these numbers come from a real site.\n"
    "Supply: 11 kV / 400 V, 50 Hz, transformer T2 1250 kVA, 6 % impedance; 11 kV fault level about 250 MVA.\n"
    "Main switchboard MSB-2 in the finishing hall; rewinder and slitter on 6-pulse drives.\n"
    "Old bank in cubicle C4 (3 × 50 kvar, 440 V, no reactors): step 3 keeps blowing its fuses.\n"
    "Proposal: replace it with a 250 kvar detuned bank (7 %) in five 50 kvar steps.\n"
    "Tariff: maximum demand billed on kVA at 9.80 EUR per kVA per month."
)

_DEMO_LOADS = json.dumps([
    ["Rewinder drive (6-pulse)", "160", "0.88", "", "1", "18"],
    ["Slitter drive", "55", "0.85", "", "1", "16"],
    ["Dust extraction fan", "37", "0.82", "", "2", "20"],
    ["Air compressor", "75", "0.84", "", "1", "20"],
    ["Roll conveyor motor", "4", "0.72", "", "14", "18"],
    ["Core cutter", "11", "0.76", "", "1", "8"],
    ["Hall lighting", "18", "0.95", "", "1", "24"],
    ["UPS with input filter", "10", "0.97 lead", "", "1", "24"],
], ensure_ascii=False)

# (worksheet id, entry name, input overrides). Overrides naming fields a worksheet does not
# have are dropped; if the overrides make a worksheet fail, its own (invented) defaults are used.
# The first pass takes one entry per worksheet in this order, up to five entries.
DEMO_PLAN = [
    ("survey", "Finishing hall load survey", {"loads": _DEMO_LOADS, "target_pf": "0.95"}),
    ("correction", "MSB-2 central bank sizing",
     {"v_ll": "400", "f": "50", "phases": "3", "basis": "p_pf", "p_kw": "455", "pf1": "0.80", "pf1_sense": "lagging",
      "pf2": "0.95", "existing_kvar": "0", "existing_in": "yes", "cap_v": "440", "cap_f": "50", "connection": "delta",
      "ratings": "25, 50", "bank": "auto", "pattern": "equal", "n_steps": "5", "profile": "iec",
      "light_p": "120", "light_pf": "0.72", "tx_kva": "1250", "tx_z": "6", "fault_mva": "250"}),
    ("detuned", "New C4 bank with 7 % reactors",
     {"u": "400", "f": "50", "q": "250", "steps": "5", "spec": "p", "p": "7", "h_low": "5", "margin": "10",
      "s_kva": "1250", "z_pct": "6"}),
    ("savings", "kVA demand saving and payback",
     {"pf1": "0.80", "pf2": "0.95", "tariff": "kva", "p_kw": "455", "kva_price": "9.80", "add_losses": "no",
      "cost": "16800", "currency": "EUR"}),
    ("bank_health", "Old C4 bank, step 3 capacitance",
     {"q_rated": "50", "v_rated": "440", "f_rated": "50", "connection": "delta", "mode": "between",
      "m12": "410.6", "m23": "409.8", "m31": "372.5", "band": "iec60831"}),
    ("bus_scan", "MSB-2 resonance screening",
     {"v_ll": "400", "f": "50", "tx_kva": "1250", "tx_z": "6", "fault_mva": "250", "load_kw": "180",
      "single_phase": "no", "steps": "50, 50, 50, 50, 50"}),
    ("motor_cap", "Dust extraction fan: terminal capacitor",
     {"v": "400", "f": "50", "i_full": "70", "pf_full": "0.82", "basis": "i0", "i0": "28", "cap_conn": "delta"}),
    ("impedance", "Rewinder feeder cable at 50 Hz",
     {"mode": "network", "topology": "series", "elements": '[["R","0.042 Ω"],["L","0.19 mH"]]', "f": "50"}),
    ("impedance", "Detuned step at the 5th harmonic",
     {"mode": "network", "topology": "series", "elements": '[["R","12 mΩ"],["L","0.77 mH"],["C","925 µF"]]',
      "f": "250"}),
    ("impedance", "Supply impedance seen at MSB-2",
     {"mode": "z", "z": "1.7m + j7.7m", "f": "50"}),
]


def _demo_inputs(sheet, overrides: dict) -> Optional[dict]:
    base = {f.name: f.default for f in sheet.fields}
    tried = []
    if overrides:
        tried.append({**base, **{k: v for k, v in overrides.items() if k in base}})
    tried.append(base)
    for inputs in tried:
        if registry.run(sheet.id, inputs).get("ok"):
            return inputs
    return None


def demo_job(max_entries: int = 5, known: Optional[dict] = None) -> dict:
    """An invented demo job using the worksheets this build has (3 to 5 entries when
    possible, from as many different worksheets as exist). ``known``: the worksheets to
    draw on, by id (default: all of :func:`app.registry.sheets`)."""
    known = registry.sheets() if known is None else known
    stamp = now_stamp()
    entries = []
    used: set = set()
    # first pass: one entry per worksheet; second pass: fill up with the rest
    for second in (False, True):
        for ws, name, overrides in DEMO_PLAN:
            if len(entries) >= max_entries:
                break
            if ws not in known or (ws in used) != second or any(e["name"] == name for e in entries):
                continue
            inputs = _demo_inputs(known[ws], overrides)
            if inputs is None:
                continue
            used.add(ws)
            entries.append(
                {"id": "e-" + uuid.uuid4().hex[:12], "name": name, "worksheet": ws, "inputs": inputs, "updated": stamp}
            )
    return {
        "id": "demo-" + uuid.uuid4().hex[:12],
        "site": DEMO_SITE,
        "date": stamp[:10],
        "notes": DEMO_NOTES,
        "created": stamp,
        "updated": stamp,
        "entries": entries,
    }
