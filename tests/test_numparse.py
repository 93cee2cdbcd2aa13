"""Quantity parsing: every accepted notation, and rejections with a clear message."""

import math

import pytest

from pycore.errors import InputError
from pycore.numparse import parse_number, parse_quantity

# SI prefixes per the SI Brochure (BIPM, 9th ed., Table 7): p 1e-12 … G 1e9.
ACCEPTED = [
    ("480", "V", 480.0),
    ("0.48 kV", "V", 480.0),
    ("0,48 kV", "V", 480.0),  # comma decimal mark
    ("13.8kV", "kV", 13.8),
    ("150", "kvar", 150.0),
    ("0.2 Mvar", "kvar", 200.0),
    ("200000 var", "kvar", 200.0),
    ("4.7u", "F", 4.7e-6),
    ("4.7 µF", "µF", 4.7),
    ("4.7 μF", "µF", 4.7),  # Greek mu as well as the micro sign
    ("1 mF", "µF", 1000.0),
    ("680n", "F", 680e-9),
    ("2.2 kΩ", "Ω", 2200.0),
    ("2.2k ohm", "Ω", 2200.0),
    ("5 mΩ", "Ω", 0.005),
    ("1e3", "", 1000.0),
    ("4.7E-6 F", "F", 4.7e-6),
    ("−5", "", -5.0),  # typographic minus
    ("1 000", "", 1000.0),  # a space as thousands separator is dropped
    ("95 %", "%", 95.0),
    ("2 MW", "kW", 2000.0),
    ("250 kVA", "kVA", 250.0),
    ("1200 kWh", "kWh", 1200.0),
    ("3.5 Mvarh", "kvarh", 3500.0),
]


@pytest.mark.parametrize("text,unit,expected", ACCEPTED)
def test_accepted(text, unit, expected):
    assert parse_quantity(text, unit) == pytest.approx(expected, rel=1e-12)


def test_horsepower_is_745_7_watts():
    # 1 hp (mechanical) = 550 ft·lbf/s = 745.699872 W (NIST SP 811, Appendix B.8).
    assert parse_quantity("100 hp", "kW") == pytest.approx(74.5699872, rel=1e-9)


REJECTED = [
    ("", "Enter a value"),
    ("   ", "Enter a value"),
    ("abc", "does not start with a number"),
    ("1.2.3", "decimal mark"),
    ("1,2.3", "decimal mark"),
    ("nan", "finite"),
    ("inf", "finite"),
    ("-infinity", "finite"),
    ("1e999", "too large"),
    ("5 kg", "Unknown unit"),
    ("5 kVA", "not a unit of"),  # apparent power typed into a kW field
    ("12 34", None),  # two numbers
]


@pytest.mark.parametrize("text,fragment", REJECTED)
def test_rejected_with_message(text, fragment):
    with pytest.raises(InputError) as e:
        parse_quantity(text, "kW")
    assert str(e.value)
    if fragment:
        assert fragment in str(e.value)


def test_markup_is_not_a_number():
    with pytest.raises(InputError):
        parse_number("<script>alert(1)</script>")


def test_plain_number_field_refuses_units():
    with pytest.raises(InputError, match="plain number"):
        parse_quantity("5 V", "")


def test_mega_and_milli_are_distinct():
    # 'MF' (megafarad) vs 'mF' (millifarad): case decides the prefix (SI Brochure).
    assert parse_quantity("1 MF", "F") == 1e6
    assert parse_quantity("1 mF", "F") == pytest.approx(1e-3)
    assert math.isclose(parse_quantity("1 MW", "W"), 1e6)
