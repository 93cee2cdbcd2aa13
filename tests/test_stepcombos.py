"""pycore.stepcombos: the totals a controller can switch, and the light-load check, against
subsets enumerated here and numpy."""

import itertools

import numpy as np
import pytest

from pycore import stepcombos
from pycore.correction import Load


@pytest.mark.parametrize("steps,count", [([20, 40, 40, 40, 40, 40], 11), ([15, 30, 60, 120], 15), ([25] * 5, 5), ([10, 25], 3)])
def test_combination_count(steps, count):
    # distinct totals: 1:2:2… gives every multiple of the base up to Σw; binary 2ⁿ − 1; equal n
    combos = stepcombos.combinations(steps)
    assert len(combos) == count
    assert all(c.total == pytest.approx(sum(steps[i - 1] for i in c.on)) for c in combos)
    assert [c.total for c in combos] == sorted(c.total for c in combos)


def test_light_load_check_against_numpy():
    light = Load(90.0, 90.0 * np.tan(np.arccos(0.70)))  # 90 kW at 0.70 lagging
    steps = [20, 40, 40, 40, 40, 40]
    res = stepcombos.light_load_check(light, steps)
    q_all = light.q_kvar - sum(steps)
    assert res.full_pf == pytest.approx(90 / np.hypot(90, q_all), rel=1e-12)
    assert res.full_sense == "leading"
    # the largest reachable total not above Q_min = 91.8 kvar is 80 kvar (numpy over all subsets)
    totals = {sum(s for s, m in zip(steps, mask) if m) for mask in itertools.product([0, 1], repeat=6)}
    ok = max(t for t in totals if t <= light.q_kvar)
    assert res.best.total == pytest.approx(ok)
    assert set(res.leave_out) == set(range(1, 7)) - set(res.best.on)
    assert all(light.q_kvar - c.total < 0 for c in res.leading)


def test_light_load_smallest_step_already_leads():
    res = stepcombos.light_load_check(Load(10, 5), [20, 40])
    assert res.best is None
    assert res.leave_out == (1, 2)


def test_light_load_no_overcorrection():
    res = stepcombos.light_load_check(Load(300, 250), [20, 40, 40])
    assert res.leading == ()
    assert res.leave_out == ()


def brute_combinations(steps):
    """Every subset enumerated here: for each total (to 1e-6 kvar) the fewest steps, then the
    lowest-numbered, smallest total first."""
    best = {}
    for r in range(1, len(steps) + 1):
        for on in itertools.combinations(range(1, len(steps) + 1), r):
            key = round(sum(steps[i - 1] for i in on), 6)
            if key not in best or (len(on), on) < (len(best[key]), best[key]):
                best[key] = on
    return [best[k] for k in sorted(best)]


@pytest.mark.parametrize("steps", [[12.5] * 10, [10] + [20] * 9, [25, 50, 50, 100, 25, 50], [33.3, 33.3, 66.6, 5],
                                   [5, 10, 20, 40, 80, 160], [7.5, 15, 15, 30, 30, 30, 60]])
def test_combinations_against_every_subset(steps):
    # alike steps are counted, not enumerated, when that is much shorter: the same list either way
    assert [c.on for c in stepcombos.combinations(steps)] == brute_combinations(steps)
