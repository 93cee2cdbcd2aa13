"""Numbers written into notes and specifications (plain text, no units handling)."""

from __future__ import annotations

import math


def sig(x: float, n: int = 3) -> str:
    """x to n significant figures, no exponent, no trailing zeros ('5', '16.1', '1200', '59.5')."""
    if not math.isfinite(x):
        return f"{x:g}"
    return f"{float(f'{x:.{n}g}'):.12g}"
