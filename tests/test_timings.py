"""The benchmark's named cases (app/timings.py) and the bridge's door to them.

The speed target itself (study_64 ≤ 150 ms in Pyodide) is printed by the benchmark, never
asserted. Checked here: the case is the one the target names (six steps, 64 combinations, orders 2–50
with duty and IEEE 519 checks), the worksheet case is the same plant, and the door never raises.
"""

from __future__ import annotations

import json

from app import bridge, registry, timings
from pycore import harmonicstudy


def test_study_64_is_six_steps_64_states_orders_2_to_50():
    st = harmonicstudy.demo_six_step()
    assert len(st.bus.steps) == 6 and len(st.combos) + 1 == 2 ** 6
    assert sorted(st.injection) == list(range(2, 51))
    assert all(c.duties and c.check519 for c in st.combos)


def test_the_worksheet_case_is_the_same_plant_as_the_study_case():
    st = harmonicstudy.demo_six_step()
    out = registry.run("harmonic_study", timings.SIX_STEP_INPUTS)
    assert out["ok"], out["field_errors"]
    worst = next(r for r in out["results"] if r["name"] == "thd_v")
    assert worst["value"] <= st.combos[0].thd_v + 1e-9  # the worksheet's injection lacks the study's 2 A background
    assert len(json.loads(timings.SIX_STEP_INPUTS["steps"])) == 6


def test_time_call_times_a_named_case_and_never_raises():
    got = json.loads(bridge.time_call("study_64", 2))
    assert got["name"] == "study_64" and len(got["ms"]) == 2 and all(t > 0 for t in got["ms"])
    assert "error" in json.loads(bridge.time_call("no_such_case", 2))
    assert "error" in json.loads(bridge.time_call("study_64", "many"))
