"""The check pass: build (or reuse fresh outputs), measure the files, compare, record."""

from __future__ import annotations

import json
import time
from dataclasses import dataclass, field
from pathlib import Path

from .. import CAUTION, __version__, defaults
from ..errors import CheckFailed, ExportError
from .compare import Record, compare_part, station_records


@dataclass
class CheckResult:
    spec_name: str
    out_dir: Path
    built: bool
    records: list[Record]
    parts: dict = field(default_factory=dict)  # part -> sampling, triangles, watertight, files
    seconds: dict = field(default_factory=dict)
    stl_tol: float = defaults.STL_LINEAR_TOL_MM
    record_files: list = field(default_factory=list)
    modified: list = field(default_factory=list)  # outputs changed since geomgen wrote them
    balance: dict | None = None  # vortex-lattice summary when the spec has a [flight] table
    balance_skipped: str | None = None  # why a spec with [flight] got no balance

    @property
    def faults(self) -> list[Record]:
        return [r for r in self.records if r.fault]

    @property
    def failures(self) -> list[Record]:
        return [r for r in self.records if r.verdict == "FAIL"]

    @property
    def ok(self) -> bool:
        return not self.faults and not self.failures and not self.modified and \
            all(p.get("watertight", True) for p in self.parts.values())

    def as_dict(self) -> dict:
        return {"geomgen_version": __version__, "spec": self.spec_name, "out_dir": str(self.out_dir),
                "built": self.built, "ok": self.ok, "modified_since_written": self.modified, "stl_tol_mm": self.stl_tol,
                "parts": {k: {kk: vv for kk, vv in v.items()} for k, v in self.parts.items()},
                "records": [r.as_dict() for r in self.records], "balance": self.balance,
                "balance_skipped": self.balance_skipped,
                "seconds": self.seconds, "caution": CAUTION}


def check(spec_path, out_dir=None, *, rebuild: bool = False, stl_tol: float = defaults.STL_LINEAR_TOL_MM,
          write_record: bool = True, progress=None, allow_outside_files: bool = False) -> CheckResult:
    """Measure what a build of ``spec_path`` wrote and hold it against the intended figures
    and the spec's ``expect`` and ``check_at`` tables. Raises SpecError / GeometryError;
    returns the result whatever the verdicts (see :attr:`CheckResult.ok`)."""
    from ..build import build, build_info, output_names
    from ..geometry import build_models
    from ..geometry.figures import intended_figures
    from ..outputs import output_state
    from ..spec import load_spec

    say = progress or (lambda m: None)
    t0 = time.perf_counter()
    spec = load_spec(spec_path, allow_outside_files)
    models = build_models(spec)
    out = Path(out_dir) if out_dir else Path("out") / Path(spec_path).stem
    names = output_names(spec.name, [m.name for m in models])
    current, modified = output_state(out, names, build_info(spec_path, stl_tol))
    built = rebuild or not current
    if built:
        say("building (outputs missing or from another spec or version)")
        build(spec_path, out, stl_tol=stl_tol, progress=progress, allow_outside_files=allow_outside_files)
        modified = []
    t1 = time.perf_counter()

    from ..cad.measure import measure_step
    from .measure import measure_step_solid, measure_stl
    from .slices import Frame

    t2 = time.perf_counter()
    records, parts = [], {}
    for m, sspec in zip(models, spec.surface):
        say(f"measuring {m.name}")
        step_path = out / f"{spec.name}-{m.name}.step"
        stl_path = out / f"{spec.name}-{m.name}.stl"
        try:
            solids = measure_step(step_path)
        except ExportError as exc:
            raise CheckFailed(f'surface "{m.name}": the written STEP cannot be read back ({exc}); '
                              "this is a geometry fault: rebuild before machining") from None
        if len(solids) != 1:
            raise CheckFailed(f'surface "{m.name}": {step_path.name} holds {len(solids)} solids, expected one')
        ys = sorted({float(v) for v in m.planform.y} | {float(c.y) for c in sspec.check_at})
        frame = Frame(**m.span_frame())
        ms = measure_step_solid(solids[0], ys, frame)
        st = measure_stl(stl_path, frame)
        intended = intended_figures(m).as_dict()
        expect = {k: getattr(sspec.expect, k) for k in type(sspec.expect).model_fields} if sspec.expect else {}
        records += compare_part(m.name, intended, ms["figures"], st["figures"], stl_tol,
                                {k: v for k, v in expect.items() if v is not None})
        records += station_records(m.name, m, ms["stations"], sspec.check_at)
        parts[m.name] = {"role": m.role, "step": step_path.name, "stl": stl_path.name,
                         "skin_sampling_mm": ms["sampling_mm"], "stl_triangles": st["triangles"],
                         "watertight": st["watertight"]}
    t3 = time.perf_counter()
    res = CheckResult(spec.name, out, built, records, parts,
                      {"build_or_reuse": t1 - t0, "kernel_import": t2 - t1, "measure": t3 - t2}, stl_tol)
    res.modified = modified
    if spec.flight is not None:
        from ..errors import GeomgenError
        from ..hydro import analyse

        try:
            res.balance = analyse(models, spec.flight).as_dict()
        except GeomgenError as exc:  # the geometry check stands on its own; say why there is no balance
            why = "; ".join(getattr(exc, "problems", None) or [str(exc)])
            have = ", ".join(f'{m.role} "{m.name}" ({m.orientation})' for m in models)
            res.balance_skipped = f"[flight] balance skipped: {why} (this spec has: {have})"
    if write_record:
        from ..outputs import Staging
        from .report import format_markdown

        with Staging(out) as stage:
            stage.path(f"{spec.name}-check.md").write_text(format_markdown(res))
            stage.path(f"{spec.name}-check.json").write_text(json.dumps(res.as_dict(), indent=2, default=float) + "\n")
            res.record_files = stage.commit({"spec": Path(spec_path).name})
    return res
