"""The one resonance-screening rule for every worksheet.

Rule: a bank combination is flagged when, anywhere across the tolerance range of its
capacitance and of the transformer impedance, one of its resonances lands within a relative
band ±b around a harmonic order present on the bus:

    [h_min, h_max] ∩ [H·(1 − b), H·(1 + b)] ≠ ∅   for some harmonic H present.

Resonance orders are those of the lossless network (resistances and the resistive load left
out): the parallel resonances are the zeros of the bus susceptance
B(h) = −1/(h·X_ind) + Σ_plain h/X_C + Σ_detuned h/(X_C·(1 − p·h²)), X_ind the supply (upstream
plus transformer) in parallel with the motors' locked-rotor reactance; a detuned step also
has its series resonance at its tuning order 1/√p, screened by the same band. For a plain
bank this is h = √(S_sc/Q) (IEEE Std 1036); B(h) rises with h between its poles (Foster's
reactance theorem), so each resonance moves one way with each tolerance and the range is
found at the corners of the tolerance box.

Tolerances (defaults; the user may change them): capacitance 0 to +10 % (IEEE Std 18; IEC
60831-1 allows −5 to +10 %, from memory); transformer impedance ±7.5 % of nameplate (IEEE
C57.12.00, from memory). The band ±10 % of the harmonic order is our screening choice (common
practice keeps a resonance well clear of a harmonic present; it covers what the model leaves
out: load, cable and supply-strength uncertainty).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Optional, Sequence

from . import harmonicbus
from .errors import InputError, guarded

DEFAULT_BAND = 0.10
"""Relative band around each harmonic order present [fraction]: ±10 % (screening choice, see the module text)."""

CAP_TOLERANCE_IEEE18 = (0.0, 0.10)
"""Capacitance (kvar) tolerance, IEEE Std 18-2002: 0 to +10 % [fraction]."""
CAP_TOLERANCE_IEC = (-0.05, 0.10)
"""Capacitance tolerance, IEC 60831-1: −5 % to +10 % [fraction] (from memory)."""
TX_Z_TOLERANCE = (-0.075, 0.075)
"""Transformer impedance tolerance: ±7.5 % of nameplate [fraction] (IEEE C57.12.00, from memory)."""

H_SEARCH_MAX = 100.0
"""Highest order searched for a resonance [-]."""


@dataclass(frozen=True)
class Tolerances:
    """Tolerance box [fractions]: capacitance cap_lo..cap_hi, transformer impedance z_lo..z_hi."""

    cap_lo: float = CAP_TOLERANCE_IEEE18[0]
    cap_hi: float = CAP_TOLERANCE_IEEE18[1]
    z_lo: float = TX_Z_TOLERANCE[0]
    z_hi: float = TX_Z_TOLERANCE[1]


@dataclass
class ResonanceWarning:
    """One flagged combination: label, kvar in [kvar], kind 'parallel' or 'tuning', the
    resonance order at nominal values and its range across the tolerances [-], the harmonic it
    reaches, the nominal frequency [Hz], and the warning text with what to do."""

    label: str
    kvar: float
    kind: str
    order: float
    order_lo: float
    order_hi: float
    harmonic: int
    freq_hz: float
    text: str


def _check_tol(t: Tolerances) -> None:
    for name, lo, hi in (("capacitance", t.cap_lo, t.cap_hi), ("transformer impedance", t.z_lo, t.z_hi)):
        for v in (lo, hi):
            if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
                raise InputError(f"The {name} tolerance must be a finite number.")
        if lo > hi:
            raise InputError(f"The {name} tolerance: the lower end must not be above the upper end.")
        if lo <= -0.5 or hi >= 1.0:
            raise InputError(f"The {name} tolerance must lie between −50 % and +100 %.")


@guarded
def band_hits(h_lo: float, h_hi: float, harmonics: Sequence[int], band: float = DEFAULT_BAND) -> list:
    """The harmonic orders H of ``harmonics`` whose band [H(1 − b), H(1 + b)] meets the order
    range [h_lo, h_hi] [-]; b = ``band`` [fraction]. The rule itself, for any caller that has
    its own resonance range."""
    if not (0.0 <= band < 1.0):
        raise InputError("The band around each harmonic must be from 0 % to below 100 %.")
    return _hits(h_lo, h_hi, harmonics, band)


def _hits(h_lo, h_hi, harmonics, band):
    return [H for H in sorted(set(harmonics)) if h_lo <= H * (1 + band) and h_hi >= H * (1 - band)]


def _parts(bus: harmonicbus.Bus, steps_in, kc: float, kz: float):
    x_s = bus.x_up + bus.x_tx * kz
    a = 1.0 / x_s + (1.0 / bus.x_motor if bus.x_motor else 0.0)
    b_plain, det = 0.0, {}
    for k in steps_in:
        s = bus.steps[k]
        b = kc / s.x_c
        if s.p == 0.0:
            b_plain += b
        else:
            key = s.x_l / s.x_c * kc  # X_L fixed, X_C/kc: p grows with the capacitance
            det[key] = det.get(key, 0.0) + b
    return a, b_plain, det


def _zeros(a: float, b: float, det: dict) -> list:
    """Positive zeros of B(h) = −a/h + b·h + Σ c·h/(1 − q·h²) (the lossless bus susceptance)."""
    if not det:
        return [math.sqrt(a / b)] if b > 0 else []
    if len(det) == 1:
        ((q, c),) = det.items()
        if b == 0:
            return [1.0 / math.sqrt(c / a + q)]
        s = a * q + b + c
        root = math.sqrt(max(0.0, s * s - 4.0 * a * b * q))
        return [math.sqrt(2.0 * a / (s + root)), math.sqrt((s + root) / (2.0 * b * q))]

    def B(h):
        return -a / h + b * h + sum(c * h / (1.0 - q * h * h) for q, c in det.items())

    poles = sorted(1.0 / math.sqrt(q) for q in det)
    edges = [0.0] + poles + [H_SEARCH_MAX]
    out = []
    for lo, hi in zip(edges, edges[1:]):
        lo_, hi_ = lo + 1e-9 * (hi - lo) + 1e-12, hi - 1e-9 * (hi - lo)
        if hi_ <= lo_ or not (B(lo_) < 0 < B(hi_)):
            continue
        for _ in range(200):
            mid = 0.5 * (lo_ + hi_)
            if B(mid) < 0:
                lo_ = mid
            else:
                hi_ = mid
            if hi_ - lo_ <= 1e-13 * hi_:
                break
        out.append(0.5 * (lo_ + hi_))
    return out


@guarded
def resonance_orders(bus: harmonicbus.Bus, steps_in: Sequence[int], cap_factor: float = 1.0,
                     z_factor: float = 1.0) -> list:
    """Parallel-resonance orders [-] of the lossless bus with ``steps_in`` switched in, ascending,
    with the capacitance times cap_factor and the transformer impedance times z_factor."""
    if not (cap_factor > 0 and z_factor > 0):
        raise InputError("Tolerance factors must be above zero.")
    return _orders(bus, harmonicbus._indices(bus, steps_in), cap_factor, z_factor)


def _orders(bus, steps_in, kc=1.0, kz=1.0):
    if not steps_in:
        return []
    a, b, det = _parts(bus, steps_in, kc, kz)
    return [h for h in _zeros(a, b, det) if h <= H_SEARCH_MAX]


@guarded
def tuning_orders(bus: harmonicbus.Bus, steps_in: Sequence[int], cap_factor: float = 1.0) -> list:
    """Series-resonance (tuning) orders 1/√(p·cap_factor) [-] of the detuned steps in, ascending, distinct."""
    if not (cap_factor > 0):
        raise InputError("Tolerance factors must be above zero.")
    return _tuning(bus, harmonicbus._indices(bus, steps_in), cap_factor)


def _tuning(bus, steps_in, kc=1.0):
    return sorted({1.0 / math.sqrt(bus.steps[k].x_l / bus.steps[k].x_c * kc) for k in steps_in
                   if bus.steps[k].p > 0})


def _th(h: int) -> str:
    return "th" if 10 <= h % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(h % 10, "th")


def _pct(v: float) -> str:
    return "0 %" if v == 0 else f"{v * 100:+.3g} %".replace("-", "\u2212")


@guarded
def screen(bus: harmonicbus.Bus, combos: Sequence, harmonics: Sequence[int], tolerances: Tolerances = Tolerances(),
           band: float = DEFAULT_BAND) -> list:
    """Apply the rule to each combination ``(label, steps_in)`` of the bus's steps against the
    harmonic orders present. Returns [:class:`ResonanceWarning`] (empty: nothing flagged)."""
    _check_tol(tolerances)
    if not (0.0 <= band < 1.0):
        raise InputError("The band around each harmonic must be from 0 % to below 100 %.")
    combos = [(str(label), harmonicbus._indices(bus, steps_in)) for label, steps_in in combos]
    harmonics = [h for h in harmonics if isinstance(h, (int, float)) and not isinstance(h, bool) and h >= 1]
    return _screen(bus, combos, harmonics, tolerances, band)


def _screen(bus, combos, harmonics, tolerances, band):
    t = tolerances
    corners = [(1 + c, 1 + z) for c in (t.cap_lo, t.cap_hi) for z in (t.z_lo, t.z_hi)]
    harm = sorted({int(h) for h in harmonics})
    lowest = harm[0] if harm else 5
    # the supply side of B(h) depends on the impedance factor only, the capacitors' side on the
    # capacitance factor and the steps in: each worked once per screen and per combination
    a_of = {kz: _parts(bus, (), 1.0, kz)[0] for kz in (1.0, 1 + t.z_lo, 1 + t.z_hi)}
    kcs = tuple(dict.fromkeys((1.0, 1 + t.cap_lo, 1 + t.cap_hi)))  # a tolerance end of 0 is the nominal
    box = (f"with capacitance {_pct(t.cap_lo)} to {_pct(t.cap_hi)} and transformer impedance "
           f"{_pct(t.z_lo)} to {_pct(t.z_hi)}")
    out = []
    for label, steps_in in combos:
        steps_in = list(steps_in)
        if not steps_in:
            continue
        q = sum(bus.steps[k].q_kvar for k in steps_in)
        caps = {kc: _parts(bus, steps_in, kc, 1.0)[1:] for kc in kcs}
        nominal = [h for h in _zeros(a_of[1.0], *caps[1.0]) if h <= H_SEARCH_MAX]
        at = [[h for h in _zeros(a_of[kz], *caps[kc]) if h <= H_SEARCH_MAX] for kc, kz in corners]
        ranges = []
        for i, h0 in enumerate(nominal):
            vals = [h0] + [r[i] for r in at if len(r) > i]
            ranges.append(("parallel", h0, min(vals), max(vals)))
        if any(bus.steps[k].p > 0 for k in steps_in):
            tun0 = _tuning(bus, steps_in)
            tun = [_tuning(bus, steps_in, 1 + c) for c in (t.cap_lo, t.cap_hi)]
        else:  # no detuned step in: no tuning order
            tun0, tun = [], [[], []]
        for i, n0 in enumerate(tun0):
            vals = [n0] + [r[i] for r in tun if len(r) > i]
            ranges.append(("tuning", n0, min(vals), max(vals)))
        plain = any(bus.steps[k].p == 0 for k in steps_in)
        for kind, h0, lo, hi in ranges:
            for H in _hits(lo, hi, harm, band):
                where = (f"resonates at order {h0:.2f} ({h0 * bus.f_hz:.0f} Hz)" if kind == "parallel"
                         else f"has a detuned branch tuned to order {h0:.2f} ({h0 * bus.f_hz:.0f} Hz)")
                span = f"{box} it lies between {lo:.2f} and {hi:.2f}"
                if kind == "tuning":
                    todo = (f"the branch will absorb the {H}{_th(H)} harmonic from the whole network and overload: "
                            "use a higher detuning factor (a lower tuning order)")
                elif plain:
                    todo = (f"detune the bank (reactors of 5.67 %, 7 % or 14 % tuned below the {lowest}{_th(lowest)} "
                            "harmonic) or change the step sizes, and check the harmonic voltages and duties in a study")
                else:
                    todo = (f"choose a higher detuning factor so the resonance falls below the {H}{_th(H)} "
                            "(14 % where a 3rd harmonic is present)")
                text = (f"With {label} in ({q:.4g} kvar) the bus {where}; {span}, which reaches the "
                        f"{H}{_th(H)} harmonic (±{band * 100:.3g} % band). To do: {todo}.")
                out.append(ResonanceWarning(label, q, kind, h0, lo, hi, H, h0 * bus.f_hz, text))
    return out


@guarded
def screen_bank(v_ll_v: float, f_hz: float, tx_kva: float, tx_z_percent: float, combos: Sequence,
                harmonics: Sequence[int], upstream_fault_kva: Optional[float] = None, motor_kva: Optional[float] = None,
                lr_ratio: float = harmonicbus.LOCKED_ROTOR_RATIO_DEFAULT, tolerances: Tolerances = Tolerances(),
                band: float = DEFAULT_BAND) -> list:
    """The rule for worksheets that hold steps as kvar: combos = [(label, [(q_kvar, p), ...])],
    each step's kvar delivered at v_ll_v [V] and p its detuning factor [fraction, 0 plain];
    transformer tx_kva [kVA], tx_z_percent [%]; upstream_fault_kva [kVA] (None: infinite bus);
    running motors motor_kva [kVA] with lr_ratio [-]; harmonics the orders present. Returns
    [:class:`ResonanceWarning`], as :func:`screen`."""
    steps, mapped = [], []
    for label, items in combos:
        idx = []
        for q, p in items:
            idx.append(len(steps))
            steps.append(harmonicbus.Step(q, p))
        mapped.append((label, idx))
    bus = harmonicbus.build_bus(v_ll_v, f_hz, tx_kva, tx_z_percent, None, upstream_fault_kva, None, None,
                                motor_kva, lr_ratio, steps)
    return screen(bus, mapped, harmonics, tolerances, band)
