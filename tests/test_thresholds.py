"""Trade thresholds live in pycore as named constants, never as bare numbers in a worksheet.

A worksheet compares against ``pycore`` constants (each with its source beside it), so a
threshold is changed in one place. This test scans ``app/sheets`` for a comparison with, or a
multiplication by, a decimal literal; drawing code marks its layout numbers ``# drawing``.
The rule checked is the project's own house rule.
"""

from __future__ import annotations

import os
import re

from pycore import bankhealth, banksteps, capacitor, supply

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SHEETS = os.path.join(ROOT, "app", "sheets")

# a decimal literal compared with, or multiplying, something; 0.0, 1.0, 100.0 (per cent) and 1000.0 (k) are not thresholds
LITERAL = r"(?<![\w.])(?!(?:0|1|100|1000)\.0\b)\d*\.\d+(?![\w.])"
PATTERNS = [re.compile(rf"[<>]=?\s*{LITERAL}"), re.compile(rf"{LITERAL}\s*\*"), re.compile(rf"\*\s*{LITERAL}")]


def offending_lines() -> list[str]:
    bad = []
    for fn in sorted(os.listdir(SHEETS)):
        if not fn.endswith(".py"):
            continue
        for i, line in enumerate(open(os.path.join(SHEETS, fn), encoding="utf-8"), 1):
            code = line.split("#", 1)[0] if "# drawing" not in line else ""
            code = re.sub(r'"[^"]*"', '""', code)  # numbers inside message text are not code
            if any(p.search(code) for p in PATTERNS):
                bad.append(f"{fn}:{i}: {line.strip()}")
    return bad


def test_no_bare_thresholds_in_worksheets():
    assert offending_lines() == []


def test_the_scan_catches_a_bare_threshold(tmp_path, monkeypatch):
    # the scanner itself: a line like the old "1.3 * i_basis" is caught
    (tmp_path / "x.py").write_text("a = 1.3 * i_basis\nif rise > 3.5:\n    pass\nw = 0.0 * 2\n", encoding="utf-8")
    monkeypatch.setattr(__import__(__name__), "SHEETS", str(tmp_path))
    assert len(offending_lines()) == 2


def test_the_constants_keep_their_published_values():
    # IEC 60831-1: 1.30·I_N, 1.43·I_N with capacitance tolerance (from memory); NEC 460.8: 135 % (source)
    assert capacitor.IEC_CURRENT == 1.30 and capacitor.IEC_CURRENT_TOL == 1.43 and capacitor.NEC_460_8 == 1.35
    # IEEE Std 18 continuous rms voltage limit 110 % (source: 2002 edition)
    assert capacitor.IEEE18_VOLTAGE == 1.10
    # common practice: voltage rise on switching kept under about 3 %; ±0.5 order around a harmonic
    assert supply.VOLTAGE_RISE_LIMIT_PERCENT == 3.0
    # this app's screening choices (common practice)
    assert banksteps.EXCESS_WARN_FRACTION == 0.25 and banksteps.MANY_UNITS_PER_STEP == 6
    assert bankhealth.ABSURD_RATIO == 2.5 and bankhealth.IEC_RATIO_LIMIT == 1.08
