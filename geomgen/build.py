"""``geomgen build``: every surface of a project to a STEP solid and an STL (3MF if asked),
plus an assembly STEP, written whole or not at all into the project's output set."""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from . import CAUTION, __version__
from .geometry.figures import Figures, intended_figures
from .outputs import Output, output_name
from .outputs import inputs as made_from
from .project import Project

#: format -> (file suffix, what the index says the file is for)
BUILD_FORMATS = {
    "step": (".step", "B-spline solid in the datum frame, mm: machine or import it"),
    "stl": (".stl", "watertight mesh of the same skin, mm (chordal tolerance in the manifest)"),
    "3mf": (".3mf", "the STL's mesh as a 3MF package, unit mm"),
}


@dataclass
class SurfaceResult:
    name: str
    role: str
    figures: Figures
    files: list[Path] = field(default_factory=list)


@dataclass
class BuildResult:
    spec_name: str
    out_dir: Path
    parts: list[SurfaceResult]
    files: list[Path]
    seconds: float
    notes: list = field(default_factory=list)
    warnings: list = field(default_factory=list)


def build_names(project: Project, formats=("step", "stl"), assembly: bool = True) -> dict[str, list[str]]:
    """surface name (or ``assembly``) -> output names a build writes."""
    names = {m.name: [output_name(project.name, m.name, suffix=BUILD_FORMATS[f][0]) for f in formats]
             for m in project.models}
    if assembly and "step" in formats and len(project.models) > 1:
        names["assembly"] = [output_name(project.name, "assembly", suffix=".step")]
    return names


def freshness_info(project: Project) -> dict:
    """The option a build output is made with besides its inputs: the mesh tolerance."""
    return {"stl_tol_mm": project.stl_tol}


def build(project, out_dir=None, *, formats=("step", "stl"), stl_tol: float | None = None, assembly: bool = True,
          progress: Callable[[str], None] | None = None, allow_outside_files: bool = False) -> BuildResult:
    """Build every surface of ``project`` (a :class:`Project`, or a spec path) into its output set.

    Raises SpecError (exit 2), GeometryError or ExportError (exit 3). Either every file is
    written, or none is and earlier outputs stay as they were.
    """
    from .cad.shape import shapes_of

    opts: dict[str, object] = {"allow_outside_files": allow_outside_files}
    if stl_tol is not None:
        opts["stl_tol"] = stl_tol
    project = Project.of(project, out_dir, **opts)
    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    shapes = shapes_of(project)
    results = [SurfaceResult(s.name, s.model.role, intended_figures(s.model)) for s in shapes]
    for s in shapes:  # make every solid (and so refuse invalid geometry) before writing anything
        say(f"lofting {s.name}")
        s.solid
    names = build_names(project, formats, assembly)
    options = {"stl_tol": project.stl_tol, "assembly_name": project.name}
    outputs = []
    spec = project.spec
    for s, res in zip(shapes, results):
        for fmt, name in zip(formats, names[s.name]):
            outputs.append(Output(name, fmt, ([s], options), f"{s.name}: {BUILD_FORMATS[fmt][1]}",
                                  made_from.geometry(spec, s.name)))
            res.files.append(project.out_dir / name)
    if "assembly" in names:
        outputs.append(Output(names["assembly"][0], "step", (shapes, options),
                              "every surface in one STEP, each a named component in the datum frame",
                              made_from.set_geometry(spec)))
    from .hydro.guards import dimension_warnings

    result = BuildResult(project.name, project.out_dir, results, [], 0.0, fit_notes(project),
                         [w["message"] for w in dimension_warnings(project.models)])
    summary_name = output_name(project.name, "build", suffix=".txt")
    result.files = [project.out_dir / o.name for o in outputs]
    result.seconds = time.perf_counter() - t0
    outputs.append(Output(summary_name, "text", lambda: format_build_summary(result, for_file=True),
                          "what the build wrote and the intended figures per surface", made_from.set_geometry(spec)))
    done = project.write("build", outputs, say, **freshness_info(project))
    result.files = done.files  # the summary too
    result.notes += done.notes()
    result.seconds = time.perf_counter() - t0
    return result


def format_build_summary(res: BuildResult, for_file: bool = False) -> str:
    """Files written and the intended figures per surface, as aligned text.

    ``for_file``: the copy written into the set, without time or folder (same spec, same bytes)."""
    head = f"geomgen {__version__}: built '{res.spec_name}'"
    lines = [head if for_file else f"{head} into {res.out_dir} in {res.seconds:.1f} s", ""]
    lines.append(f"{'surface':<16} {'role':<10} {'span mm':>9} {'area cm²':>10} {'AR':>6} {'MAC mm':>8} "
                 f"{'volume cm³':>11}")
    for p in res.parts:
        f = p.figures
        lines.append(f"{p.name:<16} {p.role:<10} {f.span_mm:9.1f} {f.projected_area_cm2:10.1f} "
                     f"{f.aspect_ratio:6.2f} {f.mac_mm:8.2f} {f.volume_cm3:11.1f}")
    lines += ["", "intended figures (from the spec); area, AR and MAC in each part's reference plane (root chord "
              "line x span axis: the incidence does not change them; README 'What the figures mean'); "
              "'geomgen check' measures the files."]
    if res.notes:
        lines += [""] + [f"note: {n}" for n in res.notes]
    if res.warnings:  # built as asked; the sizes look like another unit
        lines += [""] + [f"warning: {w}" for w in res.warnings]
    lines += ["", "written:"]
    lines += [f"  {Path(p).relative_to(res.out_dir) if for_file else p}" for p in res.files]
    lines += ["", "CAUTION: " + CAUTION]
    return "\n".join(lines)


def fit_notes(project: Project) -> list[str]:
    """One line per section fitted to a coordinate file: its largest deviation from the file."""
    spec = project.spec
    notes = []
    named = project.models[0].named_sections if project.models else {}
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
