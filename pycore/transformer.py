"""The supply transformer's own reactive power, and sizing a bank when the meter sits at the
transformer's primary.

Per-unit quantities on the transformer's rating S_T [kVA]: u_k (short-circuit impedance, taken as
all reactance, which is close for distribution transformers whose X/R is several times 1) and
i₀ (no-load, i.e. magnetising, current). The equivalent circuit (series leakage reactance, shunt
magnetising branch) gives at rated voltage

    Q_T = S_T · (i₀ + u_k · (S/S_T)²)   [kvar]

where S [kVA] is the load the transformer carries. Source: the transformer's equivalent circuit
(any machines textbook, e.g. Chapman, Electric Machinery Fundamentals, transformer chapter).
Fixed no-load compensation of about i₀·S_T is common practice.

Percent inputs (u_k %, i₀ %) are what nameplates and data sheets print.
"""

from __future__ import annotations

import math

from .errors import InputError, guarded

# Typical no-load current of oil-immersed distribution transformers by rating, as a starting
# value to be replaced by the nameplate or test report: (largest kVA, i₀ %). From memory
# (common practice); modern low-loss cores run lower, old or dry-type units higher.
TYPICAL_I0_PCT = ((100.0, 2.5), (315.0, 2.0), (1000.0, 1.5), (2500.0, 1.0), (math.inf, 0.8))


def _pos(v: float, what: str) -> None:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")


def _pct(v: float, what: str, hi: float) -> None:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v < 0 or v > hi:
        raise InputError(f"{what} must be from 0 to {hi:g} %.")


@guarded
def typical_no_load_pct(s_rated_kva: float) -> float:
    """A typical no-load current i₀ [%] for a distribution transformer of S_T [kVA], from
    :data:`TYPICAL_I0_PCT` (from memory; common practice). Mark it as typical wherever shown."""
    _pos(s_rated_kva, "The transformer rating")
    for top, pct in TYPICAL_I0_PCT:
        if s_rated_kva <= top:
            return pct
    return TYPICAL_I0_PCT[-1][1]  # pragma: no cover - the last row has no upper bound


@guarded
def reactive_kvar(s_load_kva: float, s_rated_kva: float, uk_pct: float, i0_pct: float) -> float:
    """Reactive power the transformer itself draws [kvar]: Q_T = S_T·(i₀ + u_k·(S/S_T)²), with
    S the load [kVA], S_T the rating [kVA], u_k [%] and i₀ [%]. Transformer equivalent circuit at
    rated voltage (leakage reactance I²X plus magnetising V²B)."""
    _pos(s_rated_kva, "The transformer rating")
    if not (math.isfinite(s_load_kva) and s_load_kva >= 0):
        raise InputError("The load must be zero or more.")
    _pct(uk_pct, "The transformer impedance", 40.0)
    _pct(i0_pct, "The no-load current", 20.0)
    x = s_load_kva / s_rated_kva
    return s_rated_kva * (i0_pct / 100.0 + uk_pct / 100.0 * x * x)


@guarded
def no_load_compensation_kvar(s_rated_kva: float, i0_pct: float) -> float:
    """Fixed capacitor that offsets the transformer's magnetising kvar [kvar]: i₀·S_T, with S_T
    [kVA] and i₀ [%]. Common practice (fixed compensation of transformer no-load kvar)."""
    _pos(s_rated_kva, "The transformer rating")
    _pct(i0_pct, "The no-load current", 20.0)
    return s_rated_kva * i0_pct / 100.0


@guarded
def kvar_for_primary_target(p_kw: float, q_kvar: float, pf_target: float, s_rated_kva: float,
                            uk_pct: float, i0_pct: float) -> float:
    """Capacitor kvar [kvar] on the secondary that gives the lagging target PF [dimensionless]
    at a meter on the transformer's primary, for a secondary load P [kW], Q [kvar, + lagging].

    The need counts Q_T at the load *after* correction: with Q₂ = Q − Q_C the secondary kvar and
    S₂² = P² + Q₂², the primary sees Q₂ + S_T·i₀ + u_k·S₂²/S_T, which must equal P·tan φ₂. That
    is a quadratic in Q₂, solved exactly here: a·Q₂² + Q₂ + c = 0 with a = u_k/S_T and
    c = S_T·i₀ + a·P² − P·tan φ₂. Real-power losses of the transformer are left out (they raise
    the primary kW a little and so help the PF). Transformer equivalent circuit; IEEE Std 141
    power-factor chapter for Q_C = Q − P·tan φ₂. Zero when no capacitor is needed."""
    _pos(p_kw, "Active power")
    if not math.isfinite(q_kvar):
        raise InputError("Reactive power must be a number.")
    if not (0 < pf_target <= 1):
        raise InputError("The target power factor must be above 0 and at most 1.")
    q_t0 = reactive_kvar(0.0, s_rated_kva, uk_pct, i0_pct)  # checks the transformer data
    k = p_kw * math.sqrt(max(0.0, 1 - pf_target * pf_target)) / pf_target
    a = uk_pct / 100.0 / s_rated_kva
    c = q_t0 + a * p_kw * p_kw - k
    if a == 0:
        q2 = -c
    else:
        disc = 1.0 - 4.0 * a * c
        if disc < 0:  # even Q₂ at the vertex cannot bring the primary kvar down to the target's
            raise InputError("The transformer's own kvar alone is more than the target allows at this load.")
        q2 = (-1.0 + math.sqrt(disc)) / (2.0 * a)
    return max(0.0, q_kvar - q2)
