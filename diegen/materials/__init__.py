"""Materials catalogue: sheet alloys, minimum bend radii and die stock, with sources.

The numbers live in ``sheet.yaml`` and ``die.yaml`` beside this module; each one
carries its source string (a publication with table and page, a standard,
"common practice, no source", "from memory, unverified", or "unattributed table,
unverified").  The files are read once, on first use, and turned into frozen
dataclasses.  Everything returned is in millimetres, MPa and fractions, whatever
unit the source used.

The sheet values are *typical* properties, not design allowables: flight
structure follows the aircraft designer's drawings and the MMPDS minima.
"""

from __future__ import annotations

import copyreg
import difflib
import functools
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from importlib import resources
from types import MappingProxyType
from typing import Any

import yaml

from diegen.errors import DiegenError, FormingError, MaterialError
from diegen.units import MM_PER_IN, MPA_PER_KSI, mm_to_in

__all__ = [
    "DieMaterial",
    "MinRadius",
    "SheetAlloy",
    "bend_radius_tables",
    "catalogue_text",
    "die_making",
    "die_material",
    "die_material_names",
    "min_bend_radius",
    "sheet_alloy",
    "sheet_alloy_names",
]

# Unit conversions from diegen.units, exact by definition: 1 in = 25.4 mm; 1 lbf = 4.4482216152605 N,
# so 1 ksi = 1000 lbf/in^2 = 4448.2216152605 N / 645.16 mm^2 = 6.894757... MPa.
_MM_PER_UNIT: Mapping[str, float] = {"mm": 1.0, "in": MM_PER_IN}
_MPA_PER_UNIT: Mapping[str, float] = {"MPa": 1.0, "GPa": 1000.0, "ksi": MPA_PER_KSI}
_FRACTION_PER_UNIT: Mapping[str, float] = {"fraction": 1.0, "percent": 0.01}
_INDEFINITELY = "indefinitely"


@dataclass(frozen=True)
class SheetAlloy:
    """Typical properties of one sheet alloy and temper (MPa, fractions)."""

    name: str
    description: str
    youngs_modulus_mpa: float
    yield_mpa: float  # 0.2 % offset tensile yield
    ultimate_mpa: float
    elongation: float  # fraction in 2 in (50 mm), e.g. 0.18
    k_factor: float  # neutral-axis position from the inside surface, fraction of t
    shrink_limit: float  # largest compressive edge strain of a shrink flange, positive fraction
    stretch_limit: float  # largest tensile edge strain of a stretch flange, positive fraction
    sources: Mapping[str, str] = field(hash=False)  # field name -> source string


@dataclass(frozen=True)
class MinRadius:
    """A minimum inside bend radius (mm) read from one named table."""

    radius_mm: float
    table: str
    citation: str
    thickness_column_mm: float  # the table column that was used
    note: str = ""  # how the column was chosen


@dataclass(frozen=True)
class DieMaterial:
    """A die (form block) stock material."""

    name: str
    description: str
    compressive_strength_mpa: float
    stock_thicknesses_mm: tuple[float, ...]  # empty: printed to any height
    life_parts: int | None  # expected parts per die; None = indefinitely
    printed: bool
    machining_note: str
    sources: Mapping[str, str] = field(hash=False)  # field name -> source string
    machined: bool = False  # cut with end mills on a mill (or a rigid machine) rather than with router bits

    @property
    def making(self) -> str:
        """How a die of this material is made: ``printed``, ``machined`` or ``routed``."""
        return "printed" if self.printed else "machined" if self.machined else "routed"


@dataclass(frozen=True)
class _BendTable:
    name: str
    title: str
    citation: str
    kind: str  # "multiple_of_thickness" or "absolute"
    columns_mm: tuple[float, ...]
    column_match: float  # relative tolerance for reading a sheet in a column
    rows: Mapping[str, tuple[float, ...]]  # multiples of t, or radii in mm
    row_sources: Mapping[str, str]
    note: str


@dataclass(frozen=True)
class _Catalogue:
    alloys: Mapping[str, SheetAlloy]
    tables: Mapping[str, _BendTable]
    dies: Mapping[str, DieMaterial]
    die_aliases: Mapping[str, str]  # lower-case alias -> name


# --------------------------------------------------------------------------- loading


def _read_only(mapping: dict) -> Mapping:
    return MappingProxyType(mapping)


# The catalogue's read-only mappings travel with an analysis to the build's worker processes: pickle them as the
# plain mapping they show.
copyreg.pickle(MappingProxyType, lambda proxy: (_read_only, (dict(proxy),)))


def _read_yaml(filename: str) -> Mapping[str, Any]:
    text = resources.files(__name__).joinpath(filename).read_text(encoding="utf-8")
    data = yaml.safe_load(text)
    if not isinstance(data, Mapping):
        raise DiegenError(f"materials data file {filename} is not a mapping")
    return data


def _entry(data: Any, path: str) -> Mapping[str, Any]:
    if not isinstance(data, Mapping):
        raise DiegenError(f"materials data {path}: expected a mapping, found {data!r}")
    source = data.get("source")
    if not isinstance(source, str) or not source.strip():
        raise DiegenError(f"materials data {path}: every value needs a source string")
    return data


def _scaled(data: Any, path: str, units: Mapping[str, float]) -> tuple[float, str]:
    """One ``{value, unit, source}`` entry, converted by ``units``."""
    entry = _entry(data, path)
    unit = entry.get("unit")
    if unit not in units:
        raise DiegenError(f"materials data {path}: unit {unit!r} not one of {sorted(units)}")
    value = entry.get("value")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise DiegenError(f"materials data {path}: value {value!r} is not a number")
    return float(value) * units[unit], entry["source"]


def _scaled_list(data: Any, path: str, units: Mapping[str, float]) -> tuple[tuple[float, ...], str]:
    entry = _entry(data, path)
    unit = entry.get("unit")
    if unit not in units:
        raise DiegenError(f"materials data {path}: unit {unit!r} not one of {sorted(units)}")
    values = entry.get("values")
    if not isinstance(values, list) or any(
        isinstance(v, bool) or not isinstance(v, (int, float)) for v in values
    ):
        raise DiegenError(f"materials data {path}: values must be a list of numbers")
    return tuple(float(v) * units[unit] for v in values), entry["source"]


_ALLOY_FIELDS: tuple[tuple[str, str, Mapping[str, float]], ...] = (
    # (YAML key, dataclass field, unit table)
    ("youngs_modulus", "youngs_modulus_mpa", _MPA_PER_UNIT),
    ("yield_strength", "yield_mpa", _MPA_PER_UNIT),
    ("ultimate_strength", "ultimate_mpa", _MPA_PER_UNIT),
    ("elongation", "elongation", _FRACTION_PER_UNIT),
    ("k_factor", "k_factor", _FRACTION_PER_UNIT),
    ("shrink_limit", "shrink_limit", _FRACTION_PER_UNIT),
    ("stretch_limit", "stretch_limit", _FRACTION_PER_UNIT),
)


def _parse_alloy(name: str, data: Mapping[str, Any]) -> SheetAlloy:
    values: dict[str, float] = {}
    sources: dict[str, str] = {}
    for key, attr, units in _ALLOY_FIELDS:
        values[attr], sources[attr] = _scaled(data.get(key), f"alloys.{name}.{key}", units)
    return SheetAlloy(
        name=name,
        description=str(data.get("description", "")),
        sources=MappingProxyType(sources),
        **values,
    )


def _parse_table(name: str, data: Mapping[str, Any]) -> _BendTable:
    path = f"bend_radius_tables.{name}"
    kind = data.get("kind")
    if kind not in ("multiple_of_thickness", "absolute"):
        raise DiegenError(f"materials data {path}.kind: unknown kind {kind!r}")
    columns, _ = _scaled_list(data.get("thickness"), f"{path}.thickness", _MM_PER_UNIT)
    if list(columns) != sorted(columns):
        raise DiegenError(f"materials data {path}.thickness: columns must ascend")
    match, _ = _scaled(data.get("column_match"), f"{path}.column_match", _FRACTION_PER_UNIT)
    row_units = {"t": 1.0} if kind == "multiple_of_thickness" else _MM_PER_UNIT
    rows: dict[str, tuple[float, ...]] = {}
    row_sources: dict[str, str] = {}
    for alloy, row in dict(data.get("rows", {})).items():
        values, source = _scaled_list(row, f"{path}.rows.{alloy}", row_units)
        if len(values) != len(columns):
            raise DiegenError(f"materials data {path}.rows.{alloy}: {len(values)} values, {len(columns)} columns")
        rows[str(alloy)], row_sources[str(alloy)] = values, source
    return _BendTable(
        name=name,
        title=str(data.get("title", "")),
        citation=str(data.get("citation", "")),
        kind=kind,
        columns_mm=columns,
        column_match=match,
        rows=MappingProxyType(rows),
        row_sources=MappingProxyType(row_sources),
        note=str(data.get("note", "")),
    )


def _parse_die(name: str, data: Mapping[str, Any]) -> DieMaterial:
    path = f"materials.{name}"
    strength, strength_src = _scaled(
        data.get("compressive_strength"), f"{path}.compressive_strength", _MPA_PER_UNIT
    )
    stock, stock_src = _scaled_list(data.get("stock_thicknesses"), f"{path}.stock_thicknesses", _MM_PER_UNIT)
    life_entry = _entry(data.get("life_parts"), f"{path}.life_parts")
    life_value = life_entry.get("value")
    if life_value == _INDEFINITELY:
        life: int | None = None
    elif isinstance(life_value, int) and not isinstance(life_value, bool) and life_value > 0:
        life = life_value
    else:
        raise DiegenError(f"materials data {path}.life_parts: {life_value!r} is not a count or 'indefinitely'")
    return DieMaterial(
        name=name,
        description=str(data.get("description", "")),
        compressive_strength_mpa=strength,
        stock_thicknesses_mm=stock,
        life_parts=life,
        printed=bool(data.get("printed", False)),
        machining_note=str(data.get("machining_note", "")),
        machined=bool(data.get("machined", False)),
        sources=MappingProxyType(
            {
                "compressive_strength_mpa": strength_src,
                "stock_thicknesses_mm": stock_src,
                "life_parts": life_entry["source"],
            }
        ),
    )


@functools.cache
def _catalogue() -> _Catalogue:
    """Read both data files once and build the typed catalogue."""
    sheet = _read_yaml("sheet.yaml")
    die = _read_yaml("die.yaml")
    alloys = {str(n): _parse_alloy(str(n), d) for n, d in dict(sheet.get("alloys", {})).items()}
    tables = {str(n): _parse_table(str(n), d) for n, d in dict(sheet.get("bend_radius_tables", {})).items()}
    for table in tables.values():
        for alloy in table.rows:
            if alloy not in alloys:
                raise DiegenError(f"materials data: table {table.name!r} lists unknown alloy {alloy!r}")
    dies = {str(n): _parse_die(str(n), d) for n, d in dict(die.get("materials", {})).items()}
    aliases = {name.lower(): name for name in dies}
    for name, data in dict(die.get("materials", {})).items():
        for alias in data.get("aliases", []) or []:
            aliases[str(alias).lower()] = str(name)
    return _Catalogue(
        alloys=MappingProxyType(alloys),
        tables=MappingProxyType(tables),
        dies=MappingProxyType(dies),
        die_aliases=MappingProxyType(aliases),
    )


# --------------------------------------------------------------------------- lookup


def _resolve(kind: str, name: str, names: Sequence[str], aliases: Mapping[str, str] | None = None) -> str:
    """The catalogue name for ``name`` (case-insensitive), or a did-you-mean error."""
    lookup = {n.lower(): n for n in names}
    if aliases:
        lookup.update(aliases)
    key = str(name).strip().lower()
    if key in lookup:
        return lookup[key]
    close = difflib.get_close_matches(key, list(lookup), n=3, cutoff=0.5)
    suggestions = list(dict.fromkeys(lookup[c] for c in close))
    hint = f"; did you mean {' or '.join(repr(s) for s in suggestions)}?" if suggestions else ""
    raise MaterialError(f"unknown {kind} {name!r}{hint} (known: {', '.join(names)})")


def sheet_alloy_names() -> tuple[str, ...]:
    """Names of every sheet alloy-temper in the catalogue, e.g. ``"2024-T3"``."""
    return tuple(_catalogue().alloys)


def die_material_names() -> tuple[str, ...]:
    """Names of every die stock material in the catalogue, e.g. ``"fibreboard"``."""
    return tuple(_catalogue().dies)


def die_material_aliases() -> Mapping[str, str]:
    """Every lower-case name a die material may be given by (its own and its aliases, such as ``mdf``) → its name."""
    return _catalogue().die_aliases


def bend_radius_tables() -> tuple[str, ...]:
    """Names of the selectable minimum-bend-radius tables: ``("aa", "aerospace")``."""
    return tuple(_catalogue().tables)


def sheet_alloy(name: str) -> SheetAlloy:
    """The sheet alloy ``name`` (case-insensitive); MaterialError with suggestions if unknown."""
    cat = _catalogue()
    return cat.alloys[_resolve("sheet alloy", name, tuple(cat.alloys))]


def die_material(name: str) -> DieMaterial:
    """The die material ``name`` or one of its aliases; MaterialError with suggestions if unknown."""
    cat = _catalogue()
    return cat.dies[_resolve("die material", name, tuple(cat.dies), cat.die_aliases)]


def die_making(material: str, print_bed_mm: object = None) -> str:
    """How a die of ``material`` is made: ``printed`` (a printed material, or any die given a print bed),
    ``machined`` (cut with end mills) or ``routed``."""
    return "printed" if print_bed_mm is not None else die_material(material).making


def min_bend_radius(alloy: str, thickness_mm: float, table: str = "aa") -> MinRadius:
    """Minimum inside radius (mm) for a 90 degree cold bend of ``alloy`` sheet ``thickness_mm`` thick.

    The table is chosen by name (see :func:`bend_radius_tables`) and named in the
    result.  A thickness between two columns is read in the next thicker column,
    which is conservative because every row grows with thickness; a sheet up to
    the table's ``column_match`` fraction (3 %) thicker than a column counts as
    that column, so the decimal gauge .032 in reads as 1/32 in.  For the ``aa``
    table the radius is the column's multiple times the actual thickness.

    Raises FormingError for a thickness that is not positive or is above the
    table's largest column, or for an alloy the table does not list (naming the
    tables that do); MaterialError for an unknown alloy or table name.
    """
    cat = _catalogue()
    tab = cat.tables[_resolve("bend-radius table", table, tuple(cat.tables))]
    name = _resolve("sheet alloy", alloy, tuple(cat.alloys))
    if name not in tab.rows:
        having = [t.name for t in cat.tables.values() if name in t.rows]
        raise FormingError(
            f"{name} is not in the {tab.name!r} bend-radius table; "
            + (f"tables that list it: {', '.join(having)}" if having else "no table lists it")
        )
    t = float(thickness_mm)
    if not math.isfinite(t) or t <= 0.0:
        raise FormingError(f"sheet thickness must be a positive number of mm, got {thickness_mm!r}")
    cols = tab.columns_mm
    index = next((i for i, c in enumerate(cols) if t <= c * (1.0 + tab.column_match)), None)
    if index is None:
        raise FormingError(
            f"t = {t:g} mm is outside the {tab.name!r} bend-radius table, which covers "
            f"{cols[0]:.3f} to {cols[-1]:.3f} mm ({mm_to_in(cols[0]):g} to {mm_to_in(cols[-1]):g} in)"
        )
    column = cols[index]
    value = tab.rows[name][index]
    radius = value * t if tab.kind == "multiple_of_thickness" else value
    if abs(t - column) <= 1e-9 * column:
        note = f"t = {t:g} mm is the {mm_to_in(column):g} in column"
    elif t < column:
        note = f"t = {t:g} mm read in the next thicker column, {mm_to_in(column):g} in (conservative)"
    else:
        note = f"t = {t:g} mm read as the {mm_to_in(column):g} in gauge (within {tab.column_match:.0%})"
    if tab.kind == "multiple_of_thickness":
        note += f"; R = {value:g} t"
    return MinRadius(
        radius_mm=radius, table=tab.name, citation=tab.row_sources[name], thickness_column_mm=column, note=note
    )


# --------------------------------------------------------------------------- text


class _Refs:
    """Numbers each distinct source string once, for a compact listing."""

    def __init__(self) -> None:
        self.numbers: dict[str, int] = {}

    def __call__(self, source: str) -> str:
        return f"[{self.numbers.setdefault(source, len(self.numbers) + 1)}]"

    def lines(self) -> list[str]:
        return [f"  [{n}] {source}" for source, n in self.numbers.items()]


def catalogue_text() -> str:
    """A plain-text listing of every alloy, bend-radius table and die material, with sources.

    Each value is followed by a bracketed number; the numbered sources are listed at the end.
    """
    cat = _catalogue()
    ref = _Refs()
    out: list[str] = [
        "SHEET ALLOYS - typical values for comparing alloys and estimating springback.",
        "Not design allowables: flight structure follows the designer's drawings, the MMPDS",
        "minimum properties, the heat-treatment specification and local inspection rules.",
        "",
        f"  {'alloy':<10}{'E MPa':>9}{'':6}{'yield MPa':>10}{'':6}{'ult. MPa':>9}{'':6}{'elong.':>7}{'':6}"
        f"{'k':>5}{'':6}{'shrink':>7}{'':6}{'stretch':>8}{'':6}bend tables",
    ]
    for a in cat.alloys.values():
        src = a.sources
        having = ", ".join(t.name for t in cat.tables.values() if a.name in t.rows) or "none"
        out.append(
            f"  {a.name:<10}"
            f"{a.youngs_modulus_mpa:>9,.0f} {ref(src['youngs_modulus_mpa']):<5}"
            f"{a.yield_mpa:>10.0f} {ref(src['yield_mpa']):<5}"
            f"{a.ultimate_mpa:>9.0f} {ref(src['ultimate_mpa']):<5}"
            f"{a.elongation:>7.0%} {ref(src['elongation']):<5}"
            f"{a.k_factor:>5.2f} {ref(src['k_factor']):<5}"
            f"{a.shrink_limit:>7.0%} {ref(src['shrink_limit']):<5}"
            f"{a.stretch_limit:>8.0%} {ref(src['stretch_limit']):<5}"
            f"{having}"
        )
    out.append("")
    for a in cat.alloys.values():
        out.append(f"  {a.name}: {a.description}")
    out += ["", "MINIMUM BEND RADIUS TABLES (90 degree cold bends; choose one, the report names it)", ""]
    for t in cat.tables.values():
        unit = "multiples of t" if t.kind == "multiple_of_thickness" else "inside radius, in"
        out.append(f"  {t.name}: {t.title} ({unit}) {ref(t.citation)}")
        out.append(f"    {'t, in':<10}" + " ".join(f"{mm_to_in(c):>8.5g}" for c in t.columns_mm))
        for alloy, row in t.rows.items():
            shown = row if t.kind == "multiple_of_thickness" else tuple(mm_to_in(r) for r in row)
            out.append(f"    {alloy:<10}" + " ".join(f"{v:>8.5g}" for v in shown) + f"  {ref(t.row_sources[alloy])}")
        if t.note:
            out.append(f"    note: {t.note}")
        out.append("")
    out += ["DIE MATERIALS", ""]
    for d in cat.dies.values():
        src = d.sources
        printed = " (3D-printed)" if d.printed else ""
        stock = "printed to height"
        if d.stock_thicknesses_mm:
            stock = ", ".join(f"{s:g}" for s in d.stock_thicknesses_mm) + " mm"
        life = "indefinitely" if d.life_parts is None else f"about {d.life_parts} parts"
        out.append(f"  {d.name}{printed}: {d.description}")
        strength = f"{d.compressive_strength_mpa:g} MPa"
        out.append(f"    compressive strength  {strength} {ref(src['compressive_strength_mpa'])}")
        out.append(f"    stock thicknesses     {stock} {ref(src['stock_thicknesses_mm'])}")
        out.append(f"    die life              {life} {ref(src['life_parts'])}")
        out.append(f"    machining             {d.machining_note}")
        out.append("")
    out += ["SOURCES", *ref.lines()]
    return "\n".join(out) + "\n"
