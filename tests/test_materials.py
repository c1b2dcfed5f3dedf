"""Tests of the materials catalogue against the published tables it was taken from."""

from __future__ import annotations

import dataclasses
import itertools
import re
import subprocess
import sys
from collections.abc import Iterator
from importlib import resources
from typing import Any

import pytest
import yaml

from diegen.errors import DiegenError, FormingError, MaterialError
from diegen.materials import (
    bend_radius_tables,
    catalogue_text,
    die_material,
    die_material_names,
    min_bend_radius,
    sheet_alloy,
    sheet_alloy_names,
)

IN = 25.4  # mm per inch, exact by definition
# 1 ksi = 1000 lbf/in^2; 1 lbf = 4.4482216152605 N (exact by definition), 1 in^2 = 645.16 mm^2.
KSI = 1000 * 4.4482216152605 / 645.16  # MPa
REL = 1e-9  # values are stored exactly as their source prints them; only float rounding remains


# --------------------------------------------------------------------------- sources


# A web address or a bare domain name (e.g. "example.com/page"): no source may point to one.
_ADDRESS = re.compile(r"://|\bwww\.|\b[A-Za-z0-9-]+(?:\.[A-Za-z0-9-]+)*\.[a-z]{2,}\b")
# A standard named by its body and number, e.g. "ASTM B209" or "ANSI A208.2".
_STANDARD = re.compile(r"\b(?:ASTM|ANSI|ISO|SAE|AMS|EN|DIN|NIST SP|MIL-[A-Z]+)[- ]?[A-Z]?\d")


def _source_kind(source: str) -> str | None:
    """Which accepted kind a source string is, or None if it is none of them."""
    text = source.strip()
    if _ADDRESS.search(text):
        return None
    for prefix, kind in (
        ("common practice, no source", "common practice"),
        ("from memory, unverified", "memory"),
        ("project limit", "project limit"),
        ("unattributed table, unverified", "unattributed"),
    ):
        if text.startswith(prefix):
            return kind
    # A publication: a year, and a table, figure or section with a page or an article number.
    where = re.search(r"\b(?:Table|Fig\.|Figure|Section)\s+[\w.-]+|§\s*[\w.-]+", text)
    page = re.search(r"\b(?:p|pp)\.\s*[\w-]+|\barticle\s+\w", text)
    if where and page and re.search(r"\b(?:19|20)\d\d\b", text):
        return "publication"
    if _STANDARD.search(text):
        return "standard"
    return None


def _catalogue_sources() -> Iterator[tuple[str, str]]:
    """Every source string the catalogue hands out, with where it belongs."""
    for name in sheet_alloy_names():
        for field_name, source in sheet_alloy(name).sources.items():
            yield f"{name}.{field_name}", source
    for table in bend_radius_tables():
        yield f"{table}.citation", _data("sheet.yaml")["bend_radius_tables"][table]["citation"]
        for alloy in _data("sheet.yaml")["bend_radius_tables"][table]["rows"]:
            r = min_bend_radius(alloy, 0.5 * IN / 16, table)
            yield f"{table}.{alloy}", r.citation
    for name in die_material_names():
        for field_name, source in die_material(name).sources.items():
            yield f"{name}.{field_name}", source


def _numbers_with_sources(node: Any, path: str, source: str | None) -> Iterator[tuple[str, object, str | None]]:
    """Every numeric leaf of a YAML tree with the source of its nearest enclosing mapping."""
    if isinstance(node, dict):
        own = node.get("source")
        for key, value in node.items():
            yield from _numbers_with_sources(value, f"{path}.{key}", own if isinstance(own, str) else None)
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _numbers_with_sources(value, f"{path}[{i}]", source)
    elif isinstance(node, (int, float)) and not isinstance(node, bool):
        yield path, node, source


def _data(filename: str) -> dict[str, Any]:
    return yaml.safe_load(resources.files("diegen.materials").joinpath(filename).read_text(encoding="utf-8"))


@pytest.mark.parametrize("filename", ["sheet.yaml", "die.yaml"])
def test_every_number_in_the_data_files_has_an_accepted_source(filename: str) -> None:
    found = list(_numbers_with_sources(_data(filename), filename, None))
    assert len(found) > 50 if filename == "sheet.yaml" else len(found) > 20
    for path, _value, source in found:
        assert source and source.strip(), f"{path} has no source"
        assert _source_kind(source) is not None, f"{path}: source {source!r} is not an accepted kind"


def test_every_catalogue_value_has_an_accepted_source_and_no_address() -> None:
    found = dict(_catalogue_sources())
    assert len(found) > 80
    for where, source in found.items():
        assert _source_kind(source) is not None, f"{where}: source {source!r} is not an accepted kind"


@pytest.mark.parametrize("filename", ["sheet.yaml", "die.yaml"])
def test_no_data_file_holds_a_web_address(filename: str) -> None:
    # Sources cite the publication itself, never a copy of it on the web; notes and titles neither.
    def strings(node: Any) -> Iterator[str]:
        if isinstance(node, dict):
            for value in node.values():
                yield from strings(value)
        elif isinstance(node, list):
            for value in node:
                yield from strings(value)
        elif isinstance(node, str):
            yield node

    found = list(strings(_data(filename)))
    assert len(found) > 20
    assert not [text for text in found if _ADDRESS.search(text)]


@pytest.mark.parametrize(
    ("source", "kind"),
    [
        ("Aluminum Association, Aluminum Design Manual, 2005 ed., Table 3-1, p. VII-78", "publication"),
        ("ASTM B209, Table 2", "standard"),
        ("common practice, no source: usual", "common practice"),
        ("from memory, unverified: roughly", "memory"),
        ("project limit: chosen for the demo", "project limit"),
        ("unattributed table, unverified: origin not known", "unattributed"),
        ("Handbook of Things, Table 5", None),  # no year, no page
        ("a handbook, Table 5, p. 12 (2002), https://copy.example/handbook", None),
        ("from memory, unverified: see example.com/page", None),
        ("typical values of 6061 by temper", None),
    ],
)
def test_source_kinds_are_recognised(source: str, kind: str | None) -> None:
    assert _source_kind(source) == kind


def test_die_lives_given_as_words_have_sources() -> None:
    for name, entry in _data("die.yaml")["materials"].items():
        life = entry["life_parts"]
        assert _source_kind(life["source"]) is not None, name


def test_every_numeric_field_of_the_typed_records_has_a_source() -> None:
    for name in sheet_alloy_names():
        alloy = sheet_alloy(name)
        numeric = [f.name for f in dataclasses.fields(alloy) if isinstance(getattr(alloy, f.name), float)]
        assert len(numeric) == 7
        for field_name in numeric:
            assert _source_kind(alloy.sources[field_name]) is not None, (name, field_name)
    for name in die_material_names():
        die = die_material(name)
        for field_name in ("compressive_strength_mpa", "stock_thicknesses_mm", "life_parts"):
            assert _source_kind(die.sources[field_name]) is not None, (name, field_name)


def test_limits_without_a_published_source_say_so() -> None:
    # No published flanging-limit chart was found: the limits must not pose as published.
    for name in sheet_alloy_names():
        sources = sheet_alloy(name).sources
        assert _source_kind(sources["shrink_limit"]) == "memory"
        assert _source_kind(sources["stretch_limit"]) == "common practice"


# --------------------------------------------------------------------------- names and lookup


def test_catalogue_holds_the_required_names() -> None:
    assert {"2024-T3", "2024-O", "6061-T6", "6061-O", "5052-H32", "3003-H14", "5052-O", "3003-O", "6061-T4"} <= set(
        sheet_alloy_names()
    )
    assert {"fibreboard", "solid-surface", "aluminium", "hdpe", "pla", "petg"} <= set(die_material_names())
    assert bend_radius_tables() == ("aa", "aerospace")


def test_lookup_ignores_case_and_knows_die_aliases() -> None:
    assert sheet_alloy("2024-t3").name == "2024-T3"
    assert die_material("MDF").name == "fibreboard"
    assert die_material("aluminum").name == "aluminium"


@pytest.mark.parametrize(
    ("lookup", "typo", "suggestion"),
    [
        (sheet_alloy, "2024-T31", "2024-T3"),
        (sheet_alloy, "6061T6", "6061-T6"),
        (die_material, "fibrebord", "fibreboard"),
        (die_material, "solid-surfce", "solid-surface"),
    ],
    ids=["alloy-extra-digit", "alloy-no-dash", "die-typo", "die-typo-2"],
)
def test_unknown_names_suggest_the_closest(lookup: Any, typo: str, suggestion: str) -> None:
    with pytest.raises(MaterialError) as info:
        lookup(typo)
    message = str(info.value)
    assert "did you mean" in message and repr(suggestion) in message
    assert isinstance(info.value, DiegenError) and isinstance(info.value, KeyError)


def test_unknown_table_suggests_the_closest() -> None:
    with pytest.raises(MaterialError, match="did you mean 'aerospace'"):
        min_bend_radius("2024-T3", 1.0, table="aero")


def test_records_are_frozen() -> None:
    alloy = sheet_alloy("2024-T3")
    with pytest.raises(dataclasses.FrozenInstanceError):
        alloy.yield_mpa = 1.0  # type: ignore[misc]
    with pytest.raises(TypeError):
        alloy.sources["yield_mpa"] = "x"  # type: ignore[index]
    assert hash(alloy) == hash(sheet_alloy("2024-T3"))


# --------------------------------------------------------------------------- sheet properties


# Aluminum Association typical properties (Ftu, Fty in ksi; elongation % in 2 in, 1/16 in sheet;
# E in 10^3 ksi) as printed in M. Kutz (ed.), Handbook of Materials Selection, John Wiley & Sons,
# 2002, Table 5 "Typical Mechanical Properties of Wrought Aluminum Alloys", p. 101.
AA_TYPICAL_KSI = {
    "2024-O": (27, 11, 20, 10.6),
    "2024-T3": (70, 50, 18, 10.6),
    "3003-O": (16, 6, 30, 10.0),
    "3003-H14": (22, 21, 8, 10.0),
}
# Aluminum Association typical values (from memory, unverified) in ksi -- 5052-H32 33/28 ksi, 12 %,
# E 10.2; 6061-T6 45/40 ksi, 12 %, E 10.0; 5052-O 28/13 ksi, 25 %, E 10.2 -- converted to MPa / GPa
# and rounded to three figures:
AA_TYPICAL_MPA = {
    "5052-H32": (228, 193, 12, 70.3),
    "6061-T6": (310, 276, 12, 68.9),
    "5052-O": (193, 89.6, 25, 70.3),
}


@pytest.mark.parametrize("name", sorted(AA_TYPICAL_KSI))
def test_properties_match_the_aa_typical_table_in_ksi(name: str) -> None:
    ftu, fty, elong, e_msi = AA_TYPICAL_KSI[name]
    alloy = sheet_alloy(name)
    assert alloy.ultimate_mpa == pytest.approx(ftu * KSI, rel=REL)
    assert alloy.yield_mpa == pytest.approx(fty * KSI, rel=REL)
    assert alloy.elongation == pytest.approx(elong / 100, rel=REL)
    assert alloy.youngs_modulus_mpa == pytest.approx(e_msi * 1000 * KSI, rel=REL)


def test_ksi_conversion_matches_the_usual_rounded_figures() -> None:
    # 2024-T3 typical Fty 50 ksi is usually quoted as 345 MPa, E 10.6 x 10^3 ksi as 73.1 GPa
    # (Aluminum Association typical values; conversion 1 ksi = 6.895 MPa).
    alloy = sheet_alloy("2024-T3")
    assert alloy.yield_mpa == pytest.approx(345, abs=0.5)
    assert alloy.youngs_modulus_mpa == pytest.approx(73_100, abs=50)


@pytest.mark.parametrize("name", sorted(AA_TYPICAL_MPA))
def test_properties_match_the_aa_typical_values_in_mpa(name: str) -> None:
    ftu, fty, elong, e_gpa = AA_TYPICAL_MPA[name]
    alloy = sheet_alloy(name)
    assert alloy.ultimate_mpa == pytest.approx(ftu, rel=REL)
    assert alloy.yield_mpa == pytest.approx(fty, rel=REL)
    assert alloy.elongation == pytest.approx(elong / 100, rel=REL)
    assert alloy.youngs_modulus_mpa == pytest.approx(e_gpa * 1000, rel=REL)


def test_6061_properties_sit_inside_the_specified_limits() -> None:
    # Specified limits for 6061 sheet, 0.021-0.128 in (O) and 0.021-0.249 in (T6):
    # O: Ftu <= 22, Fty <= 12 ksi; T6: Ftu >= 42, Fty >= 35 ksi, elongation >= 10 %
    # (ASTM B209, from memory, unverified). Typical values must respect them.
    o, t6 = sheet_alloy("6061-O"), sheet_alloy("6061-T6")
    assert o.ultimate_mpa <= 22 * KSI and o.yield_mpa <= 12 * KSI
    assert t6.ultimate_mpa >= 42 * KSI and t6.yield_mpa >= 35 * KSI and t6.elongation >= 0.10


def test_k_factor_is_the_handbook_value_for_aluminium() -> None:
    # k = 0.41 for aluminium in 90 degree bends (from memory, unverified: after Machinery's Handbook).
    for name in sheet_alloy_names():
        assert sheet_alloy(name).k_factor == pytest.approx(0.41, rel=REL)


@pytest.mark.parametrize(
    ("hard", "soft"),
    [
        ("2024-T3", "2024-O"),
        ("3003-H14", "3003-O"),
        ("5052-H32", "5052-O"),
        ("6061-T6", "6061-O"),
        ("6061-T4", "6061-O"),
    ],
    ids=lambda n: n,
)
def test_harder_tempers_are_stronger_and_less_ductile(hard: str, soft: str) -> None:
    # Physical fact of strain hardening and precipitation hardening, visible in every row of
    # the Aluminum Association typical table (Kutz, Handbook of Materials Selection, 2002, Table 5, p. 101).
    h, s = sheet_alloy(hard), sheet_alloy(soft)
    assert h.yield_mpa > s.yield_mpa
    assert h.elongation < s.elongation
    assert h.shrink_limit < s.shrink_limit  # harder tempers wrinkle sooner (from memory, unverified)
    assert h.youngs_modulus_mpa == pytest.approx(s.youngs_modulus_mpa, rel=0.01)  # E does not depend on temper


def test_flange_limits_are_plausible_positive_fractions() -> None:
    for name in sheet_alloy_names():
        a = sheet_alloy(name)
        assert 0 < a.shrink_limit < a.stretch_limit <= a.elongation + 1e-12, name
        assert a.yield_mpa < a.ultimate_mpa, name
    # 2024-T3 takes only a few percent of shrink without flutes (from memory, unverified: 0.03-0.05).
    assert 0.03 <= sheet_alloy("2024-T3").shrink_limit <= 0.05


# --------------------------------------------------------------------------- minimum bend radius


def test_aa_2024_t3_one_sixteenth_is_4t() -> None:
    # Aluminum Association, Aluminum Design Manual, 2005 ed., Table 3-1, p. VII-78:
    # 2024-T3, t = 1/16 in -> 4t = 0.250 in.
    r = min_bend_radius("2024-T3", IN / 16, "aa")
    assert r.radius_mm == pytest.approx(0.250 * IN, rel=REL)
    assert r.table == "aa" and "Table 3-1" in r.citation
    assert r.thickness_column_mm == pytest.approx(IN / 16, rel=REL)


def test_aa_5052_h32_one_eighth_is_one_and_a_half_t() -> None:
    # Aluminum Association, Aluminum Design Manual, 2005 ed., Table 3-1, p. VII-78:
    # 5052-H32, t = 1/8 in -> 1.5t = 0.1875 in.
    assert min_bend_radius("5052-H32", IN / 8).radius_mm == pytest.approx(0.1875 * IN, rel=REL)


def test_aa_6061_t6_one_thirty_second_is_1t() -> None:
    # Aluminum Association, Aluminum Design Manual, 2005 ed., Table 3-1, p. VII-78: 6061-T6, t = 1/32 in -> 1t.
    assert min_bend_radius("6061-T6", IN / 32).radius_mm == pytest.approx(IN / 32, rel=REL)


def test_aerospace_2024_t3_forty_thou_is_point_12() -> None:
    # "Recommended minimum bend radius for maximum strength" (unattributed table, unverified):
    # 2024-T3, t = .040 -> R = .12 in.
    r = min_bend_radius("2024-T3", 0.040 * IN, "aerospace")
    assert r.radius_mm == pytest.approx(0.12 * IN, rel=REL)
    assert r.table == "aerospace" and r.citation.startswith("unattributed table, unverified")


def test_aa_between_columns_uses_the_next_thicker_column() -> None:
    # .040 in lies between the 1/32 and 1/16 in columns of AA Table 3-1: the 1/16 column (4t)
    # is used, giving 4 x .040 = .160 in. Cross-check: FAA-H-8083-31, Airframe Vol. 1, ch. 4,
    # Fig. 4-125 gives .16 in as the minimum radius of .040 2024-T3.
    r = min_bend_radius("2024-T3", 0.040 * IN)
    assert r.thickness_column_mm == pytest.approx(IN / 16, rel=REL)
    assert r.radius_mm == pytest.approx(0.160 * IN, rel=REL)
    assert "next thicker" in r.note and "conservative" in r.note


def test_decimal_gauge_reads_in_its_fractional_column() -> None:
    # .032 in is the customary decimal name of 1/32 in (common practice, no source): AA 6061-T6 -> 1t.
    r = min_bend_radius("6061-T6", 0.032 * IN)
    assert r.thickness_column_mm == pytest.approx(IN / 32, rel=REL)
    assert r.radius_mm == pytest.approx(0.032 * IN, rel=REL)


def test_thin_sheet_reads_in_the_first_column() -> None:
    # Below the thinnest column the first column is the next thicker one (aerospace table: .06 in).
    assert min_bend_radius("2024-T3", 0.2, "aerospace").radius_mm == pytest.approx(0.06 * IN, rel=REL)


@pytest.mark.parametrize("table", ["aa", "aerospace"])
def test_rows_never_decrease_with_thickness(table: str) -> None:
    # Why reading the next thicker column is conservative: in both tables every row grows with t.
    data = _data("sheet.yaml")["bend_radius_tables"][table]
    columns = data["thickness"]["values"]
    for alloy, row in data["rows"].items():
        values = row["values"]
        assert len(values) == len(columns)
        assert all(b >= a for a, b in itertools.pairwise(values)), alloy
        radii = [min_bend_radius(alloy, c * IN, table).radius_mm for c in columns]
        assert all(b >= a - 1e-12 for a, b in itertools.pairwise(radii)), alloy


def test_above_the_largest_column_names_the_range() -> None:
    with pytest.raises(FormingError, match=r"0\.5 in"):
        min_bend_radius("2024-T3", 14.0, "aa")
    with pytest.raises(FormingError, match=r"0\.19 in"):
        min_bend_radius("2024-T3", 5.0, "aerospace")


@pytest.mark.parametrize("bad", [0.0, -1.0, float("nan"), float("inf")])
def test_thickness_must_be_positive_and_finite(bad: float) -> None:
    with pytest.raises(FormingError):
        min_bend_radius("2024-T3", bad)


def test_alloy_missing_from_a_table_names_the_tables_that_have_it() -> None:
    # 5052-H32 is not in the aerospace table (unattributed table, unverified).
    with pytest.raises(FormingError, match="tables that list it: aa"):
        min_bend_radius("5052-H32", 1.0, "aerospace")


def test_tables_disagree_and_the_result_says_which_was_used() -> None:
    # .040 2024-T3: AA Table 3-1 (via the 1/16 column) gives .160 in, the aerospace table .12 in.
    aa = min_bend_radius("2024-T3", 0.040 * IN, "aa")
    aero = min_bend_radius("2024-T3", 0.040 * IN, "aerospace")
    assert aa.radius_mm != pytest.approx(aero.radius_mm)
    assert (aa.table, aero.table) == ("aa", "aerospace")


# --------------------------------------------------------------------------- die materials


def test_die_lives_follow_common_practice() -> None:
    # Common practice, no source: fibreboard about a dozen parts, solid-surface a hundred or more,
    # aluminium indefinitely.
    assert die_material("fibreboard").life_parts == 12
    life = die_material("solid-surface").life_parts
    assert life is not None and life >= 100
    assert die_material("aluminium").life_parts is None


def test_die_materials_are_well_formed() -> None:
    for name in die_material_names():
        d = die_material(name)
        assert d.compressive_strength_mpa > 0 and d.description and d.machining_note
        assert list(d.stock_thicknesses_mm) == sorted(d.stock_thicknesses_mm)
        assert all(t > 0 for t in d.stock_thicknesses_mm)
        assert d.printed == (name in ("pla", "petg")), name
        assert bool(d.stock_thicknesses_mm) != d.printed, name  # printed dies have no stock sizes
    # The aluminium die is 6061-T6 plate: its strength is that alloy's typical yield.
    assert die_material("aluminium").compressive_strength_mpa == pytest.approx(sheet_alloy("6061-T6").yield_mpa)
    # Solid-surface sheet is usually 1/2 in thick (common practice, no source).
    assert 0.5 * IN in die_material("solid-surface").stock_thicknesses_mm


# --------------------------------------------------------------------------- text and layering


def test_catalogue_text_lists_every_name_value_and_source() -> None:
    text = catalogue_text()
    for name in (*sheet_alloy_names(), *die_material_names(), *bend_radius_tables()):
        assert name in text, name
    for name in sheet_alloy_names():
        alloy = sheet_alloy(name)
        assert f"{alloy.yield_mpa:.0f}" in text
        for source in alloy.sources.values():
            assert source in text
    for name in die_material_names():
        for source in die_material(name).sources.values():
            assert source in text
    assert "Table 3-1" in text and "not design allowables" in text.lower()


def test_materials_import_without_the_solid_kernel() -> None:
    code = (
        "import sys, diegen.materials as m; m.catalogue_text(); "
        "print('cadquery' in sys.modules or 'OCP' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"
