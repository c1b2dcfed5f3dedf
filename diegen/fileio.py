"""Atomic file output: write to a temporary name in the same folder, then rename; input files that must be plain.

A build that fails or is interrupted never leaves a half-written file and
never destroys the previous good one.
"""

from __future__ import annotations

import os
import stat
import tempfile
from collections.abc import Callable
from contextlib import contextmanager
from pathlib import Path
from typing import Iterator

from diegen.errors import DiegenError

_UMASK = os.umask(0)
os.umask(_UMASK)
_CLOEXEC = getattr(os, "O_CLOEXEC", 0)


@contextmanager
def atomic_path(target: str | os.PathLike[str]) -> Iterator[Path]:
    """Yield a temporary path beside ``target``; rename it over ``target`` on success.

    The temporary keeps the target's suffix so libraries that pick a format by
    extension (STEP, STL, PDF) still work.  On any exception the temporary is
    removed and ``target`` is left as it was.
    """
    target = Path(target)
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.stem}.", suffix=f".part{target.suffix}", dir=target.parent)
    os.fchmod(fd, 0o666 & ~_UMASK)  # mkstemp makes 0600; outputs are ordinary files
    os.close(fd)
    tmp_path = Path(tmp)
    try:
        yield tmp_path
        with open(tmp_path, "rb") as handle:
            os.fsync(handle.fileno())
        os.replace(tmp_path, target)
    except BaseException:
        tmp_path.unlink(missing_ok=True)
        raise


def write_bytes(target: str | os.PathLike[str], data: bytes) -> None:
    """Atomically write ``data`` to ``target``."""
    with atomic_path(target) as tmp:
        tmp.write_bytes(data)


def write_text(target: str | os.PathLike[str], text: str) -> None:
    """Atomically write UTF-8 ``text`` to ``target``."""
    write_bytes(target, text.encode("utf-8"))


def write_with(target: str | os.PathLike[str], writer: Callable[[Path], None]) -> None:
    """Atomically produce ``target`` by calling ``writer(temporary_path)``."""
    with atomic_path(target) as tmp:
        writer(tmp)


def refuse_foreign(paths: "list[Path] | tuple[Path, ...]", claimed: bool) -> None:
    """Refuse to overwrite existing files unless this folder is one diegen has claimed before.

    ``claimed`` is True when the build's manifest already records the piece
    (diegen wrote or started writing it); otherwise any existing file is
    somebody else's and is never replaced.
    """
    from diegen.errors import OutputError

    if claimed:
        return
    for path in paths:
        if Path(path).exists():
            raise OutputError(f"{path}: exists and was not written by diegen; move it away or choose another -o")


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
