"""The only package of diegen that imports the solid-modelling kernel (OCP, not CadQuery), always lazily.

Form block (the die as one sewn shell), checked STEP / STL export, validation, print-bed tiles, and the writer of
a piece's die files.  Importing this package does not import the kernel: the functions that need it import it
when called.
"""

__all__: list[str] = []
