"""Inrush current when a capacitor step is switched in: alone, and back to back with other steps.

Every quantity is per phase of the equivalent wye: a three-phase step of Q [kvar] at V [V]
line-to-line and f [Hz] has C = Q/(ω·V²) [F] per phase (a delta of elements C_Δ = C/3 is the
same load seen from the lines). Inductances [H] are per phase (one conductor's run), currents
are line currents [A], peaks are instantaneous [A peak].

Method (IEEE Std 1036, application guide for shunt power capacitors, switching transients;
IEEE C37.012 gives the same expressions for circuit breakers; from memory): the worst case
closes at a voltage peak with the incoming step discharged; the current then rings at

    I_pk = V_LL·√(2/3)·√(C_eq/L_eq),   f = 1/(2π·√(L_eq·C_eq))

* energizing a step alone ("isolated"): C_eq = C of the step, L_eq = the source inductance
  (from the short-circuit power, L = V²/(ω·S_sc)) plus the step's own connection inductance;
* back to back (other steps already energized): C_eq = C₁C₂/(C₁+C₂) with C₁ the energized
  steps and C₂ the incoming one, L_eq = the incoming step's own inductance plus its partners'
  in parallel. The source is taken as far stiffer in inductance than the steps' connections
  (L_source ≫ L_eq), so the energized steps alone feed the inrush — the assumption of the
  IEEE 1036 expression; damping is neglected. Where the source is not much stiffer — a
  low-voltage bank beside its transformer, L_source ≈ 10 × L_eq — the source adds to the
  first peak: an ngspice transient in the tests shows the expression about 3 % low there.

A detuned step carries its own reactor in series (L = p·X_C/ω, see :mod:`pycore.detuning`),
which is hundreds of times the wiring's inductance: its inrush is small without any extra
device, and energized detuned steps feed an incoming one only through their reactors.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .detuning import design_branch
from .errors import InputError, guarded
from .references import ref

TWO_PI = 2.0 * math.pi
SQRT_2_3 = math.sqrt(2.0 / 3.0)

DEFAULT_UH_PER_M = 0.5
"""Inductance of a connection per metre of run [µH/m per phase]: a round figure for single-core
cables or panel busbars at the usual spacing (common practice, about 0.3–0.8 µH/m); measure or
calculate it for the real layout when the answer matters."""

CAPACITOR_INRUSH_MULTIPLE = 100.0
"""Peak inrush a capacitor tolerates, as a multiple of its rated rms current I_N [-]
(IEC 60831-1, from memory; makers may state their own limit, which governs)."""

SOURCE_INRUSH = ref("ieee1036_inrush")
SOURCE_LIMIT = ref("iec60831_inrush")


def _pos(v, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")
    return float(v)


def _nonneg(v, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v < 0:
        raise InputError(f"{what} must be zero or more.")
    return float(v)


@guarded
def wye_capacitance_f(q_kvar: float, v_ll: float, f_hz: float) -> float:
    """Capacitance per phase of the equivalent wye [F] of a three-phase step of q_kvar [kvar]
    at v_ll [V] line-to-line and f_hz [Hz]: C = Q/(2πf·V²). Circuit theory."""
    return _pos(q_kvar, "The step's kvar") * 1e3 / (TWO_PI * _pos(f_hz, "Frequency") * _pos(v_ll, "Voltage") ** 2)


@guarded
def source_inductance_h(v_ll: float, f_hz: float, s_sc_kva: float) -> float:
    """Source inductance per phase [H] behind a bus of short-circuit power s_sc_kva [kVA] at
    v_ll [V], f_hz [Hz]: L = V²/(2πf·S_sc) (per-unit short-circuit method, IEEE Std 141)."""
    return _pos(v_ll, "Voltage") ** 2 / (TWO_PI * _pos(f_hz, "Frequency") * _pos(s_sc_kva, "Short-circuit power") * 1e3)


@guarded
def connection_inductance_h(length_m: float, uh_per_m: float = DEFAULT_UH_PER_M) -> float:
    """Inductance per phase [H] of a run of length_m [m] at uh_per_m [µH/m]
    (default :data:`DEFAULT_UH_PER_M`, common practice)."""
    return _nonneg(length_m, "The length") * _pos(uh_per_m, "The inductance per metre") * 1e-6


@dataclass(frozen=True)
class StepCircuit:
    """One step as the inrush sees it: c_f [F] per phase (wye equivalent), l_h [H] per phase
    in series with it (connection, plus the reactor of a detuned step), reactor_h [H] the
    detuning reactor alone (0 when not detuned), i_rated_a [A] rated line current at the
    system voltage."""

    c_f: float
    l_h: float
    reactor_h: float
    i_rated_a: float


@guarded
def step_circuit(q_kvar: float, v_ll: float, f_hz: float, l_connection_h: float, p: float = 0.0) -> StepCircuit:
    """The :class:`StepCircuit` of a step delivering q_kvar [kvar] at v_ll [V], f_hz [Hz] with
    l_connection_h [H per phase] of wiring to the common bus, detuned with factor p [fraction,
    0 for a plain step]. Detuned: X_C = V²/(Q(1 − p)), L_r = p·X_C/ω (circuit theory, see
    :func:`pycore.detuning.design_branch`)."""
    _pos(q_kvar, "The step's kvar")
    _nonneg(l_connection_h, "The connection inductance")
    i_n = q_kvar * 1e3 / (math.sqrt(3.0) * _pos(v_ll, "Voltage"))
    if p:
        br = design_branch(v_ll, f_hz, q_kvar, p, v_ll)
        c = br.c_wye_uf * 1e-6
        lr = br.l_mh * 1e-3
        return StepCircuit(c, l_connection_h + lr, lr, i_n)
    return StepCircuit(wye_capacitance_f(q_kvar, v_ll, f_hz), l_connection_h, 0.0, i_n)


@dataclass(frozen=True)
class Inrush:
    """A ringing inrush: peak_a [A peak], freq_hz [Hz], c_eq_f [F], l_eq_h [H] (per phase)."""

    peak_a: float
    freq_hz: float
    c_eq_f: float
    l_eq_h: float


@guarded
def ringing(v_ll: float, c_eq_f: float, l_eq_h: float) -> Inrush:
    """Peak [A] and frequency [Hz] of the inrush through l_eq_h [H] into c_eq_f [F], closing at
    the peak of the phase voltage of a v_ll [V] system: I_pk = V_LL·√(2/3)·√(C_eq/L_eq),
    f = 1/(2π√(L_eq·C_eq)). IEEE Std 1036 (from memory)."""
    v = _pos(v_ll, "Voltage")
    c = _pos(c_eq_f, "The capacitance")
    if not (isinstance(l_eq_h, (int, float)) and math.isfinite(l_eq_h)) or l_eq_h <= 0:
        raise InputError("The inductance between the source and the step must be above zero: enter a length or an inductance.")
    return Inrush(_peak(v, c, l_eq_h), 1.0 / (TWO_PI * math.sqrt(l_eq_h * c)), c, float(l_eq_h))


def _peak(v_ll: float, c: float, l: float) -> float:
    # I_pk = V_LL·√(2/3)·√(C/L): the one place the expression is written (ringing and the reactor search)
    return v_ll * SQRT_2_3 * math.sqrt(c / l)


def _b2b(c_in: float, l_in: float, c_on: float, inv_l_on: float) -> tuple[float, float]:
    # C_eq = C₁C₂/(C₁+C₂) with C₁ = c_on the energized steps' sum; L_eq = L_incoming + their
    # inductances in parallel (inv_l_on = Σ 1/L, inf when one of them is 0)
    return c_on * c_in / (c_on + c_in), l_in + (1.0 / inv_l_on if inv_l_on != math.inf else 0.0)


def _inv_sum(ls) -> float:
    return math.inf if any(x <= 0 for x in ls) else sum(1.0 / x for x in ls)


@guarded
def isolated(step: StepCircuit, v_ll: float, l_source_h: float) -> Inrush:
    """Energizing ``step`` alone from a source of l_source_h [H per phase] at v_ll [V]:
    C_eq = C, L_eq = L_source + L_step. IEEE Std 1036 (from memory)."""
    return ringing(v_ll, step.c_f, _nonneg(l_source_h, "The source inductance") + step.l_h)


@guarded
def back_to_back(incoming: StepCircuit, energized: list, v_ll: float) -> Inrush:
    """Switching ``incoming`` with the steps ``energized`` (a list of :class:`StepCircuit`)
    already on the bus at v_ll [V]: C₁ = ΣC of the energized, C_eq = C₁C₂/(C₁+C₂),
    L_eq = L_incoming + (energized steps' inductances in parallel). IEEE Std 1036 (from memory)."""
    if not energized:
        raise InputError("Back-to-back switching needs at least one step already energized.")
    c_eq, l_eq = _b2b(incoming.c_f, incoming.l_h, sum(s.c_f for s in energized), _inv_sum([s.l_h for s in energized]))
    return ringing(v_ll, c_eq, l_eq)


@dataclass(frozen=True)
class StepInrush:
    """Inrush of one step: ``alone`` energizing it with no other step on (:class:`Inrush`;
    None when the source inductance is not known);
    ``back_to_back`` with every other step already on (None for a one-step bank);
    ``worst`` the larger peak [A]; ``limit_a`` the capacitor's permitted peak
    (:data:`CAPACITOR_INRUSH_MULTIPLE` × I_N) [A]; ``contactor_limit_a`` [A] or None;
    ``within`` worst ≤ every limit given."""

    alone: Inrush | None
    back_to_back: Inrush | None
    worst: float
    limit_a: float
    contactor_limit_a: float | None
    within: bool


@guarded
def bank_inrush(steps: list, v_ll: float, l_source_h: float, contactor_limit_a=None) -> list:
    """For each step of ``steps`` (:class:`StepCircuit`): inrush alone (from the source,
    l_source_h [H per phase]; None when unknown: then only back to back) and back to back with all other steps on (the worst case: C₁
    largest, parallel inductance least), against the capacitor's 100·I_N (IEC 60831-1, from
    memory) and the contactor's peak rating contactor_limit_a [A peak], if given.
    Returns a list of :class:`StepInrush`. IEEE Std 1036 (from memory)."""
    if not steps:
        raise InputError("Give at least one step.")
    if contactor_limit_a is not None:
        _pos(contactor_limit_a, "The contactor's peak current rating")
    out = []
    prev = found = None
    for k, st in enumerate(steps):
        # a step alike the one before it (same C, L, I_N) leaves the same others in the same order
        # (their sums are added alike), so it has the same inrush
        key = (st.c_f, st.l_h, st.i_rated_a)
        if key != prev:
            alone = isolated(st, v_ll, l_source_h) if l_source_h is not None else None
            others = [s for j, s in enumerate(steps) if j != k]
            b2b = back_to_back(st, others, v_ll) if others else None
            worst = max(alone.peak_a if alone else 0.0, b2b.peak_a if b2b else 0.0)
            lim = CAPACITOR_INRUSH_MULTIPLE * st.i_rated_a
            ok = worst <= lim * (1 + 1e-12) and (contactor_limit_a is None or worst <= contactor_limit_a * (1 + 1e-12))
            found = StepInrush(alone, b2b, worst, lim, contactor_limit_a, ok)
            prev = key
        out.append(found)
    return out


# relative width [1] at which the reactor search stops (the answer is shown to 3 figures)
BISECTION_RTOL = 1e-6


@guarded
def limiting_inductance_h(steps: list, v_ll: float, l_source_h: float, peak_limit_a: float | None = None) -> float:
    """Inductance [H per phase] to add in series with every step so that no step's inrush
    (alone or back to back, :func:`bank_inrush`) exceeds its own 100·I_N, nor peak_limit_a
    [A peak] (a contactor's rating) when given. 0 when none is needed. Found by bisection on the added inductance
    (the peaks fall monotonically as it grows). IEEE Std 1036 (from memory)."""
    if peak_limit_a is not None:
        _pos(peak_limit_a, "The peak current limit")

    res = bank_inrush(steps, v_ll, l_source_h)  # checks every value; raises as bank_inrush does
    limits = [r.limit_a if peak_limit_a is None else min(peak_limit_a, r.limit_a) for r in res]
    if max(r.worst / lim for r, lim in zip(res, limits)) <= 1.0:
        return 0.0
    v = float(v_ll)
    cs = [s.c_f for s in steps]
    l0 = [s.l_h for s in steps]
    c_all = sum(cs)
    n = len(steps)
    vs = v * SQRT_2_3  # _peak's first product
    # back to back, C_eq does not depend on the added inductance; steps alike (same C, L, limit) are checked once
    c_eq = [(c_all - cs[k]) * cs[k] / ((c_all - cs[k]) + cs[k]) for k in range(n)]
    alike: dict = {}
    for k in range(n):
        alike.setdefault((cs[k], l0[k], limits[k]), k)
    ks = list(alike.values())

    def exceeds(add: float) -> bool:
        # whether any step's peak with `add` in series with every step (add > 0) is above its limit: the
        # same peaks as bank_inrush (the expressions of _peak and _b2b written out), and the same
        # answer as max over the steps of peak/limit > 1; the search asks about 25 times
        ls = [x + add for x in l0]  # all above zero: add > 0
        inv = [1.0 / x for x in ls]
        inv_all = sum(inv)
        for k in ks:
            lim = limits[k]
            if l_source_h is not None and vs * math.sqrt(cs[k] / (l_source_h + ls[k])) / lim > 1.0:
                return True
            if n > 1 and vs * math.sqrt(c_eq[k] / (ls[k] + 1.0 / (inv_all - inv[k]))) / lim > 1.0:
                return True
        return False

    lo, hi = 0.0, 1e-6
    while exceeds(hi):
        lo, hi = hi, hi * 2.0
        if hi > 10.0:
            raise InputError("No practical reactor limits this inrush: check the step sizes and the limit.")
    while hi - lo > BISECTION_RTOL * hi:  # about 20 halvings: far finer than a reactor is wound
        mid = 0.5 * (lo + hi)
        if exceeds(mid):
            lo = mid
        else:
            hi = mid
    return hi
