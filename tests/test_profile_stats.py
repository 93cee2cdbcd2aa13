"""Load-profile figures (pycore.profile_stats) against numpy and scipy on generated profiles.

References: numpy sums for energy (Σ P·h), numpy.argmax for peaks (first occurrence),
numpy.quantile(method='inverted_cdf') for shares of intervals, numpy.sort for duration
curves, numpy.bincount for the daily profile, and scipy.optimize.brentq for the bank that meets
the billing-average PF (billing PF = ΣkWh/√(ΣkWh² + Σkvarh²), utility billing practice).
Hypothesis: any permutation of a file's rows gives the same totals; doubling every interval's
energy doubles the kvar needed.
"""

from __future__ import annotations

import math
import random

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from pycore import profile_stats as ps
from pycore.profile_demo import demo_text
from pycore.profile_read import read_profile

TARGET = 0.95
K = math.tan(math.acos(TARGET))


def generated(n=3000, seed=1, export=True):
    rng = np.random.default_rng(seed)
    p = rng.uniform(20, 800, n)
    if export:
        p[rng.choice(n, 30, replace=False)] *= -0.1  # a few export intervals
    pf = rng.uniform(0.6, 0.99, n)
    q = np.abs(p) * np.tan(np.arccos(pf))
    q[rng.choice(n, 40, replace=False)] *= -0.3  # a few leading intervals
    return p, q


def test_totals_against_numpy():
    p, q = generated()
    h = 0.25
    t = ps.totals(list(p), list(q), h)
    kwh = np.sum(p[p > 0]) * h
    lag = np.sum(q[q > 0]) * h
    lead = -np.sum(q[q < 0]) * h
    assert t.kwh == pytest.approx(kwh, rel=1e-12)
    assert t.kwh_export == pytest.approx(-np.sum(p[p < 0]) * h, rel=1e-12)
    assert t.kvarh_lag == pytest.approx(lag, rel=1e-12)
    assert t.kvarh_lead == pytest.approx(lead, rel=1e-12)
    assert t.pf_net == pytest.approx(kwh / np.hypot(kwh, lag - lead), rel=1e-12)
    assert t.pf_lag == pytest.approx(kwh / np.hypot(kwh, lag), rel=1e-12)
    assert t.peak_kw_at == int(np.argmax(p)) and t.peak_kw == p.max()
    s = np.hypot(p, q)
    assert t.peak_kva_at == int(np.argmax(s)) and t.peak_kva == pytest.approx(s.max(), rel=1e-15)
    assert t.mean_kw == pytest.approx(np.mean(p), rel=1e-12)
    assert t.importing == int(np.sum(p > 0)) and t.hours == len(p) * h


@pytest.mark.parametrize("share", [0.5, 0.9, 0.95, 0.99, 1.0])
def test_kvar_for_a_share_of_intervals_is_numpys_lower_quantile(share):
    p, q = generated(seed=2)
    imp = p > 0
    need = np.maximum(0, q[imp] - p[imp] * K)
    got, at = ps.kvar_for_share(list(p), list(q), TARGET, share)
    assert got == pytest.approx(np.quantile(need, share, method="inverted_cdf"), rel=1e-12)
    # the design interval is one whose need is that figure, and the share met is at least asked
    assert max(0, q[at] - p[at] * K) == pytest.approx(got, rel=1e-12)
    assert np.mean(need <= got + 1e-9) >= share


def test_largest_step_keeping_intervals_lagging_against_numpy():
    p, q = generated(seed=3)
    qi = np.sort(q[p > 0])
    for share in (0.8, 0.95, 1.0):
        got = ps.kvar_kept_lagging(list(p), list(q), share)
        # the largest x with #(Q ≥ x) ≥ share·n, by brute force over the candidates
        need = math.ceil(share * len(qi))
        best = max(x for x in qi if np.sum(qi >= x) >= need)
        assert got == pytest.approx(max(0.0, best), rel=1e-12)


@pytest.mark.parametrize("basis", ["net", "lagging"])
def test_kvar_for_billing_average_against_brentq(basis):
    p, q = generated(seed=4)
    h = 0.25
    kwh = np.sum(p[p > 0]) * h

    def pf_after(qc):
        after = q - np.minimum(qc, np.maximum(q, 0))
        kvarh = np.sum(after if basis == "net" else np.maximum(after, 0)) * h
        return kwh / np.hypot(kwh, kvarh) - TARGET

    expected = brentq(pf_after, 0, q.max(), xtol=1e-10)
    got = ps.kvar_for_billing(list(p), list(q), h, TARGET, basis)
    assert got == pytest.approx(expected, rel=1e-8)
    assert pf_after(got) == pytest.approx(0, abs=1e-9)
    # a profile already at the target needs none
    assert ps.kvar_for_billing([100.0, 100.0], [10.0, 10.0], h, TARGET) == 0.0


def test_duration_curves_and_points_against_numpy():
    p, q = generated(seed=5)
    curve = ps.duration(list(q))
    assert np.array_equal(np.array(curve), np.sort(q)[::-1])
    pts = ps.curve_points(curve, 100)
    assert len(pts) == 100 and pts[0][1] == q.max() and pts[-1][1] == q.min()
    assert pts[0][0] == pytest.approx(50 / len(q)) and pts[-1][0] == pytest.approx(100 - 50 / len(q))
    pf = ps.pf_per_interval(list(p), list(q))
    imp = p > 0
    assert np.allclose(pf, p[imp] / np.hypot(p[imp], q[imp]), rtol=1e-14)


def test_daily_profile_against_numpy_bincount():
    prof = read_profile(demo_text(days=10, interval_min=15))
    t = np.array(prof.t)
    slot = (t % 86400) // 900
    mean_p = np.bincount(slot, weights=prof.p) / np.bincount(slot)
    mean_q = np.bincount(slot, weights=prof.q) / np.bincount(slot)
    got = ps.daily_profile(prof.t, prof.p, prof.q, prof.interval_s)
    assert len(got) == 96
    assert [g[0] for g in got] == [i * 900 for i in range(96)]
    assert np.allclose([g[1] for g in got], mean_p, rtol=1e-12)
    assert np.allclose([g[2] for g in got], mean_q, rtol=1e-12)
    assert all(g[3] == 10 for g in got)


def test_billing_pf():
    assert ps.billing_pf(300, 400) == pytest.approx(0.6)
    assert ps.billing_pf(0, 0) == 1.0


# ------------------------------------------------------------------------------ properties


@settings(max_examples=30, deadline=None)
@given(st.randoms(use_true_random=False))
def test_any_permutation_of_rows_gives_the_same_totals(rnd):
    text = demo_text(days=2, interval_min=30, seed=11)
    head, *rows = text.splitlines()
    ref = read_profile(text)
    rnd.shuffle(rows)
    prof = read_profile("\n".join([head] + rows))
    a = ps.totals(ref.p, ref.q, ref.hours)
    b = ps.totals(prof.p, prof.q, prof.hours)
    assert a == b  # exact: sums are correctly rounded (math.fsum), peaks taken in time order
    assert prof.t == ref.t and prof.skipped == []


finite = st.floats(min_value=0.5, max_value=5000, allow_nan=False)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(finite, st.floats(min_value=-500, max_value=5000)), min_size=2, max_size=60),
       st.sampled_from([0.5, 0.9, 0.95, 1.0]), st.sampled_from([0.9, 0.95, 0.98]))
def test_doubling_every_intervals_energy_doubles_the_kvar_needed(rows, share, target):
    p = [r[0] for r in rows]
    q = [r[1] for r in rows]
    p2 = [2 * x for x in p]
    q2 = [2 * x for x in q]
    a, _ = ps.kvar_for_share(p, q, target, share)
    b, _ = ps.kvar_for_share(p2, q2, target, share)
    assert b == pytest.approx(2 * a, rel=1e-9, abs=1e-9)
    a = ps.kvar_for_billing(p, q, 0.25, target)
    b = ps.kvar_for_billing(p2, q2, 0.25, target)
    assert b == pytest.approx(2 * a, rel=1e-9, abs=1e-6)
    assert ps.kvar_kept_lagging(p2, q2, share) == pytest.approx(2 * ps.kvar_kept_lagging(p, q, share), rel=1e-12)


def test_doubling_the_energy_in_a_file_doubles_the_kvar_needed():
    rows = [(f"2025-06-02 {k // 4:02d}:{k % 4 * 15:02d}", 50 + k, 40 + (k * 7) % 23) for k in range(1, 40)]
    one = "Time,kWh,kvarh\n" + "".join(f"{t},{a},{b}\n" for t, a, b in rows)
    two = "Time,kWh,kvarh\n" + "".join(f"{t},{2 * a},{2 * b}\n" for t, a, b in rows)
    pa, pb = read_profile(one), read_profile(two)
    assert ps.kvar_for_share(pb.p, pb.q, TARGET)[0] == pytest.approx(2 * ps.kvar_for_share(pa.p, pa.q, TARGET)[0])
    assert ps.kvar_for_billing(pb.p, pb.q, pb.hours, TARGET) == pytest.approx(
        2 * ps.kvar_for_billing(pa.p, pa.q, pa.hours, TARGET))
