"""One per-phase harmonic model of a low-voltage bus: supply, transformer, loads, motors and a
capacitor bank whose steps may be plain or detuned, each with its own detuning factor.

Per phase of the equivalent wye, ohms at the bus line-to-line voltage V (Z = V²/S):

* upstream network: fault level S_up [kVA] with its X/R (pure reactance when X/R is not
  known), R_up + jh·X_up (None: an infinite bus);
* transformer: Z = (Z%/100)·V²/S_t split by its X/R into R_t + jh·X_t; the resistance is
  constant with frequency by default, or R_t·√h as a stated option (skin effect; a common
  approximation, from memory);
* resistive load: a parallel resistance V²/P (its damping only);
* motors: the locked-rotor reactance X_LR = V²/(k·S_m) in parallel as jh·X_LR, with k the
  locked-rotor to full-load current ratio (the usual harmonic model of a motor);
* each capacitor step: plain −jX_C/h, or detuned R_L + j(h·X_L − X_C/h) with X_L = p·X_C and
  the reactor resistance R_L = X_L/Q_L from its quality factor at the fundamental;
* harmonic currents injected at the bus: V_h = I_h·Z_bus(h).

Capacitor losses are neglected. A step's kvar is what it delivers at the system voltage and
frequency (for a detuned step, the branch output, as in :mod:`pycore.detuning`).

References: R. C. Dugan et al., *Electrical Power Systems Quality*, harmonics chapters (bus
model and V_h = I_h·Z_bus); IEEE Std 399 (Brown Book), harmonic analysis; IEEE Std 141
(per-unit method).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Optional, Sequence

from .detuning import choose_rated_voltage
from .errors import InputError, guarded

SQRT3 = math.sqrt(3.0)

LOCKED_ROTOR_RATIO_DEFAULT = 6.0
"""Locked-rotor to full-load current ratio of induction motors when not known [-]: 5 to 7 is
usual for NEMA design B motors (common practice; from memory)."""

REACTOR_QUALITY_DEFAULT = 50.0
"""Quality factor X_L/R_L of a detuning reactor at the fundamental when not known [-]. LV
detuning reactors typically lie between about 30 and 100 (from memory); 50 is a middle value."""

R_VS_H = ("constant", "sqrt")
"""How the transformer and source resistances vary with harmonic order h: constant (default),
or R·√h (skin-effect approximation, common practice; from memory)."""


def _pos(v, what: str) -> float:
    if v is None or isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v <= 0:
        raise InputError(f"{what} must be a finite number above zero.")
    return float(v)


def _nonneg(v, what: str) -> float:
    if v is None:
        return 0.0
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) or v < 0:
        raise InputError(f"{what} must be zero or a finite positive number.")
    return float(v)


@dataclass(frozen=True)
class Step:
    """One capacitor step as declared: q_kvar delivered at the system voltage [kvar]; p the
    detuning factor [fraction, 0 for a plain step]; u_rated_v the capacitor's rated voltage [V]
    (None: the system voltage for a plain step, the next usual rating above U/(1 − p) with a
    10 % margin for a detuned one); reactor_q the reactor's quality factor [-]."""

    q_kvar: float
    p: float = 0.0
    u_rated_v: Optional[float] = None
    reactor_q: float = REACTOR_QUALITY_DEFAULT


@dataclass(frozen=True)
class StepModel:
    """A step in the model: x_c capacitor reactance [Ω per phase at the fundamental], x_l reactor
    reactance [Ω], r_l reactor resistance [Ω], p [fraction], q_kvar delivered at V [kvar],
    u_rated_v [V], q_rated_kvar the capacitor's rating at u_rated_v [kvar]."""

    q_kvar: float
    p: float
    x_c: float
    x_l: float
    r_l: float
    u_rated_v: float
    q_rated_kvar: float

    def impedance(self, h: float) -> complex:
        """Branch impedance [Ω] at harmonic order h."""
        if self.p == 0.0:
            return complex(0.0, -self.x_c / h)
        return complex(self.r_l, h * self.x_l - self.x_c / h)


@dataclass(frozen=True)
class Bus:
    """The bus model (see the module text). Ohms per phase at the fundamental; v_ll [V]; f_hz
    [Hz]; s_sc_kva the bus short-circuit level from supply and transformer [kVA]; i_sc_a the
    symmetrical fault current [A]; x_motor [Ω] the motors' locked-rotor reactance (None: no
    motors); r_load [Ω] (None: no resistive load)."""

    v_ll: float
    f_hz: float
    r_up: float
    x_up: float
    r_tx: float
    x_tx: float
    r_vs_h: str
    r_load: Optional[float]
    x_motor: Optional[float]
    steps: tuple
    s_sc_kva: float

    @property
    def v_phase(self) -> float:
        """Phase (line-to-neutral) voltage [V]."""
        return self.v_ll / SQRT3

    @property
    def i_sc_a(self) -> float:
        """Symmetrical short-circuit current at the bus [A]."""
        return self.s_sc_kva * 1000.0 / (SQRT3 * self.v_ll)


@guarded
def build_bus(
    v_ll_v: float,
    f_hz: float,
    tx_kva: float,
    tx_z_percent: float,
    tx_x_r: Optional[float] = None,
    upstream_fault_kva: Optional[float] = None,
    upstream_x_r: Optional[float] = None,
    load_kw: Optional[float] = None,
    motor_kva: Optional[float] = None,
    lr_ratio: float = LOCKED_ROTOR_RATIO_DEFAULT,
    steps: Sequence[Step] = (),
    r_vs_h: str = "constant",
    cap_factor: float = 1.0,
    z_factor: float = 1.0,
) -> Bus:
    """Build the bus model from nameplate data.

    v_ll_v [V]; f_hz [Hz]; tx_kva [kVA]; tx_z_percent [%] on its own rating; tx_x_r [-] (None:
    pure reactance, the least damped case); upstream_fault_kva [kVA] (None: infinite bus) with
    upstream_x_r [-] (None: pure reactance); load_kw resistive load [kW]; motor_kva running
    motors [kVA] with lr_ratio = I_LR/I_FL [-]; steps [:class:`Step`]; r_vs_h 'constant' or
    'sqrt'; cap_factor actual/nominal capacitance [-] (tolerance); z_factor actual/nominal
    transformer impedance [-] (tolerance). Per-unit method, IEEE Std 141.
    """
    v = _pos(v_ll_v, "System voltage")
    f = _pos(f_hz, "Frequency")
    s_t = _pos(tx_kva, "Transformer rating")
    zp = _pos(tx_z_percent, "Transformer impedance")
    kc = _pos(cap_factor, "Capacitance factor")
    kz = _pos(z_factor, "Impedance factor")
    if r_vs_h not in R_VS_H:
        raise InputError("Resistance against frequency must be 'constant' or 'sqrt'.")
    z_t = zp / 100.0 * v * v / (s_t * 1000.0) * kz
    r_t, x_t = _split(z_t, tx_x_r, "Transformer X/R")
    r_up = x_up = 0.0
    if upstream_fault_kva is not None:
        z_up = v * v / (_pos(upstream_fault_kva, "Upstream fault level") * 1000.0)
        r_up, x_up = _split(z_up, upstream_x_r, "Upstream X/R")
    z_sc = abs(complex(r_t + r_up, x_t + x_up))
    p_load = _nonneg(load_kw, "Resistive load")
    s_m = _nonneg(motor_kva, "Motor rating")
    k_lr = _pos(lr_ratio, "Locked-rotor ratio")
    models = tuple(_step_model(i, s, v, kc) for i, s in enumerate(steps, 1))
    return Bus(
        v_ll=v, f_hz=f, r_up=r_up, x_up=x_up, r_tx=r_t, x_tx=x_t, r_vs_h=r_vs_h,
        r_load=v * v / (p_load * 1000.0) if p_load > 0 else None,
        x_motor=v * v / (k_lr * s_m * 1000.0) if s_m > 0 else None,
        steps=models,
        s_sc_kva=v * v / z_sc / 1000.0,
    )


def _split(z: float, x_r, what: str) -> tuple[float, float]:
    if x_r is None:
        return 0.0, z
    xr = _pos(x_r, what)
    r = z / math.sqrt(1.0 + xr * xr)
    return r, r * xr


def _step_model(i: int, s: Step, v: float, kc: float) -> StepModel:
    if not isinstance(s, Step):
        raise InputError(f"Step {i} could not be read.")
    q = _pos(s.q_kvar, f"Step {i}: the kvar")
    p = s.p
    if isinstance(p, bool) or not isinstance(p, (int, float)) or not (0.0 <= p < 1.0):
        raise InputError(f"Step {i}: the detuning factor must be from 0 % to below 100 %.")
    rq = _pos(s.reactor_q, f"Step {i}: the reactor quality factor")
    x_c_nom = v * v / (q * 1000.0 * (1.0 - p))
    if s.u_rated_v is None:
        if p == 0.0:
            u_r = v
        else:
            u_r = choose_rated_voltage(v / (1.0 - p)) or v / (1.0 - p) * 1.1
    else:
        u_r = _pos(s.u_rated_v, f"Step {i}: the rated voltage")
    x_c = x_c_nom / kc
    x_l = p * x_c_nom
    return StepModel(q, float(p), x_c, x_l, x_l / rq if p > 0 else 0.0, u_r, u_r * u_r / x_c_nom / 1000.0)


def _indices(bus: Bus, steps_in) -> list:
    """The step indices as a list, or InputError when one is not a step of the bus."""
    out = []
    for k in steps_in:
        if isinstance(k, bool) or not isinstance(k, int) or not (0 <= k < len(bus.steps)):
            raise InputError("A step switched in is not one of the bank's steps.")
        out.append(k)
    return out


def _r_h(r: float, h: float, how: str) -> float:
    return r * math.sqrt(h) if how == "sqrt" else r


@guarded
def supply_impedance(bus: Bus, h: float) -> complex:
    """Impedance of upstream network plus transformer [Ω per phase] at harmonic order h."""
    return complex(_r_h(bus.r_up + bus.r_tx, h, bus.r_vs_h), h * (bus.x_up + bus.x_tx))


@guarded
def base_admittance(bus: Bus, h: float) -> complex:
    """Admittance [S per phase] at order h of everything on the bus except the capacitor steps:
    supply, resistive load and motors."""
    y = 1.0 / supply_impedance(bus, h)
    if bus.r_load is not None:
        y += 1.0 / bus.r_load
    if bus.x_motor is not None:
        y += complex(0.0, -1.0 / (h * bus.x_motor))
    return y


@guarded
def bus_impedance(bus: Bus, steps_in: Sequence[int], h: float) -> complex:
    """Impedance Z_bus(h) [Ω per phase] seen at the bus with the steps whose indices (from 0)
    are in ``steps_in`` switched in; complex infinity at an undamped resonance."""
    y = base_admittance(bus, h)
    for k in _indices(bus, steps_in):
        y += 1.0 / bus.steps[k].impedance(h)
    if y == 0:
        return complex(math.inf, 0.0)
    return 1.0 / y


@dataclass
class Solution:
    """Phasors [V, A per phase] of one bus state: v {h: V_h}, supply {h: current into the
    supply}, steps {step index: {h: branch current}}; the fundamental (h = 1) at the system
    voltage is included in each step's currents."""

    v: dict
    supply: dict
    steps: dict


@guarded
def solve(bus: Bus, steps_in: Sequence[int], injections: dict) -> Solution:
    """Bus voltages and branch currents for harmonic current sources at the bus.

    injections {order h ≥ 2: I_h [A rms, line current]}; V_h = I_h·Z_bus(h); each step draws
    V_h/Z_step(h), the supply V_h/Z_supply(h). Each step's fundamental current V_ph/Z_step(1)
    is added as order 1. Dugan et al., harmonics chapters (current injection at a bus)."""
    steps_in = _indices(bus, steps_in)
    if not isinstance(injections, dict):
        raise InputError("The harmonic currents could not be read.")
    v, sup = {}, {}
    br = {k: {1: bus.v_phase / bus.steps[k].impedance(1.0)} for k in steps_in}
    for h, i_h in injections.items():
        vh = i_h * bus_impedance(bus, steps_in, h)
        v[h] = vh
        sup[h] = vh / supply_impedance(bus, h)
        for k in steps_in:
            br[k][h] = vh / bus.steps[k].impedance(h)
    return Solution(v, sup, br)


@guarded
def capacitor_voltage_pu(bus: Bus, k: int, branch_current: dict) -> dict:
    """{h: |V_C,h|} [per unit of the capacitor's rated rms voltage] of step k from its branch
    currents {h: I_h [A]}: V_C,h = |I_h|·X_C/h (X_C the actual reactance) over U_rated/√3."""
    (k,) = _indices(bus, [k])
    s = bus.steps[k]
    base = s.u_rated_v / SQRT3
    return {h: abs(i) * s.x_c / h / base for h, i in branch_current.items()}


@guarded
def rated_current_a(bus: Bus, k: int) -> float:
    """Rated current [A] of step k's capacitor: Q_rated/(√3·U_rated)."""
    (k,) = _indices(bus, [k])
    s = bus.steps[k]
    return s.q_rated_kvar * 1000.0 / (SQRT3 * s.u_rated_v)


@guarded
def with_steps(bus: Bus, steps: Sequence[Step]) -> Bus:
    """The same bus with other capacitor steps [:class:`Step`] (nominal capacitance)."""
    return Bus(bus.v_ll, bus.f_hz, bus.r_up, bus.x_up, bus.r_tx, bus.x_tx, bus.r_vs_h, bus.r_load, bus.x_motor,
               tuple(_step_model(i, s, bus.v_ll, 1.0) for i, s in enumerate(steps, 1)), bus.s_sc_kva)


@guarded
def impedance_curve(bus: Bus, steps_in: Sequence[int], h_lo: float = 1.0, h_hi: float = 50.0,
                    step: float = 0.05) -> list:
    """[(h, |Z_bus(h)| [Ω])] from h_lo to h_hi at ``step`` orders, for plots."""
    if not (0 < h_lo < h_hi) or not (step > 0) or (h_hi - h_lo) / step > 20000:
        raise InputError("The order range must run upwards from above zero, with at most 20000 points.")
    n = max(1, int(round((h_hi - h_lo) / step)))
    return [(h, abs(bus_impedance(bus, steps_in, h))) for h in (h_lo + (h_hi - h_lo) * i / n for i in range(n + 1))]
