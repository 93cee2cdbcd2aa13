"""Overcurrent devices and contactors for capacitor circuits (a step or a whole bank).

Currents in A (rms unless a name says peak). Every choice here is a starting point to be
confirmed with the capacitor and device makers' instructions (:data:`CONFIRM`): NEC 460.8(B)
asks only that the overcurrent device be rated or set "as low as practicable"; the ranges
below are common practice, wide enough to carry the capacitor's permitted overcurrent
(1.30–1.43 × I_N, IEC 60831-1, from memory; 135 %, NEC 460.8 and IEEE Std 18) and its inrush.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .capacitor import PROTECTION_RANGE, conductor_basis
from .errors import InputError, guarded
from .numtext import sig
from .references import cite, ref

CONFIRM = "Confirm with the capacitor and device makers' instructions."

FUSE_GG_RANGE = (1.43, 1.65)
"""gG (general-purpose) fuse rating for a capacitor circuit, × I_N (common practice)."""

BREAKER_RANGE = PROTECTION_RANGE
"""Circuit-breaker overload (thermal) setting, × I_N: the protective-device range of
:mod:`pycore.capacitor` (common practice)."""

BREAKER_MAGNETIC_MIN = 10.0
"""Short-circuit (magnetic) setting of a breaker feeding capacitors, at least × I_N, so that it
rides through the inrush (common practice)."""

SOURCE_FUSE = cite("practice_fuse", "nec460_8")
SOURCE_BREAKER = cite("practice_fuse", "nec460_8")
SOURCE_RATINGS = {"iec": ref("iec60269"), "nec": ref("nec240_6")}

IEC_FUSE_RATINGS = (2, 4, 6, 10, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125, 160, 200, 250, 315, 400, 500,
                    630, 800, 1000, 1250)
"""Fuse-link rated currents [A] (IEC 60269-1 preferred values, from memory)."""

NEC_STANDARD_RATINGS = (15, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 110, 125, 150, 175, 200, 225,
                        250, 300, 350, 400, 450, 500, 600, 700, 800, 1000, 1200, 1600, 2000, 2500, 3000,
                        4000, 5000, 6000)
"""Standard ampere ratings of fuses and inverse-time breakers [A] (NEC 240.6(A), from memory)."""

RATING_SERIES = {"iec": IEC_FUSE_RATINGS, "nec": NEC_STANDARD_RATINGS}


def _i(i_n) -> float:
    if not (isinstance(i_n, (int, float)) and math.isfinite(i_n)) or i_n <= 0:
        raise InputError("The rated current must be above zero.")
    return float(i_n)


@dataclass(frozen=True)
class Device:
    """An overcurrent device choice: lo_a..hi_a [A] the range; rating_a [A] the smallest
    standard rating at or above lo_a (None beyond the series); in_range whether it is ≤ hi_a;
    kind 'fuse gG' or 'breaker'; magnetic_min_a [A] (breakers); source; note (always ends with
    :data:`CONFIRM`)."""

    kind: str
    lo_a: float
    hi_a: float
    rating_a: float | None
    in_range: bool
    magnetic_min_a: float | None
    source: str
    note: str


def _standard_at_least(x: float, series) -> float | None:
    for r in series:
        if r >= x * (1 - 1e-12):
            return float(r)
    return None


@guarded
def fuse(i_n: float, series: str = "iec") -> Device:
    """gG fuse for a capacitor circuit of rated current i_n [A]: range 1.43–1.65 × I_N (common
    practice) and the smallest standard rating [A] ≥ the lower end from ``series`` ('iec':
    IEC 60269-1; 'nec': NEC 240.6(A); both from memory). NEC 460.8(B)."""
    i = _i(i_n)
    if series not in RATING_SERIES:
        raise InputError("The rating series must be 'iec' or 'nec'.")
    lo, hi = FUSE_GG_RANGE[0] * i, FUSE_GG_RANGE[1] * i
    r = _standard_at_least(lo, RATING_SERIES[series])
    ok = r is not None and r <= hi * (1 + 1e-12)
    if r is None:
        note = f"Above the largest standard rating ({RATING_SERIES[series][-1]} A): split the circuit. {CONFIRM}"
    elif not ok:
        # the range to 3 figures, as the specification lists it (whole amperes once read 59.5 A as 60)
        note = f"No standard rating falls inside {sig(lo)}–{sig(hi)} A; the next one up is {r:g} A, above the range. {CONFIRM}"
    else:
        note = CONFIRM
    return Device("fuse gG", lo, hi, r, ok, None, SOURCE_FUSE, note)


@guarded
def breaker(i_n: float, series: str = "nec") -> Device:
    """Circuit breaker for a capacitor circuit of rated current i_n [A]: thermal setting
    1.35–1.65 × I_N, magnetic ≥ 10 × I_N (common practice), frame the smallest standard rating
    [A] ≥ the lower end ('nec': NEC 240.6(A); 'iec': the IEC 60269 series as a stand-in)."""
    i = _i(i_n)
    if series not in RATING_SERIES:
        raise InputError("The rating series must be 'iec' or 'nec'.")
    lo, hi = BREAKER_RANGE[0] * i, BREAKER_RANGE[1] * i
    r = _standard_at_least(lo, RATING_SERIES[series])
    ok = r is not None and r <= hi * (1 + 1e-12)
    note = ("Set the overload release within the range; " if r is not None else "Above the largest standard rating: split the circuit. ") + CONFIRM
    return Device("breaker", lo, hi, r, ok, BREAKER_MAGNETIC_MIN * i, SOURCE_BREAKER, note)


@dataclass(frozen=True)
class Contactor:
    """Contactor for one step: duty (text), min_current_a [A] its rated operational current at
    least, reason (text), source."""

    duty: str
    min_current_a: float
    reason: str
    source: str


CAPACITOR_DUTY = "capacitor-duty contactor with damping (pre-insertion) resistors, AC-6b"
STANDARD_DUTY = "standard contactor (AC-3 / AC-6b)"
SOURCE_CONTACTOR = cite("iec60947_ac6b", "practice_contactor")


@guarded
def contactor(i_n: float, detuned: bool, inrush_peak_a: float, inrush_limit_a: float, profile: str = "nec") -> Contactor:
    """Contactor duty and minimum rated current [A] for a step of rated current i_n [A]:
    rated current ≥ the conductor basis of :func:`pycore.capacitor.conductor_basis` (1.35 × I_N,
    NEC 460.8; 1.43 × I_N, IEC 60831-1 from memory). A detuned step's reactor limits its
    inrush: a standard contactor. A plain step whose worst inrush inrush_peak_a [A peak]
    exceeds inrush_limit_a [A peak] (the capacitor's 100 × I_N, or the contactor maker's
    figure): a capacitor-duty contactor with damping resistors (common practice)."""
    i = _i(i_n)
    basis = conductor_basis(i, profile)["disconnect"]
    if detuned:
        return Contactor(STANDARD_DUTY, basis, "The detuning reactor limits the inrush.", SOURCE_CONTACTOR)
    if inrush_peak_a > inrush_limit_a:
        return Contactor(CAPACITOR_DUTY, basis,
                         f"Inrush {inrush_peak_a:.0f} A peak exceeds {inrush_limit_a:.0f} A: damping resistors (or an inrush-limiting reactor) needed.",
                         SOURCE_CONTACTOR)
    return Contactor(STANDARD_DUTY, basis, f"Inrush {inrush_peak_a:.0f} A peak within {inrush_limit_a:.0f} A.", SOURCE_CONTACTOR)
