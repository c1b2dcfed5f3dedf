"""Unit conversions against the exact definitions of NIST Special Publication 811 (2008), Appendix B."""

import pytest

from diegen import units


def test_exact_definitions():
    # NIST SP 811 B.8: inch = 2.54 E-02 m exactly; pound-force = 4.448 221 615 260 5 N exactly
    assert units.MM_PER_IN == 25.4
    assert units.N_PER_LBF == 4.4482216152605
    # NIST SP 811 B.8: ton-force (2000 lbf) = 8.896 443 230 521 E+03 N
    assert units.force_n("1 ton") == pytest.approx(8896.443230521, rel=1e-12)


@pytest.mark.parametrize("text,mm", [
    ("0.8 mm", 0.8), ("0.032 in", 0.8128), ("3/16 in", 4.7625), ("1 1/2 in", 38.1), ('0.5"', 12.7),
    ("2 cm", 20.0), ("1e-1 in", 2.54),
])
def test_length_strings(text, mm):
    assert units.length_mm(text, "mm") == pytest.approx(mm, abs=1e-12)


def test_bare_numbers_use_spec_units():
    assert units.length_mm(0.025, "in") == pytest.approx(0.635, abs=1e-12)
    assert units.length_mm(3, "mm") == 3.0


@pytest.mark.parametrize("text,newtons", [
    ("20 ton", 20 * 2000 * 4.4482216152605), ("178 kN", 178_000.0), ("40000 lbf", 40_000 * 4.4482216152605),
])
def test_forces(text, newtons):
    assert units.force_n(text) == pytest.approx(newtons, rel=1e-15)


def test_psi():
    # 1 psi = 6.894 757 E+03 Pa (NIST SP 811 B.8)
    assert units.MPA_PER_PSI == pytest.approx(6.894757e-3, rel=1e-7)


@pytest.mark.parametrize("bad", ["three in", "3/ in", "1/0 in", "12 parsecs", True, None, [1]])
def test_bad_lengths(bad):
    with pytest.raises(units.UnitError):
        units.length_mm(bad, "mm")


def test_force_needs_unit():
    with pytest.raises(units.UnitError, match="with a unit"):
        units.force_n(20)
