"""Harmonic study of a stepped capacitor bank: every step combination on the bus model of
:mod:`pycore.harmonicbus`, with the harmonic voltages, each step's duty against IEEE Std 18 or
IEC 60831-1, the IEEE Std 519-2014 checks and the resonance screen; the worst combination
first; and, when a plain bank amplifies, detuned alternatives studied the same way.

Method: V_h = I_h·Z_bus(h) for each combination (Dugan et al., *Electrical Power Systems
Quality*, harmonics chapters); capacitor duty V_rms = √ΣV_h², V_peak = ΣV_h, I_rms = √ΣI_h²,
Q = ΣV_h·I_h in per unit of rating (IEEE Std 18 / IEEE Std 1036, from memory); IEEE Std
519-2014 Tables 1 and 2 at the bus taken as the point of common coupling.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional

from . import capduty, harmonicbus, harmonicsources, ieee519, resonancescreen
from .detuning import TUNING_CLEARANCE, TYPICAL_DETUNING_PERCENT, choose_rated_voltage
from .errors import InputError, guarded

MAX_STEPS = 8
"""Most steps studied (2^8 = 256 combinations)."""

AMPLIFY_FACTOR = 1.5
"""A bank 'amplifies' when some combination raises |Z_bus| at a harmonic present above this many
times its value with the bank out (screening choice), or fails a check, or is flagged by the
resonance screen; then detuned options are studied."""

LOWEST_LEVEL_FRACTION = 0.05
"""A harmonic counts as present for choosing a detuning factor when its current is at least 5 %
of the largest harmonic current (screening choice: a trace of an even harmonic does not decide)."""


@dataclass
class StepDuty:
    """Duty of one step in one combination: % of rating (v_rms, v_peak, i_rms, kvar), the
    profile rows [(name, value %, limit %, status)], status 'ok'/'short'/'fail', worst value/limit
    ratio [-], rms current i_rms_a [A] (through the reactor too, for a detuned step) and the
    fundamental current i1_a [A]."""

    step: int
    v_rms: float
    v_peak: float
    i_rms: float
    kvar: float
    rows: list
    status: str
    ratio: float
    i_rms_a: float
    i1_a: float


@dataclass
class Combo:
    """One step combination: steps_in (indices from 0), label, kvar in [kvar], lossless resonance
    orders [-], v_pct {h: V_h [% of phase voltage]}, thd_v [%], duties [:class:`StepDuty`],
    check519 (:class:`pycore.ieee519.Check519`), warnings (resonance screen), amplification
    max |Z|/|Z bank out| at the harmonics present [-], severity = largest value/limit of any
    check [-] (above 1: something fails)."""

    steps_in: tuple
    label: str
    kvar: float
    resonances: list
    v_pct: dict
    thd_v: float
    duties: list
    check519: ieee519.Check519
    warnings: list
    amplification: float
    severity: float

    @property
    def worst_duty(self) -> Optional[StepDuty]:
        return max(self.duties, key=lambda d: d.ratio) if self.duties else None


@dataclass
class Study:
    """A study: the bus, the injections {h: I_h [A]}, the profile id, I_L [A], I_SC/I_L [-], the
    combinations worst first (the bank-out state is ``bank_out``), and the harmonic orders
    screened."""

    bus: harmonicbus.Bus
    injection: dict
    profile: str
    i_load_a: float
    isc_il: float
    combos: list
    bank_out: Combo
    harmonics: tuple
    tolerances: resonancescreen.Tolerances = field(default_factory=resonancescreen.Tolerances)
    band: float = resonancescreen.DEFAULT_BAND

    @property
    def amplifies(self) -> bool:
        """True when some combination is flagged, fails a check or amplifies (see AMPLIFY_FACTOR)."""
        return any(c.warnings or c.severity > 1.0 or c.amplification > AMPLIFY_FACTOR for c in self.combos)


@guarded
def combo_label(steps_in) -> str:
    """'steps 1+3+4' style label (steps numbered from 1) for indices from 0."""
    if not steps_in:
        return "bank out"
    return ("step " if len(steps_in) == 1 else "steps ") + "+".join(str(k + 1) for k in steps_in)


@guarded
def run_study(bus: harmonicbus.Bus, injection: dict, i_load_a: float, profile: str = "ieee18",
              tolerances: resonancescreen.Tolerances = resonancescreen.Tolerances(),
              band: float = resonancescreen.DEFAULT_BAND) -> Study:
    """Study every combination of the bus's steps (2^n, n ≤ 8) for harmonic current injections
    {h (2–50): I_h [A]} with maximum demand current i_load_a [A] at the bus, duty profile
    'ieee18' or 'iec60831'. Returns a :class:`Study`, combinations sorted worst first."""
    n = len(bus.steps)
    if n > MAX_STEPS:
        raise InputError(f"At most {MAX_STEPS} steps can be studied together.")
    inj = {h: abs(i) for h, i in harmonicsources.check_orders(injection, False).items()}
    if not (i_load_a > 0) or not math.isfinite(i_load_a):
        raise InputError("The maximum demand current must be above zero.")
    if profile not in capduty.DUTY_PROFILES:
        raise InputError("Choose IEEE Std 18 or IEC 60831-1 as the duty profile.")
    resonancescreen.band_hits(1.0, 1.0, (), band)  # checks the band
    resonancescreen.screen(bus, [], (), tolerances, band)  # checks the tolerances
    orders = sorted(inj)
    isc_il = bus.i_sc_a / i_load_a
    v_ind, v_thd, _ = capduty.ieee519_voltage_limits(bus.v_ll)
    _, tdd_lim, _ = ieee519.current_limits(isc_il)
    i_lim = [ieee519.individual_current_limit(h, isc_il) for h in orders]
    _, limits, short, _ = capduty.DUTY_PROFILES[profile]
    y_base = [harmonicbus.base_admittance(bus, h) for h in orders]
    y_sup = [1.0 / harmonicbus.supply_impedance(bus, h) for h in orders]
    y_st = [[1.0 / s.impedance(h) for h in orders] for s in bus.steps]
    i_fund = [abs(bus.v_phase / s.impedance(1.0)) for s in bus.steps]
    vbase = [s.u_rated_v / harmonicbus.SQRT3 for s in bus.steps]
    i_rated = [harmonicbus.rated_current_a(bus, k) for k in range(n)]
    coef_v = [[s.x_c / h / vb for h in orders] for s, vb in zip(bus.steps, [s.u_rated_v / harmonicbus.SQRT3 for s in bus.steps])]
    z_out = [1.0 / y for y in y_base]
    ys = {0: y_base}
    harm = harmonicsources.screening_orders(inj)
    combos = []
    for mask in range(1 << n):
        if mask:
            low = mask & -mask
            k = low.bit_length() - 1
            prev = ys[mask ^ low]
            ys[mask] = [a + b for a, b in zip(prev, y_st[k])]
        y = ys[mask]
        steps_in = tuple(k for k in range(n) if mask >> k & 1)
        v = [inj[h] / yy for h, yy in zip(orders, y)]
        v_pct = {h: 100.0 * abs(vh) / bus.v_phase for h, vh in zip(orders, v)}
        amp = max((abs(zo * yy) ** -1 if yy != 0 else math.inf for zo, yy in zip(z_out, y)), default=1.0)
        i_sup = [100.0 * abs(vh * ysu) / i_load_a for vh, ysu in zip(v, y_sup)]
        thd = math.sqrt(sum(x * x for x in v_pct.values()))
        vw_h = max(v_pct, key=v_pct.get) if v_pct else 0
        tdd = math.sqrt(sum(x * x for x in i_sup))
        ratios = [x / lim for x, lim in zip(i_sup, i_lim)]
        iw = max(range(len(ratios)), key=ratios.__getitem__) if ratios else None
        tol = 1 + 1e-12
        c519 = ieee519.Check519(thd, v_pct.get(vw_h, 0.0), int(vw_h), v_ind, v_thd, tdd, tdd_lim,
                                ratios[iw] if iw is not None else 0.0, orders[iw] if iw is not None else 0,
                                thd <= v_thd * tol and v_pct.get(vw_h, 0.0) <= v_ind * tol,
                                tdd <= tdd_lim * tol and (ratios[iw] if iw is not None else 0.0) <= tol)
        sev = [thd / v_thd, v_pct.get(vw_h, 0.0) / v_ind, tdd / tdd_lim, c519.i_worst_ratio]
        duties = []
        for k in steps_in:
            s = bus.steps[k]
            cur = [abs(vh * ysk) for vh, ysk in zip(v, y_st[k])]
            cv = coef_v[k]  # V_C,h [pu] per ampere of branch current: X_C/(h·U_R/√3)
            ir = i_rated[k]
            v_pu = [c * w for c, w in zip(cur, cv)]
            v1, i1 = i_fund[k] * s.x_c / vbase[k], i_fund[k] / ir
            i_sq = sum(c * c for c in cur)
            vals = {"v_rms": 100.0 * math.sqrt(v1 * v1 + sum(x * x for x in v_pu)), "v_peak": 100.0 * (v1 + sum(v_pu)),
                    "i_rms": 100.0 * math.sqrt(i1 * i1 + i_sq / (ir * ir)),
                    "kvar": 100.0 * (v1 * i1 + sum(x * c for x, c in zip(v_pu, cur)) / ir)}
            rows = []
            for name in ("v_rms", "v_peak", "i_rms", "kvar"):
                if name in limits:
                    val, lim = vals[name], limits[name]
                    st = "ok" if val <= lim * tol else (
                        "short" if name == "v_rms" and short is not None and val <= short[0] * tol else "fail")
                    rows.append((name, val, lim, st))
            status = "fail" if any(r[3] == "fail" for r in rows) else ("short" if any(r[3] == "short" for r in rows)
                                                                       else "ok")
            ratio = max((r[1] / r[2] for r in rows), default=0.0)
            i_a = math.sqrt(i_fund[k] ** 2 + i_sq)
            duties.append(StepDuty(k, vals["v_rms"], vals["v_peak"], vals["i_rms"], vals["kvar"], rows, status, ratio,
                                   i_a, i_fund[k]))
            sev.append(ratio)
        label = combo_label(steps_in)
        warns = resonancescreen._screen(bus, [(label, steps_in)], harm, tolerances, band) if steps_in else []
        combos.append(Combo(steps_in, label, sum(bus.steps[k].q_kvar for k in steps_in),
                            resonancescreen._orders(bus, steps_in), v_pct, thd, duties, c519, warns,
                            amp if mask else 1.0, max(sev)))
    bank_out = combos[0]
    ranked = sorted(combos[1:], key=lambda c: (c.severity <= 1.0, not c.warnings, -c.severity, -c.thd_v))
    return Study(bus, inj, profile, i_load_a, isc_il, ranked, bank_out, harm, tolerances, band)


@guarded
def lowest_harmonic(injection: dict) -> Optional[int]:
    """Lowest order whose current is at least LOWEST_LEVEL_FRACTION of the largest one, or None."""
    if not injection:
        return None
    top = max(abs(i) for i in injection.values())
    if not top > 0:
        return None
    return min(h for h, i in injection.items() if abs(i) >= LOWEST_LEVEL_FRACTION * top)


@guarded
def fitting_factors(lowest: int, factors=TYPICAL_DETUNING_PERCENT) -> list:
    """The usual detuning factors [%] whose tuning order 1/√p sits at least TUNING_CLEARANCE
    below the lowest harmonic present [-] (common practice)."""
    return [pc for pc in factors if 1.0 / math.sqrt(pc / 100.0) <= lowest * (1.0 - TUNING_CLEARANCE)]


@dataclass
class Option:
    """A bank design studied: label, p [%] (0 plain), the study, and per step what to order:
    [(delivered kvar at the system voltage, capacitor rated voltage [V], capacitor rated kvar
    [kvar], reactor inductance per phase [mH] or None, highest reactor rms current over all
    combinations [A] or None)]."""

    label: str
    p_percent: float
    study: Study
    order: list


def _order_list(st: Study) -> list:
    bus = st.bus
    w = 2 * math.pi * bus.f_hz
    rows = []
    for k, s in enumerate(bus.steps):
        i_max = max((d.i_rms_a for c in st.combos for d in c.duties if d.step == k), default=0.0)
        rows.append((s.q_kvar, s.u_rated_v, s.q_rated_kvar, s.x_l / w * 1e3 if s.p > 0 else None,
                     i_max if s.p > 0 else None))
    return rows


@guarded
def recommend(study: Study) -> list:
    """The design as entered and, when it amplifies and has plain steps, each usual detuning
    factor that fits below the lowest harmonic present, re-studied with every step detuned for
    the same delivered kvar, the capacitor's rated voltage the next usual rating above
    U/(1 − p) with a 10 % margin and its rated kvar Q·(1 − p)·(U_R/U)² (circuit theory; see
    :mod:`pycore.detuning`). Returns [:class:`Option`], the entered design first."""
    bus = study.bus
    out = [Option("as entered", 0.0, study, _order_list(study))]
    if not study.amplifies or all(s.p > 0 for s in bus.steps):
        return out
    low = lowest_harmonic(study.injection)
    for pc in fitting_factors(low) if low else []:
        p = pc / 100.0
        steps = [harmonicbus.Step(s.q_kvar, p, choose_rated_voltage(bus.v_ll / (1 - p))) for s in bus.steps]
        st = run_study(harmonicbus.with_steps(bus, steps), study.injection, study.i_load_a, study.profile,
                       study.tolerances, study.band)
        out.append(Option(f"detuned {pc:g} %", pc, st, _order_list(st)))
    return out


@guarded
def demo_six_step() -> Study:
    """A six-step study (64 combinations, orders 2–50, duty and IEEE 519 checks) on an invented
    480 V, 60 Hz plant with six-pulse drives: the case the benchmark times as study_64_ms."""
    steps = [harmonicbus.Step(q, p) for q, p in ((50, 0), (50, 0), (100, 0), (100, 0.07), (100, 0.07), (100, 0))]
    bus = harmonicbus.build_bus(480, 60, 1500, 5.75, 6.0, 250e3, None, 300, 400, 6.0, steps)
    inj = harmonicsources.combine([
        harmonicsources.typical_injection("six_pulse_choke", 400, 480),
        harmonicsources.typical_injection("six_pulse_ideal", 100, 480),
        {h: 2.0 for h in range(2, 51)},  # invented background: 2 A at every order, so all 49 orders count
    ])
    return run_study(bus, inj, 2000.0)


TUNED_ONTO = 0.02
"""A detuned step whose tuning order 1/√p lies within ±2 % of a harmonic present is a filter tuned
on it, not a detuned step: it would draw that harmonic from the whole network (screening choice)."""


@guarded
def tuned_onto(p: float, harmonics) -> Optional[int]:
    """The harmonic order present that a detuning factor p [fraction] tunes onto (within ±TUNED_ONTO
    of 1/√p), or None."""
    if not (0.0 < p < 1.0):
        return None
    n = 1.0 / math.sqrt(p)
    hits = [h for h in harmonics if h > 0 and abs(n / h - 1.0) <= TUNED_ONTO]
    return min(hits, key=lambda h: abs(n - h)) if hits else None
