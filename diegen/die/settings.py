"""Named tolerances and knobs of the die builder and its exporters (mm, degrees).

One table, so every module uses the same numbers.  The defaults were chosen by
measurement on a 1016 mm chord airfoil nose piece (see ``tests/bench_die.py``).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["DEFAULT_SETTINGS", "KERNEL_TOL_MM", "VOLUME_EPS", "BuildSettings"]


@dataclass(frozen=True)
class BuildSettings:
    """Knobs of :func:`diegen.die.occ.form_block.build_die`.

    ``fillet_sections``: loft sections across the top-edge arc (6 put the lofted
    arc within 0.002 mm of the true radius; 4 left 0.035 mm).
    ``outline_tol_mm``: allowed deviation of each section's spline from the exact offset.
    ``max_spacing_mm``: longest gap between spline samples along a flat stretch.
    ``sew_tol_mm``: tolerance for sewing the lofted faces into one shell.
    ``engrave_depth_mm``: depth of the bottom-face engraving.
    ``engrave_max_height_mm``, ``engrave_min_height_mm``: the range of letter heights tried.
    ``min_wall_mm``: least material left between a hole and the die's edge or another hole
    (common practice, no source).
    """

    fillet_sections: int = 6
    outline_tol_mm: float = 0.001
    max_spacing_mm: float = 6.0
    sew_tol_mm: float = 1e-6
    engrave_depth_mm: float = 0.5
    engrave_max_height_mm: float = 8.0
    engrave_min_height_mm: float = 2.5
    min_wall_mm: float = 1.0


DEFAULT_SETTINGS = BuildSettings()

# Kernel tolerance for geometric comparisons inside the solid layer (mm).
KERNEL_TOL_MM = 1e-6
# Relative precision asked of volume integration (BRepGProp); the default Gauss
# rule misjudged a lofted die's volume by 5 %, the adaptive rule does not.
VOLUME_EPS = 1e-7
