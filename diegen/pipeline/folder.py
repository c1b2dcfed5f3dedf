"""The output folder checked before anything is written: a folder (or nothing yet), reachable, writable, and not
so deep that the build's file names would pass the file system's limits."""

from __future__ import annotations

import errno
import os
import stat
from collections.abc import Iterable
from pathlib import Path

from diegen.errors import OutputError
from diegen.fileio import TEMPORARY_MARK, kind_of, reason

NAME_MAX, PATH_MAX = 255, 4096  # POSIX-typical limits, used when the file system does not say


def longest_file_name(part_id: str) -> str:
    """The longest name the build gives a file of ``part_id``: a die tile's temporary (see :mod:`diegen.fileio`)."""
    return f".{part_id}-die-tile999.{'0' * 8}{TEMPORARY_MARK}.step"


def check_output_folder(out: Path, spec_id: str, part_ids: Iterable[str]) -> None:
    """Refuse ``out`` (the ``-o`` folder) unless the build of ``spec_id`` can be written into ``out/spec_id``.

    Raises :class:`OutputError` saying what the path is and what was expected, before anything is made.
    """
    absolute = Path(os.path.abspath(out))
    folder = absolute / spec_id
    existing = _existing_ancestor(folder)
    _check_lengths(out, spec_id, existing, max(part_ids, key=len, default=spec_id))
    for path in [*reversed(folder.parents), folder]:
        try:
            mode = os.stat(path).st_mode
        except FileNotFoundError:
            break
        except OSError as error:
            if error.errno == errno.ELOOP:
                raise OutputError(f"{_shown(path, out, spec_id)}: is a symbolic link that leads round in a loop, "
                                  "expected a folder (-o)") from None
            raise OutputError(f"{_shown(path, out, spec_id)}: cannot be reached ({reason(error)}), expected a "
                              "folder to write into (-o)") from None
        if stat.S_ISDIR(mode):
            continue
        what = kind_of(mode)
        if path == absolute:
            raise OutputError(f"{_shown(absolute, out, spec_id)}: is {what}, expected a folder to write the build "
                              "into (-o)")
        if path == folder:
            raise OutputError(f"{_shown(folder, out, spec_id)}: is {what}, expected the output folder of spec "
                              f"{spec_id!r} (or nothing) at this name")
        raise OutputError(f"{_shown(absolute, out, spec_id)}: {path} is {what}, so no folder can be made there (-o)")
    deepest = folder if os.path.isdir(folder) else existing
    if not _writable(deepest):
        if _read_only_file_system(deepest):
            raise OutputError(f"{_shown(deepest, out, spec_id)}: is on a read-only file system; the build cannot be "
                              "written there (-o)")
        raise OutputError(f"{_shown(deepest, out, spec_id)}: folder is not writable (permission denied); choose "
                          "another -o or change the folder's permissions")


def _existing_ancestor(path: Path) -> Path:
    """The deepest of ``path`` and its parents that exists (and is a folder: a file stops the search above it)."""
    probe = path
    while probe != probe.parent and not os.path.isdir(probe):
        probe = probe.parent
    return probe


def _check_lengths(out: Path, spec_id: str, existing: Path, longest_part: str) -> None:
    absolute = Path(os.path.abspath(out))
    folder = absolute / spec_id
    try:
        name_max = os.pathconf(existing, "PC_NAME_MAX")
        path_max = os.pathconf(existing, "PC_PATH_MAX")
    except (OSError, ValueError):
        name_max, path_max = NAME_MAX, PATH_MAX
    for part in (*folder.parts[1:], longest_part, longest_file_name(longest_part)):
        size = len(os.fsencode(part))
        if size > name_max:
            shown = part if len(part) <= 40 else part[:37] + "..."
            raise OutputError(f"{_shown(absolute, out, spec_id)}: the name {shown!r} is {size} bytes long; this file "
                              f"system allows at most {name_max} bytes in a name (-o)")
    size = len(os.fsencode(folder / longest_part / longest_file_name(longest_part)))
    if size >= path_max:
        raise OutputError(f"{_shown(absolute, out, spec_id)}: too long a path for this file system: the build's "
                          f"deepest file would have a path of {size} bytes, and the limit is {path_max - 1}; choose a "
                          "shorter -o")


def _shown(path: Path, out: Path, spec_id: str) -> str:
    """``path`` as the user wrote it where possible (relative ``-o`` stays relative), its middle left out when long."""
    absolute = Path(os.path.abspath(out))
    text = str(out / spec_id) if path == absolute / spec_id else str(out) if path == absolute else str(path)
    return text if len(text) <= 120 else f"{text[:60]}...{text[-50:]}"


def _writable(folder: Path) -> bool:
    effective = os.access in os.supports_effective_ids
    return os.access(folder, os.W_OK | os.X_OK, effective_ids=effective)


def _read_only_file_system(folder: Path) -> bool:
    try:
        return bool(os.statvfs(folder).f_flag & os.ST_RDONLY)
    except (OSError, AttributeError):
        return False


__all__ = ["check_output_folder", "longest_file_name"]
