"""Health of an installed three-phase capacitor bank from field measurements.

Turns what an electrician measures — capacitance between terminals, capacitance of each
phase, or line currents at a measured voltage — into per-phase capacitances, compares them
with what the nameplate promises, and gives the kvar the bank really delivers.

Naming: terminals L1, L2, L3. In a delta the three elements are "12" (between L1 and L2),
"23" and "31"; in a wye they are "1", "2", "3" (terminal to star point). Lists of three
values are always in that order. Capacitances in F, voltages line-to-line in V, currents
in A, frequencies in Hz, powers in kvar unless a name says otherwise.

Connections: ``"delta"``; ``"wye"`` (star point floating, the usual ungrounded wye);
``"wye_n"`` (star point tied to the supply neutral or earth, so each phase sees V/√3 even
when the phases differ).

References: circuit theory — X_C = 1/(2πfC), Q = V²·2πfC per element, series/parallel
capacitance, the Y–Δ transformation (C. K. Alexander and M. N. O. Sadiku, *Fundamentals of
Electric Circuits*, chapters on capacitors, Y–Δ transformations and three-phase circuits).
Tolerance bands and the per-phase verdict on them: :mod:`pycore.capbands` (re-exported here).
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass

from .capacitor import capacitance_uf, element_voltage, line_current, output_at
from .errors import InputError, guarded
from .capbands import BANDS, MEANINGS, OPEN_FRACTION, VERDICT_WORDS, Band, custom_band, verdict  # noqa: F401  re-exported

SQRT3 = math.sqrt(3.0)
TWO_PI = 2.0 * math.pi
CONNECTIONS = ("delta", "wye", "wye_n")
PHASE_NAMES = {"delta": ("L1–L2", "L2–L3", "L3–L1"), "wye": ("L1", "L2", "L3"), "wye_n": ("L1", "L2", "L3")}
TERMINAL_PAIRS = ("L1–L2", "L2–L3", "L3–L1")

# A computed per-phase elastance (1/C of the equivalent star) may come out slightly negative
# from meter error when one delta element is open; within this fraction of the mean
# measured elastance it is read as exactly zero (an open element), beyond it the readings
# cannot come from any capacitor network and are refused.
OPEN_SLACK = 0.03


# IEC 60831-1: ratio of largest to smallest capacitance between any two line terminals of a
# three-phase unit (from memory; maker datasheets quote the same 1.08).
IEC_RATIO_LIMIT = 1.08

# Plausibility of the entries (this app's screening choices, common practice):
ABSURD_RATIO = 2.5  # a reading this many times the expected value is an entry error, not a measurement
SYSTEM_VOLTAGE_RATIO = (0.2, 2.0)  # system or measured voltage ÷ rated outside this: V typed for kV or the like
MEASURED_VOLTAGE_RATIO = (0.5, 1.5)  # a bank is not run in service outside this ratio of its rated voltage
PHASE_NEUTRAL_SLACK = 0.04  # within 4 % of rated ÷ √3: a phase-to-neutral voltage typed for line-to-line
# Per-phase readings of a delta that all lie in this band (× expected) are between-terminal readings
# (a healthy delta reads 1.5 × the per-phase value between two terminals, the third floating).
DELTA_BETWEEN_AS_PHASE = (1.4, 1.6)
# Per-phase readings of a wye that all lie in this band are those of a delta (a third of a wye's).
WYE_READ_AS_DELTA = (0.25, 0.40)


_OUT_OF_RANGE = "The readings are far outside any usable range: check the units (F, mF, µF, nF)."


def _check_connection(connection: str) -> None:
    if connection not in CONNECTIONS:
        raise InputError("Connection must be delta, wye, or wye with the star point connected.")


def _pos(v: float, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v <= 0:
        raise InputError(f"{what} must be above zero.")
    return float(v)


def _three(values, what: str) -> tuple[float, float, float]:
    vals = list(values)
    if len(vals) != 3:
        raise InputError(f"Enter three {what}, one per phase.")
    return tuple(_pos(v, what.rstrip("s").capitalize()) for v in vals)  # type: ignore[return-value]


def _nonneg_three(values) -> tuple[float, float, float]:
    vals = [float(v) for v in values]
    if len(vals) != 3 or not all(math.isfinite(v) and v >= 0.0 for v in vals) or sum(vals) <= 0.0:
        raise InputError("Enter three capacitances, zero or above, not all zero.")
    return tuple(vals)  # type: ignore[return-value]


def _wye_like(connection: str) -> str:
    return "delta" if connection == "delta" else "wye"


# --------------------------------------------------------------------------- expected values


@dataclass(frozen=True)
class Expected:
    """What a healthy bank's nameplate promises, per phase element.

    c_phase [F] capacitance of each element; v_element [V] voltage across it at rated
    voltage; i_element [A] current in each element; i_line [A] line current;
    q_phase [kvar] output of each element; c_between [F] the reading a capacitance meter
    gives between two line terminals with the third floating (1.5·C for a delta, 0.5·C for
    a wye)."""

    c_phase: float
    v_element: float
    i_element: float
    i_line: float
    q_phase: float
    c_between: float


@guarded
def expected(q_rated_kvar: float, v_rated: float, f_rated: float, connection: str) -> Expected:
    """Expected per-phase values of a healthy three-phase bank from its nameplate.

    q_rated_kvar [kvar] total rated output at v_rated [V] line-to-line and f_rated [Hz].
    Delta: C = Q/(3·2πf·V²), element current Q/(3V), line current Q/(√3·V). Wye: C =
    Q/(2πf·V²), element and line current Q/(√3·V). Circuit theory (Q = V²·2πfC per element).
    Returns :class:`Expected` (F, V, A, kvar)."""
    _check_connection(connection)
    _pos(q_rated_kvar, "Rated output")
    _pos(v_rated, "Rated voltage")
    _pos(f_rated, "Rated frequency")
    conn = _wye_like(connection)
    c = capacitance_uf(q_rated_kvar, v_rated, f_rated, conn) * 1e-6
    v_el = element_voltage(v_rated, conn)
    i_line = line_current(q_rated_kvar, v_rated)
    i_el = i_line / SQRT3 if conn == "delta" else i_line
    c_between = 1.5 * c if conn == "delta" else 0.5 * c
    return Expected(c, v_el, i_el, i_line, q_rated_kvar / 3.0, c_between)


@guarded
def rated_output_at(q_rated_kvar: float, v_rated: float, f_rated: float, v: float, f: float) -> float:
    """Nameplate output [kvar] re-rated to the system voltage v [V] and frequency f [Hz]:
    Q = Q_r·(V/V_r)²·(f/f_r) (circuit theory; X_C = 1/(2πfC))."""
    return output_at(q_rated_kvar, v, v_rated, f, f_rated)


# ------------------------------------------------------------------ between-terminal readings


@guarded
def between_from_delta(c12: float, c23: float, c31: float) -> tuple[float, float, float]:
    """Readings [F] of a capacitance meter between L1–L2, L2–L3, L3–L1 of a delta of
    elements c12, c23, c31 [F], the third terminal floating each time.

    Between L1 and L2 the meter sees c12 in parallel with c23 and c31 in series:
    M12 = c12 + c23·c31/(c23 + c31), and so on round the delta (series/parallel
    capacitance, circuit theory)."""
    c12, c23, c31 = _three((c12, c23, c31), "capacitances")
    return (
        c12 + c23 * c31 / (c23 + c31),
        c23 + c31 * c12 / (c31 + c12),
        c31 + c12 * c23 / (c12 + c23),
    )


@guarded
def between_from_wye(c1: float, c2: float, c3: float) -> tuple[float, float, float]:
    """Readings [F] between L1–L2, L2–L3, L3–L1 of a wye of c1, c2, c3 [F] (star point not
    reached by the meter): two phases in series, M12 = c1·c2/(c1 + c2). Circuit theory."""
    c1, c2, c3 = _three((c1, c2, c3), "capacitances")
    return (c1 * c2 / (c1 + c2), c2 * c3 / (c2 + c3), c3 * c1 / (c3 + c1))


def _star_elastances(m12: float, m23: float, m31: float) -> tuple[list[float], float]:
    """Elastances [1/F] of the star equivalent seen from the terminals, S1, S2, S3, from the
    three between-terminal readings: in a star the meter sees S1 + S2 between L1 and L2, so
    S1 = (s12 + s31 − s23)/2 etc. with s = 1/M. Values within OPEN_SLACK of zero become 0."""
    m12, m23, m31 = _three((m12, m23, m31), "capacitance readings")
    s12, s23, s31 = 1.0 / m12, 1.0 / m23, 1.0 / m31
    star = [(s12 + s31 - s23) / 2.0, (s12 + s23 - s31) / 2.0, (s23 + s31 - s12) / 2.0]
    scale = (s12 + s23 + s31) / 3.0
    if not all(math.isfinite(x) for x in star + [scale]):
        raise InputError(_OUT_OF_RANGE)
    if min(star) < -OPEN_SLACK * scale:
        raise InputError(
            "These three readings cannot come from any set of capacitors: one reading is too low "
            "for the other two (1/C between any pair must not exceed the sum of 1/C for the other "
            "two pairs). Check the readings and that nothing else was connected during the test."
        )
    return [max(0.0, s) for s in star], scale


@guarded
def delta_from_between(m12: float, m23: float, m31: float) -> tuple[float, float, float]:
    """Element capacitances c12, c23, c31 [F] of a delta from readings M12, M23, M31 [F]
    taken between L1–L2, L2–L3, L3–L1 with the third terminal floating.

    Exact inverse of :func:`between_from_delta`. Work in elastances (1/C), which add in
    series like impedances: the meter sees the delta as its equivalent star, so the star's
    elastances follow linearly from the readings (see :func:`_star_elastances`); the Y–Δ
    transformation then gives the delta: with N = S1·S2 + S2·S3 + S3·S1, the element
    between L1 and L2 has elastance N/S3, i.e. c12 = S3/N, c23 = S1/N, c31 = S2/N.
    Circuit theory (Alexander & Sadiku, Y–Δ transformation; for capacitors the elastance
    plays the part of impedance). A star elastance that is zero within meter error means
    the opposite delta element is open (c = 0). Raises InputError for readings no delta of
    capacitors can give."""
    (S1, S2, S3), _ = _star_elastances(m12, m23, m31)
    n = S1 * S2 + S2 * S3 + S3 * S1
    if not math.isfinite(n):
        raise InputError(_OUT_OF_RANGE)
    if n <= 0.0:
        raise InputError("The readings show two open elements: the delta cannot be resolved; measure each element on its own.")
    return (S3 / n, S1 / n, S2 / n)


@guarded
def wye_from_between(m12: float, m23: float, m31: float) -> tuple[float, float, float]:
    """Phase capacitances c1, c2, c3 [F] of a wye from readings M12, M23, M31 [F] between
    L1–L2, L2–L3, L3–L1 (star point not reached): c_k = 1/S_k with the star elastances of
    :func:`_star_elastances`. Exact inverse of :func:`between_from_wye` (circuit theory).
    Raises InputError when a phase would be a short circuit or the readings are impossible."""
    star, _ = _star_elastances(m12, m23, m31)
    if min(star) <= 0.0:
        raise InputError(
            "These readings imply a phase with no capacitance in series, i.e. a short circuit "
            "between a terminal and the star point; check the readings or measure each phase on its own."
        )
    c = tuple(1.0 / s for s in star)
    if not all(math.isfinite(x) for x in c):
        raise InputError(_OUT_OF_RANGE)
    return c  # type: ignore[return-value]


@guarded
def per_phase_from_between(readings, connection: str) -> tuple[float, float, float]:
    """Per-phase capacitances [F] from three between-terminal readings [F] (L1–L2, L2–L3,
    L3–L1, third terminal floating) for a ``delta`` or a wye (``wye``/``wye_n``) bank.
    See :func:`delta_from_between` and :func:`wye_from_between`."""
    _check_connection(connection)
    m = _three(readings, "capacitance readings")
    return delta_from_between(*m) if connection == "delta" else wye_from_between(*m)


# ------------------------------------------------------------------------------ line currents


def _supply(v_line: float) -> tuple[complex, complex, complex]:
    """Balanced positive-sequence phase-to-neutral voltages [V] for a line voltage [V]."""
    vp = v_line / SQRT3
    return (cmath.rect(vp, 0.0), cmath.rect(vp, -2.0 * math.pi / 3.0), cmath.rect(vp, 2.0 * math.pi / 3.0))


@guarded
def element_voltages(c_phase, v_line: float, f: float, connection: str) -> tuple[complex, complex, complex]:
    """Voltage phasors [V] across each element of a bank with per-phase capacitances
    c_phase [F] on a balanced supply of v_line [V] at f [Hz]. In a floating wye the star
    point moves to V_N = ΣC_k·V_k/ΣC_k when the phases differ (nodal analysis, circuit
    theory); in a delta each element sees a line voltage; in ``wye_n`` the phase voltage."""
    _check_connection(connection)
    c = _nonneg_three(c_phase)
    if connection == "wye" and min(c) <= 0.0:
        raise InputError("A floating wye with an open phase has no defined star point voltage.")
    _pos(v_line, "Voltage")
    _pos(f, "Frequency")
    va, vb, vc = _supply(v_line)
    if connection == "delta":
        return (va - vb, vb - vc, vc - va)
    if connection == "wye_n":
        return (va, vb, vc)
    vn = (c[0] * va + c[1] * vb + c[2] * vc) / (c[0] + c[1] + c[2])
    return (va - vn, vb - vn, vc - vn)


@guarded
def line_currents(c_phase, v_line: float, f: float, connection: str) -> tuple[complex, complex, complex]:
    """Line current phasors [A] into L1, L2, L3 of a bank with per-phase capacitances c_phase
    [F] (delta elements may be 0 for an open element) on a balanced positive-sequence supply
    of v_line [V] at f [Hz]. Element current jωC·V; delta line current I1 = I12 − I31 (KCL).
    Circuit theory; the forward model behind :func:`per_phase_from_currents`."""
    w = TWO_PI * _pos(f, "Frequency")
    vs = element_voltages(c_phase, v_line, f, connection)
    i_el = [1j * w * float(c) * v for c, v in zip(c_phase, vs)]
    if connection == "delta":
        return (i_el[0] - i_el[2], i_el[1] - i_el[0], i_el[2] - i_el[1])
    return tuple(i_el)  # type: ignore[return-value]


def _heron_area(a: float, b: float, c: float) -> float:
    """Area of a triangle with sides a, b, c (Kahan's stable form of Heron's formula);
    negative product (no such triangle) returns -1."""
    a, b, c = sorted((a, b, c), reverse=True)
    p = (a + (b + c)) * (c - (a - b)) * (c + (a - b)) * (a + (b - c))
    if p < 0.0:
        return -1.0
    return 0.25 * math.sqrt(p)


@guarded
def delta_element_currents(i1: float, i2: float, i3: float) -> tuple[float, float, float]:
    """Element current magnitudes y12, y23, y31 [A] of a capacitor delta from its line
    current magnitudes i1, i2, i3 [A] on a balanced supply.

    The element currents of a capacitor delta sit 120° apart, so |I1|² = y12² + y31² +
    y12·y31 and likewise round the delta: the line currents are the sides of a triangle
    and the y's are the distances from its Fermat point (where each side subtends 120°) to
    the corners. With s2 = y12·y23 + y23·y31 + y31·y12 = 4·Area/√3 and
    T = y12 + y23 + y31 = √((Σi² + 3·s2)/2), each element current is y = T − (i² + s2)/T
    where i is the line current not fed by that element (y23 from i1, y31 from i2, y12
    from i3). Circuit theory with elementary geometry; exact, no iteration. Returns an
    element as 0 (open) when it is zero within meter error; raises InputError for currents
    no capacitor delta on a balanced supply can draw."""
    i1, i2, i3 = _three((i1, i2, i3), "line currents")
    area = _heron_area(i1, i2, i3)
    if area < 0.0:
        raise InputError(
            "One line current is larger than the other two together: no capacitor bank on a "
            "balanced supply draws these currents. Check the readings and the clamp positions."
        )
    s2 = 4.0 * area / SQRT3
    t = math.sqrt((i1 * i1 + i2 * i2 + i3 * i3 + 3.0 * s2) / 2.0)
    if not (t > 0.0 and math.isfinite(t)):
        raise InputError("The line currents are too small or too large to work with.")
    y23 = t - (i1 * i1 + s2) / t
    y31 = t - (i2 * i2 + s2) / t
    y12 = t - (i3 * i3 + s2) / t
    ys = [y12, y23, y31]
    if min(ys) < -OPEN_SLACK * t / 3.0:
        raise InputError(
            "These line currents are too unequal for a capacitor delta on a balanced supply "
            "(one is more than an open element could explain). Check the readings, the clamp "
            "positions and whether other loads share the cables."
        )
    k = ys.index(min(ys))
    if ys[k] <= 1e-9 * t:
        # One element open: each of the other two elements then feeds one line on its own.
        # Element 23 open: |I2| = y12, |I3| = y31; element 31 open: |I1| = y12, |I3| = y23;
        # element 12 open: |I1| = y31, |I2| = y23.
        if k == 1:
            ys = [i2, 0.0, i3]
        elif k == 2:
            ys = [i1, i3, 0.0]
        else:
            ys = [0.0, i2, i1]
    return tuple(ys)  # type: ignore[return-value]


@guarded
def delta_to_wye_capacitance(c12: float, c23: float, c31: float) -> tuple[float, float, float]:
    """Star equivalent c1, c2, c3 [F] of a capacitor delta [F]: capacitances behave as
    admittances, so c1 = (c12·c23 + c23·c31 + c31·c12)/c23 etc. (Y–Δ transformation,
    circuit theory). Raises InputError when an element is zero (no finite equivalent)."""
    n = c12 * c23 + c23 * c31 + c31 * c12
    if min(c12, c23, c31) <= 0.0:
        raise InputError("An open delta element has no finite star equivalent.")
    return (n / c23, n / c31, n / c12)


@guarded
def per_phase_from_currents(currents, v_line: float, f: float, connection: str) -> tuple[float, float, float]:
    """Per-phase capacitances [F] of a bank from its three line current magnitudes [A],
    measured at a line voltage v_line [V] and frequency f [Hz], supply assumed balanced.

    ``wye_n``: C_k = I_k/(2πf·V/√3). ``delta``: element currents from
    :func:`delta_element_currents`, C = y/(2πf·V). ``wye`` (floating star point): a floating
    wye draws the same line currents as its delta equivalent, so solve the delta and convert
    with :func:`delta_to_wye_capacitance`. Circuit theory."""
    _check_connection(connection)
    i = _three(currents, "line currents")
    _pos(v_line, "Voltage")
    w = TWO_PI * _pos(f, "Frequency")
    if connection == "wye_n":
        return tuple(ik / (w * v_line / SQRT3) for ik in i)  # type: ignore[return-value]
    y = delta_element_currents(*i)
    c_delta = tuple(yk / (w * v_line) for yk in y)
    if connection == "delta":
        return c_delta  # type: ignore[return-value]
    if min(c_delta) <= 0.0:
        raise InputError(
            "With a floating star point these currents mean one phase is open and the other two "
            "are in series; they cannot be told apart from line currents: measure their capacitance."
        )
    return delta_to_wye_capacitance(*c_delta)


# ------------------------------------------------------------------------ output and balance


@guarded
def phase_kvar(c_phase, v_line: float, f: float, connection: str) -> tuple[float, float, float]:
    """Output [kvar] of each element of a bank with per-phase capacitances c_phase [F] on a
    balanced supply of v_line [V] at f [Hz]: Q = 2πf·C·|V_element|², with the element
    voltages of :func:`element_voltages` (the star point of a floating wye shifts when the
    phases differ). Circuit theory."""
    w = TWO_PI * _pos(f, "Frequency")
    vs = element_voltages(c_phase, v_line, f, connection)
    return tuple(w * c * abs(v) ** 2 / 1000.0 for c, v in zip(c_phase, vs))  # type: ignore[return-value]


@guarded
def imbalance_percent(values) -> float:
    """Largest deviation from the mean as a percentage of the mean [%] (the same definition
    NEMA MG 1 uses for voltage unbalance, applied here to capacitance; common practice)."""
    vals = [float(v) for v in values]
    if not vals:
        raise InputError("Enter at least one value.")
    mean = sum(vals) / len(vals)
    if mean <= 0:
        raise InputError("The mean of the values must be above zero.")
    return 100.0 * max(abs(v - mean) for v in vals) / mean


@guarded
def max_min_ratio(values) -> float:
    """Ratio of largest to smallest value (dimensionless); infinite when one is zero.
    IEC 60831-1 limits it to 1.08 for the capacitance between the line terminals of a
    three-phase unit (from memory)."""
    vals = [float(v) for v in values]
    if not vals:
        raise InputError("Enter at least one value.")
    lo = min(vals)
    return math.inf if lo <= 0 else max(vals) / lo
