"""One build at a time per output folder, and the clean-up of what a killed build left behind."""

from __future__ import annotations

from pathlib import Path
from typing import IO

from diegen.errors import OutputError

LOCK = ".diegen.lock"


class BuildLock:
    """Exclusive lock on a spec's output folder; a second build is refused with a clear message."""

    def __init__(self, folder: Path):
        self.path = folder / LOCK
        self.handle: IO[str] | None = None
        self.created: list[Path] = []  # folders this build made, outermost last

    def __enter__(self) -> BuildLock:
        import fcntl

        folder = self.path.parent
        while not folder.exists():
            self.created.append(folder)
            folder = folder.parent
        self.path.parent.mkdir(parents=True, exist_ok=True)
        self.handle = open(self.path, "a+")
        try:
            fcntl.flock(self.handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            self.handle.close()
            raise OutputError(f"{self.path.parent}: another diegen build is writing here; wait for it to finish") from None
        return self

    def __exit__(self, *exc: object) -> None:
        assert self.handle is not None
        self.handle.close()
        folder = self.path.parent
        if [p.name for p in folder.iterdir()] == [LOCK]:  # nothing was built: leave no empty folder behind
            self.path.unlink(missing_ok=True)
            folder.rmdir()
            for parent in self.created[1:]:  # nor the output folders made for it
                if parent.is_dir() and not any(parent.iterdir()):
                    parent.rmdir()


def remove_stale_temporaries(folder: Path) -> None:
    """Delete temporaries a killed build left behind (``.name.*.part.ext``, see :mod:`diegen.fileio`)."""
    for path in folder.rglob(".*.part*"):
        if path.is_file():
            path.unlink(missing_ok=True)


__all__ = ["LOCK", "BuildLock", "remove_stale_temporaries"]
