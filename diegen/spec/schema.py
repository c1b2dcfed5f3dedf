"""The spec language: which keys exist, what each expects, and their defaults.

Every key is documented in ``specs/README.md``; keep the two in step.
Readers take an optional ``base`` so a wing's per-rib override may change one
key of a section and keep the rest.
"""

from __future__ import annotations

import itertools
import re
from dataclasses import replace
from pathlib import Path
from typing import Any

from diegen import units
from diegen.spec.model import (
    PIECE_NAMES,
    RELIEF_POLICIES,
    RIB_ORIENTATIONS,
    AirfoilSource,
    Die,
    Flange,
    FlangeTrial,
    HoleRules,
    Holes,
    HoleSpec,
    Pins,
    PinSpot,
    Press,
    RibOverride,
    RibSpec,
    Rubber,
    Shared,
    Sheet,
    Spar,
    Stations,
    WingSpar,
    WingSpec,
)
from diegen.spec.reader import Reader, describe, join, suggest
from diegen.spec.yamltree import YNode
from diegen.units import in_to_mm

__all__ = [
    "HEADER_KEYS",
    "ID_PATTERN",
    "MAX_RIBS",
    "NACA_PATTERN",
    "RIB_KEYS",
    "SHARED_KEYS",
    "SPEC_VERSION",
    "WALL_CLEARANCE",
    "WING_KEYS",
    "by_units",
    "check_pieces",
    "default_hole_rules",
    "read_airfoil",
    "read_die",
    "read_flange",
    "read_header",
    "read_hole_rules",
    "read_holes",
    "read_overrides",
    "read_pieces",
    "read_pins",
    "read_press",
    "read_rib",
    "read_shared",
    "read_sheet",
    "read_spar",
    "read_spars",
    "read_stations",
    "read_wing",
]

SPEC_VERSION = 1
MAX_RIBS = 200  # ribs of one wing spec, however the stations are given
ID_PATTERN = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")
# Matched against the stripped text; no two neighbouring parts can take the same characters (no slow backtracking).
NACA_PATTERN = re.compile(r"^(?:naca\s*)?(?:-\s*)?(\d{4,5})$", re.IGNORECASE)

HEADER_KEYS = ("diegen", "kind", "id", "units", "title", "paper")
PAPER_SIZES = ("a4", "letter")  # ISO 216 A4, 210 × 297 mm; Letter, 8.5 × 11 in
SHARED_KEYS = ("skin_thickness", "sheet", "flange", "pieces", "lightening_holes", "hole_rules", "pins",
               "dowel_diameter", "relief", "die", "press", "joggle_runout")
RIB_KEYS = (*HEADER_KEYS, "airfoil", "chord", "spars", *SHARED_KEYS)
WING_KEYS = (*HEADER_KEYS, "planform", "airfoil", "spars", "overrides", *SHARED_KEYS)

# Room wanted between the die and each wall of the rubber box when the spec gives none: a round number in the
# spec's own units, 1 in or 25 mm (common practice, no source).  Read as ``by_units(units, *WALL_CLEARANCE)``.
WALL_CLEARANCE = (1.0, 25.0)  # (in, mm)


def by_units(units_name: str, inch_value: float, mm_value: float) -> float:
    """A default that is a round number in the spec's own units (returned in mm)."""
    return in_to_mm(inch_value) if units_name == "in" else mm_value


def _get(node_map: dict[str, YNode] | None, key: str) -> YNode | None:
    return None if node_map is None else node_map.get(key)


def _or(value: Any, fallback: Any) -> Any:
    return fallback if value is None else value


# -- header ----------------------------------------------------------------
def _id_message(value: str) -> str | None:
    if not ID_PATTERN.match(value):
        return ("expected an id of letters, digits, '-', '_' or '.' (up to 64, no spaces or slashes: "
                f"it names output folders), found {value!r}")
    return None


def read_header(r: Reader, root: dict[str, YNode], kind: str) -> tuple[str | None, str]:
    version = root.get("diegen")
    if version is not None and (isinstance(version.value, bool) or version.value != SPEC_VERSION):
        r.problem(version, "diegen", f"expected spec language version {SPEC_VERSION}, found {describe(version)}")
    ident = r.text(root.get("id"), "id", _id_message)
    title = r.text(root.get("title"), "title") or ""
    return ident, title


def read_paper(r: Reader, root: dict[str, YNode]) -> str:
    """The paper size of every PDF the spec makes: ``paper``, by default Letter for inch specs and A4 for mm."""
    return r.choice(root.get("paper"), "paper", PAPER_SIZES) or ("letter" if r.units == "in" else "a4")


# -- airfoil ---------------------------------------------------------------
def read_airfoil(r: Reader, node: YNode | None, path: str, spec_dir: Path) -> AirfoilSource | None:
    if node is None:
        return None
    if isinstance(node.value, str):
        return _naca(r, node, path, node.value, AirfoilSource())
    fields = r.mapping(node, path, ("naca", "file", "closed_te", "points"))
    if fields is None:
        return None
    has_naca, has_file = "naca" in fields, "file" in fields
    if has_naca == has_file:
        r.problem(node, path, "expected exactly one of 'naca' or 'file'")
        return None
    base = AirfoilSource(closed_te=_or(r.boolean(fields.get("closed_te"), join(path, "closed_te")), True),
                         points=_or(r.integer(fields.get("points"), join(path, "points"), 41, 4001), 241))
    if has_naca:
        naca_node = fields["naca"]
        if isinstance(naca_node.value, bool) or not isinstance(naca_node.value, (str, int)):
            r.problem(naca_node, join(path, "naca"),
                      f"expected 4 or 5 digits such as '2412', found {describe(naca_node)}")
            return None
        if isinstance(naca_node.value, int) and not 1000 <= naca_node.value <= 99999:
            r.problem(naca_node, join(path, "naca"),
                      f"expected 4 or 5 digits such as '2412', found {describe(naca_node)}: "
                      "write the digits in quotes ('0012'; YAML reads a bare 0012 as the octal number 10)")
            return None
        return _naca(r, naca_node, join(path, "naca"), str(naca_node.value), base)
    from diegen.geometry.coordfile import EXPECTED, MAX_FILE_BYTES

    file_path = r.input_file(fields["file"], join(path, "file"), spec_dir, "airfoil file", MAX_FILE_BYTES, EXPECTED)
    if file_path is None:
        return None
    return replace(base, file=str(file_path))


def _naca(r: Reader, node: YNode, path: str, text: str, base: AirfoilSource) -> AirfoilSource | None:
    match = NACA_PATTERN.match(text.strip())
    if not match:
        shown = text if len(text) <= 40 else text[:37] + "..."
        r.problem(node, path,
                  f"expected 'naca' and 4 or 5 digits (e.g. 'naca 2412') or {{file: path}}, found {shown!r}")
        return None
    return replace(base, naca=match[1])


# -- shared sections -------------------------------------------------------
def read_sheet(r: Reader, node: YNode | None, path: str, base: Sheet | None = None) -> Sheet | None:
    from diegen import materials

    fields = r.mapping(node, path, ("alloy", "thickness"), () if base else ("alloy", "thickness"))
    if fields is None:
        return None
    alloy = r.choice(fields.get("alloy"), join(path, "alloy"), materials.sheet_alloy_names())
    thickness = r.length(fields.get("thickness"), join(path, "thickness"), high=in_to_mm(0.5))
    return Sheet(_or(alloy, base and base.alloy), _or(thickness, base and base.thickness_mm))


def read_flange(r: Reader, node: YNode | None, path: str, base: Flange | None = None) -> Flange | None:
    from diegen import materials

    fields = r.mapping(node, path, ("height", "bend_radius", "radius_table", "min_tail_depth", "trial"),
                       () if base else ("height", "bend_radius"))
    if fields is None:
        return None
    height = r.length(fields.get("height"), join(path, "height"), high=200.0)
    radius = r.length(fields.get("bend_radius"), join(path, "bend_radius"), high=100.0)
    table = r.choice(fields.get("radius_table"), join(path, "radius_table"), materials.bend_radius_tables())
    tail = r.length(fields.get("min_tail_depth"), join(path, "min_tail_depth"))
    trial = read_trial(r, fields.get("trial"), join(path, "trial")) if "trial" in fields else None
    return Flange(_or(height, base and base.height_mm), _or(radius, base and base.bend_radius_mm),
                  _or(table, base.radius_table if base else "aa"), _or(tail, base and base.min_tail_depth_mm),
                  trial if "trial" in fields else (base.trial if base else None))


def read_trial(r: Reader, node: YNode | None, path: str) -> FlangeTrial | None:
    """``trial: {die_angle, part_angle, die_radius?, part_radius?}``: degrees, and lengths in the spec's units."""
    fields = r.mapping(node, path, ("die_angle", "part_angle", "die_radius", "part_radius"),
                       ("die_angle", "part_angle"))
    if fields is None:
        return None
    die_angle = r.number(fields.get("die_angle"), join(path, "die_angle"), 45.0, 135.0, False, False)
    part_angle = r.number(fields.get("part_angle"), join(path, "part_angle"), 45.0, 135.0, False, False)
    die_r = r.length(fields.get("die_radius"), join(path, "die_radius"), high=100.0) if "die_radius" in fields else None
    part_r = (r.length(fields.get("part_radius"), join(path, "part_radius"), high=100.0)
              if "part_radius" in fields else None)
    if ("die_radius" in fields) != ("part_radius" in fields):
        r.problem(node, path, "give both die_radius and part_radius of the trial, or neither")
    if die_angle is None or part_angle is None:
        return None
    return FlangeTrial(die_angle, part_angle, die_r, part_r)


def read_spar(r: Reader, node: YNode, path: str, wing: bool) -> Spar | WingSpar | None:
    position_keys = ("at", "root_at", "tip_at") if wing else ("at",)
    fields = r.mapping(node, path, (*position_keys, "web", "cap_thickness", "cap_width"),
                       ("web", "cap_thickness", "cap_width") + (() if wing else ("at",)))
    if fields is None:
        return None
    positions = {k: r.number(fields.get(k), join(path, k), 0.0, 1.0, True, True) for k in position_keys}
    web = r.length(fields.get("web"), join(path, "web"), high=50.0)
    cap_t = r.length(fields.get("cap_thickness"), join(path, "cap_thickness"), low=0.0, low_open=False, high=25.0)
    cap_w = r.length(fields.get("cap_width"), join(path, "cap_width"), low=0.0, low_open=False, high=200.0)
    if not wing:
        return Spar(positions["at"], web, cap_t, cap_w)
    given = {k for k in position_keys if k in fields}
    if given not in ({"at"}, {"root_at", "tip_at"}):
        r.problem(node, path, "expected either 'at' (constant chord fraction) or both 'root_at' and 'tip_at' "
                              "(a straight spar line)")
        return None
    root_at = positions["at"] if "at" in given else positions["root_at"]
    tip_at = positions["at"] if "at" in given else positions["tip_at"]
    return WingSpar(root_at, tip_at, web, cap_t, cap_w)


def read_spars(r: Reader, node: YNode | None, path: str, wing: bool) -> tuple[Any, ...] | None:
    if node is None:
        return ()
    items = r.sequence(node, path, 0, 4)
    if items is None:
        return None
    spars = [read_spar(r, item, join(path, i), wing) for i, item in enumerate(items)]
    for i in range(1, len(spars)):
        a, b = spars[i - 1], spars[i]
        if a is None or b is None:
            continue
        for attr in (("at",) if not wing else ("root_at", "tip_at")):
            if getattr(a, attr) is not None and getattr(b, attr) is not None and getattr(b, attr) <= getattr(a, attr):
                r.problem(items[i], join(join(path, i), "at" if not wing else attr),
                          f"expected spars in order from the leading edge: {getattr(b, attr):g} is not aft of "
                          f"spars[{i - 1}] at {getattr(a, attr):g}")
    return tuple(spars)


def read_pieces(r: Reader, node: YNode | None, path: str) -> tuple[str, ...] | None:
    if node is None:
        return None
    items = r.sequence(node, path, 1, 3)
    if items is None:
        return None
    names = []
    for i, item in enumerate(items):
        name = "center" if item.value == "centre" else r.choice(item, join(path, i), PIECE_NAMES)
        if name in names:
            r.problem(item, join(path, i), f"piece {name!r} listed twice")
        elif name:
            names.append(name)
    return tuple(n for n in PIECE_NAMES if n in names)


def default_hole_rules(units_name: str) -> HoleRules:
    """Common practice, no source: margins a builder can work with in a small shop."""
    return HoleRules(edge_margin_mm=by_units(units_name, 0.25, 6.0), ligament_mm=by_units(units_name, 0.5, 12.0),
                     min_diameter_mm=by_units(units_name, 0.75, 20.0), flanged=True,
                     flange_height_mm=by_units(units_name, 0.25, 6.0))


def read_hole_rules(r: Reader, node: YNode | None, path: str, base: HoleRules) -> HoleRules:
    fields = r.mapping(node, path, ("edge_margin", "ligament", "min_diameter", "flanged", "flange_height"))
    if fields is None:
        return base
    return HoleRules(
        _or(r.length(fields.get("edge_margin"), join(path, "edge_margin"), low_open=False), base.edge_margin_mm),
        _or(r.length(fields.get("ligament"), join(path, "ligament")), base.ligament_mm),
        _or(r.length(fields.get("min_diameter"), join(path, "min_diameter")), base.min_diameter_mm),
        _or(r.boolean(fields.get("flanged"), join(path, "flanged")), base.flanged),
        _or(r.length(fields.get("flange_height"), join(path, "flange_height")), base.flange_height_mm),
    )


def read_holes(r: Reader, node: YNode | None, path: str, rules: HoleRules) -> Holes | None:
    if node is None:
        return Holes("auto", rules)
    if not node.is_list:
        mode = r.choice(node, path, ("auto", "none"))
        return None if mode is None else Holes(mode, rules)  # type: ignore[arg-type]
    holes = []
    for i, item in enumerate(r.sequence(node, path, 0, 50) or ()):
        p = join(path, i)
        fields = r.mapping(item, p, ("x", "y", "d", "flanged", "flange_height"), ("x", "d"))
        if fields is None:
            continue
        holes.append(HoleSpec(
            x_mm=r.length(fields.get("x"), join(p, "x")),
            d_mm=r.length(fields.get("d"), join(p, "d")),
            y_mm=r.length(fields.get("y"), join(p, "y"), low=-100_000.0, low_open=False),
            flanged=_or(r.boolean(fields.get("flanged"), join(p, "flanged")), rules.flanged),
            flange_height_mm=r.length(fields.get("flange_height"), join(p, "flange_height")),
        ))
    return Holes("list" if holes else "none", rules, tuple(holes))


def read_pins(r: Reader, node: YNode | None, path: str, diameter: float) -> Pins | None:
    if node is None:
        return Pins("auto", diameter)
    if not node.is_list:
        mode = r.choice(node, path, ("auto",))
        return None if mode is None else Pins("auto", diameter)
    spots = []
    for i, item in enumerate(r.sequence(node, path, 2, 20) or ()):
        p = join(path, i)
        fields = r.mapping(item, p, ("x", "y"), ("x",))
        if fields is not None:
            spots.append(PinSpot(r.length(fields.get("x"), join(p, "x")),
                                 r.length(fields.get("y"), join(p, "y"), low=-100_000.0, low_open=False)))
    return Pins("list", diameter, tuple(spots))


def read_die(r: Reader, node: YNode | None, path: str, base: Die | None = None) -> Die | None:

    fields = r.mapping(node, path, ("material", "stock_thickness", "cutter_diameter", "print_bed", "stl_tolerance"),
                       () if base else ("material", "stock_thickness", "cutter_diameter"))
    if fields is None:
        return None
    material = _die_material(r, fields.get("material"), join(path, "material"))
    stock = r.length(fields.get("stock_thickness"), join(path, "stock_thickness"), high=300.0)
    cutter = r.length(fields.get("cutter_diameter"), join(path, "cutter_diameter"), high=50.0)
    bed = None
    if "print_bed" in fields:
        bed_node = fields["print_bed"]
        r_mm = Reader(r.file, "mm")  # print beds are given in mm whatever the spec's units
        bed = r_mm.length_pair(bed_node, join(path, "print_bed"))
        r.problems.extend(r_mm.problems)
    tolerance = r.length(fields.get("stl_tolerance"), join(path, "stl_tolerance"), high=1.0)
    return Die(_or(material, base and base.material), _or(stock, base and base.stock_thickness_mm),
               _or(cutter, base and base.cutter_diameter_mm), _or(bed, base and base.print_bed_mm),
               _or(tolerance, base.stl_tolerance_mm if base else 0.05))


def _die_material(r: Reader, node: YNode | None, path: str) -> str | None:
    """A die material by its name or an alias (``mdf`` for fibreboard), as its catalogue name."""
    from diegen import materials

    if node is None:
        return None
    aliases = materials.die_material_aliases()
    if isinstance(node.value, str) and node.value.strip().lower() in aliases:
        return aliases[node.value.strip().lower()]
    names = materials.die_material_names()
    hint = suggest(node.value.strip().lower(), list(aliases)) if isinstance(node.value, str) else ""
    r.problem(node, path, f"expected one of {', '.join(names)}, found {describe(node)}{hint}")
    return None


def read_press(r: Reader, node: YNode | None, path: str, base: Press | None = None) -> Press | None:
    fields = r.mapping(node, path, ("force", "box", "rubber", "wall_clearance"),
                       () if base else ("force", "box", "rubber"))
    if fields is None:
        return None
    force = r.force(fields.get("force"), join(path, "force"))
    box = r.length_pair(fields.get("box"), join(path, "box"))
    rubber = base.rubber if base else None
    if "rubber" in fields:
        rp = join(path, "rubber")
        rf = r.mapping(fields["rubber"], rp, ("durometer", "thickness"), ("durometer", "thickness"))
        if rf is not None:
            rubber = Rubber(r.number(rf.get("durometer"), join(rp, "durometer"), 20, 95),
                            r.length(rf.get("thickness"), join(rp, "thickness"), high=500.0))
    clearance = r.length(fields.get("wall_clearance"), join(path, "wall_clearance"), low_open=False)
    read = units.force_reading(fields["force"].value) if force is not None else (base.force_read if base else "")
    return Press(_or(force, base and base.force_n), _or(box, base and base.box_mm), rubber,
                 _or(clearance, base.wall_clearance_mm if base else by_units(r.units, *WALL_CLEARANCE)), read)


def read_shared(r: Reader, root: dict[str, YNode], base: Shared | None = None,
                required: tuple[str, ...] = ("skin_thickness", "sheet", "flange", "die", "press")) -> Shared:
    """The sections shared by rib and wing specs (with ``base``: only the keys present change)."""
    for key in required:
        if base is None and key not in root:
            r.problem(None, key, f"missing required key {key!r}")
    skin = r.length(root.get("skin_thickness"), "skin_thickness", high=in_to_mm(0.5))
    rules = read_hole_rules(r, root.get("hole_rules"), "hole_rules",
                            base.holes.rules if base else default_hole_rules(r.units))
    dowel = r.length(root.get("dowel_diameter"), "dowel_diameter", high=in_to_mm(1.0))
    dowel = _or(dowel, base.pins.diameter_mm if base else by_units(r.units, 0.125, 3.0))
    holes_node = root.get("lightening_holes")
    if holes_node or not base:
        holes = read_holes(r, holes_node, "lightening_holes", rules)
    else:
        holes = replace(base.holes, rules=rules)
    pins_node = root.get("pins")
    pins = read_pins(r, pins_node, "pins", dowel) if (pins_node or not base) else replace(base.pins, diameter_mm=dowel)
    relief = r.choice(root.get("relief"), "relief", RELIEF_POLICIES)
    runout = r.number(root.get("joggle_runout"), "joggle_runout", 1.0, 20.0)
    return Shared(
        skin_thickness_mm=_or(skin, base and base.skin_thickness_mm),
        sheet=read_sheet(r, root.get("sheet"), "sheet", base and base.sheet) or (base and base.sheet),
        flange=read_flange(r, root.get("flange"), "flange", base and base.flange) or (base and base.flange),
        pieces=_or(read_pieces(r, root.get("pieces"), "pieces"), base.pieces if base else PIECE_NAMES),
        holes=holes,
        pins=pins,
        relief=_or(relief, base.relief if base else "flutes"),
        die=read_die(r, root.get("die"), "die", base and base.die) or (base and base.die),
        press=read_press(r, root.get("press"), "press", base and base.press) or (base and base.press),
        joggle_runout=_or(runout, base.joggle_runout if base else 4.0),
    )


def check_pieces(r: Reader, root: dict[str, YNode], pieces: tuple[str, ...] | None, spar_count: int) -> None:
    if pieces is None:
        return
    node = root.get("pieces")
    needs = {"nose": 1, "tail": 1, "center": 2}
    for name in pieces:
        if spar_count < needs[name]:
            r.problem(node, "pieces",
                      f"piece {name!r} needs at least {needs[name]} spar(s) to bound it, found {spar_count}")


# -- rib and wing ----------------------------------------------------------
def read_rib(r: Reader, root: dict[str, YNode], spec_dir: Path) -> RibSpec:
    r.top_level(root, RIB_KEYS, ("id", "airfoil", "chord"))
    ident, title = read_header(r, root, "rib")
    airfoil = read_airfoil(r, root.get("airfoil"), "airfoil", spec_dir)
    chord = r.length(root.get("chord"), "chord", high=20_000.0)
    spars = read_spars(r, root.get("spars"), "spars", wing=False)
    shared = read_shared(r, root)
    check_pieces(r, root, shared.pieces, len(spars or ()))
    return RibSpec(ident, r.units, airfoil, chord, spars, shared, r.file, title,  # type: ignore[arg-type]
                   paper=read_paper(r, root))


def read_stations(r: Reader, node: YNode | None, path: str) -> Stations | None:
    if node is None:
        return None
    if node.is_list:
        positions = [r.length(item, join(path, i), low=0.0, low_open=False)
                     for i, item in enumerate(r.sequence(node, path, 2, MAX_RIBS) or ())]
        if None in positions:
            return None
        if any(b <= a for a, b in itertools.pairwise(positions)):
            r.problem(node, path, "expected rib stations in increasing order from the root")
            return None
        return Stations(positions_mm=tuple(positions))  # type: ignore[arg-type]
    fields = r.mapping(node, path, ("count", "pitch"))
    if fields is None:
        return None
    if len(fields) != 1 or not {"count", "pitch"} & fields.keys():
        r.problem(node, path, "expected a list of stations, or exactly one of 'count' or 'pitch'")
        return None
    if "count" in fields:
        count = r.integer(fields["count"], join(path, "count"), 2, MAX_RIBS)
        return None if count is None else Stations(count=count)
    pitch = r.length(fields["pitch"], join(path, "pitch"))
    return None if pitch is None else Stations(pitch_mm=pitch)


def read_wing(r: Reader, root: dict[str, YNode], spec_dir: Path) -> WingSpec:
    r.top_level(root, WING_KEYS, ("id", "planform", "airfoil"))
    ident, title = read_header(r, root, "wing")
    plan = r.mapping(root.get("planform"), "planform",
                     ("root_chord", "tip_chord", "span", "sweep", "sweep_line", "stations", "rib_orientation"),
                     ("root_chord", "tip_chord", "span", "stations"))
    root_chord = r.length(_get(plan, "root_chord"), "planform.root_chord", high=20_000.0)
    tip_chord = r.length(_get(plan, "tip_chord"), "planform.tip_chord", high=20_000.0)
    span = r.length(_get(plan, "span"), "planform.span", high=100_000.0)
    sweep = _or(r.number(_get(plan, "sweep"), "planform.sweep", -60.0, 60.0), 0.0)
    sweep_line = _or(r.number(_get(plan, "sweep_line"), "planform.sweep_line", 0.0, 1.0), 0.25)
    stations = read_stations(r, _get(plan, "stations"), "planform.stations")
    orientation = _or(r.choice(_get(plan, "rib_orientation"), "planform.rib_orientation", RIB_ORIENTATIONS),
                      "streamwise")
    if stations and span and stations.pitch_mm and span / stations.pitch_mm > MAX_RIBS - 1:
        r.problem(_get(plan, "stations"), "planform.stations",
                  f"expected a pitch giving at most {MAX_RIBS} ribs over the span ({span:g} mm), "
                  f"found {stations.pitch_mm:g} mm ({span / stations.pitch_mm + 1:.4g} ribs)")
    if stations and span and stations.positions_mm and stations.positions_mm[-1] > span + 1e-6:
        r.problem(_get(plan, "stations"), "planform.stations",
                  f"expected stations within the span ({span:g} mm), found one at {stations.positions_mm[-1]:g} mm")
    airfoil_node = root.get("airfoil")
    root_af = tip_af = None
    blended = airfoil_node is not None and airfoil_node.is_map and (
        "root" in airfoil_node.value or "tip" in airfoil_node.value)
    if blended:
        fields = r.mapping(airfoil_node, "airfoil", ("root", "tip"), ("root", "tip"))
        root_af = read_airfoil(r, _get(fields, "root"), "airfoil.root", spec_dir)
        tip_af = read_airfoil(r, _get(fields, "tip"), "airfoil.tip", spec_dir)
    else:
        root_af = tip_af = read_airfoil(r, airfoil_node, "airfoil", spec_dir)
    spars = read_spars(r, root.get("spars"), "spars", wing=True)
    shared = read_shared(r, root)
    check_pieces(r, root, shared.pieces, len(spars or ()))
    overrides = read_overrides(r, root.get("overrides"), shared)
    return WingSpec(ident, r.units, root_chord, tip_chord, span, sweep, sweep_line, stations, root_af, tip_af,  # type: ignore[arg-type]
                    spars, orientation, shared, overrides, r.file, title, paper=read_paper(r, root))  # type: ignore[arg-type]


def read_overrides(r: Reader, node: YNode | None, shared: Shared) -> tuple[RibOverride, ...]:
    if node is None:
        return ()
    result = []
    for i, item in enumerate(r.sequence(node, "overrides", 0, 200) or ()):
        path = join("overrides", i)
        fields = r.mapping(item, path, ("ribs", *SHARED_KEYS), ("ribs",))
        if fields is None or any(getattr(shared, name) is None for name in Shared.__dataclass_fields__):
            continue  # the wing's own sections have problems (already reported): nothing to override
        ribs_node = fields.get("ribs")
        if ribs_node is not None and not ribs_node.is_list:
            rib_items = [ribs_node]
        else:
            rib_items = r.sequence(ribs_node, join(path, "ribs"), 1, 200) or []
        ribs = [r.integer(n, join(path, "ribs"), 1, 200) for n in rib_items]
        sub = Reader(r.file, r.units)
        prefixed = {k: v for k, v in fields.items() if k != "ribs"}
        changed = read_shared(sub, prefixed, base=shared)
        r.problems.extend(replace(p, key=join(path, p.key)) for p in sub.problems)
        changes = {name: getattr(changed, name) for name in Shared.__dataclass_fields__
                   if getattr(changed, name) != getattr(shared, name)}
        result.append(RibOverride(tuple(n for n in ribs if n is not None), changes))
    return tuple(result)
