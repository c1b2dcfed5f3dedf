"""Writes the demo drawings of this folder (run it from anywhere: ``python specs/drawings/make_drawings.py``).

The parts are of the invented "Brackenwold BW-418" of the demo specs: not a real design; do not build flight parts
from them.  Each drawing is a plain DXF (R2010) with its unit in the header ($INSUNITS), as a builder's CAD program
would write it; the demo specs read them.
"""

from __future__ import annotations

import math
from pathlib import Path

import ezdxf

HERE = Path(__file__).resolve().parent
INSUNITS = {"in": 1, "mm": 4}  # DXF Reference, HEADER section, $INSUNITS


def _document(unit: str):
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = INSUNITS[unit]
    for name, colour in (("OUTLINE", 7), ("FLANGE", 1), ("PINS", 5), ("NOTES", 8)):
        doc.layers.add(name, color=colour)
    return doc


def _bulge(a: tuple[float, float], b: tuple[float, float], centre: tuple[float, float], ccw: bool) -> float:
    """DXF bulge tan(θ/4) of the arc from ``a`` to ``b`` about ``centre`` (positive counter-clockwise)."""
    t0 = math.atan2(a[1] - centre[1], a[0] - centre[0])
    t1 = math.atan2(b[1] - centre[1], b[0] - centre[0])
    sweep = (t1 - t0) % (2 * math.pi) if ccw else -((t0 - t1) % (2 * math.pi))
    return math.tan(sweep / 4)


def frame(name: str, bottom: float, top: float, side: float, crown: float, hole_d: float, hole_y: float,
          pin_x: float, title: str) -> None:
    """A fuselage frame (mm), drawn as the finished part's mold line: a convex crown arc from (±top, side) up to
    (0, crown), sides flaring from (±bottom, 0), a shallow concave saddle (radius 300 mm) over the keel between
    (±bottom, 0), a lightening hole of ``hole_d`` at (0, ``hole_y``) and two tooling-pin spots at (±pin_x, 40)."""
    doc = _document("mm")
    msp = doc.modelspace()
    # the crown: the circle through (±top, side) and (0, crown), its centre on the y axis
    centre_y = (crown**2 - side**2 - top**2) / (2 * (crown - side))
    saddle_centre = (0.0, -math.sqrt(300.0**2 - bottom**2))  # rises mid-way by 300 − √(300² − bottom²)
    points = [(-bottom, 0.0), (bottom, 0.0), (top, side), (-top, side)]
    bulges = [_bulge(points[0], points[1], saddle_centre, ccw=False), 0.0,
              _bulge(points[2], points[3], (0.0, centre_y), ccw=True), 0.0]
    msp.add_lwpolyline([(x, y, 0, 0, b) for (x, y), b in zip(points, bulges)], format="xyseb", close=True,
                       dxfattribs={"layer": "OUTLINE"})
    msp.add_circle((0.0, hole_y), hole_d / 2, dxfattribs={"layer": "OUTLINE"})
    for x in (-pin_x, pin_x):
        msp.add_point((x, 40.0), dxfattribs={"layer": "PINS"})
    msp.add_text(f"{title}, mold line", dxfattribs={"layer": "NOTES", "height": 4}).set_placement((-60, -30))
    doc.saveas(HERE / name)


def frames() -> None:
    """The demo fuselage's frames: F5 (the single-part demo spec) and the frames F3, F4 and F6 of the set."""
    frame("bw418-former-f5.dxf", 90.0, 105.0, 150.0, 240.0, 100.0, 120.0, 45.0, "BW-418 former F5")
    (HERE / "frames").mkdir(exist_ok=True)
    frame("frames/F3.dxf", 100.0, 115.0, 160.0, 250.0, 110.0, 125.0, 50.0, "BW-418 frame F3")
    frame("frames/F4.dxf", 96.0, 110.0, 155.0, 245.0, 100.0, 122.0, 48.0, "BW-418 frame F4")
    frame("frames/F6.dxf", 78.0, 92.0, 130.0, 205.0, 80.0, 105.0, 40.0, "BW-418 frame F6")


def nose_rib() -> None:
    """Tailplane nose rib (in): the leading edge of a 16 in chord symmetrical section with 12 % thickness
    (NACA four-digit thickness form, NACA Report 460) from its nose to 3 in aft, as one fitted SPLINE on the
    FLANGE layer, closed by a straight cut edge at the spar on OUTLINE."""
    doc = _document("in")
    msp = doc.modelspace()
    chord, thick, x_cut = 16.0, 0.12, 3.0

    def half(x: float) -> float:
        u = x / chord
        return 5 * thick * chord * (0.2969 * math.sqrt(u) - 0.1260 * u - 0.3516 * u**2 + 0.2843 * u**3
                                    - 0.1015 * u**4)

    xs = [x_cut * (1 - math.cos(math.pi * k / 40)) / 2 for k in range(41)]  # cosine spacing towards the nose
    upper = [(x, half(x)) for x in reversed(xs)]
    lower = [(x, -half(x)) for x in xs[1:]]
    fit = upper + lower
    msp.add_spline(fit_points=[(x, y, 0.0) for x, y in fit], dxfattribs={"layer": "FLANGE"})
    msp.add_line((x_cut, -half(x_cut), 0.0), (x_cut, half(x_cut), 0.0), dxfattribs={"layer": "OUTLINE"})
    doc.saveas(HERE / "bw418-nose-rib-t2.dxf")


if __name__ == "__main__":
    frames()
    nose_rib()
