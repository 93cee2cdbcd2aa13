"""pycore.inrush against ngspice transients of the circuits the IEEE Std 1036 expressions describe.

Each deck is the per-phase (wye-equivalent) circuit: a 50 Hz source at its voltage peak at t = 0
behind its inductance, the energized steps charged to that peak through their own connection
inductance, the incoming step discharged (the worst closing instant, IEEE Std 1036, from memory).
Peak current and ringing frequency are read from the simulated current in the incoming step.
"""

import math

import pytest

from pycore import detuning, inrush as ir
from pycore.errors import InputError
from spice import needs_ngspice, transient

V, F = 400.0, 50.0
VPK = V * math.sqrt(2.0 / 3.0)


def _ring(body, expected_f, vector="i(vm)"):
    """Simulated first peak |i| [A] (within the first half ringing period; undamped, later peaks
    pick up the 50 Hz current) and the ringing frequency [Hz] from the zero crossings over three periods."""
    period = 1.0 / expected_f
    t, out = transient(body, period / 2000, 3 * period, [vector])
    i = out[vector]
    peak = max(abs(x) for x, tk in zip(i, t) if tk <= period / 2)
    zeros = [t[k] - i[k] * (t[k + 1] - t[k]) / (i[k + 1] - i[k]) for k in range(1, len(i) - 1) if i[k] * i[k + 1] < 0]
    assert len(zeros) >= 4, "the current did not ring"
    return peak, (len(zeros) - 1) / 2.0 / (zeros[-1] - zeros[0])


def _b2b_deck(energized, incoming, l_source):
    lines = [f"Vs src 0 SIN(0 {VPK!r} {F!r} 0 0 90)", f"Ls src bus {l_source!r}"]
    for k, s in enumerate(energized, 1):
        lines += [f"Le{k} bus e{k} {s.l_h!r}", f"Ce{k} e{k} 0 {s.c_f!r} ic={VPK!r}"]
    lines += [f"Lin bus a {incoming.l_h!r}", "Vm a b 0", "Rin b c 1e-6", f"Cin c 0 {incoming.c_f!r} ic=0"]
    return "\n".join(lines)


def _steps():
    lm = ir.connection_inductance_h
    # invented fixture: two 50 kvar steps 5 m and 4 m from the bus, a 25 kvar step 3 m away, 0.5 µH/m
    return [ir.step_circuit(50, V, F, lm(5)), ir.step_circuit(50, V, F, lm(4))], ir.step_circuit(25, V, F, lm(3))


@needs_ngspice
def test_back_to_back_matches_ngspice_when_the_source_is_stiff_in_inductance():
    # IEEE Std 1036's assumption: the source inductance far above the inductance between steps (here 360×)
    energized, incoming = _steps()
    calc = ir.back_to_back(incoming, energized, V)
    peak, f = _ring(_b2b_deck(energized, incoming, 1e-3), calc.freq_hz)
    assert peak == pytest.approx(calc.peak_a, rel=0.02)  # ngspice transient, within 2 %
    assert f == pytest.approx(calc.freq_hz, rel=0.01)  # ngspice transient, within 1 %


@needs_ngspice
def test_back_to_back_with_a_transformer_close_by_the_formula_is_a_few_percent_low():
    # a 1000 kVA, 6 % transformer (30.6 µH at 400 V) is only ~11× the 2.75 µH between the steps: the
    # source then adds to the inrush; ngspice shows the IEEE 1036 figure about 3 % low (stated in the module)
    energized, incoming = _steps()
    calc = ir.back_to_back(incoming, energized, V)
    ls = ir.source_inductance_h(V, F, 1000 / 0.06)
    peak, f = _ring(_b2b_deck(energized, incoming, ls), calc.freq_hz)
    assert 1.0 < peak / calc.peak_a < 1.05
    assert f == pytest.approx(calc.freq_hz, rel=0.01)


@needs_ngspice
@pytest.mark.parametrize("kvar,length", [(50, 5), (12.5, 20)])
def test_isolated_step_matches_its_own_transient(kvar, length):
    ls = ir.source_inductance_h(V, F, 1000 / 0.06)
    step = ir.step_circuit(kvar, V, F, ir.connection_inductance_h(length))
    calc = ir.isolated(step, V, ls)
    body = "\n".join([f"Vs src 0 SIN(0 {VPK!r} {F!r} 0 0 90)", f"Ls src a {ls + step.l_h!r}", "Vm a b 0",
                      "R b c 1e-6", f"C c 0 {step.c_f!r} ic=0"])
    peak, f = _ring(body, calc.freq_hz)
    assert peak == pytest.approx(calc.peak_a, rel=0.02)  # ngspice transient
    assert f == pytest.approx(calc.freq_hz, rel=0.01)


@needs_ngspice
def test_detuned_steps_back_to_back_through_their_reactors():
    # 7 % detuned steps: each reactor (pycore.detuning) is in the ring path; ngspice of the same circuit
    lm = ir.connection_inductance_h
    energized = [ir.step_circuit(50, V, F, lm(5), p=0.07)]
    incoming = ir.step_circuit(25, V, F, lm(3), p=0.07)
    calc = ir.back_to_back(incoming, energized, V)
    peak, f = _ring(_b2b_deck(energized, incoming, 1e-1), calc.freq_hz)
    assert peak == pytest.approx(calc.peak_a, rel=0.02)
    assert f == pytest.approx(calc.freq_hz, rel=0.01)


def test_formula_by_hand():
    # IEEE Std 1036 expression evaluated by hand: 400 V, C_eq = 1000 µF, L_eq = 10 µH
    r = ir.ringing(400.0, 1e-3, 1e-5)
    assert r.peak_a == pytest.approx(400 * math.sqrt(2 / 3) * 10.0)  # √(C/L) = 10 S
    assert r.freq_hz == pytest.approx(1 / (2 * math.pi * 1e-4))


def test_detuned_reactor_limits_inrush_and_plain_steps_need_a_reactor():
    lm = ir.connection_inductance_h
    ls = ir.source_inductance_h(V, F, 1000 / 0.06)
    plain = [ir.step_circuit(q, V, F, lm(d)) for q, d in ((25, 2), (50, 3), (50, 4))]
    tuned = [ir.step_circuit(q, V, F, lm(d), p=0.07) for q, d in ((25, 2), (50, 3), (50, 4))]
    rp = ir.bank_inrush(plain, V, ls)
    rt = ir.bank_inrush(tuned, V, ls)
    # plain: the 25 kvar step back to back with 100 kvar rings far above 100 × I_N (IEC 60831-1, from memory)
    assert rp[0].worst > rp[0].limit_a and not rp[0].within
    assert all(r.within for r in rt)
    assert rt[0].worst < rp[0].worst / 10
    # the reactor's inductance equals the detuning module's design (mH per phase)
    assert tuned[0].reactor_h == pytest.approx(detuning.design_branch(V, F, 25, 0.07, V).l_mh * 1e-3)
    add = ir.limiting_inductance_h(plain, V, ls)
    assert add > 0
    grown = [ir.StepCircuit(s.c_f, s.l_h + add, 0.0, s.i_rated_a) for s in plain]
    res = ir.bank_inrush(grown, V, ls)
    assert max(r.worst / r.limit_a for r in res) == pytest.approx(1.0, rel=1e-6)
    assert ir.limiting_inductance_h(tuned, V, ls) == 0.0


@pytest.mark.parametrize("sizes,runs,source,contactor", [
    ((10, 20, 20, 20, 20, 20), (2, 2, 2, 2, 2, 2), True, None),
    ((50, 25, 25, 100, 25), (1, 3, 3, 0.5, 3), False, None),
    ((12.5, 25, 25, 50), (2, 2, 2, 2), True, 2500.0),
    ((40, 40, 40), (0.2, 0.2, 0.2), False, 1500.0),
])
def test_limiting_reactor_brings_the_worst_step_to_its_limit(sizes, runs, source, contactor):
    # steps alike and unlike, with and without the source and a contactor's peak: with the added
    # inductance the worst step sits at its limit (the bisection's width), every other step below
    lm = ir.connection_inductance_h
    steps = [ir.step_circuit(q, V, F, lm(d)) for q, d in zip(sizes, runs)]
    ls = ir.source_inductance_h(V, F, 1000 / 0.06) if source else None
    add = ir.limiting_inductance_h(steps, V, ls, contactor)
    assert add > 0

    def worst(extra):
        grown = [ir.StepCircuit(s.c_f, s.l_h + extra, 0.0, s.i_rated_a) for s in steps]
        res = ir.bank_inrush(grown, V, ls)
        return max(r.worst / (r.limit_a if contactor is None else min(r.limit_a, contactor)) for r in res)

    assert worst(add) == pytest.approx(1.0, rel=1e-5) and worst(add) <= 1.0 + 1e-9
    assert worst(add * (1 - 1e-4)) > 1.0


def test_bank_inrush_is_each_step_worked_alone():
    # steps alike in runs and apart, one of them with another run length: every step's inrush is the one
    # worked out for it alone from isolated() and back_to_back() with the others in bank order
    lm = ir.connection_inductance_h
    sizes, runs = (25, 50, 50, 50, 25, 50, 50, 12.5), (2, 2, 2, 3, 2, 2, 2, 2)
    steps = [ir.step_circuit(q, V, F, lm(d)) for q, d in zip(sizes, runs)]
    ls = ir.source_inductance_h(V, F, 1000 / 0.06)
    got = ir.bank_inrush(steps, V, ls, 4000.0)
    for k, st in enumerate(steps):
        alone = ir.isolated(st, V, ls)
        b2b = ir.back_to_back(st, steps[:k] + steps[k + 1:], V)
        assert got[k].alone == alone and got[k].back_to_back == b2b
        assert got[k].worst == max(alone.peak_a, b2b.peak_a)
        assert got[k].limit_a == ir.CAPACITOR_INRUSH_MULTIPLE * st.i_rated_a
        assert got[k].within == (got[k].worst <= min(got[k].limit_a, 4000.0) * (1 + 1e-12))


def test_contactor_limit_is_applied():
    lm = ir.connection_inductance_h
    steps = [ir.step_circuit(q, V, F, lm(3), p=0.07) for q in (25, 50)]
    ok = ir.bank_inrush(steps, V, 1e-5)
    lim = 0.5 * max(r.worst for r in ok)
    assert not all(r.within for r in ir.bank_inrush(steps, V, 1e-5, contactor_limit_a=lim))


def test_bad_inputs_raise_input_error():
    with pytest.raises(InputError):
        ir.ringing(400, 1e-3, 0.0)
    with pytest.raises(InputError):
        ir.step_circuit(-5, 400, 50, 1e-6)
    with pytest.raises(InputError):
        ir.back_to_back(ir.step_circuit(5, 400, 50, 1e-6), [], 400)
