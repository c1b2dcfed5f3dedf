"""The die (form block) in plain numbers, and :mod:`diegen.die.occ`, the one package that uses the solid kernel.

Conventions: all lengths in mm, angles in degrees; rib plane X–Y; the die's top face at z = 0, the block extends
to z = −height.  The outline given is the die's mold line (top plane ∩ extended wall); see
:mod:`diegen.die.die_input`.  Everything here outside ``occ`` is pure 2D (numpy, shapely) and fast: the outline
model with its flutes, the placement of holes, pins and marks, the lettering and the laminate layers.
"""

__all__: list[str] = []
