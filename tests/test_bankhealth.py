"""Checks of pycore.bankhealth against first principles, an independent numpy nodal solution
and ngspice, and of the tolerance verdicts at, inside and just outside each band edge."""

import math

import numpy as np
import pytest

from pycore import bankhealth as bh
from pycore.errors import InputError
from spice import ac_node_voltages, impedance_at, needs_ngspice

W50 = 2 * math.pi * 50.0

# Invented test banks: per-phase capacitances [F] (delta elements 12, 23, 31 or wye phases 1, 2, 3).
CASES = [
    (331.6e-6, 331.6e-6, 331.6e-6),  # balanced
    (329e-6, 327e-6, 290e-6),  # one phase down 12 %
    (120e-6, 300e-6, 45e-6),  # very unequal
    (1.39e-6, 1.21e-6, 1.40e-6),  # medium-voltage sized
]


# ----------------------------------------------------------------------------- independent models


def nodal_between(c_delta, pair, w=W50):
    """Capacitance a meter reads between two terminals of a delta, third floating, from a numpy
    nodal solution: 3-node admittance matrix of the delta, second terminal of the pair as
    reference, 1 A injected into the first; C = 1/(ω·|Z|) for the purely capacitive result.
    Nodal analysis (Alexander & Sadiku, chapter on methods of analysis)."""
    c12, c23, c31 = c_delta
    y = 1j * w * np.array([[c12 + c31, -c12, -c31], [-c12, c12 + c23, -c23], [-c31, -c23, c23 + c31]])
    a, b = pair
    keep = [k for k in range(3) if k != b]
    yr = y[np.ix_(keep, keep)]
    inj = np.zeros(2, dtype=complex)
    inj[keep.index(a)] = 1.0
    v = np.linalg.solve(yr, inj)
    z = v[keep.index(a)]
    assert abs(z.real) < 1e-9 * abs(z)  # purely capacitive
    return 1.0 / (w * abs(z))


def nodal_between_wye(c_wye, pair, w=W50):
    """Meter reading between two terminals of a wye, star point floating: 4-node numpy nodal
    solution (L1, L2, L3, star), second terminal of the pair as reference."""
    c = c_wye
    y = np.zeros((4, 4), dtype=complex)
    for k in range(3):
        yk = 1j * w * c[k]
        y[k, k] += yk
        y[3, 3] += yk
        y[k, 3] -= yk
        y[3, k] -= yk
    a, b = pair
    keep = [k for k in range(4) if k != b]
    inj = np.zeros(3, dtype=complex)
    inj[keep.index(a)] = 1.0
    v = np.linalg.solve(y[np.ix_(keep, keep)], inj)
    return 1.0 / (w * abs(v[keep.index(a)]))


PAIRS = [(0, 1), (1, 2), (2, 0)]  # L1–L2, L2–L3, L3–L1


def numpy_line_currents(c, v_line, w, connection):
    """Line current magnitudes from numpy phasors on a balanced positive-sequence supply."""
    vp = v_line / np.sqrt(3)
    vs = vp * np.exp(1j * np.array([0.0, -2 * np.pi / 3, 2 * np.pi / 3]))
    c = np.asarray(c, dtype=float)
    if connection == "delta":
        vel = np.array([vs[0] - vs[1], vs[1] - vs[2], vs[2] - vs[0]])
        iel = 1j * w * c * vel
        return np.abs([iel[0] - iel[2], iel[1] - iel[0], iel[2] - iel[1]])
    if connection == "wye_n":
        return np.abs(1j * w * c * vs)
    # floating star: solve the star node from KCL, Σ jωC_k (V_k − V_n) = 0
    vn = np.sum(c * vs) / np.sum(c)
    return np.abs(1j * w * c * (vs - vn))


# ---------------------------------------------------------------------------- expected values


def test_expected_delta_first_principles():
    # 50 kvar, 400 V, 50 Hz delta: each element takes 50/3 kvar at 400 V, so
    # C = 50 000 / (3 × 2π × 50 × 400²) = 50 000 / 150 796.4 = 331.573 µF (hand arithmetic);
    # line current 50 000 / (√3 × 400) = 72.169 A; element current 72.169/√3 = 41.667 A.
    e = bh.expected(50, 400, 50, "delta")
    assert e.c_phase == pytest.approx(331.573e-6, rel=1e-5)
    assert e.i_line == pytest.approx(72.169, rel=1e-4)
    assert e.i_element == pytest.approx(41.667, rel=1e-4)
    # the element current must equal ωCV (X_C = 1/ωC, circuit theory)
    assert e.i_element == pytest.approx(W50 * e.c_phase * 400, rel=1e-12)
    # between-terminal reading of a balanced delta: C + C·C/(2C) = 1.5 C
    assert e.c_between == pytest.approx(nodal_between((e.c_phase,) * 3, (0, 1)), rel=1e-9)


def test_expected_wye_first_principles():
    # 600 kvar, 13.8 kV, 60 Hz wye: each phase takes 200 kvar at 13.8 kV/√3 = 7967.4 V, so
    # C = 200 000 / (2π × 60 × 7967.4²) = 200 000 / 2.39305e10 = 8.3576 µF (hand arithmetic);
    # line current 600 000/(√3 × 13 800) = 25.102 A.
    e = bh.expected(600, 13800, 60, "wye")
    assert e.c_phase == pytest.approx(8.3576e-6, rel=1e-4)
    assert e.i_line == pytest.approx(25.102, rel=1e-4)
    assert e.i_element == pytest.approx(2 * math.pi * 60 * e.c_phase * 13800 / math.sqrt(3), rel=1e-12)
    assert e.c_between == pytest.approx(nodal_between_wye((e.c_phase,) * 3, (0, 1), 2 * math.pi * 60), rel=1e-9)
    assert bh.expected(600, 13800, 60, "wye_n").c_phase == e.c_phase


def test_rated_output_at_other_voltage():
    # Q = Q_r (V/V_r)² (f/f_r): 50 kvar at 440 V used at 400 V, 50 Hz → 50 × (400/440)² = 41.322 kvar
    assert bh.rated_output_at(50, 440, 50, 400, 50) == pytest.approx(41.322, rel=1e-4)


@pytest.mark.parametrize("bad", [0, -1, float("nan"), float("inf")])
def test_expected_rejects_bad_nameplate(bad):
    with pytest.raises(InputError):
        bh.expected(50, bad, 50, "delta")
    with pytest.raises(InputError):
        bh.expected(bad, 400, 50, "delta")


# ------------------------------------------------------------- between-terminal ↔ per-phase


@pytest.mark.parametrize("c", CASES)
def test_delta_between_matches_numpy_nodal(c):
    ours = bh.between_from_delta(*c)
    ref = [nodal_between(c, p) for p in PAIRS]
    assert ours == pytest.approx(ref, rel=1e-10)


@pytest.mark.parametrize("c", CASES)
def test_delta_inverse_recovers_elements_from_numpy_readings(c):
    readings = [nodal_between(c, p) for p in PAIRS]
    assert bh.delta_from_between(*readings) == pytest.approx(c, rel=1e-9)


def test_delta_inverse_random_against_numpy():
    rng = np.random.default_rng(7)
    for _ in range(200):
        c = tuple(rng.uniform(1e-6, 1e-3, 3))
        readings = [nodal_between(c, p) for p in PAIRS]
        assert bh.delta_from_between(*readings) == pytest.approx(c, rel=1e-8)


@pytest.mark.parametrize("c", CASES)
def test_wye_between_and_inverse_against_numpy(c):
    readings = [nodal_between_wye(c, p) for p in PAIRS]
    assert bh.between_from_wye(*c) == pytest.approx(readings, rel=1e-10)
    assert bh.wye_from_between(*readings) == pytest.approx(c, rel=1e-9)


@needs_ngspice
@pytest.mark.parametrize("c", CASES[1:3])
def test_delta_between_against_ngspice(c):
    """ngspice AC solution of the same delta: 1 A injected into one terminal, the other of the
    pair is ground (node 0), the third floats. The floating terminals get 1 TΩ to ground for a
    DC path; at 50 Hz a 1 TΩ shunt changes admittances of order 0.01–0.1 S by about 1e-11."""
    names = ["l1", "l2", "l3"]
    readings = []
    for a, b in PAIRS:
        node = {k: names[k] for k in range(3)}
        node[b] = "0"
        body = (
            f"C12 {node[0]} {node[1]} {c[0]!r}\n"
            f"C23 {node[1]} {node[2]} {c[1]!r}\n"
            f"C31 {node[2]} {node[0]} {c[2]!r}\n"
            + "".join(f"R{names[k]} {names[k]} 0 1e12\n" for k in range(3) if k != b)
        )
        z = impedance_at(body, [50.0], node=names[a])[0]
        assert abs(z.real) < 1e-6 * abs(z)
        readings.append(1.0 / (W50 * abs(z)))
    assert bh.between_from_delta(*c) == pytest.approx(readings, rel=1e-6)
    assert bh.delta_from_between(*readings) == pytest.approx(c, rel=1e-6)


@needs_ngspice
def test_wye_between_against_ngspice():
    c = CASES[2]
    readings = []
    for a, b in PAIRS:
        names = ["l1", "l2", "l3"]
        node = dict(enumerate(names))
        node[b] = "0"
        body = "".join(f"C{k} {node[k]} n {c[k]!r}\n" for k in range(3)) + "Rn n 0 1e12\n"
        body += "".join(f"R{names[k]} {names[k]} 0 1e12\n" for k in range(3) if k != b)
        z = impedance_at(body, [50.0], node=names[a])[0]
        readings.append(1.0 / (W50 * abs(z)))
    assert bh.wye_from_between(*readings) == pytest.approx(c, rel=1e-6)


def test_open_delta_element_reads_zero():
    # element 12 open (blown fuse): the meter across L1–L2 sees only C23 and C31 in series
    c = (0.0, 327e-6, 290e-6)
    readings = [nodal_between(c, p) for p in PAIRS]
    got = bh.delta_from_between(*readings)
    assert got[0] == pytest.approx(0.0, abs=1e-12)
    assert got[1:] == pytest.approx(c[1:], rel=1e-9)
    # with ±1 % meter error the open element still reads open and the others within a few %
    noisy = [readings[0] * 1.01, readings[1] * 0.99, readings[2] * 1.005]
    got = bh.delta_from_between(*noisy)
    assert got[0] < 0.1 * 327e-6
    assert got[1] == pytest.approx(327e-6, rel=0.04) and got[2] == pytest.approx(290e-6, rel=0.04)
    assert bh.verdict(100 * got[0] / 331.6e-6, bh.BANDS["iec60831"]) == "open"


def test_impossible_readings_refused():
    # 1/M12 larger than 1/M23 + 1/M31 cannot come from any capacitor network (triangle rule)
    with pytest.raises(InputError):
        bh.delta_from_between(100e-6, 480e-6, 480e-6)
    with pytest.raises(InputError):
        bh.wye_from_between(100e-6, 480e-6, 480e-6)
    with pytest.raises(InputError):
        bh.delta_from_between(0.0, 480e-6, 480e-6)
    with pytest.raises(InputError):
        bh.per_phase_from_between([480e-6, 480e-6], "delta")


# ----------------------------------------------------------------------------- line currents


@pytest.mark.parametrize("connection", ["delta", "wye", "wye_n"])
@pytest.mark.parametrize("c", CASES[:3])
def test_currents_inverse_against_numpy_phasors(c, connection):
    i = numpy_line_currents(c, 400.0, W50, connection)
    assert [abs(x) for x in bh.line_currents(c, 400.0, 50.0, connection)] == pytest.approx(list(i), rel=1e-10)
    assert bh.per_phase_from_currents(list(i), 400.0, 50.0, connection) == pytest.approx(c, rel=1e-8)


def test_delta_element_currents_random_against_numpy():
    rng = np.random.default_rng(11)
    for _ in range(300):
        c = rng.uniform(10e-6, 500e-6, 3)
        i = numpy_line_currents(c, 415.0, W50, "delta")
        y = np.array(bh.delta_element_currents(*i))
        assert y == pytest.approx(W50 * c * 415.0, rel=1e-7)


def test_delta_open_element_from_currents():
    c = (329e-6, 0.0, 290e-6)  # element 23 open
    i = numpy_line_currents(c, 400.0, W50, "delta")
    got = bh.per_phase_from_currents(list(i), 400.0, 50.0, "delta")
    assert got == pytest.approx(c, abs=1e-9)


def test_impossible_currents_refused():
    with pytest.raises(InputError):  # one current larger than the other two together
        bh.delta_element_currents(10.0, 10.0, 25.0)
    with pytest.raises(InputError):  # a triangle, but with an angle far above 120°
        bh.delta_element_currents(10.0, 10.0, 19.5)


@needs_ngspice
@pytest.mark.parametrize("connection", ["delta", "wye", "wye_n"])
def test_currents_inverse_against_ngspice(connection):
    """ngspice AC solution: three sources 230.94 V at 0°, −120°, +120° (400 V line-to-line),
    line currents read through current-controlled voltage sources (H elements, 1 V per A)."""
    c = CASES[2]
    vp = 400 / math.sqrt(3)
    body = (
        f"V1 s1 0 dc 0 ac {vp!r} 0\nV2 s2 0 dc 0 ac {vp!r} -120\nV3 s3 0 dc 0 ac {vp!r} 120\n"
        "Vm1 s1 l1 dc 0\nVm2 s2 l2 dc 0\nVm3 s3 l3 dc 0\n"
        "H1 h1 0 Vm1 1\nH2 h2 0 Vm2 1\nH3 h3 0 Vm3 1\n"
    )
    if connection == "delta":
        body += f"C12 l1 l2 {c[0]!r}\nC23 l2 l3 {c[1]!r}\nC31 l3 l1 {c[2]!r}\n"
    elif connection == "wye":
        body += "".join(f"C{k} l{k + 1} n {c[k]!r}\n" for k in range(3)) + "Rn n 0 1e12\n"
    else:
        body += "".join(f"C{k} l{k + 1} 0 {c[k]!r}\n" for k in range(3))
    res = ac_node_voltages(body, [50.0], ["h1", "h2", "h3"])
    i_spice = [abs(res[h][0]) for h in ("h1", "h2", "h3")]
    assert [abs(x) for x in bh.line_currents(c, 400.0, 50.0, connection)] == pytest.approx(i_spice, rel=1e-6)
    assert bh.per_phase_from_currents(i_spice, 400.0, 50.0, connection) == pytest.approx(c, rel=1e-6)


@needs_ngspice
def test_floating_star_shift_and_kvar_against_ngspice():
    """Element voltages of an unequal floating wye (the star point moves) against ngspice, and
    the per-phase kvar Q = ωC|V|² that follow from them."""
    c = CASES[2]
    vp = 400 / math.sqrt(3)
    body = (
        f"V1 l1 0 dc 0 ac {vp!r} 0\nV2 l2 0 dc 0 ac {vp!r} -120\nV3 l3 0 dc 0 ac {vp!r} 120\n"
        + "".join(f"C{k} l{k + 1} n {c[k]!r}\n" for k in range(3)) + "Rn n 0 1e12\n"
    )
    res = ac_node_voltages(body, [50.0], ["l1", "l2", "l3", "n"])
    vn = res["n"][0]
    v_el_spice = [res[f"l{k}"][0] - vn for k in (1, 2, 3)]
    ours = bh.element_voltages(c, 400.0, 50.0, "wye")
    for a, b in zip(ours, v_el_spice):
        assert abs(a - b) < 1e-6 * abs(b)
    q_ref = [W50 * ck * abs(v) ** 2 / 1000 for ck, v in zip(c, v_el_spice)]
    assert bh.phase_kvar(c, 400.0, 50.0, "wye") == pytest.approx(q_ref, rel=1e-6)


def test_balanced_bank_kvar_is_nameplate():
    # a healthy bank at rated voltage gives its rated kvar (Q = ωCV² inverted): 50 kvar
    for conn in ("delta", "wye", "wye_n"):
        e = bh.expected(50, 400, 50, conn)
        assert sum(bh.phase_kvar((e.c_phase,) * 3, 400, 50, conn)) == pytest.approx(50.0, rel=1e-12)


# -------------------------------------------------------------------------- balance measures


def test_imbalance_and_ratio():
    # NEMA-style unbalance: max deviation from mean / mean. 329, 327, 290: mean 315.333,
    # largest deviation 25.333 → 8.034 % (hand arithmetic); ratio 329/290 = 1.1345
    assert bh.imbalance_percent([329, 327, 290]) == pytest.approx(8.034, rel=1e-3)
    assert bh.max_min_ratio([329, 327, 290]) == pytest.approx(1.1345, rel=1e-4)
    assert bh.max_min_ratio([1, 0, 1]) == math.inf


# --------------------------------------------------------------------------- tolerance bands


# Band edges [% deviation] and their sources:
#  IEC 60831-1: −5 % to +10 % of rated capacitance (from memory; maker datasheets quote −5/+10)
#  IEEE Std 18-2002/2012: 100 % to 110 % of rated kvar (from memory)
#  IEEE Std 18-1992: not less than rated and not more than 115 % of rated kvar (published text)
EDGES = {"iec60831": (-5.0, 10.0), "ieee18": (0.0, 10.0), "ieee18_1992": (0.0, 15.0)}


@pytest.mark.parametrize("key", sorted(EDGES))
def test_band_edges(key):
    lo, hi = EDGES[key]
    band = bh.BANDS[key]
    assert (band.lo, band.hi) == (lo, hi)
    assert bh.verdict(100 + lo, band) == "ok"  # at the lower edge
    assert bh.verdict(100 + lo + 0.01, band) == "ok"  # just inside
    assert bh.verdict(100 + lo - 0.01, band) == "low"  # just outside
    assert bh.verdict(100 + hi, band) == "ok"  # at the upper edge
    assert bh.verdict(100 + hi - 0.01, band) == "ok"
    assert bh.verdict(100 + hi + 0.01, band) == "high"
    assert bh.verdict(100.0 + (lo + hi) / 2, band) == "ok"


@pytest.mark.parametrize("key", sorted(EDGES))
def test_band_edges_through_real_capacitances(key):
    """The edge reached the way the sheet computes it (measured C ÷ expected C), where floating
    point may land a hair either side of the edge."""
    lo, hi = EDGES[key]
    band = bh.BANDS[key]
    for q, v, f in ((50, 400, 50), (37.5, 480, 60), (600, 13800, 60)):
        e = bh.expected(q, v, f, "delta")
        for edge, outside in ((lo, "low"), (hi, "high")):
            c_edge = e.c_phase * (1 + edge / 100)
            assert bh.verdict(100 * c_edge / e.c_phase, band) == "ok"
            step = 1e-4 * (1 if outside == "high" else -1)
            assert bh.verdict(100 * c_edge * (1 + step) / e.c_phase, band) == outside


def test_open_and_custom_band():
    band = bh.custom_band(-8, 10)
    assert bh.verdict(92.0, band) == "ok" and bh.verdict(91.99, band) == "low"
    assert bh.verdict(9.0, band) == "open"
    with pytest.raises(InputError):
        bh.custom_band(5, 5)
    with pytest.raises(InputError):
        bh.verdict(float("nan"), band)
    for band in bh.BANDS.values():
        assert band.source and band.label
