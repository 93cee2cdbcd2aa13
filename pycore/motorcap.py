"""Capacitors on the terminals of an induction motor: the largest that avoids self-excitation.

A capacitor switched with a motor stays connected to it when the supply opens. While the
rotor still turns, the capacitor can supply the motor's magnetising current and the motor
then runs as a self-excited generator, with voltages above rating and heavy transient
torques if the supply recloses. Keeping the capacitor below the motor's no-load magnetising
kvar prevents that; the usual margin is 90 % of it (common practice).

Voltages line-to-line [V], currents [A], powers [kW, kvar, kVA], frequencies [Hz].

References: NEMA MG 1 Part 14 (warning against capacitors above the maker's safe value;
from memory); NFPA 70 (NEC) 460.9 (overload setting based on the improved power factor when
the capacitor is on the load side of the overload device) and 460.8 (capacitor conductors at
least 135 % of rated current); IEEE Std 141 (Red Book), power-factor chapter, on sizing
motor capacitors to the no-load magnetising kvar (from memory). Induction-motor equivalent
circuit: any machines text, e.g. S. J. Chapman, *Electric Machinery Fundamentals*.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded

SQRT3 = math.sqrt(3.0)

MARGIN = 0.90  # capacitor ≤ 90 % of the no-load magnetising kvar (common practice)
NO_LOAD_RATIO_PLAUSIBLE = (0.10, 0.70)  # no-load ÷ full-load current of induction motors outside this: check the reading (common practice)
LOCKED_ROTOR_RATIO = 6.0  # typical locked-rotor / full-load current of a general-purpose motor (common practice)


def _pos(v: float, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")
    return float(v)


def _pf(pf: float) -> float:
    if not (isinstance(pf, (int, float)) and math.isfinite(pf)) or not (0.0 < pf <= 1.0):
        raise InputError("Power factor must be above 0 and at most 1.")
    return float(pf)


@guarded
def magnetising_kvar(v_line: float, i_noload: float) -> float:
    """No-load magnetising reactive power [kvar] of a three-phase motor: Q0 = √3·V·I0 with
    v_line [V] and no-load current i_noload [A]. The no-load current is almost all
    magnetising (no-load power factor is low), so √3·V·I0 slightly overstates Q0 and the
    margin of :data:`MARGIN` covers the difference (common practice)."""
    return SQRT3 * _pos(v_line, "Rated voltage") * _pos(i_noload, "No-load current") / 1000.0


@guarded
def magnetising_kvar_estimate(v_line: float, i_full: float, pf_full: float, lr_ratio: float = LOCKED_ROTOR_RATIO) -> float:
    """Rough estimate of the no-load magnetising kvar [kvar] from rated data when the no-load
    current is unknown: v_line [V], full-load current i_full [A], full-load power factor
    pf_full, locked-rotor to full-load current ratio lr_ratio (dimensionless).

    Equivalent-circuit reasoning: at full load the motor draws Q_FL = S_FL·sin φ_FL, the
    magnetising kvar plus the leakage kvar I²·X. With the locked-rotor current I_LR ≈ V/X,
    the leakage share at full load is about S_FL·I_FL/I_LR, so
    Q0 ≈ S_FL·(sin φ_FL − I_FL/I_LR). Each approximation (|Z_LR| ≥ X, rotor current below
    stator current, air-gap voltage at full load below the no-load value) makes the estimate
    low rather than high, i.e. on the side of a smaller capacitor. A rougher estimate than
    √3·V·I0: measure the no-load current when you can."""
    s_full = SQRT3 * _pos(v_line, "Rated voltage") * _pos(i_full, "Full-load current") / 1000.0
    pf = _pf(pf_full)
    k = _pos(lr_ratio, "Locked-rotor current ratio")
    if k <= 1.0:
        raise InputError("Locked-rotor current must be more than the full-load current.")
    q0 = s_full * (math.sqrt(1.0 - pf * pf) - 1.0 / k)
    if q0 <= 0.0:
        raise InputError(
            "With this power factor and locked-rotor ratio the rated data leave no magnetising kvar to "
            "estimate: measure the no-load current instead."
        )
    return q0


@guarded
def max_capacitor_kvar(q_magnetising_kvar: float, margin: float = MARGIN) -> float:
    """Largest motor-terminal capacitor [kvar] at rated voltage: margin × Q0, with Q0 the
    no-load magnetising kvar [kvar] and margin (dimensionless, 0.9 as common practice)."""
    _pos(q_magnetising_kvar, "Magnetising kvar")
    if not (0.0 < margin <= 1.0):
        raise InputError("The margin must be above 0 and at most 1.")
    return margin * q_magnetising_kvar


@dataclass(frozen=True)
class WithCapacitor:
    """Full-load operation with a terminal capacitor.

    p_kw [kW] input power; q_motor_kvar [kvar] motor reactive power (lagging);
    q_net_kvar [kvar] net reactive power the supply delivers (positive lagging, negative
    leading); pf (0–1) and ``sense`` ("lagging", "leading", "unity"); i_line [A] line current
    on the supply side of the capacitor; i_reduction [%] drop in line current from the
    motor's own full-load current."""

    p_kw: float
    q_motor_kvar: float
    q_net_kvar: float
    pf: float
    sense: str
    i_line: float
    i_reduction: float


@guarded
def full_load_with_capacitor(v_line: float, i_full: float, pf_full: float, q_cap_kvar: float) -> WithCapacitor:
    """Full-load power factor and line current with a capacitor of q_cap_kvar [kvar] (at the
    motor's rated voltage v_line [V]) on the terminals of a motor drawing i_full [A] at
    power factor pf_full (lagging). P = √3·V·I·pf, Q = √3·V·I·sin φ, net Q' = Q − Q_C,
    pf' = P/√(P² + Q'²), I' = √(P² + Q'²)/(√3·V) (AC power, circuit theory). I' is the
    current an overload relay upstream of the capacitor sees (NEC 460.9)."""
    v = _pos(v_line, "Rated voltage")
    s = SQRT3 * v * _pos(i_full, "Full-load current") / 1000.0
    pf = _pf(pf_full)
    if not math.isfinite(q_cap_kvar) or q_cap_kvar < 0:
        raise InputError("Capacitor kvar must be zero or above.")
    p = s * pf
    q = s * math.sqrt(max(0.0, 1.0 - pf * pf))
    qn = q - q_cap_kvar
    s_new = math.hypot(p, qn)
    if not (s_new > 0.0 and math.isfinite(s_new)):
        raise InputError("The full-load current is too small to work with.")
    pf_new = p / s_new
    tol = 1e-9 * s
    sense = "unity" if abs(qn) <= tol else ("lagging" if qn > 0 else "leading")
    i_new = s_new * 1000.0 / (SQRT3 * v)
    return WithCapacitor(p, q, qn, pf_new, sense, i_new, 100.0 * (1.0 - i_new / i_full))


@guarded
def capacitor_current(q_cap_kvar: float, v_line: float) -> float:
    """Rated line current [A] of a three-phase capacitor of q_cap_kvar [kvar] at v_line [V]:
    I = Q/(√3·V) (circuit theory). NEC 460.8 asks for conductors of at least 135 % of it."""
    return 1000.0 * _pos(q_cap_kvar, "Capacitor kvar") / (SQRT3 * _pos(v_line, "Rated voltage"))
