"""Fieldphasor worksheets: declarations, validation, results, figures and reports.

Imports only ``pycore`` and the standard library; never the browser. The worker talks
to this package through :mod:`app.bridge` with JSON strings.
"""

__version__ = "0.1.0"

#: The worksheet the app opens on: the catalog flags it ("opening"), the build writes its form into
#: index.html, and the memory snapshot's probe computes it. Named here only.
OPENING_SHEET = "correction"
