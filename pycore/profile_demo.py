"""Invented load profiles for the demo, the tests and the speed benchmark, and one call that
reads and analyses a profile's text (what the benchmark times).

The plant is invented: two shifts on weekdays (06:00–22:00) near 600 kW at a power factor near
0.80, nights and weekends near 150–200 kW at a lower power factor (motors and transformers
lightly loaded). Random variation comes from a seeded generator, so the same arguments always
give the same text.
"""

from __future__ import annotations

import math
import random
from datetime import date, timedelta

from .errors import guarded
from .profile_control import Bank, simulate
from .profile_read import read_profile
from .profile_stats import (curve_points, daily_profile, duration, kvar_for_billing, kvar_for_share,
                            kvar_kept_lagging, needs, pf_per_interval, totals)


@guarded
def demo_rows(days: int = 7, interval_min: int = 15, start: date = date(2025, 3, 3), seed: int = 7) -> list:
    """[(date, minute of the day at the interval's end, kW, kvar)] for an invented plant."""
    rnd = random.Random(seed)
    out = []
    for d in range(days):
        day = start + timedelta(days=d)
        weekend = day.weekday() >= 5
        for k in range(1, 24 * 60 // interval_min + 1):
            minute = k * interval_min
            hour = (minute - interval_min / 2) / 60
            busy = not weekend and 6 <= hour < 22
            base = 600.0 if busy else (200.0 if weekend else 150.0)
            p = base * (1 + 0.12 * math.sin(hour / 24 * 2 * math.pi)) + rnd.gauss(0, 0.05 * base)
            pf = (0.80 if busy else 0.70) + rnd.uniform(-0.04, 0.04)
            q = p * math.sqrt(1 - pf * pf) / pf
            out.append((day, minute, round(p, 1), round(q, 1)))
    return out


@guarded
def demo_text(days: int = 7, interval_min: int = 15, start: date = date(2025, 3, 3), seed: int = 7) -> str:
    """CSV text (comma, decimal point, header ``Time,kW,kvar``; each stamp marks the end of its
    interval, 24:00 written as 00:00 of the next day) of :func:`demo_rows`."""
    lines = ["Time,kW,kvar"]
    for day, minute, p, q in demo_rows(days, interval_min, start, seed):
        if minute == 1440:
            day, minute = day + timedelta(days=1), 0
        lines.append(f"{day.isoformat()} {minute // 60:02d}:{minute % 60:02d},{p},{q}")
    return "\n".join(lines) + "\n"


@guarded
def read_and_analyse(text: str, pf_target: float = 0.95, share: float = 0.95, bank: Bank | None = None) -> dict:
    """Read a profile's text and work out every figure the load-profile worksheet shows (totals,
    duration curves, daily profile, the three kvar figures, a controller simulation). Returns
    them in a dict; the benchmark times this call."""
    prof = read_profile(text)
    p, q, h = prof.p, prof.q, prof.hours
    tot = totals(p, q, h)
    q_share, design = kvar_for_share(p, q, pf_target, share)
    q_bill = kvar_for_billing(p, q, h, pf_target)
    step = kvar_kept_lagging(p, q, share)
    if bank is None:
        bank = Bank(0.0, tuple([q_share / 6] * 6)) if q_share > 0 else Bank(0.0, ())
    sim = simulate(prof.t, p, q, prof.interval_s, bank, pf_target)
    return {
        "profile": prof, "totals": tot, "kvar_share": q_share, "design": design, "kvar_billing": q_bill,
        "largest_step": step, "simulation": sim,
        "need_curve": curve_points(duration(needs(p, q, pf_target))),
        "q_curve": curve_points(duration(q)),
        "pf_curve": curve_points(sorted(pf_per_interval(p, q))),
        "daily": daily_profile(prof.t, p, q, prof.interval_s),
    }
