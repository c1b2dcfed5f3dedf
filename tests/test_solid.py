"""Tests of the die (form block) solid: validity, exports, outline, top radius, holes, flutes, engraving.

The test outline is a NACA 2412 section from the 4-digit equations of NACA
Report 824 (Abbott, von Doenhoff & Stivers 1945), chord 1016 mm, offset inward
1.3 mm (shapely's buffer as the reference offset), cut at x = 254 mm by a
straight spar end face: the nose piece of a rib.
"""

from __future__ import annotations

import itertools
import math
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from shapely.geometry import LineString, Point, Polygon, box
from shapely.geometry.polygon import orient

from diegen.die.die_input import DieBore, DieFlute, DieInput, DiePin, DieRun
from diegen.die.occ.validate import solid_problems
from diegen.errors import GeometryError, SolidError
from diegen.geometry.die_wall import fillet_end_depth_mm, top_setback_mm

pytestmark = [pytest.mark.solid, pytest.mark.slow]

CHORD = 1016.0
X_CUT = 254.0
SKIN_INSET = 1.3
H = 12.7
R = 2.2
UNDERCUT = 4.5
CUTTER = 3.0
OUTLINE_TOL = 0.02  # mm, the accuracy asked of the die's outlines
RADIUS_TOL = 0.01  # mm, the accuracy asked of the top radius


def naca4(code: str = "2412", chord: float = CHORD, n: int = 400) -> np.ndarray:
    """Closed NACA 4-digit section, trailing edge → upper → leading edge → lower (NACA Report 824 equations)."""
    m, p, t = int(code[0]) / 100, int(code[1]) / 10, int(code[2:]) / 100
    x = 0.5 * (1 - np.cos(np.linspace(0, np.pi, n)))
    yt = 5 * t * (0.2969 * np.sqrt(x) - 0.1260 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1015 * x**4)
    yc = np.where(x < p, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * ((1 - 2 * p) + 2 * p * x - x**2))
    dyc = np.where(x < p, 2 * m / p**2 * (p - x), 2 * m / (1 - p) ** 2 * (p - x))
    th = np.arctan(dyc)
    upper = np.column_stack([x - yt * np.sin(th), yc + yt * np.cos(th)])[::-1]
    lower = np.column_stack([x + yt * np.sin(th), yc - yt * np.cos(th)])[1:]
    return np.concatenate([upper, lower]) * chord


def nose_outline() -> tuple[DieRun, ...]:
    """The nose piece: one curve run round the leading edge, one line run up the spar face at x = 254 mm."""
    piece = Polygon(naca4()).buffer(-SKIN_INSET, quad_segs=32).intersection(box(-10, -500, X_CUT, 500))
    ring = np.asarray(orient(piece, 1.0).exterior.coords)[:-1]
    idx = np.where(np.isclose(ring[:, 0], X_CUT, atol=1e-9))[0]
    top, bottom = idx[np.argmax(ring[idx, 1])], idx[np.argmin(ring[idx, 1])]
    ring = np.roll(ring, -top, axis=0)
    bottom = (bottom - top) % len(ring)
    curve = ring[: bottom + 1]
    line = np.array([ring[bottom], ring[0]])
    return (DieRun("curve", tuple(map(tuple, curve.tolist()))), DieRun("line", tuple(map(tuple, line.tolist()))))


def outline_polygon(runs: tuple[DieRun, ...]) -> Polygon:
    return Polygon(np.concatenate([np.asarray(r.points)[:-1] for r in runs]))


PINS = (DiePin(60.0, 10.0, 3.2, 8.0), DiePin(220.0, 25.0, 4.0, H))
BORES = (DieBore(130.0, 15.0, 40.0),)
FLUTES = (DieFlute(300.0, 8.0, 2.0), DieFlute(340.0, 8.0, 2.0))
FLUTE_LENGTH = 9.0


@pytest.fixture(scope="module")
def outline() -> tuple[DieRun, ...]:
    return nose_outline()


@pytest.fixture(scope="module")
def bare_input(outline) -> DieInput:
    return DieInput("TEST-N1", outline, H, R, UNDERCUT, CUTTER)


@pytest.fixture(scope="module")
def full_input(bare_input) -> DieInput:
    return replace(bare_input, pins=PINS, bores=BORES, flutes=FLUTES, flute_length_mm=FLUTE_LENGTH,
                   engraving=("TEST-N1", "NOSE 2412"))


@pytest.fixture(scope="module")
def bare_die(bare_input):
    from diegen.die.occ.form_block import build_die

    return build_die(bare_input)


@pytest.fixture(scope="module")
def full_die(full_input):
    from diegen.die.occ.form_block import build_die

    return build_die(full_input)


# ---------------------------------------------------------------- helpers
def volume(shape) -> float:
    from diegen.die.occ.validate import volume_mm3

    return volume_mm3(shape)


def cq_shape(shape):
    """A die (diegen hands out the kernel's own shapes) as a CadQuery shape, for its face and box queries."""
    import cadquery as cq

    return cq.Shape.cast(shape)


def planar_face_at(shape, z: float):
    faces = [f for f in cq_shape(shape).Faces() if f.geomType() == "PLANE" and abs(f.Center().z - z) < 1e-6
             and abs(abs(f.normalAt().z) - 1) < 1e-9]
    return max(faces, key=lambda f: f.Area())


def edge_points(edge, step: float) -> list[tuple[float, float, float]]:
    """Points along an edge every ``step`` mm or closer (by parameter, cheap)."""
    from OCP.BRepAdaptor import BRepAdaptor_Curve

    curve = BRepAdaptor_Curve(edge.wrapped)
    u0, u1 = curve.FirstParameter(), curve.LastParameter()
    n = max(8, int(edge.Length() / step))
    out = []
    for u in np.linspace(u0, u1, n + 1):
        p = curve.Value(float(u))
        out.append((p.X(), p.Y(), p.Z()))
    return out


def wire_points(wire, step: float = 0.05) -> np.ndarray:
    return np.asarray([p[:2] for e in wire.Edges() for p in edge_points(e, step)])


def section_points(shape, origin, normal, step: float = 0.01, curved_only: bool = False) -> np.ndarray:
    """Points of the shape's boundary cut by the plane through ``origin`` normal to ``normal``."""
    import cadquery as cq
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Section
    from OCP.gp import gp_Dir, gp_Pln, gp_Pnt

    sec = BRepAlgoAPI_Section(shape, gp_Pln(gp_Pnt(*origin), gp_Dir(*normal)))
    sec.Build()
    pts = []
    for e in cq.Shape.cast(sec.Shape()).Edges():
        if curved_only and e.geomType() == "LINE":
            continue
        pts += edge_points(e, step)
    return np.asarray(pts)


def fit_circle(u: np.ndarray, v: np.ndarray) -> tuple[float, float, float]:
    """Least-squares circle (Kåsa's algebraic fit): centre u, v and radius."""
    a = np.column_stack([u, v, np.ones_like(u)])
    c = np.linalg.lstsq(a, u**2 + v**2, rcond=None)[0]
    cu, cv = c[0] / 2, c[1] / 2
    return cu, cv, math.sqrt(c[2] + cu**2 + cv**2)


# ---------------------------------------------------------------- import boundary
def test_package_imports_without_kernel():
    code = ("import sys, diegen.die.occ.files, diegen.die.laminate, diegen.pipeline.build, diegen.api; "
            "assert 'cadquery' not in sys.modules and 'OCP' not in sys.modules")
    subprocess.run([sys.executable, "-c", code], check=True, cwd=Path(__file__).resolve().parents[1])


def test_workers_forked_after_the_kernel_ran_in_process_finish(tmp_path):
    # The kernel's thread pool does not survive a fork: a build whose workers are forked from a process that has
    # already built a die (with parallel checks and meshing) must still finish, not wait forever.
    spec = tmp_path / "tail.yaml"
    spec.write_text((Path(__file__).resolve().parents[1] / "specs" / "demo-rib.yaml").read_text()
                    .replace("pieces: [nose, center, tail]", "pieces: [tail, center]"))
    code = ("import sys; from diegen import api; s = api.load(sys.argv[1]); "
            "assert not api.build(s, sys.argv[2] + '/a', jobs=1).failed; "
            "assert not api.build(s, sys.argv[2] + '/b', jobs=2).failed")
    subprocess.run([sys.executable, "-c", code, str(spec), str(tmp_path)], check=True, timeout=600,
                   cwd=Path(__file__).resolve().parents[1])


# ---------------------------------------------------------------- STEP and STL
@pytest.mark.parametrize("which", ["bare", "full"])
def test_step_reimports_as_one_valid_closed_solid(which, bare_die, full_die, tmp_path):
    from OCP.BRep import BRep_Tool
    from OCP.BRepCheck import BRepCheck_Analyzer
    from OCP.TopAbs import TopAbs_SHELL, TopAbs_SOLID
    from OCP.TopExp import TopExp_Explorer

    from diegen.die.occ.export import write_step
    from diegen.die.occ.validate import read_step

    die = bare_die if which == "bare" else full_die
    path = tmp_path / f"{which}.step"
    write_step(die, path)
    shape = read_step(path)
    assert BRepCheck_Analyzer(shape).IsValid()
    solids, exp = 0, TopExp_Explorer(shape, TopAbs_SOLID)
    while exp.More():
        solids += 1
        exp.Next()
    assert solids == 1
    exp = TopExp_Explorer(shape, TopAbs_SHELL)
    assert exp.More()
    while exp.More():
        assert BRep_Tool.IsClosed_s(exp.Current())
        exp.Next()
    assert volume(shape) == pytest.approx(volume(die), rel=1e-6)
    assert not list(tmp_path.glob(".*part*")), "no temporary file left behind"


@pytest.mark.parametrize("which", ["bare", "full"])
def test_stl_watertight_and_volume_matches_step(which, bare_die, full_die, tmp_path):
    trimesh = pytest.importorskip("trimesh")  # general-purpose mesh library as the independent check
    from diegen.die.occ.export import write_step, write_stl
    from diegen.die.occ.validate import read_step

    die = bare_die if which == "bare" else full_die
    write_step(die, tmp_path / "d.step")
    write_stl(die, tmp_path / "d.stl")
    mesh = trimesh.load(tmp_path / "d.stl")
    assert mesh.is_watertight
    assert mesh.is_winding_consistent
    assert mesh.volume > 0
    assert mesh.volume == pytest.approx(volume(read_step(tmp_path / "d.step")), rel=0.005)


def test_step_names_the_part_and_this_tool(bare_die, tmp_path):
    # Read back with the kernel's document reader (names on): the one free shape carries the part id, the header
    # (ISO 10303-21 FILE_NAME) names this tool as the originating system; the file text holds PRODUCT('<id>'.
    from OCP.APIHeaderSection import APIHeaderSection_MakeHeader
    from OCP.STEPCAFControl import STEPCAFControl_Reader
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDF import TDF_LabelSequence
    from OCP.TDocStd import TDocStd_Document
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    from diegen import __version__
    from diegen.die.occ.export import write_step

    path = tmp_path / "named.step"
    write_step(bare_die, path, product="TEST-N1", description="form block TEST-N1, mm; NACA 2412")
    assert "PRODUCT('TEST-N1'" in path.read_text()
    document = TDocStd_Document(TCollection_ExtendedString("test"))
    reader = STEPCAFControl_Reader()
    reader.SetNameMode(True)
    reader.ReadFile(str(path))
    assert reader.Transfer(document)
    labels = TDF_LabelSequence()
    XCAFDoc_DocumentTool.ShapeTool_s(document.Main()).GetFreeShapes(labels)
    assert labels.Length() == 1
    name = TDataStd_Name()
    assert labels.Value(1).FindAttribute(TDataStd_Name.GetID_s(), name)
    assert name.Get().ToExtString() == "TEST-N1"
    header = APIHeaderSection_MakeHeader(reader.ChangeReader().StepModel())
    assert header.OriginatingSystem().ToCString() == f"diegen {__version__}"
    assert header.Name().ToCString() == "named.step"


def test_stl_header_names_this_tool_and_the_part(bare_die, tmp_path):
    # A binary STL starts with an 80-byte header, then the triangle count (little-endian uint32), then 50 bytes
    # a triangle; the header must not begin with "solid" or readers take the file for ASCII STL.
    from diegen import __version__
    from diegen.die.occ.export import write_stl

    path = tmp_path / "named.stl"
    write_stl(bare_die, path, header="TEST-N1")
    data = path.read_bytes()
    assert data[:80].decode("ascii").rstrip() == f"diegen {__version__} TEST-N1 mm"
    assert len(data) == 84 + 50 * int.from_bytes(data[80:84], "little")


def test_stl_not_written_when_check_fails(bare_die, tmp_path, monkeypatch):
    from diegen.die.occ import export

    target = tmp_path / "keep.stl"
    target.write_bytes(b"earlier good file")
    monkeypatch.setattr(export, "stl_problems", lambda path: ["pretend hole"])
    with pytest.raises(SolidError, match="pretend hole"):
        export.write_stl(bare_die, target)
    assert target.read_bytes() == b"earlier good file"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.stl"]


def test_step_structure_check_finds_a_cut_short_file_and_keeps_the_earlier_one(bare_die, tmp_path, monkeypatch):
    """ISO 10303-21 frames the data between the "ISO-10303-21;" header and "END-ISO-10303-21;"."""
    from diegen.die.occ import export
    from diegen.die.occ.validate import step_file_problems

    good = tmp_path / "good.step"
    export.write_step(bare_die, good)
    assert step_file_problems(good) == []
    cut = tmp_path / "cut.step"
    cut.write_bytes(good.read_bytes()[: good.stat().st_size // 2])
    assert any("cut short" in p for p in step_file_problems(cut))
    monkeypatch.setattr(export, "step_file_problems", lambda path: ["pretend cut short"])
    with pytest.raises(SolidError, match="pretend cut short"):
        export.write_step(bare_die, good)
    assert step_file_problems(good) == [] and sorted(p.name for p in tmp_path.iterdir()) == ["cut.step", "good.step"]


# ---------------------------------------------------------------- outlines
def test_top_face_edge_is_the_outline_set_back(bare_die, outline):
    """The flat top face ends where the top radius begins: the outline offset inward by R(1+sin α)/cos α."""
    setback = top_setback_mm(R, UNDERCUT)
    # circle inscribed in the corner between the top plane and the wall leaning by α (plane geometry)
    assert setback == pytest.approx(R / math.tan(math.radians(90 - UNDERCUT) / 2), rel=1e-12)
    face = planar_face_at(bare_die, 0.0)
    edge_ring = LineString(wire_points(face.outerWire()))
    reference = outline_polygon(outline).buffer(-setback, join_style="mitre", mitre_limit=10.0).exterior
    samples = [p for r in outline for p in r.points] + [
        tuple(np.asarray(outline[1].points[0]) + f * (np.asarray(outline[1].points[1]) - outline[1].points[0]))
        for f in np.linspace(0, 1, 50)]
    worst = max(abs(edge_ring.distance(Point(p)) - reference.distance(Point(p))) for p in samples)
    assert worst < OUTLINE_TOL
    # away from the two corners every input point is exactly one setback from the edge
    far = [p for p in samples if min(math.dist(p, outline[1].points[0]), math.dist(p, outline[1].points[1])) > 10]
    assert max(abs(edge_ring.distance(Point(p)) - setback) for p in far) < OUTLINE_TOL


def test_bottom_face_edge_is_the_outline_inset_by_the_undercut(bare_die, outline):
    """Bottom edge: inset H·tan α; the wall line passes through the outline at z = 0, the radius adds nothing."""
    inset = H * math.tan(math.radians(UNDERCUT))
    face = planar_face_at(bare_die, -H)
    edge_ring = LineString(wire_points(face.outerWire()))
    reference = outline_polygon(outline).buffer(-inset, join_style="mitre", mitre_limit=10.0).exterior
    samples = [p for r in outline for p in r.points]
    worst = max(abs(edge_ring.distance(Point(p)) - reference.distance(Point(p))) for p in samples)
    assert worst < OUTLINE_TOL
    assert Polygon(wire_points(face.outerWire())).area == pytest.approx(
        outline_polygon(outline).buffer(-inset, join_style="mitre", mitre_limit=10.0).area, rel=1e-4)


def test_top_radius_on_the_spar_face(bare_die, outline):
    """Cut normal to the straight spar face: the top edge is an arc of radius R centred at (x_cut − setback, −R)."""
    y_mid = 0.5 * (outline[1].points[0][1] + outline[1].points[1][1])
    pts = section_points(bare_die, (X_CUT - 5, y_mid, 0), (0, 1, 0), curved_only=True)
    setback = top_setback_mm(R, UNDERCUT)
    arc_depth = fillet_end_depth_mm(R, UNDERCUT)
    sel = pts[(pts[:, 0] > X_CUT - setback - 0.01) & (pts[:, 2] < -0.02) & (pts[:, 2] > -arc_depth + 0.02)]
    assert len(sel) > 50
    cx, cz, r = fit_circle(sel[:, 0], sel[:, 2])
    assert r == pytest.approx(R, abs=RADIUS_TOL)
    assert cx == pytest.approx(X_CUT - setback, abs=RADIUS_TOL)
    assert cz == pytest.approx(-R, abs=RADIUS_TOL)
    # straight wall below the arc leans inward by the undercut
    wall = pts[(pts[:, 0] > X_CUT - 3) & (pts[:, 2] < -arc_depth - 0.05) & (pts[:, 2] > -H + 0.05)]
    slope = np.polyfit(-wall[:, 2], X_CUT - wall[:, 0], 1)
    assert math.degrees(math.atan(slope[0])) == pytest.approx(UNDERCUT, abs=0.01)
    assert slope[1] == pytest.approx(0.0, abs=OUTLINE_TOL)  # the wall line meets the top plane on the outline


def test_top_radius_on_the_curved_contour(bare_die, outline):
    """Cut normal to the curved contour on the upper surface at about 40 % of the piece."""
    from diegen.die.outline import OutlineModel

    model = OutlineModel(outline, CUTTER, top_setback_mm(R, UNDERCUT))
    p, n = model.locate(100.0)
    pts = section_points(bare_die, (p[0], p[1], 0.0), (-n[1], n[0], 0.0), curved_only=True)
    u = (pts[:, 0] - p[0]) * n[0] + (pts[:, 1] - p[1]) * n[1]  # inset from the outline
    near = np.abs(u) < 5
    u, z = u[near], pts[near, 2]
    arc_depth = fillet_end_depth_mm(R, UNDERCUT)
    sel = (z < -0.02) & (z > -arc_depth + 0.02)
    cu, cz, r = fit_circle(u[sel], z[sel])
    assert r == pytest.approx(R, abs=RADIUS_TOL)
    assert cu == pytest.approx(top_setback_mm(R, UNDERCUT), abs=RADIUS_TOL)
    assert cz == pytest.approx(-R, abs=RADIUS_TOL)


# ---------------------------------------------------------------- holes, flutes, engraving
def test_pins_remove_their_cylinders(bare_input, bare_die):
    from diegen.die.occ.form_block import build_die

    die = build_die(replace(bare_input, pins=PINS))
    removed = volume(bare_die) - volume(die)
    expected = sum(math.pi * p.d**2 / 4 * p.depth for p in PINS)
    assert removed == pytest.approx(expected, rel=1e-4)
    found = set()
    for f in cq_shape(die).Faces():
        if f.geomType() == "CYLINDER":
            from OCP.BRepAdaptor import BRepAdaptor_Surface

            cyl = BRepAdaptor_Surface(f.wrapped).Cylinder()
            loc = cyl.Location()
            for i, p in enumerate(PINS):
                if math.hypot(loc.X() - p.x, loc.Y() - p.y) < 1e-6 and abs(cyl.Radius() - p.d / 2) < 1e-9:
                    bb = f.BoundingBox()
                    assert bb.zmax == pytest.approx(0.0, abs=1e-6)
                    assert bb.zmin == pytest.approx(-p.depth, abs=1e-6)
                    found.add(i)
    assert found == {0, 1}


def test_bore_removes_cylinder_and_top_rounding(bare_input, bare_die):
    """Removed volume: πd²/4·H plus the rounding, by Pappus's centroid theorem on the corner area ρ²(1 − π/4)."""
    from diegen.die.occ.form_block import build_die

    die = build_die(replace(bare_input, bores=BORES))
    b, rho = BORES[0], R
    a = b.d / 2
    # first moment about the axis of (square a..a+ρ × ρ) minus (quarter disc centred at a+ρ, depth ρ)
    moment = rho**2 * (a + rho / 2) - math.pi * rho**2 / 4 * (a + rho - 4 * rho / (3 * math.pi))
    expected = math.pi * a**2 * H + 2 * math.pi * moment
    assert volume(bare_die) - volume(die) == pytest.approx(expected, rel=1e-4)
    top = planar_face_at(die, 0.0)
    inner = list(top.innerWires())
    assert len(inner) == 1
    c = inner[0].Center()
    assert (c.x, c.y) == pytest.approx((b.x, b.y), abs=1e-6)
    assert inner[0].Edges()[0].radius() == pytest.approx(a + rho, abs=1e-6)


def test_flute_depth_tapers_down_the_wall(bare_input):
    """Horizontal cuts through a flute: its depth grows linearly to full at the flange depth, its width stays.

    At full depth the groove is the circular segment of chord w and depth D, radius r = (w²/4 + D²)/(2D)
    (plane geometry of a circular segment), measured from the wall along its normals; above, the same
    segment scaled in depth by depth/flute length.  The flute sits where the wall's radius is about 1 m.
    """
    from diegen.die.occ.form_block import build_die
    from diegen.die.outline import OutlineModel
    from diegen.forming.relief import flute_arc_radius

    flute = DieFlute(420.0, 8.0, 2.0)
    die = build_die(replace(bare_input, flutes=(flute,), flute_length_mm=FLUTE_LENGTH))
    model = OutlineModel(bare_input.outline, CUTTER, top_setback_mm(R, UNDERCUT))
    p, _ = model.locate(flute.s_mm)
    tan_a = math.tan(math.radians(UNDERCUT))
    r = flute_arc_radius(flute.width_mm, flute.depth_mm)
    assert r == pytest.approx((flute.width_mm**2 / 4 + flute.depth_mm**2) / (2 * flute.depth_mm))
    for depth in (0.5 * FLUTE_LENGTH, FLUTE_LENGTH, 0.5 * (FLUTE_LENGTH + H)):
        pts = section_points(die, (0, 0, -depth), (0, 0, 1), step=0.02)
        near = pts[np.hypot(pts[:, 0] - p[0], pts[:, 1] - p[1]) < 8]
        wall = depth * tan_a
        ring = Polygon(np.asarray([q for pc in model.offset(wall, spacing_mm=0.05) for q in pc.points])).exterior
        centre = ring.project(Point(p))
        sink = np.array([ring.distance(Point(q[:2])) if Polygon(ring).contains(Point(q[:2])) else 0.0 for q in near])
        across = np.array([ring.project(Point(q[:2])) - centre for q in near])
        scale = min(depth / FLUTE_LENGTH, 1.0)
        assert sink[np.argmin(np.abs(across))] == pytest.approx(flute.depth_mm * scale, abs=OUTLINE_TOL), depth
        groove = sink > 0.02
        cu, cv, radius = fit_circle(sink[groove] / scale, across[groove])  # undo the taper: the full-depth segment
        assert radius == pytest.approx(r, abs=OUTLINE_TOL), depth
        assert cu == pytest.approx(flute.depth_mm - r, abs=OUTLINE_TOL), depth
        assert cv == pytest.approx(0.0, abs=OUTLINE_TOL), depth
        assert 2 * math.sqrt(radius**2 - cu**2) == pytest.approx(flute.width_mm, abs=OUTLINE_TOL), depth  # chord
    assert not solid_problems(die)


def test_flute_at_a_corner_moves_clear_of_it_and_crowded_flutes_are_refused(bare_input):
    """A flute whose lip would reach the corner trim moves just clear of it; touching flutes are refused."""
    from diegen.die.occ.form_block import build_die
    from diegen.die.outline import LIP_CLEARANCE_MM, OutlineModel

    inset = max(top_setback_mm(R, UNDERCUT), H * math.tan(math.radians(UNDERCUT)))
    flute = DieFlute(1.0, 8.0, 2.0)  # 1 mm from the upper corner at the spar face
    model = OutlineModel(bare_input.outline, CUTTER, inset, flutes=(flute,))
    (groove,) = model.grooves
    corner = model.segments[0].point(0.0, 0.0)
    # the offset of the spar face by the largest inset crosses the curve's offset that far along
    trim = model._junction(model.segments[1], model.segments[0], inset)[1]
    assert groove.s_mid == pytest.approx(trim + LIP_CLEARANCE_MM + groove.half_width, abs=1e-9)
    assert 2 < trim < 2 * inset  # about one inset at this near-square corner
    assert corner[0] == pytest.approx(X_CUT)
    die = build_die(replace(bare_input, flutes=(flute,), flute_length_mm=9.0))
    assert not solid_problems(die)
    length = model.segments[0].length
    with pytest.raises(GeometryError, match="straight end face"):
        build_die(replace(bare_input, flutes=(DieFlute(length + 20.0, 8.0, 2.0),), flute_length_mm=9.0))
    with pytest.raises(GeometryError, match="further apart"):
        crowded = (DieFlute(300.0, 8.0, 2.0), DieFlute(308.1, 8.0, 2.0))
        build_die(replace(bare_input, flutes=crowded, flute_length_mm=9.0))


def test_engraving_on_bottom_face_only_and_reads_from_below(bare_input, bare_die):
    from diegen.die.occ.form_block import build_die

    die = build_die(replace(bare_input, engraving=("F",)))
    assert planar_face_at(die, 0.0).Area() == pytest.approx(planar_face_at(bare_die, 0.0).Area(), rel=1e-9)
    removed = volume(bare_die) - volume(die)
    mouth = planar_face_at(bare_die, -H).Area() - planar_face_at(die, -H).Area()
    assert mouth > 10
    assert removed == pytest.approx(mouth * 0.5, rel=1e-4)  # pockets 0.5 mm deep with vertical sides
    floors = [f for f in cq_shape(die).Faces() if f.geomType() == "PLANE" and abs(f.Center().z + H - 0.5) < 1e-6]
    assert len(floors) == 2  # the letter and the arrow
    letter = min(floors, key=lambda f: f.Center().y)  # the arrow sits below the text, i.e. at larger Y
    poly = Polygon(wire_points(letter.outerWire(), 0.1))
    x0, y0, x1, y1 = poly.bounds
    # turned over (about the X axis) the letter reads normally: its stem at small X, its arms at small Y
    assert poly.intersection(box(x0, y0, 0.5 * (x0 + x1), y1)).area > 0.5 * poly.area
    assert poly.intersection(box(x0, y0, x1, 0.5 * (y0 + y1))).area > 0.5 * poly.area
    arrow = max(floors, key=lambda f: f.Center().y)
    apoly = Polygon(wire_points(arrow.outerWire(), 0.1))
    ax0, _, ax1, _ = apoly.bounds
    # the arrow head (the wide end) points towards −X, the leading edge
    assert apoly.intersection(box(ax0, -1e3, 0.5 * (ax0 + ax1), 1e3)).area > 0.5 * apoly.area


# ---------------------------------------------------------------- errors a builder can act on
def test_radius_too_large_for_stock(bare_input):
    from diegen.die.occ.form_block import build_die

    with pytest.raises(GeometryError, match="thicker stock or a smaller radius"):
        build_die(replace(bare_input, top_radius_mm=12.5))


def test_pin_off_the_top_face(bare_input):
    from diegen.die.occ.form_block import build_die

    with pytest.raises(GeometryError, match="pin hole"):
        build_die(replace(bare_input, pins=(DiePin(252.0, 10.0, 3.2, 5.0),)))


def test_flute_deeper_than_half_its_width(bare_input):
    from diegen.die.occ.form_block import build_die

    with pytest.raises(GeometryError, match="half its width"):
        build_die(replace(bare_input, flutes=(DieFlute(300.0, 4.0, 3.0),), flute_length_mm=9.0))


def test_clockwise_outline(bare_input):
    from diegen.die.occ.form_block import build_die

    rev = tuple(DieRun(r.kind, tuple(reversed(r.points))) for r in reversed(bare_input.outline))
    with pytest.raises(GeometryError, match="clockwise"):
        build_die(replace(bare_input, outline=rev))


def test_inside_corner_tighter_than_cutter(bare_input):
    from diegen.die.occ.form_block import build_die

    # a rectangle with a notch: the notch's inside corners are sharp
    pts = ((0, 0), (100, 0), (100, 40), (60, 40), (60, 30), (40, 30), (40, 40), (0, 40), (0, 0))
    runs = tuple(DieRun("line", (a, b)) for a, b in itertools.pairwise(pts))
    with pytest.raises(GeometryError, match="inside corner"):
        build_die(replace(bare_input, outline=runs))


def test_blind_pin_leaving_a_thin_floor(bare_input):
    from diegen.die.occ.form_block import build_die

    with pytest.raises(GeometryError, match="drill it through or less deep"):
        build_die(replace(bare_input, pins=(DiePin(60.0, 10.0, 3.2, H - 0.4),)))


def test_invalid_die_names_the_part_at_fault(full_input, monkeypatch):
    """When the finished solid fails the check, the die is rebuilt without the engraving to find the culprit."""
    import diegen.die.occ.form_block as fb

    real = fb.solid_problems
    plain = fb.build_die(replace(full_input, engraving=()))
    limit = len(cq_shape(plain).Faces())
    monkeypatch.setattr(fb, "solid_problems",
                        lambda shape: ["pretend"] if len(cq_shape(shape).Faces()) > limit else real(shape))
    with pytest.raises(SolidError, match="the engraving makes the die an invalid solid"):
        fb.build_die(full_input)


def test_kernel_failure_becomes_solid_error(bare_input, monkeypatch):
    import diegen.die.occ.form_block as fb

    def broken(wires, ruled):
        raise RuntimeError("Standard_Failure")

    monkeypatch.setattr(fb, "_loft_faces", broken)
    with pytest.raises(SolidError, match="lower the top radius"):
        fb.build_die(bare_input)


# ---------------------------------------------------------------- tiles and laminates
def test_tiles_fit_the_bed_and_keep_the_volume(bare_die, bare_input):
    from diegen.die.model import outline_model
    from diegen.die.occ.tiles import cut_tiles
    from diegen.die.tiles import die_tile_layout

    bed = (150.0, 200.0)
    layout = die_tile_layout(bare_input, bed, outline_model(bare_input), dowel_d_mm=5.0, dowel_depth_mm=10.0)
    tiles, dowels = cut_tiles(bare_die, layout)
    assert len(tiles) == len(layout.tiles) == 2
    for t in tiles:
        bb = cq_shape(t.shape).BoundingBox()
        length, width = (bb.xlen, bb.ylen)
        bx, by = (bed[1], bed[0]) if t.along_bed_y else bed
        assert length <= bx - 4 + 1e-6 and width <= by - 4 + 1e-6
    total = sum(volume(t.shape) for t in tiles)
    n_dowels = round((volume(bare_die) - total) / (math.pi * 2.5**2 * 20.0))
    assert n_dowels == len(dowels) and n_dowels in (1, 2)
    assert volume(bare_die) - total == pytest.approx(n_dowels * math.pi * 2.5**2 * 20.0, rel=1e-4)


def test_bed_too_small(bare_input):
    from diegen.die.model import outline_model
    from diegen.die.tiles import die_tile_layout

    with pytest.raises(GeometryError, match="bed"):
        die_tile_layout(bare_input, (100.0, 100.0), outline_model(bare_input))


def test_laminate_layers(bare_input, outline):
    from diegen.die.laminate import laminate_layers

    layers = laminate_layers(bare_input, 6.0)
    assert [round(layer.thickness_mm, 9) for layer in layers] == [6.0, 6.0, 0.7]
    base = outline_polygon(outline)
    tan_a = math.tan(math.radians(UNDERCUT))
    for layer in layers:
        cut = outline_polygon(layer.outline)
        ref = base.buffer(tan_a * layer.z_bottom_mm, join_style="mitre", mitre_limit=10.0)
        assert cut.symmetric_difference(ref).area / cut.length < OUTLINE_TOL


def test_laminate_layers_carry_the_flutes(bare_input):
    """A flute takes the area of its circular segment, r²(2φ − sin 2φ)/2 with sin φ = w/2r (plane geometry),
    scaled by its taper, out of each layer's outline: full at the bottom, none at the top face."""
    from diegen.die.laminate import laminate_layers
    from diegen.die.outline import GROOVE_SAMPLES

    flute = DieFlute(420.0, 8.0, 2.0)  # where the wall's radius is about 1 m
    plain = laminate_layers(bare_input, 4.5)
    fluted = laminate_layers(replace(bare_input, flutes=(flute,), flute_length_mm=9.0), 4.5)
    r = (flute.width_mm**2 / 4 + flute.depth_mm**2) / (2 * flute.depth_mm)
    phi = math.asin(flute.width_mm / (2 * r))
    step = 2 * phi / (GROOVE_SAMPLES - 1)  # the outline is the polygon through the groove's samples
    segment = r**2 * (2 * phi - math.sin(2 * phi)) / 2 - (GROOVE_SAMPLES - 1) * r**2 * (step - math.sin(step)) / 2
    for a, b in zip(plain, fluted):
        scale = min(-b.z_bottom_mm / 9.0, 1.0)
        lost = outline_polygon(a.outline).area - outline_polygon(b.outline).area
        # measured along the normals of a wall curving at 1/1000 mm⁻¹: about 0.1 % less per mm of inset and depth
        assert lost == pytest.approx(scale * segment, rel=3e-3), b.index
    top = outline_polygon(plain[0].top_outline).area  # the top face is whole: only the sampling differs
    assert outline_polygon(fluted[0].top_outline).area == pytest.approx(top, rel=1e-6)


def test_single_closed_curve_outline(bare_input):
    """A whole closed contour (one periodic curve run): an ellipse 200 × 80 mm, area check by πab."""
    from diegen.die.occ.form_block import build_die

    t = np.linspace(0, 2 * np.pi, 241)
    pts = np.column_stack([100 * np.cos(t), 40 * np.sin(t)])
    pts[-1] = pts[0]
    die = build_die(replace(bare_input, outline=(DieRun("curve", tuple(map(tuple, pts.tolist()))),)))
    # area of the ellipse's inward offset by c: πab − c·P + πc² (Steiner's formula; valid as c is below the
    # smallest radius of curvature b²/a = 16 mm); P by numerical integration of the arc length
    tt = np.linspace(0, 2 * np.pi, 200001)
    perimeter = float(np.trapezoid(np.hypot(100 * np.sin(tt), 40 * np.cos(tt)), tt))

    def inner_area(c: float) -> float:
        return math.pi * 100 * 40 - c * perimeter + math.pi * c**2

    assert planar_face_at(die, 0.0).Area() == pytest.approx(inner_area(top_setback_mm(R, UNDERCUT)), rel=2e-5)
    assert planar_face_at(die, -H).Area() == pytest.approx(inner_area(H * math.tan(math.radians(UNDERCUT))), rel=2e-5)


def test_flute_on_a_single_closed_curve(bare_input):
    """A closed contour (an ellipse 200 × 80 mm) with a flute across its start point and one opposite.

    Removed volume: the flute's circular segment A = r²(2φ − sin 2φ)/2 (plane geometry) times its taper,
    ∫ min(z/L, 1) dz over the block = H − L/2.  At the ellipse's vertices the wall's radius is a²/b = 250 mm,
    which changes that by a few tenths of a per cent.
    """
    from diegen.die.occ.form_block import build_die
    from diegen.die.outline import OutlineModel

    t = np.linspace(0, 2 * np.pi, 241)
    pts = np.column_stack([100 * np.sin(t), 40 * np.cos(t) * -1])  # starts at (0, −40), runs counter-clockwise
    pts[-1] = pts[0]
    ellipse = (DieRun("curve", tuple(map(tuple, pts.tolist()))),)
    model = OutlineModel(ellipse, CUTTER, 2.0)
    flutes = (DieFlute(1.0, 8.0, 2.0), DieFlute(model.perimeter_mm / 2, 8.0, 2.0))  # the first straddles the start
    plain = build_die(replace(bare_input, outline=ellipse))
    fluted = build_die(replace(bare_input, outline=ellipse, flutes=flutes, flute_length_mm=FLUTE_LENGTH))
    assert not solid_problems(fluted)
    r = (8.0**2 / 4 + 2.0**2) / (2 * 2.0)
    phi = math.asin(8.0 / (2 * r))
    area = r**2 * (2 * phi - math.sin(2 * phi)) / 2
    expected = 2 * area * (H - FLUTE_LENGTH / 2)
    removed = volume(plain) - volume(fluted)
    assert removed == pytest.approx(expected, rel=0.01), removed / expected
