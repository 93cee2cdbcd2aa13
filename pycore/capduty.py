"""Capacitor duty with harmonics, against the IEEE Std 18 continuous limits, and bus
voltage distortion against IEEE Std 519.

Everything is in per unit of the capacitor's rating (rated rms voltage, the current and kvar
that rated voltage gives at rated frequency), as IEEE Std 1036 sets out the check (from
memory): with V_h the capacitor voltage at harmonic order h,
    V_rms = √ΣV_h²,  V_peak = ΣV_h (harmonics in phase, the worst case),
    I_rms = √Σ(k·h·V_h)²,  Q = Σ V_h·I_h = k·Σ h·V_h²,
where k = f_system/f_rated. The fundamental is order 1.

A capacitor behind a series reactor (detuning factor p) sees V_C,h = V_bus,h/|1 − p·h²|
(voltage divider of the branch; circuit theory); p = 0 is a plain bank on the bus.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded
from .references import ref

IEEE18_EDITION = ref("ieee18")

IEEE18_LIMITS_PERCENT = {
    "v_rms": 110.0,
    "v_peak": 120.0,
    "i_rms": 135.0,
    "kvar": 135.0,
}
"""Continuous limits of a shunt power capacitor, % of rated: rms voltage 110 %, peak voltage
120 % of √2·rated rms (harmonics included, transients excluded), rms current 135 % of the
current at rated kvar and voltage, reactive power 135 % of rated kvar. IEEE Std 18-2002
(the 1992 edition allowed 180 % current — from memory)."""

BUS_TO_RATED_VOLTAGE_MAX = 3.0
"""A capacitor whose bus voltage is more than this factor above or below its rated voltage is
not a capacitor duty to check but a unit typed wrong (V for kV) or a capacitor that does not
belong on that bus (common practice: units run within about ±10 % of rating)."""


def voltage_ratio_plausible(u_bus_v: float, u_rated_v: float) -> bool:
    """True when the bus voltage [V] lies within :data:`BUS_TO_RATED_VOLTAGE_MAX` of the
    capacitor's rated voltage [V] either way (same basis: both line-to-line). Common practice."""
    return u_rated_v / BUS_TO_RATED_VOLTAGE_MAX <= u_bus_v <= BUS_TO_RATED_VOLTAGE_MAX * u_rated_v


LEVEL_MAX_PERCENT = 100.0
"""A harmonic level above the fundamental is not a spectrum a meter shows at a capacitor bus."""

HARMONIC_ORDER_MIN = 2
HARMONIC_ORDER_MAX = 50
"""Orders accepted in a spectrum; IEEE Std 519-2014 sums THD up to the 50th."""

IEEE519_VOLTAGE_LIMITS = (
    # (upper bus voltage [V], individual harmonic [%], THD [%], band label)
    (1_000.0, 5.0, 8.0, "V ≤ 1 kV"),
    (69_000.0, 3.0, 5.0, "1 kV < V ≤ 69 kV"),
    (161_000.0, 1.5, 2.5, "69 kV < V ≤ 161 kV"),
    (math.inf, 1.0, 1.5, "V > 161 kV"),
)
"""IEEE Std 519-2014 Table 1, voltage distortion limits at the point of common coupling
(≤ 1 kV row and THD column seen in the published table; the individual limits above 1 kV
from memory)."""


@guarded
def ieee519_voltage_limits(u_bus_v: float) -> tuple[float, float, str]:
    """(individual harmonic limit [%], THD limit [%], voltage band) for a bus of u_bus_v [V]
    line-to-line, from IEEE Std 519-2014 Table 1."""
    if not (u_bus_v > 0):
        raise InputError("The bus voltage must be above zero.")
    for top, ind, thd, label in IEEE519_VOLTAGE_LIMITS:
        if u_bus_v <= top:
            return ind, thd, label
    raise AssertionError("unreachable")  # pragma: no cover


@guarded
def thd_percent(spectrum_percent: dict[int, float]) -> float:
    """Total harmonic distortion [%] = √Σ(V_h/V_1)² over the harmonic orders given, each
    entered as % of the fundamental (IEEE Std 519-2014 definition)."""
    return math.sqrt(sum(v * v for v in spectrum_percent.values()))


@guarded
def check_spectrum(spectrum_percent: dict[int, float]) -> None:
    """Raise InputError unless every order is a whole number from 2 to 50 and every value
    is from 0 to 100 % of the fundamental."""
    if not spectrum_percent:
        raise InputError("Enter at least one harmonic order and its level.")
    for h, v in spectrum_percent.items():
        if h != int(h) or not (HARMONIC_ORDER_MIN <= h <= HARMONIC_ORDER_MAX):
            raise InputError(f"Harmonic order {h}: use whole numbers from {HARMONIC_ORDER_MIN} to {HARMONIC_ORDER_MAX}.")
        if not (0.0 <= v <= 100.0) or not math.isfinite(v):
            raise InputError(f"Harmonic {h}: the level must be from 0 to 100 % of the fundamental.")


@dataclass
class Duty:
    """Capacitor duty in % of its rating, with the voltage components behind it."""

    v_cap_pu: dict  # {order: capacitor voltage [pu of rated rms voltage]}, order 1 included
    v_bus_percent: dict  # {order ≥ 2: bus voltage [% of bus fundamental]}
    v_rms_percent: float  # rms voltage [% of rated]
    v_peak_percent: float  # peak voltage [% of √2 × rated rms]
    i_rms_percent: float  # rms current [% of rated current]
    kvar_percent: float  # reactive power [% of rated kvar]
    bus_thd_percent: float  # bus voltage THD [%]

    def against_limits(self, limits: dict | None = None) -> list[tuple[str, float, float, float, bool]]:
        """[(name, value %, limit %, margin in points of rating = limit − value, passes)] for
        v_rms, v_peak, i_rms and kvar against IEEE Std 18 (or ``limits``). At the limit passes."""
        lim = IEEE18_LIMITS_PERCENT if limits is None else limits
        rows = []
        for name, val in (("v_rms", self.v_rms_percent), ("v_peak", self.v_peak_percent),
                          ("i_rms", self.i_rms_percent), ("kvar", self.kvar_percent)):
            margin = lim[name] - val
            rows.append((name, val, lim[name], margin, margin >= -1e-9 * lim[name]))
        return rows


@guarded
def duty_from_capacitor_voltages(v_pu: dict, f_ratio: float = 1.0) -> tuple[float, float, float, float]:
    """(V_rms, V_peak, I_rms, Q) in per unit of rating from capacitor voltages v_pu
    {order h: V_h [pu of rated rms voltage]} with f_ratio = f_system/f_rated [-]:
    √ΣV_h², ΣV_h, √Σ(f_ratio·h·V_h)², f_ratio·Σh·V_h² (IEEE Std 1036 / IEEE Std 18 method, from memory)."""
    if f_ratio <= 0:
        raise InputError("The frequency ratio must be above zero.")
    v_rms = math.sqrt(sum(v * v for v in v_pu.values()))
    v_peak = sum(abs(v) for v in v_pu.values())
    i_rms = math.sqrt(sum((f_ratio * h * v) ** 2 for h, v in v_pu.items()))
    q = sum(f_ratio * h * v * v for h, v in v_pu.items())
    return v_rms, v_peak, i_rms, q


@guarded
def capacitor_duty(
    u_rated_v: float,
    u_bus_v: float,
    spectrum_percent: dict[int, float],
    kind: str = "voltage",
    p: float = 0.0,
    f_ratio: float = 1.0,
) -> Duty:
    """Capacitor duty with harmonics.

    u_rated_v: capacitor rated voltage [V]; u_bus_v: fundamental bus voltage [V] (same
    line-to-line or line-to-neutral basis as the rating); spectrum_percent: {order 2–50:
    level [% of fundamental]}; kind: 'voltage' (bus voltage spectrum) or 'current'
    (capacitor current spectrum); p: series-reactor detuning factor [fraction, 0 for a plain
    bank]; f_ratio: f_system/f_rated [-].

    Voltage spectrum: V_C,h = V_bus,h/|1 − p·h²|. Current spectrum: I_h = level·I_1 with
    I_1 = f_ratio·V_C,1, and V_C,h = I_h/(f_ratio·h). Fundamental V_C,1 = U/(1 − p)/U_rated.
    The bus harmonic voltage is V_C,h·|1 − p·h²| in both cases. Sums as in
    :func:`duty_from_capacitor_voltages`.
    """
    if not (u_rated_v > 0 and u_bus_v > 0):
        raise InputError("Voltages must be above zero.")
    if not (0.0 <= p < 1.0):
        raise InputError("The detuning factor must be from 0 % to below 100 %.")
    if f_ratio <= 0:
        raise InputError("The frequency must be above zero.")
    check_spectrum(spectrum_percent)
    v1_bus = u_bus_v / u_rated_v
    v1_cap = v1_bus / (1.0 - p)
    v_cap = {1: v1_cap}
    v_bus_pct = {}
    for h in sorted(spectrum_percent):
        level = spectrum_percent[h] / 100.0
        div = abs(1.0 - p * h * h)
        if kind == "voltage":
            if div < 1e-6:
                raise InputError(
                    f"Harmonic {h} sits at the branch's tuning order: the branch would draw unlimited "
                    "current there. A harmonic study is needed."
                )
            v_cap[h] = level * v1_bus / div
            v_bus_pct[h] = 100.0 * level
        elif kind == "current":
            i1 = f_ratio * v1_cap
            v_cap[h] = level * i1 / (f_ratio * h)
            v_bus_pct[h] = 100.0 * v_cap[h] * div / v1_bus
        else:
            raise InputError("The spectrum kind must be 'voltage' or 'current'.")
    v_rms, v_peak, i_rms, q = duty_from_capacitor_voltages(v_cap, f_ratio)
    return Duty(
        v_cap_pu=v_cap,
        v_bus_percent=v_bus_pct,
        v_rms_percent=100.0 * v_rms,
        v_peak_percent=100.0 * v_peak,
        i_rms_percent=100.0 * i_rms,
        kvar_percent=100.0 * q,
        bus_thd_percent=thd_percent(v_bus_pct),
    )


@guarded
def rated_current_a(q_rated_kvar: float, u_rated_v: float, phases: int = 3) -> float:
    """Rated current [A] of a capacitor of q_rated_kvar [kvar] at u_rated_v [V]: line current
    Q/(√3·U) for a three-phase unit (U line-to-line), Q/U for a single-phase unit."""
    if q_rated_kvar <= 0 or u_rated_v <= 0:
        raise InputError("Rated kvar and voltage must be above zero.")
    k = math.sqrt(3.0) if phases == 3 else 1.0
    return q_rated_kvar * 1e3 / (k * u_rated_v)


# --- duty profiles: IEEE Std 18 and IEC 60831-1 -------------------------------------------

IEC60831_EDITION = ref("iec60831_duty")

IEC60831_LIMITS_PERCENT = {
    "v_rms": 100.0,
    "i_rms": 130.0,
}
"""IEC 60831-1 (from memory): 1.00·U_N continuously (the highest average over any period of
energisation), and a maximum rms current of 1.30·I_N including harmonics (up to 1.43·I_N with
the capacitance tolerance). No separate peak-voltage or kvar limit is applied here."""

IEC60831_SHORT_TIME_V_PERCENT = 110.0
IEC60831_SHORT_TIME_TEXT = "8 h in every 24 h"
"""IEC 60831-1 (from memory): 1.10·U_N allowed for 8 h in every 24 h (supply regulation and
fluctuation)."""

DUTY_PROFILES = {
    "ieee18": ("IEEE Std 18", IEEE18_LIMITS_PERCENT, None, IEEE18_EDITION),
    "iec60831": ("IEC 60831-1", IEC60831_LIMITS_PERCENT, (IEC60831_SHORT_TIME_V_PERCENT, IEC60831_SHORT_TIME_TEXT),
                 IEC60831_EDITION),
}
"""Duty profiles by id: (name, continuous limits in % of rating, (short-time rms voltage %,
duration) or None, source)."""


@guarded
def profile_check(values_percent: dict, profile: str = "ieee18") -> list:
    """Check duty values {'v_rms', 'v_peak', 'i_rms', 'kvar': % of rating} against a profile of
    :data:`DUTY_PROFILES`. Returns [(name, value %, limit %, status)] for the quantities the
    profile limits, status 'ok', 'short' (over the continuous rms voltage but within the
    short-time allowance: acceptable only for that duration) or 'fail'. At the limit passes."""
    if profile not in DUTY_PROFILES:
        raise InputError("Choose IEEE Std 18 or IEC 60831-1 as the duty profile.")
    _, limits, short, _ = DUTY_PROFILES[profile]
    rows = []
    for name in ("v_rms", "v_peak", "i_rms", "kvar"):
        if name not in limits or name not in values_percent:
            continue
        val, lim = float(values_percent[name]), limits[name]
        if val <= lim * (1 + 1e-12):
            status = "ok"
        elif name == "v_rms" and short is not None and val <= short[0] * (1 + 1e-12):
            status = "short"
        else:
            status = "fail"
        rows.append((name, val, lim, status))
    return rows
