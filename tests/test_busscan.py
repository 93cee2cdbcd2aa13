"""Bus harmonic impedance scan (pycore.busscan) against first principles, ngspice and IEEE Std 1036."""

import math

import numpy as np
import pytest

from pycore import busscan
from pycore.errors import InputError
from spice import impedance_at, impedance_sweep, needs_ngspice


def test_transformer_impedance_first_principles():
    # Per-unit method (IEEE Std 141): Z = (Z%/100)·V²/S. A 1000 kVA, 5.75 % transformer at
    # 480 V: Z = 0.0575·480²/10⁶ = 13.248 mΩ; S_sc = 1000/0.0575 = 17 391 kVA (hand arithmetic).
    m = busscan.bus_model(480, 60, 1000, 5.75)
    assert m.x_src == pytest.approx(0.013248, rel=1e-9)
    assert m.r_src == 0.0
    assert m.s_sc_kva == pytest.approx(17391.3, rel=1e-5)
    # with X/R = 6: R = Z/√37, X = 6R, and |R + jX| is still Z
    m6 = busscan.bus_model(480, 60, 1000, 5.75, x_r=6)
    assert m6.x_src / m6.r_src == pytest.approx(6.0, rel=1e-12)
    assert math.hypot(m6.r_src, m6.x_src) == pytest.approx(0.013248, rel=1e-9)
    # load as resistance: 480²/(250 kW) = 0.9216 Ω per phase (wye equivalent)
    assert busscan.bus_model(480, 60, 1000, 5.75, load_kw=250).r_load == pytest.approx(0.9216, rel=1e-12)
    # upstream 100 MVA adds 480²/10⁸ = 2.304 mΩ of reactance
    assert busscan.bus_model(480, 60, 1000, 5.75, upstream_fault_kva=100e3).x_src == pytest.approx(0.013248 + 0.002304, rel=1e-9)


def test_capacitor_reactance():
    # X_C = V²/Q: 300 kvar at 400 V → 0.5333 Ω per phase (hand arithmetic)
    assert busscan.capacitor_reactance(400, 300) == pytest.approx(160000 / 300000, rel=1e-12)


def test_cumulative_steps():
    assert busscan.cumulative_steps([50, 50, 100]) == [50, 100, 200]
    for bad in ([], [50, 0], [50, -25], [float("nan")]):
        with pytest.raises(InputError):
            busscan.cumulative_steps(bad)


@pytest.mark.parametrize(
    "kwargs",
    [
        dict(v_ll_v=0, f_hz=50, tx_kva=1000, tx_z_percent=6),
        dict(v_ll_v=400, f_hz=-50, tx_kva=1000, tx_z_percent=6),
        dict(v_ll_v=400, f_hz=50, tx_kva=0, tx_z_percent=6),
        dict(v_ll_v=400, f_hz=50, tx_kva=1000, tx_z_percent=0),
        dict(v_ll_v=400, f_hz=50, tx_kva=1000, tx_z_percent=6, x_r=0),
        dict(v_ll_v=400, f_hz=50, tx_kva=1000, tx_z_percent=6, upstream_fault_kva=-1),
        dict(v_ll_v=400, f_hz=50, tx_kva=1000, tx_z_percent=6, load_kw=-10),
    ],
)
def test_bad_model_inputs(kwargs):
    with pytest.raises(InputError):
        busscan.bus_model(**kwargs)


def test_undamped_peak_is_exactly_the_ieee1036_estimate():
    # With a purely reactive supply the parallel resonance is where X_C/h = hX_s, i.e.
    # h = √(X_C/X_s) = √(S_sc/Q) exactly (IEEE Std 1036; Dugan et al.). A resistive load
    # in parallel does not move it (|Y|² = G² + B², minimum where B = 0).
    for load in (None, 300.0):
        m = busscan.bus_model(400, 50, 1600, 6, upstream_fault_kva=500e3, load_kw=load)
        for q in (60, 150, 400, 800):
            p = busscan.find_peak(m, q)
            assert p.order == pytest.approx(math.sqrt(m.s_sc_kva / q), rel=1e-6)
            assert p.freq_hz == pytest.approx(50 * p.order, rel=1e-12)


def test_ieee1036_estimate_error_bound():
    # IEEE Std 1036's h ≈ √(S_sc/Q) neglects resistance. Stated error, checked here over
    # 4–8 % transformers, banks of 2–40 % of the transformer rating and resistive load up to
    # the transformer rating: the scan's peak lies above the estimate by at most
    # (1 + (R/X)²)^¼ − 1 (S_sc counts |Z|, resonance sees only X: 2.7 % at X/R = 3,
    # 1 % at X/R = 5) plus 1.5 % from the damping. So: within 4.2 % for X/R ≥ 3,
    # within 2.5 % for X/R ≥ 5, exact (< 1e-6) for a pure reactance.
    for xr, bound in ((3, 0.042), (5, 0.025), (10, 0.012)):
        worst = 0.0
        for zp in (4, 6, 8):
            for load_frac in (0, 0.25, 0.5, 1.0):
                m = busscan.bus_model(400, 50, 1000, zp, x_r=xr, load_kw=load_frac * 1000 or None)
                for qf in (0.02, 0.05, 0.1, 0.2, 0.4):
                    p = busscan.find_peak(m, qf * 1000)
                    err = p.order / p.estimate - 1
                    assert err >= -1e-9  # resistance only ever moves the peak up here
                    worst = max(worst, err)
        assert worst <= bound, (xr, worst)
        # the leading term alone is reached with no load
        assert worst >= (1 + 1 / xr**2) ** 0.25 - 1 - 1e-6


def test_peak_outside_range():
    m = busscan.bus_model(400, 50, 1000, 6)
    small = busscan.find_peak(m, 2.0)  # √(16667/2) ≈ 91: above the 50th
    assert small.order is None and small.where == "above"
    huge = busscan.find_peak(m, 40000.0)  # above S_sc: below the fundamental
    assert huge.order is None and huge.where == "below"


def test_scan_points_and_peak_inserted():
    m = busscan.bus_model(400, 50, 1250, 6, x_r=5, load_kw=150)
    peaks = busscan.scan(m, [50, 50, 100])
    assert [p.q_kvar for p in peaks] == [50, 100, 200]
    for p in peaks:
        hs = [h for h, _ in p.points]
        assert hs == sorted(hs) and hs[0] == 1.0 and hs[-1] == 50.0
        assert (p.order, p.z_peak) in p.points
        assert max(z for _, z in p.points) == pytest.approx(p.z_peak, rel=1e-9)
    # more kvar → lower resonance (h ∝ 1/√Q, IEEE Std 1036)
    orders = [p.order for p in peaks]
    assert orders == sorted(orders, reverse=True)


def test_bus_impedance_against_numpy_nodal_solution():
    # The bus impedance from a 2-node nodal admittance matrix solved with numpy.linalg
    # (bus node and the node between supply R and L), built independently of busscan.
    v, f, s_t, zp, xr, s_up, p_kw, q = 400.0, 50.0, 1250e3, 6.0, 5.0, 250e6, 150e3, 300e3
    z_t = zp / 100 * v**2 / s_t
    r_s = z_t / math.sqrt(1 + xr**2)
    x_s = r_s * xr + v**2 / s_up
    m = busscan.bus_model(v, f, s_t / 1e3, zp, x_r=xr, upstream_fault_kva=s_up / 1e3, load_kw=p_kw / 1e3)
    for h in (1, 3, 5, 7.3, 11, 25, 49.5):
        y_r, y_l = 1 / r_s, 1 / (1j * h * x_s)
        y_load, y_c = 1 / (v**2 / p_kw), 1j * h * q / v**2
        ybus = np.array([[y_r + y_load + y_c, -y_r], [-y_r, y_r + y_l]])
        vn = np.linalg.solve(ybus, np.array([1.0, 0.0]))
        assert busscan.bus_impedance(m, q / 1e3, h) == pytest.approx(complex(vn[0]), rel=1e-12)


# --- ngspice: the same bus circuit swept in frequency --------------------------------------

BUSES = [
    # (V, f, kVA, Z %, X/R, upstream kVA, load kW, steps kvar) — invented plants
    (400, 50, 1250, 6.0, 5.0, 250e3, 150.0, [50, 50, 100, 100, 100]),
    (480, 60, 1500, 5.75, 8.0, None, None, [100, 200, 200]),
    (690, 50, 2500, 7.0, 3.0, 500e3, 800.0, [150, 150, 300]),
    (400, 50, 630, 4.0, None, None, 60.0, [25, 50, 75, 100]),
]


def _bus_netlist(v, f, kva, zp, xr, up_kva, load_kw, q_kvar):
    # Elements from the nameplate by the per-unit method (IEEE Std 141), per phase:
    z_t = zp / 100 * v**2 / (kva * 1e3)
    r_t = 0.0 if xr is None else z_t / math.sqrt(1 + xr**2)
    x_t = z_t if xr is None else r_t * xr
    x_up = 0.0 if up_kva is None else v**2 / (up_kva * 1e3)
    l_s = (x_t + x_up) / (2 * math.pi * f)
    c = q_kvar * 1e3 / (2 * math.pi * f * v**2)
    lines = [f"Ls n2 0 {l_s!r}", f"C1 n1 0 {c!r}"]
    lines.append(f"Rs n1 n2 {r_t!r}" if r_t > 0 else "Vs n1 n2 dc 0")  # 0 V source = a wire
    if load_kw:
        lines.append(f"Rl n1 0 {v**2 / (load_kw * 1e3)!r}")
    return "\n".join(lines)


@needs_ngspice
@pytest.mark.parametrize("bus", BUSES)
def test_scan_resonance_orders_against_ngspice(bus):
    # ngspice sweeps the bus circuit from 1 to 50 × f in steps of 0.001 order; the |Z|
    # maximum, refined by a parabola through the top three points, gives the resonance
    # order. Our fine search must agree within 0.002 orders.
    v, f, kva, zp, xr, up, load, steps = bus
    m = busscan.bus_model(v, f, kva, zp, x_r=xr, upstream_fault_kva=up, load_kw=load)
    for p in busscan.scan(m, steps):
        freqs, zs = impedance_sweep(_bus_netlist(v, f, kva, zp, xr, up, load, p.q_kvar), f, 50 * f, 49001)
        mags = np.abs(np.array(zs))
        k = int(np.argmax(mags))
        assert 0 < k < len(mags) - 1
        y0, y1, y2 = mags[k - 1], mags[k], mags[k + 1]
        df = freqs[k + 1] - freqs[k]
        f_peak = freqs[k] + 0.5 * df * (y0 - y2) / (y0 - 2 * y1 + y2)
        assert p.order == pytest.approx(f_peak / f, abs=2e-3)
        assert p.z_peak == pytest.approx(float(y1), rel=1e-3)


@needs_ngspice
@pytest.mark.parametrize("bus", BUSES)
def test_scan_impedance_against_ngspice(bus):
    # |Z| at sampled harmonic orders within 0.1 % of ngspice, all steps in.
    v, f, kva, zp, xr, up, load, steps = bus
    m = busscan.bus_model(v, f, kva, zp, x_r=xr, upstream_fault_kva=up, load_kw=load)
    q = sum(steps)
    orders = [1, 2.5, 5, 7, 11, 13, 19.5, 25, 37, 50]
    zs = impedance_at(_bus_netlist(v, f, kva, zp, xr, up, load, q), [h * f for h in orders])
    for h, z_ref in zip(orders, zs):
        assert abs(busscan.bus_impedance(m, q, h)) == pytest.approx(abs(z_ref), rel=1e-3), h
