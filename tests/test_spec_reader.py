"""The typed readers (``diegen.spec.reader``): values in mm / N, and every mistake a located problem.

Lines and columns are found here in the YAML text itself (1-based, as editors
count them), so a problem's place is checked against the file, not against the
parser.  Units by the exact definitions of NIST SP 811 (2008), Appendix B.
"""

from __future__ import annotations

import pytest

from diegen.errors import Problem
from diegen.spec.reader import MIN_LENGTH_MM, Reader, describe, join, suggest
from diegen.spec.yamltree import YNode, load_text

MM_PER_IN = 25.4  # NIST SP 811 App. B, exact
N_PER_LBF = 4.4482216152605  # NIST SP 811 App. B, exact


def at(text: str, token: str, nth: int = 1) -> tuple[int, int]:
    """(line, column) of the ``nth`` occurrence of ``token`` in ``text``, both from 1."""
    index = -1
    for _ in range(nth):
        index = text.index(token, index + 1)
    line = text.count("\n", 0, index) + 1
    column = index - (text.rfind("\n", 0, index) + 1) + 1
    return line, column


def tree(text: str) -> dict[str, YNode]:
    root = load_text(text, "t.yaml")
    assert root.is_map
    return root.value


def only(reader: Reader) -> Problem:
    assert len(reader.problems) == 1, [str(p) for p in reader.problems]
    return reader.problems[0]


def test_at_counts_like_an_editor() -> None:
    assert at("ab\ncd: 1\n", "1") == (2, 5) and at("x", "x") == (1, 1) and at("a a", "a", 2) == (1, 3)


# ---------------------------------------------------------------- mappings
MAPPING = """\
die:
  material: hdpe
  stok_thickness: 0.5
  cutter: 0.25
"""


def test_unknown_keys_are_located_at_the_key_with_a_suggestion() -> None:
    r = Reader("t.yaml", "in")
    fields = r.mapping(tree(MAPPING)["die"], "die", ("material", "stock_thickness", "cutter_diameter"),
                       ("material", "stock_thickness"))
    assert set(fields or {}) == {"material", "stok_thickness", "cutter"}
    by_key = {p.key: p for p in r.problems}
    assert set(by_key) == {"die.stok_thickness", "die.cutter", "die.stock_thickness"}
    typo = by_key["die.stok_thickness"]
    assert (typo.line, typo.column) == at(MAPPING, "stok_thickness")
    assert "unknown key 'stok_thickness' (did you mean 'stock_thickness'?)" in typo.message
    assert "allowed: material, stock_thickness, cutter_diameter" in typo.message
    assert (by_key["die.cutter"].line, by_key["die.cutter"].column) == at(MAPPING, "cutter")
    missing = by_key["die.stock_thickness"]
    assert missing.message == "missing required key 'stock_thickness'"
    assert (missing.line, missing.column) == at(MAPPING, "material")  # the mapping's own place: its first key


def test_a_scalar_where_a_mapping_belongs() -> None:
    text = "die: 12\n"
    r = Reader("t.yaml")
    assert r.mapping(tree(text)["die"], "die", ("material",)) is None
    p = only(r)
    assert p.message == "expected a mapping of keys, found int 12" and (p.line, p.column) == at(text, "12")


# ---------------------------------------------------------------- numbers and lengths
NUMBERS = """\
a: 0.3
b: 1.0
c: .nan
d: "12"
e: true
f: 0
"""


def test_numbers_within_bounds() -> None:
    r = Reader("t.yaml")
    nodes = tree(NUMBERS)
    assert r.number(nodes["a"], "a", 0.0, 1.0, True, True) == 0.3
    assert r.number(nodes["b"], "b", 0.0, 1.0, True, True) is None
    assert r.number(nodes["c"], "c") is None
    assert r.number(nodes["d"], "d") is None
    assert r.number(nodes["e"], "e") is None
    assert r.number(nodes["f"], "f", 0.0) == 0.0
    assert r.number(None, "absent") is None
    messages = {p.key: p.message for p in r.problems}
    assert messages == {
        "b": "expected a value less than 1, found 1",
        "c": "expected a finite number, found float nan",
        "d": "expected a number, found str '12'",
        "e": "expected a number, found a boolean (true)",
    }
    for p in r.problems:
        assert (p.line, p.column) == (*at(NUMBERS, f"{p.key}:")[0:1], 4)  # every value starts in column 4


LENGTHS = """\
chord: 40
radius: "3/32 in"
span: "1 1/2 in"
thick: "0.8 mm"
bad: "3 furlong"
tiny: "0.0001 mm"
neg: -2
"""


def test_lengths_in_the_specs_units_or_their_own() -> None:
    r = Reader("t.yaml", "in")
    n = tree(LENGTHS)
    assert r.length(n["chord"], "chord") == pytest.approx(40 * MM_PER_IN, abs=1e-12)
    assert r.length(n["radius"], "radius") == pytest.approx(3 / 32 * MM_PER_IN, abs=1e-12)
    assert r.length(n["span"], "span") == pytest.approx(1.5 * MM_PER_IN, abs=1e-12)
    assert r.length(n["thick"], "thick") == pytest.approx(0.8, abs=1e-12)
    assert r.length(n["bad"], "bad") is None
    assert r.length(n["tiny"], "tiny") is None
    assert r.length(n["neg"], "neg") is None
    assert r.length(n["neg"], "neg_ok", low=-100.0, low_open=False) == pytest.approx(-2 * MM_PER_IN)
    problems = {p.key: p for p in r.problems}
    assert set(problems) == {"bad", "tiny", "neg"}
    assert "unknown length unit 'furlong'" in problems["bad"].message and "in" in problems["bad"].message
    assert problems["tiny"].message == f"expected a length of at least {MIN_LENGTH_MM:g} mm, found 0.0001 mm"
    assert problems["neg"].message == f"expected a value greater than 0 mm, found {-2 * MM_PER_IN:g} mm"
    for key, token in (("bad", '"3 furlong"'), ("tiny", '"0.0001 mm"'), ("neg", "-2")):
        assert (problems[key].line, problems[key].column) == at(LENGTHS, token)


def test_lengths_in_a_millimetre_spec_and_an_upper_bound() -> None:
    r = Reader("t.yaml", "mm")
    n = tree("a: 40\nb: 2 in\n")
    assert r.length(n["a"], "a") == 40.0
    assert r.length(n["b"], "b", high=50.0) is None
    assert only(r).message == "expected a value at most 50 mm, found 50.8 mm"


def test_forces_need_a_unit() -> None:
    text = 'a: 25 ton\nb: "178 kN"\nc: 40000\n'
    r = Reader("t.yaml", "in")
    n = tree(text)
    assert r.force(n["a"], "a") == pytest.approx(25 * 2000 * N_PER_LBF, rel=1e-15)  # short ton = 2000 lbf
    assert r.force(n["b"], "b") == pytest.approx(178_000.0)
    assert r.force(n["c"], "c") is None
    p = only(r)
    assert "with a unit" in p.message and (p.line, p.column) == at(text, "40000")


def test_whole_numbers_booleans_and_text() -> None:
    text = "count: 2.5\nflag: maybe\nok: yes\nname: 2412\nempty: ''\nid: ab/cd\n"
    r = Reader("t.yaml")
    n = tree(text)
    assert r.integer(n["count"], "count") is None
    assert r.boolean(n["flag"], "flag") is None
    assert r.boolean(n["ok"], "ok") is True  # YAML 1.1 reads a bare yes as true
    assert r.text(n["name"], "name") == "2412"  # a number where text belongs is taken as its digits
    assert r.text(n["empty"], "empty") is None
    assert r.text(n["id"], "id", lambda v: "no slashes" if "/" in v else None) is None
    messages = {p.key: p.message for p in r.problems}
    assert messages == {"count": "expected a whole number, found float 2.5",
                        "flag": "expected true or false, found str 'maybe'",
                        "empty": "expected text, found str ''", "id": "no slashes"}


def test_choices_list_every_option() -> None:
    text = "relief: flute\npolicy: no\nother: 3\n"
    r = Reader("t.yaml")
    n = tree(text)
    assert r.choice(n["relief"], "relief", ("flutes", "notches", "none")) is None
    assert r.choice(n["policy"], "policy", ("flutes", "notches", "none")) == "none"  # YAML reads bare no as false
    assert r.choice(n["other"], "other", ("a", "b")) is None
    first, second = r.problems
    assert first.message == "expected one of flutes, notches, none, found str 'flute' (did you mean 'flutes'?)"
    assert (first.line, first.column) == at(text, "flute")
    assert second.message == "expected one of a, b, found int 3"


def test_sequences_and_pairs() -> None:
    text = "box: [12, 10]\nshort: [12]\nodd: [12, ten]\nnot: 12\n"
    r = Reader("t.yaml", "in")
    n = tree(text)
    assert r.length_pair(n["box"], "box") == pytest.approx((12 * MM_PER_IN, 10 * MM_PER_IN))
    assert r.length_pair(n["short"], "short") is None
    assert r.length_pair(n["odd"], "odd") is None
    assert r.sequence(n["not"], "not") is None
    problems = {p.key: p for p in r.problems}
    assert problems["short"].message == "expected a list of exactly 2 items, found 1 item"
    assert "odd[1]" in problems and (problems["odd[1]"].line, problems["odd[1]"].column) == at(text, "ten")
    assert problems["not"].message == "expected a list, found int 12"


def test_every_problem_is_collected_none_raised() -> None:
    text = "a: x\nb: y\nc: z\n"
    r = Reader("t.yaml")
    for key, node in tree(text).items():
        assert r.number(node, key) is None
    assert [(p.line, p.column) for p in r.problems] == [at(text, "x"), at(text, "y"), at(text, "z")]


# ---------------------------------------------------------------- helpers
def test_describe_suggest_join_and_the_problem_line() -> None:
    assert describe(YNode({}, 1, 1)) == "a mapping" and describe([]) == "a list"
    assert describe(None) == "nothing (null)" and describe(False) == "a boolean (false)"
    assert describe("x" * 100) == f"str {('x' * 100)!r}"[:61] + "..."
    assert suggest("realief", ["relief", "pieces"]) == " (did you mean 'relief'?)"
    assert suggest("zzz", ["relief"]) == ""
    assert join("spars", 1) == "spars[1]" and join("die", "material") == "die.material" and join("", "id") == "id"
    assert str(Problem("bad", "s.yaml", 3, 7, "die.material")) == "s.yaml:3:7: die.material: bad"
    assert str(Problem("bad")) == "<spec>: bad"
