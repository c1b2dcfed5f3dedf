"""Mutation fuzzing of the airfoil coordinate-file reader and the section loop helpers.

The property (the project's error-handling rule, no outside source): any text
given as a coordinate file ends either in a normalised section loop or in an
:class:`~diegen.errors.AirfoilError` whose message starts with ``file:line:``
(a line of the file).  A loop returned meets the convention of
:mod:`diegen.geometry.section`, checked here with numpy and shapely rather than
with diegen's own helpers: finite (N, 2) points, N >= 10, no repeated
neighbours, leading edge at (0, 0), trailing edge (the single TE point, or the
midpoint of the two TE ends) at (1, 0) so every point lies within one chord of
it, positive (counter-clockwise) shoelace area and a simple outline.  Similarity
transforms (tilt, scale, shift, reversal, percent of chord, other separators) of
a good file must give the same loop back.

Inputs: the NACA 2412 fixtures in tests/data/airfoils/ (both layouts) and NACA
sections generated from the Report 824 equations by :mod:`diegen.geometry.naca`,
mutated by truncation, shuffled and duplicated lines, tilt, scale, reversal,
mixed separators, junk lines, NaN and huge values, empty and single-line files
and percent-of-chord data.  The ``slow`` test runs thousands of cases and prints
the counts by outcome; the unmarked ones are small versions.
"""

from __future__ import annotations

import contextlib
import math
import random
import re
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from testing import report, timed_with_peak

from diegen.errors import AirfoilError
from diegen.geometry.coordfile import MAX_FILE_BYTES, MAX_POINTS, parse_coordinates, read_coordinates
from diegen.geometry.naca import naca_section
from diegen.geometry.section import normalise, resample

DATA = Path(__file__).parent / "data" / "airfoils"
SELIG_TEXT = (DATA / "naca2412_selig.dat").read_text(encoding="utf-8")
LEDNICER_TEXT = (DATA / "naca2412_lednicer.dat").read_text(encoding="utf-8")
NAME = "fuzz.dat"
LOOP_TOL = 1e-9  # the LE/TE placement of a normalised loop is exact up to rounding
SAME_LOOP_TOL = 1e-6  # two files of the same section printed to 8 decimals give loops this close (fraction of chord)
REFUSE_SECONDS = 2.0  # safety bound, not a benchmark (project limit)
REFUSE_PEAK_BYTES = 200 * 2**20

_LOCATED = re.compile(rf"^{re.escape(NAME)}:(\d+):")


def check_loop(loop: np.ndarray) -> None:
    """The loop convention, measured independently (numpy shoelace, shapely validity)."""
    assert loop.ndim == 2 and loop.shape[1] == 2 and len(loop) >= 10, loop.shape
    assert np.all(np.isfinite(loop))
    steps = np.linalg.norm(np.diff(np.vstack((loop, loop[:1])), axis=0), axis=1)
    assert steps.min() > 0.0, "repeated neighbouring points"
    le = np.argmin(np.hypot(loop[:, 0], loop[:, 1]))
    assert np.hypot(*loop[le]) <= LOOP_TOL, loop[le]
    te_closed, te_open = loop[0], 0.5 * (loop[0] + loop[-1])
    te = te_closed if np.hypot(te_closed[0] - 1, te_closed[1]) <= LOOP_TOL else te_open
    assert np.hypot(te[0] - 1.0, te[1]) <= LOOP_TOL, (loop[0], loop[-1])
    assert np.hypot(loop[:, 0] - te[0], loop[:, 1] - te[1]).max() <= 1.0 + LOOP_TOL  # the LE is the farthest point
    x, y = loop[:, 0], loop[:, 1]
    assert 0.5 * (np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))) > 0.0, "not counter-clockwise"
    assert shapely.Polygon(loop).is_valid, "not a simple outline"


def check_resampled(loop: np.ndarray, n_points: int) -> None:
    """A re-sampled loop: n_points (one fewer for a closed TE), the LE knot kept, counter-clockwise and simple.

    The spline may bulge a hair past the LE knot, so "every point within one chord of the TE" is not required.
    """
    assert loop.shape in ((n_points, 2), (n_points - 1, 2)), loop.shape
    assert np.all(np.isfinite(loop))
    assert np.hypot(loop[:, 0], loop[:, 1]).min() <= LOOP_TOL
    x, y = loop[:, 0], loop[:, 1]
    assert 0.5 * (np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))) > 0.0, "not counter-clockwise"


def check_error(error: AirfoilError, text: str) -> None:
    """The message starts with ``file:line:``, the line within the file (or line 1 of an empty one)."""
    message = str(error)
    match = _LOCATED.match(message)
    assert match, message
    assert 1 <= int(match[1]) <= text.count("\n") + text.count("\r") + 2, message
    assert len(message) < 1_000, message[:200]


def outcome(text: str) -> tuple[str, np.ndarray | AirfoilError]:
    """('loop', loop) or ('AirfoilError', error); any other exception propagates."""
    try:
        loop = parse_coordinates(text, NAME)
    except AirfoilError as error:
        check_error(error, text)
        return "AirfoilError", error
    check_loop(loop)
    with contextlib.suppress(AirfoilError):  # re-sampling a loop the reader accepted: a loop or an AirfoilError
        check_resampled(resample(loop, 121), 121)
    return "loop", loop


def error_kind(error: AirfoilError) -> str:
    text = _LOCATED.sub("", str(error)).strip()
    for label in ("crosses or touches itself", "doubles back in x", "no coordinate rows", "only",
                  "expected two numbers", "must be finite", "point counts", "not counter-clockwise", "no chord",
                  "chord short of the trailing", "chord apart", "coordinate rows; refusing", "larger than", "limit"):
        if label in text:
            return label
    return text[:40]


# ----------------------------------------------------------------------------- sources and mutations


def rows_text(loop: np.ndarray, sep: str = " ", fmt: str = "{:.8f}", header: str = "section\n") -> str:
    return header + "".join(f"{fmt.format(x)}{sep}{fmt.format(y)}\n" for x, y in loop)


def lednicer_text(loop: np.ndarray) -> str:
    """The two-surface layout: name, counts, upper LE -> TE, blank line, lower LE -> TE."""
    i_le = int(np.argmin(np.hypot(loop[:, 0], loop[:, 1])))
    upper, lower = loop[: i_le + 1][::-1], loop[i_le:]
    body = "".join(f" {x:.8f} {y:.8f}\n" for x, y in upper) + "\n" + "".join(f" {x:.8f} {y:.8f}\n" for x, y in lower)
    return f"generated\n{len(upper)}. {len(lower)}.\n\n" + body


GENERATED = {
    f"naca {d} {'closed' if c else 'open'} {n}": naca_section(d, n, c)
    for d, n, c in [("2412", 61, False), ("0012", 121, True), ("23015", 81, False), ("4415", 41, True),
                    ("0006", 201, False), ("6409", 61, True)]
}
SOURCES: dict[str, str] = {"selig fixture": SELIG_TEXT, "lednicer fixture": LEDNICER_TEXT}
SOURCES.update({f"{k} selig": rows_text(v) for k, v in GENERATED.items()})
SOURCES.update({f"{k} lednicer": lednicer_text(v) for k, v in GENERATED.items() if "open" in k})


def _data_lines(text: str) -> tuple[list[str], list[int]]:
    lines = text.splitlines()
    idx = [i for i, line in enumerate(lines) if len(line.split()) == 2 and _floats(line)]
    return lines, idx


def _floats(line: str) -> bool:
    try:
        [float(t) for t in line.split()]
    except ValueError:
        return False
    return True


def _points(text: str) -> tuple[list[str], list[int], np.ndarray]:
    lines, idx = _data_lines(text)
    pts = np.array([[float(t) for t in lines[i].split()] for i in idx]) if idx else np.zeros((0, 2))
    return lines, idx, pts


def _with_points(lines: list[str], idx: list[int], pts: np.ndarray, fmt: str = "{:.10g}", sep: str = " ") -> str:
    out = list(lines)
    for i, (x, y) in zip(idx, pts):
        out[i] = f"{fmt.format(x)}{sep}{fmt.format(y)}"
    return "\n".join(out) + "\n"


def _is_lednicer(pts: np.ndarray) -> bool:
    return len(pts) > 0 and pts[0, 0] >= 2 and pts[0, 1] >= 2


def transform(text: str, rng: random.Random) -> tuple[str, str]:
    """A similarity transform of a good file: the normalised loop must not change."""
    lines, idx, pts = _points(text)
    if len(idx) < 2:
        return text, "none"
    lednicer = _is_lednicer(pts)
    counts_i, counts = (idx[0], pts[0]) if lednicer else (None, None)
    body_idx, body = (idx[1:], pts[1:]) if lednicer else (idx, pts)
    op = rng.choice(["tilt", "scale", "shift", "percent", "separators", "reverse", "fortran", "crlf", "comments",
                     "repeat_first"])
    if op == "tilt":
        a = math.radians(rng.uniform(-40, 40))
        body = body @ np.array([[math.cos(a), math.sin(a)], [-math.sin(a), math.cos(a)]])
    elif op == "scale":
        body = body * rng.choice([0.3, 1.2, 1.49])  # stays below the percent threshold of 1.5
    elif op == "shift":
        body = body + np.array([rng.uniform(-0.2, 0.2), rng.uniform(-0.2, 0.2)])
    elif op == "percent":
        body = body * 100.0
    elif op == "separators":
        seps = [",", ", ", ";", "\t", " \t ", " , "]
        out = list(lines)
        for i in body_idx:
            x, y = lines[i].split()
            out[i] = f"{x}{rng.choice(seps)}{y}"
        return "\n".join(out) + "\n", op
    elif op == "reverse":
        if lednicer:
            return text, op  # the two-surface layout has a fixed order
        out = list(lines)
        for i, j in zip(body_idx, body_idx[::-1]):
            out[i] = lines[j]
        return "\n".join(out) + "\n", op
    elif op == "fortran":
        return _with_points(lines, body_idx, body, fmt="{:.9E}").replace("E", "D"), op
    elif op == "crlf":
        return text.replace("\n", "\r\n"), op
    elif op == "comments":
        out = list(lines)
        for i in body_idx[::7]:
            out[i] = out[i] + "   # note"
        return "\n".join([*out[:1], "# comment", "", *out[1:]]) + "\n", op
    elif op == "repeat_first":
        if lednicer:
            return text, op
        out = list(lines)
        out.append(lines[body_idx[0]])  # a closed loop that lists the first point again at the end
        return "\n".join(out) + "\n", op
    if lednicer:
        lines[counts_i] = f"{counts[0]:.0f}. {counts[1]:.0f}."
    return _with_points(lines, body_idx, body), op


JUNK_LINES = ["NaN 0.1", "0.5 nan", "inf 0", "0 -inf", "1e308 1e308", "-1e308 0", "1e400 0", "x y", "0.1",
              "0.1 0.2 0.3", "0.1,0.2,0.3", "garbage", "\x00\x01\x02", "\ufeff0.1 0.2", "0.1 0.2 # ok", "   ", "END",
              "0x10 0x20",
              "1_000 2", "1e-320 1e-320", "½ ¼", "0.5  0.5", "--0.1 0.2", ".5 .5", "5. 5.", "+0.5 -0.5", "0.5;;0.5",
              "12 12", "61. 61.", "1e5 1e5", "0.99 0.0", "0 0", "1 0"]


def mutate(text: str, rng: random.Random) -> tuple[str, str]:
    """A random (mostly harmful) mutation."""
    lines, idx, pts = _points(text)
    op = rng.choice(["truncate_lines", "truncate_chars", "shuffle_all", "shuffle_some", "swap_two", "dup_point",
                     "dup_run", "drop_points", "junk_between", "junk_header", "junk_end", "nan", "huge", "empty",
                     "single_line", "few_points", "scale_huge", "flatten", "collinear", "same_point", "swap_xy",
                     "bad_counts", "transform", "mix_separators", "jitter", "spike", "long_line", "binary"])
    if op == "truncate_lines":
        return "\n".join(lines[: rng.randrange(len(lines) + 1)]) + "\n", op
    if op == "truncate_chars":
        return text[: rng.randrange(len(text) + 1)], op
    if op == "shuffle_all" and idx:
        order = list(idx)
        rng.shuffle(order)
        out = list(lines)
        for i, j in zip(idx, order):
            out[i] = lines[j]
        return "\n".join(out) + "\n", op
    if op == "shuffle_some" and len(idx) > 4:
        out = list(lines)
        start = rng.randrange(len(idx) - 3)
        window = idx[start : start + rng.randint(3, 8)]
        moved = list(window)
        rng.shuffle(moved)
        for i, j in zip(window, moved):
            out[i] = lines[j]
        return "\n".join(out) + "\n", op
    if op == "swap_two" and len(idx) > 1:
        i, j = rng.sample(idx, 2)
        lines[i], lines[j] = lines[j], lines[i]
    elif op == "dup_point" and idx:
        i = rng.choice(idx)
        lines.insert(i, lines[i])
    elif op == "dup_run" and idx:
        i = rng.randrange(len(idx))
        run = [lines[k] for k in idx[i : i + rng.randint(2, 10)]]
        at = rng.choice(idx)
        lines[at:at] = run
    elif op == "drop_points" and idx:
        for i in sorted(rng.sample(idx, rng.randint(1, max(1, len(idx) // 2))), reverse=True):
            del lines[i]
    elif op == "junk_between" and idx:
        lines.insert(rng.choice(idx[1:] or idx), rng.choice(JUNK_LINES))
    elif op == "junk_header":
        lines[0:0] = [rng.choice(JUNK_LINES) for _ in range(rng.randint(1, 3))]
    elif op == "junk_end":
        lines.extend(rng.choice(JUNK_LINES) for _ in range(rng.randint(1, 3)))
    elif op == "nan" and idx:
        i = rng.choice(idx)
        lines[i] = rng.choice(["nan 0.01", "0.5 NaN", "inf 0", "0.5 -inf", "nan nan"])
    elif op == "huge" and idx:
        i = rng.choice(idx)
        lines[i] = rng.choice(["1e300 0", "0.5 1e300", "1e308 -1e308", "1e200 1e200", "9e15 0"])
    elif op == "empty":
        return rng.choice(["", "\n", "   \n\n", "# only a comment\n", "name only\n", "\ufeff"]), op
    elif op == "single_line":
        return rng.choice(["0 0\n", "1 0", "naca 2412\n", "61. 61.\n", "0.5 0.1\n"]), op
    elif op == "few_points" and idx:
        keep = sorted(rng.sample(idx, min(len(idx), rng.choice([1, 2, 3, 9, 10, 11]))))
        return "\n".join(lines[k] for k in keep) + "\n", op
    elif op == "scale_huge" and len(pts):
        with np.errstate(over="ignore"):
            return _with_points(lines, idx, pts * rng.choice([1e6, 1e150, 1e300, 1e-300, -1, 0])), op
    elif op == "flatten" and len(pts):
        flat = pts.copy()
        flat[:, 1] = 0.0
        return _with_points(lines, idx, flat), op
    elif op == "collinear" and len(pts):
        line_pts = np.column_stack((np.linspace(0, 1, len(pts)), np.linspace(0, 0.1, len(pts))))
        return _with_points(lines, idx, line_pts), op
    elif op == "same_point" and len(pts):
        return _with_points(lines, idx, np.tile([[0.3, 0.05]], (len(pts), 1))), op
    elif op == "swap_xy" and len(pts):
        return _with_points(lines, idx, pts[:, ::-1]), op
    elif op == "bad_counts" and idx:
        lines.insert(1, rng.choice(["61. 60.", "10 10", "2 2", "100000 100000", "3.5 4", "0 0", "-61 61"]))
    elif op == "transform":
        return transform(text, rng)
    elif op == "mix_separators" and idx:
        for i in rng.sample(idx, min(len(idx), 5)):
            lines[i] = lines[i].strip().replace(" ", rng.choice([",", ";", "\t", ",,", " ; ", ":"]), 1)
    elif op == "jitter" and len(pts):
        noisy = pts + np.array([[rng.gauss(0, 1e-3), rng.gauss(0, 1e-3)] for _ in range(len(pts))])
        return _with_points(lines, idx, noisy), op
    elif op == "spike" and len(pts):
        bad = pts.copy()
        bad[rng.randrange(len(bad))] += (rng.uniform(-2, 2), rng.uniform(-2, 2))
        return _with_points(lines, idx, bad), op
    elif op == "long_line":
        lines.insert(rng.randrange(len(lines) + 1), "0.1 " * rng.choice([3, 1000, 50_000]))
    elif op == "binary":
        i = rng.randrange(len(text) + 1)
        return text[:i] + "".join(chr(rng.randrange(0, 0x3000)) for _ in range(rng.randint(1, 20))) + text[i:], op
    return "\n".join(lines) + "\n", op


def run_mutations(count: int, seed: int) -> Counter:
    rng = random.Random(seed)
    counts: Counter = Counter()
    names = list(SOURCES)
    for _ in range(count):
        text = SOURCES[rng.choice(names)]
        ops = []
        for _ in range(rng.choice([1, 1, 2, 3])):
            text, op = mutate(text, rng)
            ops.append(op)
        try:
            kind, result = outcome(text)
        except Exception as error:  # the property under test
            shown = text if len(text) < 4_000 else text[:4_000] + "\n[...]"
            raise AssertionError(f"after {'+'.join(ops)}: {type(error).__name__}: {error}\n"
                                 f"--- file ---\n{shown}") from error
        counts[kind] += 1
        if kind == "AirfoilError":
            counts[f"  AirfoilError: {error_kind(result)}"] += 1
    return counts


def print_counts(title: str, counts: Counter) -> None:
    report(title)
    for key, n in sorted(counts.items(), key=lambda kv: (kv[0].startswith(" "), -kv[1])):
        report(f"  {key:<50} {n:6d}")


def run_transforms(count: int, seed: int) -> Counter:
    """Similarity transforms of good files give the loop of the untransformed file."""
    rng = random.Random(seed)
    counts: Counter = Counter()
    names = list(SOURCES)
    for _ in range(count):
        name = rng.choice(names)
        reference = parse_coordinates(SOURCES[name], NAME)
        text, op = transform(SOURCES[name], rng)
        kind, loop = outcome(text)
        assert kind == "loop", f"{name} after {op}: {loop}"
        assert loop.shape == reference.shape, (name, op, loop.shape, reference.shape)
        assert np.abs(loop - reference).max() < SAME_LOOP_TOL, (name, op, np.abs(loop - reference).max())
        counts[op] += 1
    return counts


def test_closed_te_listed_last_is_the_same_loop():
    """A closed TE listed once, at the end (the lower-surface-first order): the loop of the TE-first file."""
    loop = naca_section("4415", 41, closed_te=True)  # TE point first
    te_first = parse_coordinates(rows_text(loop), NAME)
    te_last = parse_coordinates(rows_text(loop[::-1]), NAME)  # lower TE side ... LE ... upper ... TE point
    assert np.abs(te_last - te_first).max() < SAME_LOOP_TOL


@pytest.mark.parametrize("keep", [64, 70, 80, 100, 110])
def test_truncated_selig_file_is_refused(keep):
    """Rows cut off part-way along the second surface: refused, not closed with a straight line."""
    text = "\n".join(SELIG_TEXT.splitlines()[:keep]) + "\n"
    kind, error = outcome(text)
    assert kind == "AirfoilError"
    assert "truncated" in str(error)


def test_huge_coordinates_are_refused():
    text = SELIG_TEXT.replace(" 0.00000000  0.00000000", " 1e300  0.00000000", 1)
    kind, error = outcome(text)
    assert kind == "AirfoilError" and "larger than" in str(error)


# ----------------------------------------------------------------------------- quick tier


def test_sources_are_good_loops():
    for name, text in SOURCES.items():
        kind, loop = outcome(text)
        assert kind == "loop", (name, loop)


def test_mutated_files_quick():
    counts = run_mutations(250, seed=1)
    print_counts("mutated coordinate files (quick)", counts)
    assert counts["loop"] + counts["AirfoilError"] == 250


def test_transforms_keep_the_loop_quick():
    counts = run_transforms(60, seed=2)
    print_counts("similarity transforms (quick)", counts)


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.text(alphabet=st.sampled_from("0123456789.-+eE ,;\t\n#xD"), max_size=400))
def test_arbitrary_number_soup(text):
    outcome(text)


POINT = st.tuples(st.floats(-2, 2, allow_nan=False), st.floats(-2, 2, allow_nan=False))


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(POINT, min_size=0, max_size=40))
def test_arbitrary_point_lists(points):
    """Random polygons: a loop or a located AirfoilError; normalise() on the points: a loop or AirfoilError."""
    outcome("random\n" + "".join(f"{x!r} {y!r}\n" for x, y in points))
    with contextlib.suppress(AirfoilError):
        normalise(points)


def hostile_files(scale: float) -> dict[str, str]:
    """Huge, long-lined, junk-filled and non-finite files (``scale`` 1: at the size limits)."""
    return {
        "over the limit": "0 0\n" * (MAX_FILE_BYTES // 4 + 10),
        "too many rows": "0.5 0.5\n" * int((MAX_POINTS + 10) * scale),
        "one long line": "0.1 " * int(MAX_FILE_BYTES // 5 * scale),
        "junk then rows": "x" * int(MAX_FILE_BYTES // 2 * scale) + "\n" + SELIG_TEXT,
        "nan rows": "nan nan\n" * int(10_000 * scale),
        "huge values": "1e300 1e300\n" * int(10_000 * scale),
        "many header lines": "title\n" * int(200_000 * scale) + SELIG_TEXT,
    }


def check_hostile(cases: dict[str, str]) -> None:
    for name, text in cases.items():
        (kind, _), seconds, peak = timed_with_peak(outcome, text)
        report(f"{name}: {len(text)} characters, {seconds:.3f} s, peak {peak / 2**20:.1f} MB, {kind}")
        assert seconds < REFUSE_SECONDS, name
        assert peak < REFUSE_PEAK_BYTES, name


def test_hostile_files_refused_quickly_small(tmp_path):
    """A tenth of the limits, plus a binary file on disk."""
    check_hostile(hostile_files(0.1))
    binary = tmp_path / "binary.dat"
    binary.write_bytes(bytes(random.Random(4).randrange(256) for _ in range(100_000)))
    with pytest.raises(AirfoilError, match=re.escape(str(binary)) + r":\d+:"):
        read_coordinates(binary)


@pytest.mark.slow
def test_hostile_files_refused_quickly():
    """At the size limits: refused (or read) quickly with bounded memory."""
    check_hostile(hostile_files(1.0))


# ----------------------------------------------------------------------------- slow tier


@pytest.mark.slow
def test_mutated_files_many():
    counts: Counter = Counter()
    for seed in range(100, 105):
        counts.update(run_mutations(500, seed=seed))
    print_counts("mutated coordinate files: 2500 cases", counts)
    assert counts["loop"] + counts["AirfoilError"] == 2_500


@pytest.mark.slow
def test_transforms_keep_the_loop_many():
    counts = run_transforms(500, seed=3)
    print_counts("similarity transforms: 500 cases", counts)
