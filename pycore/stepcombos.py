"""What a step controller can switch from a bank's steps.

* :func:`combinations` — the distinct outputs reachable by switching subsets of the steps;
* :func:`light_load_check` — which combinations over-correct (lead) at the lightest load.

Kvar are all at the same voltage and frequency. Power triangle; controller behaviour common practice.
"""

from __future__ import annotations

import functools
import itertools
import math
from dataclasses import dataclass

from .banksteps import MAX_STEPS
from .correction import Load
from .errors import InputError, guarded


@dataclass(frozen=True)
class Combination:
    """One controller position: ``on`` the step numbers switched in (1-based), ``total`` [kvar]."""

    on: tuple
    total: float


@guarded
def combinations(steps) -> list[Combination]:
    """Every distinct total [kvar] reachable by switching subsets of ``steps`` [kvar]
    (at most 12 steps), with the fewest steps for each total (then the lowest-numbered),
    smallest total first; the all-off position (0 kvar) is not listed."""
    st = tuple(float(x) for x in steps)
    if len(st) > MAX_STEPS:
        raise InputError(f"At most {MAX_STEPS} steps.")
    return list(_combinations_of(st))


@functools.lru_cache(maxsize=128)
def _combinations_of(st: tuple) -> tuple:
    # a worksheet asks for the same step list several times per answer (plans, full and light load): cached by value
    n = len(st)
    groups: dict[float, list] = {}  # steps of the same size, lowest number first
    for i, x in enumerate(st):
        groups.setdefault(x, []).append(i)
    vectors = math.prod(len(g) + 1 for g in groups.values())
    if vectors * 4 < 1 << n:
        return _by_counts(st, list(groups.values()))
    totals = [0.0] * (1 << n)
    best: dict[float, list] = {}  # total → [steps on, mask, total, step numbers (worked out on a tie)]
    for mask in range(1, 1 << n):
        low = mask & -mask
        tot = totals[mask] = totals[mask ^ low] + st[low.bit_length() - 1]
        key = round(tot, 6)
        pc = mask.bit_count()
        old = best.get(key)
        if old is None or pc < old[0]:
            best[key] = [pc, mask, tot, None]
        elif pc == old[0]:
            on = _on(mask, n)
            if old[3] is None:
                old[3] = _on(old[1], n)
            if on < old[3]:
                best[key] = [pc, mask, tot, on]
    return tuple(Combination(on or _on(m, n), tot) for _, (_, m, tot, on) in sorted(best.items()))


def _by_counts(st: tuple, groups: list) -> tuple:
    """The same list from how many steps of each size are on: steps of one size are alike, so the
    lowest-numbered of them are the ones listed, and 12 equal steps need 13 cases, not 4096."""
    best: dict[float, tuple] = {}
    for counts in itertools.product(*(range(len(g) + 1) for g in groups)):
        pc = sum(counts)
        if not pc:
            continue
        on = tuple(sorted(i + 1 for g, c in zip(groups, counts) for i in g[:c]))
        tot = 0.0
        for i in reversed(on):  # the order the subset sums above add in: the same float
            tot += st[i - 1]
        key = round(tot, 6)
        old = best.get(key)
        if old is None or (pc, on) < (old[0], old[1]):
            best[key] = (pc, on, tot)
    return tuple(Combination(on, tot) for _, (_, on, tot) in sorted(best.items()))


def _on(mask: int, n: int) -> tuple:
    return tuple(i + 1 for i in range(n) if mask >> i & 1)


@dataclass(frozen=True)
class LightLoadCheck:
    """Outcome at the lightest load. ``full_pf``/``full_sense``: PF with every step in;
    ``best``: the largest combination that does not lead (None if even the smallest step
    leads); ``leave_out``: step numbers to keep off at the lightest load; ``leading``: the
    combinations that lead."""

    full_pf: float
    full_sense: str
    best: Combination | None
    leave_out: tuple
    leading: tuple


@guarded
def light_load_check(light: Load, steps, existing_kvar: float = 0.0, combos=None) -> LightLoadCheck:
    """Power factor at the lightest load ``light`` (P [kW], Q [kvar] before the new bank)
    with the new ``steps`` [kvar at system voltage] and ``existing_kvar`` [kvar] of further
    capacitors switched in; a combination over-corrects when Q − Q_C < 0 (leading). ``combos``:
    the result of :func:`combinations` for these steps, if already computed. Power triangle
    (circuit theory)."""
    if combos is None:
        combos = combinations(steps)
    q0 = light.q_kvar - existing_kvar
    full = Load(light.p_kw, q0 - sum(steps))
    tol = -1e-9 * max(1.0, abs(light.p_kw))
    ok = [c for c in combos if q0 - c.total >= tol]
    leading = tuple(c for c in combos if q0 - c.total < tol)
    best = max(ok, key=lambda c: c.total) if ok else None
    n = len(list(steps))
    leave = tuple(i for i in range(1, n + 1) if best is None or i not in best.on) if leading else ()
    return LightLoadCheck(full.pf, full.sense, best, leave, leading)
