"""diegen: form-block (die) and flat-blank design for rubber-pad pressed wing ribs.

Everything inside the package works in millimetres, newtons, MPa and degrees;
units are converted once, at the spec boundary (see :mod:`diegen.units`).
"""

__all__ = ["__version__"]

__version__ = "0.1.0"
