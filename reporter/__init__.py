"""Waymark: goal-alignment reports from an institution's publication list."""

__version__ = "0.1.0"
