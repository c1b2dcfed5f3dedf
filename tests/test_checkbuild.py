"""``check`` predicts ``build``: over a corpus of realistic specs (ribs, wings and drawn parts), piece by piece.

Every spec of ``tests/scenarios.py`` (invented ribs and wings: see its docstring for what they cover) is checked
(``api.analyse``: no kernel) and built (``api.build``: the solid kernel, two worker processes, the default STL
tolerance).  A piece check calls buildable must be built; a piece check refuses must not be attempted, fail with
the very message check gave, and that message must say what to do.  At least 97 % of all pieces must build (a
project limit: the corpus is realistic, so nearly every piece of it should).  The counts are printed at the end of
the run.

The metric horizontal tail of the check-against-build report (``scenarios.TAIL_PRINTED`` and ``TAIL_ROUTED``,
rebuilt from its description) is part of the corpus, with printed dies on a 250 × 210 mm bed and with routed
fibreboard dies; every one of its pieces builds or check refuses it with a remedy.
"""

from __future__ import annotations

import multiprocessing
import re
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import pytest
from scenarios import TAIL_PRINTED, TAIL_ROUTED, scenarios, write
from testing import report

from diegen import api
from diegen.errors import DiegenError

BUILT_SHARE = 0.97  # project limit
JOBS = 2
# a refusal's remedy: what to change, in the imperative, after the reason
REMEDY = re.compile(r"[:;,] (?:or )?(?:use|lower|give|move|make|round|leave|space|widen|drill|shorten|set|end|add|"
                    r"check|cut|raise|split|write|bend|print)\b")


def _warm_up() -> None:
    from diegen.die.occ.form_block import warm_up

    warm_up()


def _build(spec_path: str, out: str) -> tuple[str, list[tuple[str, str, str]], str, float]:
    """Worker: build one spec with one process; (spec path, [(part, status, error)], spec-level refusal, seconds)."""
    start = time.perf_counter()
    try:
        result = api.build(api.load(spec_path), out, jobs=1)
    except DiegenError as error:
        return spec_path, [], str(error), time.perf_counter() - start
    return spec_path, [(o.part_id, o.status, o.error) for o in result.outcomes], "", time.perf_counter() - start


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> dict[str, dict]:
    """Per spec: what check predicted (part → refusal or None) and what build did (part → (status, error))."""
    folder = tmp_path_factory.mktemp("corpus")
    found: dict[str, dict] = {}
    for scenario in scenarios():
        path = write(scenario, folder / scenario.name)
        try:
            analysis = api.analyse(api.load(path))
        except DiegenError as error:
            found[str(path)] = {"name": scenario.name, "check": {}, "check_error": str(error)}
            continue
        from diegen.pipeline.jobs import rib_analyses

        found[str(path)] = {"name": scenario.name, "check_error": "",
                            "check": {p.piece.part_id: p.die.refusal for r in rib_analyses(analysis) for p in r.pieces}}
    order = sorted(found, key=lambda p: -len(found[p]["check"]))  # the longest first: the pool ends together
    start = time.perf_counter()
    # fresh processes, not forks: a fork taken after this process ran the kernel can hang inside it
    spawn = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=JOBS, initializer=_warm_up, mp_context=spawn) as pool:
        futures = [pool.submit(_build, path, str(folder / "out")) for path in order]
        for future in futures:
            path, outcomes, refusal, seconds = future.result()
            found[path].update(build={part: (status, error) for part, status, error in outcomes},
                               build_error=refusal, seconds=seconds)
    found["_elapsed"] = {"seconds": time.perf_counter() - start}
    return found


@pytest.mark.slow
@pytest.mark.solid
def test_check_predicts_build_piece_by_piece(corpus: dict[str, dict]) -> None:
    specs = {k: v for k, v in corpus.items() if not k.startswith("_")}
    assert len(specs) >= 30
    pieces = built = refused = 0
    disagreements: list[str] = []
    for entry in specs.values():
        name = entry["name"]
        if entry["check_error"] or entry["build_error"]:
            if entry["check_error"] != entry["build_error"]:
                disagreements.append(f"{name}: check said {entry['check_error']!r}, build {entry['build_error']!r}")
            continue
        if set(entry["check"]) != set(entry["build"]):
            disagreements.append(f"{name}: check has pieces {sorted(entry['check'])}, build {sorted(entry['build'])}")
        for part, refusal in entry["check"].items():
            pieces += 1
            status, error = entry["build"].get(part, ("missing", ""))
            if refusal is None:
                if status == "built":
                    built += 1
                else:
                    disagreements.append(f"{part}: check passed it, build {status}: {error}")
            else:
                refused += 1
                if status != "failed" or error != refusal:
                    disagreements.append(f"{part}: check refused it ({refusal}), build {status}: {error}")
                if not REMEDY.search(refusal):
                    disagreements.append(f"{part}: the refusal says no remedy: {refusal}")
    report(f"\ncheck against build: {len(specs)} specs, {pieces} pieces, {built} built, {refused} refused by check "
           f"(each with a remedy), {len(disagreements)} disagreements; {corpus['_elapsed']['seconds']:.0f} s with "
           f"{JOBS} workers")
    for line in disagreements:
        report("  disagreement:", line)
    for entry in specs.values():
        for part, refusal in entry["check"].items():
            if refusal:
                report(f"  refused by check: {part}: {refusal}")
    assert not disagreements
    assert built >= BUILT_SHARE * pieces, f"only {built} of {pieces} pieces built"


@pytest.mark.slow
@pytest.mark.solid
@pytest.mark.parametrize("scenario", [TAIL_PRINTED, TAIL_ROUTED], ids=lambda s: s.name)
def test_the_metric_tail_builds_or_check_says_why(corpus: dict[str, dict], scenario) -> None:
    (entry,) = [v for k, v in corpus.items() if not k.startswith("_") and v["name"] == scenario.name]
    assert not entry["check_error"] and not entry["build_error"]
    assert len(entry["check"]) == 14  # 7 ribs × nose and centre (the tail pieces are too shallow: warnings)
    for part, refusal in entry["check"].items():
        status, error = entry["build"][part]
        if refusal is None:
            assert status == "built", (part, error)
        else:
            assert status == "failed" and error == refusal and REMEDY.search(refusal), (part, refusal, error)


def test_the_corpus_covers_what_it_says(tmp_path: Path) -> None:
    """Quick: the corpus has 30 specs or more, and between them every alloy, relief policy and die material,
    inch and mm, ribs and wings, chords from 250 to 1,600 mm and gauges from 0.4 to 1.6 mm."""
    from scenarios import ALLOYS, PRINTED, RELIEFS, ROUTED

    from diegen import materials

    corpus = scenarios()
    assert len(corpus) >= 30
    specs = [api.load(write(s, tmp_path / s.name)) for s in corpus]
    shared = [s.shared for s in specs]
    assert {sh.sheet.alloy for sh in shared} == set(ALLOYS) == set(materials.sheet_alloy_names())
    assert {sh.relief for sh in shared} == set(RELIEFS)
    assert {sh.die.material for sh in shared} == set(ROUTED + PRINTED) == set(materials.die_material_names())
    printed = [sh.die for sh in shared if materials.die_material(sh.die.material).printed]
    assert any(d.print_bed_mm for d in printed) and any(not d.print_bed_mm for d in printed)
    assert {s.units for s in specs} == {"in", "mm"}
    assert {type(s).__name__ for s in specs} == {"RibSpec", "WingSpec"}
    chords = [s.chord_mm for s in specs if hasattr(s, "chord_mm")]
    assert min(chords) <= 250.0 + 0.01 and max(chords) >= 1600.0 - 0.01  # inch specs round to 5 digits
    gauges = [sh.sheet.thickness_mm for sh in shared]
    assert min(gauges) <= 0.4 + 0.01 and max(gauges) >= 1.6 - 0.01
    assert any(s.files for s in corpus)  # sections from the public airfoil collection
    wings = [s for s in specs if type(s).__name__ == "WingSpec"]
    assert any(w.sweep_deg for w in wings) and any(w.overrides for w in wings)
    assert any(w.root_chord_mm != w.tip_chord_mm for w in wings)
    assert any(sp.root_at != sp.tip_at for w in wings for sp in w.spars)
    # drawn parts: points and SVG outlines, mold line and die, partial and mirrored flanges, flanged holes, cut-outs
    drawn = [s.drawn for s in specs if getattr(s, "drawn", None) is not None]
    assert len(drawn) >= 10
    assert {d.part.outline_is for d in drawn} == {"mold-line", "die"}
    assert any(d.flanged_holes and d.part.holes for d in drawn)
    assert any(h.circle is None for d in drawn for h in d.part.holes)  # a cut-out
    assert any(r.flange.direction == "up" for d in drawn for r in d.part.runs)
    assert any(len(d.part.runs) > 1 for d in drawn)
