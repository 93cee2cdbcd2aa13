"""Complex-quantity parsing in rectangular and polar form; checked against cmath."""

import cmath
import math

import pytest

from pycore.complexparse import parse_complex
from pycore.errors import InputError

RECT = [
    ("12.5 - j4.7", complex(12.5, -4.7)),
    ("12,5 - j4,7", complex(12.5, -4.7)),
    ("j300", complex(0, 300)),
    ("-j0.5m", complex(0, -0.5e-3)),
    ("3+4j", complex(3, 4)),
    ("3 + j4 Ω", complex(3, 4)),
    ("-3", complex(-3, 0)),
    ("1e-3+j2e-3", complex(1e-3, 2e-3)),
    ("2.2k - j1k", complex(2200, -1000)),
    ("4 + 3i", complex(4, 3)),
]


@pytest.mark.parametrize("text,expected", RECT)
def test_rectangular(text, expected):
    z = parse_complex(text, "Ω")
    assert z.real == pytest.approx(expected.real, abs=1e-15)
    assert z.imag == pytest.approx(expected.imag, abs=1e-15)


POLAR = [
    ("10∠-30", 10, -30),
    ("10<-30°", 10, -30),
    ("10 @ -30 deg", 10, -30),
    ("4.7k∠30", 4700, 30),
    ("1∠180", 1, 180),
    ("2∠90", 2, 90),
]


@pytest.mark.parametrize("text,mag,deg", POLAR)
def test_polar_matches_cmath_rect(text, mag, deg):
    ref = cmath.rect(mag, math.radians(deg))  # reference: Python's cmath
    z = parse_complex(text, "Ω")
    assert abs(z - ref) <= 1e-12 * mag


def test_polar_radians():
    z = parse_complex("5∠0.5rad")
    assert abs(z - cmath.rect(5, 0.5)) < 1e-12


def test_unit_suffix_scales_to_field_unit():
    assert parse_complex("20 mS", "S") == pytest.approx(0.02)
    assert parse_complex("2 kΩ", "Ω") == pytest.approx(2000)


BAD = [
    ("", "Enter a value"),
    ("3+", "sign"),
    ("1+2+3", "a + jb"),
    ("∠30", "magnitude is missing"),
    ("5∠", "angle is missing"),
    ("-5∠30", "cannot be negative"),
    ("abc", "does not start with a number"),
    ("3 + j4 + j2", None),
    ("j4 + j2", "Two imaginary"),
    ("nan", "finite"),
    ("5∠30∠2", "magnitude∠angle"),
    ("5∠x", None),
]


@pytest.mark.parametrize("text,fragment", BAD)
def test_rejections(text, fragment):
    with pytest.raises(InputError) as e:
        parse_complex(text, "Ω")
    if fragment:
        assert fragment in str(e.value)
