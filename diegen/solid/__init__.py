"""The die (form block) solid: the only layer of diegen that uses the solid-modelling kernel.

Conventions: all lengths in mm, angles in degrees; rib plane X–Y; the die's
top face at z = 0, the block extends to z = −height.  The outline given is the
die's mold line (top plane ∩ extended wall); see :mod:`diegen.solid.die_input`.

Importing this package does not import ``cadquery``; the functions that need
the kernel import it when called.
"""

from diegen.solid.die_input import Bore, DieInput, Flute, OutlineRun, Pin
from diegen.solid.form_block import build_die
from diegen.solid.settings import DEFAULT_SETTINGS, BuildSettings

__all__ = ["Bore", "BuildSettings", "DEFAULT_SETTINGS", "DieInput", "Flute", "OutlineRun", "Pin", "build_die"]
