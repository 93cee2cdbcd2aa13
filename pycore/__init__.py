"""Fieldphasor engineering core: pure-Python phasor, impedance and power-factor functions.

Standard library only, so the same code runs in CPython and in Pyodide. Nothing here
imports from ``app`` or touches the browser.
"""

__all__ = ["InputError"]

from .errors import InputError
