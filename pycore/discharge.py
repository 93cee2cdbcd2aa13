"""Discharge resistors for capacitor units and the delay before a step may be switched in again.

A step that drops out keeps its charge: up to the peak of the voltage it was disconnected at.
Rules (the residual voltage between terminals, starting from √2 × rated voltage):

* NEC 460.6 (NFPA 70): 50 V or less within 1 min after disconnection (capacitors rated
  1000 V or less) — :data:`RULES` ``"nec"``;
* IEC 60831-1: 75 V or less within 3 min (from memory) — ``"iec"``.

A resistor R across each element of capacitance C discharges it as V(t) = V₀·e^(−t/RC)
(circuit theory), so R ≤ t/(C·ln(V₀/V_t)). In a delta each element lies between two line
terminals and sees the line voltage. In a wye each element lies between a terminal and the
floating star point; the voltage between two terminals is the difference of two element
voltages that decay with the same RC, so it falls as V₀·e^(−t/RC) too, from the same
√2·U_N. Resistances are per element [Ω], capacitances per element [F], voltages [V], times [s],
powers [W].

Reconnection (common practice): a controller should not close a step while it still holds
more than about 10 % of the rated peak (:data:`RECLOSE_FRACTION`), or the inrush adds to the
charge of opposite sign; the delay is t = RC·ln(1/0.10). Fast-discharge resistors (or
discharge reactors), switched across the step only while it is off, shorten it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded
from .references import ref

TWO_PI = 2.0 * math.pi
SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)


@dataclass(frozen=True)
class Rule:
    """A discharge rule: residual_v [V] reached within time_s [s]; source with its confidence."""

    key: str
    residual_v: float
    time_s: float
    source: str


RULES = {
    "nec": Rule("nec", 50.0, 60.0, ref("nec460_6")),
    "iec": Rule("iec", 75.0, 180.0, ref("iec60831_discharge")),
}

RECLOSE_FRACTION = 0.10
"""Residual voltage, as a fraction of the rated peak, below which a step may be switched in again
(common practice; the controller maker's instructions govern)."""

OPERATING_VOLTAGE_FACTOR = 1.10
"""Highest continuous voltage a resistor across a unit sees, × U_N (IEC 60831-1: 1.10 U_N for
8 h in 24 h, from memory; IEEE Std 18: 110 % continuous): the resistor's power at this voltage."""

CONNECTIONS = ("delta", "wye")


def _pos(v, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")
    return float(v)


@guarded
def element_capacitance_f(q_kvar: float, v_rated: float, f_hz: float, connection: str) -> float:
    """Capacitance of each element [F] of a three-phase unit of q_kvar [kvar] at v_rated [V]
    line-to-line, f_hz [Hz]: delta C = Q/(3·2πf·V²), wye C = Q/(2πf·V²). Circuit theory."""
    if connection not in CONNECTIONS:
        raise InputError("Connection must be delta or wye.")
    c = _pos(q_kvar, "The kvar") * 1e3 / (TWO_PI * _pos(f_hz, "Frequency") * _pos(v_rated, "Rated voltage") ** 2)
    return c / 3.0 if connection == "delta" else c


@guarded
def residual_v(v0: float, r_ohm: float, c_f: float, t_s: float) -> float:
    """Voltage [V] left after t_s [s] on a capacitance c_f [F] charged to v0 [V] with r_ohm [Ω]
    across it: V₀·e^(−t/RC). Circuit theory."""
    if t_s < 0 or not math.isfinite(t_s):
        raise InputError("The time must be zero or more.")
    return _pos(v0, "The initial voltage") * math.exp(-t_s / (_pos(r_ohm, "The resistance") * _pos(c_f, "The capacitance")))


@guarded
def time_to_v(v0: float, v_t: float, r_ohm: float, c_f: float) -> float:
    """Time [s] for v0 [V] to fall to v_t [V] through r_ohm [Ω] across c_f [F]: RC·ln(V₀/V_t);
    0 when v_t ≥ v0. Circuit theory."""
    v0, v_t = _pos(v0, "The initial voltage"), _pos(v_t, "The residual voltage")
    return max(0.0, _pos(r_ohm, "The resistance") * _pos(c_f, "The capacitance") * math.log(v0 / v_t))


@dataclass(frozen=True)
class Discharge:
    """Discharge design for one three-phase unit or step.

    r_max_ohm [Ω] largest resistance per element meeting the rule; c_element_f [F];
    v0 [V] = √2·U_N; tau_s [s] = R·C with R = r_max_ohm; p_element_w [W] one resistor's
    dissipation at rated voltage, p_element_max_w [W] at :data:`OPERATING_VOLTAGE_FACTOR`;
    p_total_w [W] three resistors at rated voltage; reclose_s [s] to :data:`RECLOSE_FRACTION`
    of V₀; connection; rule (:class:`Rule`)."""

    r_max_ohm: float
    c_element_f: float
    v0: float
    tau_s: float
    p_element_w: float
    p_element_max_w: float
    p_total_w: float
    reclose_s: float
    connection: str
    rule: Rule


@guarded
def discharge_resistor(q_kvar: float, v_rated: float, f_hz: float, connection: str, rule: str = "nec") -> Discharge:
    """Largest discharge resistance per element [Ω] of a unit of q_kvar [kvar] at v_rated [V]
    line-to-line, f_hz [Hz], ``connection`` 'delta' or 'wye', meeting ``rule`` ('nec': 50 V in
    1 min, NEC 460.6; 'iec': 75 V in 3 min, IEC 60831-1 from memory) from V₀ = √2·U_N:
    R ≤ t/(C·ln(V₀/V_t)); its power V_el²/R with V_el = U_N (delta) or U_N/√3 (wye); the
    reconnection delay RC·ln(1/0.10) (common practice). Returns :class:`Discharge`."""
    if rule not in RULES:
        raise InputError("The discharge rule must be 'nec' or 'iec'.")
    rl = RULES[rule]
    c = element_capacitance_f(q_kvar, v_rated, f_hz, connection)
    v0 = SQRT2 * v_rated
    if v0 <= rl.residual_v:
        raise InputError(f"At this rated voltage the peak is already below {rl.residual_v:g} V: no discharge resistor is needed by this rule.")
    r = rl.time_s / (c * math.log(v0 / rl.residual_v))
    v_el = v_rated if connection == "delta" else v_rated / SQRT3
    p = v_el * v_el / r
    tau = r * c
    return Discharge(r, c, v0, tau, p, p * OPERATING_VOLTAGE_FACTOR**2, 3.0 * p, tau * math.log(1.0 / RECLOSE_FRACTION), connection, rl)


@dataclass(frozen=True)
class FastDischarge:
    """Fast-discharge resistors switched across a step only while it is off.

    r_ohm [Ω] per element; energy_j [J] each resistor takes from one full discharge (½·C·V₀²);
    p_if_left_w [W] what one would dissipate if left across the live step (why it must be
    switched out); delay_s [s] the reconnection delay it gives."""

    r_ohm: float
    energy_j: float
    p_if_left_w: float
    delay_s: float


@guarded
def fast_discharge(q_kvar: float, v_rated: float, f_hz: float, connection: str, delay_s: float) -> FastDischarge:
    """Resistance per element [Ω] that brings a unit (q_kvar [kvar], v_rated [V], f_hz [Hz],
    'delta'/'wye') from √2·U_N to :data:`RECLOSE_FRACTION` of it within delay_s [s]:
    R = t/(C·ln(1/0.10)); its energy per discharge ½CV₀² [J]. Circuit theory; fast discharge
    switched in by the step's contactor while off is common practice."""
    c = element_capacitance_f(q_kvar, v_rated, f_hz, connection)
    t = _pos(delay_s, "The reconnection delay")
    r = t / (c * math.log(1.0 / RECLOSE_FRACTION))
    v0 = SQRT2 * v_rated
    v_el = v_rated if connection == "delta" else v_rated / SQRT3
    return FastDischarge(r, 0.5 * c * v0 * v0, v_el * v_el / r, t)


@guarded
def reclose_delay_s(r_ohm: float, c_element_f: float) -> float:
    """Delay [s] before a step discharged through r_ohm [Ω] per element of c_element_f [F] is
    below :data:`RECLOSE_FRACTION` of its peak: RC·ln(1/0.10). Common practice."""
    return _pos(r_ohm, "The resistance") * _pos(c_element_f, "The capacitance") * math.log(1.0 / RECLOSE_FRACTION)
