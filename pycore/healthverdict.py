"""Verdicts on an installed bank's phases that allow for the meter, and the checks each source defines.

Three states per phase (:data:`STATES`):

* ``tolerance`` — within the factory tolerance band (IEEE Std 18 or IEC 60831-1, see
  :data:`pycore.bankhealth.BANDS`) once the meter's accuracy is allowed for: a reading that
  could be inside the band given the meter is not condemned;
* ``drifted`` — outside the band by more than the meter's accuracy, but not surely past the
  replacement limit: watch it and measure again (at the same temperature, with the same meter);
* ``replace`` — surely past the replacement limit even at the meter's most favourable error,
  or open. The replacement limit is the maker's, when given; otherwise common practice
  (:data:`REPLACE_LOSS_PERCENT` of capacitance lost).

The meter's accuracy is ± a percentage of the reading (capacitance meters are typically within
1–2 %, common practice). Deviations are in percent of the expected value ("points").

The IEC 60831-1 ratio (largest ÷ smallest, 1.08, from memory) is defined on the capacitance
measured *between line terminals* of a three-phase unit, so :func:`terminal_ratio` applies it
to those readings (measured, or computed from the elements), not to the elements themselves.

A floating wye whose phases differ shifts its star point; :func:`star_point` gives the shift
and the voltage on each phase's units, in percent of the nominal phase voltage.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from .bankhealth import (IEC_RATIO_LIMIT, OPEN_FRACTION, Band, between_from_delta, between_from_wye, element_voltages,
                         per_phase_from_between, per_phase_from_currents)
from .errors import InputError, guarded
from .references import ref

SQRT3 = math.sqrt(3.0)

STATES = ("tolerance", "drifted", "replace")

DEFAULT_METER_ACCURACY_PERCENT = 2.0
"""± % of reading assumed for a capacitance meter when none is entered (upper end of the 1–2 %
typical of such meters, common practice)."""

DERIVED_ACCURACY_MAX = 50.0
"""Above this ± % the error carried into a derived phase value says nothing (a phase near open):
use the meter's own figure instead (this app's choice)."""

REPLACE_LOSS_PERCENT = 10.0
"""Loss of capacitance [% of rated] beyond which a low-voltage unit is replaced when the maker
gives no limit (common practice; makers quote 5–10 %, their figure governs)."""

SOURCE_REPLACE_PRACTICE = ref("practice_replace")
SOURCE_RATIO = ref("iec60831_ratio")

STATE_WORDS = {
    "tolerance": "Within the factory tolerance",
    "drifted": "Drifted — watch and measure again",
    "replace": "Replace the unit",
}


@dataclass(frozen=True)
class PhaseVerdict:
    """state (one of :data:`STATES`); direction 'low', 'high', 'open' or '' (inside);
    deviation [%] = measured/expected·100 − 100; uncertainty [points] the meter's ± on it;
    criterion: the rule that decided, named with its source."""

    state: str
    direction: str
    deviation: float
    uncertainty: float
    criterion: str


@guarded
def phase_verdict(percent_of_expected: float, band: Band,
                  meter_accuracy_percent: float = DEFAULT_METER_ACCURACY_PERCENT,
                  maker_replace_percent: float | None = None,
                  derived_accuracy_percent: float | None = None) -> PhaseVerdict:
    """Verdict on one phase read at percent_of_expected [%] (100·measured/expected) against
    the factory ``band`` (:class:`pycore.bankhealth.Band`), with the meter's accuracy
    meter_accuracy_percent [± % of reading] and the maker's replacement limit
    maker_replace_percent [% deviation, e.g. −5] when known (else
    :data:`REPLACE_LOSS_PERCENT`, common practice). When the phase value was derived from
    several readings, derived_accuracy_percent [± % of the value] from
    :func:`uncertainty_between` or :func:`uncertainty_currents` replaces the meter's own
    figure. Order of criteria: open; the maker's (or common practice's) replacement limit,
    surely passed; the band widened by the accuracy; otherwise drifted."""
    pct = percent_of_expected
    if not (isinstance(pct, (int, float)) and math.isfinite(pct)) or pct < 0:
        raise InputError("The reading must be a number, zero or more.")
    acc = meter_accuracy_percent
    if not (isinstance(acc, (int, float)) and math.isfinite(acc)) or not 0 <= acc < 50:
        raise InputError("The meter's accuracy must be 0 % or more and below 50 %.")
    if maker_replace_percent is not None:
        if not (isinstance(maker_replace_percent, (int, float)) and math.isfinite(maker_replace_percent)) \
                or not -100 < maker_replace_percent < 0:
            raise InputError("The maker's replacement limit is a loss: between −100 % and 0 %, e.g. −5.")
        limit, crit = float(maker_replace_percent), f"Maker's (or your own) replacement limit {maker_replace_percent:+g} %".replace("-", "−")
    else:
        limit, crit = -REPLACE_LOSS_PERCENT, f"Replacement limit −{REPLACE_LOSS_PERCENT:g} % ({SOURCE_REPLACE_PRACTICE})"
    how = f"the meter's ±{acc:g} %"
    if derived_accuracy_percent is not None:
        d = derived_accuracy_percent
        if not (isinstance(d, (int, float)) and math.isfinite(d)) or not 0 <= d < 100:
            raise InputError("The accuracy of the derived value must be 0 % or more and below 100 %.")
        how = f"±{d:.2g} % (the meter's ±{acc:g} % carried through the calculation)"
        acc = d
    dev = pct - 100.0
    u = acc * pct / 100.0
    if pct < 100.0 * OPEN_FRACTION:
        return PhaseVerdict("replace", "open", dev, u, f"Reads below {100 * OPEN_FRACTION:g} % of expected: open")
    if dev + u < limit:
        return PhaseVerdict("replace", "low", dev, u, f"{crit}; passed by more than {how}")
    if band.lo - u <= dev <= band.hi + u:
        return PhaseVerdict("tolerance", "", dev, u, f"{band.source}; widened by {how}")
    direction = "low" if dev < band.lo else "high"
    return PhaseVerdict("drifted", direction, dev, u,
                        f"Outside {band.label} by more than {how}, not surely past the replacement limit "
                        f"({crit})" if direction == "low" else
                        f"Above {band.label} by more than {how}: check the nameplate, the connection and the "
                        "measurement before anything else")


def _corners(fn, values, acc_each) -> tuple:
    """Largest relative change [%] of each output of fn(values) when each input moves by its
    own ± acc_each [%] independently: the worst of the 2ⁿ corners of the error box (to first
    order the extreme of a smooth function over a box lies at a corner; worst-case error
    propagation)."""
    base = fn(values)
    worst = [0.0] * len(base)
    for signs in itertools.product((-1.0, 1.0), repeat=len(values)):
        moved = fn([v * (1.0 + s * a / 100.0) for v, s, a in zip(values, signs, acc_each)])
        for k, (b, m) in enumerate(zip(base, moved)):
            if b > 0:
                worst[k] = max(worst[k], 100.0 * abs(m / b - 1.0))
    return tuple(worst)


def _acc(a, what: str) -> float:
    if not (isinstance(a, (int, float)) and math.isfinite(a)) or not 0 <= a < 20:
        raise InputError(f"{what} must be 0 % or more and below 20 %.")
    return float(a)


@guarded
def uncertainty_between(readings, connection: str, meter_accuracy_percent: float = DEFAULT_METER_ACCURACY_PERCENT) -> tuple:
    """± % [of each value] of the per-phase capacitances derived from three between-terminal
    readings [F] (:func:`pycore.bankhealth.per_phase_from_between`) when each reading is
    within ± meter_accuracy_percent [%] on its own: the errors add up in the solution (about
    2.3 × for a delta, 3.1 × for a wye of equal phases). Worst-case propagation."""
    m = [float(x) for x in readings]
    if len(m) != 3:
        raise InputError("Enter three capacitance readings.")
    a = _acc(meter_accuracy_percent, "The meter's accuracy")
    return _corners(lambda v: per_phase_from_between(v, connection), m, [a, a, a])


@guarded
def uncertainty_currents(currents, v_line: float, f_hz: float, connection: str,
                         current_accuracy_percent: float = DEFAULT_METER_ACCURACY_PERCENT,
                         voltage_accuracy_percent: float = 1.0) -> tuple:
    """± % [of each value] of the per-phase capacitances derived from three line currents [A]
    at v_line [V], f_hz [Hz] (:func:`pycore.bankhealth.per_phase_from_currents`), each current
    within ± current_accuracy_percent [%] and the voltage within ± voltage_accuracy_percent [%].
    Worst-case propagation."""
    i = [float(x) for x in currents]
    if len(i) != 3:
        raise InputError("Enter three line currents.")
    ai = _acc(current_accuracy_percent, "The current meter's accuracy")
    av = _acc(voltage_accuracy_percent, "The voltage meter's accuracy")
    return _corners(lambda x: per_phase_from_currents(x[:3], x[3], f_hz, connection), i + [float(v_line)], [ai, ai, ai, av])


@guarded
def bank_state(verdicts) -> str:
    """The worst state among phase verdicts (:class:`PhaseVerdict`): replace > drifted > tolerance."""
    vs = list(verdicts)
    if not vs:
        raise InputError("No phase verdicts given.")
    return max((v.state for v in vs), key=STATES.index)


@guarded
def terminal_readings(c_phase, connection: str) -> tuple[float, float, float]:
    """The between-terminal capacitances [F] (L1–L2, L2–L3, L3–L1, third terminal floating) of
    a bank with per-phase capacitances c_phase [F], ``connection`` 'delta', 'wye' or 'wye_n'
    (series/parallel capacitance, see :mod:`pycore.bankhealth`)."""
    c = tuple(c_phase)
    if len(c) != 3:
        raise InputError("Enter three capacitances, one per phase.")
    if connection == "delta":
        return between_from_delta(*c)
    if connection in ("wye", "wye_n"):
        return between_from_wye(*c)
    raise InputError("Connection must be delta, wye, or wye with the star point connected.")


@dataclass(frozen=True)
class RatioCheck:
    """ratio [-] of the largest to the smallest between-terminal capacitance; limit
    (:data:`pycore.bankhealth.IEC_RATIO_LIMIT`); passes (ratio ≤ limit); readings [F]; source;
    sure: the verdict holds at either end of the meter's error (ratio × or ÷ (1+a)/(1−a))."""

    ratio: float
    limit: float
    passes: bool
    readings: tuple
    source: str
    sure: bool = True


@guarded
def terminal_ratio(c_phase, connection: str, meter_accuracy_percent: float = 0.0) -> RatioCheck:
    """The IEC 60831-1 imbalance ratio (from memory) applied to the quantity it is defined on: the
    capacitance between line terminals, here from per-phase capacitances c_phase [F]; the
    meter's accuracy [± %] as in :func:`ratio_of_readings`."""
    m = terminal_readings(c_phase, connection)
    return ratio_of_readings(m, meter_accuracy_percent)


@guarded
def ratio_of_readings(readings, meter_accuracy_percent: float = 0.0) -> RatioCheck:
    """The IEC 60831-1 ratio (from memory) of three between-terminal readings [F] as measured,
    with each reading within ± meter_accuracy_percent [%]: the true ratio lies within
    ratio·((1−a)/(1+a)) … ratio·((1+a)/(1−a)); ``sure`` when the limit is outside that span."""
    m = tuple(float(x) for x in readings)
    if len(m) != 3 or not all(math.isfinite(x) and x > 0 for x in m):
        raise InputError("Enter three between-terminal readings above zero.")
    a = _acc(meter_accuracy_percent, "The meter's accuracy") / 100.0
    r = max(m) / min(m)
    lim = IEC_RATIO_LIMIT * (1 + 1e-12)
    k = (1 + a) / (1 - a)
    ok = r <= lim
    return RatioCheck(r, IEC_RATIO_LIMIT, ok, m, SOURCE_RATIO, (r * k <= lim) if ok else (r / k > lim))


@dataclass(frozen=True)
class StarShift:
    """Floating-wye star point: shift_v [V] from the supply's neutral; shift_percent [% of the
    nominal phase voltage V/√3]; element_v [V] on each phase's units; element_percent [% of
    V/√3]; highest_percent [%] the largest of them."""

    shift_v: float
    shift_percent: float
    element_v: tuple
    element_percent: tuple
    highest_percent: float


@guarded
def star_point(c_phase, v_line: float, f_hz: float) -> StarShift:
    """Star-point shift and each phase's voltage for a floating wye of per-phase capacitances
    c_phase [F] on a balanced v_line [V], f_hz [Hz] supply: V_N = ΣC_k·V_k/ΣC_k (nodal
    analysis, circuit theory; :func:`pycore.bankhealth.element_voltages`). The phase with the
    least capacitance sees the highest voltage."""
    ev = element_voltages(c_phase, v_line, f_hz, "wye")
    vph = v_line / SQRT3
    # V_k − V_N with V_1 = V_ph at angle 0: the shift is V_1 − (V_1 − V_N)
    vn = vph - ev[0]
    mags = tuple(abs(v) for v in ev)
    pcts = tuple(100.0 * m / vph for m in mags)
    return StarShift(abs(vn), 100.0 * abs(vn) / vph, mags, pcts, max(pcts))
