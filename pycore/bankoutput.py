"""What a capacitor bank really gives at the voltage it sees, and what a leading load needs.

A capacitor's output scales with the square of its voltage and with frequency,
Q = Q_r·(V/V_r)²·(f/f_r) (:func:`pycore.capacitor.output_at`; X_C = 1/(2πfC), circuit theory),
so a 480 V bank on a bus measured at 440 V gives 84 % of its rating. Powers in kW and kvar
(Q positive lagging), voltages line-to-line in V, frequencies in Hz.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .capacitor import output_at
from .correction import Load
from .errors import InputError, guarded


@dataclass(frozen=True)
class Delivered:
    """A bank at the voltage it sees. ``q_kvar``: output there [kvar]; ``v``: the voltage used
    [V]; ``pf``: the load's power factor with the bank in [dimensionless]; ``sense``:
    'lagging', 'leading' or 'unity'."""

    q_kvar: float
    v: float
    pf: float
    sense: str


@guarded
def with_bank_at(p_kw: float, q_kvar: float, q_rated_kvar: float, v: float, v_rated: float,
                 f: float, f_rated: float) -> Delivered:
    """The load P [kW], Q [kvar, + lagging] with a bank rated Q_r [kvar] at V_r [V], f_r [Hz]
    switched in on a bus at V [V] (the measured voltage when there is one), f [Hz]: the bank
    gives Q_r·(V/V_r)²·(f/f_r) (circuit theory) and the power factor follows from the power
    triangle (IEEE Std 141, power-factor chapter)."""
    if not (math.isfinite(p_kw) and p_kw > 0):
        raise InputError("Active power must be above zero.")
    if q_rated_kvar < 0:
        raise InputError("Capacitor kvar cannot be negative.")
    q_c = output_at(q_rated_kvar, v, v_rated, f, f_rated) if q_rated_kvar > 0 else 0.0
    after = Load(p_kw, q_kvar).corrected(q_c)
    return Delivered(q_c, v, after.pf, after.sense)


@guarded
def kvar_to_switch_off(p_kw: float, q_kvar: float, pf_target: float = 1.0) -> float:
    """For a load that is already leading (Q < 0 [kvar]) at P [kW]: the capacitor kvar [kvar]
    to switch off to bring it back to unity (pf_target = 1) or to a lagging target PF
    [dimensionless]: −Q + P·tan φ₂. Zero for a lagging load. Capacitors cannot raise a leading
    PF; only removing capacitance (or adding inductive load) does (power triangle, circuit
    theory)."""
    if not (math.isfinite(p_kw) and p_kw > 0):
        raise InputError("Active power must be above zero.")
    if not (0 < pf_target <= 1):
        raise InputError("The target power factor must be above 0 and at most 1.")
    if q_kvar >= 0:
        return 0.0
    return -q_kvar + p_kw * math.sqrt(max(0.0, 1 - pf_target * pf_target)) / pf_target
