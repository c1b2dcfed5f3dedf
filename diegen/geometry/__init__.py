"""Plane geometry of a rib, numpy and shapely only: sections, loops, polygons, pieces, holes, pins."""

__all__: list[str] = []
