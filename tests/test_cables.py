"""pycore.cables: the tables as entered (source beside each row), lookups at each table edge,
parallel runs and derating."""

import pytest

from pycore import cables
from pycore.errors import InputError


# NEC Table 310.16, copper, 75 °C column (from memory): size → ampacity [A]
NEC_75_CU = [("14 AWG", 20), ("12 AWG", 25), ("10 AWG", 35), ("8 AWG", 50), ("6 AWG", 65), ("4 AWG", 85),
             ("3 AWG", 100), ("2 AWG", 115), ("1 AWG", 130), ("1/0 AWG", 150), ("2/0 AWG", 175), ("3/0 AWG", 200),
             ("4/0 AWG", 230), ("250 kcmil", 255), ("300 kcmil", 285), ("350 kcmil", 310), ("400 kcmil", 335),
             ("500 kcmil", 380), ("600 kcmil", 420), ("700 kcmil", 460), ("750 kcmil", 475), ("800 kcmil", 490),
             ("900 kcmil", 520), ("1000 kcmil", 545)]
# IEC 60364-5-52 Table B.52.4, method C, copper, PVC, three loaded conductors (from memory)
IEC_C_PVC = [("1.5 mm²", 17.5), ("2.5 mm²", 24), ("4 mm²", 32), ("6 mm²", 41), ("10 mm²", 57), ("16 mm²", 76),
             ("25 mm²", 96), ("35 mm²", 119), ("50 mm²", 144), ("70 mm²", 184), ("95 mm²", 223), ("120 mm²", 259),
             ("150 mm²", 299), ("185 mm²", 341), ("240 mm²", 403), ("300 mm²", 464)]


def test_tables_as_entered_with_their_sources():
    assert [(r.size, r.ampacity_a) for r in cables.NEC_CU_75.rows] == NEC_75_CU
    assert all("310.16" in r.source and "from memory" in r.source for r in cables.NEC_CU_75.rows)
    assert [(r.size, r.ampacity_a) for r in cables.IEC_C_PVC.rows] == IEC_C_PVC
    assert all("60364-5-52" in r.source and "method C" in r.source for r in cables.IEC_C_PVC.rows)
    assert cables.NEC_CU_75.assumptions and cables.IEC_C_PVC.assumptions


@pytest.mark.parametrize("table,needed,size,runs,edge", [
    (cables.NEC_CU_75, 0.0, "14 AWG", 1, "smallest"),     # below the first row
    (cables.NEC_CU_75, 20.0, "14 AWG", 1, "smallest"),    # exactly the first row
    (cables.NEC_CU_75, 20.01, "12 AWG", 1, "table"),
    (cables.NEC_CU_75, 545.0, "1000 kcmil", 1, "table"),  # exactly the last row
    (cables.NEC_CU_75, 546.0, "300 kcmil", 2, "parallel"),  # 2 × 285 = 570 A ≥ 546 > 2 × 255
    (cables.NEC_CU_75, 250.0, "250 kcmil", 1, "table"),
    (cables.NEC_CU_75, 3270.0, "1000 kcmil", 6, "parallel"),  # the last size at the most runs
    (cables.IEC_C_PVC, 17.5, "1.5 mm²", 1, "smallest"),
    (cables.IEC_C_PVC, 464.0, "300 mm²", 1, "table"),
    (cables.IEC_C_PVC, 465.0, "120 mm²", 2, "parallel"),  # 2 × 259 = 518 ≥ 465 > 2 × 223
])
def test_lookup_at_each_edge(table, needed, size, runs, edge):
    c = cables.cable_for(needed, table)
    assert (c.size, c.runs, c.edge) == (size, runs, edge)
    assert c.ampacity_a >= needed


def test_nec_parallel_runs_start_at_1_0():
    # NEC 310.10(G), from memory: conductors in parallel only 1/0 AWG and larger
    c = cables.cable_for(560.0, cables.NEC_CU_75)
    sizes = [s for s, _ in NEC_75_CU]
    assert sizes.index(c.size) >= sizes.index("1/0 AWG")


def test_beyond_the_table_and_the_runs_a_clear_message():
    with pytest.raises(InputError, match="parallel runs"):
        cables.cable_for(3271.0, cables.NEC_CU_75)


def test_derating_and_own_table():
    c = cables.cable_for(60.0, cables.NEC_CU_75, derating=0.8)  # 65 × 0.8 = 52 < 60 ≤ 85 × 0.8 = 68
    assert c.size == "4 AWG"
    own = cables.check_rows([("A", 10), ("B", 20, "maker's table")])
    assert cables.cable_for(15, own).size == "B" and own.rows[1].source == "maker's table"
    for bad in ([("A", 10), ("B", 10)], [("A", 10), ("A", 20)], [("A", -1)], [], [("", 5)]):
        with pytest.raises(InputError):
            cables.check_rows(bad)
