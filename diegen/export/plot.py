"""PNG plots of a rib piece for a person to look at (matplotlib, Agg canvas, no global settings changed).

Each kind of picture keeps one figure per process: its axes, labels, grid, colour bar and legend are made
once, and a call adds only the piece's own artists — few of them: one collection for each kind of circle,
one for the strain-coloured flange — draws, writes the PNG and takes them off again.  Limits are set from
the piece's data (the figure's history never enters), so a picture does not depend on what was drawn before.
"""

from __future__ import annotations

import threading
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from diegen.fileio import write_with

DPI = 110
MARGIN = 0.05
"""Share of the data range left free on each side of an autoscaled plot (matplotlib's default axes margin)."""
PNG_OPTIONS = {"compress_level": 3}
"""zlib level of the PNG files: in RGB at this level they are as small as RGBA at the default level and written in
half the time (measured on the demo rib's previews)."""

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
        from PIL import Image

        canvas = self.figure.canvas
        try:
            canvas.draw()
            image = Image.frombuffer("RGBA", canvas.get_width_height(), canvas.buffer_rgba(), "raw", "RGBA", 0, 1)
            rgb = image.convert("RGB")
            write_with(path, lambda tmp: rgb.save(tmp, format="png", **PNG_OPTIONS))
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
        self.legends: dict[tuple[bool, bool], Any] = {}

    def draw(self, rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
        from matplotlib.patches import Rectangle

        ax = self.ax
        g = piece_analysis.piece
        rib = rib_analysis.geometry
        blank = piece_analysis.blank
        drawn = getattr(rib_analysis.spec, "drawn", None) is not None  # a part: its drawn outline, no airfoil
        self.line(ax, *_closed(rib.section).T, color="0.6", lw=0.8)
        if not drawn:
            self.line(ax, *_closed(rib.oml).T, color="tab:blue", lw=0.8, ls="--")
        self.line(ax, *_closed(blank.outer).T, color="tab:green", lw=0.9)
        outline = _closed(g.outline)
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
        if (has_relief, drawn) not in self.legends:
            shown = [(h, DRAWN_LABELS.get(label, label) if drawn else label) for h, label in self.handles
                     if (has_relief or label != "bend relief") and not (drawn and label == "outer mold line")]
            self.legends[has_relief, drawn] = ax.legend(*zip(*shown), loc="upper right", fontsize=7, ncol=2)
        ax.legend_ = self.legends[has_relief, drawn]
        ax.set_xlabel("x as drawn (mm)" if drawn else "x from the leading edge (mm)")
        x0, x1 = g.x_range_mm
        pad = 15.0
        ax.set_xlim(x0 - pad, x1 + pad)
        ax.set_ylim(outline[:, 1].min() - pad - 10, outline[:, 1].max() + pad + 10)
        self.title.set_text(f"{g.part_id}: {g.name} piece, die outline and web features "
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
class _PreviewPicture(_Picture):
    """Die and blank together, the flange coloured by edge strain, and the strain along the outline."""

    def __init__(self) -> None:
        from matplotlib.cm import ScalarMappable
        from matplotlib.colors import Normalize

        super().__init__(11, 7.5)
        fig = self.figure
        self.top = fig.add_axes((0.07, 0.40, 0.80, 0.52))
        bar_ax = fig.add_axes((0.89, 0.40, 0.015, 0.52))
        self.strain_ax = fig.add_axes((0.07, 0.07, 0.80, 0.24))
        self.scale = ScalarMappable(Normalize(0.0, 1.0), cmap="inferno_r")
        colorbar = fig.colorbar(self.scale, cax=bar_ax)
        colorbar.set_label("flange edge strain (|e|)")
        self.bar_limit = colorbar.ax.axhline(0.0, color="tab:blue", lw=1.5)
        self.top.set_aspect("equal")
        self.top.grid(True, lw=0.3)
        self.top.set_xlabel("x (mm)")
        self.title = self.top.set_title(" ", fontsize=9)
        ax = self.strain_ax
        self.shrink_limit = ax.axhline(0.0, color="tab:blue", ls="--", lw=1)
        self.stretch_limit = ax.axhline(0.0, color="tab:red", ls="--", lw=1)
        ax.set_xlabel("position along the die outline (mm)")
        ax.set_ylabel("shrink (+) / stretch (−)")
        ax.grid(True, lw=0.3)
        self.legend_labels: tuple[str, str] | None = None

    def draw(self, piece_analysis: Any, path: str | Path) -> Path:
        from matplotlib.collections import LineCollection

        g = piece_analysis.piece
        top, strain_ax = self.top, self.strain_ax
        blank = piece_analysis.blank
        outline = _closed(g.outline)
        self.line(top, *_closed(blank.outer).T, color="tab:green", lw=0.9)
        self.line(top, *outline.T, color="0.3", lw=0.6)

        limit = piece_analysis.flange.shrink_limit
        stretch = piece_analysis.alloy.stretch_limit
        norm_max = max(2 * limit, piece_analysis.max_shrink, piece_analysis.max_stretch, 1e-3)
        self.scale.set_clim(0.0, norm_max)
        self.bar_limit.set_ydata([limit, limit])
        segments, magnitudes, strain_x, strain_y = [], [], [], []
        for index, run in enumerate(piece_analysis.runs):
            xy = _along(np.asarray(g.plain_runs[run.run_index].points), run.profile.s_mm)
            segments.append(np.stack([xy[:-1], xy[1:]], axis=1))
            magnitudes.append(np.abs(run.profile.strain[:-1]))
            s = run.s_offset_mm + run.profile.s_mm
            self.line(strain_ax, s, -run.profile.strain, lw=1.0, color=f"C{index % 10}")
            if piece_analysis.mixed_heights:  # flange runs of their own heights: each run's own wrinkle limit
                self.line(strain_ax, [s[0], s[-1]], [run.shrink_limit, run.shrink_limit], lw=0.8, ls="--",
                          color=f"C{index % 10}")
            relieved = piece_analysis.flutes or piece_analysis.notches
            if index < len(piece_analysis.flange.residual_profiles) and relieved:
                self.line(strain_ax, s, piece_analysis.flange.residual_profiles[index], lw=0.8, ls=":",
                          color=f"C{index % 10}")
            strain_x.append(s)
            strain_y.append(-run.profile.strain)
        if segments:
            band = LineCollection(np.concatenate(segments), cmap=self.scale.cmap, norm=self.scale.norm, linewidths=4)
            band.set_array(np.clip(np.concatenate(magnitudes), 0, norm_max))
            self.collection(top, band)

        circles = []
        for x, y, marker, colour in _relief_marks(piece_analysis):
            self.line(top, x, y, marker, color=colour, ms=5)
        _blank_cuts(self, top, blank)
        circles += [(c.x, c.y, c.d / 2) for c in blank.cut_circles]
        if g.holes:
            self.collection(top, _circles(_hole_circles(g), facecolor="none", edgecolor="tab:purple", lw=0.8))
            circles += _hole_circles(g)
        if g.pins:
            self.collection(top, _circles(_pin_circles(g), color="tab:red"))
            circles += _pin_circles(g)

        x0, x1, y0, y1 = _limits([blank.outer, outline, *blank.inner, *segments], circles)
        top.set_xlim(x0, x1)
        top.set_ylim(y0, y1)
        self.title.set_text(f"{g.part_id}: die (grey) and blank (green), flange coloured by edge strain; "
                            f"{len(piece_analysis.flutes)} flute(s), {len(piece_analysis.notches)} notch(es); press "
                            f"{piece_analysis.press.verdict}")

        self.shrink_limit.set_ydata([limit, limit])
        self.stretch_limit.set_ydata([-stretch, -stretch])
        labels = (f"wrinkle limit {limit:.3f} (dotted: shrink left after relief)", f"stretch limit {stretch:.3f}")
        if piece_analysis.mixed_heights:
            labels = (f"wrinkle limit {limit:.3f} of the run judged worst (each run's own dashed in its colour; "
                      "dotted: shrink left after relief)", labels[1])
        if labels != self.legend_labels:
            strain_ax.legend([self.shrink_limit, self.stretch_limit], labels, fontsize=7, loc="upper right")
            self.legend_labels = labels
        xs = np.concatenate(strain_x) if strain_x else np.array([0.0, 1.0])
        ys = np.concatenate([*strain_y, [limit, -stretch]])
        dx, dy = MARGIN * (xs.max() - xs.min()), MARGIN * (ys.max() - ys.min())
        strain_ax.set_xlim(xs.min() - dx, xs.max() + dx)
        strain_ax.set_ylim(ys.min() - dy, ys.max() + dy)
        return self.write(path)


def _picture(kind: str) -> Any:
    if kind not in _FIGURES:
        _FIGURES[kind] = _GeometryPicture() if kind == "geometry" else _PreviewPicture()
    return _FIGURES[kind]


def piece_plot(rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
    """Airfoil, outer mold line, die outline, joggles, holes, pins, relief points and flutes of one piece."""
    with _LOCK:
        return _picture("geometry").draw(rib_analysis, piece_analysis, path)


def preview_plot(rib_analysis: Any, piece_analysis: Any, path: str | Path) -> Path:
    """Die and blank together, the flange coloured by edge strain, and the strain along the outline."""
    with _LOCK:
        return _picture("preview").draw(piece_analysis, path)
