"""pycore.orderlist: the purchase list built from the step, inrush, discharge, protection and cable
results; one step worked by hand (NEC 460.8, NEC Table 310.16, NEC 240.6(A), NEC 460.6)."""

import math

import pytest

from pycore import detuning, discharge, orderlist as ol, protection
from pycore.errors import InputError


def _plain():
    # a 71.3 kvar need as the binary plan 5, 10, 20, 40 kvar at 480 V, 60 Hz (invented site)
    return ol.design_bank([5, 10, 20, 40], [(5,), (10,), (20,), (40,)], 480, 60, 480, 60, "delta", 0.0, "nec",
                          s_sc_kva=1000 / 0.0575, ct_primary_a=400)


def test_step_by_hand():
    b = ol.design_bank([50], [(50,)], 480, 60, 480, 60, "delta", 0.0, "nec")
    d = b.steps[0]
    # I_N = 50 000/(√3·480) = 60.14 A; conductor ≥ 1.35 × I_N = 81.2 A (NEC 460.8)
    assert d.i_n_a == pytest.approx(60.14, rel=1e-3)
    # gG 1.43–1.65 × I_N = 86.0–99.2 A → 90 A (NEC 240.6(A)), inside the range (common practice)
    assert d.fuse.rating_a == 90 and d.fuse.in_range
    # the cable carries max(81.2 A, the 90 A fuse) → 3 AWG, 100 A (NEC Table 310.16, 75 °C copper)
    assert d.cable_needed_a == pytest.approx(90.0)
    assert (d.cable.size, d.cable.runs) == ("3 AWG", 1)
    # discharge to 50 V in 1 min (NEC 460.6): 119.9 kΩ per element (test_discharge worked example)
    assert d.discharge.r_max_ohm == pytest.approx(119.9e3, rel=2e-3)
    assert d.inrush.back_to_back is None and d.inrush.alone is None  # one step, no source given


def test_plain_bank_rows():
    b = _plain()
    rows = ol.order_rows(b)
    for k in range(1, 5):
        items = [r.item for r in rows if r.section == f"Step {k}"]
        assert items[0] == "Capacitor unit"
        for need in ("Contactor", "Fuses, gG", "Cable"):
            assert need in items
        assert any(i.startswith("Discharge") for i in items)
    # back to back, plain steps: the small steps ring far above 100 × I_N → capacitor-duty contactors, and a reactor
    assert b.steps[0].contactor.duty == protection.CAPACITOR_DUTY
    assert b.limiting_uh > 0
    assert any("inrush-limiting reactor" in r.item for r in rows)
    # the reactor is offered as the alternative to the capacitor-duty contactor, not as a second purchase
    assert all(r.item.startswith("Or, instead of the capacitor-duty contactor") for r in rows if "reactor" in r.item)
    ctl = [r for r in rows if r.item == "Power-factor controller"][0]
    # C/k: 5 kvar at 480 V = 6.014 A, CT 400/5 → 0.0752 A (common practice)
    assert b.ck_a == pytest.approx(5000 / (math.sqrt(3) * 480) / 80)
    assert "4 step outputs" in ctl.spec and "C/k" in ctl.spec
    assert [r.section for r in rows][-3:] == ["Bank", "Bank", "Bank"]
    cols, table = ol.as_table(rows)
    assert len(table) == len(rows) and len(cols) == 5
    text = ol.as_text(rows)
    assert "Step 1:" in text and "Main cable" in text


def test_detuned_bank_uses_its_reactors():
    b = ol.design_bank([25, 50], [(25,), (50,)], 400, 50, 440, 50, "delta", 0.07, "iec", s_sc_kva=20000)
    rows = ol.order_rows(b)
    reac = [r for r in rows if r.item == "Detuning reactor"]
    assert len(reac) == 2
    q_sys = detuning.branch_output_kvar(50, 400, 440, 0.07)
    br = detuning.design_branch(400, 50, q_sys, 0.07, 440)
    assert b.steps[1].reactor.l_mh == pytest.approx(br.l_mh)
    assert all(d.contactor.duty == protection.STANDARD_DUTY and d.inrush.within for d in b.steps)
    assert b.limiting_uh == 0 and not any("inrush-limiting" in r.item for r in rows)
    # IEC profile: discharge to 75 V in 3 min (IEC 60831-1, from memory), IEC fuse series
    assert b.steps[0].discharge.rule is discharge.RULES["iec"]
    assert b.steps[0].fuse.rating_a in protection.IEC_FUSE_RATINGS


def test_fast_discharge_shortens_the_delay():
    slow = _plain()
    fast = ol.design_bank([5, 10, 20, 40], [(5,), (10,), (20,), (40,)], 480, 60, 480, 60, fast_discharge_s=5.0)
    assert slow.reclose_s > 30 and fast.reclose_s == 5.0
    assert any(r.item.startswith("Fast-discharge") for r in ol.order_rows(fast))


def test_bad_inputs():
    with pytest.raises(InputError):
        ol.design_bank([10, 20], [(10,)], 480, 60, 480, 60)
    with pytest.raises(InputError):
        ol.design_bank([10], [(10,)], 400, 50, 440, 60, p=0.07)
    with pytest.raises(InputError):
        ol.design_bank([10], [(10,)], 400, 50, 440, 50, profile="csa")


def _alike_bank(p=0.0):
    # runs of alike steps, one of them on a shorter run (so its inrush and contactor differ), a source given
    return ol.design_bank([25, 50, 50, 50, 50, 25], [(25,), (50,), (25, 25), (50,), (50,), (25,)], 400, 50, 440, 50,
                          "delta", p, "iec", s_sc_kva=1000 / 0.06, lengths_m=[2, 2, 2, 2, 0.05, 2], contactor_peak_a=6000)


@pytest.mark.parametrize("p", [0.0, 0.07])
def test_alike_steps_each_get_their_own_parts(p):
    # every step's parts are those its own figures give (a step alike the one before shares them;
    # the step on the short run must not)
    from pycore import capacitor, inrush
    b = _alike_bank(p)
    runs = [2, 2, 2, 2, 0.05, 2]
    for d in b.steps:
        q_sys = (detuning.branch_output_kvar(d.q_rated_kvar, 400, 440, p) if p
                 else d.q_rated_kvar * capacitor.output_factor(400, 440, 50, 50))
        assert d.q_system_kvar == q_sys
        assert d.circuit == inrush.step_circuit(q_sys, 400, 50, inrush.connection_inductance_h(runs[d.number - 1]), p)
        assert d.fuse == protection.fuse(d.i_n_a, "iec")
        lim = min(d.inrush.limit_a, 6000)
        assert d.contactor == protection.contactor(d.i_n_a, bool(p), d.inrush.worst, lim, "iec")
        assert d.discharge == discharge.discharge_resistor(d.q_rated_kvar, 440, 50, "delta", "iec")
        assert d.reactor == (detuning.design_branch(400, 50, d.q_system_kvar, p, 440) if p else None)
    assert b.steps[4].inrush != b.steps[3].inrush
    if not p:  # plain: the short run's inrush needs another contactor
        assert b.steps[4].contactor != b.steps[3].contactor
    assert b.steps[2].units == (25, 25) and b.steps[1].units == (50,)


@pytest.mark.parametrize("p", [0.0, 0.07])
def test_order_rows_are_each_step_listed_alone(p):
    # the rows of every step are those of a bank of that step alone, whatever the steps beside it
    from dataclasses import replace
    b = _alike_bank(p)
    rows = ol.order_rows(b)
    for d in b.steps:
        alone = [r for r in ol.order_rows(replace(b, steps=(d,))) if r.section.startswith("Step")]
        assert [r for r in rows if r.section == f"Step {d.number}"] == alone
    # a step made alike the one before in all but one part must show that part
    d1, d2 = b.steps[1], b.steps[3]
    for part in ("fuse", "cable", "discharge", "inrush", "contactor", "cable_needed_a"):
        odd = replace(d2, number=3, **{part: getattr(b.steps[0], part)})
        mixed = replace(b, steps=(d1, odd))
        three = [r for r in ol.order_rows(mixed) if r.section == "Step 3"]
        assert three == [r for r in ol.order_rows(replace(b, steps=(odd,))) if r.section == "Step 3"]
