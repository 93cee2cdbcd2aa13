"""Bad input, everywhere: a table of typed mistakes across every worksheet.

Each case names the worksheet, the field, the text a person might type (with any other fields
needed to make that field visible or to set up a cross-field check) and, where it matters, a
word the message must contain. Run as the browser receives it (``helpers.run``), every case must give
``ok: false`` with one message, at that field and nowhere else, no general error, and a
message written for a person: it starts with a capital letter or a quote and carries no
Python internals.

Where a mistake is a wrong SI prefix ('MF' for 'mF', 'Gvar' for 'kvar', 'mV' for 'V') the
magnitude it gives is absurd for the trade (common practice: LV/MV plant systems run from a
few hundred volts to tens of kilovolts at 50/60 Hz; power factor lies in (0, 1], IEEE Std 141
power-factor chapter), and a field limit refuses it. Decimal commas are a mark people use, not
a mistake: those cases must be accepted and give exactly what the dotted number gives.
"""

from __future__ import annotations

import copy
import json
import re

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app import bridge
from helpers import assert_answered, run, table


# A survey row: name, P (kW), PF, Q (kvar), quantity, hours per day.
def load_row(p="75", pf="0.85", q="", qty="1", hours="8", name="Pump"):
    return table([name, p, pf, q, qty, hours])


VI_PF = {"basis": "vi_pf"}
VI_P = {"basis": "vi_p", "v_meas": "480", "i_meas": "100"}
BILL_E = {"basis": "bill_energy"}
BILL_D = {"basis": "bill_demand"}
P_Q = {"basis": "p_q"}
CUSTOM = {"pattern": "custom"}
FT = {"spec": "ft"}
Z = {"mode": "z"}
Y = {"mode": "y"}
SOLVE_C = {"solve": "c"}
PARALLEL = {"topology": "parallel"}
BAND = {"band": "custom"}
CURRENT = {"mode": "current"}
RATED = {"basis": "rated"}
PENALTY = {"tariff": "penalty"}
KVARH = {"tariff": "kvarh"}
LOSSES = {"add_losses": "yes"}
HS_CURRENT = {"source": "current"}
HS_VOLTAGE = {"source": "voltage"}

# (worksheet, field, typed text, other inputs, a word the message must contain or "")
BAD = [
    # ------------------------------------------------------------------ survey
    ("survey", "target_pf", "", {}, "enter"),
    ("survey", "target_pf", "   ", {}, "enter"),
    ("survey", "target_pf", "zero point nine", {}, "number"),
    ("survey", "target_pf", "0.9.5", {}, "decimal mark"),
    ("survey", "target_pf", "1.05", {}, "at most 1"),  # PF above 1
    ("survey", "target_pf", "0", {}, "above 0"),
    ("survey", "target_pf", "-0.95", {}, "above 0"),
    ("survey", "target_pf", "NaN", {}, "finite"),
    ("survey", "target_pf", "=0.95", {}, "number"),
    ("survey", "loads", load_row(p="75 kvra"), {}, "unknown unit"),
    ("survey", "loads", load_row(pf="1.3"), {}, "impossible"),
    ("survey", "loads", load_row(pf="-0.85"), {}, "not negative"),
    ("survey", "loads", load_row(p="-75"), {}, "row 1"),
    ("survey", "loads", load_row(p="=1+2"), {}, "number"),
    ("survey", "loads", load_row(pf="<b>0.85</b>"), {}, "number"),
    ("survey", "loads", load_row(p="1e300"), {}, "out of range"),
    ("survey", "loads", load_row(p="Infinity"), {}, "finite"),
    ("survey", "loads", load_row(hours="30"), {}, "24"),
    ("survey", "loads", "not a table", {}, "could not be read"),
    ("survey", "loads", "[]", {}, "at least one"),
    # ------------------------------------------------------------------ correction
    ("correction", "v_ll", "", {}, "enter"),
    ("correction", "v_ll", "four eighty", {}, "number"),
    ("correction", "v_ll", "480 mV", {}, "at least 50"),  # milli for kilo: 0.48 V
    ("correction", "v_ll", "480 MV", {}, "at most"),  # mega: 480 000 kV
    ("correction", "v_ll", "480 Hz", {}, "voltage"),
    ("correction", "v_ll", "4,8.0", {}, "decimal mark"),
    ("correction", "v_ll", "-480", {}, "at least"),
    ("correction", "f", "0", {}, "at least"),
    ("correction", "f", "1e6", {}, "at most"),
    ("correction", "f", "60 kHz", {}, "at most"),
    ("correction", "f", "-60", {}, "at least"),
    ("correction", "pf1", "1.2", {}, "at most 1"),
    ("correction", "pf1", "0", {}, "above 0"),
    ("correction", "pf1", "-0.78", {}, ""),
    ("correction", "pf1", "78", {}, "at most 1"),  # per cent typed without the sign
    ("correction", "pf1", "<b>0.78</b>", {}, "number"),
    ("correction", "p_kw", "420 kvar", {}, "active power"),
    ("correction", "p_kw", "420 GW", {}, "at most"),
    ("correction", "p_kw", "1e999", {}, "too large"),
    ("correction", "p_kw", "inf", {}, "finite"),
    ("correction", "p_kw", "5e-324", {}, "out of range"),
    ("correction", "pf2", "1.01", {}, "at most 1"),
    ("correction", "pf2", "0.95 lead", {}, "lagging"),  # "95%" is read now (the shared PF reader)
    ("correction", "tx_kva", "", {"metering": "primary", "tx_z": ""}, "primary"),
    ("correction", "tx_i0", "25", {"metering": "primary"}, "at most 20"),
    ("correction", "ratings", "5, 10, abc", {}, "item 3"),
    ("correction", "ratings", "5 kvra, 10", {}, "unknown unit"),
    ("correction", "ratings", "10 Gvar", {}, "at most"),
    ("correction", "ratings", "", {}, "at least one"),
    ("correction", "ratings", "-5, 10", {}, "item 1"),
    ("correction", "ratings", "0.001, 1000000", {}, "common step"),  # once a table of 10⁹ states
    ("correction", "existing_kvar", "-10", {}, "at least 0"),
    ("correction", "existing_kvar", "50 Gvar", {}, "at most"),
    ("correction", "cap_v", "480 mV", {}, "at least 50"),
    ("correction", "tx_z", "57.5", {}, "at most 40"),
    ("correction", "fault_mva", "250 MW", {}, "apparent power"),
    ("correction", "n_steps", "6.5", {}, "whole number"),
    ("correction", "n_steps", "13", {}, "at most 12"),
    ("correction", "custom_steps", "1:two:2", CUSTOM, "item 2"),
    ("correction", "v_meas", "472 mV", VI_PF, "at least 50"),
    ("correction", "i_meas", "-600", VI_PF, "above 0"),
    ("correction", "p_kw", "90", VI_P, "exceed"),  # P above √3·V·I = 83 kW: readings that cannot fit
    ("correction", "bill_kwh", "0", BILL_E, "above 0"),
    ("correction", "bill_kvarh", "-1", BILL_E, "at least 0"),
    ("correction", "peak_kva", "400", BILL_D, "less than"),  # peak kVA below peak kW (430)
    ("correction", "q_kvar", "50 Gvar", P_Q, "at most"),
    ("correction", "light_pf", "1.5", {}, "at most 1"),
    # ------------------------------------------------------------------ bank resonance scan
    ("bus_scan", "v_ll", "x", {}, "number"),
    ("bus_scan", "v_ll", "400 MV", {}, "at most"),
    ("bus_scan", "f", "0", {}, "at least"),
    ("bus_scan", "f", "1e6", {}, "at most"),
    ("bus_scan", "tx_kva", "1250 kW", {}, "apparent power"),
    ("bus_scan", "tx_kva", "nan", {}, "finite"),
    ("bus_scan", "tx_z", "0.3", {}, "at least 0.5"),
    ("bus_scan", "x_r", "-5", {}, "above 0"),
    ("bus_scan", "load_kw", "150 GW", {}, "at most"),
    ("bus_scan", "steps", "", {}, "at least one"),
    ("bus_scan", "steps", "50, 50, x", {}, "item 3"),
    ("bus_scan", "steps", "50 Gvar", {}, "at most"),
    ("bus_scan", "steps", "50 Mvar", {}, "short-circuit"),  # as large as the bus fault level
    ("bus_scan", "band", "40", {}, "at most 30"),
    # ------------------------------------------------------------------ detuned bank
    ("detuned", "u", "400 mV", {}, "at least 50"),
    ("detuned", "u", "400 kV", {}, "at most"),  # kilo for nothing
    ("detuned", "f", "0", {}, "at least"),
    ("detuned", "q", "200 Gvar", {}, "at most"),
    ("detuned", "q", "\u2212200", {}, "above 0"),  # a typographic minus
    ("detuned", "steps", "4.5", {}, "whole number"),
    ("detuned", "steps", "0", {}, "at least 1"),
    ("detuned", "p", "100", {}, "below 100"),
    ("detuned", "p", "0", {}, "above 0"),
    ("detuned", "p", "7 %%", {}, "unknown unit"),
    ("detuned", "ft", "189 kHz", FT, "at most"),
    ("detuned", "ft", "40", FT, "above the system frequency"),
    ("detuned", "h_low", "1", {}, "at least 2"),
    ("detuned", "margin", "60", {}, "at most 50"),
    # ------------------------------------------------------------------ capacitor duty
    ("cap_duty", "u_rated", "440 MV", {}, "at most"),
    ("cap_duty", "u_rated", "", {}, "enter"),
    ("cap_duty", "u_bus", "40 kV", {}, "times the capacitor"),  # kilo for nothing: 91 × rating
    ("cap_duty", "q_rated", "50 Gvar", {}, "at most"),
    ("cap_duty", "f_rated", "5", {}, "at least 16.7"),
    ("cap_duty", "f_sys", "1e6", {}, "at most"),
    ("cap_duty", "p", "100", {}, "below 100"),
    ("cap_duty", "spectrum", table(["5", "4.5"], ["7", "abc"]), {}, "row 2"),
    ("cap_duty", "spectrum", table(["1", "4.5"]), {}, "fundamental"),
    ("cap_duty", "spectrum", table(["5", "150"]), {}, "100"),
    ("cap_duty", "spectrum", table(["5.5", "3"]), {}, "whole number"),
    ("cap_duty", "spectrum", table(["5", "-3"]), {}, "negative"),
    ("cap_duty", "spectrum", table(["60", "3"]), {}, "50"),
    # ------------------------------------------------------------------ impedance
    ("impedance", "z", "", Z, "enter"),
    ("impedance", "z", "12.5 - j4.7 - j3", Z, "a + jb"),
    ("impedance", "z", "0", Z, "short circuit"),
    ("impedance", "z", "1e300", Z, "out of range"),
    ("impedance", "z", "nan", Z, "finite"),
    ("impedance", "z", "<b>5</b>", Z, ""),
    ("impedance", "z", "=1+2", Z, "number"),
    ("impedance", "z", "13∠", Z, "angle"),
    ("impedance", "z", "-13∠20", Z, "negative"),
    ("impedance", "y", "0", Y, "open circuit"),
    ("impedance", "y", "20 mΩ", Y, ""),
    ("impedance", "elements", table(["R", "3.2 Ω"], ["L", "21 mF"]), {}, "inductance"),
    ("impedance", "elements", table(["R", "-3"]), {}, "above zero"),
    ("impedance", "elements", table(["C", "680 MF"]), {}, "out of range"),  # mega for milli
    ("impedance", "elements", table(["R", "1e300"]), {}, "out of range"),
    ("impedance", "f", "2 GHz", {}, "at most"),
    ("impedance", "f", "0", {}, "above 0"),
    # ------------------------------------------------------------------ LC resonance
    ("lc_resonance", "l", "", {}, "enter"),
    ("lc_resonance", "l", "1.2 MH", {}, "at most"),  # mega for milli
    ("lc_resonance", "l", "1,2,3", {}, "decimal mark"),
    ("lc_resonance", "c", "220 MF", {}, "at most"),
    ("lc_resonance", "c", "4.7 mH", {}, "capacitance"),
    ("lc_resonance", "f0", "2 GHz", SOLVE_C, "at most"),
    ("lc_resonance", "r", "-0.1", {}, "at least 0"),
    ("lc_resonance", "r", "0", PARALLEL, "short"),
    ("lc_resonance", "f_at", "-50", {}, "above 0"),
    # ------------------------------------------------------------------ bank health
    ("bank_health", "q_rated", "50 Gvar", {}, "at most"),
    ("bank_health", "v_rated", "0.5", {}, "at least 50"),
    ("bank_health", "f_rated", "0", {}, "at least 16.7"),
    ("bank_health", "m12", "482.7 MF", {}, "at most"),
    ("bank_health", "m12", "482.7 mF", {}, "check the unit"),  # milli for micro: 1000 × expected
    ("bank_health", "m12", "482.7 nF", {}, "cannot come from"),
    ("bank_health", "m23", "abc", {}, "number"),
    ("bank_health", "i1", "-68", CURRENT, "above 0"),
    ("bank_health", "band_lo", "-100", BAND, "at least"),
    ("bank_health", "band_hi", "-10", BAND, "above the lowest"),
    # ------------------------------------------------------------------ motor-terminal capacitor
    ("motor_cap", "v", "400 kV", {}, "at most"),
    ("motor_cap", "f", "1e6", {}, "at most"),
    ("motor_cap", "i_full", "<script>", {}, "number"),
    ("motor_cap", "pf_full", "0", {}, "above 0"),
    ("motor_cap", "pf_full", "1.1", {}, "at most 1"),
    ("motor_cap", "i0", "80", {}, "below the full-load current"),
    ("motor_cap", "lr_ratio", "1", RATED, "above 1"),
    ("motor_cap", "q_cap", "150 Mvar", {}, "at most"),
    # ------------------------------------------------------------------ savings
    ("savings", "pf1", "1.5", {}, "at most 1"),
    ("savings", "pf1", "0", {}, "above 0"),
    ("savings", "pf2", "-0.95", {}, "above 0"),
    ("savings", "pf2", "0.7", {}, "above the present"),
    ("savings", "p_kw", "420 kvar", {}, "active power"),
    ("savings", "p_kw", "420 GW", {}, "at most"),
    ("savings", "kva_price", "1e300", {}, "out of range"),
    ("savings", "threshold", "1.2", PENALTY, "at most 1"),
    ("savings", "penalty_pct", "150", PENALTY, "at most 100"),
    ("savings", "kwh_month", "0", KVARH, "above 0"),
    ("savings", "hours_month", "800", LOSSES, "at most 744"),
    ("savings", "cost", "-1", {}, "above 0"),
    ("savings", "cost", "=SUM(A1:A9)", {}, "number"),
    # ------------------------------------------------------------------ harmonic study
    ("harmonic_study", "v_ll", "480 kV", {}, "at most"),
    ("harmonic_study", "tx_kva", "0", {}, "above 0"),
    ("harmonic_study", "tx_z", "0.1", {}, "at least 0.5"),
    ("harmonic_study", "steps", table(["100", "detuned", "", ""]), {}, "detuning factor"),
    ("harmonic_study", "steps", table(["100", "detuned", "4", ""]), {}, "onto the 5th"),  # 1/√0.04 = 5
    ("harmonic_study", "steps", table(["100", "plain", "", ""], ["x", "plain", "", ""]), {}, "row 2"),
    ("harmonic_study", "steps", table(["40 Mvar", "plain", "", ""]), {}, "short-circuit"),
    ("harmonic_study", "steps", "[]", {}, "enter"),
    ("harmonic_study", "typical", "[]", {}, "enter"),  # no source data
    ("harmonic_study", "typical", table(["six_pulse_ideal", "-5"]), {}, "row 1"),
    ("harmonic_study", "i_spec", table(["5.5", "3"]), HS_CURRENT, "whole number"),
    ("harmonic_study", "i_spec", table(["1", "30"]), HS_CURRENT, "2 to 50"),
    ("harmonic_study", "i_spec", table(["5", "130"]), HS_CURRENT, "100"),
    ("harmonic_study", "i_spec", table(["5", "0"]), HS_CURRENT, "above zero"),  # no source data
    ("harmonic_study", "i1", "0", HS_CURRENT, "above 0"),
    ("harmonic_study", "v_spec", table(["5", "101"]), HS_VOLTAGE, "100"),
    ("harmonic_study", "v_spec", table(["60", "1"]), HS_VOLTAGE, "2 to 50"),
    ("harmonic_study", "v_spec", table(["5", "2"], ["5", "1"]), HS_VOLTAGE, "twice"),
    ("harmonic_study", "v_spec", "[]", HS_VOLTAGE, "enter"),  # no source data
    ("harmonic_study", "cap_hi", "50", {}, "at most 30"),
    ("harmonic_study", "band", "-1", {}, "at least 0"),
    ("harmonic_study", "i_load", "-5", {}, "above 0"),
    ("harmonic_study", "i_load", "", {"load_kw": "0", "motor_kva": "0", "source": "current", "i_unit": "amps"},
     "maximum demand"),
    # ------------------------------------------------------------------ load_profile
    ("load_profile", "profile", "", {}, "empty"),
    ("load_profile", "profile", "PK\x03\x04\x00\x00", {}, "not text"),
    ("load_profile", "profile", "Time,kW,kvar\n2025-01-01 00:15,5,5\n", {}, "one row"),
    ("load_profile", "profile", "Time,kW,kvar\n2025-01-01 00:15,5,5\n2025-01-01 00:22,5,5\n", {}, "7 min"),
    ("load_profile", "profile", "Time,kW,kvar\nx,y,z\n", {}, "no row"),
    ("load_profile", "profile", "Time,kW,kvar\n2025-01-01 00:15,-5,5\n2025-01-01 00:30,-5,5\n", {}, "imports"),
    ("load_profile", "roles", "time, kW, kvar, volts", {}, "column 4"),
    ("load_profile", "target_pf", "0.95 lead", {}, "lagging"),
    ("load_profile", "target_pf", "1.2", {}, "impossible"),
    ("load_profile", "target_pf", "", {}, "enter"),
    ("load_profile", "share", "30", {}, "at least 50"),
    ("load_profile", "steps", "25, -5", {}, "item 2"),
    ("load_profile", "fixed_kvar", "0", {"bank": "fixed"}, "above 0"),
    # ------------------------------------------------------------------ switching, order list, verdicts, bank losses
    ("correction", "run_m", "-2", {}, "at least"),
    ("correction", "run_m", "2 km", {}, "in m"),
    ("correction", "contactor_peak", "0", {}, "above 0"),
    ("correction", "ct_primary", "1000/5", {}, ""),
    ("correction", "fast_s", "0", {}, "above 0"),
    ("bank_health", "meter_acc", "25", {}, "at most"),
    ("bank_health", "maker_limit", "5", {}, ""),
    ("savings", "cap_w", "-0.5", {}, "at least"),
    ("savings", "bank_detuned", "300", {"bank_kvar": "200"}, "cannot exceed"),
    # ------------------------------------------------------------------ harmonic study, bus scan tolerances
    ("harmonic_study", "sizing", "not json", {}, "not a set of correction inputs"),
    ("harmonic_study", "sizing", "[1, 2]", {}, "clear it"),
    ("harmonic_study", "tx_xr", "",  # undamped, 4 × 100 kvar on 1000 kVA at 40 %: 2500/100 puts one step on the 5th
     {"tx_kva": "1000", "tx_z": "40", "load_kw": "", "motor_kva": "",
      "steps": table(*[["100", "plain", "", ""]] * 4)}, "nothing to damp"),
    ("bus_scan", "cap_lo", "-30", {}, "at least"),
    ("bus_scan", "z_tol", "26", {}, "at most 25"),
]

# Words a message for a person never contains (Python internals leaking through).
INTERNALS = re.compile(
    r"Traceback|NoneType|KeyError|ValueError|TypeError|IndexError|AttributeError|ZeroDivision|Overflow|"
    r"Exception|Internal error|<class|object at 0x|\bnan\b|\binf\b|\bNone\b|\bself\b",
    re.IGNORECASE,
)


def assert_for_a_person(message: str) -> None:
    assert isinstance(message, str) and message.strip(), "empty message"
    assert message[0].isupper() or message[0] in "'\"‘“", f"not a sentence: {message!r}"
    said = re.sub(r"'[^']*'", "''", message)  # what the person typed may be quoted back as it was
    assert not INTERNALS.search(said), f"internals in the message: {message!r}"


def _id(case):
    sheet, field, text, ctx, _ = case
    return f"{sheet}.{field}={text[:24]!r}" + ("+" + ",".join(f"{k}={v}" for k, v in ctx.items()) if ctx else "")


def test_table_is_large_and_covers_every_worksheet():
    assert len(BAD) >= 80
    assert {c[0] for c in BAD} == set(bridge.sheets())
    # every worksheet gets several kinds of mistake
    for sheet in bridge.sheets():
        assert sum(1 for c in BAD if c[0] == sheet) >= 6, sheet


def test_table_names_real_fields():
    for sheet, field, _, ctx, _ in BAD:
        s = bridge.sheets()[sheet]
        s.field(field)
        for name in ctx:
            s.field(name)


@pytest.mark.parametrize("case", BAD, ids=[_id(c) for c in BAD])
def test_bad_input_gets_a_message_at_its_field(case):
    sheet, field, text, ctx, words = case
    inputs = {**ctx, field: text}
    out = run(sheet, inputs)
    assert out["ok"] is False, out
    assert "error" not in out, out.get("error")
    assert set(out["field_errors"]) == {field}, out["field_errors"]
    msg = out["field_errors"][field]
    assert_for_a_person(msg)
    if words:
        assert words.lower() in msg.lower(), msg
    # nothing half-computed is shown beside the message
    assert out["results"] == [] and out["tables"] == [] and out["figures"] == []


# Decimal commas are accepted and read exactly as the dotted number.
COMMAS = [
    ("survey", "target_pf", "0,95", "0.95", {}),
    ("survey", "loads", load_row(p="7,5 kW", pf="0,85"), load_row(p="7.5 kW", pf="0.85"), {}),
    ("correction", "p_kw", "420,5", "420.5", {}),
    ("correction", "f", "59,5", "59.5", {}),
    ("correction", "ratings", "5; 12,5; 25", "5; 12.5; 25", {}),
    ("correction", "v_ll", "0,48 kV", "480", {}),
    ("bus_scan", "tx_z", "5,5", "5.5", {}),
    ("detuned", "p", "5,67", "5.67", {}),
    ("cap_duty", "u_bus", "415,5", "415.5", {}),
    ("harmonic_study", "tx_z", "5,75", "5.75", {}),
    ("impedance", "z", "12,5 - j4,7", "12.5 - j4.7", Z),
    ("lc_resonance", "l", "1,2", "1.2", {}),
    ("bank_health", "m12", "482,7", "482.7", {}),
    ("motor_cap", "pf_full", "0,86", "0.86", {}),
    ("savings", "pf1", "0,78", "0.78", {}),
    ("load_profile", "target_pf", "0,95", "0.95", {}),
]


@pytest.mark.parametrize("sheet,field,comma,dot,ctx", COMMAS, ids=[f"{c[0]}.{c[1]}" for c in COMMAS])
def test_decimal_comma_is_accepted_as_the_same_number(sheet, field, comma, dot, ctx):
    a = run(sheet, {**ctx, field: comma})
    b = run(sheet, {**ctx, field: dot})
    assert a["ok"] is True, a["field_errors"]
    assert b["ok"] is True, b["field_errors"]
    assert a["field_errors"] == {}
    assert a["results"] == b["results"]
    assert a["warnings"] == b["warnings"]
    assert [r["value"] for r in a["results"]] == [r["value"] for r in b["results"]]


# --------------------------------------------------------------------------- nothing typed is lost


@pytest.mark.parametrize("sheet", sorted({c[0] for c in BAD}))
def test_compute_does_not_change_the_inputs_it_is_given(sheet):
    cases = [c for c in BAD if c[0] == sheet]
    s = bridge.sheets()[sheet]
    for _, field, text, ctx, _ in cases:
        # the whole form as the person left it: every default, the context, and the mistake
        typed = {f.name: f.default for f in s.fields}
        typed.update(ctx)
        typed[field] = text
        kept = copy.deepcopy(typed)
        out = json.loads(bridge.compute(sheet, typed))  # the bridge also takes a dict
        assert typed == kept
        assert out["ok"] is False
        out2 = s.run(typed)
        assert typed == kept
        assert out2["field_errors"] == out["field_errors"]


def test_the_app_stays_usable_after_bad_input():
    before = bridge.catalog()
    for sheet, field, text, ctx, _ in BAD:
        run(sheet, {**ctx, field: text})
    # the declarations (defaults included) are untouched, and every worksheet still computes
    assert bridge.catalog() == before
    for sheet in bridge.sheets():
        out = run(sheet, {})
        assert out["ok"] is True, (sheet, out["field_errors"], out.get("error"))


def test_the_same_bad_input_gives_the_same_answer_twice():
    for sheet, field, text, ctx, _ in BAD[::7]:
        a = bridge.compute(sheet, json.dumps({**ctx, field: text}))
        b = bridge.compute(sheet, json.dumps({**ctx, field: text}))
        assert a == b


@pytest.mark.parametrize("text", ["", "   ", "null", "[1, 2]", '"text"', "{not json", "42"])
def test_unreadable_inputs_object_gives_a_general_message(text):
    # not a field's fault: the whole inputs object cannot be read (the shell never sends these)
    out = json.loads(bridge.compute("correction", text))
    assert out["ok"] is False and out["field_errors"] == {}
    assert_for_a_person(out["error"])


# --------------------------------------------------------------------------- any mix of mistakes

POOL = ["", " ", "0", "-1", "1e-18", "1e18", "1e-300", "1e300", "5e-324", "nan", "-inf", "0,5", "1.2.3", "abc",
        "<b>5</b>", "=1+2", "5 MF", "5 mvar", "5 Mvar", "5 Gvar", "0.5 kV", "1e6", "60 Hz", "95%", "1:0"]


def _mixes(sheet):
    names = [f.name for f in bridge.sheets()[sheet].fields]
    return st.dictionaries(st.sampled_from(names), st.sampled_from(POOL) | st.text(max_size=8), max_size=6)


@pytest.mark.parametrize("sheet", sorted(bridge.sheets()))
def test_any_mix_of_mistakes_gives_messages_never_a_crash(sheet):
    @settings(max_examples=40, deadline=None, database=None, suppress_health_check=[HealthCheck.too_slow])
    @given(_mixes(sheet))
    def check(inputs):
        out = run(sheet, inputs)
        assert_answered(out)
        for m in list(out["field_errors"].values()) + ([out["error"]] if "error" in out else []):
            assert_for_a_person(m)

    check()
