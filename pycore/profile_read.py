"""Reading a load profile from the text of a logger export or a utility's interval download.

:func:`read_profile` takes the text as pasted or opened and returns a :class:`Profile`: one
interval per kept row with its start time [s], average demand P [kW] and Q [kvar, + lagging],
and what was understood (separator, decimal mark, header, the role of every column, the
interval, the period, rows read and used) with every row skipped or flagged and why. Nothing is
dropped silently: unreadable rows, duplicates, rows off the interval grid and rows before the
header are listed as skipped; clock changes, rows out of order and export (negative kW)
intervals are kept and listed as flagged; gaps are listed with the intervals missing.

Energy columns become demand with the interval length h: kW = kWh/h (definition of average
power). kW with PF gives Q = P·tan(acos PF); kW with kVA gives Q = √(S² − P²), taken as lagging
(power triangle, circuit theory; IEEE Std 141 power-factor chapter).
"""

from __future__ import annotations

import csv
import math
from collections import Counter
from dataclasses import dataclass, field

from . import profile_columns as pc
from . import profile_time as pt
from .errors import InputError, guarded
from .profile_reactive import layout_words, reactive

MAX_CHARS = 20_000_000
"""Largest text read [characters]: 20 MB, about four years of 5-minute rows (our own limit)."""
MAX_ROWS = 250_000
"""Most rows read: about two years of 5-minute intervals (our own limit)."""
INTERVALS_MIN = (5, 10, 15, 30, 60)
"""Interval lengths accepted [min], as loggers and utility meters record demand."""
MIXED_SHARE = 0.10
"""Above this share of steps at a second interval length (or rows off the interval grid) a file
is refused as mixed; below it those rows are listed and left out (our own choice)."""
_SAMPLE = 60
PREAMBLE = "above the header: not a reading"
"""Why a title or note line above the header is left out (listed, but not a lost reading)."""


@dataclass
class Understood:
    """What the reader found: ``separator`` and ``decimal`` marks as words, ``header`` (the header
    row's number or 0), ``columns`` [(column number, header text, role words)], ``layout``
    (sentence), ``interval_min`` [min], ``date_order`` (sentence), ``stamps`` ('end' or
    'start'), ``first``/``last`` (interval starts [s]), ``rows_read`` (rows that looked like data
    or could not be read), ``rows_used``, ``chars`` [characters]."""

    separator: str = ""
    decimal: str = ""
    header: int = 0
    columns: list = field(default_factory=list)
    layout: str = ""
    interval_min: int = 0
    date_order: str = ""
    stamps: str = "end"
    first: int = 0
    last: int = 0
    rows_read: int = 0
    rows_used: int = 0
    chars: int = 0


@dataclass
class Profile:
    """A load profile: parallel lists in time order, one entry per interval: ``t`` interval
    start [s from 0001-01-01, local clock], ``p`` [kW], ``q`` [kvar, + lagging], ``row`` (the
    line number in the text). ``interval_s`` [s]. ``skipped`` and ``flagged``: [(line, reason)];
    ``gaps``: [(last start before [s], next start after [s], intervals missing, note)];
    ``notes``: sentences about assumptions made."""

    t: list
    p: list
    q: list
    row: list
    interval_s: int
    understood: Understood
    skipped: list = field(default_factory=list)
    flagged: list = field(default_factory=list)
    gaps: list = field(default_factory=list)
    notes: list = field(default_factory=list)

    @property
    def hours(self) -> float:
        """Length of one interval [h]."""
        return self.interval_s / 3600.0


def _check_text(text) -> None:
    if not isinstance(text, str):
        raise InputError("The profile must be text (CSV or tab-separated).")
    if len(text) > MAX_CHARS:
        raise InputError(f"The profile is {len(text) / 1e6:.1f} MB of text; at most {MAX_CHARS // 1_000_000} MB "
                         f"can be read here. Split it into parts of a year or less.")
    if not text.strip():
        raise InputError("The profile is empty: paste the rows or open a CSV or text file.")
    head = text[:4096]
    bad = sum(1 for ch in head if ord(ch) < 32 and ch not in "\t\r\n\f") + head.count("\ufffd")
    if "\x00" in head or bad > len(head) // 50:
        raise InputError("This is not text (a spreadsheet workbook or another binary file?): save or export it "
                         "as CSV or text and open that.")


def _separator(lines: list[str]) -> str:
    best, best_n = "", 0
    for d in ("\t", ";", ","):
        counts = Counter(line.count(d) for line in lines)
        k, n = max(counts.items(), key=lambda kv: (kv[1], kv[0]))
        if k >= 1 and n > best_n:
            best, best_n = d, n
    if not best:
        raise InputError("No column separator found: the rows need a comma, semicolon or tab between columns.")
    return best


def _cell_kind(cell: str) -> str:
    """'stamp', 'date', 'clock', 'number' or 'text' for one cell."""
    c = cell.strip()
    if not c:
        return "text"
    d, t, _ = pt.split_stamp(c)
    if pt.date_parts(d) is not None:
        if not t:
            return "date"
        return "stamp" if pt.time_of_day(t) is not None else "text"
    if pt.time_of_day(c) is not None:
        return "clock"
    try:
        float(c.replace(",", ".").replace(" ", ""))
        return "number"
    except ValueError:
        return "text"


def _is_data(row: list[str]) -> bool:
    kinds = [_cell_kind(c) for c in row]
    has_time = "stamp" in kinds or ("date" in kinds and "clock" in kinds)
    return has_time and kinds.count("number") >= 1


def _float(cell: str, comma: bool) -> float:
    c = cell.strip()
    if comma:
        if "." in c:
            c = c.replace(".", "")
        c = c.replace(",", ".")
    if " " in c or "\u00a0" in c:
        c = c.replace(" ", "").replace("\u00a0", "")
    v = float(c)
    if not math.isfinite(v):
        raise ValueError
    return v


@guarded
def read_profile(text: str, *, date_order: str = "auto", roles: str = "", stamps: str = "end") -> Profile:
    """Read a load profile from text (see the module notes).

    ``date_order``: 'auto' (decided from the data; an :class:`InputError` asks the user when
    it cannot be), 'dmy' or 'mdy'. ``roles``: the user's column roles in column order (see
    :func:`pycore.profile_columns.parse_roles`), '' to take them from the header or, without
    one, as time, kW, kvar. ``stamps``: 'end' when each time stamp marks the end of its interval
    (usual in utility interval data, common practice), 'start' when it marks the start.
    Returns a :class:`Profile` [kW, kvar, s]. Raises :class:`InputError` with a message for a
    person when nothing sound can be read."""
    from .profile_sequence import order_rows  # the time-order checks live beside this module

    _check_text(text)
    if date_order not in pt.ORDERS:
        raise InputError("Date order must be auto, day first or month first.")
    if stamps not in ("end", "start"):
        raise InputError("Time stamps mark the end or the start of each interval.")
    text = text.lstrip("\ufeff")
    raw_lines = text.splitlines()
    nums = [i for i, ln in enumerate(raw_lines, 1) if ln.strip()]
    if len(nums) > MAX_ROWS + 50:
        raise InputError(f"The profile has {len(nums):,} rows; at most {MAX_ROWS:,} can be read here "
                         "(about two years of 5-minute data). Split the file.")
    lines = raw_lines if len(nums) == len(raw_lines) else [raw_lines[i - 1] for i in nums]
    sep = _separator(lines[:_SAMPLE] if len(lines) <= 2 * _SAMPLE else lines[_SAMPLE:2 * _SAMPLE] + lines[:10])
    if '"' in text:
        rows = list(csv.reader(lines, delimiter=sep))  # quoted cells
    else:
        rows = [ln.split(sep) for ln in lines]

    first = next((i for i, r in enumerate(rows[:200]) if _is_data(r)), None)
    if first is None:
        raise InputError("No row with a date, a time and a number was found: the profile needs a time stamp "
                         "and readings in each row.")
    und = Understood(separator={"\t": "tab", ";": "semicolon", ",": "comma"}[sep], chars=len(text), stamps=stamps)
    skipped: list = []
    header: list[str] = []
    if first > 0:
        header = [c.strip() for c in rows[first - 1]]
        und.header = nums[first - 1]
        for i in range(first - 1):
            skipped.append((nums[i], PREAMBLE))
    data = rows[first:]
    dnums = nums[first:]
    if len(data) < 2:
        raise InputError("Only one row of readings was found: a profile needs at least two intervals.")

    width = max(len(r) for r in data[:_SAMPLE])
    sample = [r for r in data[:_SAMPLE] if len(r) == width] or data[:1]
    kinds = []
    for j in range(width):
        ks = Counter(_cell_kind(r[j]) for r in sample if j < len(r))
        kinds.append(ks.most_common(1)[0][0])

    num_cols = [j for j in range(width) if kinds[j] == "number"]
    comma = sep != "," and any("," in r[j] for r in data[:500] for j in num_cols if j < len(r))
    notes: list[str] = []
    if roles.strip():
        typed = pc.parse_roles(roles)
        if len(typed) > width:
            raise InputError(f"{len(typed)} column roles were given but the rows have {width} columns.")
        col_roles = typed + [("skip", 1.0)] * (width - len(typed))
        how = "as set"
    else:
        col_roles = []
        value_cols = []
        for j in range(width):
            k = kinds[j]
            if k == "stamp":
                col_roles.append(("time", 1.0) if not any(r == "time" for r, _ in col_roles) else ("skip", 1.0))
            elif k == "date" and not any(r in ("date", "time") for r, _ in col_roles):
                col_roles.append(("date", 1.0))
            elif k == "clock" and not any(r in ("clock", "time") for r, _ in col_roles):
                col_roles.append(("clock", 1.0))
            elif k == "number":
                hr = pc.header_role(header[j]) if header and j < len(header) else None
                if hr is not None and any(r == hr[0] for r, _ in col_roles):
                    hr = None  # a second column of the same kind (e.g. export kW) is not used
                    notes.append(f"Column {j + 1} ('{header[j][:20]}') repeats a quantity already read and is not used.")
                col_roles.append(hr or ("skip", 1.0))
                value_cols.append(j)
            else:
                col_roles.append(("skip", 1.0))
        how = "from the header" if header else "assumed"
        if not header or not any(r in pc.P_ROLES or r in pc.Q_ROLES for r, _ in col_roles):
            if header:
                notes.append("The header names no known quantity: the columns are read as time, kW, kvar.")
            if len(value_cols) < 2:
                raise InputError("Each row needs at least two readings (kW and kvar, kVA or power factor) beside its time.")
            a, b = value_cols[0], value_cols[1]
            second = [r[b] for r in sample if b < len(r)]
            try:
                vals = [_float(c, comma) for c in second]
                looks_pf = all(0 < abs(v) <= 1 for v in vals)
            except ValueError:
                looks_pf = False
            col_roles[a] = ("kw", 1.0)
            col_roles[b] = ("pf", 1.0) if looks_pf else ("kvar", 1.0)
            how = "assumed (no header): set the column roles if this is wrong"
    role_names = [r for r, _ in col_roles]
    if "time" in role_names:
        time_cols = (role_names.index("time"), None)
    elif "date" in role_names and "clock" in role_names:
        time_cols = (role_names.index("date"), role_names.index("clock"))
    else:
        raise InputError("No column holds the date and time (or a date column and a time column): "
                         "set the column roles, e.g. time, kW, kvar.")
    p_role, q_kind = pc.layout(role_names)
    und.columns = [(j + 1, header[j] if header and j < len(header) else "", pc.ROLE_WORDS[r]
                    + (f" (× {s:g} to kilo units)" if s != 1.0 else "")) for j, (r, s) in enumerate(col_roles)]
    und.columns.append(("", "", f"roles {how}"))

    und.decimal = "comma" if comma else "point"

    # -- time stamps: split once, read each distinct date and each distinct time once
    tc, cc = time_cols
    n_rows = len(data)
    stamp_cells = [r[tc] if tc < len(r) else "" for r in data]
    zoned = False
    if cc is None:
        mid = "T" if any("T" in c for c in stamp_cells[:20]) else " "
        if mid == " " and not any(pt._ZONE.search(c.strip()) for c in stamp_cells[:20]):
            halves = [c.strip().partition(" ") for c in stamp_cells]
            split_d = [x[0] for x in halves]
            split_t = [x[2].strip() for x in halves]
        else:
            trip = [pt.split_stamp(c) for c in stamp_cells]
            split_d = [x[0] for x in trip]
            split_t = [x[1] for x in trip]
            zoned = any(x[2] for x in trip)
    else:
        split_d = [c.strip() for c in stamp_cells]
        split_t = [r[cc].strip() if cc < len(r) else "" for r in data]
    dates: dict = dict.fromkeys(split_d)
    order, order_how = pt.resolve_order([d for d in dates if d], date_order)
    und.date_order = order_how
    for d in dates:
        p = pt.date_parts(d) if d else None
        dates[d] = pt.ordinal(p, order) if p else None
    clocks = {t: (pt.time_of_day(t) if t else None) for t in set(split_t)}
    if zoned:
        notes.append("Time-zone offsets in the stamps were set aside: the local clock time is used.")
    days = [dates[d] for d in split_d]
    secs = [clocks[t] for t in split_t]

    # -- values, a column at a time
    used = [(j, r, s) for j, (r, s) in enumerate(col_roles) if r not in pc.TIME_ROLES and r != "skip"]
    columns = [_column(data, j, comma, s) for j, _, s in used]
    T: list[int] = []
    V: list[list[float]] = [[] for _ in used]
    R: list[int] = []
    clean = None not in days and None not in secs and all(None not in col for col in columns)
    if clean:
        T = [d * pt.DAY_S + x for d, x in zip(days, secs)]
        V = columns
        R = list(dnums)
    else:
        for i in range(n_rows):
            if days[i] is None:
                skipped.append((dnums[i], f"date or time not readable: '{stamp_cells[i].strip()[:24]}'"))
                continue
            if secs[i] is None:
                skipped.append((dnums[i], f"time not readable: '{split_t[i][:16]}'"))
                continue
            bad = next((k for k, col in enumerate(columns) if col[i] is None), None)
            if bad is not None:
                j = used[bad][0]
                r = data[i]
                skipped.append((dnums[i], "too few columns" if j >= len(r) else
                                f"column {j + 1}: '{r[j].strip()[:16]}' is not a number"))
                continue
            T.append(days[i] * pt.DAY_S + secs[i])
            for lst, col in zip(V, columns):
                lst.append(col[i])
            R.append(dnums[i])
    und.rows_read = len(data)
    if len(T) < 2:
        raise InputError("Fewer than two rows could be read: "
                         + (f"row {skipped[-1][0]}: {skipped[-1][1]}." if skipped else "check the file."))

    keep, interval_s, seq_flagged, seq_skipped, gaps = order_rows(T, R, V, INTERVALS_MIN, MIXED_SHARE)
    skipped.extend(seq_skipped)
    flagged = list(seq_flagged)
    h = interval_s / 3600.0
    cols = {role: [V[k][i] for i in keep] for k, (_, role, _) in enumerate(used)}
    scale = {role: (1.0 / h if role in pc.ENERGY_ROLES else 1.0) for role in cols}
    P = [v * scale[p_role] for v in cols[p_role]]
    Q, q_notes, q_bad = reactive(cols, scale, q_kind, P)
    notes.extend(q_notes)
    rows_kept = [R[i] for i in keep]
    t_kept = [T[i] - (interval_s if stamps == "end" else 0) for i in keep]
    if q_bad:
        bad_set = set(q_bad)
        for i in q_bad:
            skipped.append((rows_kept[i], q_bad[i]))
        sel = [i for i in range(len(P)) if i not in bad_set]
        P, Q, rows_kept, t_kept = [P[i] for i in sel], [Q[i] for i in sel], [rows_kept[i] for i in sel], [t_kept[i] for i in sel]
    for i, p in enumerate(P):
        if p < 0:
            flagged.append((rows_kept[i], "negative kW: power exported in this interval"))
    if len(P) < 2:
        raise InputError("Fewer than two intervals remain after the rows listed were left out.")
    und.layout = layout_words(p_role, q_kind, role_names)
    und.interval_min = interval_s // 60
    und.first, und.last = t_kept[0], t_kept[-1]
    und.rows_used = len(P)
    skipped.sort()
    flagged.sort()
    return Profile(t_kept, P, Q, rows_kept, interval_s, und, skipped, flagged, gaps, notes)


def _try_float(cell: str, comma: bool):
    try:
        return _float(cell, comma)
    except ValueError:
        return None


def _column(data: list, j: int, comma: bool, scale: float) -> list:
    """Column j of every row as numbers times ``scale``, None where a cell is missing or not a
    number. Whole-column conversion first (fast), cell by cell only when that fails."""
    try:
        cells = [r[j] for r in data]
    except IndexError:
        cells = [r[j] if j < len(r) else "" for r in data]
    if comma:
        cells = [c.replace(".", "").replace(",", ".") for c in cells]
    try:
        vals = list(map(float, cells))
        if not all(map(math.isfinite, vals)):
            raise ValueError
    except ValueError:
        vals = [_try_float(c, False) for c in cells]
    if scale != 1.0:
        vals = [None if v is None else v * scale for v in vals]
    return vals
