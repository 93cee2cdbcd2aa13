"""Savings from power-factor correction under common bill structures, and simple payback.

Money is in whatever currency the user works in; "per month" means per billing month.
Every function is an estimate of the arithmetic a tariff applies; a real tariff's own
rules (ratchets, minimum demand, rounding, caps, time-of-use periods) govern.

Physics used: for the same real power P at the same voltage, apparent power S = P/PF and
current I ∝ 1/PF, so series (I²R) losses scale as 1/PF² (circuit theory; IEEE Std 141,
Red Book, chapter on power factor, on released capacity and reduced losses).
"""

from __future__ import annotations

import math
from typing import Optional

from .correction import loss_reduction_fraction
from .errors import InputError, guarded
from .survey import reactive_per_kw

MONTHS_PER_YEAR = 12

# How a tariff counts the hundredths of PF below its threshold (tariff wording varies;
# common practice): each 0.01 or part of it, whole 0.01 steps only, or pro rata.
ROUNDINGS = ("part", "whole", "prorata")

# Steps are counted on (threshold − PF)/0.01 rounded to this many decimals first, so that
# typed values such as 0.90 − 0.89 count as exactly one step despite binary floating point.
_STEP_DECIMALS = 6


def _check_pf(pf: float, what: str) -> None:
    if not (isinstance(pf, (int, float)) and 0.0 < pf <= 1.0):
        raise InputError(f"{what} lies above 0 and at most 1.")


@guarded
def kva_demand(p_kw: float, pf: float) -> float:
    """Billed apparent demand S = P/PF [kVA] for a peak real demand P [kW] at PF [dimensionless]."""
    _check_pf(pf, "The power factor")
    if p_kw < 0:
        raise InputError("Demand must not be negative.")
    return p_kw / pf


@guarded
def kva_demand_saving(p_kw: float, pf1: float, pf2: float, price_per_kva_month: float) -> float:
    """Monthly saving [money/month] on a demand charge billed on kVA when PF rises from pf1 to
    pf2 at the same peak P [kW]: price [money per kVA-month] × P(1/pf1 − 1/pf2).

    Released kVA ΔS = P(1/pf1 − 1/pf2) (circuit theory; IEEE Std 141, power factor chapter).
    """
    return price_per_kva_month * (kva_demand(p_kw, pf1) - kva_demand(p_kw, pf2))


@guarded
def penalty_steps(pf: float, threshold: float, rounding: str = "part", step: float = 0.01) -> float:
    """How many steps of ``step`` [PF, 0.01 by default] the PF lies below the threshold.

    ``rounding``: 'part' counts each step or part of it (ceil), 'whole' only whole steps
    (floor), 'prorata' the exact fraction. Zero at or above the threshold. [dimensionless]
    Tariff wording varies; these are the usual three readings (common practice).
    """
    _check_pf(pf, "The power factor")
    _check_pf(threshold, "The PF threshold")
    if rounding not in ROUNDINGS:
        raise InputError(f"Unknown rounding '{rounding}'.")
    if step <= 0:
        raise InputError("The step must be above zero.")
    x = round((threshold - pf) / step, _STEP_DECIMALS)
    if x <= 0:
        return 0.0
    if rounding == "part":
        return float(math.ceil(x))
    if rounding == "whole":
        return float(math.floor(x))
    return x


@guarded
def pf_penalty(
    pf: float,
    threshold: float,
    rate: float,
    mode: str = "percent",
    bill: Optional[float] = None,
    rounding: str = "part",
) -> float:
    """Monthly PF penalty [money/month] charged per 0.01 of PF below a threshold.

    ``mode`` 'percent': ``rate`` [% per 0.01] of ``bill`` [money/month, the charges the
    percentage applies to]; 'amount': ``rate`` [money per 0.01 per month]. Steps from
    :func:`penalty_steps`. Common tariff structure (common practice); the tariff governs.
    """
    if rate < 0:
        raise InputError("The penalty rate must not be negative.")
    steps = penalty_steps(pf, threshold, rounding)
    if mode == "percent":
        if bill is None or bill < 0:
            raise InputError("Enter the monthly charges the percentage applies to.")
        return bill * rate / 100.0 * steps
    if mode == "amount":
        return rate * steps
    raise InputError(f"Unknown penalty mode '{mode}'.")


@guarded
def kvarh_for_pf(kwh: float, pf: float) -> float:
    """Reactive energy [kvarh] that goes with real energy [kWh] at an average lagging PF:
    kWh·tan(acos PF) (power triangle; IEEE Std 141, power factor chapter)."""
    if kwh < 0:
        raise InputError("Energy must not be negative.")
    return kwh * reactive_per_kw(pf)


@guarded
def kvarh_chargeable(kwh: float, kvarh: float, threshold: float) -> float:
    """Reactive energy charged [kvarh]: the kvarh above what the threshold PF allows for the
    period's kWh, max(0, kvarh − kWh·tan(acos PF_threshold)). Common tariff structure
    (common practice); the tariff governs."""
    if kvarh < 0:
        raise InputError("Reactive energy must not be negative.")
    return max(0.0, kvarh - kvarh_for_pf(kwh, threshold))


@guarded
def loss_after_kw(loss_kw: float, pf1: float, pf2: float) -> float:
    """Series (I²R) losses [kW] after correction, from losses ``loss_kw`` [kW] at pf1, at the
    same real power and voltage: loss·(pf1/pf2)² (I ∝ 1/PF; circuit theory). Only losses
    between the supply and the point where the capacitors connect fall."""
    if loss_kw < 0:
        raise InputError("Losses must not be negative.")
    return loss_kw * (1.0 - loss_reduction_fraction(pf1, pf2))


@guarded
def loss_saving(loss_kw: float, pf1: float, pf2: float, hours_per_month: float, price_per_kwh: float) -> tuple[float, float]:
    """Energy [kWh/month] and money [money/month] saved by reduced I²R losses:
    ΔL = L(1 − (pf1/pf2)²) [kW] over ``hours_per_month`` [h] at ``price_per_kwh`` [money/kWh]."""
    if hours_per_month < 0 or price_per_kwh < 0:
        raise InputError("Hours and price must not be negative.")
    d_kw = loss_kw - loss_after_kw(loss_kw, pf1, pf2)
    kwh = d_kw * hours_per_month
    return kwh, kwh * price_per_kwh


@guarded
def yearly(monthly: float) -> float:
    """Yearly amount [money/year] from a monthly one [money/month]: 12 billing months."""
    return monthly * MONTHS_PER_YEAR


@guarded
def simple_payback_years(installed_cost: float, yearly_saving: float) -> float:
    """Simple payback [years] = installed cost [money] / yearly saving [money/year]; infinite
    when nothing is saved. No interest, inflation, maintenance or the capacitors' own
    losses (the usual definition of simple payback, common practice)."""
    if installed_cost < 0:
        raise InputError("The installed cost must not be negative.")
    if yearly_saving <= 0:
        return math.inf
    return installed_cost / yearly_saving


@guarded
def net_of_bank_losses(gross_per_month: float, bank_loss_kw: float, hours_per_month: float,
                       price_per_kwh: float) -> tuple[float, float, float]:
    """The saving after the bank's own losses: (energy the bank uses [kWh/month], its cost
    [money/month], net saving [money/month] = gross − cost). bank_loss_kw [kW] while in
    (:func:`pycore.banklosses.bank_losses`), for hours_per_month [h] at price_per_kwh
    [money/kWh]; gross_per_month [money/month]. Energy = power × time (arithmetic)."""
    if bank_loss_kw < 0 or hours_per_month < 0 or price_per_kwh < 0:
        raise InputError("Losses, hours and price must not be negative.")
    kwh = bank_loss_kw * hours_per_month
    cost = kwh * price_per_kwh
    return kwh, cost, gross_per_month - cost
