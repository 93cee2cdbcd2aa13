"""Showing the one resonance-screening rule (:mod:`pycore.resonancescreen`) in a worksheet:
its warnings (one per distinct electrical state), its tolerance fields, and the words that
say which harmonics were screened. Not a worksheet (no SHEET)."""

from __future__ import annotations

from pycore import resonancescreen as rs

from .. import fmt
from ..sheet import Field

MAX_SHOWN = 4
"""Screening warnings written out in full; the rest are counted (layout choice, not a threshold)."""


def tolerance_fields(group: str = "Resonance screen") -> list:
    """The band and tolerance fields of the rule, with its defaults (the user may change them)."""
    lo, hi = rs.CAP_TOLERANCE_IEEE18
    return [
        Field("band", "Band around each harmonic, ±", unit="%", default=fmt.sig(100 * rs.DEFAULT_BAND), min=0, max=30,
              group=group, help="Flag a resonance that can land within this relative distance of a harmonic present."),
        Field("cap_lo", "Capacitance tolerance, low", unit="%", default=fmt.sig(100 * lo), min=-20, max=0),
        Field("cap_hi", "Capacitance tolerance, high", unit="%", default=fmt.sig(100 * hi), min=0, max=30,
              help="IEEE Std 18: 0 to +10 %; IEC 60831-1: −5 to +10 % (from memory)."),
        Field("z_tol", "Transformer impedance tolerance, ±", unit="%", default=fmt.sig(100 * rs.TX_Z_TOLERANCE[1]),
              min=0, max=25, help="±7.5 % of nameplate (IEEE C57.12.00, from memory)."),
    ]


def read_tolerances(ins):
    """(Tolerances, band [fraction]) from the fields of :func:`tolerance_fields`; None on bad input."""
    band, lo, hi, z = ins.num("band"), ins.num("cap_lo"), ins.num("cap_hi"), ins.num("z_tol")
    if None in (band, lo, hi, z):
        return None
    return rs.Tolerances(lo / 100, hi / 100, -z / 100, z / 100), band / 100


def rule_text(band: float = rs.DEFAULT_BAND, tol: rs.Tolerances = rs.Tolerances()) -> str:
    """The rule in words, for a result's method."""
    return (f"resonances of the lossless bus across capacitance {fmt.sig(100 * tol.cap_lo)} to +{fmt.sig(100 * tol.cap_hi)} % "
            f"and transformer impedance ±{fmt.sig(100 * tol.z_hi)} %, flagged within ±{fmt.sig(100 * band)} % of a harmonic present")


def show(out, warnings, limit: int = MAX_SHOWN) -> None:
    """Write the screen's warnings: one per distinct state (kind, resonance order; equal steps give
    the same state in several combinations), naming every harmonic that state reaches; the first
    ``limit`` in full, then a count."""
    states: dict = {}
    for w in warnings:
        states.setdefault((w.kind, round(w.order, 6)), []).append(w)
    shown = 0
    for ws in states.values():
        if shown == limit:
            break
        first, hs = ws[0], sorted({w.harmonic for w in ws})
        text = first.text
        if len(hs) > 1:
            named = ", ".join(f"{h}{th(h)}" for h in hs[:-1]) + f" and {hs[-1]}{th(hs[-1])}"
            text = text.replace(f"reaches the {first.harmonic}{th(first.harmonic)} harmonic ",
                                f"reaches the {named} harmonics ")
        out.warn(text)
        shown += 1
    if len(states) > shown:
        out.warn(f"{len(states) - shown} more resonance-screen warnings for other combinations: see the table.")


def by_label(warnings) -> dict:
    """{combination label: [harmonic orders reached]}."""
    hits: dict = {}
    for w in warnings:
        hits.setdefault(w.label, [])
        if w.harmonic not in hits[w.label]:
            hits[w.label].append(w.harmonic)
    return hits


def th(h: int) -> str:
    return "th" if 10 <= h % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(h % 10, "th")
