"""Atomic file output: write to a temporary name in the same folder, then rename.

A build that fails or is interrupted never leaves a half-written file and
never destroys the previous good one.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from contextlib import contextmanager
from pathlib import Path
from typing import Iterator


_UMASK = os.umask(0)
os.umask(_UMASK)


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
