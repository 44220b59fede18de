"""Spec -> files: the one pipeline behind ``geomgen build`` (and a plain Python call)."""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from . import __version__, defaults
from .geometry import build_models
from .geometry.figures import Figures, intended_figures
from .spec import load_spec


@dataclass
class PartResult:
    name: str
    role: str
    figures: Figures
    files: list[Path] = field(default_factory=list)


@dataclass
class BuildResult:
    spec_name: str
    out_dir: Path
    parts: list[PartResult]
    files: list[Path]
    seconds: float


def build(spec_path, out_dir, *, formats=("step", "stl"), stl_tol: float = defaults.STL_LINEAR_TOL_MM,
          stl_angle: float = defaults.STL_ANGULAR_TOL_DEG, assembly: bool = True,
          progress: Callable[[str], None] | None = None) -> BuildResult:
    """Build every surface of the spec at ``spec_path`` into ``out_dir``.

    Raises SpecError (exit 2), GeometryError or ExportError (exit 3). Either every file is
    written, or none is and earlier outputs stay as they were.
    """
    from .cad.export import EXPORTERS
    from .cad.loft import loft_surface
    from .outputs import Staging

    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    spec = load_spec(spec_path)
    models = build_models(spec)
    parts = [PartResult(m.name, m.role, intended_figures(m)) for m in models]
    solids = []
    for m in models:
        say(f"lofting {m.name}")
        solids.append((m.name, loft_surface(m)))
    opts = {"stl_tol": stl_tol, "stl_angle": stl_angle, "assembly_name": spec.name}
    with Staging(out_dir) as stage:
        for part, (name, solid) in zip(parts, solids):
            for fmt in formats:
                suffix, writer = EXPORTERS[fmt]
                fname = f"{spec.name}-{name}{suffix}"
                say(f"writing {fname}")
                writer([(name, solid)], stage.path(fname), opts)
                part.files.append(Path(out_dir) / fname)
        if assembly and "step" in formats and len(solids) > 1:
            fname = f"{spec.name}-assembly.step"
            say(f"writing {fname}")
            EXPORTERS["step"][1](solids, stage.path(fname), opts)
        files = stage.commit({"spec": str(spec_path), "geomgen_version": __version__})
    return BuildResult(spec.name, Path(out_dir), parts, files, time.perf_counter() - t0)
