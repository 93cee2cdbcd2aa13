"""The correction worksheet's harmonic pieces: the bank type (plain or detuned), what a detuned
bank changes in the order (capacitor rated voltage U/(1 − p) with a margin, rated kvar, a
reactor per step), the resonance screen (:mod:`pycore.resonancescreen`, the one rule), and the
link into the harmonic study. Not a worksheet (no SHEET).

Other helpers read the bank type through :func:`detuning_factor`.
"""

from __future__ import annotations

import json

from pycore import capacitor, detuning, harmonicbus, harmonicstudy, resonancescreen, supply
from pycore.errors import InputError
from pycore.references import cite, ref

from .. import fmt
from .. import quantities as Q
from ..sheet import Field, FieldError
from . import _resonance_view as view

PLAIN = "plain"
ALL_IN = "all capacitors"  # the screen writes "With all capacitors in (… kvar) …"
_FACTORS = {PLAIN: 0.0}
_FACTORS.update({"p" + fmt.sig(pc).replace(".", ""): pc / 100.0 for pc in detuning.TYPICAL_DETUNING_PERCENT})
# keys: plain, p567, p7, p14 (the usual detuning factors of pycore.detuning)

BANK_TYPES = [(PLAIN, "Plain capacitors")] + [(k, f"Detuned, p = {fmt.sig(100 * p)} %") for k, p in _FACTORS.items() if p]

BANK_TYPE_FIELD = Field(
    "bank_type", "Plain or detuned", kind="choice", default=PLAIN, options=BANK_TYPES, widget="select",
    help="Detuned: each step behind a reactor (p = X_L/X_C). The capacitors then see U/(1 − p), so they are rated "
         "higher, and the bank's resonance falls below the lowest harmonic. 7 % suits six-pulse drives (5th and up); "
         "14 % where a 3rd harmonic is present (common practice).")

SRC_DETUNED = cite("circuits_resonance", "iec61642")


def detuning_factor(ins_or_value) -> float:
    """The bank's detuning factor p [fraction] (0 for plain) from the worksheet's inputs or from
    a ``bank_type`` value ('plain', 'p567', 'p7', 'p14')."""
    if isinstance(ins_or_value, str):
        return _FACTORS.get(ins_or_value, 0.0)
    return _FACTORS.get(ins_or_value.choice("bank_type") or PLAIN, 0.0)


def bank_type_of(p: float) -> str:
    """The ``bank_type`` value for a detuning factor p [fraction] (nearest usual one), 'plain' for 0."""
    if p <= 0:
        return PLAIN
    return min((k for k in _FACTORS if _FACTORS[k]), key=lambda k: abs(_FACTORS[k] - p))


def detuned_rating(ins, out, cx) -> None:
    """After the need is known: for a detuned bank, raise the capacitor rating to the next usual
    voltage above U/(1 − p) plus the margin (:mod:`pycore.detuning`) when the entered one is lower,
    and take the branch output Q = Q_r·(U/U_r)²·(f/f_r)/(1 − p) for the kvar to order."""
    p = detuning_factor(ins)
    cx.p = p
    if p == 0.0:
        return
    u_c = detuning.capacitor_voltage(cx.v, p)
    needed = u_c * (1 + detuning.DEFAULT_VOLTAGE_MARGIN_PERCENT / 100)
    if cx.cap_v < needed * (1 - 1e-9):
        chosen = detuning.choose_rated_voltage(u_c) or float(fmt.sig(needed, 3))
        out.notes.append(f"Detuned bank: the capacitors see U/(1 − p) = {fmt.sig(u_c, 4)} V, so they are rated "
                         f"{fmt.sig(chosen)} V (the next usual rating at least {fmt.sig(detuning.DEFAULT_VOLTAGE_MARGIN_PERCENT)} % "
                         f"above it) instead of the {fmt.sig(cx.cap_v)} V entered.")
        cx.cap_v = chosen
    cx.factor = capacitor.output_factor(cx.v, cx.cap_v, cx.f, cx.cap_f) / (1 - p)
    cx.need_rated = cx.need / cx.factor


def reactors(out, cx) -> None:
    """For a detuned bank: the order names the reactors, and one reactor per step is listed."""
    p = getattr(cx, "p", 0.0)
    if not p:
        return
    cx.order_text += f", each step behind a {fmt.sig(100 * p)} % reactor"
    rows = []
    for i, q in enumerate(cx.steps_sys, 1):
        b = detuning.design_branch(cx.v, cx.f, q, p, cx.cap_v)
        rows.append([str(i), fmt.sig(q, 4), fmt.sig(b.l_mh, 4), fmt.sig(b.i1_a, 4), fmt.sig(b.q_reactor_kvar, 3),
                     fmt.sig(b.f_tuning_hz, 4)])
    out.table(f"Reactors to order, one per step (p = {fmt.sig(100 * p)} %)",
              ["Step", f"kvar at {fmt.sig(cx.v)} V", "Inductance per phase mH", "Fundamental current A",
               "Reactor kvar", "Tuning frequency Hz"], rows,
              note="X_L = p·X_C, X_C = U²/(Q(1 − p)); the reactor's thermal current must also carry the harmonics: "
                   "the harmonic study gives it. Inductance per phase of a wye-equivalent reactor.")
    out.result("p_bank", "Detuning", 100 * p, "%", group="Sizing",
               display=f"p = {fmt.sig(100 * p)} %, tuned to order {fmt.sig(detuning.tuning_order(p), 3)}; "
                       f"capacitors at U/(1 − p) = {fmt.sig(detuning.capacitor_voltage(cx.v, p), 4)} V",
               method="n = 1/√p; U_C = U/(1 − p); Q_r = Q·(1 − p)·(U_r/U)²", source=SRC_DETUNED)


def _bus(cx):
    """The lossless bus of the screen with every capacitor of this sizing: the existing (plain) first,
    then the steps; built once per computation. Returns (bus, offset of step 1)."""
    if getattr(cx, "_hbus", None) is None:
        p = getattr(cx, "p", 0.0)
        ex = [harmonicbus.Step(cx.existing)] if cx.existing > 0 else []
        steps = ex + [harmonicbus.Step(s, p) for s in cx.steps_sys]
        cx._hbus = (harmonicbus.build_bus(cx.v, cx.f, cx.tx_kva, cx.tx_z, None,
                                          None if cx.fault_mva is None else cx.fault_mva * 1000.0, None, None, None,
                                          harmonicbus.LOCKED_ROTOR_RATIO_DEFAULT, steps), len(ex))
    return cx._hbus


def _indices(cx, on=None) -> list:
    bus, off = _bus(cx)
    return list(range(off)) + [off + i - 1 for i in (on if on is not None else range(1, len(cx.steps_sys) + 1))]


def screen(cx) -> list:
    """The resonance screen for the correction: all capacitors in (existing and new), then each
    step combination, against the low characteristic orders (+3rd for single-phase loads);
    upstream fault level from the supply fields (resonancescreen.screen on one bus; the same rule
    as screen_bank). [] when no transformer is entered."""
    if cx.tx_kva is None:
        return []
    combos = [(ALL_IN, _indices(cx))]
    if cx.bank == "auto":
        combos += [(combo_label(c), _indices(cx, c.on)) for c in cx.combos]
    try:
        return resonancescreen.screen(_bus(cx)[0], combos, cx.near_orders)
    except InputError as e:  # pragma: no cover - the fields are range-checked and the bank fits the bus
        raise FieldError("tx_kva", str(e)) from None


def combo_label(c) -> str:
    return f"step {c.on[0]}" if len(c.on) == 1 else "steps " + "+".join(str(i) for i in c.on)


def resonance_result(out, cx, h: float, warnings: list) -> None:
    """The all-capacitors-in resonance order, its status from the screen, and the method in words."""
    near = sorted({w.harmonic for w in warnings if w.label == ALL_IN})
    p = getattr(cx, "p", 0.0)
    what = "with the detuned bank" if p else ""
    out.result("h_res", "Parallel resonance order, all capacitors in" + (f" ({what})" if what else ""), h, "", digits=3,
               group="Supply", display=f"{fmt.sig(h, 3)} (≈ {fmt.sig(h * cx.f, 3)} Hz)"
               + (f": can reach the {', '.join(f'{x}{view.th(x)}' for x in near)} harmonic" if near else ""),
               status="warn" if near else "ok",
               method=("h = 1/√(Q_C/S_sc + p) for the detuned bank, " if p else "h = √(S_sc/Q_C), ")
               + "Q_C = new bank + existing at system voltage; damping neglected. Running motors are not entered here: "
                 "their locked-rotor reactance adds about (I_LR/I_FL)·S_motor to S_sc and moves h up (the harmonic "
                 "study models them). Screen: " + view.rule_text(),
               source=cite("ieee141_sc", "ieee399", "ieee1036", "dugan", "c57_12_00", "practice_screen_band"))


def bus_resonance_order(cx, on=None) -> float:
    """Lowest parallel-resonance order [-] of the lossless bus of the screen (:mod:`pycore.resonancescreen`)
    with the existing capacitors and the steps ``on`` in (1-based; None: all steps): √(S_sc/Q) for plain
    capacitors, 1/√(Q_C/S_sc + p) for a detuned bank alone, and the mixed case of existing plain
    capacitors beside a detuned bank."""
    bus, idx = _bus(cx)[0], _indices(cx, on)
    orders = resonancescreen.resonance_orders(bus, idx)
    # above the search range (a tiny bank on a stiff bus): the lossless estimate
    return orders[0] if orders else supply.resonance_order(cx.s_sc, sum(bus.steps[k].q_kvar for k in idx))


def sizing_texts(ins) -> dict:
    """The correction inputs as typed (visible fields), for a round trip through the study."""
    return {f.name: text for f in ins.sheet.fields if ins.visible(f.name) and (text := ins.text_of(f.name)) != ""}


def study_link(ins, out, cx) -> None:
    """'Study harmonics for this bank': the bus, transformer, load and step plan into the study, with
    this sizing's inputs so that the study's recommendation can return here with a bank type."""
    if cx.tx_kva is None or cx.phases == 1:
        out.notes.append("Enter the supply transformer to study harmonics for this bank." if cx.tx_kva is None else
                         "The harmonic study models a three-phase bus; a single-phase bank is not linked to it.")
        return
    p = getattr(cx, "p", 0.0)
    steps = ([[fmt.sig(cx.existing, 5), "plain", "", ""]] if cx.existing > 0 else []) + [
        [fmt.sig(s, 5), "detuned" if p else "plain", fmt.sig(100 * p, 4) if p else "", fmt.sig(cx.cap_v, 5)]
        for s in cx.steps_sys]
    paired = False
    while len(steps) > harmonicstudy.MAX_STEPS:  # pair neighbouring steps: the study takes at most 8
        paired = True
        merged = []
        for i in range(0, len(steps), 2):
            pair = steps[i:i + 2]
            if len(pair) == 2 and pair[0][1:] == pair[1][1:]:
                merged.append([fmt.sig(float(pair[0][0]) + float(pair[1][0]), 5)] + pair[0][1:])
            else:
                merged.extend(pair)
        if len(merged) == len(steps):
            return
        steps = merged
    inputs = {
        "v_ll": fmt.sig(cx.v, 6), "f": fmt.sig(cx.f, 6), "tx_kva": fmt.sig(cx.tx_kva, 6), "tx_z": fmt.sig(cx.tx_z, 6),
        # X/R is not asked here: the shared typical value, shown and editable in the study (undamped, an
        # exact resonance on a harmonic would give infinite voltages)
        "tx_xr": Q.TRANSFORMER_XR.default, "fault_mva": "" if cx.fault_mva is None else fmt.sig(cx.fault_mva, 6), "fault_xr": "",
        "load_kw": "", "motor_kva": "",
        "steps": json.dumps(steps),
        "source": "typical",
        "typical": json.dumps([["six_pulse_choke", fmt.sig(cx.net.p_kw, 6)]]),  # the whole load as drives until edited
        "i_load": fmt.sig(cx.i2, 6),
        "sizing": json.dumps(sizing_texts(ins), separators=(",", ":"), ensure_ascii=False),
    }
    out.link("Study harmonics for this bank" + (" (steps paired)" if paired else ""), "harmonic_study", inputs)
