"""Detuned (reactor–capacitor) banks: tuning order, reactor, capacitor voltage and rating.

A detuned branch is a capacitor with a series reactor chosen so that the branch resonates
(series resonance) below the lowest harmonic present. At the fundamental the reactor
cancels part of the capacitor's reactance, so the capacitor sees a higher voltage and the
branch delivers more kvar than the same capacitor connected alone would at that voltage.

Conventions: three-phase banks, ``u_v`` is the line-to-line system voltage [V], powers are
three-phase totals [kvar], reactances and L, C are per phase of the equivalent wye [Ω, mH,
µF]; a delta-connected capacitor has one third of the wye capacitance per phase.
The capacitor's rated frequency is taken to be the system frequency.

Method: circuit theory of the series L–C branch, p = X_L/X_C at the fundamental,
n = 1/√p, U_C = U/(1 − p), Q = U²/(X_C − X_L). IEC 61642 (filters and shunt capacitors in
networks with harmonics) describes detuned banks in these terms (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded

TWO_PI = 2.0 * math.pi

TYPICAL_DETUNING_PERCENT = (5.67, 7.0, 14.0)
"""Detuning factors sold as standard [%] (common practice): 5.67 % (n ≈ 4.2), 7 % (n ≈ 3.78),
14 % (n ≈ 2.67, where a 3rd harmonic is present)."""

COMMON_LV_CAPACITOR_RATINGS_V = (
    230, 240, 400, 415, 440, 460, 480, 525, 550, 600, 690, 720, 760, 800, 830, 880, 1000,
)
"""Rated voltages [V] of low-voltage power capacitors commonly offered in makers' catalogues
(common practice, compiled from memory; not from a standard). Any rating a maker offers may
be entered instead."""

DEFAULT_VOLTAGE_MARGIN_PERCENT = 10.0
"""Margin [%] above the capacitor's fundamental voltage U/(1 − p) when choosing its rated
voltage, for supply voltage tolerance and harmonic voltage (common practice)."""

TUNING_CLEARANCE = 0.10
"""Keep the tuning order at least this fraction below the lowest harmonic present, allowing
for capacitance tolerance and ageing, which raise the tuning frequency (common practice)."""


@guarded
def tuning_order(p: float) -> float:
    """Tuning order n = 1/√p (dimensionless) for a detuning factor p = X_L/X_C at the
    fundamental, p as a fraction (0.07 for 7 %). Circuit theory: X_L·n = X_C/n."""
    if not (0.0 < p < 1.0) or not math.isfinite(p):
        raise InputError("The detuning factor must be above 0 % and below 100 %.")
    return 1.0 / math.sqrt(p)


@guarded
def detuning_factor(n: float) -> float:
    """Detuning factor p = 1/n² (fraction) for a tuning order n = f_tuning/f_system (> 1)."""
    if not (n > 1.0) or not math.isfinite(n):
        raise InputError("The tuning frequency must be above the system frequency.")
    return 1.0 / (n * n)


@guarded
def capacitor_voltage(u_v: float, p: float) -> float:
    """Fundamental voltage [V] across the capacitor of a detuned branch on a bus of u_v [V]:
    U_C = U/(1 − p) (voltage divider of −jX_C and j(X_L − X_C); circuit theory)."""
    tuning_order(p)
    return u_v / (1.0 - p)


@guarded
def capacitor_rated_kvar(q_wanted_kvar: float, u_v: float, p: float, u_rated_v: float) -> float:
    """Capacitor rated power [kvar] at its rated voltage u_rated_v [V] (and the system
    frequency) for a branch that delivers q_wanted_kvar [kvar] on a bus of u_v [V]:
    Q_rated = Q·(1 − p)·(U_rated/U)², the inverse of Q = Q_rated·(U/U_rated)²/(1 − p)."""
    tuning_order(p)
    if u_v <= 0 or u_rated_v <= 0:
        raise InputError("Voltages must be above zero.")
    return q_wanted_kvar * (1.0 - p) * (u_rated_v / u_v) ** 2


@guarded
def branch_output_kvar(q_rated_kvar: float, u_v: float, u_rated_v: float, p: float) -> float:
    """Fundamental reactive output [kvar] of a detuned branch on a bus of u_v [V], built from a
    capacitor of q_rated_kvar [kvar] at u_rated_v [V]: Q = Q_rated·(U/U_rated)²/(1 − p)
    (circuit theory; the capacitor's kvar scales with the square of its voltage)."""
    tuning_order(p)
    if u_v <= 0 or u_rated_v <= 0:
        raise InputError("Voltages must be above zero.")
    return q_rated_kvar * (u_v / u_rated_v) ** 2 / (1.0 - p)


@guarded
def choose_rated_voltage(u_needed_v: float, margin_percent: float = DEFAULT_VOLTAGE_MARGIN_PERCENT,
                         ratings=COMMON_LV_CAPACITOR_RATINGS_V) -> float | None:
    """The lowest rating [V] in ``ratings`` that is at least u_needed_v·(1 + margin/100) [V],
    or None when no rating is high enough (common practice: rate the capacitor above the
    voltage it sees with a margin for supply tolerance and harmonics)."""
    if u_needed_v <= 0 or margin_percent < 0:
        raise InputError("The voltage must be above zero and the margin not negative.")
    target = u_needed_v * (1.0 + margin_percent / 100.0)
    for r in sorted(ratings):
        if r >= target * (1.0 - 1e-12):
            return float(r)
    return None


@dataclass
class DetunedBranch:
    """One detuned branch (a step) as designed by :func:`design_branch`. Units in brackets."""

    u_v: float  # system voltage, line-to-line [V]
    f_hz: float  # system frequency [Hz]
    q_kvar: float  # wanted output at u_v [kvar]
    p: float  # detuning factor [fraction]
    n: float  # tuning order [-]
    f_tuning_hz: float  # series-resonance frequency [Hz]
    x_c_ohm: float  # capacitor reactance per phase (wye equivalent) at f [Ω]
    x_l_ohm: float  # reactor reactance per phase at f [Ω]
    l_mh: float  # reactor inductance per phase [mH]
    c_wye_uf: float  # capacitance per phase, wye equivalent [µF]
    c_delta_uf: float  # capacitance per phase of a delta-connected capacitor [µF]
    i1_a: float  # fundamental line current (through the reactor) [A]
    q_reactor_kvar: float  # reactor reactive power at the fundamental, three phases [kvar]
    u_cap_v: float  # fundamental capacitor voltage, line-to-line [V]
    q_cap_operating_kvar: float  # capacitor reactive power at u_cap_v [kvar]
    u_rated_v: float  # capacitor rated voltage used [V]
    q_rated_kvar: float  # capacitor rated kvar to order (at u_rated_v and f) [kvar]

    @property
    def voltage_ratio_percent(self) -> float:
        """Fundamental capacitor voltage as % of its rated voltage."""
        return 100.0 * self.u_cap_v / self.u_rated_v


@guarded
def design_branch(u_v: float, f_hz: float, q_kvar: float, p: float, u_rated_v: float) -> DetunedBranch:
    """Design a three-phase detuned branch.

    u_v: system voltage, line-to-line [V]; f_hz: system frequency [Hz]; q_kvar: reactive output
    wanted at u_v [kvar]; p: detuning factor [fraction, 0 < p < 1]; u_rated_v: the capacitor's
    rated voltage [V]. Circuit theory: X_C − X_L = U²/Q, X_L = p·X_C, so X_C = U²/(Q(1 − p));
    I₁ = Q/(√3·U); Q_L = p·Q/(1 − p); U_C = U/(1 − p); Q_rated = Q(1 − p)(U_rated/U)².
    """
    n = tuning_order(p)
    if not (u_v > 0 and f_hz > 0 and q_kvar > 0 and u_rated_v > 0):
        raise InputError("Voltage, frequency, kvar and rated voltage must all be above zero.")
    q_var = q_kvar * 1e3
    x_branch = u_v * u_v / q_var
    x_c = x_branch / (1.0 - p)
    x_l = p * x_c
    w = TWO_PI * f_hz
    c_wye = 1.0 / (w * x_c)
    return DetunedBranch(
        u_v=u_v,
        f_hz=f_hz,
        q_kvar=q_kvar,
        p=p,
        n=n,
        f_tuning_hz=n * f_hz,
        x_c_ohm=x_c,
        x_l_ohm=x_l,
        l_mh=x_l / w * 1e3,
        c_wye_uf=c_wye * 1e6,
        c_delta_uf=c_wye / 3.0 * 1e6,
        i1_a=q_var / (math.sqrt(3.0) * u_v),
        q_reactor_kvar=p * q_kvar / (1.0 - p),
        u_cap_v=u_v / (1.0 - p),
        q_cap_operating_kvar=q_kvar / (1.0 - p),
        u_rated_v=u_rated_v,
        q_rated_kvar=capacitor_rated_kvar(q_kvar, u_v, p, u_rated_v),
    )


@guarded
def branch_impedance(h: float, x_c_ohm: float, p: float) -> complex:
    """Impedance [Ω] per phase of a lossless detuned branch at harmonic order h:
    Z(h) = j(h·X_L − X_C/h) with X_L = p·X_C, X_C [Ω] at the fundamental. Capacitive
    (negative imaginary part) below the tuning order n = 1/√p, zero at n, inductive above."""
    if h <= 0:
        raise InputError("The harmonic order must be above zero.")
    return complex(0.0, h * p * x_c_ohm - x_c_ohm / h)


@guarded
def bus_impedance(h: float, x_s_ohm: float, x_c_ohm: float, p: float) -> complex:
    """Impedance [Ω] per phase seen at the bus at harmonic order h: the supply's reactance
    x_s_ohm [Ω at the fundamental] in parallel with a lossless branch (X_C [Ω], detuning p;
    p = 0 for a plain bank). Returns complex infinity at an exact parallel resonance."""
    zs = complex(0.0, h * x_s_ohm)
    zb = branch_impedance(h, x_c_ohm, p) if p > 0 else complex(0.0, -x_c_ohm / h)
    tot = zs + zb
    if tot == 0:
        return complex(math.inf, math.inf)
    return zs * zb / tot


@guarded
def bus_resonance_order(q_cap_at_bus_kvar: float, s_sc_kva: float, p: float) -> float:
    """Parallel-resonance order h (dimensionless) of a lossless detuned branch with the supply:
    h = 1/√(Q_C/S_sc + p), where Q_C [kvar] is what the capacitor alone would deliver at the
    bus voltage (= U²/X_C) and S_sc [kVA] the bus short-circuit power. From h·X_s = X_C/h −
    h·p·X_C (circuit theory); with p = 0 it reduces to √(S_sc/Q_C) (IEEE Std 1036).
    Always below the tuning order 1/√p."""
    if q_cap_at_bus_kvar <= 0 or s_sc_kva <= 0:
        raise InputError("Capacitor kvar and short-circuit power must be above zero.")
    if p < 0 or p >= 1:
        raise InputError("The detuning factor must be from 0 % to below 100 %.")
    return 1.0 / math.sqrt(q_cap_at_bus_kvar / s_sc_kva + p)
