"""Phasors and impedance: conversions, combinations, equivalents and power factor.

Sign convention (IEEE/IEC common practice): Z = R + jX with X > 0 inductive; Y = G + jB
with B < 0 inductive. A load whose current lags its voltage (inductive, φ > 0) has a
*lagging* power factor. Angles are in degrees unless a name says otherwise.

References: any circuit-analysis text, e.g. C. K. Alexander and M. N. O. Sadiku,
*Fundamentals of Electric Circuits*, chapters on sinusoids and phasors, and on AC power.
"""

from __future__ import annotations

import cmath
import math
from typing import Iterable, Sequence

from .errors import InputError, guarded

TWO_PI = 2.0 * math.pi


@guarded
def to_polar(z: complex) -> tuple[float, float]:
    """Rectangular → polar: return ``(magnitude, angle)`` with the angle in degrees (−180, 180]."""
    mag = abs(z)
    ang = math.degrees(math.atan2(z.imag, z.real)) if mag else 0.0
    if ang == -180.0:
        ang = 180.0
    return mag, ang


@guarded
def from_polar(magnitude: float, angle_deg: float) -> complex:
    """Polar → rectangular: magnitude [any unit] at ``angle_deg`` [°]."""
    return cmath.rect(magnitude, math.radians(angle_deg))


@guarded
def admittance(z: complex) -> complex:
    """Admittance Y = 1/Z [S] of an impedance Z [Ω]. Raises InputError for Z = 0 (a short)."""
    if z == 0:
        raise InputError("A zero impedance (a short circuit) has no finite admittance.")
    return 1.0 / z


@guarded
def impedance(y: complex) -> complex:
    """Impedance Z = 1/Y [Ω] of an admittance Y [S]. Raises InputError for Y = 0 (an open circuit)."""
    if y == 0:
        raise InputError("A zero admittance (an open circuit) has no finite impedance.")
    return 1.0 / y


@guarded
def reactance_inductor(l_henry: float, f_hz: float) -> float:
    """Inductive reactance X_L = 2πfL [Ω] of L [H] at f [Hz]."""
    return TWO_PI * f_hz * l_henry


@guarded
def reactance_capacitor(c_farad: float, f_hz: float) -> float:
    """Capacitive reactance as a signed value X_C = −1/(2πfC) [Ω] of C [F] at f [Hz]."""
    if c_farad <= 0 or f_hz <= 0:
        raise InputError("Capacitance and frequency must be above zero.")
    return -1.0 / (TWO_PI * f_hz * c_farad)


@guarded
def series(impedances: Iterable[complex]) -> complex:
    """Series combination: Z = ΣZ_k [Ω] (Kirchhoff's voltage law)."""
    total = 0j
    n = 0
    for z in impedances:
        total += z
        n += 1
    if n == 0:
        raise InputError("A series combination needs at least one branch.")
    return total


@guarded
def parallel(impedances: Iterable[complex]) -> complex:
    """Parallel combination through admittances: Z = 1/Σ(1/Z_k) [Ω].

    A zero-impedance branch shorts the whole combination (returns 0). Branches
    whose admittances cancel exactly (ideal parallel resonance) raise InputError.
    """
    zs = list(impedances)
    if not zs:
        raise InputError("A parallel combination needs at least one branch.")
    if any(z == 0 for z in zs):
        return 0j
    y = sum(1.0 / z for z in zs)
    if y == 0:
        raise InputError("The branches cancel exactly (ideal parallel resonance): the impedance is infinite.")
    return 1.0 / y


@guarded
def delta_to_wye(z_ab: complex, z_bc: complex, z_ca: complex) -> tuple[complex, complex, complex]:
    """Δ → Y (Kennelly): return (Z_a, Z_b, Z_c) [Ω] from the delta branches Z_ab, Z_bc, Z_ca [Ω].

    Z_a = Z_ab·Z_ca / ΣZ, and so on round the delta.
    """
    s = z_ab + z_bc + z_ca
    if s == 0:
        raise InputError("The three delta impedances sum to zero; no wye equivalent exists.")
    return z_ab * z_ca / s, z_ab * z_bc / s, z_bc * z_ca / s


@guarded
def wye_to_delta(z_a: complex, z_b: complex, z_c: complex) -> tuple[complex, complex, complex]:
    """Y → Δ (Kennelly): return (Z_ab, Z_bc, Z_ca) [Ω] from the wye legs Z_a, Z_b, Z_c [Ω].

    Z_ab = (Z_a Z_b + Z_b Z_c + Z_c Z_a)/Z_c, and so on.
    """
    if 0 in (z_a, z_b, z_c):
        raise InputError("A wye leg of zero impedance has no delta equivalent.")
    p = z_a * z_b + z_b * z_c + z_c * z_a
    return p / z_c, p / z_a, p / z_b


@guarded
def series_equivalent(z: complex) -> tuple[float, float]:
    """Equivalent series R_s, X_s [Ω] — the rectangular parts of Z."""
    return z.real, z.imag


@guarded
def parallel_equivalent(z: complex) -> tuple[float, float]:
    """Equivalent parallel R_p, X_p [Ω]: R_p = (R²+X²)/R, X_p = (R²+X²)/X.

    Returns ``math.inf`` for a part that is zero in series form (an open branch in parallel form).
    """
    r, x = z.real, z.imag
    m2 = r * r + x * x
    rp = m2 / r if r != 0 else math.inf
    xp = m2 / x if x != 0 else math.inf
    return rp, xp


@guarded
def element_for_reactance(x_ohm: float, f_hz: float) -> tuple[str, float]:
    """The single L or C that has reactance ``x_ohm`` [Ω] at ``f_hz`` [Hz].

    Returns ``('L', henry)`` for X > 0, ``('C', farad)`` for X < 0 and ``('', 0.0)`` for X = 0.
    """
    if f_hz <= 0:
        raise InputError("Frequency must be above zero.")
    if x_ohm > 0 and math.isfinite(x_ohm):
        return "L", x_ohm / (TWO_PI * f_hz)
    if x_ohm < 0 and math.isfinite(x_ohm):
        return "C", -1.0 / (TWO_PI * f_hz * x_ohm)
    return "", 0.0


@guarded
def phase_angle(z: complex) -> float:
    """Impedance angle φ [°] = arg Z; positive when current lags voltage (inductive)."""
    return to_polar(z)[1]


@guarded
def power_factor(z: complex) -> tuple[float, str]:
    """Power factor cos φ of an impedance and the word 'lagging', 'leading' or 'unity'.

    A negative R (a source, not a load) gives a negative cos φ, returned as is.
    """
    if z == 0:
        raise InputError("A short circuit has no power factor.")
    phi = math.atan2(z.imag, z.real)
    pf = math.cos(phi)
    if abs(z.imag) <= 1e-12 * abs(z):
        return pf, "unity"
    return pf, ("lagging" if z.imag > 0 else "leading")


@guarded
def branch_impedance(kind: str, value: float, f_hz: float) -> complex:
    """Impedance [Ω] of one ideal element at f [Hz]: kind 'R' (Ω), 'L' (H) or 'C' (F)."""
    if value <= 0 or not math.isfinite(value):
        raise InputError("An element value must be a finite number above zero.")
    if kind == "R":
        return complex(value, 0.0)
    if kind == "L":
        if f_hz <= 0:
            raise InputError("Frequency must be above zero.")
        return complex(0.0, reactance_inductor(value, f_hz))
    if kind == "C":
        return complex(0.0, reactance_capacitor(value, f_hz))
    raise InputError(f"Unknown element '{kind}': use R, L or C.")


@guarded
def network_impedance(elements: Sequence[tuple[str, float]], f_hz: float, topology: str) -> complex:
    """Impedance [Ω] of R, L, C elements all in 'series' or all in 'parallel' at f [Hz]."""
    zs = [branch_impedance(k, v, f_hz) for k, v in elements]
    if topology == "series":
        return series(zs)
    if topology == "parallel":
        return parallel(zs)
    raise InputError("Topology must be 'series' or 'parallel'.")
