"""File input and output: atomic writes kept inside the output folder, and input files that must be plain files.

Every output is written to a temporary name in the folder of its final name, then renamed over it, so a build
that fails or is interrupted never leaves a half-written file and never destroys the previous good one.

While a build runs, every path written, renamed or removed through this module must resolve (following every
symbolic link) to a place inside the output folder given to :func:`confined_to`; anything else is refused with
an :class:`~diegen.errors.OutputError` naming the path and where it leads.  Temporaries are created exclusively
and never through a link (``O_CREAT | O_EXCL | O_NOFOLLOW``); removals never follow a link.
"""

from __future__ import annotations

import os
import secrets
import stat
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path

from diegen.errors import DiegenError, OutputError

_ROOT: Path | None = None  # the resolved output folder of the build in progress (None: no limit)
_NOFOLLOW = getattr(os, "O_NOFOLLOW", 0)
_CLOEXEC = getattr(os, "O_CLOEXEC", 0)
TEMPORARY_MARK = ".part"  # temporaries are ``.<stem>.<random>.part<suffix>``


# -- the output folder ------------------------------------------------------
@contextmanager
def confined_to(folder: str | os.PathLike[str]) -> Iterator[Path]:
    """Refuse, meanwhile, every write, rename or removal through this module that leads outside ``folder``.

    ``folder`` is resolved once, here: the limit is the real folder it names now.
    """
    global _ROOT  # noqa: PLW0603 - one build per process confines its writes; workers set it per piece
    previous, _ROOT = _ROOT, Path(folder).resolve()
    try:
        yield _ROOT
    finally:
        _ROOT = previous


def output_root() -> Path | None:
    """The resolved output folder every path must stay inside (None outside a build)."""
    return _ROOT


def reason(error: OSError) -> str:
    """The operating system's words for ``error`` ("Permission denied"), without its Python dressing."""
    return error.strerror or str(error)


def kind_of(mode: int) -> str:
    """What a ``stat`` mode is, in words: "a folder", "a named pipe (FIFO)", ..."""
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode):
        return "a character device"
    if stat.S_ISBLK(mode):
        return "a block device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISLNK(mode):
        return "a symbolic link"
    return "a file"


def _escape(path: Path, real: Path, root: Path) -> str:
    """Why ``path`` (resolving to ``real``) is outside ``root``: the first link on the way that leads out."""
    parts = path.parts
    for i in range(1, len(parts) + 1):
        prefix = Path(*parts[:i])
        if os.path.islink(prefix):
            target = os.path.realpath(prefix)
            if not _is_within(Path(target), root) and not _is_within(root, Path(target)):
                link = os.readlink(prefix)
                leads = link if link == target else f"{link} (that is, {target})"
                return (f"{prefix}: is a symbolic link to {leads}, outside the output folder {root}; refusing to "
                        "write there")
    return f"{path}: leads to {real}, outside the output folder {root}; refusing to write there"


def _is_within(path: Path, root: Path) -> bool:
    return path == root or path.is_relative_to(root)


def inside(path: str | os.PathLike[str]) -> Path:
    """``path`` resolved through every link; refused when a build is running and it leads outside its folder."""
    given = Path(path)
    try:
        real = given.resolve()
    except (OSError, RuntimeError) as error:  # a loop of links
        raise OutputError(f"{given}: cannot be followed ({error}); refusing to write there") from None
    root = _ROOT
    if root is not None and not _is_within(real, root):
        raise OutputError(_escape(given, real, root))
    return real


def make_folder(folder: str | os.PathLike[str]) -> None:
    """Create ``folder`` and any missing parents, each checked to lie inside the output folder."""
    inside(folder)
    Path(folder).mkdir(parents=True, exist_ok=True)
    inside(folder)  # nothing was swapped for a link meanwhile


def _check_target(target: Path) -> None:
    inside(target)
    try:
        mode = os.lstat(target).st_mode
    except FileNotFoundError:
        return
    if stat.S_ISDIR(mode):
        raise OutputError(f"{target}: is a folder, expected a file (or nothing) at this name")


def _create_temporary(target: Path) -> tuple[int, Path]:
    """A new empty temporary beside ``target``, created exclusively and never through a link."""
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | _NOFOLLOW | _CLOEXEC
    for _ in range(100):
        tmp = target.with_name(f".{target.stem}.{secrets.token_hex(4)}{TEMPORARY_MARK}{target.suffix}")
        try:
            return os.open(tmp, flags, 0o666), tmp  # the umask applies, as for any ordinary file
        except FileExistsError:
            continue
    raise OutputError(f"{target}: could not find a free temporary name beside it")


def _sync(fd: int, tmp: Path) -> None:
    """Flush the finished temporary to disk; refuse it if the writer left anything but a plain file there."""
    st = os.lstat(tmp)
    if not stat.S_ISREG(st.st_mode):
        raise OutputError(f"{tmp}: became {kind_of(st.st_mode)} while it was written; refusing to keep it")
    mine = os.fstat(fd)
    if (mine.st_dev, mine.st_ino) == (st.st_dev, st.st_ino):
        os.fsync(fd)
        return
    other = os.open(tmp, os.O_RDONLY | _NOFOLLOW | _CLOEXEC)  # the writer replaced the file: sync its own
    try:
        os.fsync(other)
    finally:
        os.close(other)


@contextmanager
def _replacing(target: str | os.PathLike[str]) -> Iterator[tuple[int, Path]]:
    """A temporary beside ``target`` (open descriptor and path), renamed over ``target`` on success.

    On any exception the temporary is removed and ``target`` is left as it was; an operating-system error
    becomes an :class:`OutputError` that names the file.
    """
    target = Path(target)
    try:
        make_folder(target.parent)
        _check_target(target)
        fd, tmp = _create_temporary(target)
    except DiegenError:
        raise
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({reason(error)})") from None
    try:
        yield fd, tmp
        _sync(fd, tmp)
        _check_target(target)  # again, right before the rename
        inside(tmp.parent)
        os.replace(tmp, target)
    except BaseException as error:
        _discard(tmp)
        if isinstance(error, OSError) and not isinstance(error, DiegenError):
            raise OutputError(f"{target}: cannot write ({reason(error)})") from None
        raise
    finally:
        os.close(fd)


def _discard(tmp: Path) -> None:
    try:
        if stat.S_ISREG(os.lstat(tmp).st_mode):
            os.unlink(tmp)
    except OSError:
        pass


@contextmanager
def atomic_path(target: str | os.PathLike[str]) -> Iterator[Path]:
    """Yield a temporary path beside ``target``; rename it over ``target`` on success.

    The temporary keeps the target's suffix so libraries that pick a format by
    extension (STEP, STL, PDF) still work.  On any exception the temporary is
    removed and ``target`` is left as it was.
    """
    with _replacing(target) as (_, tmp):
        yield tmp


def write_bytes(target: str | os.PathLike[str], data: bytes) -> None:
    """Atomically write ``data`` to ``target``."""
    with _replacing(target) as (fd, _):
        view = memoryview(data)
        while view:
            view = view[os.write(fd, view):]


def write_text(target: str | os.PathLike[str], text: str) -> None:
    """Atomically write UTF-8 ``text`` to ``target``."""
    write_bytes(target, text.encode("utf-8"))


def write_with(target: str | os.PathLike[str], writer: Callable[[Path], None]) -> None:
    """Atomically produce ``target`` by calling ``writer(temporary_path)``."""
    with atomic_path(target) as tmp:
        writer(tmp)


def remove_file(path: str | os.PathLike[str]) -> bool:
    """Delete ``path`` if it is a plain file in a folder inside the output folder; a link, a folder or anything
    else is left alone (never removed, never followed).  True when a file was removed."""
    path = Path(path)
    inside(path.parent)
    try:
        if not stat.S_ISREG(os.lstat(path).st_mode):
            return False
        os.unlink(path)
    except FileNotFoundError:
        return False
    return True


def remove_empty_folder(folder: str | os.PathLike[str]) -> bool:
    """Remove ``folder`` if it is an empty folder (not a link to one) inside the output folder."""
    folder = Path(folder)
    inside(folder.parent)
    try:
        if not stat.S_ISDIR(os.lstat(folder).st_mode) or any(os.scandir(folder)):
            return False
        os.rmdir(folder)
    except OSError:
        return False
    return True


def refuse_foreign(paths: list[Path] | tuple[Path, ...], claimed: bool) -> None:
    """Refuse to overwrite existing files unless this folder is one diegen has claimed before.

    ``claimed`` is True when the build's manifest already records the piece
    (diegen wrote or started writing it); otherwise any existing file (or link)
    is somebody else's and is never replaced.  A name that leads outside the
    output folder is refused either way.
    """
    for path in paths:
        inside(path)
        if not claimed and os.path.lexists(path):
            raise OutputError(f"{path}: exists and was not written by diegen; move it away or choose another -o")


# -- input files ------------------------------------------------------------
class UnusableInput(DiegenError, OSError):
    """An input path that is not a plain file that can be read; ``problem`` says what it is instead."""

    def __init__(self, path: Path, problem: str):
        self.path, self.problem = path, problem
        super().__init__(f"{path}: {problem}")


def read_plain_file(path: str | os.PathLike[str], max_bytes: int, expected: str) -> bytes:
    """The bytes of the plain file at ``path``; raise :class:`UnusableInput` for anything else.

    Missing, a folder, a named pipe, a device or a socket, larger than ``max_bytes``, or unreadable: the
    problem says which, and what was ``expected`` ("a YAML spec file").  A named pipe or a device is never
    opened (opening one may wait for a writer forever, or never end).
    """
    path = Path(path)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise UnusableInput(path, f"file not found, expected {expected}") from None
    except OSError as error:
        raise UnusableInput(path, f"cannot read file ({reason(error)}), expected {expected}") from None
    check_plain_file(path, st, max_bytes, expected)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | _CLOEXEC)
    except OSError as error:
        raise UnusableInput(path, f"cannot read file ({reason(error)})") from None
    try:
        check_plain_file(path, os.fstat(fd), max_bytes, expected)  # the same file as checked above
        chunks, size = [], 0
        while chunk := os.read(fd, 1 << 20):
            chunks.append(chunk)
            size += len(chunk)
            if size > max_bytes:
                raise UnusableInput(path, f"grew past {max_bytes} bytes while it was read, expected {expected}")
    except DiegenError:
        raise
    except OSError as error:
        raise UnusableInput(path, f"cannot read file ({reason(error)})") from None
    finally:
        os.close(fd)
    return b"".join(chunks)


def check_plain_file(path: Path, st: os.stat_result, max_bytes: int, expected: str) -> None:
    """Refuse ``st`` (of ``path``) unless it is a plain file of at most ``max_bytes``."""
    if not stat.S_ISREG(st.st_mode):
        raise UnusableInput(path, f"is {kind_of(st.st_mode)}, expected {expected}")
    if st.st_size > max_bytes:
        raise UnusableInput(path, f"file is {st.st_size} bytes, larger than the {_size(max_bytes)} limit for "
                                  f"{expected}")


def _size(n: int) -> str:
    return f"{n // 2**20} MB" if n >= 2**20 and n % 2**20 == 0 else f"{n // 1000} kB" if n % 1000 == 0 else f"{n} bytes"


__all__ = ["UnusableInput", "atomic_path", "check_plain_file", "confined_to", "inside", "kind_of", "make_folder",
           "output_root", "read_plain_file", "reason", "refuse_foreign", "remove_empty_folder", "remove_file",
           "write_bytes", "write_text", "write_with"]
