"""Property-based tests (hypothesis) of pycore invariants.

* Rectangular ↔ polar and Z ↔ Y round trips, checked against Python's own ``cmath``
  (``cmath.polar``/``cmath.rect``), which is outside this project.
* Series/parallel combination laws of impedances (circuit theory: KVL for series, admittances
  add in parallel; e.g. Alexander & Sadiku, Fundamentals of Electric Circuits, chapter on
  series/parallel combinations).
* After correction the load's reactive power equals P·tan φ₂ (the power triangle; IEEE Std 141,
  Red Book, power-factor chapter), with tan φ₂ computed here by ``math.tan(math.acos(PF₂))``.
* The parallel-resonance order falls as the bank grows: h ≈ √(S_sc/Q) (IEEE Std 1036) and
  the |Z| peak of the bus model.
* Robustness contract of the core (house rule: a worksheet's compute never raises): every public pycore
  function, given finite numbers (or any text, for the parsers), either returns a value with
  no NaN in it or raises :class:`pycore.errors.InputError` — never ZeroDivisionError,
  OverflowError, a bare ValueError or anything else.
"""

from __future__ import annotations

import cmath
import dataclasses
import importlib
import inspect
import math
import pkgutil

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

import pycore
from pycore import (bankhealth, banksteps, busscan, cables, capacitor, capduty, correction, detuning, harmonicbus,
                    harmonicsources, harmonicstudy, healthverdict, ieee519, inrush, orderlist, phasor, profile_columns,
                    profile_control, references, resonancescreen, savings, stepcombos, supply, survey)
from pycore.errors import InputError, guarded

SETTINGS = settings(max_examples=200, deadline=None, database=None,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

F = st.floats(allow_nan=False, allow_infinity=False)
POS = st.floats(min_value=0.0, exclude_min=True, allow_nan=False, allow_infinity=False)
OPT = st.none() | F
C = st.complex_numbers(allow_nan=False, allow_infinity=False)


def _bounded(lo: float, hi: float):
    return st.floats(min_value=lo, max_value=hi, allow_nan=False, allow_infinity=False)


def _complex_in(lo: float, hi: float):
    """Complex numbers whose parts have magnitudes in [lo, hi] (or are zero), either sign."""
    part = st.just(0.0) | _bounded(lo, hi) | _bounded(-hi, -lo)
    return st.builds(complex, part, part).filter(lambda z: z != 0)


def _close(a: complex, b: complex, rel: float = 1e-12) -> bool:
    return abs(a - b) <= rel * max(abs(a), abs(b))


# ---------------------------------------------------------------------------------------------
# Rectangular ↔ polar and Z ↔ Y


@SETTINGS
@given(z=_complex_in(1e-150, 1e150))
def test_polar_round_trip_matches_cmath(z):
    mag, ang = phasor.to_polar(z)
    # Python's cmath is the outside reference: |z| and arg z in radians
    ref_mag, ref_phase = cmath.polar(z)
    assert mag == pytest.approx(ref_mag, rel=1e-15)
    assert -180.0 < ang <= 180.0
    assert math.radians(ang) == pytest.approx(ref_phase, rel=1e-13, abs=1e-15) or ang == 180.0
    back = phasor.from_polar(mag, ang)
    assert _close(back, z, 1e-12)
    assert _close(back, cmath.rect(ref_mag, ref_phase), 1e-12)


@SETTINGS
@given(mag=_bounded(1e-150, 1e150), ang=_bounded(-179.999, 180.0))
def test_rect_to_polar_gives_back_magnitude_and_angle(mag, ang):
    m2, a2 = phasor.to_polar(phasor.from_polar(mag, ang))
    assert m2 == pytest.approx(mag, rel=1e-12)
    # angles compared on the circle (−180 and 180 are the same direction)
    d = (a2 - ang + 180.0) % 360.0 - 180.0
    assert abs(d) <= 1e-9


@SETTINGS
@given(z=_complex_in(1e-100, 1e100))
def test_impedance_admittance_round_trip(z):
    y = phasor.admittance(z)
    assert _close(y, 1 / complex(z), 1e-12)  # Y = 1/Z by definition
    assert _close(y * z, 1.0 + 0j, 1e-12)
    assert _close(phasor.impedance(y), z, 1e-12)
    # |Y| = 1/|Z| and the angles are opposite (compared on the circle: −180° and 180° meet)
    assert abs(y) == pytest.approx(1.0 / abs(z), rel=1e-12)
    turn = (phasor.to_polar(y)[1] + phasor.to_polar(z)[1] + 180.0) % 360.0 - 180.0
    assert abs(turn) <= 1e-9


def test_zero_impedance_and_admittance_are_refused():
    with pytest.raises(InputError):
        phasor.admittance(0j)
    with pytest.raises(InputError):
        phasor.impedance(0j)


# ---------------------------------------------------------------------------------------------
# Series and parallel combination laws

ZS = st.lists(_complex_in(1e-6, 1e6), min_size=1, max_size=6)


@SETTINGS
@given(zs=ZS, data=st.data())
def test_series_and_parallel_do_not_depend_on_order(zs, data):
    perm = data.draw(st.permutations(zs))
    scale = sum(abs(z) for z in zs)
    assert abs(phasor.series(perm) - phasor.series(zs)) <= 1e-12 * scale
    try:
        p1 = phasor.parallel(zs)
    except InputError:  # exact cancellation of admittances: the same for any order
        return
    p2 = phasor.parallel(perm)
    # compare admittances, which add: both are Σ 1/Z up to round-off
    ysum = sum(abs(1 / z) for z in zs)
    assert abs(1 / p1 - 1 / p2) <= 1e-11 * ysum


@SETTINGS
@given(z=_complex_in(1e-100, 1e100))
def test_one_branch_is_the_branch_itself(z):
    assert phasor.series([z]) == z
    assert _close(phasor.parallel([z]), z, 1e-15)


@SETTINGS
@given(z=_complex_in(1e-100, 1e100), n=st.integers(2, 8))
def test_parallel_of_equal_branches_divides_by_their_number(z, n):
    assert _close(phasor.parallel([z, z]), z / 2, 1e-14)
    assert _close(phasor.parallel([z] * n), z / n, 1e-13)
    assert _close(phasor.series([z] * n), z * n, 1e-13)


@SETTINGS
@given(rs=st.lists(_bounded(1e-6, 1e9), min_size=1, max_size=8))
def test_resistors_parallel_below_smallest_series_above_largest(rs):
    zp = phasor.parallel([complex(r, 0) for r in rs])
    zs = phasor.series([complex(r, 0) for r in rs])
    assert zp.imag == 0 and zs.imag == 0
    assert 0 < zp.real <= min(rs) * (1 + 1e-12)
    assert zs.real >= max(rs) * (1 - 1e-12)
    # the independent sum of conductances (math.fsum, correctly rounded)
    assert zp.real == pytest.approx(1.0 / math.fsum(1.0 / r for r in rs), rel=1e-12)


@SETTINGS
@given(a=ZS, b=ZS)
def test_series_is_associative_and_parallel_nests(a, b):
    # (a in series) in series with (b in series) = all in series
    scale = sum(abs(z) for z in a + b)
    assert abs(phasor.series([phasor.series(a), phasor.series(b)]) - phasor.series(a + b)) <= 1e-12 * scale
    try:
        pa, pb, pab = phasor.parallel(a), phasor.parallel(b), phasor.parallel(a + b)
        nested = phasor.parallel([pa, pb])
    except InputError:
        return
    ysum = sum(abs(1 / z) for z in a + b)
    assert abs(1 / nested - 1 / pab) <= 1e-10 * ysum


@SETTINGS
@given(
    elems=st.lists(st.tuples(st.sampled_from("RLC"), _bounded(1e-6, 1e6)), min_size=1, max_size=5),
    f=_bounded(1.0, 1e5),
)
def test_network_matches_element_by_element_sum(elems, f):
    w = 2 * math.pi * f
    # each ideal element's impedance written out here: R, jωL, 1/(jωC)
    zs = [complex(v, 0) if k == "R" else complex(0, w * v) if k == "L" else 1 / complex(0, w * v) for k, v in elems]
    z = phasor.network_impedance(elems, f, "series")
    scale = sum(abs(x) for x in zs)
    assert abs(z - sum(zs)) <= 1e-12 * scale


# ---------------------------------------------------------------------------------------------
# Correction: the corrected reactive power is P·tan φ₂

PF = _bounded(1e-3, 1.0)


@SETTINGS
@given(p=_bounded(1e-3, 1e7), pf1=PF, pf2=PF)
def test_corrected_q_is_p_tan_phi2(p, pf1, pf2):
    assume(pf1 < pf2)
    load = correction.load_from_p_pf(p, pf1)
    q_c = correction.required_kvar(p, pf1, pf2)
    after = load.corrected(q_c)
    # tan φ₂ from the standard library, independently of pycore.correction.tan_phi
    expect = p * math.tan(math.acos(pf2))
    assert after.q_kvar == pytest.approx(expect, rel=1e-9, abs=1e-9 * load.q_kvar)
    assert after.p_kw == p
    assert after.pf == pytest.approx(pf2, rel=1e-9, abs=1e-9 * load.q_kvar / load.s_kva)
    # the same kvar from the kvar-per-kW multiplier (IEEE Std 141 table form)
    assert q_c == pytest.approx(p * correction.kvar_per_kw(pf1, pf2), rel=1e-15)
    # and the site-survey route gives the same kvar for a lagging load
    assert survey.correction_kvar(p, load.q_kvar, pf2) == pytest.approx(q_c, rel=1e-9, abs=1e-9 * load.q_kvar)


@SETTINGS
@given(s=_bounded(1e-3, 1e7), pf1=PF, pf2=PF)
def test_corrected_q_from_kva_basis(s, pf1, pf2):
    assume(pf1 < pf2)
    load = correction.load_from_s_pf(s, pf1)
    assert load.s_kva == pytest.approx(s, rel=1e-12)
    after = load.corrected(correction.required_kvar(load.p_kw, pf1, pf2))
    expect = load.p_kw * math.tan(math.acos(pf2))
    assert after.q_kvar == pytest.approx(expect, rel=1e-9, abs=1e-9 * load.q_kvar)


@SETTINGS
@given(pf1=PF, pf2=PF)
def test_current_and_loss_reduction_follow_the_power_factors(pf1, pf2):
    # at constant P and V the current scales as 1/PF, the loss as 1/PF² (circuit theory)
    i = correction.current_reduction_fraction(pf1, pf2)
    l_ = correction.loss_reduction_fraction(pf1, pf2)
    assert i == pytest.approx(1 - pf1 / pf2, rel=1e-12, abs=1e-15)
    assert l_ == pytest.approx(1 - (1 - i) ** 2, rel=1e-9, abs=1e-12)
    assert (i > 0) == (pf2 > pf1) or i == 0


# ---------------------------------------------------------------------------------------------
# Resonance order falls as the bank grows


@SETTINGS
@given(s_sc=_bounded(1.0, 1e7), q1=_bounded(1e-3, 1e7), q2=_bounded(1e-3, 1e7))
def test_resonance_order_estimate_falls_with_bank_size(s_sc, q1, q2):
    lo, hi = sorted((q1, q2))
    assume(hi > lo * (1 + 1e-9))  # two banks that differ by more than round-off
    h_lo, h_hi = supply.resonance_order(s_sc, lo), supply.resonance_order(s_sc, hi)
    assert h_lo > h_hi
    # √(S_sc/Q) checked with an independent square root
    assert h_lo == pytest.approx((s_sc / lo) ** 0.5, rel=1e-14)
    # with p = 0 the detuned-bank formula is the same estimate; a reactor (p > 0) lowers the
    # resonance and it still falls (or, when Q/S_sc is lost beside p in round-off, stays) as Q grows
    a, b = detuning.bus_resonance_order(lo, s_sc, 0.0), detuning.bus_resonance_order(hi, s_sc, 0.0)
    assert a > b and a == pytest.approx(h_lo, rel=1e-12)
    a, b = detuning.bus_resonance_order(lo, s_sc, 0.07), detuning.bus_resonance_order(hi, s_sc, 0.07)
    assert a >= b and a < h_lo and a < 1 / math.sqrt(0.07)


@st.composite
def _bus_and_banks(draw):
    v = draw(st.sampled_from([208.0, 400.0, 480.0, 690.0]))
    f = draw(st.sampled_from([50.0, 60.0]))
    tx = draw(_bounded(100.0, 5000.0))
    z = draw(_bounded(3.0, 10.0))
    x_r = draw(st.none() | _bounded(2.0, 20.0))
    fault = draw(st.none() | _bounded(20e3, 1e6))
    load = draw(st.none() | _bounded(0.0, 0.5).map(lambda k: k * tx))
    model = busscan.bus_model(v, f, tx, z, x_r, fault, load)
    # steps that keep the estimated resonance between the 2nd and the 40th order
    q_min, q_max = model.s_sc_kva / 40.0**2, model.s_sc_kva / 2.0**2
    n = draw(st.integers(2, 4))
    total = draw(_bounded(q_min * n * 1.01, q_max))
    shares = draw(st.lists(_bounded(0.2, 1.0), min_size=n, max_size=n))
    steps = [total * s / sum(shares) for s in shares]
    return model, steps


@settings(max_examples=60, deadline=None, database=None)
@given(case=_bus_and_banks())
def test_bus_scan_peak_order_falls_as_steps_switch_in(case):
    model, steps = case
    peaks = busscan.scan(model, steps)
    orders = [pk.order for pk in peaks]
    found = [h for h in orders if h is not None]
    assume(len(found) >= 2)
    # cumulative kvar rises step by step, so the peak order must not rise
    for a, b in zip(found, found[1:]):
        assert b <= a * (1 + 1e-6)
    for pk in peaks:
        if pk.order is not None:
            # damping can only pull the peak a little away from √(S_sc/Q); never by a factor
            assert 0.5 * pk.estimate <= pk.order <= 1.5 * pk.estimate


@settings(max_examples=60, deadline=None, database=None)
@given(case=_bus_and_banks(), k=_bounded(1.05, 3.0))
def test_find_peak_order_falls_with_bank_size(case, k):
    model, steps = case
    q = sum(steps) / len(steps)
    a, b = busscan.find_peak(model, q), busscan.find_peak(model, q * k)
    assume(a.order is not None and b.order is not None)
    assert b.order < a.order


# ---------------------------------------------------------------------------------------------
# Robustness: finite input → a value without NaN, or InputError


def _nan_inside(v, depth: int = 0) -> bool:
    if depth > 6:
        return False
    if isinstance(v, float):
        return math.isnan(v)
    if isinstance(v, complex):
        return math.isnan(v.real) or math.isnan(v.imag)
    if isinstance(v, dict):
        return any(_nan_inside(k, depth + 1) or _nan_inside(x, depth + 1) for k, x in v.items())
    if isinstance(v, (list, tuple, set, frozenset)):
        return any(_nan_inside(x, depth + 1) for x in v)
    if dataclasses.is_dataclass(v) and not isinstance(v, type):
        return any(_nan_inside(getattr(v, f.name), depth + 1) for f in dataclasses.fields(v))
    return False


def _call(fn, args, kwargs=None):
    try:
        out = fn(*args, **(kwargs or {}))
    except InputError as e:
        msg = str(e)
        assert msg and (msg[0].isupper() or msg[0] in "'\""), f"{fn.__name__}: message not a sentence: {msg!r}"
        return None
    assert not _nan_inside(out), f"{fn.__name__}{args!r} returned NaN: {out!r}"
    return out


LIST3 = st.lists(F, min_size=0, max_size=4)
CONN = st.sampled_from(["delta", "wye", "wye_n", "star"])
CONN2 = st.sampled_from(["delta", "wye", "star"])
PHASES = st.sampled_from([3, 1, 2])
TOPO = st.sampled_from(["series", "parallel", "ring"])
BOOL = st.booleans()
TEXT = st.text(max_size=30) | st.sampled_from(
    ["12.5 - j4.7", "10∠-30", "1e308 + j1e308", "4.7k∠30°", "0,95 lead", "85%", "1e999", "−3,5 kvar", "5 MF"]
)
UNIT = st.sampled_from(["", "Ω", "S", "kvar", "µF", "V", "%", "kW", "Hz", "xyz"])
RATINGS = st.lists(F, min_size=0, max_size=4)
SPECTRUM = st.dictionaries(st.integers(-3, 60) | F, F, max_size=5)
LOAD = st.builds(correction.Load, F, F)
SLOAD = st.builds(survey.Load, st.text(max_size=5), F, F, F, OPT)
PROFILE_ROLES = set(profile_columns.ROLE_WORDS)
PSTAMP = st.sampled_from(["2025-03-31 07:15", "31/03/25 7:15 pm", "2025-03-31T07:15+01:00", "03.04.2025", "9999-12-31 24:00"])
INTS = st.lists(st.integers(-10**12, 10**12) | st.integers(), max_size=6)
PTEXT = st.sampled_from([
    "Time,kW,kvar\n2025-01-01 00:15,5,5\n2025-01-01 00:30,6,-1\n",
    "Time;kWh;PF\n01.01.2025 00:15;5,5;0,9\n01.01.2025 00:30;6;1e308\n",
    "Time,kW,kVA\n9999-12-31 23:00,1e308,1e308\n9999-12-31 24:00,-1e308,0\n",
    "0001-01-01 00:00,1,1\n0001-01-01 01:00,1,1\n",
])
BAND = st.sampled_from(list(bankhealth.BANDS.values())) | st.builds(
    bankhealth.Band, st.just("custom"), F, F, st.just("own"), st.just("own"))
H = _bounded(-100.0, 100.0)  # harmonic-order range ends (a plotting parameter, kept to a sane span)


def _model_from(args):
    try:
        return busscan.bus_model(*args)
    except InputError:
        return None


MODEL = st.builds(_model_from, st.tuples(POS, POS, POS, POS, st.none() | POS, st.none() | POS, st.none() | F)).filter(
    lambda m: m is not None)


OPT_POS = st.none() | POS
HSTEP = st.builds(harmonicbus.Step, F, F, st.none() | F, F) | st.builds(
    harmonicbus.Step, POS, st.sampled_from([0.0, 0.0567, 0.07, 0.14]))


def _hbus_from(args):
    try:
        return harmonicbus.build_bus(*args)
    except InputError:
        return None


HBUS = st.builds(_hbus_from, st.tuples(POS, POS, POS, POS, OPT_POS, OPT_POS, OPT_POS, st.none() | F, st.none() | F, POS,
                                        st.lists(HSTEP, max_size=3), st.sampled_from(["constant", "sqrt"]))).filter(
    lambda b: b is not None)
IDX = st.lists(st.integers(-1, 3), max_size=3)
ORDERS = st.integers(-2, 60) | F
HSPEC = st.dictionaries(ORDERS, F, max_size=4)
HTOL = st.builds(resonancescreen.Tolerances, F, F, F, F)
KIND = st.sampled_from(list(harmonicsources.TYPICAL_SPECTRA) + ["other"])
PROFILE = st.sampled_from(["ieee18", "iec60831", "nema"])


def _study_from(args):
    try:
        return harmonicstudy.run_study(*args)
    except InputError:
        return None


STUDY = st.builds(_study_from, st.tuples(HBUS, st.dictionaries(st.integers(2, 50), F, min_size=1, max_size=3), POS,
                                         PROFILE)).filter(lambda s: s is not None)


def A(*strats, **kw):
    """Arguments: a strategy for (positional tuple, keyword dict)."""
    return st.tuples(st.tuples(*strats), st.fixed_dictionaries(kw))


CASES = {
    # bankhealth
    "bankhealth.expected": A(F, F, F, CONN),
    "bankhealth.rated_output_at": A(F, F, F, F, F),
    "bankhealth.between_from_delta": A(F, F, F),
    "bankhealth.between_from_wye": A(F, F, F),
    "bankhealth.delta_from_between": A(F, F, F),
    "bankhealth.wye_from_between": A(F, F, F),
    "bankhealth.per_phase_from_between": A(LIST3, CONN),
    "bankhealth.element_voltages": A(LIST3, F, F, CONN),
    "bankhealth.line_currents": A(LIST3, F, F, CONN),
    "bankhealth.delta_element_currents": A(F, F, F),
    "bankhealth.delta_to_wye_capacitance": A(F, F, F),
    "bankhealth.per_phase_from_currents": A(LIST3, F, F, CONN),
    "bankhealth.phase_kvar": A(LIST3, F, F, CONN),
    "bankhealth.imbalance_percent": A(LIST3),
    "bankhealth.max_min_ratio": A(LIST3),
    "capbands.custom_band": A(F, F),
    "capbands.verdict": A(F, BAND),
    # banksteps
    "banksteps.select_units": A(F, RATINGS),
    "banksteps.exact_units": A(F, RATINGS),
    "banksteps.step_weights": A(st.sampled_from(list(banksteps.PATTERNS) + ["zigzag"]), st.integers(-2, 15) | F,
                                st.none() | st.lists(F, max_size=5)),
    "banksteps.plan_steps": A(F, RATINGS, st.lists(st.integers(-1, 8), max_size=6)),
    "banksteps.plan_steps_many": A(F, RATINGS, st.lists(st.lists(st.integers(-1, 8), max_size=6), max_size=4)),
    "banksteps.best_step_count": A(F, RATINGS, st.sampled_from(["equal", "one_two", "binary", "zigzag"])),
    "stepcombos.combinations": A(st.lists(F, max_size=6)),
    "stepcombos.light_load_check": A(LOAD, st.lists(F, max_size=5), F),
    # busscan
    "busscan.bus_model": A(F, F, F, F, OPT, OPT, OPT),
    "busscan.capacitor_reactance": A(F, F),
    "busscan.bus_admittance": A(MODEL, F, F),
    "busscan.bus_impedance": A(MODEL, F, F),
    "busscan.cumulative_steps": A(st.lists(F, max_size=5)),
    "busscan.find_peak": A(MODEL, F, H, H),
    "busscan.scan_orders": A(H, H, _bounded(0.05, 10.0)),
    "busscan.scan": A(MODEL, st.lists(F, max_size=3)),
    "busscan.supply_scan": A(MODEL),
    # capacitor
    "capacitor.output_factor": A(F, F, F, F),
    "capacitor.output_at": A(F, F, F, F, F),
    "capacitor.rating_for": A(F, F, F, F, F),
    "capacitor.capacitance_uf": A(F, F, F, CONN2, PHASES),
    "capacitor.kvar_from_uf": A(F, F, F, CONN2, PHASES),
    "capacitor.element_voltage": A(F, CONN2, PHASES),
    "capacitor.line_current": A(F, F, PHASES),
    "capacitor.duty": A(F, F, F, F),
    "capacitor.conductor_basis": A(F, st.sampled_from(["nec", "iec", "cec"])),
    "capacitor.protection_range": A(F),
    # capduty
    "capduty.ieee519_voltage_limits": A(F),
    "capduty.voltage_ratio_plausible": A(F, F),
    "capduty.thd_percent": A(SPECTRUM),
    "capduty.check_spectrum": A(SPECTRUM),
    "capduty.duty_from_capacitor_voltages": A(SPECTRUM, F),
    "capduty.capacitor_duty": A(F, F, SPECTRUM, st.sampled_from(["voltage", "current", "power"]), F, F),
    "capduty.rated_current_a": A(F, F, PHASES),
    "capduty.profile_check": A(st.dictionaries(st.sampled_from(["v_rms", "v_peak", "i_rms", "kvar", "x"]), F), PROFILE),
    # complexparse
    "complexparse.parse_complex": A(TEXT, UNIT),
    # correction
    "correction.pf_sense": A(F, F),
    "correction.tan_phi": A(F),
    "correction.kvar_per_kw": A(F, F),
    "correction.required_kvar": A(F, F, F),
    "correction.line_current": A(F, F, PHASES),
    "correction.apparent_from_vi": A(F, F, PHASES),
    "correction.load_from_p_pf": A(F, F, BOOL),
    "correction.load_from_s_pf": A(F, F, BOOL),
    "correction.load_from_p_q": A(F, F),
    "correction.load_from_v_i_pf": A(F, F, F, PHASES, BOOL),
    "correction.load_from_v_i_p": A(F, F, F, PHASES, BOOL),
    "correction.pf_from_energy": A(F, F),
    "correction.load_from_energy": A(F, F, OPT, OPT),
    "correction.load_from_demand": A(F, F),
    "correction.hp_to_kw": A(F),
    "correction.kva_released": A(LOAD, LOAD),
    "correction.current_reduction_fraction": A(F, F),
    "correction.loss_reduction_fraction": A(F, F),
    # detuning
    "detuning.tuning_order": A(F),
    "detuning.detuning_factor": A(F),
    "detuning.capacitor_voltage": A(F, F),
    "detuning.capacitor_rated_kvar": A(F, F, F, F),
    "detuning.branch_output_kvar": A(F, F, F, F),
    "detuning.choose_rated_voltage": A(F, F),
    "detuning.design_branch": A(F, F, F, F, F),
    "detuning.branch_impedance": A(F, F, F),
    "detuning.bus_impedance": A(F, F, F, F),
    "detuning.bus_resonance_order": A(F, F, F),
    # harmonicbus
    "harmonicbus.build_bus": A(F, F, F, F, OPT, OPT, OPT, OPT, OPT, F, st.lists(HSTEP, max_size=3),
                               st.sampled_from(["constant", "sqrt", "cubic"]), F, F),
    "harmonicbus.supply_impedance": A(HBUS, F),
    "harmonicbus.base_admittance": A(HBUS, F),
    "harmonicbus.bus_impedance": A(HBUS, IDX, F),
    "harmonicbus.solve": A(HBUS, IDX, HSPEC),
    "harmonicbus.capacitor_voltage_pu": A(HBUS, st.integers(-1, 3), HSPEC),
    "harmonicbus.rated_current_a": A(HBUS, st.integers(-1, 3)),
    "harmonicbus.with_steps": A(HBUS, st.lists(HSTEP, max_size=3)),
    "harmonicbus.impedance_curve": A(HBUS, IDX, H, H, _bounded(0.05, 10.0)),
    # harmonicsources
    "harmonicsources.check_orders": A(HSPEC, BOOL),
    "harmonicsources.fundamental_current_a": A(F, F, F),
    "harmonicsources.typical_injection": A(KIND, F, F),
    "harmonicsources.injection_from_percent": A(HSPEC, F),
    "harmonicsources.combine": A(st.lists(HSPEC, max_size=3)),
    "harmonicsources.injection_from_voltage": A(HBUS, IDX, HSPEC),
    "harmonicsources.voltage_percent": A(HBUS, IDX, HSPEC),
    "harmonicsources.screening_orders": A(HSPEC, st.integers(-1, 60)),
    # harmonicstudy
    "harmonicstudy.combo_label": A(IDX),
    "harmonicstudy.run_study": A(HBUS, HSPEC, F, PROFILE),
    "harmonicstudy.lowest_harmonic": A(HSPEC),
    "harmonicstudy.fitting_factors": A(F),
    "harmonicstudy.recommend": A(STUDY),
    "harmonicstudy.demo_six_step": A(),
    "harmonicstudy.tuned_onto": A(F, st.lists(st.integers(-2, 50), max_size=4)),
    # ieee519
    "ieee519.current_limits": A(F),
    "ieee519.individual_current_limit": A(ORDERS, F),
    "ieee519.check": A(HSPEC, HSPEC, F, F),
    # resonancescreen
    "resonancescreen.band_hits": A(F, F, st.lists(st.integers(-2, 50), max_size=4), F),
    "resonancescreen.resonance_orders": A(HBUS, IDX, F, F),
    "resonancescreen.tuning_orders": A(HBUS, IDX, F),
    "resonancescreen.screen": A(HBUS, st.lists(st.tuples(st.text(max_size=3), IDX), max_size=3),
                                st.lists(st.integers(-2, 50), max_size=4), HTOL, F),
    "resonancescreen.screen_bank": A(F, F, F, F, st.lists(st.tuples(st.text(max_size=3), st.lists(st.tuples(F, F),
                                                                                                   max_size=2)), max_size=2),
                                     st.lists(st.integers(-2, 50), max_size=4), OPT, OPT, F, HTOL, F),
    # motorcap
    "motorcap.magnetising_kvar": A(F, F),
    "motorcap.magnetising_kvar_estimate": A(F, F, F, F),
    "motorcap.max_capacitor_kvar": A(F, F),
    "motorcap.full_load_with_capacitor": A(F, F, F, F),
    "motorcap.capacitor_current": A(F, F),
    # numparse (any text)
    "numparse.split_number": A(TEXT),
    "numparse.unit_scale": A(st.text(max_size=8) | UNIT),
    "numparse.parse_quantity": A(TEXT, UNIT),
    "numparse.parse_number": A(TEXT),
    # phasor
    "phasor.to_polar": A(C),
    "phasor.from_polar": A(F, F),
    "phasor.admittance": A(C),
    "phasor.impedance": A(C),
    "phasor.reactance_inductor": A(F, F),
    "phasor.reactance_capacitor": A(F, F),
    "phasor.series": A(st.lists(C, max_size=5)),
    "phasor.parallel": A(st.lists(C, max_size=5)),
    "phasor.delta_to_wye": A(C, C, C),
    "phasor.wye_to_delta": A(C, C, C),
    "phasor.series_equivalent": A(C),
    "phasor.parallel_equivalent": A(C),
    "phasor.element_for_reactance": A(F, F),
    "phasor.phase_angle": A(C),
    "phasor.power_factor": A(C),
    "phasor.branch_impedance": A(st.sampled_from(["R", "L", "C", "Q"]), F, F),
    "phasor.network_impedance": A(st.lists(st.tuples(st.sampled_from("RLC"), F), max_size=4), F, TOPO),
    # resonance
    "resonance.resonant_frequency": A(F, F),
    "resonance.characteristic_impedance": A(F, F),
    "resonance.capacitance_for": A(F, F),
    "resonance.inductance_for": A(F, F),
    "resonance.quality_factor": A(OPT, F, F, TOPO),
    "resonance.half_power_frequencies": A(OPT, F, F, TOPO),
    "resonance.impedance": A(OPT, F, F, F, TOPO),
    "resonance.phase_deg": A(C),
    "resonance.log_space": A(F, F, st.integers(-1, 50)),
    "resonance.response": A(OPT, F, F, st.lists(F, max_size=4), TOPO),
    "resonance.analyse": A(OPT, F, F, TOPO),
    # savings
    "savings.kva_demand": A(F, F),
    "savings.kva_demand_saving": A(F, F, F, F),
    "savings.penalty_steps": A(F, F, st.sampled_from(list(savings.ROUNDINGS) + ["up"]), F),
    "savings.pf_penalty": A(F, F, F, st.sampled_from(["percent", "amount", "other"]), OPT,
                            st.sampled_from(list(savings.ROUNDINGS))),
    "savings.kvarh_for_pf": A(F, F),
    "savings.kvarh_chargeable": A(F, F, F),
    "savings.loss_after_kw": A(F, F, F),
    "savings.loss_saving": A(F, F, F, F, F),
    "savings.yearly": A(F),
    "savings.simple_payback_years": A(F, F),
    # supply
    "supply.transformer_short_circuit_kva": A(F, F, OPT),
    "supply.resonance_order": A(F, F),
    "supply.voltage_rise_percent": A(F, F),
    "supply.bank_fits_bus": A(F, F),
    # survey
    "survey.parse_pf": A(TEXT),
    "survey.reactive_per_kw": A(F, BOOL),
    "survey.correction_kvar": A(F, F, F),
    # the references table: any key of it (an unknown key is a programming error, caught at import)
    "references.ref": A(st.sampled_from(sorted(references.REFERENCES))),
    "references.cite": A(st.sampled_from(sorted(references.REFERENCES)), st.sampled_from(sorted(references.REFERENCES))),
    "survey.make_load": A(st.text(max_size=5), F, OPT, BOOL, OPT, OPT, OPT),
    "survey.row_totals": A(SLOAD, F),
    "survey.survey_totals": A(st.lists(SLOAD, max_size=4), F),
    # load profiles and the pieces the correction worksheet will call
    "pfparse.parse_pf": A(TEXT),
    "pfparse.parse_lagging_pf": A(TEXT),
    "transformer.typical_no_load_pct": A(F),
    "transformer.reactive_kvar": A(F, F, F, F),
    "transformer.no_load_compensation_kvar": A(F, F),
    "transformer.kvar_for_primary_target": A(F, F, F, F, F, F),
    "bankoutput.with_bank_at": A(F, F, F, F, F, F, F),
    "bankoutput.kvar_to_switch_off": A(F, F, F),
    "profile_columns.parse_roles": A(TEXT | st.sampled_from(["time, kW, kvar", "date; time; kWh; kvarh lag", ""])),
    "profile_columns.header_role": A(TEXT | st.sampled_from(["Demand (MW)", "kvarh lead", "PF", "Status"])),
    "profile_columns.layout": A(st.lists(st.sampled_from(sorted(PROFILE_ROLES)) | st.text(max_size=4), max_size=5)),
    "profile_time.split_stamp": A(TEXT | PSTAMP),
    "profile_time.time_of_day": A(TEXT | st.sampled_from(["7:15", "24:00", "12:30 PM", "13:00 am", "23:61"])),
    "profile_time.date_parts": A(TEXT | PSTAMP),
    "profile_time.ordinal": A(st.tuples(st.integers(), st.integers(), st.integers(), BOOL), st.sampled_from(["dmy", "mdy", "x"])),
    "profile_time.resolve_order": A(st.lists(TEXT | PSTAMP, max_size=4), st.sampled_from(["auto", "dmy", "mdy", "x"])),
    "profile_time.month_of": A(st.integers()),
    "profile_time.stamp_text": A(st.integers()),
    "profile_sequence.order_rows": A(INTS, INTS, st.lists(st.lists(F, max_size=6), max_size=2),
                                     st.sampled_from([(5, 15), (60,), ()]), F),
    "profile_read.read_profile": A(TEXT | PTEXT),
    "profile_reactive.reactive": A(st.dictionaries(st.sampled_from(sorted(PROFILE_ROLES)), LIST3, max_size=3),
                                   st.dictionaries(st.sampled_from(sorted(PROFILE_ROLES)), F, max_size=3),
                                   st.sampled_from(["kvar", "lag_lead", "kva", "pf", "x"]), LIST3),
    "profile_reactive.layout_words": A(st.sampled_from(["kw", "kwh", "x"]), st.sampled_from(["kvar", "lag_lead", "kva", "pf", "x"]),
                                       st.lists(st.sampled_from(sorted(PROFILE_ROLES)), max_size=4)),
    "profile_stats.billing_pf": A(F, F),
    "profile_stats.totals": A(LIST3, LIST3, F),
    "profile_stats.needs": A(LIST3, LIST3, F),
    "profile_stats.quantile_low": A(LIST3.map(sorted), F),
    "profile_stats.kvar_for_share": A(LIST3, LIST3, F, F),
    "profile_stats.kvar_for_billing": A(LIST3, LIST3, F, F, st.sampled_from(["net", "lagging", "x"])),
    "profile_stats.kvar_kept_lagging": A(LIST3, LIST3, F),
    "profile_stats.pf_per_interval": A(LIST3, LIST3),
    "profile_stats.duration": A(LIST3),
    "profile_stats.curve_points": A(LIST3, st.integers(-2, 300)),
    "profile_stats.daily_profile": A(INTS, LIST3, LIST3, st.integers(-10, 10**6)),
    "profile_control.step_choice": A(F, F, LIST3.map(sorted)),
    "profile_control.simulate": A(INTS, LIST3, LIST3, st.integers(-10, 10**6),
                                  st.builds(profile_control.Bank, F, st.lists(F, max_size=3).map(tuple)), F,
                                  st.sampled_from(["net", "lagging", "x"])),
    "profile_demo.demo_rows": A(st.integers(-1, 2), st.sampled_from([5, 15, 60, 7, 0, -5])),
    "profile_demo.demo_text": A(st.integers(-1, 2), st.sampled_from([5, 15, 60, 7, 0, -5])),
    "profile_demo.read_and_analyse": A(TEXT | PTEXT, F, F),
}

# Switching, discharge, protection, cable, step plans, bank losses, health verdicts, order list.
STEPC = st.builds(inrush.StepCircuit, F, F, F, F)
PROFILE = st.sampled_from(["nec", "iec", "csa"])
VERDICT = st.builds(healthverdict.PhaseVerdict, st.sampled_from(list(healthverdict.STATES)), st.just(""), F, F, st.just(""))


def _bank_or_none(args):
    try:
        return orderlist.design_bank(*args)
    except InputError:
        return None


BANK = st.builds(_bank_or_none, st.lists(_bounded(1.0, 200.0), min_size=1, max_size=3).flatmap(
    lambda q: st.tuples(st.just(q), st.just([(x,) for x in q]), _bounded(200, 800), st.just(50.0), _bounded(200, 800),
                        st.just(50.0), CONN2.filter(lambda c: c != "star"), st.sampled_from([0.0, 0.07]),
                        st.sampled_from(["nec", "iec"]), st.none() | _bounded(1e3, 1e5)))).filter(lambda b: b is not None)
ROWS = BANK.map(orderlist.order_rows)

CASES.update({
    "inrush.wye_capacitance_f": A(F, F, F),
    "inrush.source_inductance_h": A(F, F, F),
    "inrush.connection_inductance_h": A(F, F),
    "inrush.step_circuit": A(F, F, F, F, F),
    "inrush.ringing": A(F, F, F),
    "inrush.isolated": A(STEPC, F, F),
    "inrush.back_to_back": A(STEPC, st.lists(STEPC, max_size=3), F),
    "inrush.bank_inrush": A(st.lists(STEPC, max_size=3), F, OPT, OPT),
    "inrush.limiting_inductance_h": A(st.lists(STEPC, max_size=3), F, OPT, OPT),
    "discharge.element_capacitance_f": A(F, F, F, CONN2),
    "discharge.residual_v": A(F, F, F, F),
    "discharge.time_to_v": A(F, F, F, F),
    "discharge.discharge_resistor": A(F, F, F, CONN2, st.sampled_from(["nec", "iec", "x"])),
    "discharge.fast_discharge": A(F, F, F, CONN2, F),
    "discharge.reclose_delay_s": A(F, F),
    "protection.fuse": A(F, st.sampled_from(["iec", "nec", "x"])),
    "numtext.sig": A(F, st.integers(1, 6)),
    "protection.breaker": A(F, st.sampled_from(["iec", "nec", "x"])),
    "protection.contactor": A(F, BOOL, F, F, PROFILE),
    "cables.check_rows": A(st.lists(st.tuples(st.text(max_size=4), F), max_size=4)),
    "cables.cable_for": A(F, st.sampled_from(list(cables.TABLES.values())), F),
    "stepplans.controller_holds": A(LOAD, st.lists(F, max_size=4), F),
    "stepplans.three_plans": A(F, RATINGS, F, LOAD, F, st.none() | LOAD, st.integers(0, 13)),
    "stepplans.ck_setting_a": A(F, F, F, F),
    "banklosses.bank_losses": A(F, F, F, F, F),
    "savings.net_of_bank_losses": A(F, F, F, F),
    "healthverdict.phase_verdict": A(F, BAND, F, OPT, OPT),
    "healthverdict.bank_state": A(st.lists(VERDICT, max_size=3)),
    "healthverdict.terminal_readings": A(LIST3, CONN),
    "healthverdict.terminal_ratio": A(LIST3, CONN, F),
    "healthverdict.ratio_of_readings": A(LIST3, F),
    "healthverdict.star_point": A(LIST3, F, F),
    "healthverdict.uncertainty_between": A(LIST3, CONN, F),
    "healthverdict.uncertainty_currents": A(LIST3, F, F, CONN, F, F),
    "orderlist.design_bank": A(st.lists(F, max_size=3), st.lists(st.lists(F, max_size=2), max_size=3), F, F, F, F, CONN2,
                               F, PROFILE, OPT),
    "orderlist.order_rows": A(BANK),
    "orderlist.as_table": A(ROWS),
    "orderlist.as_text": A(ROWS),
    "orderlist.merge_alike_steps": A(ROWS),
})

# The dynamic-programming searches are the slow ones: fewer examples keep the file quick.
SLOW = {"banksteps.best_step_count": 40, "banksteps.plan_steps": 100, "banksteps.plan_steps_many": 60, "busscan.scan": 60, "busscan.find_peak": 100,
        "busscan.supply_scan": 40, "stepplans.three_plans": 30, "orderlist.design_bank": 60, "orderlist.order_rows": 20,
        "orderlist.as_table": 10, "orderlist.as_text": 10, "orderlist.merge_alike_steps": 10, "inrush.limiting_inductance_h": 80,
        "harmonicstudy.demo_six_step": 3, "harmonicstudy.recommend": 30,
        "harmonicstudy.run_study": 80, "harmonicbus.impedance_curve": 60,
        "profile_demo.read_and_analyse": 40, "profile_read.read_profile": 100}


def _public_functions():
    names = set()
    for info in pkgutil.iter_modules(pycore.__path__):
        mod = importlib.import_module(f"pycore.{info.name}")
        for n, obj in vars(mod).items():
            if info.name == "errors":  # the guard decorator itself, tested below
                continue
            if not n.startswith("_") and inspect.isfunction(obj) and obj.__module__ == mod.__name__:
                names.add(f"{info.name}.{n}")
    return names


def test_every_public_function_is_sampled():
    assert _public_functions() == set(CASES)


def _resolve(name):
    mod, fn = name.split(".")
    return getattr(importlib.import_module(f"pycore.{mod}"), fn)


@pytest.mark.parametrize("name", sorted(CASES))
def test_finite_input_gives_a_value_without_nan_or_an_input_error(name):
    fn, strat = _resolve(name), CASES[name]

    @settings(SETTINGS, max_examples=SLOW.get(name, 200))
    @given(strat)
    def run(case):
        args, kwargs = case
        _call(fn, args, kwargs)

    run()


# Methods and properties of the core's result types, on any finite values.


@SETTINGS
@given(load=LOAD, v=F, phases=PHASES, q=F)
def test_load_methods(load, v, phases, q):
    for name in ("s_kva", "pf", "phi_deg", "sense"):
        _call(lambda n=name: getattr(load, n), ())
    _call(load.current, (v, phases))
    _call(load.corrected, (q,))


@SETTINGS
@given(v=F, v_rated=F, f=F, f_rated=F)
def test_duty_over_limits(v, v_rated, f, f_rated):
    d = _call(capacitor.duty, (v, v_rated, f, f_rated))
    if d is not None:
        _call(d.over_limits, ())


@SETTINGS
@given(u=F, u_bus=F, spec=SPECTRUM, p=F)
def test_capduty_against_limits(u, u_bus, spec, p):
    d = _call(capduty.capacitor_duty, (u, u_bus, spec, "voltage", p))
    if d is not None:
        _call(d.against_limits, ())


@SETTINGS
@given(args=st.tuples(F, F, F, F, F))
def test_detuned_branch_ratio(args):
    br = _call(detuning.design_branch, args)
    if br is not None:
        _call(lambda: br.voltage_ratio_percent, ())


@settings(SETTINGS, max_examples=60)
@given(need=F, ratings=RATINGS, weights=st.lists(st.integers(1, 6), min_size=1, max_size=4))
def test_step_plan_methods(need, ratings, weights):
    plan = _call(banksteps.plan_steps, (need, ratings, weights))
    if plan is not None:
        _call(plan.all_units, ())
        _call(plan.counts, ())
        assert plan.total >= need * (1 - 1e-9)


def test_guard_turns_arithmetic_failures_into_input_errors():
    @guarded
    def divide(a, b):
        return a / b

    @guarded
    def nan_in_a_tuple(x):
        return (x, x * math.inf - math.inf)

    @guarded
    def refuses(x):
        raise InputError("Enter a value.")

    assert divide(1.0, 2.0) == 0.5
    with pytest.raises(InputError, match="too large or too small"):
        divide(1.0, 0.0)
    with pytest.raises(InputError, match="too large or too small"):
        nan_in_a_tuple(1.0)
    with pytest.raises(InputError, match="Enter a value"):
        refuses(1.0)
    assert divide.__doc__ is None and divide.__name__ == "divide"


def test_sampling_helpers_see_nan():
    # the NaN detector used above must itself find NaN where it is hidden
    assert _nan_inside(float("nan"))
    assert _nan_inside(complex(0, float("nan")))
    assert _nan_inside([(1.0, {2: float("nan")})])
    assert _nan_inside(correction.Load(1.0, float("nan")))
    assert not _nan_inside((1.0, math.inf, "x", None, complex(math.inf, 0)))
