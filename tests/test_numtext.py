"""Numbers in notes: three significant figures, no exponent, no trailing zeros (worked by hand)."""

import math

from pycore.numtext import sig


def test_sig_by_hand():
    assert [sig(x) for x in (5.0, 16.08, 1234.5, 59.53, 0.012345, 100.0)] == ["5", "16.1", "1230", "59.5", "0.0123", "100"]
    assert sig(51.48, 2) == "51" and sig(math.inf) == "inf"
