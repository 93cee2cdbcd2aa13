"""The supply seen from a low-voltage bus: short-circuit level, voltage rise, resonance order.

Powers in kVA/kvar, impedances in per cent on the transformer's own rating.
"""

from __future__ import annotations

import math

from .errors import InputError, guarded


@guarded
def transformer_short_circuit_kva(transformer_kva: float, z_percent: float, upstream_fault_kva: float | None = None) -> float:
    """Short-circuit apparent power [kVA] at the transformer's secondary bus.

    S_sc = 1 / (Z_t/S_t + 1/S_up): the transformer's reactance (Z% on its own kVA base) in
    series with the upstream source (fault level S_up [kVA]; infinite bus when None).
    Per-unit method, e.g. IEEE Std 141 (Red Book), short-circuit chapter; IEEE Std 399.
    """
    if transformer_kva <= 0:
        raise InputError("Transformer rating must be above zero.")
    if z_percent <= 0:
        raise InputError("Transformer impedance must be above zero.")
    z_t = (z_percent / 100.0) / transformer_kva  # per kVA
    z_up = 0.0
    if upstream_fault_kva is not None:
        if upstream_fault_kva <= 0:
            raise InputError("Upstream fault level must be above zero.")
        z_up = 1.0 / upstream_fault_kva
    return 1.0 / (z_t + z_up)


def bank_fits_bus(q_cap_kvar: float, s_sc_kva: float) -> bool:
    """True when a bank of Q [kvar] is smaller than the bus short-circuit level S_sc [kVA].
    At Q ≥ S_sc the √(S_sc/Q) resonance estimate falls to the fundamental or below and the
    ΔV ≈ Q/S_sc approximation to 100 % or more: the figures are a unit or rating typed wrong,
    not a bank (circuit theory; a real bank is a few per cent of S_sc, common practice)."""
    return q_cap_kvar < s_sc_kva


@guarded
def resonance_order(s_sc_kva: float, q_cap_kvar: float) -> float:
    """Parallel-resonance harmonic order h ≈ √(S_sc/Q_cap) of a bank on a bus (dimensionless).

    Neglects resistance and load damping. IEEE Std 1036 (application guide for shunt
    capacitors); R. C. Dugan et al., Electrical Power Systems Quality, capacitor resonance.
    """
    if s_sc_kva <= 0:
        raise InputError("Short-circuit level must be above zero.")
    if q_cap_kvar <= 0:
        raise InputError("Capacitor kvar must be above zero.")
    return math.sqrt(s_sc_kva / q_cap_kvar)


@guarded
def voltage_rise_percent(q_cap_kvar: float, s_sc_kva: float) -> float:
    """Steady-state voltage rise [%] when a bank of Q [kvar] is switched onto a bus of
    short-circuit level S_sc [kVA]: ΔV% ≈ 100·Q/S_sc (reactive source impedance; utility and
    handbook practice, e.g. IEEE Std 1036 — common practice)."""
    if s_sc_kva <= 0:
        raise InputError("Short-circuit level must be above zero.")
    return 100.0 * q_cap_kvar / s_sc_kva


CHARACTERISTIC_ORDERS = (5, 7, 11, 13, 17, 19, 23, 25)
"""Characteristic harmonics of six-pulse converters (h = 6k ± 1; common practice, IEEE Std 519)."""

LOW_ORDERS = (5, 7, 11, 13)
"""The characteristic harmonics that carry most of a plant's harmonic current, screened when a
bank's size is chosen (common practice)."""

SINGLE_PHASE_ORDER = 3
"""Single-phase rectifier loads (computers, LED lighting) add the 3rd harmonic (common practice)."""

VOLTAGE_RISE_LIMIT_PERCENT = 3.0
"""Switching a bank should raise the bus voltage by no more than about this much (utility and
handbook practice, common practice)."""

