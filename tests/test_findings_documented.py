"""Every finding code the package can raise is documented in specs/README.md ("Findings"), and every documented
code is one the package raises: a builder reads the code in a report and looks it up there."""

from __future__ import annotations

import re

from testing import ROOT, SPECS

# a code written straight into a Finding, or chosen into a variable named ``code`` first
CODE_IN_SOURCE = re.compile(r"Finding\(\s*\"([a-z0-9-]+)\"|code = (?:\"([a-z0-9-]+)\" if .* else )?\"([a-z0-9-]+)\"")
CODE_IN_TABLE = re.compile(r"`([a-z0-9]+(?:-[a-z0-9]+)+)`")


def _source_codes() -> set[str]:
    found: set[str] = set()
    for path in (ROOT / "diegen").rglob("*.py"):
        found |= {code for match in CODE_IN_SOURCE.findall(path.read_text(encoding="utf-8")) for code in match if code}
    return found


def _documented_codes() -> set[str]:
    text = (SPECS / "README.md").read_text(encoding="utf-8")
    table = text[text.index("## Findings"):]
    return {code for line in table.splitlines() if line.startswith("| `") for code in
            CODE_IN_TABLE.findall(line.split("|")[1])}


def test_the_walker_finds_codes() -> None:
    assert CODE_IN_SOURCE.findall('Finding("part-mirrored", "x")') == [("part-mirrored", "", "")]
    assert CODE_IN_SOURCE.findall('code = "a-b" if short else "c-d"') == [("", "a-b", "c-d")]
    assert len(_source_codes()) >= 15


def test_every_finding_code_is_documented_and_every_documented_code_is_raised() -> None:
    source, documented = _source_codes(), _documented_codes()
    assert sorted(source - documented) == []
    assert sorted(documented - source) == []
