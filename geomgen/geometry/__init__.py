"""Surface geometry from the spec: planform, placement, intended figures (numpy only)."""

from .model import build_models
from .surface import SurfaceModel

__all__ = ["build_models", "SurfaceModel"]
