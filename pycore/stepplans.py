"""Three step plans for an automatic bank, what a controller leaves switched in, and its C/k.

:func:`three_plans` searches the built-in patterns of :mod:`pycore.banksteps` (equal,
1:2:2…, binary) for every step count and offers three:

* ``least_excess`` — the least kvar above the need (ties: finer resolution, then fewer steps);
* ``fewest_steps`` — the fewest steps, at least :data:`MIN_AUTO_STEPS` (ties: least excess,
  then finer);
* ``finest`` — the smallest first step, i.e. the finest resolution (for these patterns every
  multiple of the first step is reachable; ties: least excess, then fewer steps).

All three come from the acceptable plans: at most :data:`ACCEPTABLE_EXCESS` above the need and
no step of more than :data:`UNITS_PER_STEP_LIMIT` units; when no plan is acceptable, from all.

Each plan is shown at full and lightest load as the controller would leave it
(:func:`controller_holds`): a controller never keeps a combination that makes the power factor
leading, and stops adding steps once the target is reached (how step controllers regulate,
common practice). Kvar at the capacitor's rating is ``rated``; at system voltage and frequency
it is × ``factor`` (:func:`pycore.capacitor.output_factor`).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

from .banksteps import MANY_UNITS_PER_STEP, MAX_STEPS, StepPlan, plan_steps_many, step_weights
from .stepcombos import Combination, combinations
from .correction import Load, tan_phi
from .errors import InputError, guarded

ACCEPTABLE_EXCESS = 0.15
"""A plan more than this fraction above the need is offered only when nothing closer exists
(common practice: the bank is sized to the need, not to the next large pattern)."""

UNITS_PER_STEP_LIMIT = MANY_UNITS_PER_STEP
"""More units than this in parallel in one step is unusual (common practice: one to a few)."""

MIN_AUTO_STEPS = 2
"""An automatic bank has at least this many steps; one step is a fixed bank."""

PLAN_PATTERNS = ("equal", "one_two", "binary")
KINDS = ("least_excess", "fewest_steps", "finest")
KIND_WORDS = {"least_excess": "Least excess", "fewest_steps": "Fewest steps", "finest": "Finest resolution"}


@dataclass(frozen=True)
class Held:
    """What the controller leaves in at one load: combo (:class:`Combination` at system
    kvar, None when no step can be on without leading), kvar_in [kvar], pf, sense
    ('lagging'/'leading'/'unity'), reaches_target (PF at or above the target)."""

    combo: Combination | None
    kvar_in: float
    pf: float
    sense: str
    reaches_target: bool


@guarded
def controller_holds(load: Load, steps_sys, target_pf: float, combos=None) -> Held:
    """The combination a step controller settles on for ``load`` (P [kW], Q [kvar], net of
    any fixed capacitors) with steps ``steps_sys`` [kvar at system voltage] aiming at
    target_pf: the smallest combination that reaches the target without leading, else the
    largest that does not lead (Q − Q_C ≥ 0), else none. Power triangle; controller behaviour
    common practice."""
    if not (0.0 < target_pf <= 1.0):
        raise InputError("The target power factor lies above 0 and at most 1.")
    if combos is None:
        combos = combinations(steps_sys)
    q, p = load.q_kvar, load.p_kw
    tol = 1e-9 * max(1.0, abs(p), abs(q))
    allow = p * tan_phi(target_pf)
    fits = [c for c in combos if q - c.total >= -tol]
    reach = [c for c in fits if q - c.total <= allow + tol]
    if reach:
        best = min(reach, key=lambda c: c.total)
    elif fits:
        best = max(fits, key=lambda c: c.total)
    else:
        best = None
    kv = best.total if best else 0.0
    after = load.corrected(kv)
    return Held(best, kv, after.pf, after.sense, q - kv <= allow + tol)


@dataclass(frozen=True)
class Plan:
    """One offered plan. kind (one of :data:`KINDS`); pattern; weights; plan
    (:class:`pycore.banksteps.StepPlan`, kvar at rating); excess_kvar [kvar at rating] and
    excess_fraction [-] above the need; smallest_step [kvar at rating]; steps_sys [kvar at
    system voltage]; full and light (:class:`Held`, light None without a lightest load);
    all_in_pf and all_in_sense with every step in at full load (shown only as a warning — a
    controller would not hold a leading combination); acceptable (see module)."""

    kind: str
    pattern: str
    weights: tuple
    plan: StepPlan
    excess_kvar: float
    excess_fraction: float
    smallest_step: float
    steps_sys: tuple
    full: Held
    light: Held | None
    all_in_pf: float
    all_in_sense: str
    acceptable: bool


@functools.lru_cache(maxsize=None)
def _patterns(max_steps: int) -> tuple:
    # the (pattern, weights) tried for each most-steps: a fixed table, built once
    tried = []
    for pattern in PLAN_PATTERNS:
        for n in range(MIN_AUTO_STEPS, max_steps + 1):
            w = tuple(step_weights(pattern, n))
            if pattern == "binary" and sum(w) > 4096:
                break
            tried.append((pattern, w))
    return tuple(tried)


class _Rounded(dict):
    """x → round(x, 6), each distinct x rounded once (round to places is dear: it prints the float);
    one per search, many plans share their step sizes."""

    def __missing__(self, x):
        r = self[x] = round(x, 6)
        return r


def _candidates(need_rated: float, ratings, tried, r6: _Rounded) -> list[tuple[str, tuple, StepPlan]]:
    seen: dict[tuple, tuple] = {}
    for (pattern, w), pl in zip(tried, plan_steps_many(need_rated, ratings, [w for _, w in tried])):
        if pl is None:
            continue
        key = tuple(map(r6.__getitem__, pl.steps))
        if key not in seen:
            seen[key] = (pattern, w, pl)
    return list(seen.values())


@guarded
def three_plans(need_rated: float, ratings, factor: float, full: Load, target_pf: float,
                light: Load | None = None, max_steps: int = MAX_STEPS) -> list:
    """The three plans of the module docstring for a need of need_rated [kvar at the
    capacitor's rating] from unit ``ratings`` [kvar at rating], ``factor`` [-] system/rated
    output, the full load and optional lightest load (:class:`pycore.correction.Load`, net
    of fixed capacitors) and the controller's target_pf. Returns a list of :class:`Plan` in
    the order of :data:`KINDS` (the same plan may appear under two kinds)."""
    if not (isinstance(need_rated, (int, float)) and math.isfinite(need_rated)) or need_rated <= 0:
        raise InputError("The kvar needed must be above zero.")
    if not (isinstance(factor, (int, float)) and math.isfinite(factor)) or factor <= 0:
        raise InputError("The output factor must be above zero.")
    if not isinstance(max_steps, int) or not MIN_AUTO_STEPS <= max_steps <= MAX_STEPS:
        raise InputError(f"The most steps must be {MIN_AUTO_STEPS} to {MAX_STEPS}.")
    def info(c):
        pattern, w, pl = c
        exc = pl.total - need_rated
        ok = exc <= ACCEPTABLE_EXCESS * need_rated + 1e-9 and max(map(len, pl.units)) <= UNITS_PER_STEP_LIMIT
        return r6[exc], r6[min(pl.steps)], len(pl.steps), ok

    tried = _patterns(max_steps)
    r6 = _Rounded()
    # plans that cannot be acceptable (a huge binary pattern of small units) are worked out only
    # when no acceptable plan exists: they could not be offered otherwise
    # every step holds at least one unit, so a plan's total is at least the smallest unit × Σw
    small = min((r for r in ratings if isinstance(r, (int, float)) and r > 0), default=0.0)
    hopeful = [t for t in tried if small * sum(t[1]) <= (1 + ACCEPTABLE_EXCESS) * need_rated + 1e-9]
    rows = [(c, info(c)) for c in _candidates(need_rated, ratings, hopeful, r6)]
    pool = [r for r in rows if r[1][3]]
    if not pool:
        cands = _candidates(need_rated, ratings, tried, r6)
        if not cands:
            raise InputError("No automatic bank can be built from these unit ratings: add larger or smaller ratings.")
        pool = rows = [(c, info(c)) for c in cands]
    least = min(pool, key=lambda r: (r[1][0], r[1][1], r[1][2]))
    fewest = min(pool, key=lambda r: (r[1][2], r[1][0], r[1][1]))
    finest = min(pool, key=lambda r: (r[1][1], r[1][0], r[1][2]))
    out = []
    for kind, (c, (exc, small, n, ok)) in zip(KINDS, (least, fewest, finest)):
        pattern, w, pl = c
        steps_sys = tuple(s * factor for s in pl.steps)
        combos = combinations(steps_sys)
        held_full = controller_holds(full, steps_sys, target_pf, combos)
        held_light = controller_holds(light, steps_sys, target_pf, combos) if light is not None else None
        all_in = full.corrected(sum(steps_sys))
        out.append(Plan(kind, pattern, w, pl, pl.total - need_rated, (pl.total - need_rated) / need_rated,
                        min(pl.steps), steps_sys, held_full, held_light, all_in.pf, all_in.sense, ok))
    return out


@guarded
def ck_setting_a(q_step_kvar: float, v_ll: float, ct_primary_a: float, ct_secondary_a: float = 5.0) -> float:
    """The controller's response setting C/k [A]: the smallest step's line current
    Q/(√3·V) [A] (q_step_kvar [kvar] at v_ll [V]) as seen on the secondary of a current
    transformer of ratio k = ct_primary_a/ct_secondary_a (common practice for step controllers)."""
    for x, what in ((q_step_kvar, "The step's kvar"), (v_ll, "Voltage"), (ct_primary_a, "The CT primary current"),
                    (ct_secondary_a, "The CT secondary current")):
        if not (isinstance(x, (int, float)) and math.isfinite(x)) or x <= 0:
            raise InputError(f"{what} must be above zero.")
    return q_step_kvar * 1e3 / (math.sqrt(3.0) * v_ll) / (ct_primary_a / ct_secondary_a)
