"""Refusals found after the schema, located in the spec file: ``file:line:col: key: message``.

The schema's own problems carry their place already.  A refusal found later — a bend radius below the table, a
flange too short for its bend, an offset that collapses the section, an airfoil file that crosses itself, a hole
with no web — is located by the spec key at fault: the error's own ``key`` where its raiser knew it, else the key
the refusing function is about (``KEY_OF_FUNCTION``), else the airfoil for an airfoil error.  A wing's rib looks
the key up in the override that applies to it first (see :class:`diegen.spec.model.SpecPositions`).
"""

from __future__ import annotations

import traceback
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from diegen.errors import AirfoilError, DiegenError, FormingError, GeometryError, SpecError

# the spec key a pure function's refusal is about, when its raiser does not know the spec
KEY_OF_FUNCTION = {
    "check_radius": "flange.bend_radius",
    "min_bend_radius": "sheet.thickness",
    "flange_layout": "flange.height",
    "die_for_part": "flange.bend_radius",
    "springback_forward": "flange.bend_radius",
    "rib_spec": "spars",
}


def _origin_key(error: BaseException) -> str:
    for frame in reversed(traceback.extract_tb(error.__traceback__)):
        if frame.name in KEY_OF_FUNCTION:
            return KEY_OF_FUNCTION[frame.name]
    return ""


def _airfoil_key(error: BaseException, spec: Any) -> str:
    text = str(error)
    for key, source in (("airfoil.root", getattr(spec, "root_airfoil", None)),
                        ("airfoil.tip", getattr(spec, "tip_airfoil", None))):
        if source is not None and source.file and source.file in text:
            return key
    return "airfoil"


def located(error: DiegenError, spec: Any) -> DiegenError:
    """``error`` with its message starting ``file:line:col: key:`` (unchanged if it is located already)."""
    if isinstance(error, SpecError) or getattr(error, "located", False):
        return error
    key = error.key or _origin_key(error) or (_airfoil_key(error, spec) if isinstance(error, AirfoilError) else "")
    if not key and not isinstance(error, (AirfoilError, FormingError, GeometryError)):
        return error  # not about the spec's content (an output folder, the kernel)
    message = str(error)
    file = spec.file
    if file and message.startswith(f"{file}: "):
        message = message[len(file) + 2:]
    if not key:
        where = file or "<spec>"
    else:
        found_file, line, column = spec.positions.where(key)
        where = ":".join(str(v) for v in (found_file or file or "<spec>", line, column) if v is not None)
        if not message.startswith(key):  # else "pins[0] at (...)": the key leads the message already
            if message.count(f"{key}: ") == 1:  # "rib R1: flange.bend_radius: ..."
                message = message.replace(f"{key}: ", "", 1)
            message = f"{key}: {message}"
    result = type(error)(f"{where}: {message}", key=key)
    result.located = True  # type: ignore[attr-defined]
    return result


@contextmanager
def refusals_located(spec: Any) -> Iterator[None]:
    """Re-raise any refusal (a :class:`DiegenError` other than the schema's) located in ``spec``'s file."""
    try:
        yield
    except SpecError:
        raise
    except DiegenError as error:
        raise located(error, spec) from None


def analyse_located(rib: Any, section: Any = None) -> Any:
    """:func:`diegen.analysis.analyse_rib` with its refusals located in the rib's spec."""
    from diegen.analysis import analyse_rib

    with refusals_located(rib):
        return analyse_rib(rib, section)


__all__ = ["KEY_OF_FUNCTION", "analyse_located", "located", "refusals_located"]
