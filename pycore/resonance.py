"""Series and parallel R-L-C resonance: frequency, characteristic impedance, Q, bandwidth.

Ideal circuits only: *series* is R, L and C in one loop; *parallel* is R, L and C each
across the same two nodes (a coil's own resistance in series with L is not modelled; for
a coil of high Q the difference is small). Sign convention as in :mod:`pycore.phasor`:
Z = R + jX, X > 0 inductive (current lags voltage).

References: C. K. Alexander and M. N. O. Sadiku, *Fundamentals of Electric Circuits*,
chapter on frequency response (series and parallel resonance): ω₀ = 1/√(LC); series
Q = ω₀L/R, parallel Q = R/(ω₀L); bandwidth B = ω₀/Q; half-power frequencies
ω₁,₂ = ∓R/(2L) + √((R/2L)² + 1/LC) (series) and ∓1/(2RC) + √((1/2RC)² + 1/LC) (parallel).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Optional

from .errors import InputError, guarded

TWO_PI = 2.0 * math.pi
TOPOLOGIES = ("series", "parallel")
Q_HEAVILY_DAMPED = 0.5  # below this Q the half-power points lie far apart: "resonance" means little (textbook)
Q_UNUSUAL_FOR_POWER = 1000.0  # power reactors and capacitors rarely exceed this Q (common practice)


def _positive(value: float, what: str) -> float:
    if value is None or not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
        raise InputError(f"{what} must be a finite number above zero.")
    return float(value)


def _topology(topology: str) -> str:
    if topology not in TOPOLOGIES:
        raise InputError("Connection must be 'series' or 'parallel'.")
    return topology


def _resistance(r_ohm: Optional[float], topology: str) -> float:
    """R for the topology: series R may be 0 (lossless); parallel R may be None/∞ (lossless), never 0."""
    if topology == "series":
        if r_ohm is None:
            return 0.0
        if not math.isfinite(r_ohm) or r_ohm < 0:
            raise InputError("Series resistance must be zero or a finite positive value.")
        return float(r_ohm)
    if r_ohm is None or r_ohm == math.inf:
        return math.inf
    if not math.isfinite(r_ohm) or r_ohm <= 0:
        raise InputError("Parallel resistance must be above zero (zero would short the circuit); leave it empty for none.")
    return float(r_ohm)


@guarded
def resonant_frequency(l_henry: float, c_farad: float) -> float:
    """Resonant frequency f₀ = 1/(2π√(LC)) [Hz] of L [H] and C [F] (series or parallel,
    ideal elements). Alexander & Sadiku, frequency response: ω₀ = 1/√(LC)."""
    l_henry = _positive(l_henry, "Inductance")
    c_farad = _positive(c_farad, "Capacitance")
    return 1.0 / (TWO_PI * math.sqrt(l_henry * c_farad))


@guarded
def characteristic_impedance(l_henry: float, c_farad: float) -> float:
    """Characteristic impedance Z₀ = √(L/C) [Ω] = X_L = |X_C| at resonance, of L [H] and C [F]."""
    l_henry = _positive(l_henry, "Inductance")
    c_farad = _positive(c_farad, "Capacitance")
    return math.sqrt(l_henry / c_farad)


@guarded
def capacitance_for(f0_hz: float, l_henry: float) -> float:
    """The C [F] that resonates with L [H] at f₀ [Hz]: C = 1/((2πf₀)² L). From ω₀ = 1/√(LC)."""
    f0_hz = _positive(f0_hz, "Frequency")
    l_henry = _positive(l_henry, "Inductance")
    return 1.0 / ((TWO_PI * f0_hz) ** 2 * l_henry)


@guarded
def inductance_for(f0_hz: float, c_farad: float) -> float:
    """The L [H] that resonates with C [F] at f₀ [Hz]: L = 1/((2πf₀)² C). From ω₀ = 1/√(LC)."""
    f0_hz = _positive(f0_hz, "Frequency")
    c_farad = _positive(c_farad, "Capacitance")
    return 1.0 / ((TWO_PI * f0_hz) ** 2 * c_farad)


@guarded
def quality_factor(r_ohm: Optional[float], l_henry: float, c_farad: float, topology: str) -> float:
    """Quality factor Q (dimensionless) of the ideal circuit: series Q = ω₀L/R = Z₀/R,
    parallel Q = R/(ω₀L) = R/Z₀. R [Ω], L [H], C [F]. Returns ``math.inf`` when lossless
    (series R = 0, parallel R absent). Alexander & Sadiku, series and parallel resonance."""
    topology = _topology(topology)
    r = _resistance(r_ohm, topology)
    z0 = characteristic_impedance(l_henry, c_farad)
    if topology == "series":
        return math.inf if r == 0 else z0 / r
    return math.inf if r == math.inf else r / z0


@guarded
def half_power_frequencies(r_ohm: Optional[float], l_henry: float, c_farad: float, topology: str) -> tuple[float, float]:
    """Lower and upper half-power (−3 dB) frequencies (f₁, f₂) [Hz].

    Series: ω₁,₂ = ∓R/(2L) + √((R/(2L))² + 1/(LC)); parallel: ω₁,₂ = ∓1/(2RC) + √((1/(2RC))² + 1/(LC)).
    Exact for the ideal circuits (no narrow-band approximation). Both equal f₀ when lossless.
    R [Ω], L [H], C [F]. Alexander & Sadiku, frequency response.
    """
    topology = _topology(topology)
    r = _resistance(r_ohm, topology)
    l_henry = _positive(l_henry, "Inductance")
    c_farad = _positive(c_farad, "Capacitance")
    if topology == "series":
        a = r / (2.0 * l_henry)
    else:
        a = 0.0 if r == math.inf else 1.0 / (2.0 * r * c_farad)
    w0sq = 1.0 / (l_henry * c_farad)
    root = math.sqrt(a * a + w0sq)
    # ω₁ = root − a written as ω₀²/(root + a): same value, no cancellation when Q is small
    return w0sq / (root + a) / TWO_PI, (root + a) / TWO_PI


@guarded
def impedance(r_ohm: Optional[float], l_henry: float, c_farad: float, f_hz: float, topology: str) -> complex:
    """Driving-point impedance Z [Ω] at f [Hz]: series R + jωL + 1/(jωC);
    parallel 1/(1/R + 1/(jωL) + jωC). Returns ``complex(inf, 0)`` for an ideal parallel
    circuit exactly at resonance. R [Ω] (series: None = 0; parallel: None = no resistor), L [H], C [F]."""
    topology = _topology(topology)
    r = _resistance(r_ohm, topology)
    l_henry = _positive(l_henry, "Inductance")
    c_farad = _positive(c_farad, "Capacitance")
    f_hz = _positive(f_hz, "Frequency")
    w = TWO_PI * f_hz
    if topology == "series":
        return complex(r, w * l_henry - 1.0 / (w * c_farad))
    y = complex(0.0 if r == math.inf else 1.0 / r, w * c_farad - 1.0 / (w * l_henry))
    if y == 0:
        return complex(math.inf, 0.0)
    return 1.0 / y


@guarded
def phase_deg(z: complex) -> float:
    """Phase of Z [°]: positive = inductive (current lags), negative = capacitive (current leads)."""
    if not (math.isfinite(z.real) and math.isfinite(z.imag)):
        return 0.0
    return math.degrees(math.atan2(z.imag, z.real))


@guarded
def log_space(f_lo: float, f_hi: float, n: int) -> list[float]:
    """``n`` frequencies [Hz] spaced evenly on a log scale from f_lo to f_hi inclusive."""
    f_lo = _positive(f_lo, "Lowest frequency")
    f_hi = _positive(f_hi, "Highest frequency")
    if n < 2:
        return [f_lo]
    k = math.log(f_hi / f_lo) / (n - 1)
    return [f_lo * math.exp(k * i) for i in range(n)]


@guarded
def response(r_ohm: Optional[float], l_henry: float, c_farad: float, freqs: Iterable[float], topology: str) -> list[tuple[float, complex]]:
    """(f [Hz], Z [Ω]) at each frequency: the data for a |Z| and phase plot."""
    return [(f, impedance(r_ohm, l_henry, c_farad, f, topology)) for f in freqs]


@dataclass
class Resonance:
    """Everything about one ideal R-L-C circuit at resonance (units in brackets).

    f0 [Hz], w0 [rad/s], z0 characteristic impedance [Ω], q [-], bandwidth [Hz],
    f_low, f_high half-power frequencies [Hz], z_at_f0 |Z| at f₀ [Ω] (series: R;
    parallel: R; ``inf`` for a lossless parallel circuit).
    """

    topology: str
    r: float
    l: float
    c: float
    f0: float
    w0: float
    z0: float
    q: float
    bandwidth: float
    f_low: float
    f_high: float
    z_at_f0: float


@guarded
def analyse(r_ohm: Optional[float], l_henry: float, c_farad: float, topology: str) -> Resonance:
    """All the resonance figures of an ideal series or parallel R-L-C circuit.
    R [Ω] (series: None/0 = lossless; parallel: None = no resistor), L [H], C [F].
    Bandwidth B = f₀/Q [Hz] = f₂ − f₁ exactly for these circuits. Alexander & Sadiku."""
    topology = _topology(topology)
    r = _resistance(r_ohm, topology)
    f0 = resonant_frequency(l_henry, c_farad)
    z0 = characteristic_impedance(l_henry, c_farad)
    q = quality_factor(r_ohm, l_henry, c_farad, topology)
    f1, f2 = half_power_frequencies(r_ohm, l_henry, c_farad, topology)
    bw = 0.0 if q == math.inf else f0 / q
    return Resonance(topology, r, l_henry, c_farad, f0, TWO_PI * f0, z0, q, bw, f1, f2, r)
