"""One reader for power factors as people type them, shared by every worksheet.

Accepted: ``0.78``, ``0,78``, ``78 %``, ``78%``, ``0.78 lag``, ``0.95 lead``, ``0.8 lagging``,
``0.9 leading``, ``0.9 ind``/``0.9 cap`` (inductive/capacitive). A bare number is lagging,
the usual case for motors and most plant loads (common practice).

Refused, each with a message that says what to write instead:

* a negative power factor such as ``-0.95``. Meters disagree on what the sign means: some
  show a leading power factor as negative, others show reverse (exported) power that way
  (the IEC and IEEE sign conventions differ), so the sign cannot be read safely. The message
  asks for ``0.95 lead`` or ``0.95 lag``;
* 0 (no real power) and anything above 1 (or above 100 %), which no load can have;
* text that is not a number with one of the words above.

Power factor PF = P/S = cos φ (circuit theory; IEEE Std 141, Red Book, power-factor chapter).
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import InputError, guarded
from .numparse import split_number

LAG_WORDS = frozenset({"lag", "lagging", "lg", "ind", "inductive"})
LEAD_WORDS = frozenset({"lead", "leading", "ld", "cap", "capacitive"})

EXAMPLES = "e.g. 0.85, 85 %, 0.85 lag or 0.95 lead"


@dataclass(frozen=True)
class PowerFactor:
    """A power factor read from text. ``value`` in (0, 1] [dimensionless]; ``leading`` True
    for a leading (capacitive) load; ``sense`` 'lagging', 'leading' or 'unity'."""

    value: float
    leading: bool

    @property
    def sense(self) -> str:
        if self.value == 1.0:
            return "unity"
        return "leading" if self.leading else "lagging"


def _short(text: object, n: int = 24) -> str:
    s = str(text).strip()
    return s if len(s) <= n else s[: n - 1] + "…"


@guarded
def parse_pf(text: str) -> PowerFactor:
    """Read a typed power factor (see the module notes for what is accepted) and return a
    :class:`PowerFactor` [dimensionless]. Raises :class:`InputError` with a message for a
    person otherwise. PF = cos φ (circuit theory)."""
    if text is None or not str(text).strip():
        raise InputError("Enter a power factor, " + EXAMPLES + ".")
    try:
        value, rest = split_number(text)
    except InputError as e:  # keep the number reader's reason (decimal mark, not finite ...)
        raise InputError(f"'{_short(text)}' is not a power factor: {e} Write it as a number, {EXAMPLES}.") from None
    rest = rest.lower()
    percent = rest.startswith("%")
    if percent:
        value /= 100.0
        rest = rest[1:]
    leading = False
    if rest in LEAD_WORDS:
        leading = True
    elif rest and rest not in LAG_WORDS:
        raise InputError(f"'{_short(text)}' is not a power factor; write {EXAMPLES}.")
    if value < 0.0:
        raise InputError(
            "A power factor is not negative (it lies above 0 and at most 1). A minus sign means leading on some "
            "meters and exported power on others: write 'lead' or 'lag' after the number instead (e.g. 0.95 lead)."
        )
    if value == 0.0:
        raise InputError("A power factor of 0 means no real power: enter a value above 0.")
    if value > 1.0 + 1e-12:
        shown = f"{value * 100:g} %" if percent else f"{value:g}"
        hint = " (as a percentage, write e.g. 85 %)" if 1.0 < value <= 100.0 and not percent else ""
        raise InputError(f"A power factor of {shown} is impossible: it lies above 0 and at most 1{hint}.")
    return PowerFactor(min(value, 1.0), leading)


@guarded
def parse_lagging_pf(text: str, what: str = "The target power factor") -> float:
    """Read a power factor that must be lagging or unity (a target for shunt capacitors) and
    return its value [dimensionless]. A leading one is refused with a message: shunt
    capacitors only move a load towards leading (circuit theory)."""
    pf = parse_pf(text)
    if pf.leading and pf.value < 1.0:
        raise InputError(f"{what} is taken as lagging here: capacitors aim at a lagging power factor (e.g. 0.95).")
    return pf.value
