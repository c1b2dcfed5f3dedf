"""Where part outlines come from: drawings of flanged parts (bulkheads, formers, nose ribs, gussets).

Pure numpy/shapely/ezdxf: nothing here imports the solid kernel or a plotting library.

    read_dxf / read_svg_path / read_points  ->  Drawing        (closed contours in mm, pin spots)
    drawn_part(drawing, flanges, outline_is) ->  DrawnPart      (outline CCW, holes, pins, flange runs)
    drawn_piece(part, part_id=..., ...)      ->  DrawnPiece     (.geometry is a geometry.types.PieceGeometry)

How ``kind: part`` is meant to plug in (a proposal; ``diegen check`` does not accept it yet, see
specs/README.md, "Drawn parts"):

* spec keys::

      kind: part
      outline: {file: frame-4.dxf, layer: OUTLINE, units: mm, is: mold-line}   # or is: die
               # or {svg: "M 0 0 H 120 V 80 ... Z", units: mm, is: ...}
               # or {points: [[0, 0], [120, 0, 0.4142], [140, 20], ...], is: ...}  (bare numbers in `units`)
      flanges: all                                        # or a list of runs:
               # - {layer: FLANGE-A, height: 12, bend_radius: 3, direction: down, angle: 90}
               # - {from: [0, 0], to: [120, 0], height: 10, bend_radius: 3}
      holes: plain                                        # or flanged (with hole_rules.flange_height)
      pins: {layer: PINS}                                 # or auto

  plus the shared sections of a rib (sheet, flange defaults for `flanges: all`, die, press, relief,
  hole_rules, dowel_diameter).  A file is relative to the spec's folder.

* the schema reader turns ``outline`` into one reader call (``read_dxf(file, layers=[layer and every
  flange layer], pin_layer=..., units=...)``, ``read_svg_path`` or ``read_points``), each flange entry
  into a :class:`FlangeRunSpec` (``label`` = its key path, e.g. ``flanges[1]``, so messages point at the
  spec), then calls :func:`drawn_part`; a :class:`~diegen.errors.DrawingError` is reported at the
  ``outline`` key's file:line:col.
* the analysis takes ``drawn_piece(...).geometry`` as a one-piece rib's piece; ``run_flanges`` gives
  each run's own height, bend radius and angle (today the analysis reads one flange for the piece), and
  ``mirrored`` says the die and blank are the drawing's mirror image.
"""

from diegen.sources.contour import CHORD_TOL_MM, Contour, Edge, Place, bulge_arc
from diegen.sources.dxf import DEFAULT_JOIN_TOL_MM, read_dxf
from diegen.sources.model import (
                                  AllEdges,
                                  Between,
                                  Drawing,
                                  DrawnHole,
                                  DrawnPart,
                                  DrawnPiece,
                                  DrawnPin,
                                  Flange,
                                  FlangeRun,
                                  FlangeRunSpec,
                                  OnLayer,
)
from diegen.sources.part import CORNER_TURN_DEG, drawn_part, drawn_piece
from diegen.sources.points import points_with_bulges, read_points
from diegen.sources.svg import read_svg_path

__all__ = [
    "CHORD_TOL_MM", "CORNER_TURN_DEG", "DEFAULT_JOIN_TOL_MM", "AllEdges", "Between", "Contour", "Drawing", "DrawnHole",
    "DrawnPart", "DrawnPiece", "DrawnPin", "Edge", "Flange", "FlangeRun", "FlangeRunSpec", "OnLayer", "Place",
    "bulge_arc", "drawn_part", "drawn_piece", "points_with_bulges", "read_dxf", "read_points", "read_svg_path",
]
