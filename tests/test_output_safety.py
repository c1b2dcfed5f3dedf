"""The output folder is safe, and input paths that are not plain files are refused.

* No write leaves ``<out>/<spec id>``: a piece folder or a file that is a symbolic link leading outside fails that
  piece with a message naming the link and where it leads, the other pieces build, and the place outside is left
  exactly as it was (nothing written, renamed or removed there).  Temporaries are created exclusively, never
  through a link; clean-ups never remove through a link.
* The manifest vouches for content: every file's size and SHA-256 are recorded, and a file truncated, edited or
  replaced on disk makes its piece be rebuilt, with the file and the reason in the summary.
* An ``-o`` that cannot hold the build gets a located, truthful message and exit 2 with nothing written: a file,
  a folder that cannot be written, a path too long for the file system.
* An airfoil ``file:`` (or the spec itself) that is a folder, a named pipe, a device or too large is refused with
  what it is and what was expected; a named pipe or device is never opened.

Builds use the stand-in die writer of ``conftest.py`` (the kernel is tested elsewhere).
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tempfile
from dataclasses import replace
from pathlib import Path

import pytest
from testing import DEMO_RIB

from diegen import api, cli
from diegen.errors import OutputError, SpecError
from diegen.fileio import UnusableInput, confined_to, read_plain_file, write_text
from diegen.pipeline.lock import remove_stale_temporaries
from diegen.pipeline.manifest import RACY_NS, FileStamp


def _two_pieces(spec):
    """The demo rib with only its nose and tail (quicker; enough to show one piece failing beside another)."""
    return replace(spec, shared=replace(spec.shared, pieces=("nose", "tail")))


def _snapshot(folder: Path) -> dict[str, tuple[bytes, int]]:
    """Every entry under ``folder`` (not following links): content and modification time, or the link text."""
    found = {}
    for path in sorted(folder.rglob("*")):
        key = str(path.relative_to(folder))
        if path.is_symlink():
            found[key] = (os.readlink(path).encode(), 0)
        elif path.is_file():
            found[key] = (path.read_bytes(), path.stat().st_mtime_ns)
        else:
            found[key] = (b"<folder>", 0)
    return found


def _status(result) -> dict[str, str]:
    return {o.part_id: o.status for o in result.outcomes}


# -- no write leaves the output folder ----------------------------------------------------------------
def test_piece_folder_linked_outside_fails_that_piece_and_leaves_the_outside_alone(tmp_path, spec, fake_solids):
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (elsewhere / "T1-nose-blank.dxf").write_text("somebody's drawing")  # a name the nose would write
    (tmp_path / "out" / "T1").mkdir(parents=True)
    (tmp_path / "out" / "T1" / "T1-nose").symlink_to(elsewhere)
    before = _snapshot(elsewhere)
    result = api.build(_two_pieces(spec), tmp_path / "out", jobs=1, die_writer=fake_solids)
    assert _status(result) == {"T1-nose": "failed", "T1-tail": "built"}
    error = result.failed[0].error
    assert error == (f"{tmp_path / 'out' / 'T1' / 'T1-nose'}: is a symbolic link to {elsewhere}, outside the output "
                     f"folder {(tmp_path / 'out' / 'T1').resolve()}; refusing to write there")
    assert f"FAILED     T1-nose: {error}" in result.summary()
    assert _snapshot(elsewhere) == before
    assert fake_solids == ["T1-tail"]  # the nose's die writer never ran


def test_piece_folder_swapped_for_a_link_after_a_build_is_not_trusted(tmp_path, spec, fake_solids):
    """The nose's folder moved elsewhere and linked back: the manifest no longer vouches for it, the rebuild
    refuses to write through the link, and the moved files (now outside) are neither rewritten nor removed."""
    out = tmp_path / "out"
    api.build(_two_pieces(spec), out, jobs=1, die_writer=fake_solids)
    elsewhere = tmp_path / "elsewhere"
    shutil.move(out / "T1" / "T1-nose", elsewhere)
    (out / "T1" / "T1-nose").symlink_to(elsewhere)
    before = _snapshot(elsewhere)
    result = api.build(_two_pieces(spec), out, jobs=1, die_writer=fake_solids)
    assert _status(result) == {"T1-nose": "failed", "T1-tail": "unchanged"}
    assert "T1-nose: is a symbolic link to" in result.failed[0].error
    assert _snapshot(elsewhere) == before


def test_file_linked_outside_fails_its_piece(tmp_path, spec, fake_solids):
    out = tmp_path / "out"
    api.build(_two_pieces(spec), out, jobs=1, die_writer=fake_solids)
    outside = tmp_path / "outside.svg"
    outside.write_text("not diegen's")
    svg = out / "T1" / "T1-tail" / "T1-tail-blank.svg"
    svg.unlink()
    svg.symlink_to(Path("..") / ".." / ".." / "outside.svg")  # relative: leads to tmp_path/outside.svg
    fake_solids.clear()
    result = api.build(_two_pieces(spec), out, jobs=1, die_writer=fake_solids)
    assert _status(result) == {"T1-nose": "unchanged", "T1-tail": "failed"}
    assert result.failed[0].error == (f"{svg}: is a symbolic link to ../../../outside.svg (that is, {outside}), "
                                      f"outside the output folder {(out / 'T1').resolve()}; refusing to write there")
    assert outside.read_text() == "not diegen's" and svg.is_symlink()
    assert fake_solids == []  # refused before anything was written
    # the earlier build's plain files are removed, the link is left (neither followed nor removed), a note says why
    manifest = json.loads((out / "T1" / "manifest.json").read_text())
    assert manifest["pieces"]["T1-tail"]["status"] == "failed" and manifest["pieces"]["T1-tail"]["files"] == []
    assert sorted(p.name for p in (out / "T1" / "T1-tail").iterdir()) == ["FAILED.txt", "T1-tail-blank.svg"]
    assert "symbolic link" in (out / "T1" / "T1-tail" / "FAILED.txt").read_text()


def test_a_write_through_a_linked_folder_is_refused_before_a_temporary_is_made(tmp_path):
    root, elsewhere = tmp_path / "root", tmp_path / "elsewhere"
    root.mkdir()
    elsewhere.mkdir()
    (root / "piece").symlink_to(elsewhere)
    with confined_to(root):
        with pytest.raises(OutputError, match=r"piece: is a symbolic link to .*elsewhere, outside the output folder"):
            write_text(root / "piece" / "a.txt", "x")
        with pytest.raises(OutputError, match="outside the output folder"):
            write_text(root / ".." / "escaped.txt", "x")
        write_text(root / "inside" / "a.txt", "kept")  # a new folder inside is fine
    assert list(elsewhere.iterdir()) == [] and not (tmp_path / "escaped.txt").exists()
    assert (root / "inside" / "a.txt").read_text() == "kept"


def test_temporaries_are_created_exclusively_never_through_a_link(tmp_path, monkeypatch):
    """A link already at the temporary's name is neither followed nor replaced: another name is taken."""
    names = iter(["deadbeef", "cafef00d"])
    monkeypatch.setattr("diegen.fileio.secrets.token_hex", lambda n: next(names))
    root = tmp_path / "root"
    root.mkdir()
    victim = tmp_path / "victim.txt"
    victim.write_text("precious")
    trap = root / ".a.deadbeef.part.txt"
    trap.symlink_to(victim)
    with confined_to(root):
        write_text(root / "a.txt", "written")
    assert victim.read_text() == "precious" and trap.is_symlink()
    assert (root / "a.txt").read_text() == "written" and not (root / ".a.cafef00d.part.txt").exists()


def test_clean_ups_never_remove_through_a_link(tmp_path):
    root, elsewhere = tmp_path / "root", tmp_path / "elsewhere"
    (root / "T1-nose").mkdir(parents=True)
    elsewhere.mkdir()
    outside_temporary = elsewhere / ".T1-x-die.0badc0de.part.step"  # looks like a stale temporary, but is outside
    outside_temporary.write_text("not ours")
    (root / "T1-tail").symlink_to(elsewhere)
    (root / "T1-nose" / ".T1-nose-die.12345678.part.stl").symlink_to(outside_temporary)
    stale = root / "T1-nose" / ".T1-nose-die.87654321.part.step"
    stale.write_text("left by a killed build")
    with confined_to(root):
        remove_stale_temporaries(root)
    assert not stale.exists()
    assert outside_temporary.read_text() == "not ours"
    assert (root / "T1-nose" / ".T1-nose-die.12345678.part.stl").is_symlink()


def test_lock_and_manifest_that_are_links_are_refused(tmp_path, spec, fake_solids):
    outside = tmp_path / "outside.json"
    folder = tmp_path / "out" / "T1"
    folder.mkdir(parents=True)
    (folder / ".diegen.lock").symlink_to(outside)
    with pytest.raises(OutputError, match=r"\.diegen\.lock: is a symbolic link to .*outside\.json"):
        api.build(_two_pieces(spec), tmp_path / "out", jobs=1, die_writer=fake_solids)
    assert not outside.exists()
    (folder / ".diegen.lock").unlink()
    outside.write_text("{}")
    (folder / "manifest.json").symlink_to(outside)
    with pytest.raises(OutputError, match=r"manifest\.json: is a symbolic link to .*outside the output folder"):
        api.build(_two_pieces(spec), tmp_path / "out", jobs=1, die_writer=fake_solids)
    assert outside.read_text() == "{}" and fake_solids == []


# -- the manifest vouches for content ------------------------------------------------------------------
def test_manifest_records_size_and_sha256_of_every_file(tmp_path, spec, fake_solids):
    import hashlib

    api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    manifest = json.loads((tmp_path / "T1" / "manifest.json").read_text())
    for part, entry in manifest["pieces"].items():
        assert set(entry["stamps"]) == set(entry["files"]) and entry["files"]
        for name, stamp in entry["stamps"].items():
            data = (tmp_path / "T1" / part / name).read_bytes()
            assert stamp["size"] == len(data) and stamp["sha256"] == hashlib.sha256(data).hexdigest()


def test_truncated_die_file_is_rebuilt_and_the_summary_says_why(tmp_path, spec, fake_solids):
    api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    die = tmp_path / "T1" / "T1-nose" / "T1-nose-die.step"
    good = die.read_bytes()
    die.write_bytes((good * 10)[:100])  # the stand-in die is short: make it 100 bytes of something else
    assert die.stat().st_size == 100 != len(good)
    fake_solids.clear()
    result = api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    assert _status(result) == {"T1-nose": "built", "T1-tail": "unchanged"} and fake_solids == ["T1-nose"]
    assert (f"built      T1-nose (T1-nose-die.step changed on disk since it was written: 100 bytes, {len(good)} "
            "when written;") in result.summary()
    assert die.read_bytes() == good
    fake_solids.clear()
    assert _status(api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)) == {
        "T1-nose": "unchanged", "T1-tail": "unchanged"}


def test_edited_file_of_the_same_size_is_rebuilt(tmp_path, spec, fake_solids):
    api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    sheet = tmp_path / "T1" / "T1-tail" / "T1-tail-sheet.md"
    good = sheet.read_text()
    sheet.write_text(good.replace("Caution", "CAUTION", 1))  # same size, other content
    assert sheet.stat().st_size == len(good.encode())
    fake_solids.clear()
    result = api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    assert _status(result) == {"T1-nose": "unchanged", "T1-tail": "built"}
    assert ("T1-tail (T1-tail-sheet.md changed on disk since it was written: its SHA-256 differs from the one "
            "recorded;") in result.summary()
    assert sheet.read_text() == good


def test_missing_file_is_named_in_the_summary(tmp_path, spec, fake_solids):
    api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    (tmp_path / "T1" / "T1-tail" / "T1-tail-blank.pdf").unlink()
    result = api.build(_two_pieces(spec), tmp_path, jobs=1, die_writer=fake_solids)
    assert "built      T1-tail (T1-tail-blank.pdf is missing;" in result.summary()


def test_unchanged_files_are_hashed_only_when_size_or_time_moved(tmp_path, monkeypatch):
    """The cost rule: size and modification time as recorded (and recorded well after the file's last change)
    means the file is not read again; a touched file is read once, then trusted with its new time."""
    path = tmp_path / "a.bin"
    path.write_bytes(b"x" * 1000)
    stamp = FileStamp.of(path)
    reads = []
    real = __import__("diegen.pipeline.manifest", fromlist=["_sha256"])._sha256
    monkeypatch.setattr("diegen.pipeline.manifest._sha256", lambda p: reads.append(p) or real(p))
    assert stamp.check(path) == "" and len(reads) == 1  # just written: within the same clock step, so read
    stamp.hashed_ns = stamp.mtime_ns + RACY_NS + 1  # as if hashed long after the last write
    assert stamp.check(path) == "" and len(reads) == 1  # size and time as recorded: not read
    os.utime(path, ns=(stamp.mtime_ns + 10**9, stamp.mtime_ns + 10**9))
    assert stamp.check(path) == "" and len(reads) == 2  # touched, content the same: read, and the time kept
    assert stamp.mtime_ns == path.stat().st_mtime_ns


# -- odd output paths: located, truthful, exit 2, nothing written ------------------------------------
def _cli(args: list[str], capsys) -> tuple[int, str]:
    code = cli.main(args)
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err and "internal error" not in captured.err, captured.err
    return code, captured.err


def test_output_that_is_a_file_exits_2_and_writes_nothing(tmp_path, capsys):
    target = tmp_path / "out.txt"
    target.write_text("a file")
    before = _snapshot(tmp_path)
    code, err = _cli(["build", str(DEMO_RIB), "-o", str(target), "-q"], capsys)
    assert code == cli.EXIT_BAD_INPUT
    assert err == f"error: {target}: is a file, expected a folder to write the build into (-o)\n"
    assert _snapshot(tmp_path) == before


def test_plots_of_check_refuse_an_output_that_is_a_file(tmp_path, capsys):
    target = tmp_path / "out.txt"
    target.write_text("a file")
    code, err = _cli(["check", str(DEMO_RIB), "--plot", "-o", str(target)], capsys)
    assert code == cli.EXIT_BAD_INPUT
    assert err == f"error: {target}: is a file, expected a folder to write the build into (-o)\n"
    assert target.read_text() == "a file" and [p.name for p in tmp_path.iterdir()] == ["out.txt"]


def test_output_below_a_file_or_where_the_spec_folder_is_a_fifo(tmp_path, spec, fake_solids):
    (tmp_path / "afile").write_text("x")
    with pytest.raises(OutputError, match=r"afile is a file, so no folder can be made there \(-o\)"):
        api.build(spec, tmp_path / "afile" / "out", die_writer=fake_solids)
    (tmp_path / "out").mkdir()
    os.mkfifo(tmp_path / "out" / "T1")
    with pytest.raises(OutputError, match=r"out/T1: is a named pipe \(FIFO\), expected the output folder of spec"):
        api.build(spec, tmp_path / "out", die_writer=fake_solids)
    assert fake_solids == [] and sorted(p.name for p in tmp_path.rglob("*")) == ["T1", "afile", "out"]


def test_output_path_too_long_exits_2_and_makes_no_folder(tmp_path, capsys):
    long_name = tmp_path / "new" / ("x" * 300)
    code, err = _cli(["build", str(DEMO_RIB), "-o", str(long_name), "-q"], capsys)
    assert code == cli.EXIT_BAD_INPUT and "is 300 bytes long; this file system allows at most 255 bytes" in err
    deep = tmp_path / "new" / "/".join(["y" * 200] * 21)
    code, err = _cli(["build", str(DEMO_RIB), "-o", str(deep), "-q"], capsys)
    assert code == cli.EXIT_BAD_INPUT and "too long a path for this file system" in err
    assert "choose a shorter -o" in err and len(err) < 400  # the path is shortened in the message
    assert list(tmp_path.iterdir()) == []


def test_refused_build_leaves_no_empty_folder(tmp_path, fake_solids):
    """A spec that loads but cannot be analysed (a 10 mm skin swallows a 6 % section of 300 mm chord): nothing is
    left, not even the folders the build made on its way in."""
    from test_refusals import rib_yaml

    from diegen.errors import GeometryError

    spec_path = tmp_path / "rib.yaml"
    spec_path.write_text(rib_yaml(airfoil="naca 0006", chord=300, skin=10))
    spec = api.load(spec_path)
    with pytest.raises(GeometryError, match="offsetting the section"):
        api.build(spec, tmp_path / "new" / "deeper", jobs=1, die_writer=fake_solids)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["rib.yaml"]


def _read_only_build(folder: Path, spec) -> str:
    """The message of building into ``folder`` (made read-only) as a user who does not own it."""
    from conftest import StandInDies

    folder.chmod(0o555)
    if os.geteuid() != 0:
        with pytest.raises(OutputError) as caught:
            api.build(spec, folder, jobs=1, die_writer=StandInDies())
        return str(caught.value)
    read, write = os.pipe()
    child = os.fork()
    if child == 0:  # the child: become the unprivileged user, try the build, report the error's text
        message = "no error"
        try:
            os.close(read)
            os.setgid(65534)
            os.setuid(65534)
            api.build(spec, folder, jobs=1, die_writer=StandInDies())
        except BaseException as error:  # noqa: BLE001 - reported to the parent, which asserts on it
            message = f"{type(error).__name__}: {error}"
        finally:
            os.write(write, message.encode())
            os._exit(0)
    os.close(write)
    with os.fdopen(read, "rb") as pipe:
        message = pipe.read().decode()
    os.waitpid(child, 0)
    return message


@pytest.mark.skipif(not hasattr(os, "fork"), reason="needs os.fork to build as another user")
def test_read_only_output_folder_exits_2_and_writes_nothing(spec):
    # A folder readable by everyone (pytest's own temporary folder is private to its owner, so an unprivileged
    # user could not even reach it).
    base = Path(tempfile.mkdtemp(prefix="diegen-ro-"))
    try:
        base.chmod(0o755)
        folder = base / "ro"
        folder.mkdir()
        message = _read_only_build(folder, _two_pieces(spec))
        assert message.removeprefix("OutputError: ") == (
            f"{folder}: folder is not writable (permission denied); choose another -o or change the folder's "
            "permissions"), message
        assert list(folder.iterdir()) == []
    finally:
        (base / "ro").chmod(0o755)
        shutil.rmtree(base)


# -- input paths that are not plain files -------------------------------------------------------------------
@pytest.fixture
def airfoil_spec(tmp_path):
    def spec_for(airfoil: Path) -> Path:
        path = tmp_path / "rib.yaml"
        path.write_text(DEMO_RIB.read_text().replace("airfoil: naca 2412", f"airfoil: {{file: {airfoil}}}"))
        return path

    return spec_for


@pytest.mark.parametrize("kind", ["folder", "fifo", "device", "too large"])
def test_airfoil_path_that_is_not_a_plain_file(tmp_path, airfoil_spec, kind):
    if kind == "folder":
        airfoil, found = tmp_path / "section.dat", "is a folder"
        airfoil.mkdir()
    elif kind == "fifo":
        airfoil, found = tmp_path / "section.dat", "is a named pipe (FIFO)"
        os.mkfifo(airfoil)
    elif kind == "device":
        airfoil, found = Path("/dev/zero"), "is a character device"
    else:
        airfoil, found = tmp_path / "section.dat", f"file is {6 * 2**20} bytes, larger than the 5 MB limit for"
        with open(airfoil, "wb") as handle:
            handle.truncate(6 * 2**20)  # sparse
    spec_path = airfoil_spec(airfoil)
    line = next(i for i, text in enumerate(spec_path.read_text().splitlines(), 1) if text.startswith("airfoil:"))
    with pytest.raises(SpecError) as caught:
        api.load(spec_path)
    (problem,) = caught.value.problems
    assert (problem.file, problem.line, problem.key) == (str(spec_path), line, "airfoil.file")
    assert problem.message == f"airfoil file {airfoil}: {found}" + (
        " a plain-text airfoil coordinate file" if kind == "too large" else
        ", expected a plain-text airfoil coordinate file")
    assert "not found" not in problem.message


def test_airfoil_fifo_and_device_never_hang_the_command_line(tmp_path, airfoil_spec):
    fifo = tmp_path / "pipe.dat"
    os.mkfifo(fifo)
    for airfoil in (fifo, Path("/dev/zero")):
        run = subprocess.run([sys.executable, "-m", "diegen.cli", "build", str(airfoil_spec(airfoil)), "-o",
                              str(tmp_path / "out"), "-q"], capture_output=True, text=True, timeout=60, check=False)
        assert run.returncode == cli.EXIT_BAD_INPUT and "Traceback" not in run.stderr
        assert "airfoil.file: airfoil file" in run.stderr and "expected a plain-text airfoil" in run.stderr
    assert not (tmp_path / "out").exists()


def test_reading_a_pipe_or_device_directly_is_refused_unopened(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)  # opening it to read would wait for a writer forever
    for path, what in ((fifo, "is a named pipe (FIFO)"), (Path("/dev/zero"), "is a character device"),
                       (tmp_path, "is a folder")):
        with pytest.raises(UnusableInput, match=rf"^{path}: {what.replace('(', '[(]').replace(')', '[)]')}, "
                                                r"expected a spec"):
            read_plain_file(path, 1000, "a spec")


def test_spec_path_that_is_a_pipe_exits_2(tmp_path):
    fifo = tmp_path / "rib.yaml"
    os.mkfifo(fifo)
    run = subprocess.run([sys.executable, "-m", "diegen.cli", "check", str(fifo)], capture_output=True, text=True,
                         timeout=60, check=False)
    assert run.returncode == cli.EXIT_BAD_INPUT
    assert run.stderr.startswith(f"error: {fifo}: is a named pipe (FIFO), expected a YAML spec file\n")
