"""Timestamps in load-profile files: date and time of day as loggers and utility downloads
write them, and the day-first / month-first question.

Times are counted in whole seconds from 0001-01-01 00:00 of the proleptic Gregorian calendar
(``date.toordinal()·86400 + seconds of the day``), local clock time as written; any time-zone
suffix (``Z``, ``+01:00``) is noted and set aside, because the file's clock is what the bill
and the plant's shifts follow. Dates: ``2025-03-31`` (year first, then month and day, ISO
8601 order) or ``31/03/2025``, ``03/31/2025``, ``31.03.25``, ``3-31-2025`` (year last; the
order of day and month decided from the data or by the user). Times: ``7:15``, ``07:15:00``,
``7:15 PM``, ``24:00`` (the end of the day, read as 00:00 of the next).
"""

from __future__ import annotations

import re
from datetime import date

from .errors import InputError, guarded

DAY_S = 86_400

_DATE = re.compile(r"^(\d{1,4})[-/.](\d{1,2})[-/.](\d{1,4})$")
_TIME = re.compile(r"^(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,]\d+)?)?\s*([AaPp]\.?[Mm]\.?)?$")
_ZONE = re.compile(r"(Z|[+-]\d{2}:?\d{2})$")

ORDERS = ("auto", "dmy", "mdy")


class DateOrderError(InputError):
    """The dates could be read day first or month first and the data cannot tell: the user
    must choose (the message says so)."""

ORDER_WORDS = {"ymd": "year first (ISO 8601)", "dmy": "day first", "mdy": "month first"}


@guarded
def split_stamp(text: str) -> tuple[str, str, bool]:
    """Split ``'2025-03-31 07:15'`` or ``'2025-03-31T07:15Z'`` into date text, time text, and
    whether a time-zone suffix was set aside. A cell with no time gives ``(text, '', False)``."""
    s = text.strip()
    zoned = False
    if "T" in s and s[:1].isdigit():
        d, _, t = s.partition("T")
    else:
        d, _, t = s.partition(" ")
    t = t.strip()
    if t:
        m = _ZONE.search(t)
        if m and ":" in t[: m.start()]:
            t = t[: m.start()].strip()
            zoned = True
    return d, t, zoned


@guarded
def time_of_day(text: str) -> int | None:
    """Seconds after midnight [s] for a time of day such as ``7:15``, ``07:15:30`` or
    ``7:15 pm``; 86 400 for ``24:00``; None when the text is not a time."""
    m = _TIME.match(text.strip())
    if not m:
        return None
    h, mi, sec = int(m.group(1)), int(m.group(2)), int(m.group(3) or 0)
    ampm = m.group(4)
    if ampm:
        if not 1 <= h <= 12:
            return None
        pm = ampm[0] in "Pp"
        h = (h % 12) + (12 if pm else 0)
    if mi > 59 or sec > 59:
        return None
    if h == 24 and mi == 0 and sec == 0:
        return DAY_S
    if h > 23:
        return None
    return h * 3600 + mi * 60 + sec


@guarded
def date_parts(text: str) -> tuple[int, int, int, bool] | None:
    """The three numbers of a date and whether the year comes first (4-digit first group);
    None when the text is not a date of the accepted shapes."""
    m = _DATE.match(text.strip())
    if not m:
        return None
    a, b, c = m.group(1), m.group(2), m.group(3)
    if len(a) == 4:
        return int(a), int(b), int(c), True
    if len(a) > 2 or len(c) not in (2, 4):
        return None
    return int(a), int(b), int(c), False


def _year(y: int) -> int:
    return 2000 + y if y < 100 else y


@guarded
def ordinal(parts: tuple[int, int, int, bool], order: str) -> int | None:
    """Day number (``date.toordinal``) for date parts read in ``order`` ('dmy' or 'mdy'; a
    year-first date is always year-month-day); None for an impossible date such as 31/02."""
    a, b, c, year_first = parts
    try:
        if year_first:
            return date(a, b, c).toordinal()
        if order == "dmy":
            return date(_year(c), b, a).toordinal()
        return date(_year(c), a, b).toordinal()
    except ValueError:
        return None


@guarded
def resolve_order(dates_in_file_order: list[str], forced: str = "auto") -> tuple[str, str]:
    """Decide how to read ``a/b/year`` dates: returns ``(order, how)`` with order 'dmy', 'mdy'
    or 'ymd' and a sentence saying how it was decided.

    ``forced`` 'dmy' or 'mdy' is the user's choice and wins. Otherwise: a first number above
    12 means day first; a second above 12 means month first; failing both, the reading under
    which consecutive dates in the file step by one day more often wins (a profile runs day by
    day). Raises :class:`InputError` when the two readings cannot be told apart (or each is
    contradicted by some date), so the user must choose."""
    parts = []
    for d in dates_in_file_order:
        p = date_parts(d)
        if p is not None:
            parts.append(p)
    if not parts:
        return "ymd", "no dates"
    if all(p[3] for p in parts):
        return "ymd", "year first (ISO 8601 order)"
    if forced in ("dmy", "mdy"):
        return forced, f"{ORDER_WORDS[forced]}, as chosen"
    first_big = any(not p[3] and p[0] > 12 for p in parts)
    second_big = any(not p[3] and p[1] > 12 for p in parts)
    if first_big and second_big:
        raise DateOrderError("Some dates have a day above 12 first and others second: the dates are mixed; "
                         "choose the date order or check the file.")
    if first_big:
        return "dmy", "day first (a first number above 12 was found)"
    if second_big:
        return "mdy", "month first (a second number above 12 was found)"
    score = {}
    for order in ("dmy", "mdy"):
        ords = [ordinal(p, order) for p in parts if not p[3]]
        score[order] = sum(1 for x, y in zip(ords, ords[1:]) if x is not None and y is not None and y - x == 1)
    if score["dmy"] == score["mdy"]:
        ex = next(d for d in dates_in_file_order if date_parts(d) and not date_parts(d)[3])
        raise DateOrderError(f"The dates could be day first or month first (e.g. {ex}): choose the date order.")
    order = "dmy" if score["dmy"] > score["mdy"] else "mdy"
    return order, f"{ORDER_WORDS[order]} (consecutive dates step by one day when read this way)"


@guarded
def month_of(day_ordinal: int) -> tuple[int, int]:
    """(year, month) of a day number."""
    d = date.fromordinal(day_ordinal)
    return d.year, d.month


@guarded
def stamp_text(t: int) -> str:
    """``YYYY-MM-DD HH:MM`` for a time t [s from 0001-01-01]."""
    if t < DAY_S:
        return "—"
    d = date.fromordinal(t // DAY_S)
    s = t % DAY_S
    return f"{d.isoformat()} {s // 3600:02d}:{s % 3600 // 60:02d}"
