"""Reading a ``kind: part`` spec: a flanged part whose outline comes from a drawing.

The drawing is read here, while the spec is validated, so a mistake in it (an open chain, a layer that does not
exist, a flange run off the outline) is reported at the spec key that names it, with the drawing's entity and place,
like any other spec mistake.  The part becomes a one-piece :class:`~diegen.spec.model.RibSpec` whose ``drawn`` field
holds the outline; every later layer treats it as it treats a rib.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

from diegen.errors import DrawingError, SpecError
from diegen.sources import (
    DEFAULT_JOIN_TOL_MM,
    AllEdges,
    Between,
    Drawing,
    Flange,
    FlangeRunSpec,
    OnLayer,
    Place,
    drawn_part,
    read_dxf,
    read_points,
    read_svg_path,
)
from diegen.sources.joggle import JoggleSpec
from diegen.sources.model import DIRECTIONS, OUTLINE_IS
from diegen.sources.units import DRAWING_UNITS, SVG_UNITS
from diegen.spec.model import AirfoilSource, DrawnOutline, Holes, Pins, RibSpec, Shared
from diegen.spec.reader import Reader, describe, join
from diegen.spec.schema import read_header, read_paper, read_shared
from diegen.spec.yamltree import YNode

__all__ = ["MAX_DRAWING_BYTES", "MAX_RUN_ANGLE_DEG", "MIN_RUN_ANGLE_DEG", "PART_KEYS", "PART_SHARED_KEYS", "read_part"]

MAX_DRAWING_BYTES = 20 * 1024 * 1024  # project limit: a part drawing larger than this is not one part
PART_SHARED_KEYS = ("sheet", "flange", "hole_rules", "dowel_diameter", "relief", "die", "press", "joggle_runout")
PART_KEYS = ("diegen", "kind", "id", "units", "title", "paper", "outline", "flanges", "holes", "pins", "joggles",
             *PART_SHARED_KEYS)
MAX_JOGGLES = 20
MAX_JOGGLE_DEPTH_MM = 10.0  # project limit: deeper is no joggle but a step in the part
OUTLINE_KEYS = ("file", "layer", "units", "svg", "points", "is", "join_tolerance")
RUN_KEYS = ("layer", "from", "to", "direction", "height", "bend_radius", "angle")
# A run's own bend angle (degrees bent through from the web): at most square (90°), at least MIN_RUN_ANGLE_DEG.
# Project limit: the die wall under a flange of angle θ leans out 90° − θ from the vertical going down (the die's
# foot grows by height·cot θ beyond its outline), so below 30° it leans out more than 60° and grows by more than
# 1.7 times its height; and a flange that nearly lies in the web's plane is pressed onto the die by a small part of
# the rubber's pressure only.  Such a lip is a separate operation (a bevel on a brake, or by hand).
MIN_RUN_ANGLE_DEG = 30.0
MAX_RUN_ANGLE_DEG = 90.0


def read_part(r: Reader, root: dict[str, YNode], spec_dir: Path) -> RibSpec:
    """The part spec ``root`` as a one-piece :class:`RibSpec` (problems recorded in ``r``); the header and the
    sections a part shares with a rib are read by the rib schema's readers."""
    r.top_level(root, PART_KEYS, ("id", "outline"))
    ident, title = read_header(r, root, "part")
    shared: Shared = read_shared(r, {k: v for k, v in root.items() if k in PART_SHARED_KEYS}, required=(
        "sheet", "flange", "die", "press"))
    flanged_holes = _holes(r, root.get("holes"))
    pin_layer = _pin_layer(r, root.get("pins"))
    drawn = None
    if shared.flange is not None and not r.problems:
        drawn = _drawn(r, root, spec_dir, shared, flanged_holes, pin_layer)
    paper = read_paper(r, root)
    if drawn is None:  # problems recorded: the spec is refused before anything reads these
        return RibSpec(ident, r.units, None, 0.0, (), shared, r.file, title, paper=paper)  # type: ignore[arg-type]
    shared = replace(shared, skin_thickness_mm=0.0, pieces=("part",), holes=Holes("none", shared.holes.rules),
                     pins=Pins("auto", shared.pins.diameter_mm))
    xs = [p[0] for p in drawn.part.outline.points]
    return RibSpec(ident, r.units, AirfoilSource(), max(xs) - min(xs), (), shared, r.file, title,  # type: ignore[arg-type]
                   section=drawn.label, paper=paper, drawn=drawn)


def _holes(r: Reader, node: YNode | None) -> bool:
    return r.choice(node, "holes", ("plain", "flanged")) == "flanged"


def _pin_layer(r: Reader, node: YNode | None) -> str | None:
    """The layer the drawing's pin spots are on, or None for pins placed automatically."""
    if node is None or node.value == "auto":
        return None
    if not node.is_map:
        r.problem(node, "pins", f"expected auto or {{layer: NAME}}, found {describe(node)}")
        return None
    fields = r.mapping(node, "pins", ("layer",), ("layer",))
    return r.text(fields.get("layer"), "pins.layer") if fields else None


def _drawn(r: Reader, root: dict[str, YNode], spec_dir: Path, shared: Shared, flanged_holes: bool,
           pin_layer: str | None) -> DrawnOutline | None:
    node = root["outline"]
    fields = r.mapping(node, "outline", OUTLINE_KEYS, ("is",))
    if fields is None:
        return None
    sources = [k for k in ("file", "svg", "points") if k in fields]
    if len(sources) != 1:
        r.problem(node, "outline", "expected exactly one of 'file' (a DXF drawing), 'svg' (SVG path data) or "
                                   f"'points', found {', '.join(repr(k) for k in sources) or 'none'}")
        return None
    outline_is = r.choice(fields.get("is"), "outline.is", OUTLINE_IS)
    join_tol = r.length(fields.get("join_tolerance"), "outline.join_tolerance", high=5.0) or DEFAULT_JOIN_TOL_MM
    flange = shared.flange
    run_nodes = _run_nodes(r, root.get("flanges"))
    if outline_is is None or run_nodes is None or r.problems:
        return None
    layers = _layers(r, fields.get("layer"))
    (source,) = sources
    try:
        drawing, label = _read_drawing(r, source, fields, spec_dir, join_tol, layers, run_nodes, pin_layer)
    except DrawingError as error:
        key = join("outline", source)
        r.problem(fields[source], key, str(error).removeprefix(f"{key}: "))
        return None
    if drawing is None:
        return None
    runs = _runs(r, run_nodes, flange, drawing)
    if runs is None:
        return None
    try:
        part = drawn_part(drawing, runs, outline_is)
    except DrawingError as error:
        at = next(((n, f"flanges[{i}]") for i, n in enumerate(run_nodes) if f"flanges[{i}]" in str(error)),
                  (node, "outline"))
        r.problem(at[0], at[1], str(error))
        return None
    joggles = _joggles(r, root.get("joggles"), drawing)
    if joggles is None:
        return None
    shown = "mold line" if outline_is == "mold-line" else "die outline"
    return DrawnOutline(part, flanged_holes, f"{label}, {shown}", joggles)


def _joggles(r: Reader, node: YNode | None, drawing: Drawing) -> tuple[JoggleSpec, ...] | None:
    """The joggles asked for: from/to in the drawing's unit and frame, depth a length in the spec's units."""
    if node is None:
        return ()
    joggles = []
    for i, item in enumerate(r.sequence(node, "joggles", 1, MAX_JOGGLES) or ()):
        path = join("joggles", i)
        fields = r.mapping(item, path, ("from", "to", "depth"), ("from", "to", "depth"))
        if fields is None:
            continue
        ends = [_point(r, fields[k], join(path, k), drawing.place) for k in ("from", "to")]
        depth = r.length(fields["depth"], join(path, "depth"), high=MAX_JOGGLE_DEPTH_MM)
        if None not in ends and depth is not None:
            joggles.append(JoggleSpec(ends[0], ends[1], depth, path))  # type: ignore[arg-type]
    return None if r.problems else tuple(joggles)


def _layers(r: Reader, node: YNode | None) -> list[str] | None:
    if node is None:
        return None
    items = node.value if node.is_list else [node]
    names = [r.text(item, "outline.layer") for item in items]
    return [n for n in names if n] or None


def _read_drawing(r: Reader, source: str, fields: dict[str, YNode], spec_dir: Path, join_tol: float,
                  layers: list[str] | None, run_nodes: list[YNode], pin_layer: str | None
                  ) -> tuple[Drawing | None, str]:
    units_node = fields.get("units")
    if source == "points":
        unit = r.choice(units_node, "outline.units", tuple(DRAWING_UNITS)) if units_node else r.units
        if unit is None:
            return None, ""
        try:
            drawing = read_points(fields["points"].plain(), DRAWING_UNITS[unit], unit, "outline.points")
        except SpecError as error:
            points = fields["points"]
            for problem in error.problems:
                index = problem.key.removeprefix("outline.points").strip("[]").partition("]")[0]
                item = points.value[int(index)] if index.isdigit() and points.is_list else points
                r.problem(item, problem.key, problem.message)
            return None, ""
        return drawing, "outline points"
    if source == "svg":
        unit = r.choice(units_node, "outline.units", tuple(SVG_UNITS))
        if units_node is None:
            r.problem(fields["svg"], "outline.units", "SVG path data has no unit: give outline.units (mm, in, px, "
                                                       "pt, ...)")
        text = r.text(fields["svg"], "outline.svg")
        if unit is None or text is None:
            return None, ""
        return read_svg_path(text, unit, name="outline.svg", join_tol_mm=join_tol), "SVG path"
    path = r.input_file(fields["file"], "outline.file", spec_dir, "drawing", MAX_DRAWING_BYTES, "a DXF drawing")
    unit = r.choice(units_node, "outline.units", tuple(DRAWING_UNITS)) if units_node else None
    if path is None or (units_node is not None and unit is None):
        return None, ""
    flange_layers = [str(n.value["layer"].value) for n in run_nodes if n.is_map and "layer" in n.value]
    wanted = None if layers is None else [*layers, *flange_layers]
    drawing = read_dxf(path, wanted, pin_layer=pin_layer, units=unit, join_tol_mm=join_tol, name=path.name)
    if not layers:
        return drawing, path.name
    return drawing, f"{path.name}, layer{'s' if len(layers) > 1 else ''} {', '.join(layers)}"


def _run_nodes(r: Reader, node: YNode | None) -> list[YNode] | None:
    """The flange runs' nodes: [] for ``all`` (or none given)."""
    if node is None or node.value == "all":
        return []
    if not node.is_list:
        r.problem(node, "flanges", f"expected all, or a list of flange runs, found {describe(node)}")
        return None
    items = r.sequence(node, "flanges", 1, 200)
    if items is None:
        return None
    for i, item in enumerate(items):
        path = join("flanges", i)
        fields = r.mapping(item, path, RUN_KEYS)
        if fields is None:
            continue
        if "height" in fields:
            r.length(fields["height"], join(path, "height"), high=200.0)
        if "bend_radius" in fields:
            r.length(fields["bend_radius"], join(path, "bend_radius"), high=100.0)
        if "angle" in fields:
            _run_angle(r, fields["angle"], join(path, "angle"))
        has_layer, has_ends = "layer" in fields, ("from" in fields, "to" in fields)
        if has_layer == any(has_ends) or (any(has_ends) and not all(has_ends)):
            r.problem(item, path, "expected either 'layer' (the outline's edges on that layer) or both 'from' and "
                                  "'to' (a stretch of the outline, counter-clockwise)")
        r.choice(fields.get("direction"), join(path, "direction"), DIRECTIONS)
        if has_layer:
            r.text(fields["layer"], join(path, "layer"))
    return items


def _run_angle(r: Reader, node: YNode, path: str) -> float | None:
    """A run's bend angle in degrees (the angle bent through from the web), within the forming limits."""
    value = node.value
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) \
            or not MIN_RUN_ANGLE_DEG <= value <= MAX_RUN_ANGLE_DEG:
        r.problem(node, path, f"expected the angle the flange is bent through from the web, in degrees from "
                              f"{MIN_RUN_ANGLE_DEG:g} to {MAX_RUN_ANGLE_DEG:g} (90: square to the web), found "
                              f"{describe(node)}")
        return None
    return float(value)


def _runs(r: Reader, run_nodes: list[YNode], flange, drawing: Drawing) -> list[FlangeRunSpec] | None:
    """The flange runs in the drawing's coordinates (mm); from/to points are in the drawing's own unit."""
    shape = Flange(flange.height_mm, flange.bend_radius_mm)
    if not run_nodes:
        return [FlangeRunSpec(AllEdges(), shape, "flanges")]
    runs = []
    for i, item in enumerate(run_nodes):
        path, fields = join("flanges", i), item.value
        direction = fields["direction"].value if "direction" in fields else "down"
        height = r.length(fields["height"], join(path, "height"), high=200.0) if "height" in fields else None
        radius = r.length(fields["bend_radius"], join(path, "bend_radius"), high=100.0) \
            if "bend_radius" in fields else None
        angle = _run_angle(r, fields["angle"], join(path, "angle")) if "angle" in fields else None
        run_shape = replace(shape, direction=direction, height_mm=shape.height_mm if height is None else height,
                            bend_radius_mm=shape.bend_radius_mm if radius is None else radius,
                            angle_deg=shape.angle_deg if angle is None else angle)
        if "layer" in fields:
            runs.append(FlangeRunSpec(OnLayer(str(fields["layer"].value)), run_shape, path))
            continue
        ends = [_point(r, fields[k], join(path, k), drawing.place) for k in ("from", "to")]
        if None in ends:
            continue
        runs.append(FlangeRunSpec(Between(ends[0], ends[1]), run_shape, path))  # type: ignore[arg-type]
    return None if len(runs) < len(run_nodes) else runs


def _point(r: Reader, node: YNode, path: str, place: Place) -> tuple[float, float] | None:
    """A point given in the drawing's own unit and frame, in mm with y up (an SVG's y points down)."""
    items = r.sequence(node, path, 2, 2)
    if items is None:
        return None
    values = [item.value for item in items]
    if any(isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) for v in values):
        r.problem(node, path, f"expected a point [x, y] of two finite numbers in the drawing's unit, found "
                              f"{node.plain()!r}")
        return None
    scale = place.mm_per_unit
    return float(values[0]) * scale, float(values[1]) * scale * (-1.0 if place.y_down else 1.0)
