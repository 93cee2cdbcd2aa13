"""Number formatting for results: significant digits, SI prefixes, lead/lag words."""

from __future__ import annotations

import functools
import math

_PREFIX = [(1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p")]


def sig(value: float, digits: int = 4) -> str:
    """Format with ``digits`` significant figures, no exponent for everyday magnitudes."""
    if type(value) is float or type(value) is int:
        return _sig_number(value, digits)
    return _sig(value, digits)


@functools.lru_cache(maxsize=2048)
def _sig_number(value: float, digits: int) -> str:
    # a recompute formats a few hundred numbers, most of them the same as last time: cached by value
    return _sig(value, digits)


def _sig(value: float, digits: int) -> str:
    if value is None:
        return "—"
    if isinstance(value, float) and math.isinf(value):
        return "∞" if value > 0 else "−∞"
    if isinstance(value, float) and math.isnan(value):
        return "—"
    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    if mag >= 9 or mag < -4:
        text = f"{value:.{digits - 1}e}"
        mant, exp = text.split("e")
        return f"{mant}×10^{int(exp)}".replace("-", "−")
    decimals = max(0, digits - 1 - mag)
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text.replace("-", "−")


def si(value: float, unit: str, digits: int = 4) -> str:
    """Format with an SI prefix chosen for the magnitude: ``si(4.7e-6, 'F') == '4.7 µF'``."""
    if value is None or (isinstance(value, float) and (math.isnan(value))):
        return "—"
    if isinstance(value, float) and math.isinf(value):
        return f"{sig(value)} {unit}".strip()
    if value == 0:
        return f"0 {unit}".strip()
    a = abs(value)
    for scale, p in _PREFIX:
        if a >= scale * 0.9995:
            return f"{sig(value / scale, digits)} {p}{unit}".strip()
    scale, p = _PREFIX[-1]
    return f"{sig(value / scale, digits)} {p}{unit}".strip()


def with_unit(value: float, unit: str, digits: int = 4) -> str:
    """Format in the given unit without changing prefix: ``with_unit(152.3, 'kvar')``."""
    return f"{sig(value, digits)} {unit}".strip()


def complex_rect(z: complex, unit: str = "", digits: int = 4) -> str:
    """``12.5 − j4.7 Ω`` style text for a complex value."""
    re_, im_ = z.real, z.imag
    sign = "−" if im_ < 0 else "+"
    body = f"{sig(re_, digits)} {sign} j{sig(abs(im_), digits)}"
    return f"{body} {unit}".strip()


def complex_polar(z: complex, unit: str = "", digits: int = 4) -> str:
    """``13.36 Ω ∠ −20.6°`` style text."""
    mag = abs(z)
    ang = math.degrees(math.atan2(z.imag, z.real)) if mag else 0.0
    return f"{sig(mag, digits)} {unit} ∠ {sig(ang, digits)}°".replace("  ", " ")
