"""Parse numbers and quantities as people type them in the field.

Accepted: an optional sign, digits with a dot *or* a comma as the decimal mark
(``0.95``, ``0,95``), an exponent (``1e3``, ``4.7E-6``), an SI prefix glued to the
number or to a unit (``4.7u``, ``4.7 µF``, ``0.48 kV``), and a unit that belongs
to the quantity asked for. Never evaluated as code.
"""

from __future__ import annotations

import math
import re

from .errors import InputError

# SI prefixes, as on an engineer's calculator. 'u' stands in for the micro sign.
PREFIXES = {
    "p": 1e-12,
    "n": 1e-9,
    "u": 1e-6,
    "µ": 1e-6,
    "μ": 1e-6,
    "m": 1e-3,
    "k": 1e3,
    "K": 1e3,
    "M": 1e6,
    "G": 1e9,
}

_NUMBER = re.compile(r"^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?")
_SPACES = re.compile(r"[\s\u00a0\u202f_']+")
_SPACED_DIGITS = re.compile(r"(?<=\d)[\s\u00a0\u202f_']+(\d+)")

# Unit families: base unit symbols (lower-cased keys) → (family, scale to the family's base).
# The base of every family is the SI unit (W, VA, var, V, A, Hz, Ω, H, F, s, Wh).
_UNIT_SYMBOLS: dict[str, tuple[str, float]] = {
    "w": ("power", 1.0),
    "va": ("apparent", 1.0),
    "var": ("reactive", 1.0),
    "vars": ("reactive", 1.0),
    "var_": ("reactive", 1.0),
    "v": ("voltage", 1.0),
    "a": ("current", 1.0),
    "hz": ("frequency", 1.0),
    "ω": ("impedance", 1.0),
    "Ω": ("impedance", 1.0),
    "ohm": ("impedance", 1.0),
    "ohms": ("impedance", 1.0),
    "s": ("admittance", 1.0),
    "siemens": ("admittance", 1.0),
    "h": ("inductance", 1.0),
    "f": ("capacitance", 1.0),
    "wh": ("energy", 1.0),
    "varh": ("reactive_energy", 1.0),
    "vah": ("apparent_energy", 1.0),
    "%": ("percent", 1.0),
    "hp": ("power", 745.699872),  # mechanical horsepower, 550 ft·lbf/s (common practice)
}

FAMILY_NAMES = {
    "power": "active power (W, kW, MW or hp)",
    "apparent": "apparent power (VA, kVA, MVA)",
    "reactive": "reactive power (var, kvar, Mvar)",
    "voltage": "voltage (V, kV)",
    "current": "current (A, kA, mA)",
    "frequency": "frequency (Hz)",
    "impedance": "impedance (Ω, ohm, kΩ, mΩ)",
    "admittance": "admittance (S, mS)",
    "inductance": "inductance (H, mH, µH)",
    "capacitance": "capacitance (F, mF, µF, nF)",
    "energy": "energy (Wh, kWh, MWh)",
    "reactive_energy": "reactive energy (varh, kvarh, Mvarh)",
    "apparent_energy": "apparent energy (VAh, kVAh)",
    "percent": "percent (%)",
}


def split_number(text: str) -> tuple[float, str]:
    """Split typed text into its leading number and the rest (prefix and unit).

    Returns ``(value, rest)`` where ``rest`` has spaces removed. Raises
    :class:`InputError` with a reason when there is no readable number.
    """
    if text is None:
        raise InputError("Enter a value.")
    raw = str(text).strip()
    if not raw:
        raise InputError("Enter a value.")
    for m in _SPACED_DIGITS.finditer(raw):
        if len(m.group(1)) != 3:  # a space between digits is only a thousands separator
            raise InputError(f"'{_short(raw)}' is not a single number.")
    s = _SPACES.sub("", raw)
    s = s.replace("\u2212", "-")  # typographic minus
    low = s.lower()
    if low.lstrip("+-") in ("nan", "inf", "infinity", "∞"):
        raise InputError("Enter a finite number.")
    m = _NUMBER.match(s)
    if not m:
        raise InputError(f"'{_short(raw)}' does not start with a number.")
    num = m.group(0)
    rest = s[m.end():]
    if num.count(",") + num.count(".") > 1:
        raise InputError("Use one decimal mark (a dot or a comma), not both.")
    if rest[:1] in (".", ","):
        raise InputError("Use one decimal mark (a dot or a comma), and no thousands separators.")
    if rest[:1].isdigit():
        raise InputError(f"'{_short(raw)}' is not a single number.")
    try:
        value = float(num.replace(",", "."))
    except ValueError:  # pragma: no cover - the regex already guarantees a float literal
        raise InputError(f"'{_short(raw)}' is not a number.") from None
    if not math.isfinite(value):
        raise InputError("That number is too large.")
    return value, rest


def _short(text: str, n: int = 24) -> str:
    text = str(text)
    return text if len(text) <= n else text[: n - 1] + "…"


def unit_scale(unit: str) -> tuple[str, float]:
    """Return ``(family, scale)`` for a unit written with an optional SI prefix.

    ``unit_scale('kvar') == ('reactive', 1000.0)``; ``unit_scale('µF') == ('capacitance', 1e-6)``.
    The empty unit is ``('', 1.0)``. Case matters only for prefixes where it
    changes the meaning (m milli vs M mega); unit symbols are read case-blind.
    """
    if unit == "":
        return "", 1.0
    if unit in _UNIT_SYMBOLS:
        return _UNIT_SYMBOLS[unit]
    low = unit.lower()
    if low in _UNIT_SYMBOLS and not (unit[0] in "mM" and len(unit) > 1):
        return _UNIT_SYMBOLS[low]
    # prefix + symbol
    p, sym = unit[0], unit[1:]
    if p in PREFIXES and sym:
        if sym in _UNIT_SYMBOLS:
            fam, sc = _UNIT_SYMBOLS[sym]
        elif sym.lower() in _UNIT_SYMBOLS:
            fam, sc = _UNIT_SYMBOLS[sym.lower()]
        else:
            raise InputError(f"Unknown unit '{unit}'.")
        if fam == "percent":
            raise InputError(f"Unknown unit '{unit}'.")
        return fam, PREFIXES[p] * sc
    if low in _UNIT_SYMBOLS:
        return _UNIT_SYMBOLS[low]
    raise InputError(f"Unknown unit '{unit}'.")


def parse_quantity(text: str, unit: str = "", *, allow_prefix_only: bool = True) -> float:
    """Parse typed text as a quantity and return it in ``unit``.

    ``unit`` is the field's own unit, e.g. ``'kvar'``, ``'V'``, ``'µF'``, ``'%'``
    or ``''`` for a plain number. A bare number is taken as already in ``unit``.
    A number followed by a unit of the same family is converted
    (``parse_quantity('0.2 Mvar', 'kvar') == 200.0``); a bare SI prefix scales
    from the field's base unit (``parse_quantity('4.7u', 'F') == 4.7e-6``).
    Active power accepts horsepower (745.7 W per hp, common practice).
    """
    value, rest = split_number(text)
    if rest == "":
        return value
    if unit and rest == unit.replace(" ", ""):  # the field's own unit as shown beside it (also m, W/kvar)
        return value
    try:
        fam_field, scale_field = unit_scale(unit) if unit else ("", 1.0)
    except InputError:  # a unit outside the families above: only its own spelling is read
        raise InputError(f"Enter the value in {unit}, or a plain number.") from None
    if allow_prefix_only and rest in PREFIXES:
        base = 1.0 if not unit else scale_field
        return value * PREFIXES[rest] / base
    try:
        fam, scale = unit_scale(rest)
    except InputError:
        hint = f" Expected {FAMILY_NAMES[fam_field]}." if fam_field in FAMILY_NAMES else ""
        raise InputError(f"Unknown unit '{_short(rest)}'.{hint}") from None
    if not unit:
        raise InputError(f"This field takes a plain number, not '{_short(rest)}'.")
    if fam != fam_field:
        hint = FAMILY_NAMES.get(fam_field, unit)
        raise InputError(f"'{_short(rest)}' is not a unit of {hint}.")
    return value * scale / scale_field


def parse_number(text: str) -> float:
    """Parse a plain number (no unit), with a dot or comma decimal mark."""
    return parse_quantity(text, "", allow_prefix_only=False)
