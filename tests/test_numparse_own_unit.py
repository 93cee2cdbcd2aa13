"""A field whose unit is outside the parser's families (metres, W/kvar) reads its own unit as typed;
the prefix reading of a bare 'm' (milli) never applies to a field in metres. Rules: SI prefixes
(BIPM SI Brochure) and this app's own parsing conventions."""

import pytest

from pycore.errors import InputError
from pycore.numparse import parse_quantity


def test_own_unit_spelled_out_is_read_as_is():
    assert parse_quantity("2 m", "m") == 2.0  # metres, not 2 milli-metres
    assert parse_quantity("0.5 W/kvar", "W/kvar") == 0.5
    assert parse_quantity("3", "m") == 3.0


def test_other_units_in_such_a_field_are_refused_with_a_message():
    with pytest.raises(InputError, match="in m"):
        parse_quantity("2 km", "m")


def test_family_units_unchanged():
    assert parse_quantity("0.2 Mvar", "kvar") == pytest.approx(200.0)
    assert parse_quantity("4.7u", "F") == pytest.approx(4.7e-6)
    assert parse_quantity("470 µF", "µF") == pytest.approx(470.0)
