"""Tests of the single-stroke lettering engraved on the die's bottom face (pure 2D)."""

from __future__ import annotations

import pytest
from shapely.geometry import box

from diegen.die.lettering import (
    ADVANCE_UNITS,
    CAP_UNITS,
    GLYPHS,
    WIDTH_UNITS,
    engraved_text,
    line_strokes,
    line_width_units,
    stroke_polygons,
)


def test_text_is_engraved_in_capitals_and_unknown_characters_as_question_marks():
    assert engraved_text("T1-nose 2024-T3 0.64 mm") == "T1-NOSE 2024-T3 0.64 MM"
    assert engraved_text("rib ø7") == "RIB ?7"


def test_every_spec_id_and_catalogue_character_has_a_glyph():
    # part ids follow the spec's id pattern [A-Za-z0-9_.-]; sheet lines add a space
    for char in "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_.- ":
        assert char in GLYPHS, char


@pytest.mark.parametrize("char", sorted(c for c in GLYPHS if c != " "))
def test_glyph_strokes_stay_on_the_grid_and_make_valid_grooves(char):
    strokes = GLYPHS[char]
    assert strokes
    for stroke in strokes:
        assert len(stroke) >= 2
        for x, y in stroke:
            assert 0 <= x <= WIDTH_UNITS and -1 <= y <= CAP_UNITS, (char, x, y)
    polygons = stroke_polygons(list(strokes), 0.75)
    assert polygons and all(p.is_valid and p.area > 0 for p in polygons)
    # mitred corners and square ends spill past the cell, but less than half the gap to the next letter
    spill = (ADVANCE_UNITS - WIDTH_UNITS) / 2 - 0.1
    cell = box(-spill, -1 - spill, WIDTH_UNITS + spill, CAP_UNITS + spill)
    assert all(cell.contains(p) for p in polygons)


def test_line_layout():
    line = "AB-H"
    assert line_width_units(line) == pytest.approx(3 * ADVANCE_UNITS + WIDTH_UNITS)
    assert line_width_units("") == 0.0
    xs = [x for stroke in line_strokes(line) for x, _ in stroke]
    assert min(xs) == 0 and max(xs) == pytest.approx(line_width_units(line))
    # letters a full stroke apart never merge into one groove
    assert len(stroke_polygons(line_strokes("II"), 0.75)) == 2
