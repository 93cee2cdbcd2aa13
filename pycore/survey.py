"""Site survey: totals of a load table, the site's power factor, and the correction to a target.

Sign convention (IEEE/IEC common practice, as in :mod:`pycore.phasor`): reactive power Q is
positive for a lagging (inductive) load and negative for a leading (capacitive) one. Powers in
kW, kvar and kVA; energies in kWh and kvarh per day.

Method: complex power adds, S = Σ(P + jQ), so the site's power factor comes from the summed P
and Q, PF = ΣP / |ΣP + jΣQ|, never from averaging row power factors. The kvar that brings a
load from P, Q to a lagging target PF is Q − P·tan(acos PF_target) (IEEE Std 141, Red Book,
chapter on power factor; the "kW multiplier" tables print tan φ1 − tan φ2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Iterable, Optional

from .correction import tan_phi
from .errors import InputError, guarded
from . import pfparse
from .phasor import power_factor


# Two power factors given for one row (PF and P, Q) may differ by this much before the row is
# refused as contradictory (meter rounding; our own choice).
PF_AGREEMENT = 0.02


@guarded
def parse_pf(text: str) -> tuple[float, bool]:
    """Read a typed power factor: ``0.85``, ``0,85``, ``85%``, ``0.92 lead``, ``0.8 lagging``.

    Returns ``(pf, leading)`` with pf in (0, 1] [dimensionless] and ``leading`` True for a
    leading (capacitive) load. A bare number is taken as lagging, the usual case for motors
    and most plant loads (common practice). Raises :class:`InputError` for text that is not
    a power factor, for PF ≤ 0 or PF > 1 (impossible).
    """
    got = pfparse.parse_pf(text)  # the one shared reader
    return got.value, got.leading


@guarded
def reactive_per_kw(pf: float, leading: bool = False) -> float:
    """Reactive power per unit of real power, tan(acos PF) [kvar/kW], negative when leading.

    ``pf`` in (0, 1] [dimensionless]. Power triangle: Q = P·tan φ (IEEE Std 141, chapter on
    power factor).
    """
    t = tan_phi(pf)
    return -t if leading else t


@guarded
def correction_kvar(p_kw: float, q_kvar: float, target_pf: float) -> float:
    """Capacitor kvar [kvar] that brings a load of P [kW], Q [kvar] (+ lagging) to a lagging
    target PF [dimensionless]: max(0, Q − P·tan(acos PF_target)).

    Zero when the load is already at or above the target, or leading (shunt capacitors only
    add leading kvar). IEEE Std 141 (Red Book), chapter on power factor.
    """
    return max(0.0, q_kvar - p_kw * reactive_per_kw(target_pf))


@dataclass(frozen=True)
class Load:
    """One row of a survey: a load type and how many of it.

    ``p_kw`` [kW] and ``q_kvar`` [kvar, + lagging] are per unit; ``quantity`` [count, may be
    fractional for a share of a group]; ``hours`` [h/day] of running, or None when unknown.
    """

    name: str
    p_kw: float
    q_kvar: float
    quantity: float = 1.0
    hours: Optional[float] = None


@guarded
def make_load(
    name: str,
    p_kw: float,
    pf: Optional[float] = None,
    leading: bool = False,
    q_kvar: Optional[float] = None,
    quantity: Optional[float] = None,
    hours: Optional[float] = None,
) -> Load:
    """Build a :class:`Load` from P [kW] and either PF [dimensionless] (with ``leading``) or
    Q [kvar, + lagging], with an optional quantity [count] and hours [h/day].

    When both PF and Q are given they must agree within :data:`PF_AGREEMENT`; Q is then used.
    Raises :class:`InputError` with a message for the person who typed the row.
    """
    for v in (p_kw, pf, q_kvar, quantity, hours):
        if v is not None and not math.isfinite(v):
            raise InputError("Enter finite numbers.")
    if p_kw < 0:
        raise InputError("P must not be negative (a source is not a load).")
    if quantity is None:
        quantity = 1.0
    if quantity < 0:
        raise InputError("Quantity must not be negative.")
    if hours is not None and not (0.0 <= hours <= 24.0):
        raise InputError("Hours per day must be from 0 to 24.")
    if pf is not None and not (0.0 < pf <= 1.0):
        raise InputError(f"PF {pf:g} is impossible: a power factor lies between 0 and 1.")
    if q_kvar is None:
        if pf is None:
            raise InputError("Enter PF or Q.")
        q_kvar = p_kw * reactive_per_kw(pf, leading)
    elif pf is not None and (p_kw != 0 or q_kvar != 0):
        pf_pq, word = power_factor(complex(p_kw, q_kvar))
        sign_clash = q_kvar * (-1.0 if leading else 1.0) < 0 and pf_pq < 1.0 - PF_AGREEMENT
        if abs(pf_pq - pf) > PF_AGREEMENT or sign_clash:
            raise InputError(
                f"PF and Q disagree: P and Q give PF {pf_pq:.3f} {word}, not {pf:g} "
                f"{'leading' if leading else 'lagging'}; enter one of them."
            )
    return Load(name=name, p_kw=float(p_kw), q_kvar=float(q_kvar), quantity=float(quantity), hours=hours)


@dataclass(frozen=True)
class RowTotals:
    """One load row worked out: totals for the row (per unit × quantity) and the correction
    to the target, per unit [kvar] and for the row [kvar]. ``pf`` is None when P = Q = 0."""

    load: Load
    p_kw: float
    q_kvar: float
    s_kva: float
    pf: Optional[float]
    pf_word: str
    need_each_kvar: float
    need_row_kvar: float
    kwh_day: Optional[float]
    kvarh_day: Optional[float]


@dataclass(frozen=True)
class SurveyTotals:
    """The whole survey: summed P [kW], Q [kvar, + lagging], S [kVA], the overall PF, and the
    correction to ``target_pf`` as one central bank and as the sum of individual corrections
    [kvar]. Energies [kWh/day, kvarh/day] cover only rows with hours (``rows_with_hours``)."""

    rows: list
    p_kw: float
    q_kvar: float
    s_kva: float
    pf: float
    pf_word: str
    target_pf: float
    central_kvar: float
    individual_kvar: float
    s_after_central_kva: float
    kva_released: float
    q_after_individual_kvar: float
    pf_after_individual: float
    pf_after_individual_word: str
    units: float
    rows_with_hours: int
    kwh_day: Optional[float]
    kvarh_day: Optional[float]
    rows_needing: int = field(default=0)


@guarded
def row_totals(load: Load, target_pf: float) -> RowTotals:
    """Work out one :class:`Load` against a lagging target PF [dimensionless]."""
    n = load.quantity
    p = load.p_kw * n
    q = load.q_kvar * n
    s = math.hypot(p, q)
    if s > 0:
        pf, word = power_factor(complex(p, q))
    elif load.p_kw or load.q_kvar:  # quantity 0: keep the unit's own PF for the table
        pf, word = power_factor(complex(load.p_kw, load.q_kvar))
    else:
        pf, word = None, ""
    each = correction_kvar(load.p_kw, load.q_kvar, target_pf)
    kwh = kvarh = None
    if load.hours is not None:
        kwh = p * load.hours
        kvarh = q * load.hours
    return RowTotals(load, p, q, s, pf, word, each, each * n, kwh, kvarh)


@guarded
def survey_totals(loads: Iterable[Load], target_pf: float) -> SurveyTotals:
    """Totals of a load table and the correction to a lagging target PF [dimensionless].

    Central bank: max(0, ΣQ − ΣP·tan φ_t) [kvar]. Individual corrections: Σ max(0, Q_i − P_i·tan φ_t)
    [kvar], never less than the central bank because leading rows and rows already above the
    target cannot lend kvar to the others. Complex power adds (any circuit-analysis text, AC
    power); kvar per kW from IEEE Std 141 (Red Book), chapter on power factor.
    """
    if not (0.0 < target_pf <= 1.0):
        raise InputError("The target PF lies above 0 and at most 1.")
    rows = [row_totals(ld, target_pf) for ld in loads]
    if not rows:
        raise InputError("Enter at least one load.")
    p = math.fsum(r.p_kw for r in rows)
    q = math.fsum(r.q_kvar for r in rows)
    s = math.hypot(p, q)
    if s == 0:
        raise InputError("The loads add up to zero power: nothing to correct.")
    if p <= 0:
        raise InputError("The loads add up to no real power (P = 0); the site PF is undefined.")
    pf, word = power_factor(complex(p, q))
    central = correction_kvar(p, q, target_pf)
    individual = math.fsum(r.need_row_kvar for r in rows)
    s_after = math.hypot(p, q - central)
    q_ind = q - individual
    pf_ind, word_ind = power_factor(complex(p, q_ind))
    with_hours = [r for r in rows if r.kwh_day is not None]
    kwh = math.fsum(r.kwh_day for r in with_hours) if with_hours else None
    kvarh = math.fsum(r.kvarh_day for r in with_hours) if with_hours else None
    return SurveyTotals(
        rows=rows,
        p_kw=p,
        q_kvar=q,
        s_kva=s,
        pf=pf,
        pf_word=word,
        target_pf=target_pf,
        central_kvar=central,
        individual_kvar=individual,
        s_after_central_kva=s_after,
        kva_released=s - s_after,
        q_after_individual_kvar=q_ind,
        pf_after_individual=pf_ind,
        pf_after_individual_word=word_ind,
        units=math.fsum(r.load.quantity for r in rows),
        rows_with_hours=len(with_hours),
        kwh_day=kwh,
        kvarh_day=kvarh,
        rows_needing=sum(1 for r in rows if r.need_row_kvar > 0),
    )
