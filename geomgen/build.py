"""Spec -> files: the one pipeline behind ``geomgen build`` (and a plain Python call)."""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path
from typing import Callable

import numpy as np

from . import defaults
from .geometry import SurfaceModel, build_models
from .geometry.figures import Figures, intended_figures
from .geometry.skin import Skin
from .geometry.tessellate import tessellate
from .sections.base import Section
from .spec import load_spec


@dataclass
class Part:
    """One surface on its way to files: model, skin, and (lazily) solid and meshes."""

    model: SurfaceModel

    @property
    def name(self) -> str:
        return self.model.name

    @property
    def skin(self) -> Skin:
        return self.model.skin

    @cached_property
    def solid(self):
        from .cad.loft import solid_from_skin

        return solid_from_skin(self.skin, te_open=self.model.spec.te_thickness > 0, name=self.name)

    def mesh(self, tol: float = defaults.STL_LINEAR_TOL_MM):
        """(vertices (n, 3) mm, faces (m, 3)) of the same skin, chordal deviation ``tol`` mm."""
        # start coarse (creases included) and let the chordal test refine where needed
        v0 = np.concatenate([seg[::3] for seg in self.model.loft_y()] + [self.model.loft_breaks()])
        return tessellate(self.skin, self.model.spec.te_thickness > 0, Section.loop_parameter(10), v0, tol)


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
    notes: list = field(default_factory=list)


def build_info(spec_path, stl_tol: float) -> dict:
    """What makes outputs fresh: the spec's bytes and the mesh tolerance (and the version)."""
    from .outputs import spec_digest

    return {"spec": Path(spec_path).name, "spec_sha256": spec_digest(spec_path), "stl_tol_mm": stl_tol}


def output_names(spec_name: str, part_names, formats=("step", "stl"), assembly: bool = True) -> list[str]:
    """File names a build writes."""
    from .cad.export import EXPORTERS

    names = [part_file(spec_name, p, EXPORTERS[f][0]) for p in part_names for f in formats]
    if assembly and "step" in formats and len(part_names) > 1:
        names.append(part_file(spec_name, "assembly", ".step"))
    return names


def part_file(spec_name: str, part: str, suffix: str) -> str:
    """The one naming rule of build outputs: ``<set>-<part><suffix>``."""
    return f"{spec_name}-{part}{suffix}"


def build(spec_path, out_dir, *, formats=("step", "stl"), stl_tol: float = defaults.STL_LINEAR_TOL_MM,
          assembly: bool = True, progress: Callable[[str], None] | None = None,
          allow_outside_files: bool = False) -> BuildResult:
    """Build every surface of the spec at ``spec_path`` into ``out_dir``.

    Raises SpecError (exit 2), GeometryError or ExportError (exit 3). Either every file is
    written, or none is and earlier outputs stay as they were.
    """
    from .cad.export import EXPORTERS
    from .outputs import Staging

    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    spec = load_spec(spec_path, allow_outside_files)
    parts = [Part(m) for m in build_models(spec)]
    results = [PartResult(p.name, p.model.role, intended_figures(p.model)) for p in parts]
    for p in parts:  # make every solid (and so refuse invalid geometry) before writing anything
        say(f"lofting {p.name}")
        p.solid
    opts = {"stl_tol": stl_tol, "assembly_name": spec.name}
    with Staging(out_dir) as stage:
        for p, res in zip(parts, results):
            for fmt in formats:
                suffix, writer = EXPORTERS[fmt]
                fname = part_file(spec.name, p.name, suffix)
                say(f"writing {fname}")
                writer([p], stage.path(fname), opts)
                res.files.append(Path(out_dir) / fname)
        if assembly and "step" in formats and len(parts) > 1:
            fname = part_file(spec.name, "assembly", ".step")
            say(f"writing {fname}")
            EXPORTERS["step"][1](parts, stage.path(fname), opts)
        files = stage.commit(build_info(spec_path, stl_tol))
    return BuildResult(spec.name, Path(out_dir), results, files, time.perf_counter() - t0, fit_notes(spec, parts))


def fit_notes(spec, parts) -> list[str]:
    """One line per section fitted to a coordinate file: its largest deviation from the file."""
    notes = []
    named = parts[0].model.named_sections if parts else {}
    for name, sspec in spec.sections.items():
        sec = named.get(name)
        if sspec.file is None or sec is None or sec.fit_deviation is None:
            continue
        chords = [st.chord for sf in spec.surface for st in sf.station if st.section == name or
                  (st.blend is not None and st.blend.section == name)]
        mm = f" ({sec.fit_deviation * max(chords):.3f} mm at its largest chord, {max(chords):g} mm)" if chords else ""
        notes.append(f"section '{name}' fitted to {sspec.file}: largest deviation from the file's points "
                     f"{100 * sec.fit_deviation:.4f} % chord{mm}")
    return notes
