"""A small PDF writer: pages of stroked vector paths and text in the two standard sans-serif fonts.

Written to ISO 32000-1:2008 and kept to what PDF 1.4 already has, so any viewer
opens it: a catalog, a page tree, one content stream a page (Flate-compressed,
§7.4.4), the path operators ``m l c re h S`` with ``W n`` clipping (§8.5), the
graphics state ``q Q cm w J j d`` (§8.4), device colours ``G RG g rg`` (§8.6.8)
and text objects ``BT Tf Tm Tj ET`` (§9.4) in the standard Type 1 fonts
Helvetica and Helvetica-Bold (§9.6.2.2, which every viewer supplies, so nothing
is embedded) with WinAnsiEncoding (Annex D.2).  Nothing here knows about blanks
or paper: coordinates are in the current user space, 1/72 in unless a ``cm``
says otherwise.

Characters outside WinAnsiEncoding are written as ``?``, except the arrows
``← ↑ → ↓`` and the circled plus ``⊕``, which are drawn as small stroked symbols
in the line of text (the standard text fonts have no such glyphs).
"""

from __future__ import annotations

import math
import re
import zlib
from collections.abc import Iterable, Sequence
from typing import Final, Literal

HAlign = Literal["left", "center", "right"]
VAlign = Literal["baseline", "bottom", "center", "top"]

# Advance widths of WinAnsiEncoding codes 32..255 in 1/1000 em, from the font metrics (AFM) files of the standard
# Type 1 fonts Helvetica and Helvetica-Bold (tests/test_pdfdoc.py re-reads them from the copies matplotlib ships).
# 0 marks a code those files give no width for (undefined in the encoding, or a glyph they lack): such
# characters are written as "?".
_HELVETICA: Final = (
    278, 278, 355, 556, 556, 889, 667, 191, 333, 333, 389, 584, 278, 333, 278, 278,
    556, 556, 556, 556, 556, 556, 556, 556, 556, 556, 278, 278, 584, 584, 584, 556,
    1015, 667, 667, 722, 722, 667, 611, 778, 722, 278, 500, 667, 556, 833, 722, 778,
    667, 778, 722, 667, 611, 722, 667, 944, 667, 667, 611, 278, 278, 278, 469, 556,
    333, 556, 556, 500, 556, 556, 278, 556, 556, 222, 222, 500, 222, 833, 556, 556,
    556, 556, 333, 500, 278, 556, 500, 722, 500, 500, 500, 334, 260, 334, 584, 0,
    0, 0, 222, 556, 333, 1000, 556, 556, 333, 1000, 667, 333, 1000, 0, 611, 0,
    0, 222, 222, 333, 333, 350, 556, 1000, 333, 1000, 500, 333, 944, 0, 500, 667,
    278, 333, 556, 556, 556, 556, 260, 556, 333, 737, 370, 556, 584, 333, 737, 333,
    400, 584, 0, 0, 333, 556, 537, 278, 333, 0, 365, 556, 834, 834, 834, 611,
    667, 667, 667, 667, 667, 667, 1000, 722, 667, 667, 667, 667, 278, 278, 278, 278,
    722, 722, 778, 778, 778, 778, 778, 584, 778, 722, 722, 722, 722, 667, 667, 611,
    556, 556, 556, 556, 556, 556, 889, 500, 556, 556, 556, 556, 278, 278, 278, 278,
    556, 556, 556, 556, 556, 556, 556, 584, 611, 556, 556, 556, 556, 500, 556, 500,
)
_HELVETICA_BOLD: Final = (
    278, 333, 474, 556, 556, 889, 722, 238, 333, 333, 389, 584, 278, 333, 278, 278,
    556, 556, 556, 556, 556, 556, 556, 556, 556, 556, 333, 333, 584, 584, 584, 611,
    975, 722, 722, 722, 722, 667, 611, 778, 722, 278, 556, 722, 611, 833, 722, 778,
    667, 778, 722, 667, 611, 722, 667, 944, 667, 667, 611, 333, 278, 333, 584, 556,
    333, 556, 611, 556, 611, 556, 333, 611, 611, 278, 278, 556, 278, 889, 611, 611,
    611, 611, 389, 556, 333, 611, 556, 778, 556, 556, 500, 389, 280, 389, 584, 0,
    0, 0, 278, 556, 500, 1000, 556, 556, 333, 1000, 667, 333, 1000, 0, 611, 0,
    0, 278, 278, 500, 500, 350, 556, 1000, 333, 1000, 556, 333, 944, 0, 500, 667,
    278, 333, 556, 556, 556, 556, 280, 556, 333, 737, 370, 556, 584, 333, 737, 333,
    400, 584, 0, 0, 333, 611, 556, 278, 333, 0, 365, 556, 834, 834, 834, 611,
    722, 722, 722, 722, 722, 722, 1000, 722, 667, 667, 667, 667, 278, 278, 278, 278,
    722, 722, 778, 778, 778, 778, 778, 584, 778, 722, 722, 722, 722, 667, 667, 611,
    556, 556, 556, 556, 556, 556, 889, 556, 556, 556, 556, 556, 278, 278, 278, 278,
    611, 611, 611, 611, 611, 611, 611, 584, 611, 611, 611, 611, 611, 556, 611, 556,
)
FONTS: Final = {False: ("F1", "Helvetica", _HELVETICA), True: ("F2", "Helvetica-Bold", _HELVETICA_BOLD)}
"""Resource name, base font name and widths of the regular (False) and bold (True) font."""

ASCENT_EM: Final = 0.718
"""Cap height (and ascender) of both fonts, em (their AFM files: CapHeight 718, Ascender 718)."""
DESCENT_EM: Final = 0.207
"""Depth of the descender of both fonts, em (their AFM files: Descender -207)."""

BEZIER_CIRCLE_K: Final = 4.0 / 3.0 * (math.sqrt(2.0) - 1.0)
"""Control-point distance of a cubic Bézier quarter circle of radius 1 (exact at 0°, 45° and 90°; radial error
2.7e-4 of the radius elsewhere; common practice, no source)."""

# Symbols drawn as strokes: advance width (em) and polylines in em, baseline at y = 0.
_AXIS: Final = 0.33  # height of an arrow shaft and of the circle's centre above the baseline, em
_SYMBOLS: Final[dict[str, tuple[float, tuple[tuple[tuple[float, float], ...], ...]]]] = {
    "→": (0.85, (((0.08, _AXIS), (0.77, _AXIS)), ((0.57, _AXIS + 0.16), (0.77, _AXIS), (0.57, _AXIS - 0.16)))),
    "←": (0.85, (((0.77, _AXIS), (0.08, _AXIS)), ((0.28, _AXIS + 0.16), (0.08, _AXIS), (0.28, _AXIS - 0.16)))),
    "↑": (0.60, (((0.30, -0.05), (0.30, 0.72)), ((0.14, 0.54), (0.30, 0.72), (0.46, 0.54)))),
    "↓": (0.60, (((0.30, 0.72), (0.30, -0.05)), ((0.14, 0.13), (0.30, -0.05), (0.46, 0.13)))),
    "⊕": (0.80, (((0.10, _AXIS), (0.70, _AXIS)), ((0.40, _AXIS - 0.30), (0.40, _AXIS + 0.30)))),
}
_CIRCLED: Final = {"⊕": (0.40, _AXIS, 0.30)}  # symbols that also have a circle: centre x, y and radius, em
_SYMBOL_STROKE_EM: Final = 0.07
_SYMBOL_SPLIT: Final = re.compile("([" + "".join(_SYMBOLS) + "])")
_ESCAPE: Final = str.maketrans({"\\": "\\\\", "(": "\\(", ")": "\\)", "\r": "\\r", "\n": "\\n"})


def _encode(text: str, widths: Sequence[int]) -> str:
    """``text`` in WinAnsiEncoding, as a str of code points < 256 (one a byte); the minus sign (U+2212, which the
    encoding lacks) becomes the hyphen-minus, other unknown characters ``?``."""
    out = []
    for ch in text.replace("\u2212", "-"):
        try:
            code = ch.encode("cp1252")[0]  # Annex D.2: WinAnsiEncoding is this code page where both define a code
        except UnicodeEncodeError:
            code = 0
        out.append(chr(code) if code >= 32 and widths[code - 32] else "?")
    return "".join(out)


def _num(value: float) -> str:
    """A number as PDF writes it (ISO 32000-1 §7.3.3): fixed point, trailing zeros dropped."""
    text = f"{value:.4f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def colour_operands(colour: str | float) -> tuple[str, bool]:
    """Operands of a colour: ``"#rrggbb"`` as RGB, a number 0..1 as gray; returns (operands, is_gray)."""
    if isinstance(colour, str):
        value = colour.lstrip("#")
        if len(value) != 6:
            raise ValueError(f"colour {colour!r}: expected #rrggbb")
        r, g, b = (int(value[i : i + 2], 16) / 255.0 for i in (0, 2, 4))
        if r == g == b:
            return _num(r), True
        return f"{_num(r)} {_num(g)} {_num(b)}", False
    return _num(float(colour)), True


def text_width(text: str, size: float, bold: bool = False) -> float:
    """Advance width of ``text`` at font ``size`` (same units as ``size``), as :meth:`Canvas.text` sets it."""
    widths = FONTS[bold][2]
    total = 0.0
    for part in _SYMBOL_SPLIT.split(text):
        if part in _SYMBOLS:
            total += _SYMBOLS[part][0] * 1000.0
        elif part:
            total += sum(widths[ord(c) - 32] for c in _encode(part, widths))
    return total * size / 1000.0


class Canvas:
    """The content stream of one page, built operator by operator."""

    def __init__(self, width: float, height: float) -> None:
        self.width = width
        self.height = height
        self._parts: list[str] = []

    # ---------------------------------------------------------------- state
    def raw(self, operators: str) -> None:
        """Append ready-made content-stream text (one or more whole operators)."""
        self._parts.append(operators)

    def save(self) -> None:
        self._parts.append("q\n")

    def restore(self) -> None:
        self._parts.append("Q\n")

    def transform(self, a: float, b: float, c: float, d: float, e: float, f: float) -> None:
        """Concatenate the matrix [a b c d e f] to the current transformation (``cm``)."""
        self._parts.append(f"{_num(a)} {_num(b)} {_num(c)} {_num(d)} {_num(e)} {_num(f)} cm\n")

    def clip_rect(self, x: float, y: float, w: float, h: float) -> None:
        """Clip what follows (until :meth:`restore`) to a rectangle."""
        self._parts.append(f"{_num(x)} {_num(y)} {_num(w)} {_num(h)} re W n\n")

    def style(self, width: float | None = None, colour: str | float | None = None, cap: int | None = None,
              join: int | None = None, dash: Sequence[float] | None = None) -> None:
        """Set the stroke: line ``width``, ``colour``, ``cap`` (0 butt, 1 round), ``join`` (0 mitre, 1 round) and
        ``dash`` lengths (``()`` for a solid line); ``None`` leaves a setting as it is."""
        self._parts.append(style_operators(width, colour, cap, join, dash))

    def fill_colour(self, colour: str | float) -> None:
        operands, gray = colour_operands(colour)
        self._parts.append(f"{operands} {'g' if gray else 'rg'}\n")

    # ---------------------------------------------------------------- paths
    def polyline(self, points: Sequence[tuple[float, float]], closed: bool = False) -> None:
        """Stroke one polyline."""
        self._parts.append(polyline_operators(points, closed) + "S\n")

    def polylines(self, lines: Iterable[Sequence[tuple[float, float]]]) -> None:
        """Stroke several open polylines as one path."""
        self._parts.append("".join(polyline_operators(p, False) for p in lines) + "S\n")

    def circle(self, cx: float, cy: float, r: float) -> None:
        """Stroke a circle (four Bézier quarters)."""
        self._parts.append(circle_operators(cx, cy, r) + "S\n")

    def rect(self, x: float, y: float, w: float, h: float) -> None:
        """Stroke an axis-aligned rectangle."""
        self._parts.append(f"{_num(x)} {_num(y)} {_num(w)} {_num(h)} re S\n")

    # ----------------------------------------------------------------- text
    def text(self, x: float, y: float, text: str, size: float, *, bold: bool = False, angle: float = 0.0,
             ha: HAlign = "left", va: VAlign = "baseline", colour: str | float = 0.0) -> None:
        """One line of ``text`` at font ``size`` anchored at (x, y), turned ``angle`` degrees counter-clockwise.

        ``ha`` and ``va`` place the anchor on the line's box, which runs from the descender to the cap height.
        """
        width = text_width(text, size, bold)
        dx = {"left": 0.0, "center": 0.5 * width, "right": width}[ha]
        dy = {"baseline": 0.0, "bottom": -DESCENT_EM * size, "top": ASCENT_EM * size,
              "center": 0.5 * (ASCENT_EM - DESCENT_EM) * size}[va]
        cos, sin = math.cos(math.radians(angle)), math.sin(math.radians(angle))
        ox, oy = x - cos * dx + sin * dy, y - sin * dx - cos * dy  # baseline origin
        name, _, widths = FONTS[bold]
        operands, gray = colour_operands(colour)
        out = ["q\n", f"{operands} {'g' if gray else 'rg'}\n", f"{operands} {'G' if gray else 'RG'}\n"]
        pen = 0.0
        for part in _SYMBOL_SPLIT.split(text):
            if not part:
                continue
            px, py = ox + cos * pen, oy + sin * pen
            if part in _SYMBOLS:
                advance, strokes = _SYMBOLS[part]
                s = size
                out.append(f"q {_num(cos * s)} {_num(sin * s)} {_num(-sin * s)} {_num(cos * s)} {_num(px)} "
                           f"{_num(py)} cm {_num(_SYMBOL_STROKE_EM)} w 1 J 1 j [] 0 d\n")
                out.append("".join(polyline_operators(stroke, False) for stroke in strokes))
                if part in _CIRCLED:
                    out.append(circle_operators(*_CIRCLED[part]))
                out.append("S Q\n")
                pen += advance * size
            else:
                encoded = _encode(part, widths)
                out.append(f"BT /{name} {_num(size)} Tf {_num(cos)} {_num(sin)} {_num(-sin)} {_num(cos)} "
                           f"{_num(px)} {_num(py)} Tm ({encoded.translate(_ESCAPE)}) Tj ET\n")
                pen += sum(widths[ord(c) - 32] for c in encoded) * size / 1000.0
        out.append("Q\n")
        self._parts.append("".join(out))

    def operators(self) -> str:
        """Everything drawn so far, as content-stream text (to reuse on other pages with :meth:`raw`)."""
        return "".join(self._parts)

    def content(self) -> bytes:
        """The page's content stream, uncompressed."""
        return self.operators().encode("latin-1")


def style_operators(width: float | None = None, colour: str | float | None = None, cap: int | None = None,
                    join: int | None = None, dash: Sequence[float] | None = None) -> str:
    """Graphics-state operators for :meth:`Canvas.style`."""
    ops = []
    if width is not None:
        ops.append(f"{_num(width)} w")
    if colour is not None:
        operands, gray = colour_operands(colour)
        ops.append(f"{operands} {'G' if gray else 'RG'}")
    if cap is not None:
        ops.append(f"{cap} J")
    if join is not None:
        ops.append(f"{join} j")
    if dash is not None:
        ops.append("[" + " ".join(_num(v) for v in dash) + "] 0 d")
    return " ".join(ops) + "\n" if ops else ""


def polyline_operators(points: Sequence[tuple[float, float]], closed: bool) -> str:
    """Path construction operators of a polyline (``m``, ``l`` and ``h`` when ``closed``), no painting."""
    flat = [v for p in points for v in p]
    n = len(flat) // 2
    if n < 2:
        raise ValueError("a polyline needs at least two points")
    text = ("%.4f %.4f m\n" + "%.4f %.4f l\n" * (n - 1)) % tuple(flat)
    return text + "h\n" if closed else text


def circle_operators(cx: float, cy: float, r: float) -> str:
    """Path construction operators of a circle: four cubic Bézier quarters from (cx + r, cy), closed."""
    k = BEZIER_CIRCLE_K * r
    x0, x1, x2, x3, x4 = cx - r, cx - k, cx, cx + k, cx + r
    y0, y1, y2, y3, y4 = cy - r, cy - k, cy, cy + k, cy + r
    return (
        f"{x4:.4f} {y2:.4f} m\n"
        f"{x4:.4f} {y3:.4f} {x3:.4f} {y4:.4f} {x2:.4f} {y4:.4f} c\n"
        f"{x1:.4f} {y4:.4f} {x0:.4f} {y3:.4f} {x0:.4f} {y2:.4f} c\n"
        f"{x0:.4f} {y1:.4f} {x1:.4f} {y0:.4f} {x2:.4f} {y0:.4f} c\n"
        f"{x3:.4f} {y0:.4f} {x4:.4f} {y1:.4f} {x4:.4f} {y2:.4f} c\nh\n"
    )


def _text_string(value: str) -> bytes:
    """A text string for the document information dictionary (ISO 32000-1 §7.9.2.2): UTF-16BE with its BOM."""
    return b"<" + ("\ufeff" + value).encode("utf-16-be").hex().upper().encode("ascii") + b">"


class Document:
    """A PDF document: pages added in order, then :meth:`to_bytes`."""

    def __init__(self, info: dict[str, str] | None = None, compress: bool = True) -> None:
        self.info = dict(info or {})
        self.compress = compress
        self.pages: list[Canvas] = []

    def add_page(self, width: float, height: float) -> Canvas:
        """A new page of ``width`` × ``height`` pt (1/72 in); draw on the returned canvas."""
        canvas = Canvas(width, height)
        self.pages.append(canvas)
        return canvas

    def to_bytes(self) -> bytes:
        """The whole file: header, objects, cross-reference table and trailer (ISO 32000-1 §7.5)."""
        objects: list[bytes] = []

        def add(body: bytes) -> int:
            objects.append(body)
            return len(objects)

        catalog = add(b"")  # filled in below, once the page tree's number is known
        pages = add(b"")
        fonts = {
            bold: add(b"<< /Type /Font /Subtype /Type1 /BaseFont /%s /Encoding /WinAnsiEncoding >>" % base.encode())
            for bold, (_, base, _) in FONTS.items()
        }
        resources = add(b"<< /Font << " + b" ".join(
            b"/%s %d 0 R" % (FONTS[bold][0].encode(), number) for bold, number in fonts.items()) + b" >> >>")
        kids = []
        for canvas in self.pages:
            data = canvas.content()
            if self.compress:
                data = zlib.compress(data, 6)
                head = b"<< /Length %d /Filter /FlateDecode >>" % len(data)
            else:
                head = b"<< /Length %d >>" % len(data)
            content = add(head + b"\nstream\n" + data + b"\nendstream")
            kids.append(add(b"<< /Type /Page /Parent %d 0 R /MediaBox [0 0 %s %s] /Resources %d 0 R /Contents %d 0 R >>"
                            % (pages, _num(canvas.width).encode(), _num(canvas.height).encode(), resources, content)))
        objects[catalog - 1] = b"<< /Type /Catalog /Pages %d 0 R >>" % pages
        objects[pages - 1] = b"<< /Type /Pages /Kids [%s] /Count %d >>" % (
            b" ".join(b"%d 0 R" % k for k in kids), len(kids))
        info = None
        if self.info:
            info = add(b"<< " + b" ".join(b"/%s %s" % (key.encode("ascii"), _text_string(value))
                                          for key, value in self.info.items()) + b" >>")

        out = bytearray(b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n")  # the comment's high bytes mark the file as binary
        offsets = []
        for number, body in enumerate(objects, start=1):
            offsets.append(len(out))
            out += b"%d 0 obj\n" % number + body + b"\nendobj\n"
        xref = len(out)
        out += b"xref\n0 %d\n0000000000 65535 f \n" % (len(objects) + 1)
        out += b"".join(b"%010d 00000 n \n" % offset for offset in offsets)
        trailer = b"<< /Size %d /Root %d 0 R" % (len(objects) + 1, catalog)
        if info is not None:
            trailer += b" /Info %d 0 R" % info
        out += b"trailer\n" + trailer + b" >>\nstartxref\n%d\n%%%%EOF\n" % xref
        return bytes(out)
