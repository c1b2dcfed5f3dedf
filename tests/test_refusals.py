"""Impossible input is refused with the reason and the limit; what the project reports instead of refusing.

Every refusal is a :class:`diegen.errors.DiegenError` subclass whose message names
the reason and gives the numbers (what was asked, what the limit is), and the
command line (``python -m diegen.cli check``, run as a subprocess) exits 2 with
that message and no traceback.  A die too big for the press box and die stock
thinner than the flange are reported, not refused; a piece the solid kernel
cannot make fails alone while the others are built.

Independent expectations:

* NACA 4-digit thickness distribution (closed trailing edge, last coefficient
  −0.1036), NACA Report 824 (Abbott, von Doenhoff, Stivers 1945), written out
  below; a 00xx section's depth at a chord station is twice the half-thickness,
  and a mold-line offset d takes d off each face (a small-slope approximation,
  hence the named tolerances).
* Minimum bend radius of 2024-T3 at 1/16 in: 4t, Aluminum Association,
  *Aluminum Design Manual*, 2005 ed., Part VII, Table 3-1, p. VII-78.
* 1 in = 25.4 mm and 1 lbf = 4.4482216152605 N, exact (NIST SP 811).
* The margins themselves (edge margin, ligament, 3 mm die clearance over the
  flange, 2 × flange height + 10 mm minimum tail depth, 1 mm shortest end face)
  are the project's rules: common practice, no source.
"""

from __future__ import annotations

import json
import math
import os
import re
import subprocess
import sys
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pytest

from diegen import api, cli
from diegen.errors import AirfoilError, DiegenError, FormingError, GeometryError, SolidError, SpecError

ROOT = Path(__file__).resolve().parents[1]
IN = 25.4  # mm per inch, exact (NIST SP 811)
N_PER_LBF = 4.4482216152605  # exact by definition (NIST SP 811, appendix B)

BASE = dict(
    id="R1", airfoil="naca 2412", chord=600, skin=0.6, alloy="2024-T3", t=0.6, height=12, radius=2.4,
    front=0.25, rear=0.70, cap=0, pieces="[nose, center, tail]", holes="none", pins="auto", extra_flange="",
    die="{material: solid-surface, stock_thickness: 19, cutter_diameter: 6}",
    press="{force: 20 ton, box: [400, 300], rubber: {durometer: 55, thickness: 50}}",
)
TEMPLATE = """\
diegen: 1
kind: rib
id: {id}
units: mm
airfoil: {airfoil}
chord: {chord}
skin_thickness: {skin}
sheet: {{alloy: {alloy}, thickness: {t}}}
flange: {{height: {height}, bend_radius: {radius}{extra_flange}}}
spars:
  - {{at: {front}, web: 1.6, cap_thickness: {cap}, cap_width: 19}}
  - {{at: {rear}, web: 1.3, cap_thickness: {cap}, cap_width: 16}}
pieces: {pieces}
lightening_holes: {holes}
pins: {pins}
relief: flutes
die: {die}
press: {press}
"""


def rib_yaml(**changes: object) -> str:
    """A small rib spec in mm (600 mm chord, no lightening holes unless asked)."""
    values = dict(BASE)
    unknown = set(changes) - set(values)
    assert not unknown, unknown
    values.update(changes)
    return TEMPLATE.format(**values)


def naca_half_thickness(thickness: float, x: float) -> float:
    """Half-thickness (fraction of chord) of a NACA 4-digit section at chord fraction ``x``, closed trailing edge.

    NACA Report 824: y_t = 5t(0.2969√x − 0.1260x − 0.3516x² + 0.2843x³ − 0.1015x⁴), with −0.1036 in place of
    −0.1015 to close the trailing edge.
    """
    return 5 * thickness * (0.2969 * math.sqrt(x) - 0.1260 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1036 * x**4)


def numbers_after(pattern: str, text: str) -> float:
    """The number captured by ``pattern`` (one group) in ``text``."""
    found = re.search(pattern, text)
    assert found, f"{pattern!r} not in: {text}"
    return float(found.group(1))


# -- the refusal cases -------------------------------------------------------
# name: (spec changes, the DiegenError subclass expected)
REFUSED: dict[str, tuple[dict[str, object], type[DiegenError]]] = {
    "section_collapses": (dict(airfoil="naca 0006", chord=300, skin=10), GeometryError),
    "flange_bends_overlap": (dict(airfoil="naca 0006", chord=300, radius=9), GeometryError),
    "tail_vanishes": (dict(airfoil="naca 0006", chord=300, pieces="[tail]"), GeometryError),
    "nose_collapses": (dict(airfoil="naca 0006", chord=300, skin=7.5, front=0.10, pieces="[nose]"), GeometryError),
    "end_face_collapses": (dict(airfoil="naca 0006", chord=300, skin=8, pieces="[nose]"), GeometryError),
    "hole_deeper_than_web": (dict(holes="[{x: 300, d: 80}]"), GeometryError),
    "holes_inside_ligament": (dict(holes="[{x: 250, d: 30}, {x: 286, d: 30}]"), GeometryError),
    "pin_in_hole": (dict(holes="[{x: 300, d: 30}]", pins="[{x: 300, y: 12}, {x: 400}]"), GeometryError),
    "pin_off_the_web": (dict(airfoil="naca 0006", chord=300, skin=3, pins="[{x: 40}, {x: 60}]"), GeometryError),
    "radius_below_table": (dict(t='"0.063 in"', radius='"0.03 in"'), FormingError),
    "flange_too_short": (dict(height=2), FormingError),
    "airfoil_crosses": (dict(airfoil="{file: crossing.dat}"), AirfoilError),
    "id_escapes": (dict(id="../../x"), SpecError),
}

# name: (the spec key at fault, its line in TEMPLATE, the text its column is found at on that line)
LOCATED: dict[str, tuple[str, int, str]] = {
    "section_collapses": ("skin_thickness", 7, "skin_thickness:"),
    "flange_bends_overlap": ("flange.bend_radius", 9, "bend_radius:"),
    "tail_vanishes": ("flange.min_tail_depth", 9, "flange:"),  # not written: its nearest written parent
    "nose_collapses": ("skin_thickness", 7, "skin_thickness:"),
    "end_face_collapses": ("spars[0].at", 11, "at:"),
    "hole_deeper_than_web": ("lightening_holes[0]", 14, "{x: 300"),
    "holes_inside_ligament": ("lightening_holes[1]", 14, "{x: 286"),
    "pin_in_hole": ("pins[0]", 15, "{x: 300"),
    "pin_off_the_web": ("pins[0]", 15, "{x: 40"),
    "radius_below_table": ("flange.bend_radius", 9, "bend_radius:"),
    "flange_too_short": ("flange.height", 9, "height:"),
    "airfoil_crosses": ("airfoil", 5, "airfoil:"),
    "id_escapes": ("id", 3, "../"),  # the schema's own problem: at the value
}
CROSSING_LINE = 35  # the line of crossing.dat whose point is moved across the other surface


def crossing_airfoil() -> str:
    """A NACA 2412 coordinate file (the project's test data, one-loop layout) with the upper-surface point on line
    ``CROSSING_LINE`` moved 0.03 chord below the lower surface: the outline crosses itself there."""
    lines = (ROOT / "tests" / "data" / "airfoils" / "naca2412_selig.dat").read_text().splitlines()
    x, y = (float(v) for v in lines[CROSSING_LINE - 1].split())
    assert 0.2 < x < 0.8 and y > 0.02, (x, y)  # an upper-surface point mid-chord
    lines[CROSSING_LINE - 1] = f" {x:.7f} {-y - 0.03:.7f}"
    return "\n".join(lines) + "\n"


@pytest.fixture(scope="module")
def case_files(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("refused")
    (folder / "crossing.dat").write_text(crossing_airfoil())
    paths = {}
    for name, (changes, _) in REFUSED.items():
        paths[name] = folder / f"{name}.yaml"
        paths[name].write_text(rib_yaml(**changes))
    return paths


def _check_cli(path: Path, cwd: Path = ROOT) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("DIEGEN_DEBUG", None)
    return subprocess.run([sys.executable, "-m", "diegen.cli", "check", str(path)], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300, check=False)


@pytest.fixture(scope="module")
def cli_runs(case_files: dict[str, Path]) -> dict[str, subprocess.CompletedProcess[str]]:
    """``diegen check`` on every refusal case, two at a time (each run pays the interpreter's start-up)."""
    with ThreadPoolExecutor(max_workers=2) as pool:
        runs = dict(zip(case_files, pool.map(_check_cli, case_files.values())))
    return runs


def refusal(case_files: dict[str, Path], name: str) -> str:
    """The message of the error the case raises in process (checked to be the expected subclass)."""
    expected = REFUSED[name][1]
    with pytest.raises(expected) as caught:
        api.analyse(api.load(case_files[name]))
    return str(caught.value)


@pytest.mark.parametrize("name", sorted(REFUSED))
def test_cli_refuses_with_exit_2_and_no_traceback(name: str, cli_runs, case_files) -> None:
    run = cli_runs[name]
    assert run.returncode == cli.EXIT_BAD_INPUT, (run.returncode, run.stderr)
    assert "Traceback" not in run.stderr and "RuntimeWarning" not in run.stderr, run.stderr
    assert run.stderr.startswith("error: ")
    assert run.stderr.rstrip().splitlines()[-1].endswith("nothing was written"), run.stderr
    if name != "id_escapes":  # a SpecError is printed problem by problem, with its location
        assert refusal(case_files, name) in run.stderr


@pytest.mark.parametrize("name", sorted(REFUSED))
def test_every_refusal_names_the_spec_file_line_and_column(name: str, cli_runs, case_files) -> None:
    key, line, needle = LOCATED[name]
    text = case_files[name].read_text().splitlines()[line - 1]
    column = text.index(needle) + 1
    first = cli_runs[name].stderr.splitlines()[0]
    assert first.startswith(f"error: {case_files[name]}:{line}:{column}: {key}"), first


def test_an_airfoil_file_that_crosses_itself_names_the_point_moved(cli_runs, case_files) -> None:
    first = cli_runs["airfoil_crosses"].stderr.splitlines()[0]
    airfoil = case_files["airfoil_crosses"].parent / "crossing.dat"
    assert f"{airfoil}:{CROSSING_LINE}: the outline crosses or touches itself at this point" in first, first


def test_a_wing_rib_refusal_is_located_in_the_override_that_applies(tmp_path: Path) -> None:
    """Rib 2's override asks for a bend radius below the table (2024-T3 at 0.063 in: 4t, Aluminum Association
    Table 3-1): the refusal points at that override's key, not at the wing's own flange."""
    text = (rib_yaml(t='"0.063 in"', radius='"0.3 in"').replace("kind: rib", "kind: wing")
            .replace("airfoil: naca 2412\nchord: 600\n",
                     "airfoil: naca 2412\n"
                     "planform: {root_chord: 600, tip_chord: 500, span: 900, stations: {count: 3}}\n")
            + "overrides:\n  - ribs: [2]\n    flange: {bend_radius: \"0.03 in\"}\n")
    path = tmp_path / "wing.yaml"
    path.write_text(text)
    line = text.splitlines().index('    flange: {bend_radius: "0.03 in"}') + 1
    column = text.splitlines()[line - 1].index("bend_radius:") + 1
    with pytest.raises(FormingError) as caught:
        api.analyse(api.load(path))
    assert str(caught.value).startswith(f"{path}:{line}:{column}: flange.bend_radius: rib R1-R02: "), caught.value


def test_a_refused_build_leaves_no_empty_output_folder(tmp_path: Path, case_files, capsys) -> None:
    out = tmp_path / "new" / "out"  # neither folder exists yet
    code = cli.main(["build", str(case_files["radius_below_table"]), "-o", str(out), "-j", "1", "-q"])
    err = capsys.readouterr().err
    assert code == cli.EXIT_BAD_INPUT and err.rstrip().endswith("nothing was written"), err
    assert not (tmp_path / "new").exists()
    existing = tmp_path / "existing"
    existing.mkdir()
    code = cli.main(["build", str(case_files["section_collapses"]), "-o", str(existing), "-j", "1", "-q"])
    assert code == cli.EXIT_BAD_INPUT and list(existing.iterdir()) == []
    capsys.readouterr()


# 1. offsets that collapse the section; flange bends deeper than the section allows; a tail that vanishes
def test_skin_offset_that_collapses_the_section(case_files) -> None:
    message = refusal(case_files, "section_collapses")
    assert "skin (10.000 mm)" in message and "nothing is left" in message
    # NACA 0006: the largest inscribed circle is about the 6 % maximum thickness (NACA Report 824), 18.0 mm at 300 mm
    deepest = numbers_after(r"only (\d+\.\d+) mm deep at its thickest", message)
    assert deepest == pytest.approx(0.06 * 300, abs=0.1)
    assert numbers_after(r"stay under about (\d+\.\d+) mm", message) == pytest.approx(deepest / 2, abs=0.01)


def test_flange_bends_that_overlap_across_the_web(case_files) -> None:
    message = refusal(case_files, "flange_bends_overlap")
    assert "nose piece" in message and "no flat web" in message
    assert "bend radius of 9.00 mm" in message and "more than 18.00 mm" in message
    # the nose die is at most as deep as the section at its aft end face (x = 75 − 0.6 mm) less skin and sheet
    at_spar = 2 * naca_half_thickness(0.06, 74.4 / 300) * 300 - 2 * (0.6 + 0.6)
    deepest = numbers_after(r"only (\d+\.\d+) mm deep", message)
    assert at_spar - 1.0 < deepest <= at_spar + 0.05 < 18.0


def test_tail_that_vanishes_leaves_no_piece(case_files) -> None:
    message = refusal(case_files, "tail_vanishes")
    assert "no piece left to make" in message and "no tail piece" in message
    assert "minimum tail depth of 34.0 mm" in message  # 2 × 12 mm flange + 10 mm
    x = (0.70 * 300 + 1.3 + 0.6) / 300  # aft face of the rear spar web plus the rib sheet
    depth = 2 * naca_half_thickness(0.06, x) * 300 - 2 * (0.6 + 0.6)
    assert numbers_after(r"rear spar is (\d+\.\d+) mm", message) == pytest.approx(depth, abs=0.15)


def test_tail_that_vanishes_beside_other_pieces_is_a_warning(tmp_path: Path) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(airfoil="naca 0006", pieces="[nose, tail]"))
    analysis = api.analyse(api.load(path))
    assert [p.piece.name for p in analysis.pieces] == ["nose"]
    (warning,) = [str(w) for w in analysis.geometry.warnings if "no tail piece" in str(w)]
    x = (0.70 * 600 + 1.3 + 0.6) / 600
    depth = 2 * naca_half_thickness(0.06, x) * 600 - 2 * (0.6 + 0.6)
    assert numbers_after(r"rear spar is (\d+\.\d+) mm", warning) == pytest.approx(depth, abs=0.15)
    assert "34.0 mm" in warning


def test_build_of_a_refused_spec_exits_2_and_writes_no_piece(tmp_path: Path, case_files, capsys) -> None:
    code = cli.main(["build", str(case_files["section_collapses"]), "-o", str(tmp_path), "-j", "1", "-q"])
    err = capsys.readouterr().err
    assert code == cli.EXIT_BAD_INPUT and "skin_thickness: offsetting the section" in err and "Traceback" not in err
    assert not [p for p in tmp_path.rglob("*") if p.is_file() and p.name != ".diegen.lock"]


# 2. an offset that collapses the nose or the tail
def test_offset_that_eats_the_nose(case_files) -> None:
    message = refusal(case_files, "nose_collapses")
    assert "nose piece" in message and "no length" in message and "leading edge" in message
    spar_end = 0.10 * 300 - 0.6
    assert f"to {spar_end:.1f} mm" in message
    # the die starts where the section's depth first exceeds twice the skin + sheet offset
    need = 2 * (7.5 + 0.6) / 300
    xs = np.linspace(1e-4, 0.3, 30001)
    first = xs[np.argmax([2 * naca_half_thickness(0.06, x) > need for x in xs])] * 300
    leading = numbers_after(r"leading edge at x = (\d+\.\d+) mm", message)
    assert leading > spar_end
    assert leading == pytest.approx(first, abs=3.0)  # normal vs vertical offset on a sloping face


def test_offset_that_leaves_no_end_face(case_files) -> None:
    message = refusal(case_files, "end_face_collapses")
    assert "nose piece of rib R1" in message and "end face at x = 74.4 mm" in message and "at least 1.0 mm" in message
    depth = 2 * naca_half_thickness(0.06, 74.4 / 300) * 300 - 2 * (8 + 0.6)
    assert numbers_after(r"only (\d+\.\d+) mm deep there", message) == pytest.approx(depth, abs=0.1)


# 3. lightening holes that leave no web
def test_hole_bigger_than_the_web(case_files) -> None:
    message = refusal(case_files, "hole_deeper_than_web")
    assert "lightening_holes[0]" in message and "d = 80.0 mm" in message and "edge margin of 6.0 mm" in message
    # usable depth: section depth less skin + sheet, less bend radius + edge margin, each side
    usable = 2 * naca_half_thickness(0.12, 0.5) * 600 - 2 * (0.6 + 0.6) - 2 * (2.4 + 6.0)
    at_most = numbers_after(r"at most about (\d+\.\d+) mm across", message)
    assert at_most == pytest.approx(usable, abs=0.6)  # the 2 % camber tilts the section a little
    shortfall = numbers_after(r"bend line by (\d+\.\d+) mm", message)
    assert shortfall == pytest.approx((80 - at_most) / 2, abs=0.5)


def test_holes_closer_than_the_ligament(case_files) -> None:
    message = refusal(case_files, "holes_inside_ligament")
    assert "lightening_holes[1]" in message and "ligament rule needs 12.0 mm" in message
    gap = numbers_after(r"leaves only (\d+\.\d+) mm of web", message)
    assert gap == pytest.approx(286 - 250 - 30, abs=0.1)  # centres at nearly the same height
    assert numbers_after(r"short by (\d+\.\d+) mm", message) == pytest.approx(12.0 - gap, abs=0.01)


# 4. pins that fall in holes
def test_pin_inside_a_hole(case_files) -> None:
    message = refusal(case_files, "pin_in_hole")
    assert "pins[0] at (300.0, 12.0) mm" in message and "falls in the lightening hole at x = 300.0 mm" in message
    assert "d = 30.0 mm" in message and "needs 6.0 mm" in message


def test_pin_too_close_to_a_hole_gives_the_gap(tmp_path: Path) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(holes="[{x: 300, d: 30}]"))
    (hole,) = next(p for p in api.analyse(api.load(path)).pieces if p.piece.name == "center").piece.holes
    x = hole.x + 15.0 + 1.5 + 2.0  # 2 mm of web between the 3 mm pin and the hole
    path.write_text(rib_yaml(holes="[{x: 300, d: 30}]", pins=f"[{{x: {x}, y: {hole.y}}}, {{x: 400}}]"))
    with pytest.raises(GeometryError) as caught:
        api.analyse(api.load(path))
    message = str(caught.value)
    assert numbers_after(r"only (\d+\.\d+) mm from the edge", message) == pytest.approx(2.0, abs=1e-6)
    assert "needs 6.0 mm" in message


def test_pin_where_the_web_is_too_shallow(case_files) -> None:
    message = refusal(case_files, "pin_off_the_web")
    assert "pins[0]" in message and "x = 40.0 mm" in message
    assert "needs 19.80 mm" in message  # 2 × (2.4 bend radius + 6 edge margin) + 3 mm pin
    depth = 2 * naca_half_thickness(0.06, 40 / 300) * 300 - 2 * (3 + 0.6)
    assert numbers_after(r"only (\d+\.\d+) mm deep there", message) == pytest.approx(depth, abs=0.15)


# 5. a bend radius below the material minimum
def test_bend_radius_below_the_table_minimum(case_files) -> None:
    message = refusal(case_files, "radius_below_table")
    # Aluminum Association Table 3-1, 2024-T3 at 1/16 in: 4t = 0.252 in; judged on the die radius the metal is
    # bent to, which is tighter than the part's 0.03 in
    assert f"below the {4 * 0.063 * IN:.3f} mm minimum" in message
    assert f"part's {0.03 * IN:.3f} mm" in message and "the die bends the metal to" in message
    assert "2024-T3" in message and f"{0.063 * IN:.3f} mm" in message
    assert "Aluminum Association" in message and "Table 3-1" in message
    # located at the key that causes it, with a remedy
    path = case_files["radius_below_table"]
    assert message.startswith(f"{path}:") and "flange.bend_radius" in message.split(" ")[0] + message
    assert "use a part radius of at least" in message


# 6. a die that does not fit the press box is reported, not refused
def test_die_too_big_for_the_box_is_reported(tmp_path: Path) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(pieces="[nose, center]",
                             press="{force: 20 ton, box: [100, 100], rubber: {durometer: 55, thickness: 50}}"))
    analysis = api.analyse(api.load(path))
    report = api.report_json(analysis)
    for piece, part in zip(analysis.pieces, report["parts"]):
        outline = np.asarray(piece.piece.outline)
        length, width = np.ptp(outline[:, 0]), np.ptp(outline[:, 1])
        assert part["press"]["verdict"] == "insufficient" and part["press"]["fits_box"] is False
        # 20 short tons = 40 000 lbf over the 100 × 100 mm box
        assert part["press"]["pressure_mpa"] == pytest.approx(40_000 * N_PER_LBF / 100**2, rel=1e-3)
        wanted = f"die {length:.0f} x {width:.0f} mm does not fit a 100 x 100 mm box with 25 mm clearance each side"
        assert any(wanted in w["message"] for w in part["warnings"]), part["warnings"]
    run = _check_cli(path)
    assert run.returncode == cli.EXIT_OK, run.stderr
    assert "INSUFFICIENT" in run.stdout and "does not fit a 100 x 100 mm box" in run.stdout


# 7. die stock thinner than the flange: laminated layers
@pytest.mark.parametrize("stock, layers", [(6.0, 3), (0.5 * IN, 2), (15.0, 1)])
def test_thin_stock_is_laminated(tmp_path: Path, stock: float, layers: int) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(pieces="[nose]", die=f"{{material: solid-surface, stock_thickness: {stock}, "
                                                  "cutter_diameter: 6}"))
    assert layers == math.ceil((12 + 3) / stock)  # flange height + 3 mm clearance, in whole layers
    analysis = api.analyse(api.load(path))
    (part,) = api.report_json(analysis)["parts"]
    assert part["die"]["layers"] == layers
    assert part["die"]["height_mm"] == pytest.approx(layers * stock, abs=1e-3)
    laminate = [w["message"] for w in part["warnings"] if w["code"] == "die-laminated"]
    if layers > 1:
        assert laminate and f"laminate {layers} layers ({layers * stock:.1f} mm)" in laminate[0]
    else:
        assert not laminate


# 8. a print bed smaller than one tile can be: that piece fails with the kernel layer's reason
@pytest.mark.slow
@pytest.mark.solid
def test_print_bed_smaller_than_a_tile_fails_the_piece(tmp_path: Path) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(chord=300, pieces="[nose]",
                             die="{material: pla, stock_thickness: 19, cutter_diameter: 6, print_bed: [20, 20]}"))
    spec = api.load(path)
    depth = np.ptp(np.asarray(api.analyse(spec).pieces[0].piece.outline)[:, 1])
    result = api.build(spec, tmp_path / "out", jobs=1)
    (failed,) = result.failed
    assert failed.part_id == "R1-nose" and "a bed of 20 × 20 mm cannot take a tile" in failed.error
    # the die's plan depth against the bed; a tile must be at least two 10 mm dowel depths + 2 × 2 mm walls long
    assert numbers_after(r"it is (\d+\.\d+) mm deep", failed.error) == pytest.approx(depth, abs=1.0)
    assert "at least 24 mm long" in failed.error
    # the STEP and STL are written before the tiling fails: the failed piece keeps neither
    assert not list((tmp_path / "out").rglob("R1-nose-*"))
    assert not list((tmp_path / "out").rglob(".*.part*"))


# 9. a solid-kernel failure is caught per piece
@pytest.fixture
def kernel_fails_for(monkeypatch):
    """Stand-in kernel: ``build_die`` raises SolidError for the named part and returns a token for the others;
    STEP and STL writers write small text files (atomically, as the real ones do)."""
    from diegen.fileio import write_text

    failing: set[str] = set()

    def build_die(die, *_):
        if die.part_id in failing:
            raise SolidError(f"pretend kernel failure: the loft of {die.part_id} is not a valid solid")
        return ("stand-in solid", die.part_id)

    def write_step(shape, path, **_):
        write_text(path, f"stand-in STEP for {shape[1]}\n")

    def write_stl(shape, path, tolerance_mm=0.05, **_):
        write_text(path, f"stand-in STL for {shape[1]}\n")

    monkeypatch.setattr("diegen.die.occ.files.build_die", build_die)
    monkeypatch.setattr("diegen.die.occ.files.write_step", write_step)
    monkeypatch.setattr("diegen.die.occ.files.write_stl", write_stl)
    return failing


def test_kernel_failure_fails_only_that_piece(tmp_path: Path, kernel_fails_for) -> None:
    kernel_fails_for.add("R1-center")
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml())
    result = api.build(api.load(path), tmp_path / "out", jobs=1)
    status = {o.part_id: o for o in result.outcomes}
    assert {p: o.status for p, o in status.items()} == {"R1-nose": "built", "R1-center": "failed",
                                                         "R1-tail": "built"}
    assert [o.part_id for o in result.failed] == ["R1-center"]
    assert "pretend kernel failure" in status["R1-center"].error
    assert "FAILED     R1-center: pretend kernel failure" in result.summary()
    folder = tmp_path / "out" / "R1"
    assert not list(folder.rglob("R1-center-die*"))
    for part in ("R1-nose", "R1-tail"):
        assert (folder / part / f"{part}-die.step").is_file() and (folder / part / f"{part}-die.stl").is_file()
    assert not list(folder.rglob(".*.part*"))
    manifest = json.loads((folder / "manifest.json").read_text())
    assert manifest["pieces"]["R1-center"]["status"] == "failed" and manifest["pieces"]["R1-center"]["files"] == []


def test_failure_after_the_step_file_leaves_no_die_files(tmp_path: Path, kernel_fails_for, monkeypatch) -> None:
    from diegen.fileio import write_text

    def write_stl(shape, path, tolerance_mm=0.05, **_):
        if shape[1] == "R1-nose":
            raise SolidError("pretend STL failure: the mesh is not watertight")
        write_text(path, f"stand-in STL for {shape[1]}\n")

    monkeypatch.setattr("diegen.die.occ.files.write_stl", write_stl)
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(pieces="[nose, center]"))
    result = api.build(api.load(path), tmp_path / "out", jobs=1)
    assert [(o.part_id, o.status) for o in result.outcomes] == [("R1-nose", "failed"), ("R1-center", "built")]
    assert "not watertight" in result.failed[0].error
    folder = tmp_path / "out" / "R1"
    assert not list(folder.rglob("R1-nose-*")), list(folder.rglob("R1-nose-*"))  # not even the STEP written first
    assert not list(folder.rglob(".*.part*"))


def test_cli_build_with_a_failed_piece_exits_1(tmp_path: Path, kernel_fails_for, capsys) -> None:
    kernel_fails_for.add("R1-nose")
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(pieces="[nose, center]"))
    code = cli.main(["build", str(path), "-o", str(tmp_path / "out"), "-j", "1", "-q"])
    out = capsys.readouterr()
    assert code == cli.EXIT_FAILED_PIECES
    assert "1 piece(s) built" in out.out and "1 failed" in out.out and "pretend kernel failure" in out.out
    assert "Traceback" not in out.err
    assert not list((tmp_path / "out").rglob("R1-nose-die*"))


# 10. paths
def test_airfoil_file_is_found_beside_the_spec(tmp_path: Path) -> None:
    spec_dir, elsewhere = tmp_path / "specs", tmp_path / "elsewhere"
    (spec_dir / "airfoils").mkdir(parents=True)
    elsewhere.mkdir()
    # a NACA 2412 coordinate file in the one-loop layout (the project's test data)
    source = ROOT / "tests" / "data" / "airfoils" / "naca2412_selig.dat"
    (spec_dir / "airfoils" / "section.dat").write_text(source.read_text())
    path = spec_dir / "rib.yaml"
    path.write_text(rib_yaml(airfoil="{file: airfoils/section.dat}", pieces="[nose]"))
    spec = api.load(path)
    assert Path(spec.airfoil.file) == (spec_dir / "airfoils" / "section.dat").resolve()
    run = _check_cli(Path("..") / "specs" / "rib.yaml", cwd=elsewhere)
    assert run.returncode == cli.EXIT_OK, run.stderr
    assert "R1-nose" in run.stdout
    # the same spec run from its own folder gives the same report
    assert _check_cli(Path("rib.yaml"), cwd=spec_dir).stdout == run.stdout
    missing = spec_dir / "missing.yaml"
    missing.write_text(rib_yaml(airfoil="{file: airfoils/nothing.dat}", pieces="[nose]"))
    run = _check_cli(missing, cwd=elsewhere)
    assert run.returncode == cli.EXIT_BAD_INPUT and "Traceback" not in run.stderr
    assert f"airfoil file not found: {(spec_dir / 'airfoils' / 'nothing.dat').resolve()}" in run.stderr


@pytest.mark.parametrize("ident", ["../../x", "a/b", "/abs", "..", ".hidden", "a\\b"])
def test_ids_that_could_leave_the_output_folder_are_refused(tmp_path: Path, ident: str) -> None:
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(id=json.dumps(ident)))
    with pytest.raises(SpecError) as caught:
        api.load(path)
    (problem,) = caught.value.problems
    assert problem.key == "id" and problem.line == 3 and "expected an id" in problem.message


def test_output_stays_under_the_output_folder(tmp_path: Path, kernel_fails_for, monkeypatch) -> None:
    work, out = tmp_path / "work", tmp_path / "out"
    work.mkdir()
    monkeypatch.chdir(work)
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(pieces="[nose, center]"))
    before = set(tmp_path.rglob("*"))
    result = api.build(api.load(path), out, jobs=1)
    assert not result.failed, result.summary()
    written = set(tmp_path.rglob("*")) - before
    assert written and all(p.resolve().is_relative_to(out.resolve()) for p in written), sorted(written)
    assert not list(work.iterdir())


@pytest.mark.slow
@pytest.mark.solid
def test_small_die_drops_the_marks_it_has_no_room_for(tmp_path: Path) -> None:
    """A short tail piece has no room for both lines of marks: the die is still made, with the part id and the
    arrow, and the shop sheet says what to write by hand (the marks are a convenience, the die is not)."""
    path = tmp_path / "rib.yaml"
    path.write_text(rib_yaml(chord=610, pieces="[tail]", cap=1.6, height=12.7, radius=2.38,
                             die="{material: solid-surface, stock_thickness: 12.7, cutter_diameter: 6}"))
    result = api.build(api.load(path), tmp_path / "out", jobs=1)
    assert not result.failed
    sheet = (tmp_path / "out" / "R1" / "R1-tail" / "R1-tail-sheet.md").read_text(encoding="utf-8")
    assert "only R1-tail and the arrow are engraved; write 2024-T3 0.60 mm on it by hand" in sheet
