"""Typed-text strategies (hypothesis) shared by the worksheets' never-crashes tests: what a person
might type into a field, units and stray characters included."""

from hypothesis import strategies as st


# the resonance worksheets (LC resonance, bus scan)
RESONANCE_TEXT = st.one_of(
    st.text(max_size=12),
    st.from_regex(r"-?[0-9]{0,6}([.,][0-9]{0,4})?(e-?[0-9]{1,3})? ?(k|M|m|µ|n)?(V|Hz|kVA|%|kW|kvar|H|F|Ω)?", fullmatch=True),
)


# the harmonic worksheets (detuned bank, capacitor duty)
HARMONIC_TEXT = st.one_of(
    st.sampled_from(["", "0", "-1", "1e400", "nan", "inf", "5,67", "7 %", "0.2 Mvar", "abc", "∞", "1/0", "[]", "50 Hz"]),
    st.text(max_size=12),
)


# the field-check worksheets (bank health, motor capacitor)
FIELD_CHECK_TEXT = st.one_of(st.sampled_from(["", "0", "-1", "1e308", "1e-300", "5e-324", "nan", "1e-12", "9e15"]),
                  st.text(max_size=12), st.floats(allow_nan=True, allow_infinity=True).map(repr))
