"""Small SVG builder for the app's own figures: escaped text, lines, simple charts.

Uses presentation attributes only (no ``style=``), so figures pass a strict
Content-Security-Policy. Colours come from CSS custom properties through classes
(``fp-axis``, ``fp-s1``…) that the shell's stylesheet defines for each theme.
"""

from __future__ import annotations

import math
from typing import Iterable, Sequence
_ESCAPES = str.maketrans({"&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;"})


def esc(text: object) -> str:
    """Escape any text for SVG/HTML element content and attribute values.

    (A translate table rather than xml.sax.saxutils: that module pulls in urllib at import,
    which costs about half a second in the browser.)"""
    return str(text).translate(_ESCAPES)


def _n(v: float) -> str:
    return f"{v:.2f}".rstrip("0").rstrip(".")


class Svg:
    """Accumulate SVG elements; ``str(svg)`` gives the document."""

    def __init__(self, width: int, height: int, title: str, desc: str = ""):
        self.w, self.h = width, height
        self.title, self.desc = title, desc
        self.parts: list[str] = []

    def line(self, x1, y1, x2, y2, cls="fp-axis", dash: str = "", width: float = 1.5):
        d = f' stroke-dasharray="{dash}"' if dash else ""
        self.parts.append(
            f'<line x1="{_n(x1)}" y1="{_n(y1)}" x2="{_n(x2)}" y2="{_n(y2)}" class="{cls}" stroke-width="{_n(width)}"{d}/>'
        )

    def arrow(self, x1, y1, x2, y2, cls="fp-s1", width: float = 2.5):
        self.line(x1, y1, x2, y2, cls, width=width)
        ang = math.atan2(y2 - y1, x2 - x1)
        L = 9.0
        pts = [
            (x2, y2),
            (x2 - L * math.cos(ang - 0.4), y2 - L * math.sin(ang - 0.4)),
            (x2 - L * math.cos(ang + 0.4), y2 - L * math.sin(ang + 0.4)),
        ]
        self.parts.append(
            '<polygon points="' + " ".join(f"{_n(a)},{_n(b)}" for a, b in pts) + f'" class="{cls}-fill"/>'
        )

    def polyline(self, pts: Iterable[tuple[float, float]], cls="fp-s1", width: float = 2.0, dash: str = ""):
        d = f' stroke-dasharray="{dash}"' if dash else ""
        self.parts.append(
            '<polyline fill="none" points="'
            + " ".join(f"{_n(x)},{_n(y)}" for x, y in pts)
            + f'" class="{cls}" stroke-width="{_n(width)}"{d}/>'
        )

    def circle(self, x, y, r, cls="fp-s1-fill"):
        self.parts.append(f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(r)}" class="{cls}"/>')

    def rect(self, x, y, w, h, cls="fp-band"):
        self.parts.append(f'<rect x="{_n(x)}" y="{_n(y)}" width="{_n(w)}" height="{_n(h)}" class="{cls}"/>')

    def text(self, x, y, s, anchor="start", cls="fp-text", size: int = 13, weight: str = "", rotate: float = 0.0):
        wt = f' font-weight="{weight}"' if weight else ""
        rot = f' transform="rotate({_n(rotate)} {_n(x)} {_n(y)})"' if rotate else ""
        self.parts.append(
            f'<text x="{_n(x)}" y="{_n(y)}" text-anchor="{anchor}" font-size="{size}" class="{cls}"{wt}{rot}>{esc(s)}</text>'
        )

    def __str__(self) -> str:
        head = (
            f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {self.w} {self.h}" '
            f'width="100%" role="img" aria-labelledby="t d" font-family="system-ui, sans-serif">'
            f"<title id=\"t\">{esc(self.title)}</title><desc id=\"d\">{esc(self.desc or self.title)}</desc>"
        )
        return head + "".join(self.parts) + "</svg>"


def nice_ticks(lo: float, hi: float, n: int = 5) -> list[float]:
    """Round tick values covering [lo, hi] (about n of them)."""
    if hi <= lo:
        hi = lo + 1.0
    raw = (hi - lo) / max(1, n)
    mag = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 2.5, 5, 10):
        step = m * mag
        if step >= raw:
            break
    start = math.ceil(lo / step - 1e-9) * step
    ticks = []
    v = start
    while v <= hi + 1e-9 * step:
        ticks.append(round(v, 12))
        v += step
    return ticks


def xy_chart(
    title: str,
    series: Sequence[dict],
    *,
    x_label: str,
    y_label: str,
    log_y: bool = False,
    log_x: bool = False,
    markers: Sequence[dict] = (),
    bands: Sequence[dict] = (),
    desc: str = "",
    dots: Sequence[dict] = (),
    width: int = 520,
    height: int = 340,
) -> str:
    """A line chart. ``series``: dicts with ``points`` [(x, y)…], ``label`` and ``cls``
    (``fp-s1``…``fp-s6``). ``markers``: vertical lines ``{"x", "label", "cls"}``;
    ``bands``: shaded x-ranges ``{"x0", "x1"}``. Non-finite or non-positive (on log
    axes) points are skipped. ``dots``: points to mark on the plot ``{"x", "y", "label",
    "cls"}`` (a filled circle with an optional short label), e.g. a resonance peak.
    """
    left, right, top, bottom = 70, 14, 36, 56
    pw, ph = width - left - right, height - top - bottom

    def fx(v):
        return math.log10(v) if log_x else v

    def fy(v):
        return math.log10(v) if log_y else v

    def ok(x, y):
        if not (math.isfinite(x) and math.isfinite(y)):
            return False
        if log_x and x <= 0:
            return False
        if log_y and y <= 0:
            return False
        return True

    pts_all = [(x, y) for s in series for (x, y) in s["points"] if ok(x, y)]
    if not pts_all:
        pts_all = [(1.0, 1.0), (2.0, 2.0)]
    xs = [fx(x) for x, _ in pts_all]
    ys = [fy(y) for _, y in pts_all]
    x0, x1 = min(xs), max(xs)
    y0, y1 = min(ys), max(ys)
    if x1 == x0:
        x1 = x0 + 1
    if y1 == y0:
        y1 = y0 + 1
    pad = (y1 - y0) * 0.06
    y0 -= pad
    y1 += pad

    def px(v):
        return left + (fx(v) - x0) / (x1 - x0) * pw

    def py(v):
        return top + ph - (fy(v) - y0) / (y1 - y0) * ph

    svg = Svg(width, height, title, desc)
    svg.rect(0, 0, width, height, "fp-bg")
    svg.text(left, 20, title, cls="fp-text", size=16, weight="600")
    for b in bands:
        a, c = max(b["x0"], 10 ** x0 if log_x else x0), min(b["x1"], 10 ** x1 if log_x else x1)
        if c > a:
            svg.rect(px(a), top, px(c) - px(a), ph, b.get("cls", "fp-band"))
    # grid and ticks
    if log_y:
        for k in range(math.floor(y0), math.ceil(y1) + 1):
            if y0 <= k <= y1:
                y = top + ph - (k - y0) / (y1 - y0) * ph
                svg.line(left, y, left + pw, y, "fp-grid", width=1)
                from .fmt import si

                svg.text(left - 6, y + 4, si(10.0**k, "", 3), anchor="end", size=13)
    else:
        for t in nice_ticks(y0, y1):
            y = py(t)
            svg.line(left, y, left + pw, y, "fp-grid", width=1)
            from .fmt import sig

            svg.text(left - 6, y + 4, sig(t, 3), anchor="end", size=13)
    if log_x:
        for k in range(math.floor(x0), math.ceil(x1) + 1):
            for m in (1,):
                v = m * 10.0**k
                if 10**x0 <= v <= 10**x1:
                    x = px(v)
                    svg.line(x, top, x, top + ph, "fp-grid", width=1)
                    from .fmt import si

                    svg.text(x, top + ph + 16, si(v, "", 3), anchor="middle", size=13)
    else:
        from .fmt import sig

        for t in nice_ticks(x0, x1, 6):
            x = px(t)
            svg.line(x, top, x, top + ph, "fp-grid", width=1)
            svg.text(x, top + ph + 16, sig(t, 3), anchor="middle", size=13)
    svg.line(left, top + ph, left + pw, top + ph, "fp-axis")
    svg.line(left, top, left, top + ph, "fp-axis")
    svg.text(left + pw / 2, height - 10, x_label, anchor="middle", size=14)
    svg.text(16, top + ph / 2, y_label, anchor="middle", size=14, rotate=-90)
    label_end = [-math.inf, -math.inf]  # drawing: where the last marker label of each of two rows ends
    for m in markers:
        if ok(m["x"], 10 ** y0 if log_y else y0 + 1e-300) or (not log_x and math.isfinite(m["x"])):
            if (10 ** x0 if log_x else x0) <= m["x"] <= (10 ** x1 if log_x else x1):
                x = px(m["x"])
                svg.line(x, top, x, top + ph, m.get("cls", "fp-mark"), dash="5 4", width=2)
                label = m.get("label", "")
                row = 0 if x + 4 >= label_end[0] else 1  # a label that would overlap the last one drops a row
                label_end[row] = x + 4 + 8 * len(label) + 3  # drawing: about 8 px a character at size 13
                svg.text(x + 4, top + 12 + 15 * row, label, cls="fp-text", size=13)
    for d in dots:
        if ok(d["x"], d["y"]):
            x, y = px(d["x"]), py(d["y"])
            if left <= x <= left + pw and top <= y <= top + ph:
                svg.circle(x, y, 4, d.get("cls", "fp-s1-fill"))
                if d.get("label"):
                    svg.text(x + 6, y - 6, d["label"], cls="fp-text", size=13)
    for i, s in enumerate(series):
        pts = [(px(x), py(y)) for x, y in s["points"] if ok(x, y)]
        if len(pts) >= 2:
            svg.polyline(pts, s.get("cls", f"fp-s{i % 6 + 1}"), width=s.get("width", 2.0), dash=s.get("dash", ""))
        if s.get("label"):
            ly = top + 16 + 18 * i
            svg.line(left + pw - 150, ly - 4, left + pw - 130, ly - 4, s.get("cls", f"fp-s{i % 6 + 1}"), width=3)
            svg.text(left + pw - 126, ly, s["label"], size=13)
    return str(svg)
