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


def former() -> None:
    """Fuselage former F5 (mm): a convex top arc, flared sides, a shallow concave saddle over the keel, a flanged
    lightening hole and two drawn tooling-pin spots; the outline is the finished part's mold line."""
    doc = _document("mm")
    msp = doc.modelspace()
    top_centre = (0.0, 133.75)  # the circle through (±105, 150) and (0, 240)
    saddle_centre = (0.0, -math.sqrt(300.0**2 - 90.0**2))  # radius 300 through (±90, 0): rises 13.8 mm mid-way
    points = [(-90.0, 0.0), (90.0, 0.0), (105.0, 150.0), (-105.0, 150.0)]
    bulges = [_bulge(points[0], points[1], saddle_centre, ccw=False), 0.0,
              _bulge(points[2], points[3], top_centre, ccw=True), 0.0]
    msp.add_lwpolyline([(x, y, 0, 0, b) for (x, y), b in zip(points, bulges)], format="xyseb", close=True,
                       dxfattribs={"layer": "OUTLINE"})
    msp.add_circle((0.0, 120.0), 50.0, dxfattribs={"layer": "OUTLINE"})
    for x in (-45.0, 45.0):
        msp.add_point((x, 40.0), dxfattribs={"layer": "PINS"})
    msp.add_text("BW-418 former F5, mold line", dxfattribs={"layer": "NOTES", "height": 4}).set_placement((-60, -30))
    doc.saveas(HERE / "bw418-former-f5.dxf")


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
    former()
    nose_rib()
