"""The one exception the core raises for input it cannot use."""


class InputError(ValueError):
    """Raised when a value cannot be parsed or lies outside what a method allows.

    The message is written for the person who typed the value: it says what was
    wrong and what would be accepted.
    """
