"""IEEE Std 519-2014 limits at the point of common coupling: voltage distortion (Table 1) and
current distortion by short-circuit ratio (Table 2), and the checks against them.

Table 1 lives in :data:`pycore.capduty.IEEE519_VOLTAGE_LIMITS` (one table, one place) and is
used from here. Table 2 values are recalled (from memory) and marked so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .capduty import ieee519_voltage_limits
from .errors import InputError, guarded
from .references import cite

IEEE519_EDITION = cite("ieee519", "ieee519_t2")
"""The citation of the checks here (Tables 1 and 2), from the one references table."""

IEEE519_CURRENT_LIMITS = (
    # (I_SC/I_L upper bound (exclusive), [3≤h<11, 11≤h<17, 17≤h<23, 23≤h<35, 35≤h≤50] %, TDD %)
    (20.0, (4.0, 2.0, 1.5, 0.6, 0.3), 5.0),
    (50.0, (7.0, 3.5, 2.5, 1.0, 0.5), 8.0),
    (100.0, (10.0, 4.5, 4.0, 1.5, 0.7), 12.0),
    (1000.0, (12.0, 5.5, 5.0, 2.0, 1.0), 15.0),
    (math.inf, (15.0, 7.0, 6.0, 2.5, 1.4), 20.0),
)
"""IEEE Std 519-2014 Table 2, current distortion limits for systems rated 120 V to 69 kV, in %
of the maximum demand load current I_L (from memory). Rows by I_SC/I_L: < 20, 20 to < 50,
50 to < 100, 100 to < 1000, ≥ 1000. Odd harmonics; even harmonics are limited to 25 % of
the odd limits of their range."""

IEEE519_ORDER_BANDS = (11, 17, 23, 35, 51)
"""Upper bounds (exclusive) of the order ranges of Table 2: h < 11, < 17, < 23, < 35, ≤ 50."""

EVEN_FRACTION = 0.25
"""Even harmonics: 25 % of the odd-harmonic limits (IEEE Std 519-2014, Table 2 note; from memory)."""


@guarded
def current_limits(isc_il: float) -> tuple:
    """(individual limits by order range [%], TDD limit [%], row label) for a short-circuit
    ratio I_SC/I_L [-], IEEE Std 519-2014 Table 2 (from memory)."""
    if not (isc_il > 0) or not math.isfinite(isc_il):
        raise InputError("The short-circuit ratio must be above zero.")
    lo = 0.0
    for top, ind, tdd in IEEE519_CURRENT_LIMITS:
        if isc_il < top:
            label = f"I_SC/I_L < {top:g}" if lo == 0 else (f"{lo:g} ≤ I_SC/I_L < {top:g}" if math.isfinite(top)
                                                          else f"I_SC/I_L ≥ {lo:g}")
            return ind, tdd, label
        lo = top
    raise AssertionError("unreachable")  # pragma: no cover


@guarded
def individual_current_limit(h: int, isc_il: float) -> float:
    """Limit [% of I_L] for harmonic order h (2 to 50) at short-circuit ratio I_SC/I_L, IEEE Std
    519-2014 Table 2 (from memory); even orders 25 % of their range's odd limit."""
    if isinstance(h, bool) or not isinstance(h, (int, float)) or h != int(h) or not (2 <= h <= 50):
        raise InputError("Harmonic orders run from 2 to 50.")
    ind, _, _ = current_limits(isc_il)
    for band, top in enumerate(IEEE519_ORDER_BANDS):
        if h < top:
            lim = ind[band]
            return lim * EVEN_FRACTION if int(h) % 2 == 0 else lim
    raise AssertionError("unreachable")  # pragma: no cover


@dataclass
class Check519:
    """Results of the IEEE 519 checks at one bus state. Voltage: thd_v [%], worst individual
    v_worst [%] at order v_worst_h, limits v_ind_limit, v_thd_limit [%]. Current: tdd [%],
    worst ratio of an individual harmonic to its limit i_worst_ratio at i_worst_h, tdd_limit [%].
    ok_* True when within the limit (at the limit passes)."""

    thd_v: float
    v_worst: float
    v_worst_h: int
    v_ind_limit: float
    v_thd_limit: float
    tdd: float
    tdd_limit: float
    i_worst_ratio: float
    i_worst_h: int
    ok_voltage: bool
    ok_current: bool


@guarded
def check(v_percent: dict, i_percent_of_il: dict, v_ll_v: float, isc_il: float) -> Check519:
    """IEEE Std 519-2014 checks: v_percent {h: V_h [% of fundamental]} against Table 1 for a bus
    of v_ll_v [V]; i_percent_of_il {h: I_h [% of the maximum demand current I_L]} against
    Table 2 at I_SC/I_L [-]. THD_V = √ΣV_h², TDD = √ΣI_h² (both over orders 2 to 50)."""
    v_ind, v_thd, _ = ieee519_voltage_limits(v_ll_v)
    _, tdd_lim, _ = current_limits(isc_il)
    thd = math.sqrt(sum(v * v for v in v_percent.values()))
    vw_h = max(v_percent, key=v_percent.get) if v_percent else 0
    vw = v_percent.get(vw_h, 0.0)
    tdd = math.sqrt(sum(i * i for i in i_percent_of_il.values()))
    worst, worst_h = 0.0, 0
    for h, i in i_percent_of_il.items():
        r = i / individual_current_limit(h, isc_il)
        if r > worst:
            worst, worst_h = r, h
    tol = 1 + 1e-12
    return Check519(thd, vw, int(vw_h), v_ind, v_thd, tdd, tdd_lim, worst, int(worst_h),
                    thd <= v_thd * tol and vw <= v_ind * tol, tdd <= tdd_lim * tol and worst <= tol)
