"""pycore.protection: the rating series as entered (source beside each), and fuse, breaker and
contactor choices worked by hand."""

import pytest

from pycore import protection


# IEC 60269-1 preferred fuse-link ratings (from memory); NEC 240.6(A) standard ratings (from memory)
IEC_FUSES = [2, 4, 6, 10, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125, 160, 200, 250, 315, 400, 500, 630, 800, 1000, 1250]
NEC_RATINGS = [15, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 110, 125, 150, 175, 200, 225, 250, 300, 350, 400,
               450, 500, 600, 700, 800, 1000, 1200, 1600, 2000, 2500, 3000, 4000, 5000, 6000]


def test_rating_series_as_entered():
    assert list(protection.IEC_FUSE_RATINGS) == IEC_FUSES
    assert list(protection.NEC_STANDARD_RATINGS) == NEC_RATINGS


def test_fuse_ranges_by_hand():
    # gG 1.43–1.65 × I_N (common practice): 100 A → 143–165 A; IEC 160 A; NEC 150 A
    f = protection.fuse(100.0, "iec")
    assert (f.lo_a, f.hi_a, f.rating_a, f.in_range) == (pytest.approx(143), pytest.approx(165), 160, True)
    assert protection.fuse(100.0, "nec").rating_a == 150
    # 30 A → 42.9–49.5 A: no IEC rating inside, the next up is 50 A and it is flagged
    g = protection.fuse(30.0, "iec")
    assert g.rating_a == 50 and not g.in_range and "50 A" in g.note
    # 36.08 A → 51.6–59.5 A: the note gives the range as the specification does, so the next
    # rating up (63 A IEC, 60 A NEC) never reads as if it were inside it
    for series, up in (("iec", "63 A"), ("nec", "60 A")):
        n = protection.fuse(36.08, series)
        assert not n.in_range and "51.6–59.5 A" in n.note and f"next one up is {up}, above the range" in n.note
    # beyond the series
    assert protection.fuse(1000.0, "iec").rating_a is None
    assert all(protection.CONFIRM in d.note for d in (f, g, protection.breaker(100.0)))


def test_breaker_and_contactor():
    b = protection.breaker(100.0)
    assert (b.lo_a, b.hi_a, b.rating_a, b.magnetic_min_a) == (pytest.approx(135), pytest.approx(165), 150, pytest.approx(1000))
    assert protection.contactor(50, True, 900, 5000).duty == protection.STANDARD_DUTY
    c = protection.contactor(50, False, 9000, 5000)
    assert c.duty == protection.CAPACITOR_DUTY and c.min_current_a == pytest.approx(67.5)  # 1.35 × 50 (NEC 460.8)
    assert protection.contactor(50, False, 4000, 5000).duty == protection.STANDARD_DUTY
    assert protection.contactor(50, False, 4000, 5000, "iec").min_current_a == pytest.approx(71.5)  # 1.43 × 50
