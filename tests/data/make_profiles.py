"""Writes the invented load-profile files in tests/data/ (run: python tests/data/make_profiles.py).

One invented plant, two days of 30-minute intervals (2025-01-13 and 14), written in each layout
the reader supports. The figures are rounded as a logger would print them; every file holds the
same intervals, so every file must read to the same totals (within the rounding of kVA and PF).
Stamps mark the end of each interval.
"""

from __future__ import annotations

import math
import random
from datetime import datetime, timedelta
from pathlib import Path

HERE = Path(__file__).parent
START = datetime(2025, 1, 13)


def base_rows():
    """[(end of interval, kW, kvar)], all lagging, 96 intervals."""
    rnd = random.Random(15)
    rows = []
    for k in range(1, 97):
        end = START + timedelta(minutes=30 * k)
        hour = (k - 0.5) / 2 % 24
        busy = 6 <= hour < 22
        p = round((420.0 if busy else 110.0) + rnd.uniform(-30, 30), 1)
        pf = (0.80 if busy else 0.68) + rnd.uniform(-0.03, 0.03)
        q = round(p * math.tan(math.acos(pf)), 1)
        rows.append((end, p, q))
    return rows


def write():
    rows = base_rows()
    iso = lambda t: t.strftime("%Y-%m-%d %H:%M")
    files = {}
    files["kw_kvar_comma.csv"] = "Time,Demand kW,Reactive kvar\n" + "".join(
        f"{iso(t)},{p},{q}\n" for t, p, q in rows)
    files["kwh_kvarh_semicolon_decimal_comma.csv"] = (
        "Meter 00417 (invented)\nEnd of interval;Active energy kWh;Reactive energy kvarh\n" + "".join(
            f"{t:%d.%m.%Y %H:%M};{p * 0.5:.2f};{q * 0.5:.2f}\n".replace(".", ",", 0)
            .replace(f"{p * 0.5:.2f}", f"{p * 0.5:.2f}".replace(".", ","))
            .replace(f"{q * 0.5:.2f}", f"{q * 0.5:.2f}".replace(".", ","))
            for t, p, q in rows))
    files["kw_pf_tab_month_first_no_header.txt"] = "".join(
        f"{t.month}/{t.day}/{t.year} {(t.hour % 12) or 12}:{t.minute:02d} {'AM' if t.hour < 12 else 'PM'}\t{p}\t"
        f"{p / math.hypot(p, q):.4f}\n" for t, p, q in rows)
    files["kw_kva_date_and_time_columns.csv"] = "Date,Time,kW,kVA\n" + "".join(
        f"{t:%Y-%m-%d},{t:%H:%M},{p},{math.hypot(p, q):.3f}\n" for t, p, q in rows)
    files["kwh_lag_lead_kvarh.csv"] = "Timestamp,kWh,kvarh lagging,kvarh leading\n" + "".join(
        f"{t:%Y-%m-%dT%H:%M:00},{p * 0.5:.2f},{q * 0.5:.2f},0.00\n" for t, p, q in rows)
    files["kw_kvar_day_first_no_header.csv"] = "".join(
        f"{t:%d/%m/%Y %H:%M},{p},{q}\n" for t, p, q in rows)
    for name, text in files.items():
        (HERE / f"profile_{name}").write_text(text, encoding="utf-8", newline="\n")
    return files


if __name__ == "__main__":
    write()
