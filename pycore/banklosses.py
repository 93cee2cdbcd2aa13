"""The bank's own losses: capacitors, and the reactors of detuned steps, in W per kvar.

Typical values (editable by the caller): low-voltage self-healing capacitors, discharge
resistors included, about 0.2–0.5 W/kvar; detuning reactors about 4–8 W per kvar of the step
(makers' datasheets, from memory). A maker's figure for the units bought governs. The loss is
counted on the kvar actually switched in (at system voltage), for the hours it is in.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, guarded
from .references import ref

CAPACITOR_W_PER_KVAR = 0.5
"""Losses of LV capacitor units with their discharge resistors [W/kvar] (from memory; makers quote 0.2–0.5)."""

REACTOR_W_PER_KVAR = 6.0
"""Losses of a detuning reactor per kvar of its step [W/kvar] (from memory; makers quote about 4–8)."""

SOURCE = ref("practice_bank_losses")


def _nonneg(v, what: str) -> float:
    if not (isinstance(v, (int, float)) and math.isfinite(v)) or v < 0:
        raise InputError(f"{what} must be zero or more.")
    return float(v)


@dataclass(frozen=True)
class BankLosses:
    """capacitors_kw, reactors_kw, other_kw and total_kw [kW] while the given kvar is switched in."""

    capacitors_kw: float
    reactors_kw: float
    other_kw: float
    total_kw: float


@guarded
def bank_losses(q_kvar: float, q_detuned_kvar: float = 0.0, cap_w_per_kvar: float = CAPACITOR_W_PER_KVAR,
                reactor_w_per_kvar: float = REACTOR_W_PER_KVAR, other_w_per_kvar: float = 0.0) -> BankLosses:
    """Losses [kW] of q_kvar [kvar] of capacitors switched in, of which q_detuned_kvar [kvar] sit in
    detuned steps: capacitors cap_w_per_kvar [W/kvar] × q_kvar, reactors reactor_w_per_kvar
    [W/kvar] × q_detuned_kvar, anything else (contactors, fuses, panel wiring) other_w_per_kvar
    [W/kvar] × q_kvar. Typical values :data:`CAPACITOR_W_PER_KVAR`, :data:`REACTOR_W_PER_KVAR`
    (from memory)."""
    q = _nonneg(q_kvar, "The kvar switched in")
    qd = _nonneg(q_detuned_kvar, "The detuned kvar")
    if qd > q * (1 + 1e-12):
        raise InputError("The detuned kvar cannot exceed the kvar switched in.")
    c = q * _nonneg(cap_w_per_kvar, "Capacitor losses") / 1e3
    r = qd * _nonneg(reactor_w_per_kvar, "Reactor losses") / 1e3
    o = q * _nonneg(other_w_per_kvar, "Other losses") / 1e3
    return BankLosses(c, r, o, c + r + o)
