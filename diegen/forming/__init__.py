"""Forming models as pure functions: bend, springback, flange strain, relief, press."""

__all__: list[str] = []
