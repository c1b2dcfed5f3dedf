"""The validated spec as plain, frozen data in millimetres, newtons and MPa.

These are what every later layer receives; none of them knows about YAML or
the units the spec was written in (``units`` is kept only to print numbers back
in the builder's own units).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import PurePath
from typing import Any, Literal

from diegen.errors import Problem

__all__ = [
    "PIECE_NAMES",
    "RELIEF_POLICIES",
    "RIB_ORIENTATIONS",
    "AirfoilSource",
    "Die",
    "DrawnOutline",
    "Flange",
    "HoleRules",
    "HoleSpec",
    "Holes",
    "PieceName",
    "PinSpot",
    "Pins",
    "Press",
    "ReliefPolicy",
    "RibOrientation",
    "RibOverride",
    "RibSpec",
    "Rubber",
    "SetSpec",
    "Shared",
    "Sheet",
    "Spar",
    "Spec",
    "SpecPositions",
    "Stations",
    "WingSpar",
    "WingSpec",
]

PieceName = Literal["nose", "center", "tail"]
PIECE_NAMES: tuple[str, ...] = ("nose", "center", "tail")
ReliefPolicy = Literal["flutes", "notches", "none"]
RELIEF_POLICIES: tuple[str, ...] = ("flutes", "notches", "none")
RibOrientation = Literal["streamwise", "normal-to-spar"]
RIB_ORIENTATIONS: tuple[str, ...] = ("streamwise", "normal-to-spar")


@dataclass(frozen=True)
class AirfoilSource:
    """Where a section comes from: a NACA designation or a coordinate file (absolute path)."""

    naca: str | None = None
    file: str | None = None
    closed_te: bool = True
    points: int = 241  # points after smooth re-sampling

    @property
    def label(self) -> str:
        """The section as a builder names it: "NACA 2412", or the coordinate file's name."""
        return f"NACA {self.naca}" if self.naca else PurePath(str(self.file)).name


@dataclass(frozen=True)
class Sheet:
    alloy: str
    thickness_mm: float


@dataclass(frozen=True)
class Flange:
    height_mm: float  # mold-line height of the perimeter flange
    bend_radius_mm: float  # the finished part's inside bend radius
    radius_table: str = "aa"  # which minimum-bend-radius table to check against
    min_tail_depth_mm: float | None = None  # None: 2 x height + 10 mm
    trial: FlangeTrial | None = None  # a trial part's measured springback


@dataclass(frozen=True)
class FlangeTrial:
    """A trial part: the die angle it was formed on and the flange angle measured after release (degrees);
    optionally the die's inside radius and the part's measured inside radius (mm)."""

    die_angle_deg: float
    part_angle_deg: float
    die_radius_mm: float | None = None
    part_radius_mm: float | None = None


@dataclass(frozen=True)
class Spar:
    at: float  # chord fraction of the web's forward face
    web_mm: float
    cap_thickness_mm: float  # joggle depth where the rib flange laps the cap
    cap_width_mm: float


@dataclass(frozen=True)
class HoleSpec:
    x_mm: float  # from the leading edge along the chord
    d_mm: float
    y_mm: float | None = None  # None: centred in the local depth
    flanged: bool = True
    flange_height_mm: float | None = None  # None: from the hole rules


@dataclass(frozen=True)
class HoleRules:
    edge_margin_mm: float  # clear web between a hole and the flange bend line
    ligament_mm: float  # clear web between neighbouring holes
    min_diameter_mm: float
    flanged: bool
    flange_height_mm: float


@dataclass(frozen=True)
class Holes:
    mode: Literal["auto", "list", "none"]
    rules: HoleRules
    explicit: tuple[HoleSpec, ...] = ()


@dataclass(frozen=True)
class PinSpot:
    x_mm: float
    y_mm: float | None = None  # None: centred in the local depth


@dataclass(frozen=True)
class Pins:
    mode: Literal["auto", "list"]
    diameter_mm: float
    explicit: tuple[PinSpot, ...] = ()


@dataclass(frozen=True)
class Die:
    material: str
    stock_thickness_mm: float
    cutter_diameter_mm: float
    print_bed_mm: tuple[float, float] | None = None
    stl_tolerance_mm: float = 0.05


@dataclass(frozen=True)
class Rubber:
    durometer: float  # Shore A
    thickness_mm: float


@dataclass(frozen=True)
class Press:
    force_n: float
    box_mm: tuple[float, float]  # inside width and length of the rubber box
    rubber: Rubber
    wall_clearance_mm: float  # default: spec.schema.WALL_CLEARANCE
    force_read: str = ""  # how the force was read, e.g. "20 t: 20 metric tonnes-force (1,000 kgf) = 196.1 kN"


@dataclass(frozen=True)
class Shared:
    """The sections a rib and a wing spec have in common."""

    skin_thickness_mm: float
    sheet: Sheet
    flange: Flange
    pieces: tuple[str, ...]
    holes: Holes
    pins: Pins
    relief: str
    die: Die
    press: Press
    joggle_runout: float = 4.0  # ramp length as a multiple of the joggle depth


@dataclass(frozen=True)
class SpecPositions:
    """Where each key of a spec file is: ``(key path, line, column)`` of its value, 1-based.

    ``prefixes`` are tried in order before the bare key: a wing rib looks first in the overrides that apply to
    it (``overrides[2].``), then in the wing's shared keys.  A key the file leaves at its default is found at its
    nearest written parent.
    """

    file: str = ""
    keys: tuple[tuple[str, int, int], ...] = ()
    prefixes: tuple[str, ...] = ("",)

    def where(self, key: str) -> tuple[str, int | None, int | None]:
        """``(file, line, column)`` of ``key``, or of its nearest written parent (line None: not in the file)."""
        table = {k: (line, col) for k, line, col in self.keys}
        path = key
        while path:
            for prefix in self.prefixes:
                if prefix + path in table:
                    return (self.file, *table[prefix + path])
            path = path.rpartition(".")[0]
        return self.file, None, None


@dataclass(frozen=True)
class DrawnOutline:
    """A ``kind: part`` spec's outline as read from its drawing, and how its holes and pins are made.

    ``part`` holds the outline (mm), the flange runs laid on it, the inner contours and the drawn pin spots;
    ``label`` names the drawing in reports (``frame-4.dxf, layer OUTLINE, mold line``).
    """

    part: Any  # a diegen.sources.model.DrawnPart (not imported: the drawing readers sit above the spec's model)
    flanged_holes: bool  # round holes get a flange of hole_rules.flange_height
    label: str
    joggles: tuple[Any, ...] = ()  # diegen.sources.joggle.JoggleSpec: recesses where a member passes


@dataclass(frozen=True)
class RibSpec:
    """One part made in one pressing: a rib at one chord (its outline from an airfoil, cut into pieces at the
    spars), or, with ``drawn`` set (``kind: part``), a part whose outline comes from a drawing (one piece)."""

    id: str
    units: str
    airfoil: AirfoilSource
    chord_mm: float
    spars: tuple[Spar, ...]
    shared: Shared
    file: str = ""
    title: str = ""
    positions: SpecPositions = field(default=SpecPositions(), compare=False, repr=False)
    unit_warnings: tuple[Problem, ...] = field(default=(), compare=False, repr=False)  # see diegen.spec.plausible
    # what the rib's section is, as the builder reads it ("NACA 2412", "62 % NACA 23015 + 38 % NACA 23012");
    # empty: the airfoil's own label
    section: str = ""
    paper: str = "a4"  # paper size of the PDFs: "a4" or "letter"
    drawn: DrawnOutline | None = None  # kind: part

    @property
    def kind(self) -> str:
        """``rib`` or ``part``, as the spec's ``kind`` says."""
        return "rib" if self.drawn is None else "part"

    @property
    def section_label(self) -> str:
        """The section the rib is cut from: the airfoil's file name or NACA designation, or a wing station's blend."""
        return self.section or self.airfoil.label


@dataclass(frozen=True)
class WingSpar:
    root_at: float
    tip_at: float
    web_mm: float
    cap_thickness_mm: float
    cap_width_mm: float


@dataclass(frozen=True)
class Stations:
    """Rib stations: exactly one of positions / count / pitch, in mm from the root rib."""

    positions_mm: tuple[float, ...] = ()
    count: int | None = None
    pitch_mm: float | None = None


@dataclass(frozen=True)
class RibOverride:
    ribs: tuple[int, ...]  # 1-based rib numbers
    changes: dict[str, object] = field(default_factory=dict)  # Shared field name -> validated value


@dataclass(frozen=True)
class WingSpec:
    id: str
    units: str
    root_chord_mm: float
    tip_chord_mm: float
    span_mm: float
    sweep_deg: float
    sweep_line: float  # chord fraction of the line the sweep is measured on
    stations: Stations
    root_airfoil: AirfoilSource
    tip_airfoil: AirfoilSource
    spars: tuple[WingSpar, ...]
    rib_orientation: str
    shared: Shared
    overrides: tuple[RibOverride, ...] = ()
    file: str = ""
    title: str = ""
    positions: SpecPositions = field(default=SpecPositions(), compare=False, repr=False)
    unit_warnings: tuple[Problem, ...] = field(default=(), compare=False, repr=False)  # see diegen.spec.plausible
    paper: str = "a4"  # paper size of the PDFs: "a4" or "letter"

    @property
    def kind(self) -> str:
        return "wing"


@dataclass(frozen=True)
class SetSpec:
    """Parts and ribs built together into one folder (``kind: set``): a fuselage's formers, a tail's ribs.

    ``members`` are one-piece-set specs as they would load alone: those a set lists by file, and one part per
    drawing its ``drawings`` section matches (each read with that section's keys, its id the set's id and the
    drawing's file name).
    """

    id: str
    units: str
    members: tuple[RibSpec, ...]
    file: str = ""
    title: str = ""
    positions: SpecPositions = field(default=SpecPositions(), compare=False, repr=False)
    unit_warnings: tuple[Problem, ...] = field(default=(), compare=False, repr=False)
    paper: str = "a4"

    @property
    def kind(self) -> str:
        return "set"


Spec = RibSpec | WingSpec | SetSpec
