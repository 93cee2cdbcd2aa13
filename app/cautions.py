"""Standard cautions shown where they apply. One wording, reused by every worksheet."""

STORED_CHARGE = (
    "Capacitors hold a lethal charge after disconnection. Wait at least the discharge time on the "
    "nameplate (typically 1 to 5 minutes), then verify zero voltage with a tested meter and short and "
    "earth the terminals before touching."
)
QUALIFIED = (
    "Work on or near energised equipment is for qualified persons only, with lock-out/tag-out, "
    "arc-flash assessment and the right PPE."
)
ESTIMATE = (
    "Results are engineering estimates from the data entered. Local codes, the utility's rules, the "
    "equipment maker's instructions and a licensed engineer's review govern."
)
SCREENING = (
    "Resonance and harmonic checks here are screening estimates; a harmonic study of the real "
    "installation settles the design. Resonance can overheat and destroy capacitors, fuses and transformers."
)
RECLOSING = (
    "A step that drops out stays charged: the controller must wait the reconnection delay before switching "
    "it in again; do not shorten it unless fast-discharge devices are fitted."
)
TEST_DEENERGISED = (
    "Measure capacitance only on units that are de-energised, isolated, discharged and shorted, then "
    "unshorted for the test; follow the maker's instructions for the meter and the capacitor."
)
