"""One declaration per quantity that several worksheets ask for.

Each :class:`Quantity` holds the unit, the limits, the one-tap suggestions and the help text
of one physical quantity. A worksheet builds its field with ``QUANTITY.field(name, ...)`` and
may set the label, the default, ``show_when``, ``group``, ``required`` and a placeholder, and
add a sentence of its own to the help (``note``); it never sets the limits or the unit. So a
value one worksheet accepts, and hands to another through a link, is accepted there too
(``tests/test_links.py`` runs every link over a grid that includes these limits).

How the limits were reconciled (they had drifted between worksheets):

- Voltages: 50 V to 69 kV line-to-line. 50 V is below any power-capacitor application
  (a value under it is a unit typed wrong, e.g. mV for V); 69 kV is the top of the 1–69 kV
  band of IEEE Std 519-2014 Table 1 and covers industrial and distribution buses, where
  the per-unit short-circuit method and the √(S_sc/Q) resonance estimate used here apply.
  A capacitor's rated voltage may lie above its bus (a unit behind a detuning reactor sees
  U/(1 − p), plus a margin), so it may go to 100 kV.
- Frequencies: 16.7 Hz (railway supplies) to 400 Hz (aircraft and ship supplies): every
  power-system fundamental in use (common practice). A harmonic frequency is not a system
  frequency and is not declared here.
- Transformer impedance: 0.5 % to 40 %. No power transformer has less than about 0.5 %
  impedance on its own rating (distribution units are 2–8 %; common practice), and below it
  the short-circuit level (and the resonance order) is wrong by the typing slip that gave it.
- Sizes: a transformer up to 100 MVA; a bank up to 50 Mvar at its bus (the largest banks
  on buses up to 69 kV are tens of Mvar, common practice; it is also 1000 units of the
  correction worksheet's largest default rating, 50 kvar, the most units
  :data:`pycore.banksteps.MAX_UNITS` plans, so a link that carries a need opens a sizing
  that works); a capacitor rated up to 1000 Mvar (so that any bank up to 50 Mvar, rated up
  to three times the voltage it sees as :data:`pycore.capduty.BUS_TO_RATED_VOLTAGE_MAX`
  allows, fits); loads up to 10 GW: bounds for catching a wrong prefix, not design limits.
- Power factor: above 0 and at most 1, as a number (IEEE Std 141 power-factor chapter).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Optional

from .sheet import Column, Field

@dataclass(frozen=True)
class Quantity:
    """Unit, limits, suggestions and help of one quantity; see the module notes for the limits."""

    unit: str
    min: Optional[float] = None
    max: Optional[float] = None
    min_open: bool = False
    max_open: bool = False
    suggest: tuple = ()
    help: str = ""
    label: str = ""
    default: str = ""
    typical: tuple = ()  # values a test grid uses besides the limits

    def field(self, name: str, label: str = "", *, default: Optional[str] = None, required: bool = True,
              show_when: Optional[dict] = None, group: str = "", placeholder: str = "", note: str = "",
              kind: str = "number") -> Field:
        """A worksheet's field of this quantity. ``note`` is added to the shared help."""
        text = " ".join(t for t in (self.help, note) if t)
        return Field(name, label or self.label, kind=kind, unit=self.unit,
                     default=self.default if default is None else default, required=required, help=text,
                     min=self.min, max=self.max, min_open=self.min_open, max_open=self.max_open,
                     suggest=list(self.suggest) if kind == "number" else [], show_when=show_when, group=group,
                     placeholder=placeholder)

    def column(self, name: str, label: str, *, required: bool = True) -> Column:
        """A table column of this quantity (a column's limits are closed at both ends)."""
        return Column(name, label, unit=self.unit, required=required, min=self.min, max=self.max)

    def but(self, **changes) -> "Quantity":
        """The same quantity (same unit and limits) with other suggestions, help, label, default."""
        if {"unit", "min", "max", "min_open", "max_open"} & set(changes):
            raise ValueError("a quantity's unit and limits are set once")
        return replace(self, **changes)

    def admits(self, value: float) -> bool:
        """True when ``value`` passes this quantity's limits."""
        if self.min is not None and (value < self.min or (self.min_open and value == self.min)):
            return False
        if self.max is not None and (value > self.max or (self.max_open and value == self.max)):
            return False
        return True


# --- the supply
SYSTEM_VOLTAGE = Quantity(
    "V", 50, 69_000, suggest=("208", "400", "480", "600", "690"), default="480", label="System voltage (line-to-line)",
    help="Nominal line-to-line voltage of the bus (the supply voltage for single-phase); kV may be typed (0.48 kV).",
    typical=("400", "480", "13800"),
)
MEASURED_VOLTAGE = SYSTEM_VOLTAGE.but(suggest=(), label="Measured voltage (line-to-line)",
                                     help="A reading of the bus voltage, line-to-line.")
SYSTEM_FREQUENCY = Quantity(
    "Hz", 16.7, 400, suggest=("50", "60"), default="50", label="Frequency",
    help="System frequency, 16.7 to 400 Hz.", typical=("50", "60"),
)
TRANSFORMER_KVA = Quantity(
    "kVA", 0, 100_000, min_open=True, suggest=("500", "1000", "1600", "2500"), default="1000",
    label="Transformer rating",
    help="Nameplate rating of the transformer feeding the bus; MVA may be typed (1.6 MVA).",
    typical=("1000", "2500"),
)
TRANSFORMER_Z = Quantity(
    "%", 0.5, 40, suggest=("4", "5.75", "6"), default="6", label="Transformer impedance",
    help="Nameplate impedance in % on the transformer's own rating (0.5 to 40 %).", typical=("5.75", "6"),
)
TRANSFORMER_XR = Quantity(
    "", 0, 100, min_open=True, default="5", label="Transformer X/R ratio",
    help="Reactance over resistance of the transformer, from the maker or a typical table.", typical=("5", "8"),
)
FAULT_MVA = Quantity(
    "MVA", 0, 100_000, min_open=True, default="", label="Upstream fault level",
    help="The utility's short-circuit level at the transformer's primary, from the utility.",
    typical=("250", "500"),
)

# --- capacitors
CAPACITOR_VOLTAGE = Quantity(
    "V", 50, 100_000, suggest=("400", "440", "480", "525", "600"), default="480", label="Capacitor rated voltage",
    help="Nameplate voltage (line-to-line for a three-phase unit).", typical=("440", "480", "525"),
)
CAPACITOR_FREQUENCY = SYSTEM_FREQUENCY.but(label="Rated frequency", help="Nameplate frequency.")
CAPACITOR_KVAR = Quantity(
    "kvar", 0, 1_000_000, min_open=True, default="50", label="Capacitor rated power",
    help="Nameplate kvar at the rated voltage and frequency.", typical=("25", "50"),
)
BANK_KVAR = Quantity(
    "kvar", 0, 50_000, min_open=True, default="200", label="Bank kvar at system voltage",
    help="kvar at the system voltage and frequency.", typical=("50", "200"),
)
EXISTING_KVAR = Quantity(
    "kvar", 0, BANK_KVAR.max, default="0", label="Capacitors already installed",
    help="kvar of fixed capacitors already on this bus, at system voltage. Blank or 0 if none.", typical=("0", "100"),
)

# --- loads
POWER_FACTOR = Quantity(
    "", 0, 1, min_open=True, default="0.95", label="Power factor",
    help="e.g. 0.78, 78 %, 0.78 lag or 0.95 lead (a bare number is lagging).", typical=("0.7", "0.95"),
)
TARGET_POWER_FACTOR = POWER_FACTOR.but(
    suggest=("0.9", "0.92", "0.95", "0.98"), label="Target power factor (lagging)",
    help="The power factor to reach: the utility's threshold plus a margin, or your own goal.",
)
PF_THRESHOLD = POWER_FACTOR.but(
    suggest=("0.85", "0.9", "0.92", "0.95"), default="0.9", label="Power factor threshold",
    help="Below this power factor the tariff charges.",
)
REAL_POWER = Quantity(
    "kW", 0, 10_000_000, min_open=True, default="420", label="Real power",
    help="kW, MW or W.", typical=("90", "420"),
)
APPARENT_POWER = Quantity(
    "kVA", 0, 10_000_000, min_open=True, default="540", label="Apparent power",
    help="kVA, VA or MVA.", typical=("540",),
)

# --- the harmonic bus model
DAMPING_LOAD = Quantity(
    "kW", 0, REAL_POWER.max, default="", label="Resistive load (damping)",
    help="Load that damps resonance, modelled as a resistance V²/P (heaters, lighting, resistive process load); "
         "leave out motors and drives. Empty or 0: no damping (the highest peaks).", typical=("0", "300"),
)
RUNNING_MOTORS = Quantity(
    "kVA", 0, APPARENT_POWER.max, default="", label="Running motors",
    help="Direct-on-line motors running: their locked-rotor reactance parallels the supply and moves resonances up. "
         "Empty or 0: none.", typical=("0", "400"),
)
