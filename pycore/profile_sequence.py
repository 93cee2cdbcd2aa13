"""Time-order checks on the rows of a load profile: the interval length, rows off its grid,
mixed interval lengths, duplicates, clock changes (summer time), rows out of order and gaps.

Clock changes follow from local-time stamps: when clocks go back one hour the stamps jump back
by one hour less one interval and the hour repeats (both readings are real intervals and are
kept); when they go forward an hour of stamps is missing though no reading is (reported as a
clock change, not as missing data). Common practice for interval meters that record local time.
"""

from __future__ import annotations

from collections import Counter

from . import profile_time as pt
from .errors import InputError, guarded

_FORWARD_MONTHS = (3, 4, 9, 10)  # months in which clocks go forward, north or south (common practice)


def _minutes(s: int) -> str:
    m = s / 60
    return f"{m:g} min" if m < 120 else f"{m / 60:g} h"


@guarded
def order_rows(T: list, R: list, V: list, intervals_min, mixed_share: float):
    """Check the rows' times ``T`` [s] (line numbers ``R``, value lists ``V``) in file order.

    Returns ``(keep, interval_s, flagged, skipped, gaps)``: the indices kept, in time order;
    the interval [s] (the most common step between distinct times, which must be one of
    ``intervals_min`` [min]); rows kept but worth a look and rows left out, as (line, reason);
    and gaps as (stamp before [s], stamp after [s], intervals missing, note). Raises
    :class:`InputError` when the interval is not one accepted, or when more than
    ``mixed_share`` of the steps or rows belong to another interval length."""
    if len(R) != len(T) or any(len(v) != len(T) for v in V) or not intervals_min:
        raise InputError("Times, rows and values must be lists of the same length.")
    file_steps = [b - a for a, b in zip(T, T[1:])]
    increasing = bool(file_steps) and min(file_steps) > 0
    uniq = T if increasing else sorted(set(T))
    if len(uniq) < 2:
        raise InputError("All rows carry the same time: the profile needs one row per interval.")
    steps = file_steps if increasing else [b - a for a, b in zip(uniq, uniq[1:])]
    diffs = Counter(steps)
    step, n_step = diffs.most_common(1)[0]
    allowed = {m * 60 for m in intervals_min}
    names = ", ".join(str(m) for m in intervals_min)
    if step not in allowed:
        raise InputError(f"The readings are {_minutes(step)} apart; profiles with intervals of {names} minutes can be read.")
    total = len(steps)
    # a run of steps of another accepted length (not a lone gap) is a second interval length
    runs = Counter(d for d, e in zip(steps, steps[1:]) if d == e and d != step and d in allowed)
    for d, c in runs.most_common():
        if c >= 3 and c > mixed_share * total:
            c = diffs[d]
            raise InputError(f"Mixed interval lengths: {n_step} steps of {_minutes(step)} and {c} of {_minutes(d)}. "
                             "Split the file into parts with one interval length each.")
    phase_counts = Counter(t % step for t in T)
    phase, on_grid = phase_counts.most_common(1)[0]
    off = len(T) - on_grid
    if off >= 3 and off > mixed_share * len(T):
        raise InputError(f"Mixed interval lengths: {off} of {len(T)} rows are off the {_minutes(step)} grid of the others. "
                         "Split the file into parts with one interval length each.")
    flagged: list = []
    skipped: list = []
    if increasing and on_grid == len(T):
        # the usual file: strictly increasing, on one grid (no duplicates, nothing backwards)
        gaps = [_gap(T[i], T[i + 1], step) for i, d in enumerate(file_steps) if d > step]
        return list(range(len(T))), step, flagged, skipped, gaps
    seen: dict = {}
    repeated: set = set()
    repeat_end = None
    keep: list = []
    prev = None
    for i, t in enumerate(T):
        if t % step != phase:
            skipped.append((R[i], f"not on the {_minutes(step)} grid of the other rows (mixed interval lengths?)"))
            continue
        if prev is not None and t < prev:
            if prev - t == 3600 - step:
                repeat_end = prev
                flagged.append((R[i], "clock set back one hour (end of summer time?): the repeated hour is kept"))
            else:
                flagged.append((R[i], "earlier than the row before: the rows are taken in time order"))
        if repeat_end is not None and t > repeat_end:
            repeat_end = None
        j = seen.get(t)
        if j is not None:
            if repeat_end is not None and t not in repeated:
                repeated.add(t)
            else:
                same = all(v[i] == v[j] for v in V)
                skipped.append((R[i], f"same time as row {R[j]}"
                                + (" (a repeated row)" if same else " with other readings: the first is used")))
                prev = t
                continue
        else:
            seen[t] = i
        keep.append(i)
        prev = t
    keep.sort(key=lambda k: T[k])
    times = sorted(seen)
    gaps = [_gap(a, b, step) for a, b in zip(times, times[1:]) if b - a > step]
    return keep, step, flagged, skipped, gaps


def _gap(a: int, b: int, step: int) -> tuple:
    """(stamp before [s], stamp after [s], intervals missing, note) for a gap between two stamps."""
    missing = (b - a) // step - 1
    hour = (a % pt.DAY_S) // 3600
    if b - a == step + 3600 and hour <= 4 and pt.month_of(a // pt.DAY_S)[1] in _FORWARD_MONTHS:
        return (a, b, 0, "clock set forward one hour (start of summer time?): no reading missing")
    return (a, b, missing, f"{missing} interval{'s' if missing != 1 else ''} missing")
