"""PNG icons rasterised from web/icon.svg, in pure Python.

Kept written by hand rather than taking an SVG renderer from PyPI. The icon uses a small subset of SVG
(rect with rx, circle, line, polyline, polygon; solid fills, round-joined strokes) that this draws with
the standard library alone, deterministically. cairosvg loads the system's cairo library (on Debian only
there because Chromium, a test tool, depends on it); the resvg bindings are native wheels per platform.
Either would make `python3 build.py build` (today stdlib only, run by Debian's python3) depend on .venv
and a compiled package, for three PNGs that are cached per icon.svg digest anyway, and would redraw the
icons (different anti-aliasing).
"""

from __future__ import annotations

import hashlib
import os
import re
import shutil
import struct
import zlib
from xml.etree import ElementTree

from .common import CACHE, THEME, WEB, log


def _parse_color(c: str) -> tuple[int, int, int]:
    c = c.strip().lstrip("#")
    if len(c) == 3:
        c = "".join(ch * 2 for ch in c)
    return int(c[0:2], 16), int(c[2:4], 16), int(c[4:6], 16)


def _circle_poly(cx, cy, r, n=96):
    import math

    return [(cx + r * math.cos(2 * math.pi * k / n), cy + r * math.sin(2 * math.pi * k / n)) for k in range(n)]


def _stroke_polys(pts, width, closed=False):
    """Thick polyline → list of quads plus round joints (as small circles)."""
    import math

    polys = []
    segs = list(zip(pts, pts[1:] + (pts[:1] if closed else [])))
    for (x1, y1), (x2, y2) in segs:
        dx, dy = x2 - x1, y2 - y1
        L = math.hypot(dx, dy) or 1.0
        nx, ny = -dy / L * width / 2, dx / L * width / 2
        polys.append([(x1 + nx, y1 + ny), (x2 + nx, y2 + ny), (x2 - nx, y2 - ny), (x1 - nx, y1 - ny)])
    for x, y in pts:
        polys.append(_circle_poly(x, y, width / 2, 24))
    return polys


def _icon_shapes(svg_text: str):
    """Read web/icon.svg: rect (with rx), circle, polygon, polyline and line elements with
    fill/stroke colours. Returns (size, [(polygons, rgb)]) in paint order."""
    import math

    root = ElementTree.fromstring(svg_text)
    ns = "{http://www.w3.org/2000/svg}"
    vb = [float(v) for v in root.get("viewBox").split()]
    size = vb[2]
    shapes = []
    for el in root.iter():
        tag = el.tag.replace(ns, "")
        fill, stroke = el.get("fill"), el.get("stroke")
        sw = float(el.get("stroke-width", "1"))
        polys = None
        if tag == "rect":
            x, y, w, h = (float(el.get(k, "0")) for k in ("x", "y", "width", "height"))
            rx = float(el.get("rx", "0"))
            if rx:
                pts = []
                for cx, cy, a0 in ((x + w - rx, y + rx, -90), (x + w - rx, y + h - rx, 0), (x + rx, y + h - rx, 90), (x + rx, y + rx, 180)):
                    for k in range(13):
                        a = math.radians(a0 + 90 * k / 12)
                        pts.append((cx + rx * math.cos(a), cy + rx * math.sin(a)))
                polys = [pts]
            else:
                polys = [[(x, y), (x + w, y), (x + w, y + h), (x, y + h)]]
        elif tag == "circle":
            cx, cy, r = (float(el.get(k)) for k in ("cx", "cy", "r"))
            if fill and fill != "none":
                shapes.append(([_circle_poly(cx, cy, r)], _parse_color(fill)))
            if stroke and stroke != "none":
                ring = _circle_poly(cx, cy, r)
                shapes.append((_stroke_polys(ring, sw, closed=True), _parse_color(stroke)))
            continue
        elif tag in ("polygon", "polyline", "line"):
            if tag == "line":
                pts = [(float(el.get("x1")), float(el.get("y1"))), (float(el.get("x2")), float(el.get("y2")))]
            else:
                nums = [float(v) for v in re.split(r"[\s,]+", el.get("points").strip())]
                pts = list(zip(nums[::2], nums[1::2]))
            if tag == "polygon" and fill and fill != "none":
                shapes.append(([pts], _parse_color(fill)))
            if stroke and stroke != "none":
                shapes.append((_stroke_polys(pts, sw, closed=(tag == "polygon")), _parse_color(stroke)))
            continue
        else:
            continue
        if fill and fill != "none":
            shapes.append((polys, _parse_color(fill)))
    return size, shapes


def rasterise_icon(svg_text: str, px: int, *, pad: float = 0.0, background: str | None = None) -> bytes:
    """Render the icon to an RGBA PNG of px × px. ``pad`` shrinks the artwork toward the
    centre (for a maskable icon's safe zone) over a solid ``background``."""
    size, shapes = _icon_shapes(svg_text)
    ss = 4  # 4 × 4 supersampling
    scale = px * (1 - 2 * pad) / size
    off = px * pad
    acc = [[0.0, 0.0, 0.0, 0.0] for _ in range(px * px)]
    if background:
        r, g, b = _parse_color(background)
        for p in acc:
            p[:] = [r, g, b, 255.0]
    for polys, (r, g, b) in shapes:
        cover = [0] * (px * px)
        polys_px = [[(off + x * scale, off + y * scale) for x, y in poly] for poly in polys]
        polys_edges = []
        for pts in polys_px:
            es = [(x1, y1, x2, y2) for (x1, y1), (x2, y2) in zip(pts, pts[1:] + pts[:1]) if y1 != y2]
            ys = [p[1] for p in pts]
            polys_edges.append((min(ys), max(ys), es))
        width = px * ss
        for sy in range(px * ss):
            y = (sy + 0.5) / ss
            mark = None
            lo_s, hi_s = width, 0
            for ymin, ymax, es in polys_edges:  # union of simple polygons, each even-odd
                if not (ymin <= y <= ymax):
                    continue
                xs = sorted(x1 + (y - y1) * (x2 - x1) / (y2 - y1) for x1, y1, x2, y2 in es if (y1 <= y < y2) or (y2 <= y < y1))
                for a, c in zip(xs[::2], xs[1::2]):
                    s0 = max(0, int(a * ss + 0.5))
                    s1 = min(width, int(c * ss + 0.5))
                    if s1 > s0:
                        if mark is None:
                            mark = bytearray(width)
                        mark[s0:s1] = b"\x01" * (s1 - s0)
                        lo_s, hi_s = min(lo_s, s0), max(hi_s, s1)
            if mark is None:
                continue
            row = (sy // ss) * px
            for xp in range(lo_s // ss, (hi_s - 1) // ss + 1):
                c = sum(mark[xp * ss:(xp + 1) * ss])
                if c:
                    cover[row + xp] += c
        full = ss * ss
        for i, c in enumerate(cover):
            if c:
                a = min(1.0, c / full)
                p = acc[i]
                inv = 1 - a
                p[0] = p[0] * inv + r * a
                p[1] = p[1] * inv + g * a
                p[2] = p[2] * inv + b * a
                p[3] = p[3] * inv + 255 * a
    raw = bytearray()
    for yy in range(px):
        raw.append(0)
        for xx in range(px):
            p = acc[yy * px + xx]
            al = p[3]
            if al > 0:
                # colours were accumulated premultiplied-style against transparent black; un-premultiply
                f = 255.0 / al
                raw += bytes((min(255, round(p[0] * f)), min(255, round(p[1] * f)), min(255, round(p[2] * f)), round(al)))
            else:
                raw += b"\0\0\0\0"
    return _png(px, px, bytes(raw))


def _png(w: int, h: int, raw: bytes) -> bytes:
    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

    ihdr = struct.pack(">IIBBBBB", w, h, 8, 6, 0, 0, 0)
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b"")


def build_icons(out_dir: str) -> None:
    os.makedirs(out_dir, exist_ok=True)
    with open(os.path.join(WEB, "icon.svg"), encoding="utf-8") as fh:
        svg = fh.read()
    cache_dir = os.path.join(CACHE, "icons-" + hashlib.sha256(svg.encode()).hexdigest()[:16])
    wanted = {
        "icon-192.png": (192, 0.0, None),
        "icon-512.png": (512, 0.0, None),
        "icon-maskable-512.png": (512, 0.1, THEME),
    }
    os.makedirs(cache_dir, exist_ok=True)
    for name, (px, pad, bg) in wanted.items():
        cached = os.path.join(cache_dir, name)
        if not os.path.exists(cached):
            log(f"rendering {name}")
            data = rasterise_icon(svg, px, pad=pad, background=bg)
            with open(cached + ".part", "wb") as fh:
                fh.write(data)
            os.replace(cached + ".part", cached)
        shutil.copyfile(cached, os.path.join(out_dir, name))
