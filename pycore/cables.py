"""Cable size for a capacitor circuit from the ampacity it needs, looked up in an editable table.

The ampacity needed is the conductor basis of :func:`pycore.capacitor.conductor_basis`
(≥ 135 % of rated current, NEC 460.8(A); 1.43 × I_N, IEC 60831-1, from memory), divided by
any derating factor the user applies for ambient temperature or grouping. Two default tables
(copper, three loaded conductors), each row carrying its source; a user may pass rows of their
own (:func:`check_rows`). Above the largest size the lookup offers parallel runs (NEC: only
from 1/0 AWG, NEC 310.10(G), from memory), and refuses beyond :data:`MAX_PARALLEL`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded
from .references import ref

MAX_PARALLEL = 6
"""Most parallel runs offered before the lookup asks for a busbar or a split bank (common practice)."""


@dataclass(frozen=True)
class CableRow:
    """One row: size (label, e.g. '4 AWG' or '35 mm²'), ampacity_a [A], source."""

    size: str
    ampacity_a: float
    source: str


@dataclass(frozen=True)
class CableTable:
    """A table of sizes, smallest first, with the installation it assumes and the smallest size
    that may run in parallel (None: any)."""

    key: str
    title: str
    rows: tuple
    assumptions: str
    parallel_from: str | None


_NEC = ref("nec310_16")
_IEC = ref("iec60364_c")

NEC_CU_75 = CableTable(
    "nec_cu75", "Copper, 75 °C (NEC Table 310.16)",
    tuple(CableRow(s, a, _NEC) for s, a in (
        ("14 AWG", 20), ("12 AWG", 25), ("10 AWG", 35), ("8 AWG", 50), ("6 AWG", 65), ("4 AWG", 85),
        ("3 AWG", 100), ("2 AWG", 115), ("1 AWG", 130), ("1/0 AWG", 150), ("2/0 AWG", 175),
        ("3/0 AWG", 200), ("4/0 AWG", 230), ("250 kcmil", 255), ("300 kcmil", 285), ("350 kcmil", 310),
        ("400 kcmil", 335), ("500 kcmil", 380), ("600 kcmil", 420), ("700 kcmil", 460),
        ("750 kcmil", 475), ("800 kcmil", 490), ("900 kcmil", 520), ("1000 kcmil", 545))),
    "Not more than three current-carrying conductors in a raceway, cable or earth; ambient 30 °C; terminals "
    "rated 75 °C. Small conductors: overcurrent protection at most 15/20/30 A for 14/12/10 AWG (NEC 240.4(D)).",
    "1/0 AWG",
)

IEC_C_PVC = CableTable(
    "iec_c_pvc", "Copper, PVC, method C (IEC 60364-5-52)",
    tuple(CableRow(s, a, _IEC) for s, a in (
        ("1.5 mm²", 17.5), ("2.5 mm²", 24), ("4 mm²", 32), ("6 mm²", 41), ("10 mm²", 57), ("16 mm²", 76),
        ("25 mm²", 96), ("35 mm²", 119), ("50 mm²", 144), ("70 mm²", 184), ("95 mm²", 223),
        ("120 mm²", 259), ("150 mm²", 299), ("185 mm²", 341), ("240 mm²", 403), ("300 mm²", 464))),
    "Reference method C (cable clipped direct to a wall or on an unperforated tray), three loaded conductors, "
    "PVC insulation (70 °C conductor), ambient 30 °C, no grouping with other circuits.",
    None,
)

TABLES = {t.key: t for t in (NEC_CU_75, IEC_C_PVC)}


@guarded
def check_rows(rows, key: str = "custom", title: str = "Own table", assumptions: str = "As entered.",
               parallel_from: str | None = None) -> CableTable:
    """A :class:`CableTable` from rows of (size, ampacity [A]) or (size, ampacity, source) as a
    user enters them: sizes named and distinct, ampacities above zero and rising with size."""
    out = []
    for k, row in enumerate(rows, 1):
        r = tuple(row)
        if len(r) not in (2, 3):
            raise InputError(f"Row {k}: give a size and its ampacity.")
        size = str(r[0]).strip()
        amp = r[1]
        if not size:
            raise InputError(f"Row {k}: the size has no name.")
        if not (isinstance(amp, (int, float)) and math.isfinite(amp)) or amp <= 0:
            raise InputError(f"Row {k}: the ampacity must be a number above zero.")
        out.append(CableRow(size, float(amp), str(r[2]) if len(r) == 3 else "Entered by the user"))
    if not out:
        raise InputError("The cable table has no rows.")
    if len({r.size for r in out}) != len(out):
        raise InputError("Each size may appear only once in the cable table.")
    for a, b in zip(out, out[1:]):
        if b.ampacity_a <= a.ampacity_a:
            raise InputError(f"Ampacities must rise with size: {b.size} ({b.ampacity_a:g} A) after {a.size} ({a.ampacity_a:g} A).")
    if parallel_from is not None and parallel_from not in {r.size for r in out}:
        raise InputError("The smallest size for parallel runs must be one of the table's sizes.")
    return CableTable(key, title, tuple(out), assumptions, parallel_from)


@dataclass(frozen=True)
class CableChoice:
    """The lookup's answer: size (label), runs (parallel conductors per phase), ampacity_a [A]
    of the runs together, needed_a [A], edge ('smallest' when the smallest size already
    suffices, 'table', or 'parallel'), row (the :class:`CableRow`), table (its key)."""

    size: str
    runs: int
    ampacity_a: float
    needed_a: float
    edge: str
    row: CableRow
    table: str


@guarded
def cable_for(needed_a: float, table: CableTable = NEC_CU_75, derating: float = 1.0) -> CableChoice:
    """The smallest size in ``table`` whose ampacity × ``derating`` [-] is at least needed_a [A];
    beyond the largest, the fewest parallel runs (each at least the table's ``parallel_from``
    size), then the smallest size for that many. Raises InputError beyond
    :data:`MAX_PARALLEL` runs. Tables as listed in :data:`TABLES` with their sources."""
    if not (isinstance(needed_a, (int, float)) and math.isfinite(needed_a)) or needed_a < 0:
        raise InputError("The ampacity needed must be zero or more.")
    if not (isinstance(derating, (int, float)) and math.isfinite(derating)) or not 0 < derating <= 1.5:
        raise InputError("The derating factor must be above 0 and at most 1.5.")
    rows = table.rows
    for k, r in enumerate(rows):
        if r.ampacity_a * derating >= needed_a:
            return CableChoice(r.size, 1, r.ampacity_a * derating, needed_a, "smallest" if k == 0 else "table", r, table.key)
    start = 0
    if table.parallel_from is not None:
        start = [r.size for r in rows].index(table.parallel_from)
    for n in range(2, MAX_PARALLEL + 1):
        for r in rows[start:]:
            if n * r.ampacity_a * derating >= needed_a:
                return CableChoice(r.size, n, n * r.ampacity_a * derating, needed_a, "parallel", r, table.key)
    big = rows[-1]
    raise InputError(
        f"More than {MAX_PARALLEL} parallel runs of {big.size} would be needed for {needed_a:.0f} A: feed the bank by busbar "
        "or split it into sections with their own feeders."
    )
