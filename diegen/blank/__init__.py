"""The flat blank: its development from a rib piece (:mod:`~diegen.blank.develop`) and the drawing model every
blank writer translates (:mod:`~diegen.blank.drawing`).  Pure 2D; lengths in mm."""

__all__: list[str] = []
