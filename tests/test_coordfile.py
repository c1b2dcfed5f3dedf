"""Coordinate files and section loops: parsing, normalising, validating, re-sampling, blending.

Fixtures: tests/data/airfoils/naca2412_*.dat, the same NACA 2412 (open TE, 61
cosine-spaced stations per surface) written in both common layouts from the
NACA Report 824 equations.  Independent expectations: the Report 824 equations
(through a dense outline from :mod:`diegen.geometry.naca`, itself checked
against the published tables in test_naca.py), the PDAS recomputation of the
Theory of Wing Sections tables, and closed-form geometry written here.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from diegen.errors import AirfoilError
from diegen.geometry.coordfile import MAX_FILE_BYTES, parse_coordinates, read_coordinates
from diegen.geometry.loops import signed_area
from diegen.geometry.naca import naca4_thickness, naca_section
from diegen.geometry.section import (
    blend,
    leading_edge_index,
    normalise,
    resample,
    split_surfaces,
    surface_fractions,
    thickness_at,
    validate,
)

DATA = Path(__file__).parent / "data" / "airfoils"
SELIG = DATA / "naca2412_selig.dat"
LEDNICER = DATA / "naca2412_lednicer.dat"
PRINT_TOL = 1e-6  # the fixtures print 8 decimals; "identical" within this (project limit)


def _rows(loop: np.ndarray, scale: float = 1.0, sep: str = " ") -> str:
    return "".join(f"{x * scale:.8f}{sep}{y * scale:.8f}\n" for x, y in loop)


def _selig_text(loop: np.ndarray, **kw: object) -> str:
    return "test section\n" + _rows(loop, **kw)  # type: ignore[arg-type]


def _rotate(points: np.ndarray, degrees: float) -> np.ndarray:
    a = np.radians(degrees)
    return points @ np.array([[np.cos(a), np.sin(a)], [-np.sin(a), np.cos(a)]])


def _assert_loop_convention(loop: np.ndarray, normalised: bool = True) -> None:
    assert loop.ndim == 2 and loop.shape[1] == 2 and len(loop) >= 10
    assert signed_area(loop) > 0.0
    assert shapely.LinearRing(loop).is_simple
    assert len(np.unique(loop, axis=0)) == len(loop)
    assert tuple(loop[leading_edge_index(loop)]) == (0.0, 0.0)
    if normalised:  # LE is the minimum-x point after de-rotation
        assert loop[:, 0].min() >= -1e-12
    else:  # NACA frame: the nominal LE; a cambered nose reaches a little ahead of it
        assert loop[:, 0].min() >= -2e-4


# --- both layouts ----------------------------------------------------------------------------


def test_both_layouts_give_the_same_points() -> None:
    # Same NACA 2412 in both layouts -> identical point sets (within 1e-6).
    a, b = read_coordinates(SELIG), read_coordinates(LEDNICER)
    assert a.shape == b.shape == (121, 2)
    assert np.abs(a - b).max() <= PRINT_TOL
    _assert_loop_convention(a)


def test_fixture_reproduces_the_naca_equations() -> None:
    # The parsed fixture is the Report 824 NACA 2412 at the same stations: its
    # farthest point from the TE midpoint is the nominal LE, so no re-framing occurs.
    expected = naca_section("2412", n_points=121)
    assert np.abs(read_coordinates(SELIG) - expected).max() <= PRINT_TOL


def test_pdas_point_survives_parsing() -> None:
    # PDAS NACA 2412 table: upper (40.0000, 7.8030) % c, lower (40.0000, -3.8030) % c;
    # 0.4 is not one of the fixture stations, so interpolate each surface (cosine
    # stations give ~0.03 chord spacing there; the error is well under 1e-4 c).
    upper, lower = split_surfaces(read_coordinates(LEDNICER))
    assert np.interp(0.4, upper[:, 0], upper[:, 1]) == pytest.approx(0.078030, abs=1e-4)
    assert np.interp(0.4, lower[:, 0], lower[:, 1]) == pytest.approx(-0.038030, abs=1e-4)


def test_count_line_with_integers_and_percent_chord() -> None:
    # Report 824 / Theory of Wing Sections tables give percent chord, surfaces apart.
    upper, lower = split_surfaces(read_coordinates(SELIG))
    text = "NACA 2412 in percent\n61 61\n\n" + _rows(upper, scale=100.0) + "\n" + _rows(lower, scale=100.0)
    loop = parse_coordinates(text, "pct.dat")
    assert np.abs(loop - read_coordinates(SELIG)).max() <= PRINT_TOL
    selig_pct = parse_coordinates(_selig_text(read_coordinates(SELIG), scale=100.0), "pct2.dat")
    assert np.abs(selig_pct - read_coordinates(SELIG)).max() <= PRINT_TOL


@pytest.mark.parametrize("sep", [" ", "\t", ",", ";", " ,  ", "\t;"])
def test_separators_comments_blank_lines(sep: str) -> None:
    base = read_coordinates(SELIG)
    lines = _rows(base, sep=sep).splitlines()
    lines.insert(5, "")
    lines.insert(20, "# a comment line")
    lines[30] += "   # trailing comment"
    text = "NACA 2412 test\r\n" + "\r\n".join(lines) + "\r\n\r\nnotes after the data are ignored\n"
    assert np.abs(parse_coordinates(text, "sep.dat") - base).max() <= PRINT_TOL


# --- normalise: tilted, scaled, reversed, duplicated ------------------------------------------


@pytest.mark.parametrize("closed_te", [False, True])
def test_normalise_undoes_tilt_scale_shift_and_reversal(closed_te: bool) -> None:
    base = normalise(naca_section("2412", 161, closed_te=closed_te))
    variants = {
        "tilted 7 deg, 1016 mm chord, shifted": _rotate(base, 7.0) * 1016.0 + (250.0, -40.0),
        "tilted -12 deg": _rotate(base, -12.0),
        "lower surface first": base[::-1] if not closed_te else np.vstack((base[:1], base[:0:-1])),
        "duplicated points": np.insert(base, [0, 40, 80, 80, 81], base[[0, 40, 80, 80, 81]], axis=0),
        "closing point repeated": np.vstack((base, base[:1])),
    }
    for label, pts in variants.items():
        out = normalise(pts)
        assert out.shape == base.shape, label
        assert np.abs(out - base).max() <= 1e-9, label


def test_normalise_is_idempotent_and_reframes_naca_slightly() -> None:
    raw = naca_section("2412", 4001)
    once = normalise(raw)
    assert np.abs(normalise(once) - once).max() <= 1e-12
    _assert_loop_convention(once)
    # The nominal NACA LE (mean-line origin) is not the farthest point from the TE
    # for a cambered section: re-framing moves the outline by a little (measured
    # here; the 2412 rotation is under 0.1 deg).
    assert np.abs(once - raw).max() < 2e-3


# --- rejections: AirfoilError with file and line --------------------------------------------------


def _fixture_lines() -> list[str]:
    return SELIG.read_text().splitlines()


def _expect(text: str, line: int | None, fragment: str) -> None:
    with pytest.raises(AirfoilError) as info:
        parse_coordinates(text, "bad.dat")
    message = str(info.value)
    m = re.match(r"^bad\.dat:(\d+): ", message)
    assert m, message
    if line is not None:
        assert int(m.group(1)) == line, message
    assert fragment in message, message


def test_reject_non_numeric_data() -> None:
    lines = _fixture_lines()
    lines[49] = "0.50000 abc"  # line 50
    _expect("\n".join(lines), 50, "expected two numbers")


def test_reject_three_columns_between_rows() -> None:
    lines = _fixture_lines()
    lines[59] = "0.5 0.02 0.3"  # line 60
    _expect("\n".join(lines), 60, "expected two numbers")


def test_reject_non_finite() -> None:
    lines = _fixture_lines()
    lines[69] = "0.5 nan"
    _expect("\n".join(lines), 70, "finite")


def test_reject_too_few_points() -> None:
    _expect("tiny\n1 0\n0.5 0.05\n0 0\n0.5 -0.05\n1 0\n", 6, "at least 10")


def test_reject_too_few_distinct_points() -> None:
    _expect("dups\n" + "1 0\n0.5 0.05\n0.5 0.05\n0.5 0.05\n0 0\n0 0\n0 0\n0.5 -0.05\n0.5 -0.05\n1 0\n", 11, "distinct")


def test_reject_empty() -> None:
    _expect("just a title\n\n", 1, "no coordinate rows")


def test_reject_self_intersection() -> None:
    lines = _fixture_lines()
    # Swap two upper-surface rows (lines 20 and 22): the outline crosses itself there.
    lines[19], lines[21] = lines[21], lines[19]
    with pytest.raises(AirfoilError, match="crosses") as info:
        parse_coordinates("\n".join(lines), "bad.dat")
    line = int(re.match(r"^bad\.dat:(\d+): ", str(info.value)).group(1))  # type: ignore[union-attr]
    assert 19 <= line <= 23


def test_reject_surface_doubling_back() -> None:
    lines = _fixture_lines()
    # Move one upper-surface point back by 0.08 c and up above the surface: no
    # crossing, but the surface runs backwards in x there (line 25).
    x, y = (float(v) for v in lines[24].split())
    lines[24] = f"{x - 0.08:.8f} {y + 0.02:.8f}"
    _expect("\n".join(lines), 25, "doubles back")


def test_reject_count_mismatch() -> None:
    text = LEDNICER.read_text().replace("61.  61.", "61.  60.")
    _expect(text, 5, "do not match")


def test_reject_huge_text_and_too_many_points(tmp_path: Path) -> None:
    _expect("x" * (MAX_FILE_BYTES + 1), 1, "MB limit")
    many = "big\n" + "".join(f"{np.cos(t):.6f} {np.sin(t):.6f}\n" for t in np.linspace(0, 6.28, 100_002))
    _expect(many, None, "more than 100000")
    big = tmp_path / "big.dat"
    with open(big, "wb") as handle:
        handle.truncate(MAX_FILE_BYTES + 10)  # sparse: refused before reading
    with pytest.raises(AirfoilError, match=rf"^{re.escape(str(big))}: file is {MAX_FILE_BYTES + 10} bytes, .*5 MB"):
        read_coordinates(big)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="0123456789 .-+eE\n\t,;#abnN", max_size=600))
def test_garbage_gives_only_airfoil_errors(text: str) -> None:
    # Whatever the text, the reader either returns a valid loop or refuses it
    # with an AirfoilError located as file:line (never another exception).
    try:
        loop = parse_coordinates(text, "fuzz.dat")
    except AirfoilError as exc:
        assert re.match(r"^fuzz\.dat:\d+: ", str(exc)), str(exc)
    else:
        validate(loop)


def test_reject_missing_file(tmp_path: Path) -> None:
    with pytest.raises(AirfoilError, match=r"missing\.dat: file not found, expected a plain-text airfoil"):
        read_coordinates(tmp_path / "missing.dat")


# --- validate ----------------------------------------------------------------------------------------


def test_validate() -> None:
    good = naca_section("0012", 41)
    validate(good, "good")
    with pytest.raises(AirfoilError, match="at least 10"):
        validate(good[:9], "short")
    with pytest.raises(AirfoilError, match="crosses or touches"):
        bow = good.copy()
        bow[[5, 7]] = bow[[7, 5]]
        validate(bow, "bow")
    with pytest.raises(AirfoilError, match="counter-clockwise"):
        validate(good[::-1], "cw")
    with pytest.raises(AirfoilError, match="shape"):
        validate(np.zeros((12, 3)), "3d")


# --- split, thickness ------------------------------------------------------------------------------


def test_split_surfaces_open_and_closed() -> None:
    for closed in (False, True):
        loop = naca_section("2412", 101, closed_te=closed)
        upper, lower = split_surfaces(loop)
        assert tuple(upper[0]) == tuple(lower[0]) == (0.0, 0.0)
        assert np.array_equal(upper[-1], loop[0])
        assert np.array_equal(lower[-1], loop[0] if closed else loop[-1])
        assert len(upper) + len(lower) == len(loop) + (2 if closed else 1)
        assert np.mean(upper[:, 1]) > np.mean(lower[:, 1])


def test_thickness_at_matches_naca_thickness_form() -> None:
    # Symmetric section: depth at x is 2 yt(x) (Report 824); PDAS 0012 at x = 0.3:
    # yt = 6.0017 % c, so the depth is 12.0034 % c.
    loop = naca_section("0012", 4001)
    x = np.array([[0.05, 0.3], [0.6, 0.9]])
    depth = thickness_at(loop, x)
    assert depth.shape == x.shape
    assert depth == pytest.approx(2 * naca4_thickness(x, 0.12), abs=2e-6)
    assert float(thickness_at(loop, 0.3)) == pytest.approx(0.120034, abs=1e-5)
    assert thickness_at(loop, [-0.5, 1.5]) == pytest.approx([0.0, 0.0])


# --- resample and blend --------------------------------------------------------------------------------


def _turning(points: np.ndarray) -> np.ndarray:
    d = np.roll(points, -1, axis=0) - points
    e = np.roll(d, -1, axis=0)
    return np.arctan2(d[:, 0] * e[:, 1] - d[:, 1] * e[:, 0], (d * e).sum(axis=1))


def _sign_changes(points: np.ndarray, eps: float = 1e-12) -> int:
    a = _turning(points)
    s = np.sign(a[np.abs(a) > eps])
    return int(np.sum(s != np.roll(s, 1)))


@pytest.mark.parametrize("source_points", [61, 161, 401])
def test_resample_keeps_le_te_and_lies_on_the_section(source_points: int) -> None:
    src = naca_section("2412", source_points)
    out = resample(src, 241)
    _assert_loop_convention(out, normalised=False)
    assert out.shape == (241, 2)
    assert leading_edge_index(out) == 120
    assert np.array_equal(out[0], src[0]) and np.array_equal(out[-1], src[-1])  # TE kept exactly
    # Distance to the true (Report 824) outline: dense reference outline.
    truth = shapely.LinearRing(naca_section("2412", 20001))
    worst = max(truth.distance(shapely.Point(p)) for p in out)
    assert worst <= {61: 1e-4, 161: 5e-6, 401: 1e-6}[source_points]


def test_resample_distribution_is_cosine_in_arc_length() -> None:
    out = resample(naca_section("2412", 401), 241)
    upper, lower = split_surfaces(out)
    for surface in (upper, lower):
        arc = np.concatenate(([0.0], np.cumsum(np.linalg.norm(np.diff(surface, axis=0), axis=1))))
        assert arc / arc[-1] == pytest.approx(surface_fractions(len(surface)), abs=2e-4)
        steps = np.diff(arc)
        assert steps[0] < 0.05 * steps[len(steps) // 2]  # dense at the nose


def test_resample_closed_te_shares_the_te_point() -> None:
    out = resample(naca_section("0012", 161, closed_te=True), 241)
    assert out.shape == (240, 2)
    assert tuple(out[0]) == (1.0, 0.0)
    assert leading_edge_index(out) == 120
    _assert_loop_convention(out)


@pytest.mark.parametrize(("designation", "source_points"), [("2412", 61), ("2412", 161), ("4415", 161), ("23112", 161)])
def test_resample_is_fair(designation: str, source_points: int) -> None:
    # Fairness: the turning angle of the re-sampled outline changes sign no more
    # often than that of the section itself (dense Report 824 outline).  The 2412
    # is convex all round; the 4415 has a concave aft lower surface; the reflexed
    # 23112 a reflexed aft upper surface.
    truth = _sign_changes(naca_section(designation, 4001))
    for n in (61, 241, 1001):
        assert _sign_changes(resample(naca_section(designation, source_points), n)) <= truth


def test_sections_correspond_point_by_point() -> None:
    a = resample(naca_section("2412", 161), 241)
    b = resample(read_coordinates(SELIG), 241)
    c = resample(naca_section("0012", 61), 241)
    assert leading_edge_index(a) == leading_edge_index(b) == leading_edge_index(c) == 120
    for loop in (a, c):
        for surface in split_surfaces(loop):
            arc = np.concatenate(([0.0], np.cumsum(np.linalg.norm(np.diff(surface, axis=0), axis=1))))
            assert arc / arc[-1] == pytest.approx(surface_fractions(121), abs=1e-3)


def test_blend_end_points_and_midway() -> None:
    root, tip = naca_section("0018", 161), naca_section("0012", 61)
    assert np.array_equal(blend(root, tip, 0.0), resample(root, 241))
    assert np.array_equal(blend(root, tip, 1.0), resample(tip, 241))
    mid = blend(root, tip, 0.5)
    _assert_loop_convention(mid)
    # Halfway between 18 % and 12 % thick sections of the same (Report 824) form is the
    # 15 % form, as the thickness is linear in t: depth 2 yt(0.3, 0.15) there.
    assert float(thickness_at(mid, 0.3)) == pytest.approx(2 * float(naca4_thickness(0.3, 0.15)), abs=2e-4)


def test_blend_open_with_closed_te() -> None:
    root, tip = naca_section("2412", 161), naca_section("2412", 161, closed_te=True)
    half = blend(root, tip, 0.5)
    assert half.shape == (241, 2)
    gap = np.linalg.norm(half[0] - half[-1])
    assert gap == pytest.approx(0.5 * np.linalg.norm(root[0] - root[-1]), rel=1e-9)
    end = blend(root, tip, 1.0)
    assert end.shape == (240, 2) and tuple(end[0]) == (1.0, 0.0)


def test_resample_rejects_bad_counts() -> None:
    with pytest.raises(AirfoilError, match="n_points"):
        resample(naca_section("0012"), 5)
    with pytest.raises(AirfoilError, match="fraction"):
        blend(naca_section("0012"), naca_section("0012"), float("nan"))


@pytest.mark.parametrize("surface", ["upper", "lower"])
def test_a_crossing_outline_names_the_line_of_the_point_moved(surface: str) -> None:
    """One mistyped point moved across the other surface: the error names its line, not the far surface's points
    it crosses (NACA 0012 ordinates from the Report 824 equations, written out here)."""
    xs = 0.5 * (1 - np.cos(np.linspace(0.0, np.pi, 41)))
    half = 5 * 0.12 * (0.2969 * np.sqrt(xs) - 0.1260 * xs - 0.3516 * xs**2 + 0.2843 * xs**3 - 0.1036 * xs**4)
    rows = [(x, y) for x, y in zip(xs[::-1], half[::-1])] + [(x, -y) for x, y in zip(xs[1:], half[1:])]
    moved = 15 if surface == "upper" else 60  # 0-based row: mid-chord on that surface
    x, y = rows[moved]
    rows[moved] = (x, -y - 0.03 if y > 0 else -y + 0.03)
    text = "a test section\n" + "".join(f"{x:.7f} {y:.7f}\n" for x, y in rows)
    with pytest.raises(AirfoilError, match=rf"^sec\.dat:{moved + 2}: the outline crosses or touches itself at this"):
        parse_coordinates(text, "sec.dat")
