"""Power-factor correction arithmetic: the load from whatever the user has, kvar needed, benefits.

Sign convention: reactive power Q is positive for a lagging (inductive) load and negative for a
leading (capacitive) one; capacitors supply Q, so they subtract from it. Powers in kW, kvar, kVA,
voltages line-to-line in V for three-phase (the supply voltage for single-phase), currents in A.

References: the power triangle S² = P² + Q², PF = P/S = cos φ (circuit theory, e.g. Alexander &
Sadiku, Fundamentals of Electric Circuits, AC power analysis); the kvar-per-kW multiplier
k = tan φ₁ − tan φ₂ tabulated in IEEE Std 141 (Red Book), chapter on power factor.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded

HP_KW = 0.745699872
"""Kilowatts per mechanical horsepower (550 ft·lbf/s; common practice)."""

SQRT3 = math.sqrt(3.0)


def _phase_factor(phases: int) -> float:
    if phases == 3:
        return SQRT3
    if phases == 1:
        return 1.0
    raise InputError("Phases must be 1 or 3.")


def _check_pf(pf: float, what: str = "Power factor") -> None:
    if not (isinstance(pf, (int, float)) and math.isfinite(pf)):
        raise InputError(f"{what} must be a number.")
    if pf <= 0 or pf > 1:
        raise InputError(f"{what} must be above 0 and at most 1.")


def _check_positive(v: float, what: str) -> None:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")


@dataclass(frozen=True)
class Load:
    """A load's operating point.

    p_kw: active power [kW]; q_kvar: reactive power [kvar], positive lagging (inductive),
    negative leading (capacitive).
    """

    p_kw: float
    q_kvar: float

    @property
    def s_kva(self) -> float:
        """Apparent power S = √(P² + Q²) [kVA]."""
        return math.hypot(self.p_kw, self.q_kvar)

    @property
    def pf(self) -> float:
        """Power factor P/S (dimensionless, 0..1); 1 for a zero load."""
        s = self.s_kva
        return self.p_kw / s if s > 0 else 1.0

    @property
    def phi_deg(self) -> float:
        """Power-factor angle φ = atan2(Q, P) [°]; positive when current lags voltage."""
        return math.degrees(math.atan2(self.q_kvar, self.p_kw))

    @property
    def sense(self) -> str:
        """'lagging', 'leading' or 'unity'."""
        return pf_sense(self.q_kvar, self.p_kw)

    def current(self, v_ll: float, phases: int = 3) -> float:
        """Line current [A] at line-to-line voltage v_ll [V]: I = S/(√3·V) three-phase, S/V single-phase."""
        return line_current(self.s_kva, v_ll, phases)

    def corrected(self, q_cap_kvar: float) -> "Load":
        """The same load with q_cap_kvar [kvar] of capacitors added (Q − Q_C)."""
        return Load(self.p_kw, self.q_kvar - q_cap_kvar)


@guarded
def pf_sense(q_kvar: float, p_kw: float = 1.0) -> str:
    """'lagging' when Q > 0 (inductive), 'leading' when Q < 0, 'unity' when |Q| is
    negligible (below 1e-9 of P) [Q in kvar, P in kW]."""
    tol = 1e-9 * max(abs(p_kw), 1e-12)
    if q_kvar > tol:
        return "lagging"
    if q_kvar < -tol:
        return "leading"
    return "unity"


@guarded
def tan_phi(pf: float) -> float:
    """tan φ = √(1 − PF²)/PF for a power factor PF (0 < PF ≤ 1), dimensionless."""
    _check_pf(pf)
    return math.sqrt(max(0.0, 1.0 - pf * pf)) / pf


@guarded
def kvar_per_kw(pf_present: float, pf_target: float) -> float:
    """Multiplier k = tan(acos PF₁) − tan(acos PF₂) [kvar per kW] to raise a lagging load
    from PF₁ to PF₂ (both lagging). IEEE Std 141 (Red Book), power-factor chapter,
    multiplier table."""
    return tan_phi(pf_present) - tan_phi(pf_target)


@guarded
def required_kvar(p_kw: float, pf_present: float, pf_target: float) -> float:
    """Capacitor kvar at system voltage [kvar] to raise P [kW] from PF₁ to PF₂ (lagging):
    Q_C = P·(tan φ₁ − tan φ₂). IEEE Std 141, power-factor chapter."""
    _check_positive(p_kw, "Active power")
    return p_kw * kvar_per_kw(pf_present, pf_target)


@guarded
def line_current(s_kva: float, v_ll: float, phases: int = 3) -> float:
    """Line current [A] for apparent power S [kVA] at voltage V [V] (line-to-line for three
    phases): I = 1000·S/(√3·V), or 1000·S/V for single phase. Circuit theory."""
    _check_positive(v_ll, "Voltage")
    return 1000.0 * s_kva / (_phase_factor(phases) * v_ll)


@guarded
def apparent_from_vi(v_ll: float, i_a: float, phases: int = 3) -> float:
    """Apparent power S [kVA] = √3·V·I/1000 (three-phase, V line-to-line [V], I line [A])
    or V·I/1000 (single-phase). Circuit theory."""
    _check_positive(v_ll, "Voltage")
    _check_positive(i_a, "Current")
    return _phase_factor(phases) * v_ll * i_a / 1000.0


def _q_from(p_kw: float, pf: float, lagging: bool) -> float:
    q = p_kw * tan_phi(pf)
    return q if lagging else -q


@guarded
def load_from_p_pf(p_kw: float, pf: float, lagging: bool = True) -> Load:
    """Load from active power P [kW] and power factor PF (lagging unless told). Q = P·tan φ."""
    _check_positive(p_kw, "Active power")
    _check_pf(pf)
    return Load(p_kw, _q_from(p_kw, pf, lagging))


@guarded
def load_from_s_pf(s_kva: float, pf: float, lagging: bool = True) -> Load:
    """Load from apparent power S [kVA] and PF: P = S·PF, Q = S·sin φ."""
    _check_positive(s_kva, "Apparent power")
    _check_pf(pf)
    q = s_kva * math.sqrt(max(0.0, 1.0 - pf * pf))
    return Load(s_kva * pf, q if lagging else -q)


@guarded
def load_from_p_q(p_kw: float, q_kvar: float) -> Load:
    """Load from active power P [kW] and reactive power Q [kvar] (positive lagging)."""
    _check_positive(p_kw, "Active power")
    if not math.isfinite(q_kvar):
        raise InputError("Reactive power must be a number.")
    return Load(p_kw, q_kvar)


@guarded
def load_from_v_i_pf(v_ll: float, i_a: float, pf: float, phases: int = 3, lagging: bool = True) -> Load:
    """Load from measured voltage V [V] (line-to-line for three phases), line current I [A] and
    PF: S = √3·V·I (or V·I), P = S·PF."""
    return load_from_s_pf(apparent_from_vi(v_ll, i_a, phases), pf, lagging)


@guarded
def load_from_v_i_p(v_ll: float, i_a: float, p_kw: float, phases: int = 3, lagging: bool = True) -> Load:
    """Load from measured V [V], I [A] and active power P [kW]: PF = P/S with S = √3·V·I.
    Raises InputError when P exceeds S (the readings do not fit together)."""
    s = apparent_from_vi(v_ll, i_a, phases)
    _check_positive(p_kw, "Active power")
    if p_kw > s * (1 + 1e-9):
        raise InputError(f"P cannot exceed V·I{'·√3' if phases == 3 else ''} = {s:.4g} kVA; check the readings.")
    p = min(p_kw, s)
    q = math.sqrt(max(0.0, s * s - p * p))
    return Load(p, q if lagging else -q)


@guarded
def pf_from_energy(kwh: float, kvarh: float) -> float:
    """Average power factor over a billing period from active energy [kWh] and reactive
    energy [kvarh]: PF = kWh/√(kWh² + kvarh²) (utility billing practice; the power triangle
    applied to energies)."""
    _check_positive(kwh, "Active energy")
    if not math.isfinite(kvarh) or kvarh < 0:
        raise InputError("Reactive energy must be zero or more.")
    return kwh / math.hypot(kwh, kvarh)


@guarded
def load_from_energy(kwh: float, kvarh: float, hours: float | None = None, demand_kw: float | None = None) -> Load:
    """Load from a utility bill's kWh and (lagging) kvarh over a billing period.

    The average PF (see :func:`pf_from_energy`) is applied to ``demand_kw`` [kW] when given
    (sizing for the billed demand, common practice), else to the average power kWh/hours
    [kW] over ``hours`` [h] of operation."""
    pf = pf_from_energy(kwh, kvarh)
    if demand_kw is not None:
        _check_positive(demand_kw, "Demand")
        p = demand_kw
    elif hours is not None:
        _check_positive(hours, "Hours")
        p = kwh / hours
    else:
        raise InputError("Give either the demand kW or the hours of operation in the period.")
    return Load(p, p * tan_phi(pf))


@guarded
def load_from_demand(peak_kw: float, peak_kva: float) -> Load:
    """Load from a bill's peak demand in kW [kW] and in kVA [kVA]: PF = kW/kVA, Q = √(kVA² − kW²)
    (utility billing practice). Raises InputError when kW exceeds kVA."""
    _check_positive(peak_kw, "Peak kW")
    _check_positive(peak_kva, "Peak kVA")
    if peak_kw > peak_kva * (1 + 1e-9):
        raise InputError("Peak kVA cannot be less than peak kW.")
    p = min(peak_kw, peak_kva)
    return Load(p, math.sqrt(max(0.0, peak_kva**2 - p * p)))


@guarded
def hp_to_kw(hp: float) -> float:
    """Mechanical horsepower [hp] to kilowatts [kW]: 1 hp = 550 ft·lbf/s = 0.7457 kW
    (common practice). For a motor this is shaft output; its electrical input is this
    divided by the motor's efficiency."""
    return hp * HP_KW


@guarded
def kva_released(load: Load, corrected: Load) -> float:
    """Apparent power released [kVA] by correction: ΔS = S₁ − S₂ = P(1/PF₁ − 1/PF₂). Circuit theory."""
    return load.s_kva - corrected.s_kva


@guarded
def current_reduction_fraction(pf_before: float, pf_after: float) -> float:
    """Fractional reduction of line current at constant P and voltage: 1 − PF₁/PF₂
    (dimensionless). Circuit theory."""
    _check_pf(pf_before)
    _check_pf(pf_after)
    return 1.0 - pf_before / pf_after


@guarded
def loss_reduction_fraction(pf_before: float, pf_after: float) -> float:
    """Fractional reduction of I²R loss in upstream conductors at constant P and voltage:
    1 − (PF₁/PF₂)² (dimensionless), since I ∝ 1/PF. Circuit theory."""
    _check_pf(pf_before)
    _check_pf(pf_after)
    return 1.0 - (pf_before / pf_after) ** 2
