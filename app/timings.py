"""Named pieces of Python work the benchmark times inside the engine that runs them (Pyodide in the
browser, CPython in tests): a table of name → callable, so the shell and the benchmark name a case
and hold no engineering logic. ``time_call`` runs one case a number of times and returns each run's
wall time in milliseconds (``time.perf_counter``)."""

from __future__ import annotations

import json
import time

from pycore import harmonicstudy


def _study_64() -> None:
    """Six-step bank, 64 combinations, orders 2–50, duty and IEEE 519 checks (the study's speed case)."""
    st = harmonicstudy.demo_six_step()
    assert len(st.combos) == 63  # 64 states with the bank-out state kept apart


def _study_sheet_64() -> None:
    """The whole harmonic-study worksheet on the same six-step case: the study, the detuned options
    re-studied, tables and figure (the answer a user waits for)."""
    from . import registry  # late: registry imports the worksheets

    registry.run("harmonic_study", SIX_STEP_INPUTS)


def _opening_sheet() -> None:
    """The opening worksheet with its default inputs, its answer written as JSON as the bridge
    writes it: the Python share of a recompute."""
    from . import OPENING_SHEET, registry  # late: registry imports the worksheets

    json.dumps(registry.run(OPENING_SHEET, {}), ensure_ascii=False, allow_nan=False)


SIX_STEP_INPUTS = {
    "v_ll": "480", "f": "60", "tx_kva": "1500", "tx_z": "5.75", "tx_xr": "6", "fault_mva": "250", "load_kw": "300",
    "motor_kva": "400", "lr_ratio": "6",
    "steps": '[["50","plain","",""],["50","plain","",""],["100","plain","",""],["100","detuned","7",""],'
             '["100","detuned","7",""],["100","plain","",""]]',
    "source": "typical", "typical": '[["six_pulse_choke","400"],["six_pulse_ideal","100"]]', "i_load": "2000",
}
"""The benchmark's six-step case as worksheet inputs (invented plant, as :func:`pycore.harmonicstudy.demo_six_step`)."""

CASES = {
    "study_64": _study_64,
    "study_sheet_64": _study_sheet_64,
    "opening_sheet": _opening_sheet,
}


def time_call(name: str, runs: int = 10) -> dict:
    """{"name", "ms": [wall time of each run, ms]} for the case ``name`` of :data:`CASES`, run
    ``runs`` times (1 to 200) after one untimed warm-up run; {"error"} for an unknown name."""
    fn = CASES.get(name)
    if fn is None:
        return {"error": f"Unknown timing case '{name}'."}
    runs = max(1, min(200, int(runs)))
    fn()
    ms = []
    for _ in range(runs):
        t0 = time.perf_counter()
        fn()
        ms.append((time.perf_counter() - t0) * 1000.0)
    return {"name": name, "ms": ms}
