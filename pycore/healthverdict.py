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

import math
from dataclasses import dataclass

from .bankhealth import IEC_RATIO_LIMIT, OPEN_FRACTION, Band, between_from_delta, between_from_wye, element_voltages
from .errors import InputError, guarded

SQRT3 = math.sqrt(3.0)

STATES = ("tolerance", "drifted", "replace")

DEFAULT_METER_ACCURACY_PERCENT = 2.0
"""± % of reading assumed for a capacitance meter when none is entered (upper end of the 1–2 %
typical of such meters, common practice)."""

REPLACE_LOSS_PERCENT = 10.0
"""Loss of capacitance [% of rated] beyond which a low-voltage unit is replaced when the maker
gives no limit (common practice; makers quote 5–10 %, their figure governs)."""

SOURCE_REPLACE_PRACTICE = (f"Common practice: replace a unit that has lost more than {REPLACE_LOSS_PERCENT:g} % "
                           "of its capacitance (makers quote 5–10 %; the maker's limit governs)")
SOURCE_RATIO = ("IEC 60831-1: ratio of largest to smallest capacitance measured between the line terminals "
                f"of a three-phase unit ≤ {IEC_RATIO_LIMIT} (from memory)")

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
                  maker_replace_percent: float | None = None) -> PhaseVerdict:
    """Verdict on one phase read at percent_of_expected [%] (100·measured/expected) against
    the factory ``band`` (:class:`pycore.bankhealth.Band`), with the meter's accuracy
    meter_accuracy_percent [± % of reading] and the maker's replacement limit
    maker_replace_percent [% deviation, e.g. −5] when known (else
    :data:`REPLACE_LOSS_PERCENT`, common practice). Order of criteria: open; the maker's (or
    common practice's) replacement limit, surely passed; the band widened by the meter's
    accuracy; otherwise drifted."""
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
        limit, crit = float(maker_replace_percent), f"Maker's replacement limit {maker_replace_percent:+g} %"
    else:
        limit, crit = -REPLACE_LOSS_PERCENT, SOURCE_REPLACE_PRACTICE
    dev = pct - 100.0
    u = acc * pct / 100.0
    if pct < 100.0 * OPEN_FRACTION:
        return PhaseVerdict("replace", "open", dev, u, f"Reads below {100 * OPEN_FRACTION:g} % of expected: open")
    if dev + u < limit:
        return PhaseVerdict("replace", "low", dev, u, f"{crit}; passed by more than the meter's ±{acc:g} %")
    if band.lo - u <= dev <= band.hi + u:
        return PhaseVerdict("tolerance", "", dev, u, f"{band.source}; widened by the meter's ±{acc:g} %")
    direction = "low" if dev < band.lo else "high"
    return PhaseVerdict("drifted", direction, dev, u,
                        f"Outside {band.label} by more than the meter's ±{acc:g} %, not surely past the replacement limit "
                        f"({crit})" if direction == "low" else
                        f"Above {band.label} by more than the meter's ±{acc:g} %: check the nameplate, the connection and the "
                        "measurement before anything else")


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
    (:data:`pycore.bankhealth.IEC_RATIO_LIMIT`); passes (ratio ≤ limit); readings [F]; source."""

    ratio: float
    limit: float
    passes: bool
    readings: tuple
    source: str


@guarded
def terminal_ratio(c_phase, connection: str) -> RatioCheck:
    """The IEC 60831-1 imbalance ratio (from memory) applied to the quantity it is defined on: the
    capacitance between line terminals, here from per-phase capacitances c_phase [F]."""
    m = terminal_readings(c_phase, connection)
    return ratio_of_readings(m)


@guarded
def ratio_of_readings(readings) -> RatioCheck:
    """The IEC 60831-1 ratio (from memory) of three between-terminal readings [F] as measured."""
    m = tuple(float(x) for x in readings)
    if len(m) != 3 or not all(math.isfinite(x) and x > 0 for x in m):
        raise InputError("Enter three between-terminal readings above zero.")
    r = max(m) / min(m)
    return RatioCheck(r, IEC_RATIO_LIMIT, r <= IEC_RATIO_LIMIT * (1 + 1e-12), m, SOURCE_RATIO)


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
