"""pycore.banksteps: least-excess unit selection and step plans.

The reference for the selections is a brute-force enumeration written here, independent of the
dynamic program in the module.
"""

import itertools
import math

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from pycore import banksteps
from pycore.errors import InputError

STOCK = [5, 10, 12.5, 15, 20, 25, 30, 40, 50]


def brute_least_excess(need, ratings):
    """Smallest achievable sum ≥ need and the fewest units for it, by enumerating counts."""
    best = None
    rs = sorted(ratings)
    ranges = [range(0, int(math.ceil(need / r)) + 1) for r in rs]
    for counts in itertools.product(*ranges):
        tot = sum(c * r for c, r in zip(counts, rs))
        if tot + 1e-9 < need:
            continue
        key = (round(tot, 6), sum(counts))
        if best is None or key < best:
            best = key
    return best


@pytest.mark.parametrize(
    "need,ratings",
    [
        (198.9, [12.5, 25, 40, 50]),
        (37.6, [12.5, 25]),
        (3.0, [5, 10]),
        (61.0, [7.5, 20, 33.3]),
        (150.0, [10, 25, 60]),
        (99.9, [15, 40, 50]),
        (1.0, [2.5]),
        (121.0, [5, 12.5, 30, 50]),
        # a fine common grid (0.005 kvar) beside a large unit: the least sum must not jump to the
        # large unit (a 400 kvar unit was once chosen for 36.7 kvar)
        (36.7, [12.345, 400]),
        (350.0, [12.345, 400]),
        (150.0, [41.67, 500]),
    ],
)
def test_select_units_matches_brute_force(need, ratings):
    sel = banksteps.select_units(need, ratings)
    ref_total, ref_count = brute_least_excess(need, ratings)
    assert sel.total == pytest.approx(ref_total, abs=1e-6)
    assert len(sel.units) == ref_count
    assert sum(sel.units) == pytest.approx(sel.total)
    assert all(u in ratings for u in sel.units)


def test_select_units_large_need_prefill_still_exact():
    # 5 and 10 kvar units: the least sum at or above 9000.3 kvar is 9005 kvar (arithmetic)
    sel = banksteps.select_units(9000.3, [5, 10], max_states=100)
    assert sel.total == pytest.approx(9005.0)
    assert len(sel.units) == 901  # 900 × 10 + 1 × 5, the fewest


def test_least_sum_stays_exact_when_the_table_is_capped():
    # 29 × 12.345 = 358.005 kvar is the least sum ≥ 350 kvar from {12.345, 400} (brute force above);
    # with the coin-change table capped far below it, the residue search still finds it exactly
    sel = banksteps.select_units(350.0, [12.345, 400], max_states=25_000)
    assert sel.total == pytest.approx(358.005)
    assert sum(sel.units) == pytest.approx(358.005)


@settings(max_examples=60, deadline=None)
@given(
    need=st.floats(min_value=0.5, max_value=400.0),
    ratings=st.lists(st.integers(min_value=500, max_value=100_000).map(lambda n: n / 1000), min_size=1, max_size=3, unique=True),
)
def test_select_units_least_excess_matches_brute_force_on_random_ratings(need, ratings):
    """Random ratings with up to three decimals (grids down to 0.001 kvar) against enumeration."""
    sizes = [math.ceil(need / r) + 1 for r in ratings]
    assume(math.prod(sizes) <= 20_000)
    sel = banksteps.select_units(need, ratings)
    ref_total, ref_count = brute_least_excess(need, ratings)
    assert sel.total == pytest.approx(ref_total, abs=1e-6)
    assert len(sel.units) == ref_count
    assert sum(sel.units) == pytest.approx(sel.total)


def test_too_many_units_refused():
    with pytest.raises(InputError):
        banksteps.select_units(1_000_000, [5, 10])
    with pytest.raises(InputError):
        banksteps.plan_steps(2000, [1.001, 50], banksteps.step_weights("binary", 12))


def test_select_nothing_needed():
    assert banksteps.select_units(0, STOCK).units == ()


@pytest.mark.parametrize("bad", [[], [0], [-5], [float("nan")]])
def test_bad_ratings(bad):
    with pytest.raises(InputError):
        banksteps.select_units(10, bad)


def test_step_weights_patterns():
    assert banksteps.step_weights("equal", 4) == [1, 1, 1, 1]
    assert banksteps.step_weights("one_two", 5) == [1, 2, 2, 2, 2]
    assert banksteps.step_weights("binary", 4) == [1, 2, 4, 8]
    assert banksteps.step_weights("custom", custom=[25, 50, 50, 100]) == [1, 2, 2, 4]
    assert banksteps.step_weights("custom", custom=[1, 1.5]) == [2, 3]
    with pytest.raises(InputError):
        banksteps.step_weights("custom", custom=[1, math.pi])
    with pytest.raises(InputError):
        banksteps.step_weights("equal", 13)
    with pytest.raises(InputError):
        banksteps.step_weights("equal", 0)


def _buildable(ratings, upto):
    """All sums of units up to ``upto`` (brute force, on a 0.01 kvar lattice)."""
    reach = {0}
    frontier = {0}
    while frontier:
        nxt = set()
        for s in frontier:
            for r in ratings:
                t = round(s + r * 100)
                if t <= upto * 100 and t not in reach:
                    nxt.add(t)
        reach |= nxt
        frontier = nxt
    return sorted(x / 100 for x in reach if x > 0)


@pytest.mark.parametrize(
    "need,pattern,n",
    [(198.9, "one_two", 6), (198.9, "equal", 4), (198.9, "binary", 4), (75.0, "equal", 3), (301.0, "one_two", 8)],
)
def test_plan_steps_least_excess_against_enumeration(need, pattern, n):
    w = banksteps.step_weights(pattern, n)
    plan = banksteps.plan_steps(need, STOCK, w)
    # reference: the smallest buildable base b with b·Σw ≥ need
    cands = [b for b in _buildable(STOCK, need / sum(w) + max(STOCK)) if b * sum(w) >= need - 1e-9]
    b_ref = min(cands)
    assert plan.base == pytest.approx(b_ref)
    assert plan.total == pytest.approx(b_ref * sum(w))
    for size, units, wi in zip(plan.steps, plan.units, w):
        assert size == pytest.approx(wi * b_ref)
        assert sum(units) == pytest.approx(size)
        assert all(u in STOCK for u in units)


@settings(max_examples=80, deadline=None)
@given(
    need=st.floats(min_value=0.5, max_value=900.0),
    ratings=st.lists(st.sampled_from([2.5, 5, 7.5, 10, 12.5, 15, 20, 25, 33.3, 50, 100]), min_size=1, max_size=4, unique=True),
    weight_lists=st.lists(st.lists(st.integers(1, 64), min_size=1, max_size=6), min_size=1, max_size=8),
)
def test_plan_steps_many_is_plan_steps_for_each(need, ratings, weight_lists):
    # the batch works the grid and each Σw's base out once: every plan must be the one plan_steps
    # (checked above against enumeration) gives for those weights alone, None where it refuses
    many = banksteps.plan_steps_many(need, ratings, weight_lists)
    assert len(many) == len(weight_lists)
    for w, got in zip(weight_lists, many):
        try:
            one = banksteps.plan_steps(need, ratings, w)
        except InputError:
            one = None
        assert got == one


@settings(max_examples=150, deadline=None)
@given(
    need=st.floats(min_value=0.5, max_value=400.0),
    ratings=st.lists(st.sampled_from([2.5, 5, 7.5, 10, 12.5, 15, 20, 25, 50]), min_size=1, max_size=4, unique=True),
    weight_lists=st.lists(st.lists(st.integers(1, 16), min_size=1, max_size=6), min_size=2, max_size=8),
    max_states=st.integers(5, 60),
)
def test_plan_steps_many_shares_step_units_beyond_a_small_table(need, ratings, weight_lists, max_states):
    # a small table puts steps beyond it, where their units may be the base's own: a step of the same
    # size in two plans of different bases must still get each plan's own units, as plan_steps gives
    many = banksteps.plan_steps_many(need, ratings, weight_lists, max_states)
    for w, got in zip(weight_lists, many):
        try:
            one = banksteps.plan_steps(need, ratings, w, max_states)
        except InputError:
            one = None
        assert got == one


def test_plan_steps_many_keeps_each_base_beyond_the_table():
    # a table of 6 grid steps: 7 × 50 and 10 × 35 kvar are the same 350 kvar step beyond the table,
    # each made from its own base's units; the batch must not hand one plan's units to the other
    need, ratings, lists = 333.5, [20, 7.5, 12.5], [[7], [13], [10]]
    many = banksteps.plan_steps_many(need, ratings, lists, 6)
    assert many == [banksteps.plan_steps(need, ratings, w, 6) for w in lists]


def test_plan_prefers_single_units():
    # 220 kvar as 1:2:2:2:2:2 → 20 + 5 × 40: each step one purchasable unit (fewest units)
    plan = banksteps.plan_steps(198.9, STOCK, [1, 2, 2, 2, 2, 2])
    assert [len(u) for u in plan.units] == [1] * 6


def test_best_step_count_against_enumeration():
    # 13.8 kvar from 2.5 and 5 kvar units in 1:2:2… steps: enumerate every count independently
    need, stock = 13.8, [2.5, 5]
    totals = {}
    for n in range(1, 13):
        wsum = 1 + 2 * (n - 1)
        b = min(x for x in _buildable(stock, need / wsum + 5) if x * wsum >= need - 1e-9)
        totals[n] = b * wsum
    least = min(totals.values())
    n_ref = max(n for n, t in totals.items() if abs(t - least) < 1e-9)
    n, plan = banksteps.best_step_count(need, stock, "one_two")
    assert n == n_ref
    assert plan.total == pytest.approx(least)
