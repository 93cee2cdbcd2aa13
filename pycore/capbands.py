"""Capacitance tolerance bands of shunt capacitors and the verdict on one phase's reading
against a band: within, low, open or high.

Bands: IEEE Std 18 (0 to +10 %; 0 to +15 % in the 1992 edition) and IEC 60831-1 (−5 % to
+10 %, from memory), each cited through :mod:`pycore.references`. Percentages are deviations
from the rated capacitance (equivalently kvar at rated voltage and frequency) [%].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded
from .references import ref

# Below this fraction of the expected value a phase is reported as open, not merely low.
OPEN_FRACTION = 0.10



@dataclass(frozen=True)
class Band:
    """A tolerance band on capacitance (equivalently on kvar at rated voltage and
    frequency): lo, hi [%] deviation from rated; label; source with its confidence."""

    key: str
    lo: float
    hi: float
    label: str
    source: str


BANDS = {
    "iec60831": Band(
        "iec60831", -5.0, 10.0, "IEC 60831-1: −5 % to +10 %",
        ref("iec60831"),  # capacitance tolerance −5 % to +10 % of rated (check the edition and the maker's datasheet)
    ),
    "ieee18": Band(
        "ieee18", 0.0, 10.0, "IEEE Std 18: 0 to +10 %",
        ref("ieee18"),  # reactive power 100 % to 110 % of rated at rated voltage and frequency, 25 °C
    ),
    "ieee18_1992": Band(
        "ieee18_1992", 0.0, 15.0, "IEEE Std 18-1992: 0 to +15 %",
        ref("ieee18_1992"),  # not less than rated kvar, not more than 115 %, at rated V and f, 25 °C
    ),
}


@guarded
def custom_band(lo: float, hi: float) -> Band:
    """A band of the user's own, lo..hi [%] deviation (e.g. a maker's replacement limit)."""
    if not (math.isfinite(lo) and math.isfinite(hi)) or lo >= hi:
        raise InputError("The lower limit of the band must be below the upper limit.")
    if lo <= -100.0:
        raise InputError("The lower limit must be above −100 %.")
    return Band("custom", lo, hi, f"Own band: {lo:+g} % to {hi:+g} %", ref("input"))


_EDGE = 1e-9  # % — a reading exactly on a band edge counts as inside


@guarded
def verdict(percent_of_expected: float, band: Band) -> str:
    """Verdict for one phase: ``"open"`` (below 10 % of expected: reads as open),
    ``"low"`` (below the band), ``"ok"`` (inside, edges included) or ``"high"`` (above).
    percent_of_expected [%] is 100·measured/expected."""
    if not math.isfinite(percent_of_expected):
        raise InputError("The reading is not a finite number.")
    if percent_of_expected < 100.0 * OPEN_FRACTION:
        return "open"
    dev = percent_of_expected - 100.0
    if dev < band.lo - _EDGE:
        return "low"
    if dev > band.hi + _EDGE:
        return "high"
    return "ok"


VERDICT_WORDS = {
    "ok": "Within the band",
    "low": "Low — capacitance lost",
    "open": "Open — reads near zero",
    "high": "High — above the band",
}

# What a reading usually means on site (common practice, not from a standard).
MEANINGS = {
    "ok": "Inside the as-made tolerance: the elements of this phase are all working.",
    "low": (
        "Capacitance has been lost. In self-healing low-voltage units this is usually ageing of "
        "the metallised film (each self-healing event burns away a little electrode), sped up by "
        "overvoltage, harmonics and heat; in internally fused units each blown internal fuse "
        "takes out one element, so readings fall in steps. The phase delivers less kvar and the "
        "bank draws unequal line currents. Common practice: replace the unit and look for the cause."
    ),
    "open": (
        "The phase reads as open: an operated overpressure disconnector, a blown fuse, or a loose or "
        "broken connection — or the reading was typed in the wrong unit (nF for µF). Replace the unit "
        "after checking the fuses and the contactor."
    ),
    "high": (
        "Above the band: first check the nameplate data, the connection (delta or wye) and the "
        "measurement mode, and that no other unit or cable was in parallel during the test. In "
        "high-voltage units built of series groups, shorted elements raise the capacitance and the "
        "voltage on the healthy ones: such a unit is close to failure."
    ),
}
