"""The spec: TOML text -> validated pydantic model (numpy-free, kernel-free)."""

from .load import load_spec, load_spec_text, read_spec_text
from .model import SectionSpec, Spec, StationSpec, SurfaceSpec

__all__ = ["load_spec", "load_spec_text", "read_spec_text", "Spec", "SurfaceSpec", "StationSpec", "SectionSpec"]
