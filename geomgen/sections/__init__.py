"""Airfoil sections: unit-chord shapes and the operations on them (numpy only)."""

from .base import Section
from .coords import parse_coordinates, read_coordinates
from .naca import naca

__all__ = ["Section", "naca", "parse_coordinates", "read_coordinates"]
