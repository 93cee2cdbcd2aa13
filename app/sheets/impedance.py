"""Impedance worksheet: a complex value or a small R-L-C network → Z, Y, angle, PF, equivalents."""

from __future__ import annotations

import math

from pycore import phasor
from pycore.errors import InputError
from pycore.references import cite, ref
from pycore.numparse import parse_quantity

from .. import cautions, fmt
from ..sheet import OUT_OF_RANGE_MESSAGE, Column, Field, FieldError, Worksheet, out_of_range
from ..svg import Svg

SRC_PHASOR = ref("circuits_phasors")

FIELDS = [
    Field(
        "mode",
        "What you have",
        kind="choice",
        default="network",
        options=[("network", "R, L, C elements"), ("z", "An impedance Z"), ("y", "An admittance Y")],
        help="Enter elements and how they are connected, or one complex value you already know.",
    ),
    Field(
        "z",
        "Impedance Z",
        kind="complex",
        unit="Ω",
        default="12.5 - j4.7",
        help="Rectangular (12.5 - j4.7) or polar (13.4∠-20.6, angle in degrees). Prefixes allowed: 4.7k, 250m.",
        show_when={"field": "mode", "in": ["z"]},
    ),
    Field(
        "y",
        "Admittance Y",
        kind="complex",
        unit="S",
        default="20m - j15m",
        help="Rectangular (G + jB, B negative for inductive) or polar. 20m means 0.020 S.",
        show_when={"field": "mode", "in": ["y"]},
    ),
    Field(
        "topology",
        "Connection",
        kind="choice",
        default="series",
        options=[("series", "All in series"), ("parallel", "All in parallel")],
        show_when={"field": "mode", "in": ["network"]},
    ),
    Field(
        "elements",
        "Elements",
        kind="table",
        default='[["R","3.2 Ω"],["L","21 mH"],["C","680 µF"]]',
        help="One row per element: R in Ω, L in H (mH, µH), C in F (µF, nF). Units may be typed.",
        columns=[
            Column("kind", "Element", kind="choice", options=[("R", "R"), ("L", "L"), ("C", "C")]),
            Column("value", "Value", kind="text"),
        ],
        max_rows=20,
        show_when={"field": "mode", "in": ["network"]},
    ),
    Field(
        "f",
        "Frequency",
        unit="Hz",
        default="60",
        min=0,
        min_open=True,
        max=1e9,
        suggest=["50", "60", "400"],
        help="Supply frequency, or the harmonic frequency you are checking.",
    ),
]

_ELEMENT_UNIT = {"R": "Ω", "L": "H", "C": "F"}
# Largest L and C a power circuit holds (as the LC resonance sheet allows): above them the
# value is a prefix typed wrong (MH for mH, MF for mF).
_ELEMENT_MAX = {"L": 1e3, "C": 1e3}


def _network(ins, f_hz):
    rows = ins.rows("elements")
    if rows is None:
        return None
    elems = []
    for r in rows:
        kind = r["kind"]
        try:
            v = parse_quantity(r["value"], _ELEMENT_UNIT[kind])
        except InputError as e:
            raise FieldError("elements", f"Row {r['_row']} ({kind}): {e}") from None
        if not (v > 0 and math.isfinite(v)):
            raise FieldError("elements", f"Row {r['_row']} ({kind}): the value must be above zero.")
        if out_of_range(v) or v > _ELEMENT_MAX.get(kind, math.inf):
            raise FieldError("elements", f"Row {r['_row']} ({kind}): {OUT_OF_RANGE_MESSAGE}")
        elems.append((kind, v))
    if f_hz is None:
        return None
    topo = ins.choice("topology")
    try:
        return phasor.network_impedance(elems, f_hz, topo)
    except InputError as e:
        raise FieldError("elements", str(e)) from None


def _plane_figure(z: complex) -> str:
    """Impedance-plane diagram: R along x, X up for inductive, Z as the vector."""
    w, h = 360, 300
    svg = Svg(w, h, "Impedance plane", f"Z = {fmt.complex_rect(z, 'Ω')} drawn as R along the real axis and X up (inductive) or down (capacitive).")
    svg.rect(0, 0, w, h, "fp-bg")
    cx, cy = 60, h / 2
    m = max(abs(z.real), abs(z.imag), 1e-30)
    k = min((w - 110) / max(abs(z.real), m * 0.25), (h / 2 - 40) / max(abs(z.imag), m * 0.25))  # drawing: scale
    x_end = cx + z.real * k
    y_end = cy - z.imag * k
    svg.line(20, cy, w - 10, cy, "fp-axis")
    svg.line(cx, 16, cx, h - 16, "fp-axis")
    svg.text(w - 12, cy - 6, "R", anchor="end", size=13)
    svg.text(cx + 6, 28, "+jX (inductive)", size=12)
    svg.text(cx + 6, h - 20, "−jX (capacitive)", size=12)
    svg.line(cx, cy, x_end, cy, "fp-s2", width=2, dash="6 4")
    svg.line(x_end, cy, x_end, y_end, "fp-s3", width=2, dash="6 4")
    svg.arrow(cx, cy, x_end, y_end, "fp-s1")
    svg.text((cx + x_end) / 2, cy + (16 if z.imag >= 0 else -8), f"R = {fmt.si(z.real, 'Ω', 3)}", anchor="middle", size=12)
    svg.text(x_end + 6, (cy + y_end) / 2, f"X = {fmt.si(z.imag, 'Ω', 3)}", size=12)
    mag, ang = phasor.to_polar(z)
    svg.text(cx + 8, cy + (-10 if z.imag < 0 else 20) + (0 if z.imag else 14), f"φ = {fmt.sig(ang, 3)}°", size=12)
    return str(svg)


def compute(ins, out):
    mode = ins.choice("mode")
    f_hz = ins.num("f")
    if mode == "z":
        z = ins.cplx("z")
        if z is None:
            return
        if z == 0:
            raise FieldError("z", "Z = 0 is a short circuit: nothing to convert.")
        y = 1 / z
        how = "entered"
    elif mode == "y":
        y = ins.cplx("y")
        if y is None:
            return
        if y == 0:
            raise FieldError("y", "Y = 0 is an open circuit: nothing to convert.")
        z = 1 / y
        how = "entered as admittance"
    else:
        z = _network(ins, f_hz)
        if z is None:
            return
        if z == 0:
            raise FieldError("elements", "The network is a short circuit at this frequency (Z = 0).")
        y = 1 / z
        how = f"{ins.choice('topology')} network at {fmt.sig(f_hz)} Hz"
    if ins.errors or f_hz is None:
        return

    src = SRC_PHASOR
    mag, ang = phasor.to_polar(z)
    pf, word = phasor.power_factor(z)
    out.result("z_rect", "Z (rectangular)", None, "Ω", display=fmt.complex_rect(z, "Ω"), key=True,
               method=f"Z {how}; series: ΣZ, parallel: 1/Σ(1/Z)", source=src)
    out.result("z_mag", "|Z|", mag, "Ω", si=True, key=True, method="|Z| = √(R² + X²)", source=src)
    out.result("phi", "Phase angle φ", ang, "°", display=f"{fmt.sig(ang)}° ({'current lags' if ang > 0 else 'current leads' if ang < 0 else 'in phase'})",
               key=True, method="φ = atan2(X, R)", source=src)
    out.result("pf", "Power factor", pf, "", display=f"{pf:.4f} {word}", key=True,
               method="PF = cos φ; lagging when X > 0 (inductive)", source=src)
    out.result("z_polar", "Z (polar)", None, "Ω", display=fmt.complex_polar(z, "Ω"), method="magnitude ∠ angle in degrees", source=src)
    out.result("y_rect", "Y = G + jB", None, "S", display=fmt.complex_rect(y, "S"), method="Y = 1/Z", source=src)
    out.result("y_mag", "|Y|", abs(y), "S", si=True, method="|Y| = 1/|Z|", source=src)
    out.result("g", "Conductance G", y.real, "S", si=True, method="G = R/(R² + X²)", source=src)
    out.result("b", "Susceptance B", y.imag, "S", si=True, method="B = −X/(R² + X²); negative B is inductive", source=src)

    rs, xs = phasor.series_equivalent(z)
    rp, xp = phasor.parallel_equivalent(z)
    out.result("rs", "Series R", rs, "Ω", si=True, group="Equivalent series circuit", method="R_s = Re Z", source=src)
    out.result("xs", "Series X", xs, "Ω", si=True, group="Equivalent series circuit", method="X_s = Im Z", source=src)
    kind, val = phasor.element_for_reactance(xs, f_hz)
    if kind:
        out.result("xs_el", f"Series {kind} at {fmt.sig(f_hz)} Hz", val, "H" if kind == "L" else "F", si=True,
                   group="Equivalent series circuit",
                   method="L = X/(2πf) or C = 1/(2πf|X|)", source=src)
    out.result("rp", "Parallel R", rp if math.isfinite(rp) else None, "Ω", si=True,
               display=None if math.isfinite(rp) else "open (∞)", group="Equivalent parallel circuit",
               method="R_p = (R² + X²)/R", source=src)
    out.result("xp", "Parallel X", xp if math.isfinite(xp) else None, "Ω", si=True,
               display=None if math.isfinite(xp) else "open (∞)", group="Equivalent parallel circuit",
               method="X_p = (R² + X²)/X", source=src)
    kind_p, val_p = phasor.element_for_reactance(xp, f_hz)
    if kind_p:
        out.result("xp_el", f"Parallel {kind_p} at {fmt.sig(f_hz)} Hz", val_p, "H" if kind_p == "L" else "F", si=True,
                   group="Equivalent parallel circuit",
                   method="L = X_p/(2πf) or C = 1/(2πf|X_p|)", source=src)
    if mode != "network" and f_hz is not None:
        out.notes.append("The equivalent L or C holds only at the frequency entered.")
    if z.real < 0:
        out.warn("R is negative: this is a source or an active device, not a passive load; check the sign.")
    out.figure("Impedance plane", _plane_figure(z))


SHEET = Worksheet(
    id="impedance",
    title="Impedance",
    summary="Convert between rectangular and polar, Z and Y, and find series/parallel equivalents, phase angle and power factor.",
    fields=FIELDS,
    compute=compute,
    cautions=[cautions.ESTIMATE],
    order=30,
    essential=('mode', 'z', 'y', 'topology', 'elements', 'f'),
    references=[ref("circuits_phasors")],
)
