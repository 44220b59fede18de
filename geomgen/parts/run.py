"""3D shop parts at the CAD edge: mounting pad and holes, incidence shims, printable pieces,
cores and mould halves, each built, checked and meshed before anything is written, then
written together through one :class:`geomgen.outputs.Staging`.

Entry point: :func:`write_shop_parts`; the summary text: :func:`format_parts_summary`.
"""

from __future__ import annotations

import json
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


def report_name(spec_name: str) -> str:
    return f"{spec_name}-shop-parts.json"


def write_shop_parts(spec_path, out_dir, *, progress: Callable[[str], None] | None = None) -> ShopParts:
    """Build the shop parts of every surface with a ``[surface.mount]``, ``[surface.printing]`` or
    ``[surface.laminate]`` table and write them into ``out_dir``, all or nothing.

    Raises SpecError (exit 2), GeometryError or ExportError (exit 3); nothing is written then.
    """
    from ..build import Part
    from ..geometry import build_models
    from ..outputs import Staging, spec_digest
    from ..spec import load_spec
    from .laminate import laminate_outputs
    from .mount_solids import mount_outputs
    from .pieces import print_outputs

    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    spec = load_spec(spec_path)
    src = str(spec_path)
    problems = []
    for i, sf in enumerate(spec.surface):
        if sf.mount is not None and sf.orientation != "horizontal":
            problems.append(f'{src}: surface[{i}] "{sf.name}" mount: a mounting pad is made for horizontal '
                            f"surfaces (wing, stabilizer); this one is {sf.orientation}")
    todo = [sf for sf in spec.surface if sf.mount or sf.printing or sf.laminate]
    if not todo:
        problems.append(f"{src}: no surface has a [surface.mount], [surface.printing] or [surface.laminate] table; "
                        "nothing to make")
    if problems:
        raise SpecError(problems)
    models = {m.name: m for m in build_models(spec)}
    outputs, surfaces = [], []
    for sf in todo:
        model = models[sf.name]
        stem = f"{spec.name}-{sf.name}"
        rep = {"name": sf.name, "role": sf.role}
        solid = None
        if sf.mount or sf.laminate:
            say(f"lofting {sf.name}")
            solid = Part(model).solid
        if sf.mount:
            outs, rep["mount"], _ = mount_outputs(model, solid, spec, stem, say)
            outputs += outs
        if sf.printing:
            outs, rep["printing"] = print_outputs(model, stem, say)
            outputs += outs
        if sf.laminate:
            outs, rep["laminate"] = laminate_outputs(model, solid, stem, say)
            outputs += outs
        surfaces.append(rep)
    report = {"written_by": f"geomgen {__version__}", "spec": spec.name, "frame": "datum: x aft, y starboard, z up; mm",
              "surfaces": surfaces}
    with Staging(out_dir) as stage:
        for out in outputs:
            say(f"writing {out.name}")
            out.write(stage.path(out.name))
        rname = report_name(spec.name)
        report["seconds"] = round(time.perf_counter() - t0, 2)
        stage.path(rname).write_text(json.dumps(report, indent=1, default=float) + "\n")
        files = stage.commit({"spec": Path(spec_path).name, "spec_sha256": spec_digest(spec_path),
                              "made_by": "shop parts"})
    return ShopParts(files, report, Path(out_dir), time.perf_counter() - t0)
