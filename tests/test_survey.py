"""pycore.survey: load-table totals, overall PF and correction kvar, checked against independent
numpy sums and the IEEE Std 141 kvar-per-kW multiplier."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pycore import survey
from pycore.errors import InputError


# --- power factor text -------------------------------------------------------------------------

@pytest.mark.parametrize(
    "text, pf, leading",
    [
        ("0.85", 0.85, False),
        ("0,85", 0.85, False),  # comma decimal mark
        ("85%", 0.85, False),
        ("85 % lag", 0.85, False),
        ("0.8 lagging", 0.8, False),
        ("0.92 lead", 0.92, True),
        ("0.92 Leading", 0.92, True),
        ("0.9cap", 0.9, True),
        ("1", 1.0, False),
    ],
)
def test_parse_pf_accepts_field_spellings(text, pf, leading):
    got, lead = survey.parse_pf(text)
    assert got == pytest.approx(pf, abs=1e-12)
    assert lead is leading


@pytest.mark.parametrize("text, words", [
    ("1.2", "impossible"),
    ("120%", "impossible"),
    ("0", "no real power"),  # the shared reader (pycore.pfparse) words it
    ("-0.9", "lead"),
    ("0.9 sideways", "not a power factor"),
    ("fast", "number"),
])
def test_parse_pf_refuses_with_a_reason(text, words):
    with pytest.raises(InputError, match=words):
        survey.parse_pf(text)


# --- kvar per kW: IEEE Std 141 multiplier table --------------------------------------------------

# IEEE Std 141 (Red Book), power-factor chapter, table of kW multipliers for kvar (from memory;
# tables print 3 decimals and some truncate, so compare within ±0.001).
RED_BOOK_MULTIPLIERS = [
    (0.70, 0.90, 0.536),
    (0.70, 1.00, 1.020),
    (0.80, 0.95, 0.421),
    (0.80, 1.00, 0.750),
    (0.85, 0.95, 0.291),
    (0.90, 0.95, 0.156),
]


@pytest.mark.parametrize("pf1, pf2, k", RED_BOOK_MULTIPLIERS)
def test_correction_per_kw_matches_red_book_multipliers(pf1, pf2, k):
    q1 = 100.0 * survey.reactive_per_kw(pf1)
    assert survey.correction_kvar(100.0, q1, pf2) / 100.0 == pytest.approx(k, abs=1.0e-3)


def test_reactive_per_kw_against_numpy_trig():
    # independent route: numpy tan(arccos pf)
    for pf in np.linspace(0.05, 1.0, 40):
        assert survey.reactive_per_kw(float(pf)) == pytest.approx(float(np.tan(np.arccos(pf))), rel=1e-12, abs=1e-12)
        assert survey.reactive_per_kw(float(pf), leading=True) == pytest.approx(-float(np.tan(np.arccos(pf))), rel=1e-12, abs=1e-12)


def test_correction_is_zero_for_leading_or_already_good_loads():
    assert survey.correction_kvar(100, -20, 0.95) == 0.0  # leading: capacitors make it worse
    assert survey.correction_kvar(100, 10, 0.95) == 0.0  # PF 0.995 already above 0.95
    assert survey.correction_kvar(100, 0, 1.0) == 0.0


# --- rows ----------------------------------------------------------------------------------------

def test_make_load_needs_pf_or_q():
    with pytest.raises(InputError, match="PF or Q"):
        survey.make_load("Fan", 10)


def test_make_load_refuses_impossible_values():
    with pytest.raises(InputError, match="impossible"):
        survey.make_load("Fan", 10, pf=1.3)
    with pytest.raises(InputError, match="negative"):
        survey.make_load("Fan", -10, pf=0.8)
    with pytest.raises(InputError, match="Quantity"):
        survey.make_load("Fan", 10, pf=0.8, quantity=-1)
    with pytest.raises(InputError, match="0 to 24"):
        survey.make_load("Fan", 10, pf=0.8, hours=25)
    # an idle load (P = 0) with a PF carries no Q either: it counts for nothing
    assert survey.make_load("Spare feeder", 0, pf=0.8).q_kvar == 0.0


def test_make_load_pf_and_q_must_agree():
    # P = 30 kW, Q = 40 kvar is the 3-4-5 triangle: PF 0.6 lagging (circuit theory)
    ld = survey.make_load("Kiln", 30, pf=0.6, q_kvar=40)
    assert ld.q_kvar == 40
    with pytest.raises(InputError, match="disagree"):
        survey.make_load("Kiln", 30, pf=0.8, q_kvar=40)
    with pytest.raises(InputError, match="disagree"):
        survey.make_load("Kiln", 30, pf=0.6, leading=True, q_kvar=40)  # same PF, wrong sign


def test_pf_row_gives_q_of_the_power_triangle():
    # 3-4-5 triangle: P 40 kW at PF 0.8 → Q 30 kvar (circuit theory)
    assert survey.make_load("M", 40, pf=0.8).q_kvar == pytest.approx(30.0, rel=1e-12)
    assert survey.make_load("M", 40, pf=0.8, leading=True).q_kvar == pytest.approx(-30.0, rel=1e-12)


# --- totals against independent numpy sums --------------------------------------------------------

def _numpy_reference(p, pf, lead, qty, hours, target):
    """Totals computed independently with numpy arrays (S = ΣP + jΣQ; kvar = Q − P·tan φ_t)."""
    p, pf, qty, hours = map(np.asarray, (p, pf, qty, hours))
    sign = np.where(lead, -1.0, 1.0)
    q_each = sign * p * np.tan(np.arccos(pf))
    P = np.sum(p * qty)
    Q = np.sum(q_each * qty)
    S = np.abs(P + 1j * Q)
    tan_t = np.tan(np.arccos(target))
    central = max(0.0, Q - P * tan_t)
    individual = np.sum(np.maximum(0.0, q_each - p * tan_t) * qty)
    kwh = np.sum(p * qty * hours)
    return P, Q, S, P / S, central, individual, kwh


def test_totals_match_numpy_on_a_random_plant():
    rng = np.random.default_rng(20240611)
    n = 300
    p = rng.uniform(0.2, 250.0, n)
    pf = rng.uniform(0.55, 1.0, n)
    lead = rng.random(n) < 0.1
    qty = rng.integers(1, 12, n).astype(float)
    hours = rng.uniform(0, 24, n)
    loads = [survey.make_load(f"L{i}", float(p[i]), pf=float(pf[i]), leading=bool(lead[i]),
                              quantity=float(qty[i]), hours=float(hours[i])) for i in range(n)]
    t = survey.survey_totals(loads, 0.95)
    P, Q, S, PF, central, individual, kwh = _numpy_reference(p, pf, lead, qty, hours, 0.95)
    assert t.p_kw == pytest.approx(P, rel=1e-12)
    assert t.q_kvar == pytest.approx(Q, rel=1e-10)
    assert t.s_kva == pytest.approx(S, rel=1e-12)
    assert t.pf == pytest.approx(PF, rel=1e-12)
    assert t.central_kvar == pytest.approx(central, rel=1e-10)
    assert t.individual_kvar == pytest.approx(individual, rel=1e-10)
    assert t.kwh_day == pytest.approx(kwh, rel=1e-12)
    assert t.units == pytest.approx(float(np.sum(qty)))


def test_overall_pf_is_from_summed_p_and_q_not_an_average():
    # Two loads: 100 kW at PF 0.6 (Q 133.3) and 100 kW at PF 1.0.
    # Summed: P 200, Q 133.33 → PF 200/|200 + j133.33| = 0.832; the average of PFs would be 0.8.
    loads = [survey.make_load("A", 100, pf=0.6), survey.make_load("B", 100, pf=1.0)]
    t = survey.survey_totals(loads, 0.95)
    q = 100 * np.tan(np.arccos(0.6))
    assert t.pf == pytest.approx(200 / np.hypot(200, q), rel=1e-12)
    assert abs(t.pf - 0.8) > 0.03
    assert t.pf_word == "lagging"


def test_q_rows_and_leading_rows():
    # A lagging 80 kW / 60 kvar load (PF 0.8) with a leading filter of 20 kvar at P = 0.
    loads = [survey.make_load("Press", 80, q_kvar=60), survey.make_load("Filter", 0, q_kvar=-20)]
    t = survey.survey_totals(loads, 0.95)
    assert t.q_kvar == pytest.approx(40.0)
    assert t.pf == pytest.approx(80 / math.hypot(80, 40), rel=1e-12)
    # central bank sees the filter's leading kvar; the individual sum does not
    tan_t = float(np.tan(np.arccos(0.95)))
    assert t.central_kvar == pytest.approx(40 - 80 * tan_t, rel=1e-12)
    assert t.individual_kvar == pytest.approx(60 - 80 * tan_t, rel=1e-12)


def test_central_bank_reaches_the_target():
    loads = [survey.make_load("A", 120, pf=0.72, quantity=2), survey.make_load("B", 35, pf=0.81, quantity=4)]
    t = survey.survey_totals(loads, 0.96)
    pf_after = t.p_kw / np.hypot(t.p_kw, t.q_kvar - t.central_kvar)
    assert pf_after == pytest.approx(0.96, abs=1e-12)
    assert t.s_after_central_kva == pytest.approx(t.p_kw / 0.96, rel=1e-12)  # S = P/PF
    assert t.kva_released == pytest.approx(t.s_kva - t.p_kw / 0.96, rel=1e-12)


def test_energy_counts_only_rows_with_hours():
    loads = [survey.make_load("A", 10, pf=0.8, quantity=3, hours=8), survey.make_load("B", 50, pf=0.9)]
    t = survey.survey_totals(loads, 0.95)
    assert t.rows_with_hours == 1
    assert t.kwh_day == pytest.approx(10 * 3 * 8)
    assert t.kvarh_day == pytest.approx(3 * 8 * 10 * np.tan(np.arccos(0.8)))
    t2 = survey.survey_totals([survey.make_load("B", 50, pf=0.9)], 0.95)
    assert t2.kwh_day is None


def test_zero_power_site_is_refused():
    with pytest.raises(InputError):
        survey.survey_totals([survey.make_load("Bank", 0, q_kvar=0)], 0.95)
    with pytest.raises(InputError):
        survey.survey_totals([survey.make_load("Bank", 0, q_kvar=-50)], 0.95)
    with pytest.raises(InputError):
        survey.survey_totals([], 0.95)


@settings(max_examples=200, deadline=None)
@given(
    st.lists(
        st.tuples(st.floats(0, 500), st.floats(0.3, 1.0), st.booleans(), st.integers(0, 20)),
        min_size=1, max_size=30,
    ),
    st.floats(0.8, 1.0),
)
def test_individual_sum_never_below_central_bank(rows, target):
    # Σ max(0, x_i) ≥ max(0, Σ x_i) for any reals (triangle inequality for the positive part)
    loads = [survey.make_load("x", p, pf=pf, leading=lead, quantity=n) for p, pf, lead, n in rows]
    if sum(p * n for p, _, _, n in rows) <= 0:
        return
    t = survey.survey_totals(loads, target)
    assert t.individual_kvar >= t.central_kvar - 1e-9 * max(1.0, t.central_kvar)
