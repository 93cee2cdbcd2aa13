"""Harmonic current sources at a bus: typical spectra by load type, measured current spectra,
and currents backed out of a measured bus-voltage spectrum.

Spectra are {harmonic order h: I_h/I_1 [%]}; injections are {h: I_h [A rms, line current]}.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from . import harmonicbus
from .errors import InputError, guarded

ORDER_MIN = 2
ORDER_MAX = 50
"""Orders a spectrum may hold: IEEE Std 519-2014 counts harmonics up to the 50th."""

SOURCE_FUNDAMENTAL_PF = 0.95
"""Displacement power factor assumed to turn a non-linear load's kW into its fundamental current,
I_1 = P/(√3·V·0.95) (common practice for diode-bridge drives and rectifiers; an assumption)."""


@dataclass(frozen=True)
class TypicalSpectrum:
    """A typical current spectrum: label, {h: % of I_1}, source note, and whether it is textbook
    ('source') or typical values recalled ('memory')."""

    label: str
    levels: dict
    source: str
    confidence: str


def _ideal(orders) -> dict:
    return {h: 100.0 / h for h in orders}


_SIX = [h for k in range(1, 9) for h in (6 * k - 1, 6 * k + 1) if h <= ORDER_MAX]
_TWELVE = [h for k in range(1, 5) for h in (12 * k - 1, 12 * k + 1) if h <= ORDER_MAX]

TYPICAL_SPECTRA = {
    "six_pulse_ideal": TypicalSpectrum(
        "Six-pulse converter, ideal (large DC inductance)", _ideal(_SIX),
        "Fourier series of the ideal six-pulse line current: I_h/I_1 = 1/h for h = 6k ± 1 (textbook)",
        "source"),
    "six_pulse_choke": TypicalSpectrum(
        "Six-pulse drive with DC choke or line reactor",
        {5: 35.0, 7: 12.0, 11: 7.5, 13: 5.0, 17: 4.0, 19: 3.0, 23: 2.0, 25: 2.0},
        "Typical values for PWM drives with a 3-5 % line reactor or DC choke (from memory: the 5th "
        "above the ideal 20 %, higher orders below 1/h, because the DC-link current still ripples)",
        "memory"),
    "six_pulse_bare": TypicalSpectrum(
        "Six-pulse drive without choke or reactor",
        {5: 65.0, 7: 45.0, 11: 9.0, 13: 7.0, 17: 5.0, 19: 4.0, 23: 3.0, 25: 2.5},
        "Typical values for capacitor-input PWM drives with no reactor (from memory: the current "
        "flows in two short pulses per half cycle, so the 5th and 7th are large)",
        "memory"),
    "twelve_pulse": TypicalSpectrum(
        "Twelve-pulse converter",
        {**_ideal(_TWELVE), 5: 2.6, 7: 1.6},
        "Ideal twelve-pulse: 1/h for h = 12k ± 1 (textbook); the residual 5th and 7th from "
        "transformer and phase imbalance are typical values (from memory)",
        "memory"),
    "single_phase": TypicalSpectrum(
        "Single-phase electronic loads (computers, LED drivers)",
        {3: 80.0, 5: 60.0, 7: 35.0, 9: 15.0, 11: 8.0, 13: 5.0, 15: 3.0},
        "Typical values for capacitor-input single-phase power supplies (from memory: a narrow "
        "current pulse at each voltage crest gives a large 3rd); the 3rd is zero-sequence and its "
        "path to a delta bank depends on the transformer connection",
        "memory"),
}
"""Typical spectra by load type. Only the ideal six-pulse and twelve-pulse orders are textbook;
the other levels are typical values recalled for screening, marked 'from memory'."""


def _level(v, what: str) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v < 0:
        raise InputError(f"{what}: the level must be a finite number, zero or above.")
    return float(v)


@guarded
def check_orders(spectrum: dict, percent: bool = True) -> dict:
    """The spectrum with integer keys, or InputError: every order a whole number from 2 to 50,
    every level finite and not negative, and at most 100 % of the fundamental when ``percent``."""
    if not isinstance(spectrum, dict) or not spectrum:
        raise InputError("Enter at least one harmonic order and its level.")
    out = {}
    for h, v in spectrum.items():
        if isinstance(h, bool) or not isinstance(h, (int, float)) or not math.isfinite(h) or h != int(h) \
                or not (ORDER_MIN <= h <= ORDER_MAX):
            raise InputError(f"Harmonic order {h}: use whole numbers from {ORDER_MIN} to {ORDER_MAX}.")
        lv = _level(v, f"Harmonic {int(h)}")
        if percent and lv > 100.0:
            raise InputError(f"Harmonic {int(h)}: the level must be at most 100 % of the fundamental.")
        out[int(h)] = lv
    return out


@guarded
def fundamental_current_a(p_kw: float, v_ll_v: float, pf: float = SOURCE_FUNDAMENTAL_PF) -> float:
    """Fundamental line current [A] of a three-phase load of p_kw [kW] at v_ll_v [V] and
    displacement power factor pf: I_1 = P/(√3·V·pf) (power triangle)."""
    if not (p_kw > 0 and v_ll_v > 0 and 0 < pf <= 1):
        raise InputError("Power and voltage must be above zero and the power factor in (0, 1].")
    return p_kw * 1000.0 / (math.sqrt(3.0) * v_ll_v * pf)


@guarded
def typical_injection(kind: str, p_kw: float, v_ll_v: float) -> dict:
    """{h: I_h [A]} of a load of type ``kind`` (a key of :data:`TYPICAL_SPECTRA`) drawing
    p_kw [kW] at v_ll_v [V]: level × I_1, I_1 from :func:`fundamental_current_a`."""
    if kind not in TYPICAL_SPECTRA:
        raise InputError("Choose one of the listed load types.")
    i1 = fundamental_current_a(p_kw, v_ll_v)
    return {h: lv / 100.0 * i1 for h, lv in TYPICAL_SPECTRA[kind].levels.items()}


@guarded
def injection_from_percent(spectrum_percent: dict, i1_a: float) -> dict:
    """{h: I_h [A]} from a measured current spectrum in % of the fundamental I_1 [A]."""
    spec = check_orders(spectrum_percent, True)
    if not (i1_a > 0) or not math.isfinite(i1_a):
        raise InputError("The fundamental current must be above zero.")
    return {h: lv / 100.0 * i1_a for h, lv in spec.items()}


@guarded
def combine(injections) -> dict:
    """Sum several {h: I_h [A]} by order, magnitudes added (all in phase: the worst case; a
    screening assumption, no phase data is used)."""
    out: dict = {}
    for inj in injections:
        for h, i in inj.items():
            out[h] = out.get(h, 0.0) + abs(i)
    return out


@guarded
def injection_from_voltage(bus: harmonicbus.Bus, steps_in, v_percent: dict) -> dict:
    """{h: I_h [A]} backed out of a measured bus-voltage spectrum {h: V_h [% of the phase
    voltage]} taken with the steps ``steps_in`` in service (empty: bank out): I_h = V_h/|Z_bus(h)|
    through the impedance of the bus as it was when measured. All distortion is put down to
    loads on this bus (background distortion from the network is not separated)."""
    spec = check_orders(v_percent, True)
    return {h: lv / 100.0 * bus.v_phase / abs(harmonicbus.bus_impedance(bus, steps_in, h)) for h, lv in spec.items()}


@guarded
def voltage_percent(bus: harmonicbus.Bus, steps_in, injection: dict) -> dict:
    """{h: |V_h| [% of the phase voltage]} at the bus for injections {h: I_h [A]} with the steps
    ``steps_in`` in: |I_h·Z_bus(h)|."""
    return {h: 100.0 * abs(i * harmonicbus.bus_impedance(bus, steps_in, h)) / bus.v_phase for h, i in injection.items()}


@guarded
def screening_orders(injection: dict, max_order: int = 25) -> tuple:
    """Harmonic orders present (level above zero) up to ``max_order``, sorted: the orders the
    resonance screen checks (the scan has always checked up to the 25th)."""
    return tuple(sorted(h for h, i in injection.items() if abs(i) > 0 and h <= max_order))
