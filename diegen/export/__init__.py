"""Leaf writers of the blank drawing and the plots: DXF, SVG, PDF, PNG."""

__all__: list[str] = []
