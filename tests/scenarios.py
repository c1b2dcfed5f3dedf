"""A corpus of realistic rib and wing specs of our own making, for proving that ``check`` predicts ``build``.

Every scenario is invented (no real aircraft): chords from 250 to 1,600 mm; NACA 00xx, 24xx, 44xx and 230xx
sections and real sections from the public airfoil coordinate collection that the ``aerosandbox`` package ships
(its airfoil database folder, read by file name); sheet gauges from 0.4 to 1.6 mm; every sheet alloy of the
catalogue; every relief policy; every die material, routed and printed, printed with and without a print bed;
inch and millimetre specs; single ribs and wings with taper, sweep, slanted spars and per-rib overrides.

Bend radii are chosen from the catalogue's own minimum-radius table (so no scenario is refused for its radius):
the smallest radius the table allows, rounded up, times a factor the scenario picks.  Numbers that are a
builder's choice (flange heights, stock, press, pins) are typical of a home shop (common practice, no source).

``scenarios()`` returns them all; ``write(scenario, folder)`` writes the spec (and its airfoil file) and returns
the spec's path.  ``TAIL`` is the metric horizontal tail of the check-against-build report, rebuilt from its
description.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from pathlib import Path

ALLOYS = ("2024-O", "2024-T3", "3003-O", "3003-H14", "5052-O", "5052-H32", "6061-O", "6061-T4", "6061-T6")
RELIEFS = ("flutes", "notches", "none")
ROUTED = ("fibreboard", "solid-surface", "aluminium", "hdpe")
PRINTED = ("pla", "petg")
# stock a shop would use for each routed material (mm): from the catalogue's own stock lists
ROUTED_STOCK = {"fibreboard": (18.0, 12.0), "solid-surface": (19.05, 12.7), "aluminium": (25.4, 12.7),
                "hdpe": (19.05, 12.7)}
# sections from the aerosandbox airfoil database folder (file names), with what they add to the corpus
DATABASE_SECTIONS = (
    "e387.dat",  # a thin, cambered low-speed section with a concave lower surface aft
    "clarky.dat",  # flat-bottomed, 11.7 % thick
    "ag35.dat",  # a thin glider section
    "e205.dat",  # a 10 % section
    "sd7062.dat",  # 14 % thick, cambered
    "naca23015.dat",  # the 5-digit section as a coordinate file
    "e168.dat",  # a symmetric 12 % section
)


@dataclass(frozen=True)
class Scenario:
    """One spec of the corpus: its name, YAML text, and the airfoil database files it reads (by file name)."""

    name: str
    text: str
    files: tuple[str, ...] = ()


def database_folder() -> Path:
    """The airfoil coordinate files shipped with aerosandbox (a test dependency)."""
    import aerosandbox

    return Path(os.path.dirname(aerosandbox.__file__)) / "geometry" / "airfoil" / "airfoil_database"


def write(scenario: Scenario, folder: Path) -> Path:
    """Write ``scenario`` (spec and airfoil files) into ``folder``; the spec's path."""
    folder.mkdir(parents=True, exist_ok=True)
    for name in scenario.files:
        (folder / name).write_bytes((database_folder() / name).read_bytes())
    path = folder / f"{scenario.name}.yaml"
    path.write_text(scenario.text)
    return path


def bend_radius_mm(alloy: str, thickness_mm: float, factor: float = 1.0) -> float:
    """A part radius the table accepts: its minimum (at least 0.5 t), times ``factor``, rounded up to 0.1 mm."""
    from diegen import materials

    least = materials.min_bend_radius(alloy, thickness_mm, "aa").radius_mm
    return math.ceil(max(least, 0.5 * thickness_mm) * factor * 10.0 + 1e-6) / 10.0


def _die(material: str, flange_mm: float, stock_choice: int, bed: tuple[int, int] | None, cutter_mm: float,
         inch: bool) -> str:
    scale = 25.4 if inch else 1.0
    if material in PRINTED:
        stock = math.ceil(flange_mm + 6.0)
        text = f"material: {material}, stock_thickness: \"{stock} mm\", cutter_diameter: {cutter_mm / scale:.4g}"
        if bed:
            text += f", print_bed: [{bed[0]}, {bed[1]}]"
        return "{" + text + "}"
    stock = ROUTED_STOCK[material][stock_choice]
    return f"{{material: {material}, stock_thickness: \"{stock} mm\", cutter_diameter: {cutter_mm / scale:.4g}}}"


def _shared(*, inch: bool, skin_mm: float, alloy: str, t_mm: float, flange_mm: float, radius_factor: float,
            relief: str, die: str, force: str, box_mm: tuple[float, float], holes: str = "auto",
            pieces: str = "[nose, center, tail]", durometer: int = 55) -> str:
    scale = 25.4 if inch else 1.0
    radius = bend_radius_mm(alloy, t_mm, radius_factor)
    return (
        f"skin_thickness: {skin_mm / scale:.4g}\n"
        f"sheet: {{alloy: {alloy}, thickness: {t_mm / scale:.4g}}}\n"
        f"flange: {{height: {flange_mm / scale:.4g}, bend_radius: \"{radius:.1f} mm\"}}\n"
        f"pieces: {pieces}\n"
        f"lightening_holes: {holes}\n"
        "pins: auto\n"
        f"relief: {relief}\n"
        f"die: {die}\n"
        f"press: {{force: {force}, box: [{box_mm[0] / scale:.4g}, {box_mm[1] / scale:.4g}], "
        f"rubber: {{durometer: {durometer}, thickness: {50 / scale:.4g}}}}}\n"
    )


def _spars(inch: bool, front: float, rear: float, cap_mm: float, t_mm: float, wing_slant: float = 0.0) -> str:
    scale = 25.4 if inch else 1.0
    web = max(1.0, 2 * t_mm)
    lines = ["spars:"]
    for at, width in ((front, 18.0), (rear, 14.0)):
        where = (f"root_at: {at:.3f}, tip_at: {at + wing_slant:.3f}" if wing_slant else f"at: {at:.3f}")
        lines.append(f"  - {{{where}, web: {web / scale:.4g}, cap_thickness: {cap_mm / scale:.4g}, "
                     f"cap_width: {width / scale:.4g}}}")
    return "\n".join(lines) + "\n"


def _airfoil(kind: str) -> tuple[str, tuple[str, ...]]:
    """(the spec's airfoil value, files it needs) for a NACA designation or a database file name."""
    if kind.endswith(".dat"):
        return f"{{file: {kind}}}", (kind,)
    return f"naca {kind}", ()


def rib(name: str, *, inch: bool, airfoil: str, chord_mm: float, front: float = 0.25, rear: float = 0.70,
        cap_mm: float = 1.0, **shared: object) -> Scenario:
    scale = 25.4 if inch else 1.0
    foil, files = _airfoil(airfoil)
    t_mm = float(shared["t_mm"])  # type: ignore[arg-type]
    text = (f"diegen: 1\nkind: rib\nid: {name}\nunits: {'in' if inch else 'mm'}\n"
            f"title: corpus scenario {name} (invented)\n"
            f"airfoil: {foil}\nchord: {chord_mm / scale:.5g}\n" + _spars(inch, front, rear, cap_mm, t_mm)
            + _shared(inch=inch, **shared))  # type: ignore[arg-type]
    return Scenario(name, text, files)


def wing(name: str, *, inch: bool, root: str, tip: str, root_chord_mm: float, tip_chord_mm: float, span_mm: float,
         ribs: int = 3, sweep: float = 0.0, slant: float = 0.0, front: float = 0.25, rear: float = 0.70,
         cap_mm: float = 1.0, overrides: str = "", **shared: object) -> Scenario:
    scale = 25.4 if inch else 1.0
    root_foil, files = _airfoil(root)
    tip_foil, more = _airfoil(tip)
    t_mm = float(shared["t_mm"])  # type: ignore[arg-type]
    text = (f"diegen: 1\nkind: wing\nid: {name}\nunits: {'in' if inch else 'mm'}\n"
            f"title: corpus scenario {name} (invented)\n"
            f"planform: {{root_chord: {root_chord_mm / scale:.5g}, tip_chord: {tip_chord_mm / scale:.5g}, "
            f"span: {span_mm / scale:.5g}, sweep: {sweep:g}, stations: {{count: {ribs}}}}}\n"
            f"airfoil: {{root: {root_foil}, tip: {tip_foil}}}\n" + _spars(inch, front, rear, cap_mm, t_mm, slant)
            + _shared(inch=inch, **shared) + overrides)  # type: ignore[arg-type]
    return Scenario(name, text, tuple(dict.fromkeys(files + more)))


def scenarios() -> list[Scenario]:
    """The corpus: at least 30 specs (see the module docstring for what they cover)."""
    out: list[Scenario] = []
    # -- single ribs: every alloy, relief policy and die material in turn over a spread of sections and chords --
    sections = ("0012", "2412", "4412", "23012", "0009", "2415", "4415", "23015", "0015", *DATABASE_SECTIONS)
    chords = (250, 1600, 400, 900, 320, 1200, 600, 750, 280, 1050, 500, 1400, 350, 800, 450, 1000)
    gauges = (0.4, 0.5, 0.6, 0.8, 1.0, 1.2, 1.6, 0.635, 0.813, 1.016)
    materials = ROUTED + PRINTED
    for i in range(24):
        alloy = ALLOYS[i % len(ALLOYS)]
        material = materials[i % len(materials)]
        chord = chords[i % len(chords)]
        t = gauges[i % len(gauges)]
        inch = i % 3 == 1
        flange = 8.0 if chord < 400 else 12.0 if chord < 1000 else 16.0
        printed = material in PRINTED
        bed = ((250, 210) if i % 4 == 0 else (220, 220)) if printed and (i // len(materials)) % 2 == 0 else None
        if printed and chord > 700:  # a printed die of a big rib on a small bed is many tiles; keep the corpus quick
            chord = 600
        pieces = ("[nose, center, tail]", "[nose]", "[center, tail]", "[nose, tail]")[i % 4]
        out.append(rib(
            f"C{i + 1:02d}", inch=inch, airfoil=sections[i % len(sections)], chord_mm=chord,
            front=(0.20, 0.25, 0.30)[i % 3], rear=(0.62, 0.70, 0.66)[i % 3], cap_mm=(0.0, 0.8, 1.6)[i % 3],
            skin_mm=(0.5, 0.6, 0.8)[i % 3], alloy=alloy, t_mm=t, flange_mm=flange,
            radius_factor=(1.0, 1.5, 2.0)[i % 3], relief=RELIEFS[i % 3],
            die=_die(material, flange, i % 2, bed, (6.0, 6.35, 10.0, 12.7)[i % 4], inch),
            force=("20 ton", "20 t", "200 kN", "30 tonne")[i % 4], box_mm=(300.0, 250.0) if chord < 700 else
            (600.0, 400.0), holes=("auto", "none")[i % 2], pieces=pieces, durometer=(45, 55, 65)[i % 3]))
    # -- wings: taper, sweep, slanted spars, two sections, per-rib overrides --
    out.append(wing(
        "W1", inch=True, root="23015", tip="23012", root_chord_mm=1219.2, tip_chord_mm=914.4, span_mm=3048.0,
        ribs=3, skin_mm=0.635, alloy="2024-T3", t_mm=0.635, flange_mm=12.7, radius_factor=1.0, relief="flutes",
        die=_die("solid-surface", 12.7, 0, None, 6.35, True), force="25 ton", box_mm=(609.6, 304.8),
        overrides="overrides:\n  - ribs: [1]\n    sheet: {thickness: 0.032}\n    flange: {bend_radius: \"1/8 in\"}\n"))
    out.append(wing(
        "W2", inch=False, root="2415", tip="0012", root_chord_mm=800.0, tip_chord_mm=450.0, span_mm=1800.0,
        ribs=3, sweep=12.0, skin_mm=0.6, alloy="6061-T6", t_mm=0.8, flange_mm=12.0, radius_factor=1.0,
        relief="flutes", die=_die("fibreboard", 12.0, 0, None, 6.0, False), force="20 t", box_mm=(500.0, 300.0),
        overrides="overrides:\n  - ribs: [3]\n    relief: notches\n    lightening_holes: none\n"))
    out.append(wing(
        "W3", inch=False, root="e387.dat", tip="0009", root_chord_mm=500.0, tip_chord_mm=300.0, span_mm=1200.0,
        ribs=3, slant=0.03, skin_mm=0.5, alloy="5052-H32", t_mm=0.5, flange_mm=10.0, radius_factor=1.5,
        relief="flutes", die=_die("petg", 10.0, 0, (250, 210), 6.0, False), force="20 ton", box_mm=(300.0, 250.0),
        pieces="[nose, center]"))
    out.append(wing(
        "W4", inch=True, root="4415", tip="4412", root_chord_mm=1066.8, tip_chord_mm=762.0, span_mm=2540.0,
        ribs=3, sweep=-5.0, skin_mm=0.813, alloy="6061-T4", t_mm=1.016, flange_mm=15.875, radius_factor=1.0,
        relief="notches", die=_die("aluminium", 15.875, 0, None, 12.7, True), force="50 ton",
        box_mm=(609.6, 406.4), cap_mm=1.6,
        overrides="overrides:\n  - ribs: [2, 3]\n    die: {stock_thickness: \"12.7 mm\"}\n"))
    out.append(wing(
        "W5", inch=False, root="clarky.dat", tip="2412", root_chord_mm=1500.0, tip_chord_mm=1100.0, span_mm=4000.0,
        ribs=3, skin_mm=0.8, alloy="2024-O", t_mm=1.2, flange_mm=16.0, radius_factor=1.0, relief="flutes",
        die=_die("hdpe", 16.0, 0, None, 10.0, False), force="40 tonne", box_mm=(900.0, 500.0),
        pieces="[center, tail]"))
    out.append(wing(
        "W6", inch=False, root="0012", tip="0009", root_chord_mm=420.0, tip_chord_mm=250.0, span_mm=900.0,
        ribs=3, skin_mm=0.5, alloy="3003-H14", t_mm=0.4, flange_mm=8.0, radius_factor=1.0, relief="none",
        die=_die("pla", 8.0, 0, None, 6.0, False), force="10 ton", box_mm=(300.0, 250.0)))
    out.append(TAIL_PRINTED)
    out.append(TAIL_ROUTED)
    return out + parts()


def part(name: str, *, inch: bool, outline: str, alloy: str, t_mm: float, flange_mm: float, radius_factor: float,
         relief: str, die: str, force: str, box_mm: tuple[float, float], flanges: str = "all", holes: str = "plain",
         durometer: int = 55) -> Scenario:
    """A drawn part (``kind: part``) whose outline is given in the spec (points or an SVG path)."""
    scale = 25.4 if inch else 1.0
    radius = bend_radius_mm(alloy, t_mm, radius_factor)
    text = (f"diegen: 1\nkind: part\nid: {name}\nunits: {'in' if inch else 'mm'}\n"
            f"title: corpus scenario {name} (invented)\n"
            f"outline: {outline}\nflanges: {flanges}\nholes: {holes}\npins: auto\n"
            f"sheet: {{alloy: {alloy}, thickness: {t_mm / scale:.4g}}}\n"
            f"flange: {{height: {flange_mm / scale:.4g}, bend_radius: \"{radius:.1f} mm\"}}\n"
            f"relief: {relief}\ndie: {die}\n"
            f"press: {{force: {force}, box: [{box_mm[0] / scale:.4g}, {box_mm[1] / scale:.4g}], "
            f"rubber: {{durometer: {durometer}, thickness: {50 / scale:.4g}}}}}\n")
    return Scenario(name, text)


QUARTER = 0.41421356  # bulge of a quarter circle, tan(90°/4)


def _rounded_rectangle(w: float, h: float, r: float) -> str:
    """Points with bulges of a w × h rectangle whose corners are rounded to r (counter-clockwise)."""
    pts = [(r, 0, 0), (w - r, 0, QUARTER), (w, r, 0), (w, h - r, QUARTER), (w - r, h, 0), (r, h, QUARTER),
           (0, h - r, 0), (0, r, QUARTER)]
    return "[" + ", ".join(f"[{x:g}, {y:g}" + (f", {b}]" if b else "]") for x, y, b in pts) + "]"


def _circle_path(cx: float, cy: float, r: float) -> str:
    return f"M {cx - r:g} {cy:g} A {r:g} {r:g} 0 1 0 {cx + r:g} {cy:g} A {r:g} {r:g} 0 1 0 {cx - r:g} {cy:g} Z"


def parts() -> list[Scenario]:
    """Drawn parts: bulkheads, formers, gussets, brackets and nose ribs, in points and SVG paths, every way of
    making the die, convex and concave flanges, flanged holes, cut-outs, partial flanges and mirrored parts."""
    routed = lambda material, flange, cutter, inch=False: _die(material, flange, 0, None, cutter, inch)  # noqa: E731
    return [
        part("P01", inch=False, outline=f"{{points: {_rounded_rectangle(220, 180, 30)}, is: mold-line}}",
             alloy="2024-T3", t_mm=0.8, flange_mm=12.0, radius_factor=1.2, relief="flutes",
             die=routed("solid-surface", 12.0, 6.0), force="20 ton", box_mm=(300.0, 250.0)),
        part("P02", inch=False, outline="{svg: \"" + _circle_path(0, 0, 100) + " " + _circle_path(-45, 0, 25) + " "
             + _circle_path(45, 0, 25) + "\", units: mm, is: mold-line}", holes="flanged",
             alloy="6061-T6", t_mm=1.0, flange_mm=10.0, radius_factor=1.0, relief="flutes",
             die=routed("fibreboard", 10.0, 6.0), force="20 t", box_mm=(300.0, 250.0)),
        part("P03", inch=True, outline="{points: [[0, 0], [6, 0], [6, 0.75], [0.75, 4], [0, 4]], is: mold-line}",
             flanges="[{from: [6, 0.75], to: [0.75, 4], direction: up}]", alloy="5052-H32", t_mm=0.813,
             flange_mm=12.7, radius_factor=1.5, relief="flutes", die=routed("hdpe", 12.7, 6.35, True),
             force="25 ton", box_mm=(609.6, 304.8)),
        part("P04", inch=False, outline="{points: [[0, 0], [180, 0], [180, 60], [160, 60, -0.19891], [60, 160], "
             "[60, 180], [0, 180]], is: mold-line}", alloy="3003-H14", t_mm=0.5, flange_mm=8.0, radius_factor=1.0,
             relief="flutes", die=_die("pla", 8.0, 0, (220, 220), 6.0, False), force="20 ton",
             box_mm=(300.0, 250.0)),
        part("P05", inch=False, outline="{points: [[120, -40], [120, 40], [40, 40, 1], [40, -40]], is: mold-line}",
             flanges="[{from: [120, 40], to: [120, -40]}]", alloy="2024-O", t_mm=0.5, flange_mm=8.0,
             radius_factor=1.0, relief="notches", die=_die("petg", 8.0, 0, None, 6.0, False), force="20 ton",
             box_mm=(300.0, 250.0)),
        part("P06", inch=False, outline=f"{{points: {_rounded_rectangle(260, 160, 50)}, is: die}}",
             alloy="6061-T6", t_mm=1.6, flange_mm=16.0, radius_factor=1.5, relief="flutes",
             die=routed("aluminium", 16.0, 12.7), force="50 ton", box_mm=(600.0, 400.0)),
        part("P07", inch=False, outline="{points: [[80, -22], [80, 22], [22, 22, 1], [22, -22]], is: mold-line}",
             alloy="3003-O", t_mm=0.4, flange_mm=6.0, radius_factor=2.0, relief="none",
             die=_die("pla", 6.0, 0, None, 6.0, False), force="10 ton", box_mm=(300.0, 250.0)),
        part("P08", inch=True, outline="{points: [[3, 0], [1.5, 2.598], [-1.5, 2.598], [-3, 0], [-1.5, -2.598], "
             "[1.5, -2.598]], is: mold-line}", alloy="5052-O", t_mm=0.635, flange_mm=9.525, radius_factor=1.0,
             relief="flutes", die=routed("fibreboard", 9.525, 6.35, True), force="20 ton", box_mm=(609.6, 304.8)),
        part("P09", inch=False, outline="{svg: \"M 0 0 L 240 0 L 240 120 C 240 200 180 230 120 230 "
             "C 60 230 0 200 0 120 Z\", units: mm, is: die}", alloy="2024-T3", t_mm=0.635, flange_mm=10.0,
             radius_factor=1.2, relief="flutes", die=routed("hdpe", 10.0, 6.0), force="30 tonne",
             box_mm=(400.0, 350.0)),
        part("P10", inch=False, outline=f"{{points: {_rounded_rectangle(380, 260, 60)}, is: mold-line}}",
             alloy="6061-T4", t_mm=0.8, flange_mm=12.0, radius_factor=1.0, relief="flutes",
             die=_die("petg", 12.0, 0, (250, 210), 6.0, False), force="40 tonne", box_mm=(600.0, 400.0)),
        part("P11", inch=True, outline="{points: [[0, 0], [8, 0], [8, 3], [0, 3]], is: mold-line}",
             flanges="[{from: [0, 0], to: [8, 0]}, {from: [8, 3], to: [0, 3]}]", alloy="2024-T3", t_mm=0.635,
             flange_mm=12.7, radius_factor=1.2, relief="flutes", die=routed("solid-surface", 12.7, 6.35, True),
             force="20 ton", box_mm=(609.6, 304.8)),
        part("P12", inch=False, outline="{svg: \"" + _circle_path(0, 0, 110) + " M -40 -20 L 40 -20 L 40 20 "
             "L -40 20 Z\", units: mm, is: mold-line}", alloy="5052-H32", t_mm=0.8, flange_mm=10.0,
             radius_factor=2.0, relief="flutes", die=routed("fibreboard", 10.0, 6.0), force="20 ton",
             box_mm=(400.0, 300.0)),
        # flange runs of their own heights: a stadium whose half circles stand 18 and 8 mm against the 12 mm of the
        # straight between them (smooth junctions: the blank steps), and a bent-up channel of two heights
        part("P13", inch=False, outline="{points: [[0, 0], [160, 0, 1], [160, 140], [0, 140, 1]], is: die}",
             flanges="[{from: [0, 0], to: [160, 0]}, {from: [160, 0], to: [160, 140], height: 18}, "
                     "{from: [0, 140], to: [0, 0], height: 8}]", alloy="2024-T3", t_mm=0.8, flange_mm=12.0,
             radius_factor=1.2, relief="flutes", die=routed("solid-surface", 18.0, 6.0), force="40 ton",
             box_mm=(500.0, 350.0)),
        part("P14", inch=True, outline="{points: [[0, 0], [8, 0], [8, 3], [0, 3]], is: mold-line}",
             flanges="[{from: [0, 0], to: [8, 0], direction: up, height: 0.375}, "
                     "{from: [8, 3], to: [0, 3], direction: up}]", alloy="6061-T4", t_mm=0.813,
             flange_mm=15.875, radius_factor=1.2, relief="flutes", die=_die("petg", 15.875, 0, None, 6.35, True),
             force="20 ton", box_mm=(609.6, 304.8)),
        # flange runs of their own bend radius and angle: a tray whose long sides take two radii and whose end is a
        # 45° lip (corners: the wall blends inside a run, clear of them; a cut end between the two radii); a
        # stadium whose right half circle is a 60° flange of a larger radius (smooth junctions: the blends are
        # centred on them); a plate with a 45° lip all round (one profile: a wall leaning out); and a laminated die
        # of two radii and an angle, in inches
        part("P15", inch=False, outline="{points: [[0, 0], [260, 0], [260, 160], [0, 160]], is: die}",
             flanges="[{from: [0, 0], to: [260, 0]}, {from: [260, 160], to: [0, 160], bend_radius: 5}, "
                     "{from: [0, 160], to: [0, 0], angle: 45, height: 10}]", alloy="2024-T3", t_mm=0.8,
             flange_mm=12.0, radius_factor=1.2, relief="flutes", die=routed("solid-surface", 12.0, 6.0),
             force="40 ton", box_mm=(500.0, 350.0)),
        part("P16", inch=False, outline="{points: [[0, 0], [200, 0, 1], [200, 180], [0, 180, 1]], is: mold-line}",
             flanges="[{from: [0, 0], to: [200, 0]}, {from: [200, 0], to: [200, 180], angle: 60, bend_radius: 4}, "
                     "{from: [200, 180], to: [0, 180]}, {from: [0, 180], to: [0, 0]}]", alloy="6061-T4",
             t_mm=0.8, flange_mm=10.0, radius_factor=1.5, relief="flutes", die=routed("fibreboard", 10.0, 6.0),
             force="40 ton", box_mm=(600.0, 400.0)),
        part("P17", inch=False, outline=f"{{points: {_rounded_rectangle(200, 140, 30)}, is: mold-line}}",
             flanges="[{from: [30, 0], to: [170, 140], angle: 45}, {from: [170, 140], to: [30, 0], angle: 45}]",
             alloy="5052-H32", t_mm=0.8, flange_mm=10.0,
             radius_factor=1.5, relief="flutes", die=_die("petg", 10.0, 0, None, 6.0, False), force="20 ton",
             box_mm=(400.0, 300.0)),
        part("P18", inch=True, outline="{points: [[0, 0], [9, 0], [9, 5], [0, 5]], is: mold-line}",
             flanges="[{from: [0, 0], to: [9, 0], angle: 75}, {from: [9, 0], to: [9, 5]}, "
                     "{from: [9, 5], to: [0, 5], bend_radius: 0.1875}]", alloy="2024-O", t_mm=0.635,
             flange_mm=12.7, radius_factor=1.0, relief="flutes", die=_die("fibreboard", 12.7, 1, None, 6.35, True),
             force="20 ton", box_mm=(609.6, 304.8)),
        # a plate too short between a 45° lip and a square flange for its die wall to change: check refuses the die
        part("P19", inch=False, outline="{points: [[0, 0], [120, 0], [120, 40], [0, 40]], is: die}",
             flanges="[{from: [0, 0], to: [120, 0], angle: 45}, {from: [120, 40], to: [0, 40]}]", alloy="2024-T3",
             t_mm=0.8, flange_mm=12.0, radius_factor=1.2, relief="flutes", die=routed("solid-surface", 12.0, 6.0),
             force="20 ton", box_mm=(300.0, 250.0)),
    ]


def _tail(name: str, die: str) -> Scenario:
    """The metric horizontal tail: 600 → 420 mm chord over 1,100 mm span, 7 ribs, a NACA 0012 from a coordinate
    file at the root and NACA 0009 at the tip, spars at 30 % and 72 %, 6061-T6 0.8 mm, 12 mm flange, a 20 ton press
    in a 300 × 250 mm box (the rest, such as the skin and the spar caps, are typical values of our own)."""
    return wing(name, inch=False, root="naca0012.dat", tip="0009", root_chord_mm=600.0, tip_chord_mm=420.0,
                span_mm=1100.0, ribs=7, front=0.30, rear=0.72, cap_mm=0.8, skin_mm=0.6, alloy="6061-T6", t_mm=0.8,
                flange_mm=12.0, radius_factor=1.0, relief="flutes", die=die, force="20 ton", box_mm=(300.0, 250.0))


TAIL_PRINTED = _tail("TAIL-PLA", "{material: pla, stock_thickness: 20, cutter_diameter: 6, print_bed: [250, 210]}")
TAIL_ROUTED = _tail("TAIL-MDF", "{material: mdf, stock_thickness: 18, cutter_diameter: 6}")

__all__ = [
    "ALLOYS",
    "PRINTED",
    "RELIEFS",
    "ROUTED",
    "TAIL_PRINTED",
    "TAIL_ROUTED",
    "Scenario",
    "bend_radius_mm",
    "database_folder",
    "scenarios",
    "write",
]
