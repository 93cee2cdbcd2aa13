"""Figures from a load profile: energy totals, the billing-average power factor, peaks, duration
curves, the daily profile, and the kvar a bank needs by three measures.

Inputs are parallel lists per interval: P [kW] (negative when exporting), Q [kvar, + lagging],
and the interval length h [h]. Intervals with P ≤ 0 have no meaningful power factor to correct
and are left out of the per-interval PF and kvar figures (counted apart).

Methods: energy = Σ P·h (definition of average demand); billing-average PF = ΣkWh/√(ΣkWh² +
Σkvarh²) (utility billing practice); kvar needed in an interval = max(0, Q − P·tan φ₂) (power
triangle; IEEE Std 141, Red Book, power-factor chapter); a duration curve is the values sorted
from largest to smallest, each held for one interval; shares of intervals use the lower empirical
quantile (the smallest value reached by at least that share: numpy's 'inverted_cdf').
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded

DAY_S = 86_400


def _tan(pf: float) -> float:
    if not (isinstance(pf, (int, float)) and 0 < pf <= 1):
        raise InputError("The target power factor must be above 0 and at most 1.")
    return math.sqrt(max(0.0, 1.0 - pf * pf)) / pf


def _same_length(*lists) -> None:
    if len({len(x) for x in lists}) > 1:
        raise InputError("The profile's lists must be of the same length (one entry per interval).")


def _share(share: float) -> None:
    if not (isinstance(share, (int, float)) and 0 < share <= 1):
        raise InputError("The share of intervals must be above 0 % and at most 100 %.")


@guarded
def billing_pf(kwh: float, kvarh: float) -> float:
    """Billing-average power factor ΣkWh/√(ΣkWh² + Σkvarh²) [dimensionless] from energy [kWh]
    and reactive energy [kvarh] (utility billing practice); 1 when both are zero."""
    s = math.hypot(kwh, kvarh)
    return abs(kwh) / s if s > 0 else 1.0


@dataclass(frozen=True)
class Totals:
    """Energy and peaks of a profile. Energies [kWh, kvarh]: ``kwh`` imported, ``kwh_export``
    (≥ 0), ``kvarh_lag`` (Σ positive Q·h), ``kvarh_lead`` (Σ |negative Q|·h); ``pf_net`` and
    ``pf_lag``: billing-average PF on net kvarh (lagging − leading) and on lagging kvarh only;
    ``peak_kw`` [kW] and ``peak_kva`` [kVA] with the index of their (first) interval; ``hours``
    [h] covered; ``intervals``; ``importing`` (intervals with P > 0); ``mean_kw`` [kW]."""

    kwh: float
    kwh_export: float
    kvarh_lag: float
    kvarh_lead: float
    pf_net: float
    pf_lag: float
    peak_kw: float
    peak_kw_at: int
    peak_kva: float
    peak_kva_at: int
    hours: float
    intervals: int
    importing: int
    mean_kw: float


@guarded
def totals(p: list, q: list, h: float) -> Totals:
    """Energy totals [kWh, kvarh], billing-average PFs and peaks [kW, kVA] of a profile with
    demand P [kW], Q [kvar] per interval of h [h] (see the module notes for the methods)."""
    n = len(p)
    if n == 0 or len(q) != n:
        raise InputError("The profile holds no intervals.")
    imp = math.fsum(x for x in p if x > 0) * h
    exp = -math.fsum(x for x in p if x < 0) * h
    lag = math.fsum(x for x in q if x > 0) * h
    lead = -math.fsum(x for x in q if x < 0) * h
    ipk = max(range(n), key=p.__getitem__)
    s = [math.hypot(a, b) for a, b in zip(p, q)]
    isk = max(range(n), key=s.__getitem__)
    return Totals(imp, exp, lag, lead, billing_pf(imp, lag - lead), billing_pf(imp, lag), p[ipk], ipk, s[isk], isk,
                  n * h, n, sum(1 for x in p if x > 0), math.fsum(p) / n)


@guarded
def needs(p: list, q: list, pf_target: float) -> list:
    """kvar needed in each importing interval [kvar]: max(0, Q − P·tan φ₂) for P > 0 (IEEE Std
    141, power-factor chapter), in the profile's order; intervals with P ≤ 0 are left out."""
    _same_length(p, q)
    k = _tan(pf_target)
    return [max(0.0, b - a * k) for a, b in zip(p, q) if a > 0]


@guarded
def quantile_low(sorted_values: list, share: float) -> float:
    """The smallest value reached by at least ``share`` of the values (lower empirical quantile,
    numpy's 'inverted_cdf'): sorted_values ascending, 0 < share ≤ 1."""
    _share(share)
    n = len(sorted_values)
    if n == 0:
        raise InputError("No importing intervals to work on.")
    return sorted_values[max(0, math.ceil(share * n - 1e-9) - 1)]


@guarded
def kvar_for_share(p: list, q: list, pf_target: float, share: float = 0.95) -> tuple[float, int]:
    """The kvar [kvar] that brings ``share`` of the importing intervals to the lagging target PF
    with ideal control (in each interval the bank gives what is needed up to its size), and the
    index of the interval that sets it (the design point). An interval meets the target when
    its need max(0, Q − P·tan φ₂) ≤ Q_C (IEEE Std 141 power-factor chapter; lower quantile)."""
    _same_length(p, q)
    _share(share)
    k = _tan(pf_target)
    idx = [i for i, a in enumerate(p) if a > 0]
    if not idx:
        raise InputError("No interval imports power: there is nothing to correct.")
    need = [max(0.0, q[i] - p[i] * k) for i in idx]
    value = quantile_low(sorted(need), share)
    return value, idx[need.index(value)]


@guarded
def kvar_for_billing(p: list, q: list, h: float, pf_target: float, basis: str = "net") -> float:
    """The bank size [kvar] that brings the billing-average PF to the lagging target with ideal
    control: in each interval the bank gives min(Q_C, Q⁺), as much as it has without leading.
    ``basis`` 'net': kvarh billed as lagging − leading; 'lagging': lagging kvarh only. Solves
    C + h·Σ max(0, Q_i − Q_C) = ΣkWh·tan φ₂ exactly over the sorted Q (piecewise linear), C
    being the leading kvarh on a net basis. Utility billing practice; power triangle. [kvar]"""
    _same_length(p, q)
    if basis not in ("net", "lagging"):
        raise InputError("The kvarh basis must be net or lagging.")
    k = _tan(pf_target)
    kwh = math.fsum(a for a in p if a > 0) * h
    c = math.fsum(b for b in q if b < 0) * h if basis == "net" else 0.0
    g = (kwh * k - c) / h  # allowed Σ max(0, Q − Q_C) [kvar·intervals]
    qs = sorted((b for b in q if b > 0), reverse=True)
    if math.fsum(qs) <= g:
        return 0.0
    s = 0.0
    for j, top in enumerate(qs, 1):
        s += top
        nxt = qs[j] if j < len(qs) else 0.0
        qc = (s - g) / j
        if qc >= nxt - 1e-12:
            return max(qc, 0.0)
    return 0.0  # pragma: no cover - the last segment always ends at Q_C ≥ 0


@guarded
def kvar_kept_lagging(p: list, q: list, share: float = 0.95) -> float:
    """The largest fixed kvar or single step [kvar] that, switched in, leaves at least ``share``
    of the importing intervals still lagging: the largest x with #(Q ≥ x) ≥ share·n, i.e. the
    light-load intervals' reactive power (power triangle; lower quantile from the top). Zero
    when more than 1 − share of the intervals already lead."""
    _same_length(p, q)
    _share(share)
    qs = sorted(b for a, b in zip(p, q) if a > 0)
    if not qs:
        raise InputError("No interval imports power: there is nothing to correct.")
    n = len(qs)
    return max(0.0, qs[n - max(1, math.ceil(share * n - 1e-9))])


@guarded
def pf_per_interval(p: list, q: list) -> list:
    """Power factor P/√(P² + Q²) of each importing interval (P > 0) [dimensionless], in order."""
    _same_length(p, q)
    return [a / math.hypot(a, b) for a, b in zip(p, q) if a > 0]


@guarded
def duration(values: list) -> list:
    """Duration curve: the values sorted from largest to smallest, each held for one interval."""
    return sorted(values, reverse=True)


@guarded
def curve_points(curve: list, n_points: int = 240) -> list:
    """Up to ``n_points`` points [(share of time [%], value)] along a duration curve, each value
    at the middle of its interval's share of the time, first and last kept."""
    if n_points < 2:
        raise InputError("A curve needs at least two points.")
    n = len(curve)
    if n == 0:
        return []
    if n <= n_points:
        idx = range(n)
    else:
        idx = sorted({round(i * (n - 1) / (n_points - 1)) for i in range(n_points)})
    return [(100.0 * (i + 0.5) / n, curve[i]) for i in idx]


@guarded
def daily_profile(t: list, p: list, q: list, interval_s: int) -> list:
    """Mean demand by time of day: [(start of the slot [s after midnight], mean P [kW], mean Q
    [kvar], intervals averaged)] for each slot of ``interval_s`` [s] that has data."""
    _same_length(t, p, q)
    if not 0 < interval_s <= DAY_S:
        raise InputError("The interval must be above zero and at most a day.")
    n_slots = -(-DAY_S // interval_s)
    sp, sq, cnt = [0.0] * n_slots, [0.0] * n_slots, [0] * n_slots
    for slot, a, b in zip([(ti % DAY_S) // interval_s for ti in t], p, q):
        sp[slot] += a
        sq[slot] += b
        cnt[slot] += 1
    return [(s * interval_s, sp[s] / cnt[s], sq[s] / cnt[s], cnt[s]) for s in range(n_slots) if cnt[s]]
