"""Run ngspice (Debian's, batch mode) as an independent reference for AC network checks.

``ac_node_voltages(netlist_body, freqs, nodes)`` runs one AC analysis per frequency list and
returns complex node voltages. Tests that use it skip with a clear reason if ngspice is absent
(the README's test command installs it on Debian).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import tempfile

import pytest

NGSPICE = shutil.which("ngspice")

needs_ngspice = pytest.mark.skipif(NGSPICE is None, reason="ngspice not installed (apt-get install ngspice)")


def ac_node_voltages(body: str, freqs: list[float], nodes: list[str]) -> dict[str, list[complex]]:
    """Run an AC analysis at each frequency in ``freqs`` [Hz] for the netlist ``body``
    (elements only, no .ac/.end) and return {node: [V(node) at each f]} as complex numbers.

    A 1 A AC current source into a node gives that node's driving-point impedance as V.
    """
    if NGSPICE is None:
        pytest.skip("ngspice not installed")
    out: dict[str, list[complex]] = {n: [] for n in nodes}
    for f in freqs:
        _, v = _run_ac(body, f".ac lin 1 {f!r} {f!r}", nodes, timeout=60)
        for n in nodes:
            out[n].append(v[n][-1])
    return out


def _run_deck(head: str, vectors: str, timeout: float) -> list[list[str]]:
    """Run a deck (``head``: title, netlist and analysis line) in batch mode, writing ``vectors``
    with ``wrdata``; the output's lines split into fields (the first holds the vector names)."""
    if NGSPICE is None:
        pytest.skip("ngspice not installed")
    with tempfile.TemporaryDirectory() as tmp:
        data = os.path.join(tmp, "out.txt")
        deck = (f"{head}.control\nset wr_singlescale\nset wr_vecnames\noption numdgt=12\nrun\n"
                f"wrdata {data} {vectors}\n.endc\n.end\n")
        path = os.path.join(tmp, "deck.cir")
        with open(path, "w") as fh:
            fh.write(deck)
        proc = subprocess.run([NGSPICE, "-b", path], capture_output=True, text=True, timeout=timeout)
        if not os.path.exists(data):
            raise RuntimeError(f"ngspice failed:\n{proc.stdout}\n{proc.stderr}")
        with open(data) as fh:
            return [ln.split() for ln in fh if ln.strip()]


def _run_ac(body: str, analysis: str, nodes: list[str], timeout: float) -> tuple[list[float], dict[str, list[complex]]]:
    """Run one ngspice deck (``body`` + the ``.ac`` line ``analysis``) in batch mode and read back
    (frequencies [Hz], {node: [V(node)…]}) from its ``wrdata`` output."""
    vecs = " ".join(f"v({n})" for n in nodes)
    lines = _run_deck(f"* fieldphasor reference deck\n{body.strip()}\n{analysis}\n", vecs, timeout)
    freqs: list[float] = []
    out: dict[str, list[complex]] = {n: [] for n in nodes}
    for ln in lines[1:]:  # first line: vector names; with wr_singlescale: frequency, then re, im per vector
        row = [float(x) for x in ln]
        freqs.append(row[0])
        for k, n in enumerate(nodes):
            out[n].append(complex(row[1 + 2 * k], row[2 + 2 * k]))
    return freqs, out


def impedance_at(body: str, freqs: list[float], node: str = "n1") -> list[complex]:
    """Driving-point impedance [Ω] at ``node`` (to ground 0): the netlist gets a 1 A AC
    current source injected into ``node``; returns V(node)/1 A at each frequency."""
    deck = f"Iinj 0 {node} dc 0 ac 1\n{body}"
    return ac_node_voltages(deck, freqs, [node])[node]


def ac_sweep(body: str, f_start: float, f_stop: float, points: int, nodes: list[str], spacing: str = "lin") -> tuple[list[float], dict[str, list[complex]]]:
    """One AC analysis swept from ``f_start`` to ``f_stop`` [Hz] (``spacing`` 'lin': ``points``
    in total; 'dec': ``points`` per decade) for the netlist ``body``; returns the frequencies
    ngspice used and {node: [V(node)…]} as complex numbers. Much faster than
    :func:`ac_node_voltages` for many frequencies (one ngspice run)."""
    if spacing not in ("lin", "dec", "oct"):
        raise ValueError("spacing must be lin, dec or oct")
    return _run_ac(body, f".ac {spacing} {int(points)} {f_start!r} {f_stop!r}", nodes, timeout=120)


def impedance_sweep(body: str, f_start: float, f_stop: float, points: int, node: str = "n1", spacing: str = "lin") -> tuple[list[float], list[complex]]:
    """Driving-point impedance [Ω] at ``node`` over one AC sweep (1 A AC source into ``node``):
    returns (frequencies [Hz], [Z…])."""
    freqs, v = ac_sweep(f"Iinj 0 {node} dc 0 ac 1\n{body}", f_start, f_stop, points, [node], spacing)
    return freqs, v[node]


def transient(body: str, t_step: float, t_stop: float, vectors: list[str], t_max: float | None = None,
              timeout: float = 120) -> tuple[list[float], dict[str, list[float]]]:
    """One transient analysis of the netlist ``body`` (elements and any ``.ic`` lines, no
    ``.tran``/``.end``) from 0 to ``t_stop`` [s], printing step ``t_step`` [s] and internal step at
    most ``t_max`` [s] (default ``t_step``), starting from the initial conditions given (``uic``).
    ``vectors`` are ngspice expressions such as ``v(n1)`` or ``i(vmeas)``; returns
    (times [s], {vector: [values…]})."""
    t_max = t_step if t_max is None else t_max
    lines = _run_deck(f"* fieldphasor transient reference deck\n{body.strip()}\n"
                      f".tran {t_step!r} {t_stop!r} 0 {t_max!r} uic\n", " ".join(vectors), timeout)
    times: list[float] = []
    out: dict[str, list[float]] = {v: [] for v in vectors}
    for ln in lines[1:]:  # first line: vector names; then time and one real column per vector
        row = [float(x) for x in ln]
        times.append(row[0])
        for k, v in enumerate(vectors):
            out[v].append(row[1 + k])
    return times, out
