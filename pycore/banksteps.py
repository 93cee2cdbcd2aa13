"""Choosing capacitor units and steps from the ratings one can buy.

* :func:`select_units` — units (any number of each purchasable rating) whose sum is at least
  the need with the least excess, then the fewest units.
* :func:`step_weights` and :func:`plan_steps` — an automatic bank of N steps in a pattern
  (equal, 1:2:2:…, binary 1:2:4:…, or custom ratios), each step built from purchasable units.
(What a controller can switch from the steps is in :mod:`pycore.stepcombos`.)

Ratings and needs are in kvar, all at the same voltage and frequency (the capacitor's rating
or the system's, consistently). The search is exact on a grid of the greatest common measure
of the ratings (each rating rounded to 0.001 kvar): a dynamic program over reachable sums
(the unbounded subset-sum / coin-change recursion, e.g. Cormen et al., Introduction to
Algorithms, dynamic programming).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from fractions import Fraction

from .errors import InputError, guarded

MAX_STATES = 60_000  # size of the dynamic-programming table before pre-filling with large units
MAX_STEPS = 12
MAX_UNITS = 1000  # more units than this in one bank is a sign of a wrong unit or rating list
MAX_GRID_FACTOR = 4
EXCESS_WARN_FRACTION = 0.25  # a plan more than 25 % (and one unit) above the need draws a warning (this app's choice)
MANY_UNITS_PER_STEP = 6  # more units than this in one step draws a warning (common practice: 1 to a few)  # the largest rating may span at most this many tables of MAX_STATES grid steps


def _grid(ratings: list[float]) -> tuple[Fraction, tuple]:
    """The common measure g [kvar] of the ratings and each rating as a whole multiple of g."""
    return _grid_of(tuple(ratings))  # the multiples as a tuple: read, never changed


@functools.lru_cache(maxsize=64)
def _grid_of(ratings: tuple) -> tuple[Fraction, tuple]:
    # the same few rating lists come back for every plan tried (pure: cached by value)
    fr = [Fraction(r).limit_denominator(1000) for r in ratings]
    den = 1
    for f in fr:
        den = den * f.denominator // math.gcd(den, f.denominator)
    ints = [int(f * den) for f in fr]
    g = 0
    for n in ints:
        g = math.gcd(g, n)
    if g == 0:
        raise InputError("Unit ratings must be above zero.")
    return Fraction(g, den), tuple(n // g for n in ints)


def _clean_ratings(ratings) -> list[float]:
    vals = []
    for r in ratings:
        if not (isinstance(r, (int, float)) and math.isfinite(r)) or r <= 0:
            raise InputError("Every unit rating must be a number above zero.")
        if r < 0.001:
            raise InputError("Unit ratings below 0.001 kvar are not supported.")
        vals.append(float(r))
    if not vals:
        raise InputError("Give at least one unit rating.")
    return sorted(set(vals))


def _check_count(need_kvar: float, vals: list[float]) -> None:
    if need_kvar / max(vals) > MAX_UNITS:
        raise InputError(f"More than {MAX_UNITS} units would be needed: add larger unit ratings to the list.")


_TABLE_MEMO: dict = {}  # the last table built, per unit list: a larger table's prefix is a smaller one


def _min_count_table(ints: list[int], top: int) -> tuple[list[int], list[int]]:
    """count[s] = fewest units summing exactly to s (s ≤ top; -1 if unreachable), and the
    index of the last unit used. Unbounded coin-change dynamic programming, unit by unit.
    The lists returned may be longer than top + 1 and must not be modified."""
    key = tuple(ints)
    hit = _TABLE_MEMO.get(key)
    if hit is not None and len(hit[0]) > top:
        return hit
    inf = 1 << 30
    count = [inf] * (top + 1)
    last = [-1] * (top + 1)
    count[0] = 0
    for i, k in enumerate(ints):
        for s in range(k, top + 1):
            c = count[s - k] + 1
            if c < count[s]:
                count[s] = c
                last[s] = i
    out = ([c if c < inf else -1 for c in count], last)
    _TABLE_MEMO.clear()
    _TABLE_MEMO[key] = out
    return out


def _walk(last: list[int], ints: list[int], s: int) -> list[int]:
    idx = []
    while s > 0:
        i = last[s]
        idx.append(i)
        s -= ints[i]
    return idx


@dataclass(frozen=True)
class Selection:
    """Units chosen: ``units`` the ratings [kvar] largest first; ``total`` their sum [kvar]."""

    units: tuple
    total: float

    def counts(self) -> list[tuple[float, int]]:
        """[(rating [kvar], how many)] largest rating first."""
        out: dict[float, int] = {}
        for u in self.units:
            out[u] = out.get(u, 0) + 1
        return sorted(out.items(), key=lambda t: -t[0])


def _least_sums_by_residue(ints) -> tuple[list[float], list[int]]:
    return _least_sums_of(tuple(ints))


@functools.lru_cache(maxsize=32)
def _least_sums_of(ints: tuple) -> tuple[list[float], list[int]]:
    """For each residue r modulo the smallest unit k0 (grid steps): the least sum of units
    ≡ r (mod k0), and the unit that last reached it (-1 for none). Every larger sum in the
    same class is reachable by adding k0-units, so the least sum ≥ any target follows exactly.
    Dijkstra's shortest paths over the k0 residues (the classical method for the Frobenius
    coin problem; Dijkstra 1959; e.g. Cormen et al., shortest paths)."""
    import heapq

    k0 = min(ints)
    dist = [math.inf] * k0
    via = [-1] * k0
    dist[0] = 0
    heap = [(0, 0)]
    others = [(i, k) for i, k in enumerate(ints) if k != k0]
    while heap:
        d, r = heapq.heappop(heap)
        if d > dist[r]:
            continue
        for i, k in others:
            nd, nr = d + k, (r + k) % k0
            if nd < dist[nr]:
                dist[nr], via[nr] = nd, i
                heapq.heappush(heap, (nd, nr))
    return dist, via


def _least_sum_at_least(ints: list[int], target: int) -> tuple[int, list[int]]:
    """The least unit sum S ≥ ``target`` (grid steps) and one set of unit indices reaching it."""
    k0 = min(ints)
    i0 = ints.index(k0)
    dist, via = _least_sums_by_residue(ints)
    best = None
    for r, d in enumerate(dist):
        if d == math.inf:
            continue
        extra = max(0, -(-(target - d) // k0))  # k0-units added to reach the target
        cand = d + extra * k0
        if best is None or cand < best[0]:
            best = (cand, r, extra)
    total, r, extra = best
    idx = [i0] * extra
    while r:  # walk back along the shortest path of residue r
        i = via[r]
        idx.append(i)
        r = (r - ints[i]) % k0
    return total, idx


@guarded
def select_units(need_kvar: float, ratings, max_states: int = MAX_STATES) -> Selection:
    """Units from ``ratings`` [kvar] (any number of each) summing to at least ``need_kvar``
    [kvar] with the least excess, then the fewest units. The least sum is exact for any need
    (shortest paths over residues of the smallest unit, on the ratings' common grid). The
    fewest units for that sum are exact when it spans at most ``max_states`` grid steps
    (unbounded coin-change dynamic programming); above that, the largest units are
    pre-filled and the remainder is exact, which can use more units than the fewest."""
    vals = _clean_ratings(ratings)
    if not math.isfinite(need_kvar):
        raise InputError("The kvar needed must be a number.")
    if need_kvar <= 0:
        return Selection((), 0.0)
    _check_count(need_kvar, vals)
    g, ints = _grid(vals)
    total, idx = _select_on_grid(need_kvar, vals, g, ints, max_states)
    units = tuple(sorted((vals[i] for i in idx), reverse=True))
    return Selection(units, _kvar(total, g))


def _kvar(n: int, g: Fraction) -> float:
    # n grid steps of g kvar as a float: int/int true division rounds correctly, as float(Fraction) does
    return n * g.numerator / g.denominator


def _target_steps(need_kvar: float, g: Fraction) -> int:
    """The need in whole grid steps, rounded up (at least one: a need far below the common measure
    still needs a unit). Exact: the need as the nearest fraction with a denominator up to 10⁹, less
    10⁻⁹ of a step; in floats when the answer is clear by a thousandth of a step."""
    y = need_kvar * g.denominator / g.numerator - 1e-9
    if abs(y) < 1e12 and abs(y - round(y)) > 1e-3:
        return max(1, math.ceil(y))
    return max(1, math.ceil(Fraction(need_kvar).limit_denominator(10**9) / g - Fraction(1, 10**9)))


def _select_on_grid(need_kvar: float, vals: list[float], g: Fraction, ints: list[int], max_states: int) -> tuple[int, list[int]]:
    """select_units on a grid already worked out: (the least sum ≥ need, in grid steps; the unit
    indices, fewest units for that sum)."""
    target = _target_steps(need_kvar, g)
    kmax = max(ints)
    if kmax > MAX_GRID_FACTOR * max_states:
        raise InputError(
            "The unit ratings have no usable common step (for example 0.001 kvar beside 500 kvar): "
            "round them to fewer decimals or leave out the smallest."
        )
    total, idx = _least_sum_at_least(ints, target)
    # the fewest units summing exactly to that total
    top = min(total, max_states)
    count, last = _min_count_table(ints, top)
    fewest = _fewest_exact(total, ints, count, last, top, kmax)
    if fewest is not None and len(fewest) <= len(idx):
        idx = fewest
    return total, idx


@guarded
def exact_units(size_kvar: float, ratings, max_states: int = MAX_STATES) -> tuple | None:
    """The fewest units from ``ratings`` [kvar] summing exactly to ``size_kvar`` [kvar]
    (largest first), or None if no combination does."""
    vals = _clean_ratings(ratings)
    g, ints = _grid(vals)
    q = Fraction(size_kvar).limit_denominator(10**9) / g
    s = round(q)
    if abs(q - s) > Fraction(1, 10**6) or s < 0 or s > max_states:
        return None
    count, last = _min_count_table(ints, s)
    if count[s] < 0:
        return None
    return tuple(sorted((vals[i] for i in _walk(last, ints, s)), reverse=True))


PATTERNS = ("equal", "one_two", "binary", "custom")


@guarded
def step_weights(pattern: str, n_steps: int = 1, custom=None) -> list[int]:
    """Relative step sizes: 'equal' 1:1:…; 'one_two' 1:2:2:…; 'binary' 1:2:4:…;
    'custom' the given ratios, reduced to whole numbers with no common factor (ratios must
    be whole-number multiples of each other within 0.01 %). Common practice for automatic
    banks."""
    if pattern == "custom":
        vals = list(custom or [])
        if not vals:
            raise InputError("Enter the step ratios, e.g. 1:2:2:4.")
        if len(vals) > MAX_STEPS:
            raise InputError(f"At most {MAX_STEPS} steps.")
        for v in vals:
            if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
                raise InputError("Every step ratio must be above zero.")
        lo = min(vals)
        # express each as a multiple of a common measure: try denominators 1..64 of the smallest
        for d in range(1, 65):
            unit = lo / d
            ks = [v / unit for v in vals]
            if all(abs(k - round(k)) <= 1e-4 * k for k in ks):
                w = [int(round(k)) for k in ks]
                g = 0
                for x in w:
                    g = math.gcd(g, x)
                w = [x // g for x in w]
                if sum(w) > 4096:
                    break
                return w
        raise InputError("Step ratios must be whole-number multiples of each other, e.g. 1:2:2:4 or 25:50:50.")
    if not isinstance(n_steps, int) or n_steps < 1 or n_steps > MAX_STEPS:
        raise InputError(f"Number of steps must be 1 to {MAX_STEPS}.")
    if pattern == "equal":
        return [1] * n_steps
    if pattern == "one_two":
        return [1] + [2] * (n_steps - 1)
    if pattern == "binary":
        return [2**i for i in range(n_steps)]
    raise InputError("Unknown step pattern.")


@dataclass(frozen=True)
class StepPlan:
    """An automatic bank: ``steps`` sizes [kvar], ``units`` the units in each step [kvar],
    ``base`` the size of one pattern unit [kvar], ``total`` = Σ steps [kvar]."""

    steps: tuple
    units: tuple
    base: float
    total: float

    def all_units(self) -> list[float]:
        """Every unit in the bank [kvar], largest first."""
        return sorted((u for st in self.units for u in st), reverse=True)

    def counts(self) -> list[tuple[float, int]]:
        """[(rating [kvar], how many)] over the whole bank, largest first."""
        return Selection(tuple(self.all_units()), self.total).counts()


@guarded
def plan_steps(need_kvar: float, ratings, weights, max_states: int = MAX_STATES) -> StepPlan:
    """Steps in proportion to ``weights`` with every step an exact sum of purchasable units
    from ``ratings`` [kvar], total at least ``need_kvar`` [kvar] with the least excess, then
    the fewest units. The base b is the smallest reachable unit sum with b·Σw ≥ need; step i
    is w_i·b made from the fewest units."""
    vals = _clean_ratings(ratings)
    w = _weights(weights)
    if not math.isfinite(need_kvar) or need_kvar <= 0:
        raise InputError("The kvar needed must be above zero.")
    _check_count(need_kvar, vals)
    g, ints = _grid(vals)
    return _plan_on_grid(need_kvar, vals, g, ints, w, max_states, {}, {})


@guarded
def plan_steps_many(need_kvar: float, ratings, weight_lists, max_states: int = MAX_STATES) -> list:
    """:func:`plan_steps` for each of ``weight_lists`` (need_kvar [kvar], ratings [kvar]) in one
    pass: the ratings are checked and put on their grid once, and a base shared by two patterns
    of the same Σw is found once. Returns a list of :class:`StepPlan`, None where plan_steps
    would raise (unusable weights or too many units); an empty list when the ratings or the need
    cannot be used at all."""
    try:
        vals = _clean_ratings(ratings)
        if not math.isfinite(need_kvar) or need_kvar <= 0:
            return []
        _check_count(need_kvar, vals)
        g, ints = _grid(vals)
    except InputError:
        return []
    bases: dict = {}
    made: dict = {}
    out = []
    for weights in weight_lists:
        try:
            out.append(_plan_on_grid(need_kvar, vals, g, ints, _weights(weights), max_states, bases, made))
        except (ArithmeticError, ValueError):  # InputError included: as plan_steps would raise it
            out.append(None)
    return out


def _weights(weights) -> list[int]:
    w = list(map(int, weights))
    if not w or min(w) < 1:
        raise InputError("Step weights must be whole numbers from 1.")
    return w


def _plan_on_grid(need_kvar: float, vals: list[float], g: Fraction, ints: list[int], w: list[int], max_states: int,
                  bases: dict, made: dict) -> StepPlan:
    """plan_steps on a grid already worked out; ``bases`` keeps each Σw's base selection and
    ``made`` each step size's (kvar, units), shared by the plans of one need."""
    wsum = sum(w)
    # least excess: the base b is the smallest reachable unit sum with b·Σw ≥ need
    hit = bases.get(wsum)
    if hit is None:
        _check_count(need_kvar / wsum, vals)
        hit = bases[wsum] = _select_on_grid(need_kvar / wsum, vals, g, ints, max_states)
    base, base_idx = hit
    top = min(max_states, base * max(w))
    kvar_of, units_of = {}, {}
    for x in dict.fromkeys(w):  # each weight once (a pattern repeats a few)
        # within the table a step of s grid steps has the same units in every plan (the fewest that
        # sum exactly to s: an entry does not depend on how far the table was built); beyond it they
        # may come from the base's own units, so the base is part of the key there
        s = base * x
        key = s if s <= max_states else (s, base)
        step = made.get(key)
        if step is None:
            step = made[key] = (_kvar(s, g), _step_units(s, x, vals, ints, top, base_idx))
        kvar_of[x], units_of[x] = step
    units = tuple(map(units_of.__getitem__, w))
    n_units = sum(map(len, units))
    if n_units > MAX_UNITS:
        raise InputError(f"This step plan needs {n_units} units: use fewer steps, another pattern or larger unit ratings.")
    return StepPlan(tuple(map(kvar_of.__getitem__, w)), units, _kvar(base, g), _kvar(base * wsum, g))


def _step_units(s: int, x: int, vals: list[float], ints: list[int], top: int, base_idx: list[int]) -> tuple:
    """The units [kvar] (largest first) of a step of s = x·base grid steps: the fewest summing
    exactly to s (the table built to ``top``), else x copies of the base's own units (which
    always sum exactly)."""
    count, last = _min_count_table(ints, top)
    idx = _fewest_exact(s, ints, count, last, top, max(ints))
    if idx is None:
        base_units = tuple(sorted((vals[i] for i in base_idx), reverse=True))
        return tuple(sorted(base_units * x, reverse=True))
    return tuple(sorted((vals[i] for i in idx), reverse=True))


def _fewest_exact(s: int, ints: list[int], count: list[int], last: list[int], top: int, kmax: int) -> list[int] | None:
    """Unit indices summing exactly to s grid steps with the fewest units: from the table when
    s ≤ top, else m largest units plus the best exact remainder within the table."""
    if s <= top:
        return _walk(last, ints, s) if count[s] >= 0 else None
    imax = ints.index(kmax)
    best = None
    m = -(-(s - top) // kmax)
    while m * kmax <= s:
        r = s - m * kmax
        if count[r] >= 0 and (best is None or m + count[r] < best[0]):
            best = (m + count[r], m, r)
        m += 1
    if best is None:
        return None
    return _walk(last, ints, best[2]) + [imax] * best[1]


@guarded
def best_step_count(need_kvar: float, ratings, pattern: str, max_steps: int = MAX_STEPS) -> tuple[int, StepPlan] | None:
    """For a built-in ``pattern`` ('equal', 'one_two', 'binary'), the number of steps (1 to
    ``max_steps``) whose plan exceeds ``need_kvar`` [kvar] least, then the most steps (finer
    control); None when no count gives a plan within the unit limits."""
    best = None
    for n in range(1, max_steps + 1):
        try:
            plan = plan_steps(need_kvar, ratings, step_weights(pattern, n))
        except InputError:
            continue
        key = (round(plan.total - need_kvar, 6), -n)
        if best is None or key < best[0]:
            best = (key, n, plan)
    return None if best is None else (best[1], best[2])
