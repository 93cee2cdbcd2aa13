"""pycore.discharge: resistors against V(t) = V₀·e^(−t/RC) (circuit theory) for delta and wye, and an
ngspice transient of each connection after disconnection (star point floating in the wye)."""

import math

import pytest

from pycore import discharge as dc
from pycore.errors import InputError
from spice import needs_ngspice, transient


@pytest.mark.parametrize("connection", ["delta", "wye"])
@pytest.mark.parametrize("rule", ["nec", "iec"])
def test_resistor_reaches_the_residual_at_the_stated_time(connection, rule):
    d = dc.discharge_resistor(50.0, 480.0, 60.0, connection, rule)
    lim = dc.RULES[rule]
    # V(t) = V₀·e^(−t/RC) written out here, V₀ = √2·480 V
    v_t = math.sqrt(2) * 480.0 * math.exp(-lim.time_s / (d.r_max_ohm * d.c_element_f))
    assert v_t == pytest.approx(lim.residual_v, rel=1e-9)
    # a resistor 1 % larger leaves too much
    assert dc.residual_v(d.v0, 1.01 * d.r_max_ohm, d.c_element_f, lim.time_s) > lim.residual_v
    assert d.v0 == pytest.approx(math.sqrt(2) * 480.0)


def test_worked_example_by_hand():
    # 50 kvar, 480 V, 60 Hz delta: C = 50 000/(3·2π·60·480²) = 191.9 µF per element;
    # R = 60 s/(C·ln(678.8/50)) = 119.9 kΩ; P = 480²/R = 1.92 W each (arithmetic by hand, NEC 460.6)
    d = dc.discharge_resistor(50.0, 480.0, 60.0, "delta", "nec")
    assert d.c_element_f == pytest.approx(191.9e-6, rel=1e-3)
    assert d.r_max_ohm == pytest.approx(119.9e3, rel=2e-3)
    assert d.p_element_w == pytest.approx(1.92, rel=3e-3)
    assert d.p_total_w == pytest.approx(3 * d.p_element_w)
    # the reconnection delay to 10 % (common practice): RC·ln 10
    assert d.reclose_s == pytest.approx(d.r_max_ohm * d.c_element_f * math.log(10))
    assert dc.residual_v(d.v0, d.r_max_ohm, d.c_element_f, d.reclose_s) == pytest.approx(0.1 * d.v0)


def test_wye_elements_and_power():
    # wye: element C = Q/(ωV²) (three times the delta's), each resistor sees U/√3
    dd = dc.discharge_resistor(50.0, 400.0, 50.0, "delta", "iec")
    dy = dc.discharge_resistor(50.0, 400.0, 50.0, "wye", "iec")
    assert dy.c_element_f == pytest.approx(3 * dd.c_element_f)
    assert dy.r_max_ohm == pytest.approx(dd.r_max_ohm / 3)
    assert dy.p_element_w == pytest.approx((400 / math.sqrt(3)) ** 2 / dy.r_max_ohm)


def test_fast_discharge():
    fd = dc.fast_discharge(25.0, 400.0, 50.0, "delta", 5.0)
    c = dc.element_capacitance_f(25.0, 400.0, 50.0, "delta")
    assert dc.residual_v(math.sqrt(2) * 400, fd.r_ohm, c, 5.0) == pytest.approx(0.1 * math.sqrt(2) * 400)
    assert fd.energy_j == pytest.approx(0.5 * c * 2 * 400**2)
    assert fd.p_if_left_w == pytest.approx(400**2 / fd.r_ohm)


@needs_ngspice
@pytest.mark.parametrize("connection", ["delta", "wye"])
def test_ngspice_disconnected_unit_between_terminals(connection):
    # the unit left at the instant V(L1,L2) is at its peak √2·U_N; ngspice integrates the RC network
    d = dc.discharge_resistor(30.0, 415.0, 50.0, connection, "nec")
    v0, r, c = d.v0, d.r_max_ohm, d.c_element_f
    if connection == "delta":
        ics = ((("a", "b"), v0), (("b", "0"), -v0 / 2), (("0", "a"), -v0 / 2))
        extra = []
    else:  # elements terminal → floating star s; a 1 TΩ leak gives the star a DC path for the solver
        ics = ((("a", "s"), v0 / 2), (("b", "s"), -v0 / 2), (("0", "s"), 0.0))
        extra = ["Rleak s 0 1e12"]
    lines = []
    for k, ((n1, n2), v) in enumerate(ics, 1):
        lines += [f"C{k} {n1} {n2} {c!r} ic={v!r}", f"R{k} {n1} {n2} {r!r}"]
    t, out = transient("\n".join(lines + extra), 0.05, 60.0, ["v(a,b)"])
    v_at = out["v(a,b)"][min(range(len(t)), key=lambda k: abs(t[k] - 60.0))]
    assert v_at == pytest.approx(50.0, rel=0.005)  # NEC 460.6: 50 V at 1 min, ngspice transient


def test_bad_input():
    with pytest.raises(InputError):
        dc.discharge_resistor(50, 480, 60, "zigzag")
    with pytest.raises(InputError):
        dc.discharge_resistor(50, 480, 60, "delta", "other")
    with pytest.raises(InputError):
        dc.discharge_resistor(50, 30, 60, "delta")  # peak 42 V: below 50 V already
