"""Shunt capacitor ratings: output off-rating, capacitance per phase, currents, cable basis.

Powers in kvar, voltages line-to-line in V for three-phase banks (the unit's voltage for
single-phase), frequencies in Hz, capacitance in µF, currents in A.

References: X_C = 1/(2πfC) and Q = V²/X_C (circuit theory); IEEE Std 18 (shunt power
capacitors: 110 % rms voltage, 135 % kvar, 135 % rms current continuous limits); NFPA 70 (NEC)
Article 460.8 (conductor ampacity and disconnect at least 135 % of rated current); IEC 60831-1
(self-healing LV capacitors: maximum current 1.30·I_N, 1.43·I_N with capacitance tolerance —
recalled, not quoted).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded

SQRT3 = math.sqrt(3.0)

# IEEE Std 18 continuous operating limits, as multiples of rating.
IEEE18_VOLTAGE = 1.10
IEEE18_KVAR = 1.35
IEEE18_CURRENT = 1.35

NEC_460_8 = 1.35  # conductor ampacity and disconnect rating / rated current (NEC 460.8)
IEC_CURRENT = 1.30  # IEC 60831-1 maximum permissible current / I_N (from memory)
IEC_CURRENT_TOL = 1.43  # the same with the capacitance tolerance, 1.30 × 1.10 (from memory)

# Protective-device range around the capacitor's rated current: common practice only, to be
# confirmed against the capacitor and device makers' instructions (NEC 460.8(B) asks for a
# rating "as low as practicable").
PROTECTION_RANGE = (1.35, 1.65)

# A unit rated more than this many times the system voltage gives (1/1.25)² = 64 % or less of
# its nameplate kvar: worth a note that the kvar is paid for and not delivered (common practice).
OVERRATED_VOLTAGE_RATIO = 1.25


def _pos(v: float, what: str) -> None:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")


@guarded
def output_factor(v: float, v_rated: float, f: float, f_rated: float) -> float:
    """Ratio of a capacitor's output at (V, f) to its rated output at (V_r, f_r):
    (V/V_r)²·(f/f_r) (dimensionless), from Q = 2πf·C·V² (circuit theory). V, V_r [V];
    f, f_r [Hz]."""
    for x, w in ((v, "Voltage"), (v_rated, "Rated voltage"), (f, "Frequency"), (f_rated, "Rated frequency")):
        _pos(x, w)
    return (v / v_rated) ** 2 * (f / f_rated)


@guarded
def output_at(q_rated_kvar: float, v: float, v_rated: float, f: float, f_rated: float) -> float:
    """Output [kvar] of a capacitor rated Q_r [kvar] at V_r [V], f_r [Hz] when run at V [V],
    f [Hz]: Q = Q_r·(V/V_r)²·(f/f_r). Circuit theory (X_C = 1/(2πfC))."""
    return q_rated_kvar * output_factor(v, v_rated, f, f_rated)


@guarded
def rating_for(q_at_system_kvar: float, v: float, v_rated: float, f: float, f_rated: float) -> float:
    """Rated kvar [kvar] at (V_r [V], f_r [Hz]) that delivers Q [kvar] at (V [V], f [Hz]):
    Q_r = Q·(V_r/V)²·(f_r/f). Inverse of :func:`output_at`."""
    return q_at_system_kvar / output_factor(v, v_rated, f, f_rated)


@guarded
def capacitance_uf(q_kvar: float, v_ll: float, f: float, connection: str = "delta", phases: int = 3) -> float:
    """Capacitance per phase [µF] of a bank giving Q [kvar] at V [V] and f [Hz].

    Three-phase delta: each of 3 capacitors sees V_LL and gives Q/3: C = Q/(3·2πf·V²).
    Three-phase wye: each sees V_LL/√3: C = Q/(2πf·V²). Single-phase: C = Q/(2πf·V²).
    Circuit theory (Q = V²·2πfC per capacitor)."""
    _pos(v_ll, "Voltage")
    _pos(f, "Frequency")
    if q_kvar < 0:
        raise InputError("Capacitor kvar cannot be negative.")
    w = 2.0 * math.pi * f
    q_var = q_kvar * 1000.0
    if phases == 1:
        c = q_var / (w * v_ll**2)
    elif phases == 3 and connection == "delta":
        c = q_var / (3.0 * w * v_ll**2)
    elif phases == 3 and connection == "wye":
        c = q_var / (w * v_ll**2)
    else:
        raise InputError("Connection must be delta or wye (three-phase), or phases = 1.")
    return c * 1e6


@guarded
def kvar_from_uf(c_uf: float, v_ll: float, f: float, connection: str = "delta", phases: int = 3) -> float:
    """Output [kvar] of a bank with C [µF] per phase at V [V], f [Hz]; inverse of
    :func:`capacitance_uf`."""
    _pos(c_uf, "Capacitance")
    return c_uf / capacitance_uf(1.0, v_ll, f, connection, phases)


@guarded
def element_voltage(v_ll: float, connection: str = "delta", phases: int = 3) -> float:
    """Voltage across each capacitor element [V]: V_LL for delta or single-phase, V_LL/√3 for wye."""
    return v_ll / SQRT3 if (phases == 3 and connection == "wye") else v_ll


@guarded
def line_current(q_kvar: float, v_ll: float, phases: int = 3) -> float:
    """Line current [A] of a bank of Q [kvar] at V [V]: Q/(√3·V) three-phase, Q/V single-phase.
    (For a delta the current in each capacitor is this divided by √3.) Circuit theory."""
    _pos(v_ll, "Voltage")
    return 1000.0 * q_kvar / ((SQRT3 if phases == 3 else 1.0) * v_ll)


@dataclass(frozen=True)
class Duty:
    """Per-unit operating duty of a capacitor run off its rating, sinusoidal supply.

    voltage, kvar, current: ratios to rating (V/V_r, Q/Q_r, I/I_r)."""

    voltage: float
    kvar: float
    current: float

    def over_limits(self) -> list[str]:
        """Names of IEEE Std 18 continuous limits exceeded: 'voltage' (110 %), 'kvar' (135 %),
        'current' (135 %)."""
        bad = []
        if self.voltage > IEEE18_VOLTAGE + 1e-12:
            bad.append("voltage")
        if self.kvar > IEEE18_KVAR + 1e-12:
            bad.append("kvar")
        if self.current > IEEE18_CURRENT + 1e-12:
            bad.append("current")
        return bad


@guarded
def duty(v: float, v_rated: float, f: float, f_rated: float) -> Duty:
    """Duty of a capacitor at V [V], f [Hz] against its rating V_r [V], f_r [Hz], fundamental
    only: V/V_r, Q/Q_r = (V/V_r)²(f/f_r), I/I_r = (V/V_r)(f/f_r). Compare with IEEE Std 18 limits."""
    k = output_factor(v, v_rated, f, f_rated)
    return Duty(v / v_rated, k, (v / v_rated) * (f / f_rated))


@guarded
def conductor_basis(i_rated_a: float, profile: str = "nec") -> dict:
    """Minimum current ratings [A] for conductors and switching devices from the rated
    capacitor current I_N [A].

    profile 'nec': NFPA 70 (NEC) 460.8 — conductor ampacity and disconnect ≥ 1.35·I_N.
    profile 'iec': IEC 60831-1 current basis — 1.30·I_N, and 1.43·I_N allowing for the
    capacitance tolerance (from memory).
    Returns {'conductor': A, 'disconnect': A, 'factor': k, 'factor_tol': k or None}.
    """
    if i_rated_a < 0 or not math.isfinite(i_rated_a):
        raise InputError("Rated current must be zero or more.")
    if profile == "nec":
        return {"conductor": NEC_460_8 * i_rated_a, "disconnect": NEC_460_8 * i_rated_a, "factor": NEC_460_8, "factor_tol": None}
    if profile == "iec":
        return {
            "conductor": IEC_CURRENT_TOL * i_rated_a,
            "disconnect": IEC_CURRENT_TOL * i_rated_a,
            "factor": IEC_CURRENT,
            "factor_tol": IEC_CURRENT_TOL,
        }
    raise InputError("Code profile must be 'nec' or 'iec'.")


@guarded
def protection_range(i_rated_a: float) -> tuple[float, float]:
    """A protective-device rating range [A] around the rated current I_N [A]: 1.35–1.65·I_N.
    Common practice only; confirm against the capacitor and device makers' instructions."""
    return PROTECTION_RANGE[0] * i_rated_a, PROTECTION_RANGE[1] * i_rated_a
