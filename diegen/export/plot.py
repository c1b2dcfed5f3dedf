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
    ring = np.asarray(list(g.outline) + [g.outline[0]])
    seg = np.hypot(*np.diff(ring, axis=0).T)
    s = np.concatenate([[0.0], np.cumsum(seg)])
    for flute in piece_analysis.flutes:
        fx, fy = np.interp(flute.s_mm % s[-1], s, ring[:, 0]), np.interp(flute.s_mm % s[-1], s, ring[:, 1])
        ax.plot(fx, fy, "v", color="tab:cyan", ms=5)
    for notch in piece_analysis.notches:
        fx, fy = np.interp(notch.s_mm % s[-1], s, ring[:, 0]), np.interp(notch.s_mm % s[-1], s, ring[:, 1])
        ax.plot(fx, fy, "^", color="tab:olive", ms=5)
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
