"""Reading load-profile text (pycore.profile_read and its helpers).

The invented files in tests/data/ (written by tests/data/make_profiles.py from one invented
plant) hold the same 96 half-hour intervals in six layouts; each must read to the same figures
as the plant's own rows, summed here with numpy (energy = Σ P·h, the definition of average
demand; kvar from kVA or PF by the power triangle, IEEE Std 141 power-factor chapter). Files
that round kVA to 0.001 and PF to 0.0001 agree within that rounding.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from data.make_profiles import base_rows
from pycore import profile_read as pr
from pycore.errors import InputError
from pycore.profile_stats import totals

DATA = Path(__file__).parent / "data"
FILES = sorted(DATA.glob("profile_*"))


def read(text, **kw):
    return pr.read_profile(text, **kw)


def test_the_data_files_are_what_the_script_writes(tmp_path, monkeypatch):
    import data.make_profiles as mk
    monkeypatch.setattr(mk, "HERE", tmp_path)
    mk.write()
    for path in FILES:
        assert (tmp_path / path.name).read_bytes() == path.read_bytes(), path.name
    assert len(FILES) == 6


@pytest.mark.parametrize("path", FILES, ids=[p.name for p in FILES])
def test_every_layout_reads_to_the_same_figures(path):
    rows = base_rows()
    p_ref = np.array([r[1] for r in rows])
    q_ref = np.array([r[2] for r in rows])
    prof = read(path.read_text(encoding="utf-8"))
    assert prof.interval_s == 1800 and prof.understood.interval_min == 30
    assert len(prof.p) == 96
    assert prof.gaps == [] and prof.flagged == []
    tot = totals(prof.p, prof.q, prof.hours)
    assert tot.kwh == pytest.approx(np.sum(p_ref) * 0.5, rel=1e-12)
    rough = "kva" in path.name or "pf" in path.name  # rounded kVA / PF in the file
    assert tot.kvarh_lag == pytest.approx(np.sum(q_ref) * 0.5, rel=2e-4 if rough else 1e-12)
    assert np.allclose(prof.p, p_ref, rtol=1e-12)
    assert np.allclose(prof.q, q_ref, rtol=2e-3 if rough else 1e-12, atol=0.05 if rough else 0)
    # stamps mark the end of each interval: the first interval starts at midnight on 2025-01-13
    from datetime import date
    assert prof.t[0] == date(2025, 1, 13).toordinal() * 86400
    assert prof.t[-1] - prof.t[0] == 95 * 1800


def test_what_was_understood_is_reported():
    prof = read((DATA / "profile_kwh_kvarh_semicolon_decimal_comma.csv").read_text())
    u = prof.understood
    assert u.separator == "semicolon" and u.decimal == "comma" and u.header == 2
    roles = [c[2] for c in u.columns]
    assert roles[:3] == ["date and time", "kWh in the interval", "kvarh in the interval (+ lagging)"]
    assert "day first" in u.date_order
    assert prof.skipped == [(1, "above the header: not a reading")]
    assert u.rows_read == 96 and u.rows_used == 96
    prof = read((DATA / "profile_kw_pf_tab_month_first_no_header.txt").read_text())
    assert prof.understood.separator == "tab" and prof.understood.header == 0
    assert "month first" in prof.understood.date_order
    assert "assumed" in prof.understood.columns[-1][2]


def test_user_roles_override_the_guess():
    text = (DATA / "profile_kw_kvar_day_first_no_header.csv").read_text()
    normal = read(text)
    swapped = read(text, roles="time, kvar, kW")
    assert swapped.p == normal.q and swapped.q == normal.p
    energy = read(text, roles="timestamp; kWh; kvarh")
    assert energy.p == pytest.approx([x * 2 for x in normal.p])  # kWh per half hour ÷ 0.5 h
    with pytest.raises(InputError, match="Column 2"):
        read(text, roles="time, watts?, kvar")
    with pytest.raises(InputError, match="kvar"):
        read(text, roles="time, kW, skip")


def _rows(stamps_values, header="Time,kW,kvar"):
    return header + "\n" + "\n".join(f"{t},{p},{q}" for t, p, q in stamps_values) + "\n"


def _day(day="2025-06-02", n=8, step=15, p=100.0, q=50.0, start=15):
    out = []
    for k in range(n):
        m = start + k * step
        out.append((f"{day} {m // 60:02d}:{m % 60:02d}", p + k, q))
    return out


def test_gaps_are_listed_with_the_intervals_missing():
    rows = _day(n=8)
    del rows[3:5]  # two intervals missing
    prof = read(_rows(rows))
    assert len(prof.gaps) == 1 and prof.gaps[0][2] == 2 and "2 intervals missing" in prof.gaps[0][3]
    assert len(prof.p) == 6


def test_duplicates_are_skipped_and_named():
    rows = _day(n=6)
    rows.insert(3, rows[2])  # the same row twice
    rows.insert(5, (rows[4][0], 999, 1))  # the same time, other readings
    prof = read(_rows(rows))
    reasons = dict(prof.skipped)
    assert "repeated row" in reasons[5]  # line 5 = header + 4th row
    assert "other readings" in reasons[7] and "first is used" in reasons[7]
    assert 999 not in prof.p and len(prof.p) == 6


def test_rows_out_of_order_are_flagged_kept_and_sorted():
    rows = _day(n=6)
    rows[2], rows[3] = rows[3], rows[2]
    prof = read(_rows(rows))
    assert any("earlier than the row before" in r for _, r in prof.flagged)
    assert prof.t == sorted(prof.t) and len(prof.p) == 6 and prof.skipped == []


def test_clock_set_back_keeps_the_repeated_hour():
    # end of summer time: 01:15 … 02:00, then 01:15 … 02:00 again (local clock), then 02:15
    rows = [(f"2025-10-26 {h:02d}:{m:02d}", 100, 40) for h, m in ((1, 15), (1, 30), (1, 45), (2, 0))]
    rows += [(f"2025-10-26 {h:02d}:{m:02d}", 200, 80) for h, m in ((1, 15), (1, 30), (1, 45), (2, 0))]
    rows += [("2025-10-26 02:15", 100, 40), ("2025-10-26 02:30", 100, 40)]
    prof = read(_rows(rows))
    assert len(prof.p) == 10 and prof.skipped == []
    assert any("clock set back" in r for _, r in prof.flagged)
    assert sum(prof.p) == 4 * 100 + 4 * 200 + 200


def test_clock_set_forward_is_not_missing_data():
    rows = [(f"2025-03-30 {h:02d}:{m:02d}", 100, 40) for h, m in ((1, 15), (1, 30), (1, 45), (2, 0), (3, 15), (3, 30))]
    prof = read(_rows(rows))
    assert len(prof.gaps) == 1 and prof.gaps[0][2] == 0 and "clock set forward" in prof.gaps[0][3]


def test_unreadable_rows_are_listed_by_row_number():
    rows = _day(n=12)
    rows[1] = (rows[1][0], "abc", 5)
    rows[3] = ("2025-06-31 01:00", 5, 5)  # 31 June does not exist
    rows[4] = ("2025-06-02 25:00", 5, 5)
    prof = read(_rows(rows))
    reasons = dict(prof.skipped)
    assert "'abc' is not a number" in reasons[3]
    assert "not readable" in reasons[5] and "not readable" in reasons[6]
    assert len(prof.p) == 9


def test_negative_kw_is_flagged_as_export_and_kept():
    rows = _day(n=4)
    rows[1] = (rows[1][0], -20, 5)
    prof = read(_rows(rows))
    assert dict(prof.flagged)[3].startswith("negative kW")
    assert -20 in prof.p
    assert totals(prof.p, prof.q, prof.hours).kwh_export == pytest.approx(5.0)


def test_mixed_interval_lengths_are_refused_with_a_message():
    rows = _day(n=20, step=15) + _day(n=30, step=5, start=15 * 21)
    with pytest.raises(InputError, match="Mixed interval lengths"):
        read(_rows(rows))


def test_a_few_rows_off_the_grid_are_left_out_and_listed():
    rows = _day(n=30)
    rows.insert(10, ("2025-06-02 02:52", 5, 5))
    prof = read(_rows(rows))
    assert "grid" in dict(prof.skipped)[12]
    assert len(prof.p) == 30


def test_intervals_found_from_the_stamps():
    for step in (5, 10, 15, 30, 60):
        assert read(_rows(_day(n=6, step=step, start=step))).interval_s == step * 60
    with pytest.raises(InputError, match="7 min apart"):
        read(_rows(_day(n=6, step=7, start=7)))


def test_date_order_from_the_sequence_or_asked():
    # 01/02 … 02/02: day first steps one day at a time; month first would jump a month
    rows = [(f"{d:02d}/02/2025 {h:02d}:00", 10, 5) for d in (1, 2) for h in range(1, 24)]
    prof = read(_rows(rows))
    assert "day first" in prof.understood.date_order
    from datetime import date
    assert prof.t[-1] // 86400 == date(2025, 2, 2).toordinal()
    # one day only: cannot be told; the message asks, and a forced order reads it
    one = [(f"03/04/2025 {h:02d}:00", 10, 5) for h in range(1, 24)]
    with pytest.raises(InputError, match="choose the date order"):
        read(_rows(one))
    assert read(_rows(one), date_order="mdy").t[0] // 86400 == date(2025, 3, 4).toordinal()
    assert read(_rows(one), date_order="dmy").t[0] // 86400 == date(2025, 4, 3).toordinal()


def test_pf_and_kva_rows_that_cannot_be_read_are_listed():
    text = "Time,kW,PF\n2025-06-02 00:15,100,0.8\n2025-06-02 00:30,100,-0.9\n2025-06-02 00:45,100,0.9\n"
    prof = read(text)
    assert "sign convention" in dict(prof.skipped)[3]
    text = "Time,kW,kVA\n2025-06-02 00:15,100,125\n2025-06-02 00:30,100,80\n2025-06-02 00:45,100,100\n"
    prof = read(text)
    assert "kVA below kW" in dict(prof.skipped)[3]
    assert prof.q[-1] == 0.0


def test_pf_in_percent_and_time_zone_suffixes():
    text = "Time,kW,PF %\n2025-06-02T00:15+02:00,100,80\n2025-06-02T00:30+02:00,100,80\n"
    prof = read(text)
    assert prof.q == pytest.approx([75.0, 75.0])  # 100·tan(acos 0.8)
    assert any("percentages" in n for n in prof.notes) and any("Time-zone" in n for n in prof.notes)


@pytest.mark.parametrize("text,word", [
    ("", "empty"),
    ("  \n\n ", "empty"),
    ("PK\x03\x04\x00\x00binary", "not text"),
    ("Time,kW,kvar\n2025-06-02 00:15,100,50\n", "one row"),
    ("Time,kW,kvar\n", "No row with a date"),
    ("just some words\nand more", "No column separator"),
    ("Time,kW,kvar\n2025-06-02 00:15,100,50\n2025-06-02 00:15,100,50\n", "same time"),
    ("Time,kW\n2025-06-02 00:15,100\n2025-06-02 00:30,100\n", "No column gives kvar"),
    ("Time,kW,Status\n2025-06-02 00:15,100,1\n2025-06-02 00:30,100,1\n", "kvar"),
    ("Date,kW,kvar\n2025-06-02,100,50\n2025-06-03,100,50\n", "No row with a date, a time"),
])
def test_bad_text_gets_a_clear_message(text, word):
    with pytest.raises(InputError) as e:
        read(text)
    assert word.lower() in str(e.value).lower(), str(e.value)


def test_size_limit_is_stated():
    with pytest.raises(InputError, match="at most 20 MB"):
        read("x" * (pr.MAX_CHARS + 1))


def test_end_stamps_put_midnight_in_the_day_before():
    # a stamp at 00:00 that marks the end of its interval belongs to the previous day (and month)
    from pycore.profile_control import Bank, simulate
    text = _rows([("2025-01-31 23:30", 10, 5), ("2025-01-31 23:45", 10, 5), ("2025-02-01 00:00", 10, 5),
                  ("2025-02-01 00:15", 20, 5)])
    end = read(text)
    sim = simulate(end.t, end.p, end.q, end.interval_s, Bank(), 0.95)
    assert [m.label for m in sim.months] == ["2025-01", "2025-02"]
    assert sim.months[0].kwh == pytest.approx(3 * 10 * 0.25) and sim.months[1].kwh == pytest.approx(20 * 0.25)
    start = read(text, stamps="start")
    sim = simulate(start.t, start.p, start.q, start.interval_s, Bank(), 0.95)
    assert sim.months[0].kwh == pytest.approx(2 * 10 * 0.25)


def test_lagging_and_leading_columns_net_out():
    text = ("Time,kvarh lag,kvarh lead,kWh\n"
            "2025-06-02 00:15,10,0,25\n2025-06-02 00:30,0,4,25\n2025-06-02 00:45,6,1,25\n")
    prof = read(text)
    assert prof.q == pytest.approx([40.0, -16.0, 20.0])  # (lag − lead) ÷ 0.25 h
    assert prof.p == pytest.approx([100.0, 100.0, 100.0])
    t = totals(prof.p, prof.q, prof.hours)
    assert t.kvarh_lag == pytest.approx(15.0) and t.kvarh_lead == pytest.approx(4.0)
