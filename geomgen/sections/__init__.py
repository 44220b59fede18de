"""Airfoil sections: unit-chord shapes and the operations on them (numpy only)."""

from .base import Section
from .naca import naca

__all__ = ["Section", "naca"]
