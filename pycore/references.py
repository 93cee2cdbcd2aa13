"""The one table of what results cite: each publication (or practice) cited one way.

A result's ``source`` is :func:`cite` of one or more keys, joined by "; ". The publication names
are written once below and the entries (a publication with its chapter or clause) are built
from them, so a standard is never spelled two ways. "from memory" marks a clause or value
recalled rather than read; "common practice" a fact of the trade with no single source.
"""

from __future__ import annotations

# --- publications, each named once
_CIRCUITS = "C. K. Alexander, M. N. O. Sadiku, Fundamentals of Electric Circuits"
_MACHINES = "S. J. Chapman, Electric Machinery Fundamentals"
_DUGAN = "R. C. Dugan, M. F. McGranaghan, S. Santoso, H. W. Beaty, Electrical Power Systems Quality"
_IEEE18 = "IEEE Std 18, shunt power capacitors"
_IEEE141 = "IEEE Std 141 (Red Book), electric power distribution for industrial plants"
_IEEE399 = "IEEE Std 399 (Brown Book), power system analysis"
_IEEE519 = "IEEE Std 519-2014, harmonic control in electric power systems"
_IEEE1036 = "IEEE Std 1036, guide for the application of shunt power capacitors"
_IEC60831 = "IEC 60831-1, shunt power capacitors of the self-healing type for AC systems up to 1000 V"
_IEC61642 = "IEC 61642, industrial AC networks affected by harmonics: filters and shunt capacitors"
_NFPA70 = "NFPA 70 (NEC)"
_NEC = f"{_NFPA70}, Article 460"
_IEC60269 = "IEC 60269-1, low-voltage fuses"
_IEC60364 = "IEC 60364-5-52, low-voltage installations: wiring systems"
_IEC60947 = "IEC 60947-4-1, contactors and motor-starters"
_NEMA_MG1 = "NEMA MG 1, motors and generators"
_C57 = "IEEE C57.12.00, general requirements for liquid-immersed distribution and power transformers"

REFERENCES: dict[str, str] = {
    # textbooks
    "circuits": _CIRCUITS,
    "circuits_ac_power": f"{_CIRCUITS}, AC power analysis",
    "circuits_phasors": f"{_CIRCUITS}, phasors and impedance",
    "circuits_resonance": f"{_CIRCUITS}, frequency response (series and parallel resonance)",
    "circuits_three_phase": f"{_CIRCUITS}, three-phase circuits (Y–Δ transformation)",
    "machines": f"{_MACHINES}, induction-motor equivalent circuit",
    "dugan": f"{_DUGAN}, capacitor resonance",
    "dugan_harmonics": f"{_DUGAN}, harmonics chapters (per-phase bus model, V_h = I_h·Z_bus(h))",
    # standards
    "ieee18": f"{_IEEE18}, 2002 edition (the 2012 revision believed to keep the same limits, from memory)",
    "ieee18_1992": f"{_IEEE18}, 1992 edition, routine capacitance test",
    "ieee141_pf": f"{_IEEE141}, power-factor chapter",
    "ieee141_sc": f"{_IEEE141}, short-circuit chapter (per-unit method)",
    "ieee399": f"{_IEEE399}, short-circuit studies",
    "ieee399_harmonics": f"{_IEEE399}, harmonic analysis",
    "ieee519": f"{_IEEE519} (Table 1 voltage limits, the 6k ± 1 harmonics of converters)",
    "ieee519_t2": f"{_IEEE519}, Table 2 current distortion limits by I_SC/I_L (values from memory)",
    "ieee1036": f"{_IEEE1036} (resonance, voltage rise, duty with harmonics: clauses from memory)",
    "iec60831": f"{_IEC60831} (from memory)",
    "iec60831_duty": f"{_IEC60831}: 1.00·U_N continuously, 1.10·U_N for 8 h in 24 h, 1.30·I_N (from memory)",
    "c57_12_00": f"{_C57}: impedance tolerance about ±7.5 % of nameplate (from memory)",
    "iec61642": f"{_IEC61642} (from memory)",
    "nec460_8": f"{_NEC}, 460.8 (conductors, disconnect, overcurrent protection)",
    "nec460_9": f"{_NEC}, 460.9 (overload setting with the improved power factor)",
    "nema_mg1": f"{_NEMA_MG1} (from memory)",
    # switching, discharge, protection and cable (the bank's order list)
    "ieee1036_inrush": f"{_IEEE1036}, switching transients: I_pk = V_LL·√(2/3)·√(C_eq/L_eq), "
                       "f = 1/(2π·√(L_eq·C_eq)) (from memory)",
    "iec60831_inrush": f"{_IEC60831}: peak inrush at most 100 × I_N (from memory), unless the capacitor or contactor maker gives a lower limit",
    "iec60831_discharge": f"{_IEC60831}: 75 V or less within 3 min from √2 × rated voltage (from memory)",
    "iec60831_ratio": f"{_IEC60831}: a limit on the largest ÷ smallest capacitance measured between the line "
                      "terminals of a three-phase unit (from memory)",
    "nec460_6": f"{_NEC}, 460.6 (discharge: 50 V or less within 1 min, capacitors rated 1000 V or less)",
    "nec240_6": f"{_NFPA70}, 240.6(A) standard ampere ratings of fuses and breakers (from memory)",
    "nec310_16": f"{_NFPA70}, Table 310.16, copper, 75 °C column (from memory)",
    "iec60364_c": f"{_IEC60364}, Table B.52.4, reference method C, copper, PVC, 3 loaded conductors (from memory)",
    "iec60269": f"{_IEC60269}, preferred rated currents (from memory)",
    "iec60947_ac6b": f"{_IEC60947}, utilization category AC-6b, switching capacitor banks (from memory)",
    "practice_fuse": "Common practice: gG fuses 1.43–1.65 × I_N, breakers 1.35–1.65 × I_N with magnetic release at least "
                     "10 × I_N, rated or set as low as practicable (NEC 460.8(B)), confirmed with the capacitor and device makers",
    "practice_contactor": "Common practice: capacitor-duty contactors with damping resistors for steps switched back to back, "
                          "standard ones behind a detuning reactor",
    "practice_reclose": "Common practice: a step is switched in again only below about 10 % of its peak voltage, "
                        "unless the controller maker says otherwise",
    "practice_ck": "Common practice for step controllers: response C/k = the smallest step's current on the CT secondary",
    "practice_uh_per_m": "Common practice: about 0.3–0.8 µH per metre of run for single-core cables or panel busbars",
    "practice_bank_losses": "Makers' datasheets, typical: capacitors about 0.2–0.5 W/kvar, detuning reactors about "
                            "4–8 W/kvar (from memory), unless the maker of the units bought gives its own",
    "practice_replace": "Common practice: replace a unit that has lost more capacitance than makers allow "
                        "(they quote 5–10 %, and the maker's own limit comes first)",
    "practice_meter": "Common practice: capacitance meters are typically within 1–2 % of reading",
    "practice_controller": "Common practice: a step controller stops adding steps at the target and never holds a "
                           "combination that leads",
    # practice and this app
    "practice": "Common practice (no single published source)",
    "practice_makers": "Common practice (makers' catalogues and trade tables, not a standard)",
    "practice_tariff": "Common tariff practice: the tariff's own wording governs",
    "practice_billing": "Utility billing practice (common practice)",
    "practice_controller": "Common practice for power-factor controllers (switching whole steps, modelled interval by interval in this app)",
    "def_energy": "Definition of average demand (energy = Σ P·h over the intervals)",
    "quantile_lower": "Lower empirical quantile of the intervals (numpy 'inverted_cdf' definition)",
    "transformer_circuit": "Transformer equivalent circuit (magnetising branch and series reactance)",
    "input_file": "The file as read",
    "practice_screen_band": "Resonance screening band around each harmonic present: this app's screening choice (common practice keeps a resonance clear of a harmonic present)",
    "spectra_typical": "Typical harmonic spectra by load type: the ideal 1/h six- and twelve-pulse spectra are textbook, the others from memory",
    "ngspice_checked": "Checked against an AC circuit solution (ngspice) in this app's tests",
    "this_app": "This app's own method (least-excess unit selection by dynamic programming)",
    "input": "As entered",
}

SEPARATOR = "; "


def ref(key: str) -> str:
    """The one citation for ``key`` (a KeyError names an unknown key at import time)."""
    return REFERENCES[key]


def cite(*keys: str) -> str:
    """Several citations, in order, as one ``source`` text."""
    return SEPARATOR.join(REFERENCES[k] for k in keys)
