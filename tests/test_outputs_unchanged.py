"""The demo rib's and demo wing's outputs match their stored fingerprint (tests/snapshot.py).

A change meant to move code without changing behaviour must keep this test green; a change that alters outputs on
purpose rewrites the fingerprint with ``tests/snapshot.py`` and says why in its commit.
"""

from __future__ import annotations

import json

import pytest
from snapshot import STORED, check_digests, snapshot
from testing import DEMO_RIB, DEMO_WING

from diegen import api


def _compare(expected: dict, found: dict) -> list[str]:
    problems = []
    for part in sorted(set(expected) | set(found)):
        want, got = expected.get(part, {}), found.get(part, {})
        for kind in sorted(set(want) | set(got)):
            a, b = want.get(kind), got.get(kind)
            same = a == b if not isinstance(a, float) else isinstance(b, float) and abs(a - b) <= 1e-6 * abs(a)
            if not same:
                problems.append(f"{part} {kind}: stored {a}, now {b}")
    return problems


def test_check_documents_unchanged():
    assert check_digests() == json.loads(STORED.read_text())["check"]


@pytest.mark.slow
@pytest.mark.solid
def test_demo_rib_and_wing_outputs_unchanged(tmp_path):
    stored = json.loads(STORED.read_text())
    problems = []
    for spec_path in (DEMO_RIB, DEMO_WING):
        spec = api.load(spec_path)
        api.build(spec, tmp_path, jobs=2)
        problems += _compare(stored[spec.id], snapshot(tmp_path / spec.id))
    assert problems == []
