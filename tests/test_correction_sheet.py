"""The capacitor correction worksheet: answers, bad input, supply checks.

Voltage rise and resonance order are checked against ngspice solutions of the per-phase circuit
(source + transformer + load + capacitor); everything else against numpy or named sources.
"""

import json
import xml.etree.ElementTree as ET

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import app.bridge as bridge
from helpers import assert_answered, res, run, steps_shown, val
from spice import ac_node_voltages, impedance_at, needs_ngspice

SHEET = "correction"


def declaration():
    return next(s for s in json.loads(bridge.catalog()) if s["id"] == SHEET)


# --------------------------------------------------------------------------- defaults


def test_defaults_compute_and_answer_what_to_order_first():
    r = run(SHEET)
    assert r["ok"], r
    keys = [x["name"] for x in r["results"] if x.get("key")]
    assert keys[0] == "order"
    assert {"q_need", "q_delivered", "pf_after", "cable"} <= set(keys)
    assert "kvar" in res(r, "order")["display"]
    assert all(x["method"] and x["source"] for x in r["results"])


def test_main_worksheet_opens_first():
    sheets = bridge.sheets()
    assert sheets[SHEET].order == 10


def test_frequency_field_range_and_suggestions():
    f = next(x for x in declaration()["fields"] if x["name"] == "f")
    assert f["min"] == 16.7 and f["max"] == 400
    assert {"50", "60"} <= set(f["suggest"])
    assert run(SHEET, f="16.7", cap_f="16.7")["ok"]
    assert run(SHEET, f="400", cap_f="400")["ok"]


def test_every_input_set_has_its_fields_shown_only_for_it():
    fields = {x["name"]: x for x in declaration()["fields"]}
    for name in ("p_kw", "s_kva", "q_kvar", "pf1", "v_meas", "i_meas", "bill_kwh", "bill_kvarh", "peak_kw", "peak_kva"):
        assert fields[name]["show_when"]["field"] == "basis"
    assert fields["ratings"]["kind"] == "list"


# --------------------------------------------------------------------------- sizing against numpy


def test_kvar_needed_and_power_factor_reached_against_numpy():
    r = run(SHEET, p_kw="420", pf1="0.78", pf2="0.95")
    p = 420.0
    q1 = p * np.tan(np.arccos(0.78))
    q2 = p * np.tan(np.arccos(0.95))
    assert val(r, "q_need") == pytest.approx(q1 - q2, rel=1e-9)
    qd = val(r, "q_delivered")
    assert val(r, "pf_all_in") == pytest.approx(p / np.hypot(p, q1 - qd), rel=1e-9)
    assert qd >= q1 - q2


def test_rating_to_order_scales_with_voltage_squared_and_frequency():
    # Q_r = Q·(V_r/V)²·(f_r/f): physics of X_C = 1/(2πfC), computed here directly
    r = run(SHEET, cap_v="525", cap_f="50", v_ll="480", f="60")
    assert val(r, "q_need_rated") == pytest.approx(val(r, "q_need") * (525 / 480) ** 2 * (50 / 60), rel=1e-9)
    assert val(r, "q_delivered") == pytest.approx(val(r, "order") * (480 / 525) ** 2 * (60 / 50), rel=1e-9)


def test_capacitance_and_currents_against_numpy_phasors():
    r = run(SHEET, bank="fixed", ratings="50", cap_v="480", v_ll="480", f="60", cap_f="60")
    q = val(r, "order")
    assert q == pytest.approx(200.0)  # 4 × 50 kvar cover 198.9 kvar with the least excess
    w = 2 * np.pi * 60
    a = np.exp(-2j * np.pi / 3)
    v = 480 / np.sqrt(3) * np.array([1, a, a * a])
    c_delta = val(r, "c_delta") * 1e-6
    i_ab = (v[0] - v[1]) * 1j * w * c_delta
    i_ca = (v[2] - v[0]) * 1j * w * c_delta
    i_a = i_ab - i_ca
    assert -np.sum(v * np.conj(np.array([i_a, i_a * a, i_a * a * a]))).imag / 1000 == pytest.approx(q, rel=1e-9)
    assert val(r, "i_rated") == pytest.approx(abs(i_a), rel=1e-9)
    assert val(r, "i_branch") == pytest.approx(abs(i_ab), rel=1e-9)
    c_wye = val(r, "c_wye") * 1e-6
    assert 3 * abs(v[0]) ** 2 * w * c_wye / 1000 == pytest.approx(q, rel=1e-9)
    # NFPA 70 (NEC) 460.8(A): conductors ≥ 135 % of rated current
    assert val(r, "cable") == pytest.approx(1.35 * abs(i_a), rel=1e-9)


def test_iec_profile_current_basis():
    # IEC 60831-1 (from memory): 1.3 × I_N, 1.43 × I_N with capacitance tolerance
    r = run(SHEET, profile="iec")
    i_n = val(r, "i_rated")
    assert val(r, "iec_13") == pytest.approx(1.3 * i_n)
    assert val(r, "iec_143") == pytest.approx(1.43 * i_n)
    assert val(r, "cable") == pytest.approx(1.43 * i_n)


def test_load_from_measured_v_i_pf_against_numpy():
    r = run(SHEET, basis="vi_pf", v_meas="472", i_meas="600", pf1="0.78")
    s = np.sqrt(3) * 472 * 600 / 1000
    assert val(r, "p") == pytest.approx(s * 0.78, rel=1e-9)
    assert val(r, "i1") == pytest.approx(600, rel=1e-9)


def test_load_from_measured_v_i_p_against_numpy():
    r = run(SHEET, basis="vi_p", v_meas="400", i_meas="300", p_kw="160", phases="3")
    s = np.sqrt(3) * 400 * 300 / 1000
    assert val(r, "pf1") == pytest.approx(160 / s, rel=1e-9)


def test_bill_energy_average_power_factor():
    # PF = kWh/√(kWh² + kvarh²) (utility billing practice, common practice), P = kWh / operating hours
    r = run(SHEET, basis="bill_energy", bill_kwh="215000", bill_kvarh="172000", bill_hours="520", bill_kw="")
    assert val(r, "pf1") == pytest.approx(215000 / np.hypot(215000, 172000), rel=1e-12)
    assert val(r, "p") == pytest.approx(215000 / 520, rel=1e-12)
    r2 = run(SHEET, basis="bill_energy", bill_kw="610")
    assert val(r2, "p") == pytest.approx(610)


def test_bill_peak_demand():
    r = run(SHEET, basis="bill_demand", peak_kw="430", peak_kva="550")
    assert val(r, "pf1") == pytest.approx(430 / 550, rel=1e-12)


def test_s_pf_and_p_q_sets():
    assert val(run(SHEET, basis="s_pf", s_kva="540", pf1="0.78"), "p") == pytest.approx(540 * 0.78)
    r = run(SHEET, basis="p_q", p_kw="420", q_kvar="340")
    assert val(r, "pf1") == pytest.approx(420 / np.hypot(420, 340))


def test_horsepower_accepted_with_conversion_shown():
    # 1 hp = 550 ft·lbf/s = 550 × 0.3048 m × 4.4482216152605 N /s (NIST SP 811 exact factors)
    kw = 560 * 550 * 0.3048 * 4.4482216152605 / 1000
    r = run(SHEET, p_kw="560 hp")
    assert r["ok"]
    assert val(r, "p") == pytest.approx(kw, rel=1e-9)
    assert "hp" in res(r, "hp_p_kw")["display"]
    assert any("efficiency" in w for w in r["warnings"])


def test_typed_units_accepted():
    r = run(SHEET, p_kw="0.42 MW", v_ll="0.48 kV", ratings="5 kvar, 10, 0.0125 Mvar, 15, 20, 25, 30, 40, 50")
    base = run(SHEET)
    assert r["ok"]
    assert val(r, "q_need") == pytest.approx(val(base, "q_need"))
    assert val(r, "order") == pytest.approx(val(base, "order"))


def test_existing_correction_not_in_figures_is_subtracted():
    r = run(SHEET, existing_kvar="100", existing_in="no", p_kw="420", pf1="0.78")
    q_net = 420 * np.tan(np.arccos(0.78)) - 100
    assert val(r, "q") == pytest.approx(q_net, rel=1e-9)
    assert val(r, "q_need") == pytest.approx(q_net - 420 * np.tan(np.arccos(0.95)), rel=1e-9)


def test_benefits_against_numpy():
    r = run(SHEET)
    p = 420.0
    q1 = p * np.tan(np.arccos(0.78))
    q2 = q1 - val(r, "q_delivered")
    s1, s2 = np.hypot(p, q1), np.hypot(p, q2)
    assert val(r, "kva_released") == pytest.approx(s1 - s2, rel=1e-9)
    # I²R ∝ I² ∝ S² at constant voltage (circuit theory)
    assert val(r, "loss_cut") == pytest.approx(100 * (1 - (s2 / s1) ** 2), rel=1e-9)


# --------------------------------------------------------------------------- steps and light load


def _parse_pf(text):
    num, word = text.split()[0], text.split()[1] if len(text.split()) > 1 else ""
    return float(num), word


def test_step_table_power_factors_against_numpy():
    r = run(SHEET)
    table = r["tables"][0]
    cols = table["columns"]
    p, q1 = 420.0, 420 * np.tan(np.arccos(0.78))
    pl, ql = 90.0, 90 * np.tan(np.arccos(0.70))
    for row in table["rows"]:
        qc = float(row[1])
        pf, word = _parse_pf(row[cols.index("PF at full load")])
        assert pf == pytest.approx(p / np.hypot(p, q1 - qc), abs=6e-4)
        assert word == ("lagging" if q1 > qc else "leading")
        pfl, wl = _parse_pf(row[cols.index("PF at lightest load")])
        assert pfl == pytest.approx(pl / np.hypot(pl, ql - qc), abs=6e-4)
        assert wl == ("lagging" if ql > qc else "leading")
    assert any("reaches target" in row[-1] for row in table["rows"])


def test_over_correction_at_light_load_names_steps_to_leave_out():
    r = run(SHEET)
    ql = 90 * np.tan(np.arccos(0.70))
    assert res(r, "pf_light")["status"] == "warn"
    warn = next(w for w in r["warnings"] if w.startswith("Over-correction"))
    assert "off" in warn
    table = r["tables"][0]
    # every row that leads at light load has more kvar than the light load's Q (numpy)
    for row in table["rows"]:
        assert ("leads at light load" in row[-1]) == (float(row[1]) > ql)


def test_fixed_bank_over_correction_warning():
    r = run(SHEET, bank="fixed", light_p="60", light_pf="0.8")
    assert r["ok"]
    assert any("fixed bank" in w for w in r["warnings"])


def test_no_light_load_skips_check():
    r = run(SHEET, light_p="", light_pf="")
    assert r["ok"]
    assert not any(x["name"] == "pf_light" for x in r["results"])


def test_a_run_of_equal_steps_is_said_once():
    # a phone shows the key answer in a narrow box: '20, 5 steps of 40 kvar', not every step again
    shown = res(run(SHEET, pattern="custom", custom_steps="1:2:2:2:2:2"), "steps")["display"]
    steps = steps_shown(shown)
    assert len(steps) == 6 and shown.count("5 steps of ") == 1 and shown.count(",") == 1, shown


def test_custom_and_binary_patterns():
    r = run(SHEET, pattern="custom", custom_steps="25:50:50:100")
    assert r["ok"]
    steps = steps_shown(res(r, "steps")["display"])  # four steps in the pattern 1:2:2:4, step 1 first
    assert [s / steps[0] for s in steps] == pytest.approx([1, 2, 2, 4])
    r = run(SHEET, pattern="binary", n_steps="4")
    assert r["ok"] and len(r["tables"][0]["rows"]) == 15  # 2⁴ − 1 positions


# --------------------------------------------------------------------------- capacitor rating


def test_capacitor_rated_below_system_voltage_warns_not_refuses():
    r = run(SHEET, cap_v="440", v_ll="480")
    assert r["ok"]
    assert res(r, "cap_duty")["status"] == "warn"
    assert any("below" in w and "440" in w for w in r["warnings"])
    r = run(SHEET, cap_v="400", v_ll="480")  # 120 %: beyond IEEE Std 18's 110 % continuous limit
    assert r["ok"]
    assert res(r, "cap_duty")["status"] == "fail"
    assert any("IEEE Std 18" in w for w in r["warnings"])


def test_rated_frequency_differs_warns():
    r = run(SHEET, cap_f="50", f="60")
    assert r["ok"]
    assert any("50 Hz" in w for w in r["warnings"])


# --------------------------------------------------------------------------- bad input


BAD = [
    ({"pf1": "1.2"}, "pf1"),
    ({"pf1": "0"}, "pf1"),
    ({"pf1": "1"}, "pf1"),  # already unity
    ({"basis": "bill_demand", "peak_kw": "550", "peak_kva": "550"}, "peak_kva"),  # already unity
    ({"pf1": "-0.8"}, "pf1"),
    ({"pf1": "78"}, "pf1"),
    ({"pf1": ""}, "pf1"),
    ({"pf2": "0.7"}, "pf2"),  # target below the present 0.78
    ({"pf2": "0.78"}, "pf2"),  # target equal to present
    ({"pf2": "1.01"}, "pf2"),
    ({"p_kw": "-5"}, "p_kw"),
    ({"p_kw": "0"}, "p_kw"),
    ({"p_kw": ""}, "p_kw"),
    ({"p_kw": "abc"}, "p_kw"),
    ({"p_kw": "5 kvar"}, "p_kw"),
    ({"v_ll": "0"}, "v_ll"),
    ({"v_ll": "-480"}, "v_ll"),
    ({"v_ll": ""}, "v_ll"),
    ({"f": "0"}, "f"),
    ({"f": "-60"}, "f"),
    ({"f": "10"}, "f"),
    ({"f": "500"}, "f"),
    ({"f": ""}, "f"),
    ({"cap_v": "0"}, "cap_v"),
    ({"cap_f": "0"}, "cap_f"),
    ({"ratings": ""}, "ratings"),
    ({"ratings": "5, x, 10"}, "ratings"),
    ({"ratings": "5, -10"}, "ratings"),
    ({"ratings": "5, 0"}, "ratings"),
    ({"basis": "p_q", "q_kvar": "-50"}, "q_kvar"),
    ({"basis": "p_q", "q_kvar": "0"}, "q_kvar"),
    ({"basis": "s_pf", "s_kva": "0"}, "s_kva"),
    ({"basis": "vi_pf", "i_meas": "0"}, "i_meas"),
    ({"basis": "vi_pf", "v_meas": "-1"}, "v_meas"),
    ({"basis": "vi_p", "v_meas": "480", "i_meas": "100", "p_kw": "90"}, "p_kw"),  # P > √3·V·I = 83 kW
    ({"basis": "bill_energy", "bill_kwh": "0"}, "bill_kwh"),
    ({"basis": "bill_energy", "bill_kvarh": "-5"}, "bill_kvarh"),
    ({"basis": "bill_energy", "bill_kvarh": "0"}, "bill_kvarh"),
    ({"basis": "bill_energy", "bill_hours": "", "bill_kw": ""}, "bill_hours"),
    ({"basis": "bill_demand", "peak_kw": "600", "peak_kva": "550"}, "peak_kva"),
    ({"basis": "bill_demand", "peak_kva": ""}, "peak_kva"),
    ({"existing_kvar": "-10"}, "existing_kvar"),
    ({"existing_kvar": "400", "existing_in": "no"}, "existing_kvar"),  # load would lead
    ({"n_steps": "2.5"}, "n_steps"),
    ({"n_steps": "0"}, "n_steps"),
    ({"n_steps": "13"}, "n_steps"),
    ({"pattern": "custom", "custom_steps": "a:b"}, "custom_steps"),
    ({"pattern": "custom", "custom_steps": "1:-2"}, "custom_steps"),
    ({"pattern": "custom", "custom_steps": ""}, "custom_steps"),
    ({"light_p": "500"}, "light_p"),  # above the 420 kW full load
    ({"light_p": "-5"}, "light_p"),
    ({"light_pf": "1.5"}, "light_pf"),
    ({"light_pf": ""}, "light_pf"),
    ({"light_pf": "-0.7"}, "light_pf"),
    ({"tx_z": ""}, "tx_z"),
    ({"tx_kva": ""}, "tx_kva"),
    ({"tx_kva": "", "tx_z": "", "fault_mva": "250"}, "tx_kva"),
    ({"tx_z": "0"}, "tx_z"),
    ({"fault_mva": "-3"}, "fault_mva"),
]


@pytest.mark.parametrize("inputs,field", BAD)
def test_bad_input_message_at_its_field(inputs, field):
    r = run(SHEET, **inputs)
    assert r["ok"] is False
    assert field in r["field_errors"], r["field_errors"]
    assert len(r["field_errors"][field]) > 10
    assert "error" not in r  # no internal error, no crash
    assert r["results"] == [] and r["figures"] == []


def test_every_required_visible_field_left_empty():
    for fld in declaration()["fields"]:
        if fld["kind"] == "choice" or not fld["required"] or fld.get("show_when"):
            continue
        r = run(SHEET, **{fld["name"]: ""})
        assert r["ok"] is False and fld["name"] in r["field_errors"], fld["name"]


def test_hidden_fields_are_not_validated():
    # the bill fields are hidden under the default kW-and-PF basis: nonsense there is ignored
    r = run(SHEET, bill_kwh="nonsense", peak_kva="-1", custom_steps="??")
    assert r["ok"]


def test_several_bad_fields_reported_together():
    r = run(SHEET, v_ll="0", pf1="2", ratings="")
    assert {"v_ll", "pf1", "ratings"} <= set(r["field_errors"])


FIELD_NAMES = [x["name"] for x in json.loads(bridge.catalog()) if x["id"] == SHEET for x in x["fields"]]


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.dictionaries(st.sampled_from(FIELD_NAMES), st.one_of(
    st.text(max_size=12),
    st.sampled_from(["0", "-1", "1e308", "1e-300", "0,5", "nan", "inf", "1:0", "5 kvar", "3 hp", "", "12.5", "400"]),
    st.floats(allow_nan=True).map(str),
)))
def test_never_crashes(inputs):
    assert_answered(run(SHEET, inputs))


# --------------------------------------------------------------------------- figure and link


ALLOWED_CLASSES = {"fp-s1", "fp-s2", "fp-s3", "fp-s4", "fp-s5", "fp-s6", "fp-axis", "fp-text", "fp-grid", "fp-bg",
                   "fp-s1-fill", "fp-s2-fill", "fp-s3-fill", "fp-s4-fill"}


@pytest.mark.parametrize("inputs", [{}, {"bank": "fixed", "ratings": "50", "p_kw": "20", "pf1": "0.9", "light_p": ""}])
def test_power_triangle_svg(inputs):
    r = run(SHEET, **inputs)
    assert r["ok"], r["field_errors"]
    svg = r["figures"][0]["svg"]
    root = ET.fromstring(svg)  # well-formed
    assert "style=" not in svg and "<script" not in svg
    classes = {el.get("class") for el in root.iter() if el.get("class")}
    assert classes <= ALLOWED_CLASSES


def test_link_to_bus_scan_passes_what_is_known():
    r = run(SHEET, existing_kvar="50")
    link = next(x for x in r["links"] if x["worksheet"] == "bus_scan")
    assert {"v_ll", "f", "tx_kva", "tx_z", "steps"} <= set(link["inputs"])
    assert link["inputs"]["fault_mva"] == ""  # infinite utility here, so also there
    # the fields passed exist on the bus scan worksheet when it is present
    if "bus_scan" in bridge.sheets():
        names = {f.name for f in bridge.sheets()["bus_scan"].fields}
        assert set(link["inputs"]) <= names
        assert run("bus_scan", link["inputs"])["ok"]
    steps = [float(s) for s in link["inputs"]["steps"].split(",")]
    assert steps[0] == pytest.approx(50)
    assert sum(steps[1:]) == pytest.approx(val(r, "q_delivered"))
    r = run(SHEET, tx_kva="", tx_z="")
    link = next(x for x in r["links"] if x["worksheet"] == "bus_scan")
    assert "tx_kva" not in link["inputs"]


def test_cautions_present():
    c = " ".join(run(SHEET)["cautions"])
    assert "lethal charge" in c and "qualified persons" in c and "estimates" in c


# --------------------------------------------------------------------------- supply checks against ngspice


def _per_phase_deck(v_ll, f, tx_kva, z_pct, xr, p_kw, q_kvar, qc_kvar, fault_kva=None, source=True):
    """Per-phase (wye-equivalent) netlist: source, utility, transformer R+jX, load R ∥ L, capacitor."""
    w = 2 * np.pi * f
    z_ohm = z_pct / 100 * v_ll**2 / (tx_kva * 1e3)
    r_t = z_ohm / np.sqrt(1 + xr**2)
    x_t = r_t * xr
    lines = []
    top = "src"
    if source:
        lines.append(f"V1 src 0 dc 0 ac {float(v_ll / np.sqrt(3))!r}")
    else:
        top = "0"
    if fault_kva:
        lines.append(f"Lu {top} a {float(v_ll**2 / (fault_kva * 1e3) / w)!r}")
        top = "a"
    lines.append(f"Rt {top} m {float(r_t)!r}")
    lines.append(f"Lt m bus {float(x_t / w)!r}")
    lines.append(f"Rl bus 0 {float(v_ll**2 / (p_kw * 1e3))!r}")
    lines.append(f"Ll bus 0 {float(v_ll**2 / (w * q_kvar * 1e3))!r}")
    if qc_kvar:
        lines.append(f"Cc bus 0 {float(qc_kvar * 1e3 / (w * v_ll**2))!r}")
    return "\n".join(lines) + "\n"


VRISE_CASES = [
    # inputs to the worksheet, transformer X/R for the circuit
    (dict(), 6.0),
    (dict(), 3.0),
    (dict(fault_mva="50"), 8.0),
    (dict(tx_kva="500", tx_z="6", p_kw="380", pf1="0.72", bank="fixed", ratings="50"), 4.0),
    (dict(v_ll="400", cap_v="400", f="50", cap_f="50", tx_kva="1600", tx_z="6", p_kw="1200", pf1="0.75"), 10.0),
]


@needs_ngspice
@pytest.mark.parametrize("inputs,xr", VRISE_CASES)
def test_voltage_rise_against_ngspice(inputs, xr):
    r = run(SHEET, **inputs)
    assert r["ok"], r["field_errors"]
    v, f = float(inputs.get("v_ll", 480)), float(inputs.get("f", 60))
    p = float(inputs.get("p_kw", 420))
    q = p * np.tan(np.arccos(float(inputs.get("pf1", 0.78))))
    tx, z = float(inputs.get("tx_kva", 1000)), float(inputs.get("tx_z", 5.75))
    fault = float(inputs["fault_mva"]) * 1000 if "fault_mva" in inputs else None
    qc = val(r, "q_delivered")
    v0 = abs(ac_node_voltages(_per_phase_deck(v, f, tx, z, xr, p, q, 0, fault), [f], ["bus"])["bus"][0])
    v1 = abs(ac_node_voltages(_per_phase_deck(v, f, tx, z, xr, p, q, qc, fault), [f], ["bus"])["bus"][0])
    exact = 100 * (v1 / v0 - 1)
    approx = val(r, "v_rise")
    # The stated error of ΔV ≈ 100·Q_C/S_sc: it neglects the transformer's resistance and the load's
    # voltage drop, and overstates the rise by at most about 10 % of the rise for X/R ≥ 3 with the
    # transformer loaded up to its rating.
    assert exact > 0
    assert 0 <= (approx - exact) / exact <= 0.10, (approx, exact)


def _peak_order(body, f):
    """Harmonic order of the |Z| peak at the bus: a coarse sweep, then three finer ones around
    the highest point (ngspice)."""
    hs = np.linspace(1.5, 40, 40)
    for _ in range(4):
        z = np.abs(impedance_at(body, [float(h * f) for h in hs], node="bus"))
        k = int(np.argmax(z))
        best = hs[k]
        lo, hi = hs[max(k - 1, 0)], hs[min(k + 1, len(hs) - 1)]
        hs = np.linspace(lo, hi, 21)
    return float(best)


RES_CASES = [
    dict(),
    dict(tx_kva="300", tx_z="6", bank="fixed", ratings="50"),  # h = √(5000/200) = 5
    dict(fault_mva="40", p_kw="600", pf1="0.7"),
    dict(v_ll="400", cap_v="400", f="50", cap_f="50", tx_kva="1600", tx_z="6", p_kw="1200", pf1="0.75", existing_kvar="100"),
]


def _case(inputs):
    v, f = float(inputs.get("v_ll", 480)), float(inputs.get("f", 60))
    p = float(inputs.get("p_kw", 420))
    q = p * np.tan(np.arccos(float(inputs.get("pf1", 0.78))))
    tx, z = float(inputs.get("tx_kva", 1000)), float(inputs.get("tx_z", 5.75))
    fault = float(inputs["fault_mva"]) * 1000 if "fault_mva" in inputs else None
    s_sc = 1 / (z / 100 / tx + (1 / fault if fault else 0))  # per-unit method, computed here
    return v, f, p, q, tx, z, fault, s_sc


def _check_order(h_formula, h_spice, q_load, s_sc):
    # h ≈ √(S_sc/Q_C) neglects the load's own inductance, which sits in parallel with the source
    # and raises the true peak by √(1 + Q_load/S_sc), and the damping of the load resistance and
    # the transformer's X/R = 8 (allowed 1 %).
    lift = np.sqrt(1 + q_load / s_sc)
    assert h_spice / lift * 0.99 <= h_formula <= h_spice * 1.01, (h_formula, h_spice, lift)


@needs_ngspice
@pytest.mark.parametrize("inputs", RES_CASES)
def test_resonance_order_against_ngspice_sweep(inputs):
    r = run(SHEET, **inputs)
    assert r["ok"], r["field_errors"]
    v, f, p, q, tx, z, fault, s_sc = _case(inputs)
    qc = val(r, "q_delivered") + float(inputs.get("existing_kvar", 0))
    # source shorted (the impedance seen from the bus), transformer X/R = 8
    body = _per_phase_deck(v, f, tx, z, 8.0, p, q, qc, fault, source=False)
    _check_order(val(r, "h_res"), _peak_order(body, f), q, s_sc)


@needs_ngspice
def test_resonance_order_without_load_inductance_is_close():
    # The formula's own model (source inductance, capacitor, resistive load only): within 1 %
    r = run(SHEET, tx_kva="300", tx_z="6", bank="fixed", ratings="50", p_kw="380", pf1="0.72")
    body = _per_phase_deck(480, 60, 300, 6, 8.0, 380, 1e-6, val(r, "q_delivered"), source=False)
    assert val(r, "h_res") == pytest.approx(_peak_order(body, 60), rel=0.01)


@needs_ngspice
def test_resonance_order_per_step_combination_against_ngspice():
    r = run(SHEET)
    table = r["tables"][0]
    col = next(i for i, c in enumerate(table["columns"]) if c.startswith("Resonance order"))
    v, f, p, q, tx, z, fault, s_sc = _case({})
    for row in (table["rows"][0], table["rows"][5], table["rows"][-1]):
        qc = float(row[1])
        body = _per_phase_deck(v, f, tx, z, 8.0, p, q, qc, source=False)
        _check_order(float(row[col]), _peak_order(body, f), q, s_sc)


def test_near_fifth_harmonic_warns_and_links():
    # S_sc = 300 kVA / 0.06 = 5000 kVA; 200 kvar → h = √25 = 5 (IEEE Std 1036 formula, arithmetic)
    r = run(SHEET, tx_kva="300", tx_z="6", bank="fixed", ratings="50")
    assert res(r, "h_res")["status"] == "warn"
    assert any("reaches the 5th harmonic" in w and "To do" in w for w in r["warnings"])
    assert any(x["worksheet"] == "bus_scan" for x in r["links"])


def test_third_harmonic_only_for_single_phase():
    # 240 V single-phase, 20 kW at 0.70 → 13.8 kvar needed; three 5 kvar units = 15 kvar;
    # S_sc = 10 kVA / 0.074 = 135 kVA → h = √(135/15) = 3.0
    common = dict(v_ll="240", cap_v="240", bank="fixed", ratings="5", p_kw="20", pf1="0.70", light_p="",
                  tx_kva="10", tx_z="7.4")
    one = run(SHEET, phases="1", **common)
    three = run(SHEET, phases="3", **common)
    assert one["ok"] and three["ok"]
    assert val(one, "h_res") == pytest.approx(3.0, abs=0.01)
    assert any("reaches the 3rd harmonic" in w for w in one["warnings"])
    assert not any("3rd harmonic" in w and "reaches" in w for w in three["warnings"])


def test_many_units_in_one_step_is_warned_and_a_fine_grid_beside_a_large_unit_is_not_oversized():
    # The default load needs 198.9 kvar (see the tests above). Units of 1.001 and 50 kvar: the
    # least-excess plan builds each step from many 1.001 kvar units, which a bank builder would not
    # do (common practice: a step is one to a few units), so the sheet says so.
    r = run(SHEET, ratings="1.001, 50")
    assert r["ok"]
    assert any("units in parallel" in w for w in r["warnings"])
    # With the usual stock no step needs more than a few units, and there is no such warning.
    r = run(SHEET)
    assert r["ok"] and not any("units in parallel" in w for w in r["warnings"])
    # 12.345 kvar beside 400 kvar units: the order stays near the need, with 12.345 kvar units only
    # (least sum found exactly; a 400 kvar unit was once chosen here).
    r = run(SHEET, ratings="12.345, 400", bank="fixed")
    need = val(r, "q_need_rated")
    assert need <= val(r, "q_delivered") < need + 12.345
    assert "400 kvar" not in res(r, "order")["display"]
