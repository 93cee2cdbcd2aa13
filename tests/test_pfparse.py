"""The shared power-factor reader (pycore.pfparse). PF = cos φ lies in (0, 1]; lagging for
inductive loads (IEEE Std 141, Red Book, power-factor chapter). A bare number is lagging
(common practice: motors and most plant loads lag)."""

import pytest

from pycore.errors import InputError
from pycore.pfparse import parse_lagging_pf, parse_pf

ACCEPTED = [
    ("0.78", 0.78, False),
    ("0,78", 0.78, False),
    ("78 %", 0.78, False),
    ("78%", 0.78, False),
    ("0.78 lag", 0.78, False),
    ("0.8 lagging", 0.8, False),
    ("0.95 lead", 0.95, True),
    ("0.9 leading", 0.9, True),
    ("0.9 cap", 0.9, True),
    ("0.9 IND", 0.9, False),
    ("95 % lead", 0.95, True),
    ("1", 1.0, False),
    ("100 %", 1.0, False),
]


@pytest.mark.parametrize("text,value,leading", ACCEPTED)
def test_accepted_forms(text, value, leading):
    pf = parse_pf(text)
    assert pf.value == pytest.approx(value, abs=1e-12)
    assert pf.leading is leading


def test_sense_words():
    assert parse_pf("0.9").sense == "lagging"
    assert parse_pf("0.9 lead").sense == "leading"
    assert parse_pf("1").sense == "unity"


REFUSED = [
    ("", "enter a power factor"),
    ("   ", "enter a power factor"),
    ("-0.95", "lead"),  # the sign means leading on some meters and export on others: refused
    ("0", "above 0"),
    ("1.2", "impossible"),
    ("85", "as a percentage"),
    ("120 %", "impossible"),
    ("0.9 fast", "not a power factor"),
    ("lagging", "not a power factor"),
    ("nan", "not a power factor"),
    ("0.9.5", "not a power factor"),
]


@pytest.mark.parametrize("text,word", REFUSED)
def test_refused_with_a_message_for_a_person(text, word):
    with pytest.raises(InputError) as e:
        parse_pf(text)
    msg = str(e.value)
    assert word.lower() in msg.lower(), msg
    assert msg[0].isupper() or msg[0] == "'"


def test_lagging_target():
    assert parse_lagging_pf("95 %") == pytest.approx(0.95)
    assert parse_lagging_pf("1 lead") == 1.0  # unity is neither
    with pytest.raises(InputError, match="lagging"):
        parse_lagging_pf("0.95 lead")
