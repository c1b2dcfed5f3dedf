"""Reading a part outline from a DXF drawing (ezdxf), in millimetres.

Model space is read.  LINE, ARC, CIRCLE, LWPOLYLINE and POLYLINE (with bulges), SPLINE and ELLIPSE
entities on the layers asked for (all layers when none are named) become edges; open edges are
chained end to end into closed contours.  POINT entities on the pin layer (and CIRCLEs there, by
their centres, when the pin layer is not also an outline layer) become tooling-pin spots.  Text,
dimensions, hatches and the like are left alone; a block reference on an outline layer is refused
(explode it in the drawing first).

Units: the header's ``$INSUNITS`` (DXF Reference, HEADER section: 1 inches, 2 feet, 4 millimetres,
5 centimetres, 6 metres, 8 microinches, 9 mils, 10 yards, 13 microns, 14 decimetres), converted with
the exact inch (NIST SP 811: 1 in = 25.4 mm).  When the header says 0 (unitless) or nothing, the
caller's ``units`` is used; with neither, or when the two disagree, the drawing is refused.

Arcs, circles and polyline bulges stay arcs (:class:`~diegen.sources.contour.Edge` of kind ``arc``);
splines and ellipses are flattened within ``CHORD_TOL_MM`` (see :mod:`diegen.sources.contour`).
Entities must lie in the drawing's X–Y plane (extrusion ±Z); an entity whose extrusion is −Z is
mirrored into the plane as its object coordinate system says (DXF Reference, "Object Coordinate
Systems").
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from diegen.errors import DrawingError
from diegen.sources.contour import (
    CHORD_TOL_MM,
    Contour,
    Edge,
    Place,
    arc_edge,
    check_contour,
    circle_edges,
    curve_edge,
    flatten_bspline,
    flatten_ellipse,
    join_edges,
    line_edge,
)
from diegen.sources.model import Drawing, DrawnPin
from diegen.sources.units import length_unit_mm
from diegen.spec.reader import suggest

DEFAULT_JOIN_TOL_MM = 0.01  # edge ends closer than this are joined (the flattening tolerance)

# $INSUNITS codes a part may be drawn in, with mm per unit (NIST SP 811: 1 in = 25.4 mm exactly).
INSUNITS: dict[int, tuple[str, float]] = {
    1: ("in", 25.4),
    2: ("ft", 304.8),
    4: ("mm", 1.0),
    5: ("cm", 10.0),
    6: ("m", 1000.0),
    8: ("microinch", 25.4e-6),
    9: ("mil", 25.4e-3),
    10: ("yd", 914.4),
    13: ("micron", 1e-3),
    14: ("dm", 100.0),
}
GEOMETRY = ("LINE", "ARC", "CIRCLE", "LWPOLYLINE", "POLYLINE", "SPLINE", "ELLIPSE")
PLANE_TOL = 1e-9  # an extrusion vector's X and Y parts must vanish to this (relative)


def drawing_units(header_code: int | None, units: str | None, source: str) -> tuple[str, float]:
    """The drawing's unit name and mm per unit, from the header code and the caller's ``units``."""
    given = None if units is None else (str(units).strip().lower(), length_unit_mm(units, f"{source}: units"))
    if header_code in (None, 0):
        if given is None:
            raise DrawingError(f"{source}: the drawing does not say its units (header $INSUNITS is "
                               f"{'missing' if header_code is None else '0, unitless'}): give its units "
                               "(outline.units: mm or in)")
        return given
    if header_code not in INSUNITS:
        known = ", ".join(f"{code} ({name})" for code, (name, _) in INSUNITS.items())
        raise DrawingError(f"{source}: header $INSUNITS is {header_code}, not a unit a part is drawn in "
                           f"(expected one of {known}, or 0 with units given)")
    name, scale = INSUNITS[header_code]
    if given is not None and not math.isclose(given[1], scale, rel_tol=1e-12):
        raise DrawingError(f"{source}: the drawing's header says {name} ($INSUNITS = {header_code}) but units "
                           f"{units!r} were given: leave units out, or correct the drawing's header")
    return name, scale


def read_dxf(path: str | Path, layers: str | Sequence[str] | None = None, pin_layer: str | None = None,
             units: str | None = None, join_tol_mm: float = DEFAULT_JOIN_TOL_MM,
             name: str | None = None) -> Drawing:
    """The closed contours on ``layers`` (default: every layer but the pin layer) and the pin spots on
    ``pin_layer`` of the DXF file at ``path``, in mm.

    ``units`` (``mm``, ``in``, ...) is used when the header has none; ``join_tol_mm`` is how far apart two
    edge ends may be and still be joined; ``name`` is how messages name the file (default: as given).
    Raises :class:`DrawingError` for a file that cannot be read, units missing, nothing on the layers
    (listing the layers that hold geometry), an open or branching chain (naming the gaps and where), an
    entity out of the plane, or a contour that crosses itself or encloses nothing.
    """
    import ezdxf
    from ezdxf.lldxf.const import DXFError

    source = name or str(path)
    path = Path(path)
    if not path.is_file():
        raise DrawingError(f"{source}: no such file")
    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, DXFError, UnicodeError, ValueError) as error:
        raise DrawingError(f"{source}: not a readable DXF file ({error})") from None
    header = doc.header.get("$INSUNITS", None)
    try:
        code = None if header is None else int(header)
    except (TypeError, ValueError):
        raise DrawingError(f"{source}: header $INSUNITS is {header!r}, not a unit code") from None
    unit, scale = drawing_units(code, units, source)
    place = Place(source, unit, scale)
    wanted = _layer_set(layers)
    pin_key = pin_layer.casefold() if pin_layer else None

    def outline_layer(key: str) -> bool:
        if wanted is None:
            return key != pin_key  # every layer but the pins'
        return key in wanted

    tol = CHORD_TOL_MM
    open_edges: list[Edge] = []
    closed: list[Contour] = []
    pins: list[DrawnPin] = []
    found: Counter[str] = Counter()
    layer_names: dict[str, str] = {}
    for entity in doc.modelspace():
        kind = entity.dxftype()
        layer = str(entity.dxf.get("layer", "0"))
        key = layer.casefold()
        layer_names.setdefault(key, layer)
        if kind in GEOMETRY or kind == "POINT":
            found[key] += 1
        origin = f"{kind} #{entity.dxf.handle}"
        if key == pin_key and (kind == "POINT" or (kind == "CIRCLE" and not (wanted and key in wanted))):
            x, y = _point(entity, "location" if kind == "POINT" else "center", scale)
            pins.append(DrawnPin(x, y, origin))
            continue
        if not outline_layer(key):
            continue
        if kind == "INSERT":
            raise DrawingError(f"{source}: block reference {origin} (block {entity.dxf.name!r}) on layer {layer}: "
                               "its edges are not read; explode it in the drawing")
        if kind not in GEOMETRY:
            continue
        _check_plane(entity, origin, source)
        try:
            edges, is_closed = _edges(entity, kind, layer, origin, scale, tol, place)
        except DrawingError as error:
            if str(error).startswith(f"{source}:"):
                raise
            raise DrawingError(f"{source}: {origin} on layer {layer}: {error}") from None
        except (ValueError, ZeroDivisionError, IndexError, ArithmeticError) as error:
            raise DrawingError(f"{source}: {origin} on layer {layer} cannot be read: {error}") from None
        if is_closed:
            closed.append(Contour(tuple(edges)))
        else:
            open_edges.extend(edges)
    if pin_layer and not pins:
        raise DrawingError(f"{source}: no POINT on the pin layer {pin_layer!r}{_layers_hint(pin_layer, layer_names)}"
                           f"; {_layer_list(found, layer_names)}")
    contours = closed + join_edges(open_edges, join_tol_mm, place)
    if not contours:
        asked = ("on layer" + ("s " if len(wanted or ()) > 1 else " ") +
                 ", ".join(repr(n) for n in _as_list(layers))) if wanted else "in the drawing"
        hint = _layers_hint(_as_list(layers)[0], layer_names) if wanted and len(wanted) == 1 else ""
        raise DrawingError(f"{source}: no outline {asked}{hint}; {_layer_list(found, layer_names)}")
    for i, contour in enumerate(contours):
        check_contour(contour, place, f"contour {i + 1}")
    return Drawing(tuple(contours), tuple(pins), place)


def _as_list(layers: str | Sequence[str] | None) -> list[str]:
    if layers is None:
        return []
    return [layers] if isinstance(layers, str) else list(layers)


def _layer_set(layers: str | Sequence[str] | None) -> set[str] | None:
    names = _as_list(layers)
    return {n.casefold() for n in names} if names else None


def _layers_hint(asked: str, names: dict[str, str]) -> str:
    return suggest(asked, list(names.values()))


def _layer_list(found: Counter[str], names: dict[str, str]) -> str:
    if not found:
        return "the drawing's model space holds no lines, arcs, circles, polylines, splines, ellipses or points"
    listed = ", ".join(f"{names[k]} ({n})" for k, n in sorted(found.items(), key=lambda kv: names[kv[0]]))
    return f"layers with geometry (entities): {listed}"


def _check_plane(entity, origin: str, source: str) -> None:
    if not entity.dxf.hasattr("extrusion"):
        return
    x, y, z = entity.dxf.extrusion
    if abs(x) > PLANE_TOL * abs(z) or abs(y) > PLANE_TOL * abs(z) or z == 0:
        raise DrawingError(f"{source}: {origin} on layer {entity.dxf.layer} is not drawn in the X–Y plane "
                           f"(extrusion ({x:g}, {y:g}, {z:g})): draw the outline flat in the plan view")


def _mirrored(entity) -> bool:
    """True when the entity's object coordinate system is the X–Y plane seen from below (extrusion −Z)."""
    return entity.dxf.hasattr("extrusion") and entity.dxf.extrusion[2] < 0


def _point(entity, attribute: str, scale: float) -> tuple[float, float]:
    p = entity.dxf.get(attribute)
    if entity.dxftype() != "POINT" and _mirrored(entity):
        p = entity.ocs().to_wcs(p)
    return float(p[0]) * scale, float(p[1]) * scale


def _edges(entity, kind: str, layer: str, origin: str, scale: float, tol: float,
           place: Place) -> tuple[list[Edge], bool]:
    """The entity's edges in mm and whether they already form a closed contour."""
    if kind == "LINE":
        a, b = entity.dxf.start, entity.dxf.end
        return [line_edge((a[0] * scale, a[1] * scale), (b[0] * scale, b[1] * scale), layer, origin)], False
    if kind == "CIRCLE":
        (x, y), r = _point(entity, "center", scale), float(entity.dxf.radius) * scale
        if not r > 0:
            raise DrawingError(f"{place.source}: {origin} on layer {layer} has no radius")
        return list(circle_edges((x, y), r, layer, origin, tol)), True
    if kind == "ARC":
        sweep = (float(entity.dxf.end_angle) - float(entity.dxf.start_angle)) % 360.0
        if sweep == 0.0 or not float(entity.dxf.radius) > 0:
            raise DrawingError(f"{place.source}: {origin} on layer {layer} has no sweep or no radius")
        a, b = entity.start_point, entity.end_point  # WCS (ezdxf applies the OCS)
        bulge = math.tan(math.radians(sweep) / 4.0) * (-1.0 if _mirrored(entity) else 1.0)
        return [arc_edge((a[0] * scale, a[1] * scale), (b[0] * scale, b[1] * scale), bulge, layer, origin, tol)], False
    if kind in ("LWPOLYLINE", "POLYLINE"):
        return _polyline(entity, kind, layer, origin, scale, tol, place)
    if kind == "SPLINE":
        return _spline(entity, layer, origin, scale, tol, place)
    return _ellipse(entity, layer, origin, scale, tol)


def _polyline(entity, kind: str, layer: str, origin: str, scale: float, tol: float,
              place: Place) -> tuple[list[Edge], bool]:
    flip = -1.0 if _mirrored(entity) else 1.0
    if kind == "LWPOLYLINE":
        ocs, z = entity.ocs(), float(entity.dxf.elevation)
        raw = [(ocs.to_wcs((x, y, z)), b * flip) for x, y, b in entity.get_points("xyb")]
        closed = bool(entity.closed)
    else:
        if entity.is_poly_face_mesh or entity.is_polygon_mesh:
            raise DrawingError(f"{place.source}: {origin} on layer {layer} is a mesh, not an outline")
        closed = bool(entity.is_closed)
        vertices = [v for v in entity.vertices if not v.dxf.flags & 16]  # 16: spline frame control point
        if entity.is_2d_polyline:
            ocs, z = entity.ocs(), float(entity.dxf.elevation[2])
            raw = [(ocs.to_wcs((v.dxf.location[0], v.dxf.location[1], z)), float(v.dxf.bulge) * flip)
                   for v in vertices]
        else:
            raw = [(v.dxf.location, 0.0) for v in vertices]
    pts = [(float(p[0]) * scale, float(p[1]) * scale) for p, _ in raw]
    bulges = [b for _, b in raw]
    count = len(pts) if closed else len(pts) - 1
    edges = []
    for i in range(count):
        a, b = pts[i], pts[(i + 1) % len(pts)]
        if math.dist(a, b) <= 1e-12:
            continue
        where = f"{origin} segment {i + 1}"
        edges.append(arc_edge(a, b, bulges[i], layer, where, tol) if bulges[i] != 0.0
                     else line_edge(a, b, layer, where))
    if closed and edges:
        return edges, True
    return edges, False


def _spline(entity, layer: str, origin: str, scale: float, tol: float, place: Place) -> tuple[list[Edge], bool]:
    from ezdxf.lldxf.const import DXFError

    try:
        spline = entity.construction_tool()
    except (DXFError, ValueError, IndexError, ArithmeticError) as error:  # a spline without usable points
        raise DrawingError(f"{place.source}: {origin} on layer {layer} cannot be evaluated ({error})") from None
    control = np.asarray([(p[0] * scale, p[1] * scale) for p in spline.control_points], dtype=float)
    weights = np.asarray(spline.weights(), dtype=float) if spline.is_rational else None
    points, tangents = flatten_bspline(control, np.asarray(spline.knots(), dtype=float), spline.degree, weights, tol)
    edge = curve_edge(points, tangents, layer, origin)
    gap = math.dist(edge.start, edge.end)
    if entity.closed and gap > tol:
        raise DrawingError(f"{place.source}: {origin} on layer {layer} is marked closed but its curve ends "
                           f"{place.length(gap)} from where it starts, at {place.at(edge.end)}: store the spline "
                           "with its control points, or close it with an edge")
    return [edge], False


def _ellipse(entity, layer: str, origin: str, scale: float, tol: float) -> tuple[list[Edge], bool]:
    ellipse = entity.construction_tool()  # WCS: centre, major and minor axis vectors, parameters
    centre = np.asarray(ellipse.center)[:2] * scale
    major = np.asarray(ellipse.major_axis)[:2] * scale
    minor = np.asarray(ellipse.minor_axis)[:2] * scale
    t0 = float(ellipse.start_param)
    span = (float(ellipse.end_param) - t0) % (2 * math.pi)
    full = span <= 1e-12 or abs(span - 2 * math.pi) <= 1e-12
    span = 2 * math.pi if full else span
    a, b = float(np.hypot(*major)), float(np.hypot(*minor))
    ccw = (major[0] * minor[1] - major[1] * minor[0]) > 0
    if math.isclose(a, b, rel_tol=1e-9):  # a circle or a circular arc
        if full:
            return list(circle_edges(centre, a, layer, origin, tol)), True
        start = centre + major * math.cos(t0) + minor * math.sin(t0)
        end = centre + major * math.cos(t0 + span) + minor * math.sin(t0 + span)
        bulge = math.tan(span / 4.0) * (1.0 if ccw else -1.0)
        return [arc_edge(tuple(start), tuple(end), bulge, layer, origin, tol)], False
    points, tangents = flatten_ellipse(centre, major, minor, t0, t0 + span, tol)
    edge = curve_edge(points, tangents, layer, origin)
    if full:
        return [edge.with_ends(edge.start, edge.start)], True
    return [edge], False
