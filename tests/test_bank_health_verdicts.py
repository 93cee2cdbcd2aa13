"""Bank health worksheet: the three verdicts (factory tolerance, drifted, replace) with the meter's
accuracy, the IEC 60831-1 ratio on between-terminal capacitances, and the floating wye's star point.

Independent checks: between-terminal capacitance by series/parallel combination and the star
point by nodal analysis, both written out here with numpy (circuit theory); two worked cases
(a phase at −0.47 % on the IEEE 18 band; elements 330 / 332 / 290 µF, between-terminal ratio 1.068).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from helpers import res, run

SHEET = "bank_health"
W50 = 2 * math.pi * 50
C_EXP = 50e3 / (3 * W50 * 400**2)  # delta, 50 kvar, 400 V, 50 Hz: C = Q/(3ωV²) = 331.57 µF


def phases(c_uf, **more):
    return run(SHEET, mode="phase", c1=c_uf[0], c2=c_uf[1], c3=c_uf[2], **more)


def test_phase_inside_the_meter_accuracy_is_not_condemned():
    # IEEE 18 band 0 to +10 %: a phase at −0.47 % with a ±2 % meter (common practice) is within tolerance
    c = C_EXP * 1e6
    r = phases([c * (1 - 0.0047), c, c], band="ieee18")
    assert r["ok"], r
    v = res(r, "verdict_1")
    assert v["status"] == "ok" and v["display"].startswith("Within the factory tolerance")
    assert "IEEE Std 18" in v["method"] and "±2 %" in v["method"]
    assert res(r, "bank_state")["status"] == "ok"


@pytest.mark.parametrize("frac,more,state", [
    (0.99, {}, "ok"),                            # inside −5 %..+10 % (IEC 60831-1)
    (0.93, {}, "warn"),                          # −7 % ± 1.86: surely outside −5 %, not past −10 %: drifted
    (0.85, {}, "fail"),                          # −15 % ± 1.7: surely past −10 % (common practice): replace
    (0.93, {"maker_limit": -5}, "fail"),         # the maker's limit comes first
    (0.93, {"meter_acc": 5}, "ok"),              # a ±5 % meter cannot tell −7 % from −5 %
])
def test_three_states_with_the_criterion_named(frac, more, state):
    c = C_EXP * 1e6
    r = phases([c, c, c * frac], **more)
    v = res(r, "verdict_3")
    assert v["status"] == state, v
    assert v["method"].startswith("Criterion: ")
    if state == "fail":
        assert "replacement limit" in v["method"].lower() and res(r, "bank_state")["status"] == "fail"
    if "maker_limit" in more:
        assert "Maker" in v["method"]


def _between(c):
    """Meter across two terminals of a delta, third floating: C12 + C23·C31/(C23 + C31)."""
    c12, c23, c31 = c
    return [c12 + c23 * c31 / (c23 + c31), c23 + c31 * c12 / (c31 + c12), c31 + c12 * c23 / (c12 + c23)]


def test_ratio_on_between_terminal_values_worked_case():
    c = (330.0, 332.0, 290.0)  # µF elements: element ratio 1.145 but between-terminal 1.068 (worked case)
    m = _between(c)
    want = max(m) / min(m)
    assert want == pytest.approx(1.068, abs=5e-4)
    r = phases(list(c))
    ratio = res(r, "ratio")
    assert ratio["value"] == pytest.approx(want, rel=1e-6)
    assert ratio["status"] == "ok" and not any("1.08 ratio" in w for w in r["warnings"])
    # the same elements measured between terminals give the same ratio, as read
    rb = run(SHEET, mode="between", m12=m[0], m23=m[1], m31=m[2])
    assert res(rb, "ratio")["value"] == pytest.approx(want, rel=1e-9)


def test_floating_wye_star_point_against_nodal_analysis():
    c = np.array([990e-6, 990e-6, 800e-6])
    r = phases([990, 990, 800], connection="wye", q_rated=150)
    assert r["ok"], r
    vph = 400 / math.sqrt(3)
    v = vph * np.exp(-2j * np.pi * np.arange(3) / 3)
    vn = np.sum(c * v) / np.sum(c)  # KCL at the floating star point
    shift = res(r, "star_shift")
    assert shift["value"] == pytest.approx(100 * abs(vn) / vph, rel=1e-9)
    hi = res(r, "healthy_over")
    assert hi["value"] == pytest.approx(100 * np.max(np.abs(v - vn)) / vph, rel=1e-9)
    # a delta or a wye with its star point connected has no star-point shift to show
    assert not any(x["name"] == "star_shift" for x in phases([990, 990, 800], connection="wye_n", q_rated=150)["results"])


def test_meter_accuracy_refused_at_its_field():
    r = run(SHEET, meter_acc="-1")
    assert not r["ok"] and "meter_acc" in r["field_errors"]
