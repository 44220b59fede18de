"""3D shop parts at the CAD edge: mounting pad and holes, incidence shims, printable pieces,
cores and mould halves, each built, checked and meshed before anything is written, then
written together through the one writer table and whole-or-nothing commit of
:mod:`geomgen.outputs`.

Entry point: :func:`write_shop_parts`; the summary text: :func:`format_parts_summary`.
"""

from __future__ import annotations

import time
from pathlib import Path
from typing import Callable

from .. import __version__
from ..errors import SpecError
from .summary import format_parts_summary

__all__ = ["ShopParts", "write_shop_parts", "format_parts_summary"]


class ShopParts(list):
    """The written paths (a list), with ``report`` (the dict also written as JSON),
    ``out_dir`` and ``seconds``."""

    def __init__(self, files, report: dict, out_dir: Path, seconds: float):
        super().__init__(files)
        self.report, self.out_dir, self.seconds = report, Path(out_dir), seconds
        self.notes: list[str] = []


def _surfaces_to_make(project) -> list:
    """The surfaces with a shop table, after every spec problem of the command in one run
    (the models': coordinate files, stations; and the tables') was refused (SpecError)."""
    spec, src = project.spec, project.source
    problems = []
    try:
        project.models
    except SpecError as exc:
        problems += exc.problems
    for i, sf in enumerate(spec.surface):
        if sf.mount is not None and sf.orientation != "horizontal":
            problems.append(f'{src}: surface[{i}] "{sf.name}" mount: a mounting pad is made for horizontal '
                            f"surfaces (wing, stabilizer); this one is {sf.orientation}")
    todo = [sf for sf in spec.surface if sf.mount or sf.printing or sf.laminate]
    if not todo:
        problems.append(f"{src}: no surface has a [surface.mount], [surface.printing] or [surface.laminate] table; "
                        "nothing to make (specs/demo-stabilizer-shop.toml in the geomgen sources shows each table)")
    if problems:
        raise SpecError(problems)
    return todo


def write_shop_parts(project, out_dir=None, *, progress: Callable[[str], None] | None = None,
                     allow_outside_files: bool = False) -> ShopParts:
    """Build the shop parts of every surface with a ``[surface.mount]``, ``[surface.printing]`` or
    ``[surface.laminate]`` table and write them into the project's output set, all or nothing.

    ``project``: a :class:`~geomgen.project.Project` or a spec path. Raises SpecError (exit 2),
    GeometryError or ExportError (exit 3); nothing is written then.
    """
    from ..cad.shape import shape_of
    from ..hydro import shim_trim_change
    from ..outputs import Output, output_name
    from ..outputs import inputs as made_from
    from ..project import Project
    from .laminate import laminate_outputs
    from .mount_solids import mount_outputs
    from .output import namer
    from .pieces import print_outputs

    project = Project.of(project, out_dir, allow_outside_files=allow_outside_files)
    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    spec = project.spec
    todo = _surfaces_to_make(project)
    outputs, surfaces, notes = [], [], []
    for sf in todo:
        model = project.model(sf.name)
        name_of = namer(project.name, sf.name)
        rep = {"name": sf.name, "role": sf.role}
        solid = None
        if sf.mount or sf.laminate:
            say(f"lofting {sf.name}")
            solid = shape_of(project, sf.name).solid
        if sf.mount:
            words = {}
            for sh in sf.mount.shim:
                words[sh.angle], why = shim_trim_change(project, sf.name, sh.angle)
                if why and why not in notes:
                    notes.append(why)
            outs, rep["mount"], _ = mount_outputs(model, solid, spec, name_of, say, words)
            outputs += outs
        if sf.printing:
            outs, rep["printing"] = print_outputs(model, name_of, say)
            outputs += outs
        if sf.laminate:
            outs, rep["laminate"] = laminate_outputs(model, solid, name_of, say)
            outputs += outs
        # a surface's parts: its geometry and shop tables; shims also tell the trim change (the set, [flight])
        made = made_from.geometry(spec, sf.name) + made_from.tables(spec, sf.name, "mount", "printing", "laminate")
        if sf.mount and sf.mount.shim:
            made = list(dict.fromkeys(made + made_from.set_geometry(spec) + made_from.flight(spec)))
        for o in outputs:
            if o.inputs is None:
                o.inputs = made
        surfaces.append(rep)
    report = {"written_by": f"geomgen {__version__}", "spec": spec.name, "frame": "datum: x aft, y starboard, z up; mm",
              "surfaces": surfaces, "notes": notes}
    res = ShopParts([project.out_dir / o.name for o in outputs], report, project.out_dir, 0.0)
    res.seconds = time.perf_counter() - t0
    made = list(dict.fromkeys(made_from.set_geometry(spec) + made_from.flight(spec) +
                              made_from.table_of_all(spec, "mount", "printing", "laminate")))
    outputs += [Output(output_name(project.name, "parts", suffix=".json"), "json", report,
                       "every shop part: sizes, volumes, poses (datum to file matrices), checks", made),
                Output(output_name(project.name, "parts", suffix=".txt"), "text",
                       lambda: format_parts_summary(res, for_file=True), "what the parts command wrote, per surface",
                       made)]
    done = project.write("parts", outputs, say)
    res[:] = done.files  # the report and the summary too
    res.notes = done.notes()
    res.seconds = time.perf_counter() - t0
    return res
