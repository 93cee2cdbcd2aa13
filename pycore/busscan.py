"""Harmonic impedance scan of a low-voltage bus with a stepped capacitor bank.

The bus is modelled per phase (wye equivalent, ohms at the bus line-to-line voltage, so
Z = V_LL²/S): the supply (transformer, and the upstream network when its fault level is
known) as R + jhX, the plant load as a resistance V_LL²/P in parallel (its damping only),
and the capacitors as −jX_C/h. The impedance seen at the bus,

    Z_bus(h) = 1 / (1/(R_s + jhX_s) + 1/R_load + jhQ/V_LL²),

peaks where the supply inductance and the bank resonate in parallel. The peak is found by
a fine search over the harmonic order h and set beside the estimate h ≈ √(S_sc/Q).

Assumptions (screening level): resistances do not change with frequency; the upstream
network is a pure reactance; the load's own inductance and any motors are left out
(motors in parallel with the supply lower the inductance seen from the bus and move the
resonance a little higher than found here).
Per-unit method: IEEE Std 141 (Red Book); harmonic resonance: IEEE Std 1036,
R. C. Dugan et al., *Electrical Power Systems Quality*.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional, Sequence

from .errors import InputError, guarded
from .supply import resonance_order, transformer_short_circuit_kva

H_MIN = 1.0
H_MAX = 50.0
_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


@dataclass
class BusModel:
    """A bus: line-to-line voltage v_ll [V], fundamental f [Hz], supply r_src + j·x_src [Ω per
    phase at the fundamental], load resistance r_load [Ω per phase] or None, and the
    short-circuit level s_sc_kva [kVA] used by the √(S_sc/Q) estimate."""

    v_ll: float
    f_hz: float
    r_src: float
    x_src: float
    r_load: Optional[float]
    s_sc_kva: float


def _finite_positive(v, what: str) -> float:
    if v is None or not isinstance(v, (int, float)) or not math.isfinite(v) or v <= 0:
        raise InputError(f"{what} must be a finite number above zero.")
    return float(v)


@guarded
def bus_model(
    v_ll_v: float,
    f_hz: float,
    tx_kva: float,
    tx_z_percent: float,
    x_r: Optional[float] = None,
    upstream_fault_kva: Optional[float] = None,
    load_kw: Optional[float] = None,
) -> BusModel:
    """Build the bus model from nameplate data.

    v_ll_v system line-to-line voltage [V]; f_hz [Hz]; tx_kva transformer rating [kVA];
    tx_z_percent its impedance [%] on its own rating; x_r its X/R ratio [-] (None: a pure
    reactance, the least damped case); upstream_fault_kva fault level of the network feeding
    the transformer [kVA] (None: infinite bus), taken as a pure reactance; load_kw plant
    load [kW] modelled as a resistance V²/P in parallel (None or 0: no load damping).
    Transformer: Z = (Z%/100)·V²/S, R = Z/√(1 + (X/R)²), X = R·(X/R). Per-unit method,
    IEEE Std 141 (Red Book).
    """
    v = _finite_positive(v_ll_v, "System voltage")
    f = _finite_positive(f_hz, "Frequency")
    s_t = _finite_positive(tx_kva, "Transformer rating") * 1000.0
    zp = _finite_positive(tx_z_percent, "Transformer impedance")
    z_t = zp / 100.0 * v * v / s_t
    if x_r is None:
        r_t, x_t = 0.0, z_t
    else:
        if not math.isfinite(x_r) or x_r <= 0:
            raise InputError("X/R ratio must be a finite number above zero.")
        r_t = z_t / math.sqrt(1.0 + x_r * x_r)
        x_t = r_t * x_r
    x_up = 0.0
    if upstream_fault_kva is not None:
        x_up = v * v / (_finite_positive(upstream_fault_kva, "Upstream fault level") * 1000.0)
    r_load = None
    if load_kw is not None:
        if not math.isfinite(load_kw) or load_kw < 0:
            raise InputError("Load must be zero or a finite positive value.")
        if load_kw > 0:
            r_load = v * v / (load_kw * 1000.0)
    s_sc = transformer_short_circuit_kva(tx_kva, tx_z_percent, upstream_fault_kva)
    return BusModel(v, f, r_t, x_t + x_up, r_load, s_sc)


@guarded
def capacitor_reactance(v_ll_v: float, q_kvar: float) -> float:
    """Capacitive reactance per phase at the fundamental X_C = V_LL²/Q [Ω] of a three-phase
    bank of Q [kvar] at V_LL [V] (kvar at the system voltage)."""
    return _finite_positive(v_ll_v, "System voltage") ** 2 / (_finite_positive(q_kvar, "Capacitor kvar") * 1000.0)


@guarded
def bus_admittance(model: BusModel, q_kvar: float, h: float) -> complex:
    """Admittance Y [S per phase] seen at the bus at harmonic order h (h·f Hz) with Q [kvar] in."""
    y = 1.0 / complex(model.r_src, h * model.x_src)
    if model.r_load is not None:
        y += 1.0 / model.r_load
    if q_kvar > 0:
        y += complex(0.0, h * q_kvar * 1000.0 / (model.v_ll * model.v_ll))
    return y


@guarded
def bus_impedance(model: BusModel, q_kvar: float, h: float) -> complex:
    """Impedance Z [Ω per phase] seen at the bus at harmonic order h with Q [kvar] in
    (``complex(inf, 0)`` at an undamped resonance)."""
    y = bus_admittance(model, q_kvar, h)
    if y == 0:
        return complex(math.inf, 0.0)
    return 1.0 / y


@guarded
def cumulative_steps(steps: Sequence[float]) -> list[float]:
    """Total kvar with steps 1, 1+2, 1+2+3… switched in, in the order given [kvar]."""
    out, total = [], 0.0
    for i, s in enumerate(steps, 1):
        if s is None or not math.isfinite(s) or s <= 0:
            raise InputError(f"Step {i}: a step size must be above zero kvar.")
        total += s
        out.append(total)
    if not out:
        raise InputError("Enter at least one capacitor step.")
    return out


@dataclass
class Peak:
    """The parallel resonance of one step combination.

    q_kvar bank in [kvar]; order h at the |Z| peak (None when the peak lies outside
    h_lo–h_hi); where 'below'/'above'/'' says which side when outside; freq_hz [Hz];
    z_peak |Z| at the peak [Ω] (inf when the model has no resistance at all); z_supply |Z| of the supply alone at
    that order [Ω]; estimate √(S_sc/Q) [-]."""

    q_kvar: float
    order: Optional[float]
    where: str
    freq_hz: Optional[float]
    z_peak: Optional[float]
    z_supply: Optional[float]
    estimate: float
    points: list = field(default_factory=list)


@guarded
def find_peak(model: BusModel, q_kvar: float, h_lo: float = H_MIN, h_hi: float = H_MAX, grid: float = 0.02) -> Peak:
    """Locate the |Z| peak of the bus with Q [kvar] in between orders h_lo and h_hi:
    a grid search at ``grid`` orders, then a golden-section search on |Y| (minimum) to
    1e-9 orders. Returns a :class:`Peak`; the estimate is IEEE Std 1036's √(S_sc/Q)."""
    q = _finite_positive(q_kvar, "Capacitor kvar")
    est = resonance_order(model.s_sc_kva, q)
    n = max(2, int(math.ceil((h_hi - h_lo) / grid)))
    hs = [h_lo + (h_hi - h_lo) * i / n for i in range(n + 1)]
    ys = [abs(bus_admittance(model, q, h)) for h in hs]
    i = min(range(len(ys)), key=ys.__getitem__)
    if i == 0 or i == len(ys) - 1:
        # peak outside the range: say which side from where |Y| is falling
        where = "below" if i == 0 else "above"
        return Peak(q, None, where, None, None, None, est)
    a, b = hs[i - 1], hs[i + 1]
    fa = lambda h: abs(bus_admittance(model, q, h))  # noqa: E731
    c = b - _GOLDEN * (b - a)
    d = a + _GOLDEN * (b - a)
    fc, fd = fa(c), fa(d)
    while b - a > 1e-9:
        if fc < fd:
            b, d, fd = d, c, fc
            c = b - _GOLDEN * (b - a)
            fc = fa(c)
        else:
            a, c, fc = c, d, fd
            d = a + _GOLDEN * (b - a)
            fd = fa(d)
    h = (a + b) / 2.0
    y = abs(bus_admittance(model, q, h))
    undamped = model.r_src == 0 and model.r_load is None
    z_peak = math.inf if (y == 0 or undamped) else 1.0 / y
    z_sup = abs(complex(model.r_src, h * model.x_src))
    return Peak(q, h, "", h * model.f_hz, z_peak, z_sup, est)


@guarded
def scan_orders(h_lo: float = H_MIN, h_hi: float = H_MAX, step: float = 0.1) -> list[float]:
    """Harmonic orders from h_lo to h_hi inclusive at ``step`` orders (for plots and tables)."""
    n = max(1, int(round((h_hi - h_lo) / step)))
    return [h_lo + (h_hi - h_lo) * i / n for i in range(n + 1)]


@guarded
def scan(model: BusModel, steps: Sequence[float], h_lo: float = H_MIN, h_hi: float = H_MAX, step: float = 0.1) -> list[Peak]:
    """|Z| at the bus [Ω] against harmonic order for each cumulative step combination.

    Returns one :class:`Peak` per combination (steps 1, 1+2, …) with ``points`` =
    [(h, |Z| Ω)] at ``step`` orders, the exact peak inserted so plots show its height.
    """
    out = []
    hs = scan_orders(h_lo, h_hi, step)
    for q in cumulative_steps(steps):
        pk = find_peak(model, q, h_lo, h_hi)
        pts = [(h, abs(bus_impedance(model, q, h))) for h in hs]
        if pk.order is not None and math.isfinite(pk.z_peak):
            pts.append((pk.order, pk.z_peak))
            pts.sort()
        pk.points = pts
        out.append(pk)
    return out


@guarded
def supply_scan(model: BusModel, h_lo: float = H_MIN, h_hi: float = H_MAX, step: float = 0.1) -> list[tuple[float, float]]:
    """[(h, |Z| Ω)] of the bus with no capacitors in: the supply and the load alone."""
    return [(h, abs(bus_impedance(model, 0.0, h))) for h in scan_orders(h_lo, h_hi, step)]
