"""One module per worksheet; each defines ``SHEET``. Discovered by :mod:`app.registry`."""
