"""PNG pictures of a rib piece for a person to look at.

* The geometry plot of ``diegen check --plot`` (matplotlib, Agg canvas, no global settings changed) keeps one
  figure per process: its axes, labels, grid and legend are made once, and a call adds only the piece's own
  artists — few of them: one collection for each kind of circle — draws, writes the PNG and takes them off
  again.  Limits are set from the piece's data (the figure's history never enters), so a picture does not depend
  on what was drawn before.
* The preview of every built piece is drawn on the small canvas of :mod:`diegen.export.raster` (Pillow only),
  afresh for each picture: a build then never imports matplotlib, whose import and first figure cost more than
  all of a rib's previews together.
"""

from __future__ import annotations

import threading
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from diegen.export.png import png_bytes
from diegen.fileio import write_bytes

DPI = 110
MARGIN = 0.05
"""Share of the data range left free on each side of an autoscaled plot (matplotlib's default axes margin)."""

_LOCK = threading.Lock()
_FIGURES: dict[str, Any] = {}


def _closed(points: Sequence[Sequence[float]]) -> np.ndarray:
    p = np.asarray(points, dtype=float)
    return np.vstack([p, p[:1]])


def _circles(centres_radii: list[tuple[float, float, float]], **style: Any) -> Any:
    """One collection of circles (x, y, r in data units)."""
    from matplotlib.collections import PatchCollection
    from matplotlib.patches import Circle

    return PatchCollection([Circle((x, y), r) for x, y, r in centres_radii], **style)


def _relief_marks(piece_analysis: Any) -> list[tuple[np.ndarray, np.ndarray, str, str]]:
    """Flutes (▼) and notches (▲) at their positions along the die outline: (x, y, marker, colour)."""
    ring = _closed(piece_analysis.piece.outline)
    s = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(ring, axis=0).T))])
    marks = []
    for items, marker, colour in ((piece_analysis.flutes, "v", "tab:cyan"), (piece_analysis.notches, "^", "tab:olive")):
        if items:
            at = np.array([item.s_mm for item in items]) % s[-1]
            marks.append((np.interp(at, s, ring[:, 0]), np.interp(at, s, ring[:, 1]), marker, colour))
    return marks


def _hole_circles(g: Any) -> list[tuple[float, float, float]]:
    return [(h.x, h.y, h.d / 2) for h in g.holes]


def _pin_circles(g: Any) -> list[tuple[float, float, float]]:
    return [(pin.x, pin.y, max(pin.d, 3.0) / 2) for pin in g.pins]


class _Picture:
    """A reusable figure: ``add`` puts a piece's artists on it, ``write`` draws, saves and removes them."""

    def __init__(self, width_in: float, height_in: float) -> None:
        from matplotlib.backends.backend_agg import FigureCanvasAgg
        from matplotlib.figure import Figure

        self.figure = Figure(figsize=(width_in, height_in), dpi=DPI)
        FigureCanvasAgg(self.figure)
        self._added: list[Any] = []

    def add(self, artist: Any) -> Any:
        self._added.append(artist)
        return artist

    def line(self, ax: Any, x: Any, y: Any, fmt: str = "", **style: Any) -> None:
        (line,) = ax.plot(x, y, fmt, **style) if fmt else ax.plot(x, y, **style)
        self.add(line)

    def collection(self, ax: Any, collection: Any) -> None:
        ax.add_collection(collection, autolim=False)
        self.add(collection)

    def write(self, path: str | Path) -> Path:
        """Draw the figure and write it as an RGB PNG (the figure is opaque, so its alpha channel says nothing)."""
        canvas = self.figure.canvas
        try:
            canvas.draw()
            write_bytes(path, png_bytes(np.ascontiguousarray(np.asarray(canvas.buffer_rgba())[:, :, :3])))
        finally:
            for artist in self._added:
                artist.remove()
            self._added.clear()
        return Path(path)


def _limits(points: list[np.ndarray], circles: list[tuple[float, float, float]]) -> tuple[float, float, float, float]:
    """(x0, x1, y0, y1) of the data widened by :data:`MARGIN` of its range on each side, as autoscaling does."""
    xy = np.vstack([np.asarray(p, dtype=float).reshape(-1, 2) for p in points])
    x0, y0 = xy.min(axis=0)
    x1, y1 = xy.max(axis=0)
    for x, y, r in circles:
        x0, x1, y0, y1 = min(x0, x - r), max(x1, x + r), min(y0, y - r), max(y1, y + r)
    dx, dy = MARGIN * (x1 - x0), MARGIN * (y1 - y0)
    return float(x0 - dx), float(x1 + dx), float(y0 - dy), float(y1 + dy)


# --------------------------------------------------------------------------------------------- geometry plot
DRAWN_LABELS = {"airfoil": "outline as drawn", "joggle zones": "joggles"}  # a drawn part's names for the legend
class _GeometryPicture(_Picture):
    """Airfoil, outer mold line, die outline, joggles, holes, pins, relief points and flutes of one piece."""

    def __init__(self) -> None:
        from matplotlib.lines import Line2D

        super().__init__(11, 5.2)
        ax = self.ax = self.figure.add_axes((0.07, 0.11, 0.916, 0.82))  # what a tight layout gives the demo rib, fixed
        ax.set_aspect("equal")
        ax.grid(True, lw=0.3)
        ax.set_xlabel("x from the leading edge (mm)")
        ax.set_ylabel("y (mm)")
        self.title = ax.set_title(" ")
        self.handles = [
            (Line2D([], [], color="0.6", lw=0.8), "airfoil"),
            (Line2D([], [], color="tab:blue", lw=0.8, ls="--"), "outer mold line"),
            (Line2D([], [], color="tab:green", lw=0.9), "flat blank"),
            (Line2D([], [], color="k", lw=1.6), "die outline"),
            (Line2D([], [], ls="none", marker="s", mfc="none", color="tab:brown", ms=7), "bend relief"),
            (Line2D([], [], ls="none", marker="v", color="tab:cyan"), "flutes"),
            (Line2D([], [], color="tab:orange", alpha=0.4, lw=6), "joggle zones"),
            (Line2D([], [], ls="none", marker="o", color="tab:purple", mfc="none"), "lightening holes"),
            (Line2D([], [], ls="none", marker="o", color="tab:red"), "tooling pins"),
        ]
        self.legends: dict[tuple[bool, bool, bool], Any] = {}

    def draw(self, rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
        from matplotlib.patches import Rectangle

        ax = self.ax
        g = piece_analysis.piece
        rib = rib_analysis.geometry
        blank = piece_analysis.blank
        drawn = getattr(rib_analysis.spec, "drawn", None) is not None  # a part: its drawn outline, no airfoil
        # a part whose flanges all bend up is made as the drawing's mirror image: show its outline so too
        mirrored = any(w.code == "part-mirrored" for w in rib.warnings)
        section = _closed(rib.section) * ([-1.0, 1.0] if mirrored else [1.0, 1.0])
        self.line(ax, *section.T, color="0.6", lw=0.8)
        if not drawn:
            self.line(ax, *_closed(rib.oml).T, color="tab:blue", lw=0.8, ls="--")
        self.line(ax, *_closed(blank.outer).T, color="tab:green", lw=0.9)
        outline = _closed(g.die_outline)
        self.line(ax, *outline.T, color="k", lw=1.6)
        for j in g.joggles:
            if j.surface == "outline":  # a drawn part's joggle: the recessed stretch itself
                self.line(ax, *np.asarray(j.path).T, color="tab:orange", lw=3.0, alpha=0.5)
                continue
            band = Rectangle((j.x_start_mm, 0.0), j.x_end_mm - j.x_start_mm, 1.0, transform=ax.get_xaxis_transform(),
                             color="tab:orange", alpha=0.15, lw=0)
            ax.add_patch(band)
            self.add(band)
        if g.holes:
            self.collection(ax, _circles(_hole_circles(g), facecolor="none", edgecolor="tab:purple", lw=1.0))
        if g.pins:
            self.collection(ax, _circles(_pin_circles(g), color="tab:red"))
        if g.relief_points:
            r = np.asarray(g.relief_points)
            self.line(ax, r[:, 0], r[:, 1], "s", mfc="none", color="tab:brown", ms=7)
        for x, y, marker, colour in _relief_marks(piece_analysis):
            self.line(ax, x, y, marker, color=colour, ms=5)
        _blank_cuts(self, ax, blank)

        has_relief = bool(g.relief_points)
        if (has_relief, drawn, mirrored) not in self.legends:
            names = {**DRAWN_LABELS, "airfoil": "outline as drawn, mirrored"} if mirrored else DRAWN_LABELS
            shown = [(h, names.get(label, label) if drawn else label) for h, label in self.handles
                     if (has_relief or label != "bend relief") and not (drawn and label == "outer mold line")]
            # a drawn part is about as tall as wide, so its equal-aspect axes leave room beside them: the legend
            # goes there, off the outline; a rib's long axes keep it inside, top right
            place = {"loc": "upper left", "bbox_to_anchor": (1.02, 1.0), "ncol": 1} if drawn else \
                {"loc": "upper right", "ncol": 2}
            self.legends[has_relief, drawn, mirrored] = ax.legend(*zip(*shown), fontsize=7, **place)
        ax.legend_ = self.legends[has_relief, drawn, mirrored]
        ax.set_xlabel("x, the drawing's mirrored (mm)" if mirrored else "x as drawn (mm)" if drawn
                      else "x from the leading edge (mm)")
        x0, x1 = g.x_range_mm
        pad = 15.0
        ax.set_xlim(x0 - pad, x1 + pad)
        ax.set_ylim(outline[:, 1].min() - pad - 10, outline[:, 1].max() + pad + 10)
        what = "drawn part" if drawn else f"{g.name} piece"
        self.title.set_text(f"{g.part_id}: {what}, die outline and web features "
                            f"(max shrink {piece_analysis.max_shrink:.3f}, press verdict "
                            f"{piece_analysis.press.verdict})")
        return self.write(path)


def _blank_cuts(picture: _Picture, ax: Any, blank: Any) -> None:
    """The blank's inner cut contours and cut circles (relief and pilot holes)."""
    for loop in blank.inner:
        picture.line(ax, *_closed(loop).T, color="tab:green", lw=0.7)
    if blank.cut_circles:
        picture.collection(ax, _circles([(c.x, c.y, c.d / 2) for c in blank.cut_circles], facecolor="none",
                                        edgecolor="tab:green", lw=0.6, ls="--"))


def _along(points: np.ndarray, s: np.ndarray) -> np.ndarray:
    seg = np.hypot(*np.diff(points, axis=0).T)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    return np.column_stack([np.interp(s, cum, points[:, 0]), np.interp(s, cum, points[:, 1])])


# ---------------------------------------------------------------------------------------------- preview plot
PREVIEW_INCHES = (11.0, 7.5)


def _preview(piece_analysis: Any) -> Any:
    """Die and blank together, the flange coloured by edge strain, and the strain along the outline: a Pillow
    image drawn on :mod:`diegen.export.raster`'s canvas (the build writes one per piece; the plotting library's
    import and figure would cost more than the rest of the picture)."""
    from diegen.export.raster import TAB, TAB10, Canvas, Line, grey, inferno_r

    canvas = Canvas(*PREVIEW_INCHES, DPI)
    g = piece_analysis.piece
    blank = piece_analysis.blank
    outline = _closed(g.die_outline)
    limit = piece_analysis.flange.shrink_limit
    stretch = piece_analysis.alloy.stretch_limit
    # the colour scale spans the finite strains; an infinite one (a stretch flange wider than its plan radius, which
    # nothing forms) is drawn in the scale's darkest colour
    norm_max = max(2 * limit, *(v for v in (piece_analysis.max_shrink, piece_analysis.max_stretch) if np.isfinite(v)),
                   1e-3)

    segments, magnitudes, curves = [], [], []
    relieved = piece_analysis.flutes or piece_analysis.notches
    for index, run in enumerate(piece_analysis.runs):
        xy = _along(np.asarray(g.plain_runs[run.run_index].points), run.profile.s_mm)
        segments.append(np.stack([xy[:-1], xy[1:]], axis=1))
        magnitudes.append(np.abs(run.profile.strain[:-1]))
        s = run.s_offset_mm + run.profile.s_mm
        colour = TAB10[index % 10]
        curves.append((s, -run.profile.strain, Line(colour, 1.0)))
        if piece_analysis.mixed_heights:  # flange runs of their own heights: each run's own wrinkle limit
            curves.append((np.array([s[0], s[-1]]), np.array([run.shrink_limit] * 2), Line(colour, 0.8, "--")))
        if index < len(piece_analysis.flange.residual_profiles) and relieved:
            curves.append((s, np.asarray(piece_analysis.flange.residual_profiles[index]), Line(colour, 0.8, ":")))
    circles = [(c.x, c.y, c.d / 2) for c in blank.cut_circles] + _hole_circles(g) + _pin_circles(g)

    top = canvas.axes((0.07, 0.40, 0.80, 0.52))
    x0, x1, y0, y1 = _limits([blank.outer, outline, *blank.inner, *segments], circles)
    top.limits((x0, x1), (y0, y1), equal=True)
    top.grid()
    top.line(*_closed(blank.outer).T, Line(TAB["green"], 0.9))
    top.line(*outline.T, Line(grey(0.3), 0.6))
    if segments:
        top.segments(np.concatenate(segments), inferno_r(np.concatenate(magnitudes) / norm_max), 4.0)
    for x, y, marker, colour in _relief_marks(piece_analysis):
        top.markers(x, y, marker, TAB[colour.removeprefix("tab:")], 5.0)
    for loop in blank.inner:
        top.line(*_closed(loop).T, Line(TAB["green"], 0.7))
    top.circles([(c.x, c.y, c.d / 2) for c in blank.cut_circles], edge=Line(TAB["green"], 0.6, "--"))
    top.circles(_hole_circles(g), edge=Line(TAB["purple"], 0.8))
    top.circles(_pin_circles(g), edge=Line(TAB["red"], 1.0), fill=TAB["red"])
    top.finish(xlabel="x (mm)", title=f"{g.part_id}: die (grey) and blank (green), flange coloured by edge strain; "
               f"{len(piece_analysis.flutes)} flute(s), {len(piece_analysis.notches)} notch(es); press "
               f"{piece_analysis.press.verdict}", title_pt=9.0)

    bar = canvas.axes((0.89, 0.40, 0.015, 0.52))
    bar.limits((0.0, 1.0), (0.0, norm_max))
    bar.gradient(inferno_r(np.linspace(0.0, 1.0, 256)))
    bar.hline(limit, Line(TAB["blue"], 1.5))
    bar.finish(ylabel="flange edge strain (|e|)", xticks=False, yticks_right=True, ylabel_right=True)

    strain_ax = canvas.axes((0.07, 0.07, 0.80, 0.24))
    # straight flanges only: no strain to draw, the axis still spans the outline
    xs = np.concatenate([s for s, _, style in curves if style.style == "-"]) if curves else np.array([0.0, g.length_mm])
    ys = np.concatenate([*(y for _, y, style in curves if style.style == "-"), [limit, -stretch]])
    # an infinite strain (see the colour scale) runs off the axis: it spans 3 × the limit past the zero line
    low = min(float(ys[np.isfinite(ys)].min()), -3.0 * stretch if np.any(ys == -np.inf) else np.inf)
    high = max(float(ys[np.isfinite(ys)].max()), 3.0 * limit if np.any(ys == np.inf) else -np.inf)
    dx, dy = MARGIN * (xs.max() - xs.min()), MARGIN * (high - low)
    strain_ax.limits((xs.min() - dx, xs.max() + dx), (low - dy, high + dy))
    strain_ax.grid()
    shrink_line, stretch_line = Line(TAB["blue"], 1.0, "--"), Line(TAB["red"], 1.0, "--")
    strain_ax.hline(limit, shrink_line)
    strain_ax.hline(-stretch, stretch_line)
    for s, y, style in curves:
        strain_ax.line(s, np.clip(y, low - dy, high + dy), style)
    shrink_label = f"wrinkle limit {limit:.3f} (dotted: shrink left after relief)"
    if piece_analysis.mixed_heights:
        shrink_label = (f"wrinkle limit {limit:.3f} of the run judged worst (each run's own dashed in its colour; "
                        "dotted: shrink left after relief)")
    if not curves:
        shrink_label = f"wrinkle limit {limit:.3f}; every flange is straight: no shrink or stretch along it"
    strain_ax.legend([(shrink_line, shrink_label), (stretch_line, f"stretch limit {stretch:.3f}")], 7.0)
    strain_ax.finish(xlabel="position along the die outline (mm)", ylabel="shrink (+) / stretch (−)")
    return canvas.image


def _picture(kind: str) -> Any:
    if kind not in _FIGURES:
        _FIGURES[kind] = _GeometryPicture()
    return _FIGURES[kind]


def piece_plot(rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
    """Airfoil, outer mold line, die outline, joggles, holes, pins, relief points and flutes of one piece."""
    with _LOCK:
        return _picture("geometry").draw(rib_analysis, piece_analysis, path)


def preview_plot(rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
    """Die and blank together, the flange coloured by edge strain, and the strain along the outline."""
    image = _preview(piece_analysis)
    write_bytes(path, png_bytes(np.asarray(image)))
    return Path(path)
