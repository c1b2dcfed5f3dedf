"""PNG plots of a rib piece for a person to look at (matplotlib, Agg backend, no global settings changed)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from diegen.fileio import write_with


def _figure(width_in: float, height_in: float):
    from matplotlib.figure import Figure

    return Figure(figsize=(width_in, height_in), dpi=110)


def _loop(ax, points, **style) -> None:
    p = np.asarray(points)
    p = np.vstack([p, p[:1]])
    ax.plot(p[:, 0], p[:, 1], **style)


def _blank_cuts(ax, blank) -> None:
    """The blank's inner cut contours and cut circles (relief and pilot holes)."""
    from matplotlib.patches import Circle

    for loop in blank.inner:
        _loop(ax, loop, color="tab:green", lw=0.7)
    for c in blank.cut_circles:
        ax.add_patch(Circle((c.x, c.y), c.d / 2, fill=False, color="tab:green", lw=0.6, ls="--"))


def _mark_relief(ax, piece_analysis) -> None:
    """Flutes (▼) and notches (▲) at their positions along the die outline."""
    g = piece_analysis.piece
    ring = np.asarray(list(g.outline) + [g.outline[0]])
    s = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(ring, axis=0).T))])
    for items, marker, colour in ((piece_analysis.flutes, "v", "tab:cyan"), (piece_analysis.notches, "^", "tab:olive")):
        if items:
            at = np.array([item.s_mm for item in items]) % s[-1]
            ax.plot(np.interp(at, s, ring[:, 0]), np.interp(at, s, ring[:, 1]), marker, color=colour, ms=5)


def piece_plot(rib_analysis, piece_analysis, path: str | Path) -> Path:
    """Airfoil, outer mold line, die outline, joggles, holes, pins, relief points and flutes of one piece."""
    from matplotlib.patches import Circle

    g = piece_analysis.piece
    rib = rib_analysis.geometry
    x0, x1 = g.x_range_mm
    pad = 15.0
    fig = _figure(11, 5.2)
    ax = fig.add_subplot(1, 1, 1)
    for points, style in ((rib.section, dict(color="0.6", lw=0.8, label="airfoil")),
                          (rib.oml, dict(color="tab:blue", lw=0.8, ls="--", label="outer mold line")),
                          (piece_analysis.blank.outer, dict(color="tab:green", lw=0.9, label="flat blank"))):
        _loop(ax, points, **style)
    _loop(ax, g.outline, color="k", lw=1.6, label="die outline")
    for j in g.joggles:
        ax.axvspan(j.x_start_mm, j.x_end_mm, color="tab:orange", alpha=0.15, lw=0)
    for h in g.holes:
        ax.add_patch(Circle((h.x, h.y), h.d / 2, fill=False, color="tab:purple", lw=1.0))
    for pin in g.pins:
        ax.add_patch(Circle((pin.x, pin.y), max(pin.d, 3.0) / 2, color="tab:red"))
    if g.relief_points:
        r = np.asarray(g.relief_points)
        ax.plot(r[:, 0], r[:, 1], "s", mfc="none", color="tab:brown", ms=7, label="bend relief")
    _mark_relief(ax, piece_analysis)
    _blank_cuts(ax, piece_analysis.blank)
    ax.plot([], [], "v", color="tab:cyan", label="flutes")
    ax.plot([], [], color="tab:orange", alpha=0.4, lw=6, label="joggle zones")
    ax.plot([], [], "o", color="tab:purple", mfc="none", label="lightening holes")
    ax.plot([], [], "o", color="tab:red", label="tooling pins")
    ax.set_xlim(x0 - pad, x1 + pad)
    ys = np.asarray(g.outline)[:, 1]
    ax.set_ylim(ys.min() - pad - 10, ys.max() + pad + 10)
    ax.set_aspect("equal")
    ax.grid(True, lw=0.3)
    ax.set_xlabel("x from the leading edge (mm)")
    ax.set_ylabel("y (mm)")
    ax.set_title(f"{g.part_id}: {g.name} piece, die outline and web features "
                 f"(max shrink {piece_analysis.max_shrink:.3f}, press verdict {piece_analysis.press.verdict})")
    ax.legend(loc="upper right", fontsize=7, ncol=2)
    fig.tight_layout()
    write_with(path, lambda tmp: fig.savefig(tmp, format="png"))
    return Path(path)


def _along(points: np.ndarray, s: np.ndarray) -> np.ndarray:
    seg = np.hypot(*np.diff(points, axis=0).T)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    return np.column_stack([np.interp(s, cum, points[:, 0]), np.interp(s, cum, points[:, 1])])


def preview_plot(rib_analysis, piece_analysis, path: str | Path) -> Path:
    """Die and blank together, the flange coloured by edge strain, and the strain along the outline."""
    from matplotlib.collections import LineCollection
    from matplotlib.patches import Circle

    g = piece_analysis.piece
    fig = _figure(11, 7.5)
    top = fig.add_axes((0.07, 0.40, 0.80, 0.52))
    bar_ax = fig.add_axes((0.89, 0.40, 0.015, 0.52))
    strain_ax = fig.add_axes((0.07, 0.07, 0.80, 0.24))
    _loop(top, piece_analysis.blank.outer, color="tab:green", lw=0.9, label="flat blank")
    _loop(top, g.outline, color="0.3", lw=0.6, label="die outline")
    limit = piece_analysis.alloy.shrink_limit
    norm_max = max(2 * limit, piece_analysis.max_shrink, piece_analysis.max_stretch, 1e-3)
    collection = None
    for run in piece_analysis.runs:
        points = np.asarray(g.plain_runs[run.run_index].points)
        xy = _along(points, run.profile.s_mm)
        segments = np.stack([xy[:-1], xy[1:]], axis=1)
        magnitude = np.abs(run.profile.strain[:-1])
        collection = LineCollection(segments, cmap="inferno_r", norm=None, linewidths=4)
        collection.set_array(np.clip(magnitude, 0, norm_max))
        collection.set_clim(0, norm_max)
        top.add_collection(collection)
        strain_ax.plot(run.s_offset_mm + run.profile.s_mm, -run.profile.strain, lw=1.0)
    if collection is not None:
        colorbar = fig.colorbar(collection, cax=bar_ax)
        colorbar.set_label("flange edge strain (|e|)")
        colorbar.ax.axhline(limit, color="tab:blue", lw=1.5)
    _mark_relief(top, piece_analysis)
    _blank_cuts(top, piece_analysis.blank)
    for h in g.holes:
        top.add_patch(Circle((h.x, h.y), h.d / 2, fill=False, color="tab:purple", lw=0.8))
    for pin in g.pins:
        top.add_patch(Circle((pin.x, pin.y), max(pin.d, 3.0) / 2, color="tab:red"))
    top.set_aspect("equal")
    top.autoscale_view()
    top.grid(True, lw=0.3)
    top.set_title(f"{g.part_id}: die (grey) and blank (green), flange coloured by edge strain; "
                  f"{len(piece_analysis.flutes)} flute(s), {len(piece_analysis.notches)} notch(es); press "
                  f"{piece_analysis.press.verdict}", fontsize=9)
    top.set_xlabel("x (mm)")
    strain_ax.axhline(limit, color="tab:blue", ls="--", lw=1, label=f"shrink limit {limit:.3f}")
    strain_ax.axhline(-piece_analysis.alloy.stretch_limit, color="tab:red", ls="--", lw=1,
                      label=f"stretch limit {piece_analysis.alloy.stretch_limit:.3f}")
    strain_ax.set_xlabel("position along the die outline (mm)")
    strain_ax.set_ylabel("shrink (+) / stretch (−)")
    strain_ax.grid(True, lw=0.3)
    strain_ax.legend(fontsize=7, loc="upper right")
    write_with(path, lambda tmp: fig.savefig(tmp, format="png"))
    return Path(path)
