"""Parse complex quantities typed in rectangular or polar form.

Rectangular: ``12.5 - j4.7``, ``j300``, ``-j0.5m``, ``3+4j``, ``3 + j4 Ω``.
Polar: ``10∠-30`` or ``10<-30`` or ``10 @ -30`` (magnitude, then angle in degrees;
``∠``, ``<`` and ``@`` all mean "at angle"). A ``°`` or ``deg`` after the angle is allowed,
and ``rad`` marks an angle in radians. SI prefixes apply to each number
(``4.7k∠30``) and a trailing unit of the field's family is allowed.
Parsed by hand, never evaluated.
"""

from __future__ import annotations

import cmath
import math
import re

from .errors import InputError
from .numparse import PREFIXES, split_number, unit_scale

_POLAR_MARK = re.compile(r"∠|<|@")


def _strip_unit(s: str, unit: str) -> tuple[str, float]:
    """Remove a trailing unit of the field's family; return (text, scale to field unit)."""
    if not unit:
        return s, 1.0
    fam, field_scale = unit_scale(unit)
    # try longest suffixes first: "kΩ", "Ω", "ohm", "mS"...
    for n in range(min(6, len(s)), 0, -1):
        suffix = s[-n:]
        head = s[:-n]
        if not head or not (head[-1].isdigit() or head[-1] in "jJ." or head[-1] in PREFIXES or head[-1] == " "):
            continue
        try:
            f, sc = unit_scale(suffix)
        except InputError:
            continue
        if f == fam:
            return head.rstrip(), sc / field_scale
    return s, 1.0


def _real(token: str, what: str) -> float:
    value, rest = split_number(token)
    if rest == "":
        return value
    if rest in PREFIXES:
        return value * PREFIXES[rest]
    raise InputError(f"Cannot read '{token}' as the {what}.")


def parse_complex(text: str, unit: str = "") -> complex:
    """Parse a complex quantity (rectangular or polar) and return it as a Python complex.

    ``unit`` is the field's unit (e.g. ``'Ω'``); a trailing unit of the same
    family in the text is converted to it. Raises :class:`InputError` with a
    message for the person who typed it.
    """
    if text is None or not str(text).strip():
        raise InputError("Enter a value, e.g. 12 - j5 or 13∠-22.6.")
    s = str(text).strip().replace("\u2212", "-").replace("·", "")
    s = re.sub(r"\s+", " ", s)
    if s.lower() in ("nan", "inf", "-inf", "infinity"):
        raise InputError("Enter a finite value.")
    s, scale = _strip_unit(s, unit)
    if _POLAR_MARK.search(s):
        parts = _POLAR_MARK.split(s)
        if len(parts) != 2:
            raise InputError("Write polar form as magnitude∠angle, e.g. 13∠-22.6 (degrees).")
        mag_t, ang_t = parts[0].strip(), parts[1].strip()
        if not mag_t:
            raise InputError("The magnitude is missing before the angle mark.")
        if not ang_t:
            raise InputError("The angle is missing after the angle mark.")
        radians = False
        low = ang_t.lower().replace(" ", "")
        for suf in ("°", "deg", "º"):
            if low.endswith(suf):
                low = low[: -len(suf)]
                break
        else:
            if low.endswith("rad"):
                low = low[:-3]
                radians = True
        mag = _real(mag_t, "magnitude")
        if mag < 0:
            raise InputError("The magnitude cannot be negative; add 180° to the angle instead.")
        ang_v, rest = split_number(low)
        if rest:
            raise InputError(f"Cannot read '{ang_t}' as an angle in degrees.")
        ang = ang_v if radians else math.radians(ang_v)
        z = cmath.rect(mag, ang)
        # snap tiny round-off so 5∠90 is exactly j5
        re_, im_ = z.real, z.imag
        if abs(re_) < 1e-15 * mag:
            re_ = 0.0
        if abs(im_) < 1e-15 * mag:
            im_ = 0.0
        return complex(re_, im_) * scale
    return _parse_rect(s) * scale


_TERM = re.compile(r"[+-]?[^+-]+")


def _parse_rect(s: str) -> complex:
    body = s.replace(" ", "")
    # keep exponent signs (1e-3) attached to their number
    terms: list[str] = []
    i = 0
    cur = ""
    while i < len(body):
        ch = body[i]
        if ch in "+-" and cur and not (cur[-1] in "eE" and len(cur) > 1 and (cur[-2].isdigit() or cur[-2] == ".")):
            terms.append(cur)
            cur = ch
        else:
            cur += ch
        i += 1
    if cur:
        terms.append(cur)
    if not terms or len(terms) > 2:
        raise InputError("Write a complex value as a + jb (e.g. 12.5 - j4.7) or in polar form 13∠-22.6.")
    real = 0.0
    imag = 0.0
    seen_re = seen_im = False
    for t in terms:
        sign = -1.0 if t.startswith("-") else 1.0
        t2 = t.lstrip("+-")
        if not t2:
            raise InputError("A sign is not followed by a number.")
        if t2[0] in "jJiI":
            mag_t = t2[1:]
            val = 1.0 if mag_t == "" else _real(mag_t, "imaginary part")
            if seen_im:
                raise InputError("Two imaginary parts: write one a + jb.")
            imag, seen_im = sign * val, True
        elif t2[-1] in "jJiI" and (len(t2) > 1):
            val = _real(t2[:-1], "imaginary part")
            if seen_im:
                raise InputError("Two imaginary parts: write one a + jb.")
            imag, seen_im = sign * val, True
        else:
            val = _real(t2, "real part")
            if seen_re:
                raise InputError("Two real parts: write one a + jb.")
            real, seen_re = sign * val, True
    return complex(real, imag)
