"""A capacitor bank run against a load profile: what a fixed bank or an automatic controller
switching whole steps gives in each interval, and the power factor per billing month.

The controller modelled here, interval by interval (P [kW], Q [kvar, + lagging] from the
profile; the fixed part is always in): when the load after the fixed part is below the lagging
target it switches in the smallest combination of steps that reaches the target without making
the load lead; when no combination does both, the largest that does not lead. This is how
power-factor controllers are meant to act with a well-chosen response threshold and no time
delay (common practice); real controllers also wait, lag behind fast load changes and keep a
band around the target, so real results are a little worse. Month = calendar month of the
interval's start; a billing cycle that differs shifts the figures a little.
"""

from __future__ import annotations

import math
from bisect import bisect_left, bisect_right
from dataclasses import dataclass, field

from .banksteps import MAX_STEPS
from .stepcombos import combinations
from .errors import InputError, guarded
from .profile_stats import billing_pf
from .profile_time import month_of

DAY_S = 86_400
_TOL = 1e-9
LEAD_SHARE_WARN = 0.05
"""Share of importing intervals over-corrected (leading) above which a bank is flagged [fraction]:
a few leading intervals at light load are usual, more than one in twenty is a bank or step too
large for the light load (this app's screening choice, common practice)."""


@dataclass(frozen=True)
class Bank:
    """A bank: ``fixed_kvar`` always in [kvar] and ``steps`` switched by the controller [kvar],
    both at the voltage the bank sees."""

    fixed_kvar: float = 0.0
    steps: tuple = ()


@dataclass
class Period:
    """Figures over a month (or the whole profile): ``label``; energies [kWh, kvarh] with kvarh
    on the chosen basis before and after; PF before/after [dimensionless] with 'lagging' or
    'leading'; ``importing`` intervals, and the shares [0..1] of them that ``miss`` the target
    after and that ``lead`` after (over-corrected); ``miss_before``: share missing with no bank."""

    label: str
    kwh: float = 0.0
    kvarh_before: float = 0.0
    kvarh_after: float = 0.0
    importing: int = 0
    n_miss: int = 0
    n_lead: int = 0
    n_miss_before: int = 0

    @property
    def pf_before(self) -> float:
        return billing_pf(self.kwh, self.kvarh_before)

    @property
    def pf_after(self) -> float:
        return billing_pf(self.kwh, self.kvarh_after)

    @property
    def sense_before(self) -> str:
        return "leading" if self.kvarh_before < 0 else "lagging"

    @property
    def sense_after(self) -> str:
        return "leading" if self.kvarh_after < 0 else "lagging"

    @property
    def miss(self) -> float:
        return self.n_miss / self.importing if self.importing else 0.0

    @property
    def lead(self) -> float:
        return self.n_lead / self.importing if self.importing else 0.0

    @property
    def miss_before(self) -> float:
        return self.n_miss_before / self.importing if self.importing else 0.0


@dataclass
class Simulation:
    """``given``: kvar the bank gives in each interval [kvar]; ``months``: a :class:`Period` per
    calendar month in time order; ``whole``: the same over the whole profile; ``positions``:
    distinct totals the steps can make (with 0)."""

    given: list
    months: list = field(default_factory=list)
    whole: Period = None
    positions: list = field(default_factory=list)


def _choice(q1: float, need: float, tots: list) -> float:
    """The controller's choice [kvar] among step totals ``tots`` (ascending, 0 first) for an
    interval whose load after the fixed part draws ``q1`` [kvar] and needs ``need`` [kvar] to
    reach the target: the smallest total ≥ need that does not exceed q1 (would not lead), else
    the largest total ≤ q1."""
    if need <= _TOL:
        return 0.0
    j = bisect_left(tots, need - _TOL)
    if j < len(tots) and tots[j] <= q1 + _TOL:
        return tots[j]
    j = bisect_right(tots, q1 + _TOL) - 1
    return tots[j] if j >= 0 else 0.0


step_choice = guarded(_choice)


@guarded
def simulate(t: list, p: list, q: list, interval_s: int, bank: Bank, pf_target: float,
             basis: str = "net") -> Simulation:
    """Run ``bank`` against a profile (interval starts ``t`` [s], P [kW], Q [kvar]) of
    ``interval_s`` [s] with a lagging target PF [dimensionless]; kvarh counted on ``basis``
    'net' (lagging − leading) or 'lagging'. See the module notes for the controller.
    Power triangle (IEEE Std 141, power-factor chapter); billing PF = ΣkWh/√(ΣkWh² + Σkvarh²)."""
    if not (0 < pf_target <= 1):
        raise InputError("The target power factor must be above 0 and at most 1.")
    if basis not in ("net", "lagging"):
        raise InputError("The kvarh basis must be net or lagging.")
    if not len(t) == len(p) == len(q):
        raise InputError("The profile's lists must be of the same length (one entry per interval).")
    steps = [float(s) for s in bank.steps]
    if len(steps) > MAX_STEPS:
        raise InputError(f"At most {MAX_STEPS} steps.")
    if any(not (math.isfinite(s) and s > 0) for s in steps) or not (math.isfinite(bank.fixed_kvar) and bank.fixed_kvar >= 0):
        raise InputError("Bank steps must be above zero and the fixed part zero or more.")
    tots = [0.0] + [c.total for c in combinations(steps)] if steps else [0.0]
    k = math.sqrt(max(0.0, 1 - pf_target * pf_target)) / pf_target
    h = interval_s / 3600.0
    fixed = float(bank.fixed_kvar)
    q1 = [b - fixed for b in q] if fixed else list(q)
    allowed = [a * k if a > 0 else 0.0 for a in p]
    if steps:
        chosen = list(map(_choice, q1, [x - y for x, y in zip(q1, allowed)], [tots] * len(q1)))
        after = [x - c for x, c in zip(q1, chosen)]
        given = [fixed + c for c in chosen]
    else:
        after = q1
        given = [fixed] * len(q1)
    # months: t is in time order, so each month is one slice (a repeated clock hour stays in it)
    day_month = {d: month_of(d) for d in set(ti // DAY_S for ti in t)}
    bounds = []
    last = None
    for i, ti in enumerate(t):
        key = day_month[ti // DAY_S]
        if key != last:
            bounds.append((key, i))
            last = key
    lag_only = basis == "lagging"
    tol = [_TOL * a if a > 1.0 else _TOL for a in p]
    miss_after = [a > 0 and x > y + e for a, x, y, e in zip(p, after, allowed, tol)]
    lead_after = [a > 0 and x < -e for a, x, e in zip(p, after, tol)]
    miss_before = [a > 0 and x > y + e for a, x, y, e in zip(p, q, allowed, tol)]
    flags = (miss_after, lead_after, miss_before)
    ends = [i for _, i in bounds[1:]] + [len(t)]
    months = [_period(f"{key[0]}-{key[1]:02d}", i0, i1, p, q, after, flags, h, lag_only)
              for (key, i0), i1 in zip(bounds, ends)]
    whole = _period("whole profile", 0, len(t), p, q, after, flags, h, lag_only)
    return Simulation(given, months, whole, tots)


def _period(label: str, i0: int, i1: int, p: list, q: list, after: list, flags: tuple, h: float,
            lag_only: bool) -> Period:
    """Sums for one period: the intervals i0 ≤ i < i1."""
    pp, qb, qa = p[i0:i1], q[i0:i1], after[i0:i1]
    if lag_only:
        kb = math.fsum(x for x in qb if x > 0)
        ka = math.fsum(x for x in qa if x > 0)
    else:
        kb, ka = math.fsum(qb), math.fsum(qa)
    per = Period(label, math.fsum(a for a in pp if a > 0) * h, kb * h, ka * h)
    per.importing = sum(1 for a in pp if a > 0)
    per.n_miss = flags[0][i0:i1].count(True)
    per.n_lead = flags[1][i0:i1].count(True)
    per.n_miss_before = flags[2][i0:i1].count(True)
    return per
