"""LC resonance worksheet: series or parallel R-L-C → f₀, Z₀, Q, bandwidth, half-power
frequencies; or the L or C for a wanted f₀; with |Z| and phase plotted against frequency."""

from __future__ import annotations

import math

from pycore import resonance as rz
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import cautions, fmt
from ..sheet import Field, FieldError, Worksheet
from ..svg import xy_chart

SRC = ref("circuits_resonance")

_OUT_OF_RANGE = "These values are out of range for a calculation (resonance outside 1 µHz to 1 THz); check the units: L in mH, C in µF."

_SOLVE_F0 = "f0"
_SOLVE_C = "c"
_SOLVE_L = "l"

FIELDS = [
    Field(
        "topology",
        "Connection",
        kind="choice",
        default="series",
        options=[("series", "Series R-L-C (one loop)"), ("parallel", "Parallel R‖L‖C (tank)")],
        group="Circuit",
        help="Series: R, L and C carry the same current. Parallel: R, L and C all across the same two points.",
    ),
    Field(
        "solve",
        "What to find",
        kind="choice",
        default=_SOLVE_F0,
        options=[
            (_SOLVE_F0, "Resonance of a known L and C"),
            (_SOLVE_C, "C for a known L and a wanted frequency"),
            (_SOLVE_L, "L for a known C and a wanted frequency"),
        ],
    ),
    Field(
        "l",
        "Inductance L",
        unit="mH",
        default="1.2",
        min=0,
        min_open=True,
        max=1e6,
        help="In mH; other units may be typed: 850 µH, 0.5 H.",
        show_when={"field": "solve", "in": [_SOLVE_F0, _SOLVE_C]},
    ),
    Field(
        "c",
        "Capacitance C",
        unit="µF",
        default="220",
        min=0,
        min_open=True,
        max=1e9,
        help="In µF; other units may be typed: 470 nF, 0.1 mF.",
        show_when={"field": "solve", "in": [_SOLVE_F0, _SOLVE_L]},
    ),
    Field(
        "f0",
        "Wanted resonant frequency",
        unit="Hz",
        default="250",
        min=0,
        min_open=True,
        max=1e9,
        suggest=["250", "300", "350"],
        help="The frequency the L and C should resonate at (e.g. 4.7 × 50 Hz for a filter tuned just below the 5th).",
        show_when={"field": "solve", "in": [_SOLVE_C, _SOLVE_L]},
    ),
    Field(
        "r",
        "Resistance R",
        unit="Ω",
        default="0.05",
        required=False,
        min=0,
        group="Losses",
        help="Series: the loop resistance (coil and leads); 0 or empty for lossless. "
        "Parallel: the resistor across L and C; empty for none (lossless), never 0 (a short).",
    ),
    Field(
        "f_at",
        "Also evaluate at",
        unit="Hz",
        default="50",
        required=False,
        min=0,
        min_open=True,
        max=1e9,
        suggest=["50", "60"],
        help="Optional: |Z| and phase at one more frequency, e.g. the supply frequency.",
    ),
]


def _fmt_q(q: float) -> str:
    return "∞ (lossless)" if q == math.inf else fmt.sig(q, 4)


def _phase_words(ph: float) -> str:
    if abs(ph) < 1e-9:
        return "resistive, in phase"
    return "inductive, current lags" if ph > 0 else "capacitive, current leads"


def _sweep(a: rz.Resonance, f_at):
    lo, hi = a.f0 / 10.0, a.f0 * 10.0  # drawing: sweep a decade each side
    if f_at is not None:
        lo, hi = min(lo, f_at / 1.5), max(hi, f_at * 1.5)  # drawing
        lo = max(lo, hi / 1e6)  # at most six decades
    fs = rz.log_space(lo, hi, 400)
    fs += [a.f0]
    if a.q != math.inf:
        # dense points across the half-power band so a sharp peak is drawn at its height
        bw = a.f_high - a.f_low
        fs += [a.f0 + bw * k / 40.0 for k in range(-120, 121) if a.f0 + bw * k / 40.0 > 0]
    else:
        fs += [a.f0 * (1 + s * 10.0 ** -k) for k in range(1, 6) for s in (-1, 1)]  # drawing: points close to f0
    fs = sorted(f for f in set(fs) if lo <= f <= hi)
    pts = []
    for f in fs:
        z = rz.impedance(a.r if a.topology == "series" else (None if a.r == math.inf else a.r), a.l, a.c, f, a.topology)
        pts.append((f, abs(z) if math.isfinite(z.real) else math.inf, rz.phase_deg(z)))
    return pts


def _figures(out, a: rz.Resonance, f_at):
    pts = _sweep(a, f_at)
    markers = [{"x": a.f0, "label": f"f₀ = {fmt.si(a.f0, 'Hz', 4)}", "cls": "fp-mark"}]
    bands = []
    if a.q != math.inf and a.f_high > a.f_low:
        bands.append({"x0": a.f_low, "x1": a.f_high, "cls": "fp-band"})
    if f_at is not None and abs(f_at - a.f0) > 0.02 * a.f0:  # drawing: a marker apart from f0
        markers.append({"x": f_at, "label": f"{fmt.si(f_at, 'Hz', 3)}", "cls": "fp-grid"})
    kind = "series" if a.topology == "series" else "parallel"
    desc_z = (
        f"|Z| of the {kind} circuit from {fmt.si(pts[0][0], 'Hz', 3)} to {fmt.si(pts[-1][0], 'Hz', 3)} on log scales; "
        f"resonance marked at {fmt.si(a.f0, 'Hz', 4)}"
        + (f", half-power band {fmt.si(a.f_low, 'Hz', 4)} to {fmt.si(a.f_high, 'Hz', 4)} shaded." if bands else ".")
    )
    svg_z = xy_chart(
        "|Z| against frequency",
        [{"points": [(f, m) for f, m, _ in pts], "label": "|Z|", "cls": "fp-s1"}],
        x_label="Frequency (Hz)",
        y_label="|Z| (Ω)",
        log_x=True,
        log_y=True,
        markers=markers,
        bands=bands,
        desc=desc_z,
    )
    svg_p = xy_chart(
        "Phase of Z against frequency",
        [{"points": [(f, p) for f, _, p in pts], "label": "phase (°)", "cls": "fp-s2"}],
        x_label="Frequency (Hz)",
        y_label="Phase (°)",
        log_x=True,
        markers=markers,
        bands=bands,
        desc=f"Phase of Z in degrees (positive: inductive, current lags; negative: capacitive, current leads); resonance marked at {fmt.si(a.f0, 'Hz', 4)}.",
    )
    out.figure("|Z| against frequency", svg_z)
    out.figure("Phase against frequency", svg_p)


def compute(ins, out):
    topo = ins.choice("topology")
    solve = ins.choice("solve")
    l_mh = ins.num("l") if ins.visible("l") else None
    c_uf = ins.num("c") if ins.visible("c") else None
    f0_want = ins.num("f0") if ins.visible("f0") else None
    r = ins.num("r")
    f_at = ins.num("f_at")
    if ins.errors:
        return
    if topo == "parallel" and r == 0:
        raise FieldError("r", "A parallel resistance of 0 Ω shorts the circuit: leave it empty for no resistor (lossless).")
    r_arg = r if r is not None else None
    try:
        if solve == _SOLVE_C:
            l_h = l_mh * 1e-3
            c_f = rz.capacitance_for(f0_want, l_h)
        elif solve == _SOLVE_L:
            c_f = c_uf * 1e-6
            l_h = rz.inductance_for(f0_want, c_f)
        else:
            l_h, c_f = l_mh * 1e-3, c_uf * 1e-6
        a = rz.analyse(r_arg, l_h, c_f, topo)
    except (InputError, ArithmeticError) as e:
        msg = str(e) if isinstance(e, InputError) else _OUT_OF_RANGE
        raise FieldError("l" if solve != _SOLVE_L else "c", msg) from None
    if not (1e-6 <= a.f0 <= 1e12 and math.isfinite(a.z0) and a.z0 > 0 and math.isfinite(l_h * c_f) and l_h > 0 and c_f > 0):
        raise FieldError("l" if solve != _SOLVE_L else "c", _OUT_OF_RANGE)

    if solve == _SOLVE_C:
        out.result("c_needed", "Capacitance needed", c_f, "F", si=True, key=True,
                   method=f"C = 1/((2πf₀)²L) with f₀ = {fmt.sig(f0_want)} Hz, L = {fmt.si(l_h, 'H')}", source=SRC)
    elif solve == _SOLVE_L:
        out.result("l_needed", "Inductance needed", l_h, "H", si=True, key=True,
                   method=f"L = 1/((2πf₀)²C) with f₀ = {fmt.sig(f0_want)} Hz, C = {fmt.si(c_f, 'F')}", source=SRC)
    out.result("f0", "Resonant frequency f₀", a.f0, "Hz", si=True, key=solve == _SOLVE_F0,
               method="f₀ = 1/(2π√(LC))", source=SRC)
    out.result("w0", "Angular frequency ω₀", a.w0, "rad/s", si=True, method="ω₀ = 2πf₀ = 1/√(LC)", source=SRC)
    out.result("z0", "Characteristic impedance Z₀", a.z0, "Ω", si=True, key=True,
               method="Z₀ = √(L/C) = X_L = |X_C| at f₀", source=SRC)
    qm = "Q = ω₀L/R = Z₀/R" if topo == "series" else "Q = R/(ω₀L) = R/Z₀"
    out.result("q", "Quality factor Q", None if a.q == math.inf else a.q, "", display=_fmt_q(a.q), key=True,
               method=qm + (" (R = 0: lossless)" if topo == "series" and a.r == 0 else "") +
               (" (no resistor: lossless)" if topo == "parallel" and a.r == math.inf else ""), source=SRC)
    out.result("bw", "Bandwidth B", a.bandwidth, "Hz", si=True, method="B = f₀/Q = f₂ − f₁", source=SRC,
               display=None if a.q != math.inf else "0 Hz (lossless)")
    hp = ("ω₁,₂ = ∓R/(2L) + √((R/2L)² + 1/LC)" if topo == "series" else "ω₁,₂ = ∓1/(2RC) + √((1/2RC)² + 1/LC)")
    out.result("f_low", "Lower half-power frequency f₁", a.f_low, "Hz", si=True, digits=5, method=hp + ", f = ω/2π", source=SRC,
               group="Half-power (−3 dB) points")
    out.result("f_high", "Upper half-power frequency f₂", a.f_high, "Hz", si=True, digits=5, method=hp + ", f = ω/2π", source=SRC,
               group="Half-power (−3 dB) points")
    if topo == "series":
        out.result("z_f0", "|Z| at f₀ (minimum)", a.r, "Ω", si=True, method="Series: X_L and X_C cancel, Z = R", source=SRC,
                   group="At resonance")
    else:
        out.result("z_f0", "|Z| at f₀ (maximum)", None if a.r == math.inf else a.r, "Ω", si=True,
                   display=None if a.r != math.inf else "∞ (no resistor)",
                   method="Parallel: B_L and B_C cancel, Z = R", source=SRC, group="At resonance")
    out.result("xl_f0", "X_L = |X_C| at f₀", a.z0, "Ω", si=True, method="X_L = 2πf₀L = 1/(2πf₀C) = Z₀", source=SRC,
               group="At resonance")
    if topo == "series":
        out.notes.append("Series circuit: below f₀ it is capacitive (current leads), above f₀ inductive (current lags). "
                         "At f₀ the voltage across L and across C is Q times the applied voltage.")
    else:
        out.notes.append("Parallel circuit: below f₀ it is inductive (current lags), above f₀ capacitive (current leads). "
                         "At f₀ the current in L and in C is Q times the current drawn.")

    if f_at is not None:
        z = rz.impedance(r_arg, l_h, c_f, f_at, topo)
        g = f"At {fmt.si(f_at, 'Hz')}"
        if math.isfinite(z.real):
            ph = rz.phase_deg(z)
            out.result("z_at", "|Z|", abs(z), "Ω", si=True, group=g,
                       method="series Z = R + j(ωL − 1/ωC); parallel Z = 1/(1/R + j(ωC − 1/ωL))", source=SRC)
            out.result("phase_at", "Phase of Z", ph, "°", display=f"{fmt.sig(ph, 4)}° ({_phase_words(ph)})", group=g,
                       method="φ = atan2(X, R)", source=SRC)
        else:
            out.result("z_at", "|Z|", None, "Ω", display="∞ (lossless parallel resonance)", group=g,
                       method="parallel Z = 1/(1/R + j(ωC − 1/ωL))", source=SRC)

    if a.q != math.inf and a.q < rz.Q_HEAVILY_DAMPED:
        out.warn(f"Q is below {fmt.sig(rz.Q_HEAVILY_DAMPED)}: the circuit is so heavily damped that 'resonance' has little practical meaning; "
                 "the half-power points lie far apart.")
    if a.q != math.inf and a.q > rz.Q_UNUSUAL_FOR_POWER:
        out.warn(f"Q above {fmt.sig(rz.Q_UNUSUAL_FOR_POWER)} is unusual for power components; check the resistance entered.")
    _figures(out, a, f_at)


SHEET = Worksheet(
    id="lc_resonance",
    title="LC resonance",
    summary="Series or parallel R-L-C: resonant frequency, characteristic impedance, Q, bandwidth and half-power points; "
    "or the L or C for a wanted frequency, with |Z| and phase plotted.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.SCREENING, cautions.ESTIMATE],
    order=40,
    essential=('topology', 'solve', 'l', 'c', 'f0'),
    references=[ref("circuits_resonance")],
)
