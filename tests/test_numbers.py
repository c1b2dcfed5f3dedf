"""No negative zero in any output (diegen.numbers): "-0.0" reads as a mistake to a builder.

IEEE 754 keeps the sign of zero, and Python prints it (format(-0.0, ".1f") == "-0.0"): the checks below
compare against Python's own formatting.
"""

from __future__ import annotations

import math

from diegen.numbers import plain, without_negative_zeros


def test_a_negative_zero_loses_its_sign():
    assert format(-0.0, ".1f") == "-0.0"  # what Python prints without help
    assert math.copysign(1.0, plain(-0.0)) == 1.0
    assert format(plain(round(-0.0004, 3)), ".3f") == "0.000"


def test_printed_negative_zeros_are_written_without_the_sign_and_nothing_else_changes():
    assert without_negative_zeros(f"({-0.0004:.1f}, {-0.04:.1f}) mm") == "(0.0, 0.0) mm"
    assert without_negative_zeros("[-0.0, -0]") == "[0.0, 0]"
    for kept in ("-0.5", "-0.01", "BW418-wing-R01-0", "2024-0", "x = -10.0", "T1-nose"):
        assert without_negative_zeros(kept) == kept
