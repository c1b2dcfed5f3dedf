"""One build at a time per output folder, and the clean-up of what a killed build left behind."""

from __future__ import annotations

import fnmatch
import os
import stat
from pathlib import Path

from diegen.errors import DiegenError, OutputError
from diegen.fileio import TEMPORARY_MARK, reason, remove_file

LOCK = ".diegen.lock"


class BuildLock:
    """Exclusive lock on a spec's output folder; a second build is refused with a clear message.

    The folder and any missing parents are made on entry; on exit, when nothing but the lock is in it, the lock
    and every folder this lock made are removed again (no empty folder is left behind).
    """

    def __init__(self, folder: Path):
        self.path = folder / LOCK
        self.fd: int | None = None
        self.made: list[Path] = []

    def __enter__(self) -> BuildLock:
        import fcntl

        folder = self.path.parent
        try:
            self.made = _make_folders(folder)
            # never through a link: a lock file that is a link is refused, not followed
            self.fd = os.open(self.path, os.O_RDWR | os.O_CREAT | getattr(os, "O_NOFOLLOW", 0) | os.O_CLOEXEC, 0o666)
        except OSError as error:
            self._remove_made()
            if isinstance(error, DiegenError):
                raise
            if os.path.islink(self.path):
                raise OutputError(f"{self.path}: is a symbolic link to {os.readlink(self.path)}; diegen's lock "
                                  "file must be a plain file (remove the link)") from None
            raise OutputError(f"{error.filename or folder}: cannot make the output folder "
                              f"({reason(error)})") from None
        try:
            fcntl.flock(self.fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(self.fd)
            raise OutputError(f"{folder}: another diegen build is writing here; wait for it to finish") from None
        return self

    def __exit__(self, *exc: object) -> None:
        assert self.fd is not None
        os.close(self.fd)
        folder = self.path.parent
        if [p.name for p in folder.iterdir()] == [LOCK]:  # nothing was built: leave no empty folder behind
            os.unlink(self.path)  # removes the name, never follows it
            self._remove_made()

    def _remove_made(self) -> None:
        for made in reversed(self.made):
            try:
                os.rmdir(made)  # only an empty folder, never through a link
            except OSError:
                break


def _make_folders(folder: Path) -> list[Path]:
    """Make ``folder`` and its missing parents; the folders made, outermost first."""
    missing = []
    probe = folder
    while not os.path.lexists(probe) and probe != probe.parent:
        missing.append(probe)
        probe = probe.parent
    made = []
    try:
        for path in reversed(missing):
            try:
                os.mkdir(path)
            except FileExistsError:
                if os.path.isdir(path) and not os.path.islink(path):
                    continue  # another build made it meanwhile (two specs into one output folder): not ours
                raise
            made.append(path)
    except OSError:
        for path in reversed(made):
            os.rmdir(path)
        raise
    if not os.path.isdir(folder):
        raise OutputError(f"{folder}: is {_what(folder)}, expected a folder to write into")
    return made


def _what(path: Path) -> str:
    from diegen.fileio import kind_of

    try:
        return kind_of(os.stat(path).st_mode)
    except OSError as error:
        return f"not reachable ({reason(error)})"


def remove_stale_temporaries(folder: Path) -> None:
    """Delete temporaries a killed build left behind (``.name.*.part.ext``, see :mod:`diegen.fileio`).

    Only plain files are removed and no link is followed: a link (to a folder or file) is left alone.
    """
    for where, _folders, files in os.walk(folder, followlinks=False):
        for name in files:
            if fnmatch.fnmatch(name, f".*{TEMPORARY_MARK}*"):
                path = Path(where) / name
                if stat.S_ISREG(os.lstat(path).st_mode):
                    remove_file(path)


__all__ = ["LOCK", "BuildLock", "remove_stale_temporaries"]
