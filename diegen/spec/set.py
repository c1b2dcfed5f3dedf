"""Reading a ``kind: set`` spec: parts and ribs built together, like a wing's ribs, into one folder.

A set lists spec files (``specs``: names or glob patterns, relative to the set's folder), and may draw a whole
family of parts from DXF files that share one set of part keys (``drawings``: a glob pattern in ``files`` and the
keys of a part spec but its ``id`` and its outline's ``file``).  Each DXF becomes a part whose id is the set's id
and the drawing's file name (``BW418-fuselage-frame-4``).  Wings are built on their own, not in a set.
"""

from __future__ import annotations

import glob
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

from diegen.errors import DiegenError, SpecError
from diegen.spec.model import RibSpec, SetSpec, Spec
from diegen.spec.part import read_part
from diegen.spec.reader import Reader, describe, join
from diegen.spec.schema import read_header, read_paper
from diegen.spec.yamltree import YNode

__all__ = ["DRAWINGS_KEYS", "MAX_MEMBERS", "SET_KEYS", "read_set"]

MAX_MEMBERS = 200  # specs and drawings of one set (as many as a wing's ribs)
SET_KEYS = ("diegen", "kind", "id", "units", "title", "paper", "specs", "drawings")
DRAWINGS_KEYS = ("files", "outline", "flanges", "holes", "pins", "sheet", "flange", "hole_rules", "dowel_diameter",
                 "relief", "joggle_runout", "die", "press")


def read_set(r: Reader, root: dict[str, YNode], spec_dir: Path, load_member: Callable[[Path], Spec]) -> SetSpec:
    """The set spec ``root`` (problems recorded in ``r``; a member's own problems keep their own file's place).

    ``load_member`` loads a listed spec file as :func:`diegen.spec.load_spec` would (passed in: that loader sits
    above this module).
    """
    r.top_level(root, SET_KEYS, ("id",))
    ident, title = read_header(r, root, "set")
    if "specs" not in root and "drawings" not in root:
        r.problem(None, "specs", "expected 'specs' (spec files to build together), 'drawings' (DXF files that share "
                                 "one part's keys) or both")
    members: list[tuple[RibSpec, YNode, str]] = []
    for i, item in enumerate(r.sequence(root.get("specs"), "specs", 1, MAX_MEMBERS) or ()):
        members += _listed(r, item, join("specs", i), spec_dir, load_member)
    if "drawings" in root and ident:
        members += _drawn(r, root["drawings"], spec_dir, ident)
    if len(members) > MAX_MEMBERS:
        r.problem(root.get("specs") or root.get("drawings"), "specs",
                  f"expected at most {MAX_MEMBERS} parts and ribs in a set, found {len(members)}")
    seen: dict[str, str] = {}
    for member, node, path in members:
        if member.id in seen:
            r.problem(node, path, f"two members have the id {member.id!r} ({seen[member.id]} and {path}): every part "
                                  "of a set needs its own id (it names the part's folder)")
        seen.setdefault(member.id, path)
    if ident and ident in seen:
        r.problem(root.get("id"), "id", f"the set's id {ident!r} is also a member's id: give the set its own")
    return SetSpec(ident or "", r.units, tuple(m for m, _, _ in members), r.file, title, paper=read_paper(r, root))


def _matches(r: Reader, node: YNode, path: str, spec_dir: Path, what: str) -> list[Path]:
    pattern = r.text(node, path)
    if pattern is None:
        return []
    if glob.has_magic(pattern):
        found = sorted(Path(p) for p in glob.glob(str(spec_dir / pattern)) if Path(p).is_file())
        if not found:
            r.problem(node, path, f"no {what} matches {pattern!r} in {spec_dir}")
        return found
    return [spec_dir / pattern]


def _listed(r: Reader, item: YNode, path: str, spec_dir: Path,
            load_member: Callable[[Path], Spec]) -> list[tuple[RibSpec, YNode, str]]:
    members = []
    here = Path(r.file).resolve() if r.file else None
    for file in _matches(r, item, path, spec_dir, "spec file"):
        if here is not None and file.resolve() == here:
            continue  # a pattern such as "*.yaml" finds the set itself
        try:
            member = load_member(file)
        except SpecError as error:
            r.problems.extend(error.problems)  # located in the member's own file
            continue
        except DiegenError as error:
            r.problem(item, path, str(error))
            continue
        if not isinstance(member, RibSpec):
            r.problem(item, path, f"{file.name} is a {member.kind} spec: a set holds parts and ribs; build a "
                                  f"{member.kind} on its own")
            continue
        members.append((member, item, path))
    return members


def _drawn(r: Reader, node: YNode, spec_dir: Path, set_id: str) -> list[tuple[RibSpec, YNode, str]]:
    fields = r.mapping(node, "drawings", DRAWINGS_KEYS, ("files", "outline"))
    if fields is None:
        return []
    outline = fields["outline"]
    if not outline.is_map:
        r.problem(outline, "drawings.outline", f"expected a mapping of outline keys, found {describe(outline)}")
        return []
    for key in ("file", "svg", "points"):
        if key in outline.value:
            r.problem(outline, join("drawings.outline", key),
                      f"'{key}' is not taken here: each drawing that drawings.files matches is one part's outline")
            return []
    files = fields["files"]
    members = []
    for file in _matches(r, files, "drawings.files", spec_dir, "drawing"):
        place = (files.line, files.column)
        keys = {**outline.keys, "file": place}
        part_root = {k: v for k, v in fields.items() if k != "files"}
        part_root["outline"] = YNode({**outline.value, "file": YNode(str(file), *place)}, outline.line, outline.column,
                                     keys)
        part_root["id"] = YNode(f"{set_id}-{file.stem}", *place)
        sub = Reader(r.file, r.units)
        member = read_part(sub, part_root, spec_dir)
        r.problems.extend(replace(p, key="drawings.files" if p.key == "id" else join("drawings", p.key),
                                  message=f"{file.name}: {p.message}" if p.key == "id" else p.message)
                          for p in sub.problems)
        members.append((member, files, "drawings.files"))
    return members
