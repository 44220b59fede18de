"""``geomgen check``: build (or reuse fresh outputs), measure the files, compare, record."""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path

from .. import CAUTION, __version__
from ..errors import CheckFailed, ExportError, GeomgenError
from ..geometry.figures import intended_figures
from ..geometry.slices import Frame
from ..outputs import Output, file_states, holding, output_name, output_state
from ..outputs import inputs as made_from
from ..project import Project
from .compare import Record, compare_part, station_records
from .sections import section_records


@dataclass
class CheckResult:
    spec_name: str
    out_dir: Path
    built: bool
    records: list[Record]
    parts: dict = field(default_factory=dict)  # surface -> sampling, triangles, watertight, files
    seconds: dict = field(default_factory=dict)
    stl_tol: float = 0.05
    record_files: list = field(default_factory=list)
    modified: list = field(default_factory=list)  # outputs changed since geomgen wrote them
    stale: list = field(default_factory=list)  # outputs of this set one of whose inputs changed
    files: list = field(default_factory=list)  # every file of the set: current, or which inputs changed
    notes: list = field(default_factory=list)
    balance: dict | None = None  # vortex-lattice summary when the spec has a [flight] table
    balance_skipped: str | None = None  # why there is no balance although [flight] was given

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
                "built": self.built, "ok": self.ok, "modified_since_written": self.modified,
                "stale_outputs": self.stale, "files": self.files, "notes": self.notes, "stl_tol_mm": self.stl_tol,
                "parts": {k: dict(v) for k, v in self.parts.items()},
                "records": [r.as_dict() for r in self.records], "balance": self.balance,
                "balance_skipped": self.balance_skipped, "seconds": self.seconds, "caution": CAUTION}


def check(project, out_dir=None, *, rebuild: bool = False, stl_tol: float | None = None,
          write_record: bool = True, progress=None, allow_outside_files: bool = False) -> CheckResult:
    """Measure what a build of the project wrote and hold it against the intended figures and
    the spec's ``expect`` and ``check_at`` tables; write the check record into the set.

    ``project`` is a :class:`Project` or a spec path. The result is kept on the project, so a
    report in the same run does not measure again. Raises SpecError / GeometryError /
    CheckFailed (a file that cannot be read back); returns the result whatever the verdicts
    (see :attr:`CheckResult.ok`)."""
    opts: dict[str, object] = {"allow_outside_files": allow_outside_files}
    if stl_tol is not None:
        opts["stl_tol"] = stl_tol
    project = Project.of(project, out_dir, **opts)
    # the result depends on whether the set was rebuilt and recorded: one memo per way of asking
    # (a rebuild always measures again; its result then serves a plain check of the project)
    if rebuild:
        res = _held_check(project, rebuild, write_record, progress)
        project._memo[memo_key(write_record)] = res
        return res
    return project.memo(memo_key(write_record), lambda: _held_check(project, rebuild, write_record, progress))


def memo_key(write_record: bool = True) -> tuple:
    """The key a project keeps its check result under (a test may place one there)."""
    return ("check.result", write_record)


def _held_check(project: Project, rebuild: bool, write_record: bool, progress) -> CheckResult:
    """The check under the folder's lock, after recovering what interrupted runs left: the
    files measured are the set the manifest names, and no other run changes them meanwhile."""
    with holding(project.out_dir) as recovered:
        res = _check(project, rebuild, write_record, progress)
    res.notes[:0] = recovered
    return res


def _check(project: Project, rebuild: bool, write_record: bool, progress) -> CheckResult:
    from ..build import build, build_names, freshness_info

    say = progress or (lambda m: None)
    t0 = time.perf_counter()
    out = project.out_dir
    names = build_names(project)
    info = project.output_info("check")
    flat = [n for ns in names.values() for n in ns]
    current, modified = output_state(out, flat, info, freshness_info(project))
    built = rebuild or not current
    notes = []
    if built:
        say("building (outputs missing or from another spec or version)")
        notes += build(project, progress=progress).notes
        modified = []
    states = file_states(out, project.name, info)  # after the build: what is still stale, and why
    if write_record:  # the check's own record is written again now
        own = {output_name(project.name, "check", suffix=s) for s in (".md", ".json")}
        states = [f for f in states if f["name"] not in own]
    stale = [f["name"] for f in states if not f["current"]]
    t1 = time.perf_counter()

    from ..cad.measure import measure_step
    from .measure import measure_step_solid, measure_stl

    t2 = time.perf_counter()
    records, parts = [], {}
    section_seconds = 0.0
    for m, sspec in zip(project.models, project.spec.surface):
        say(f"measuring {m.name}")
        step_name, stl_name = names[m.name]
        step_path, stl_path = out / step_name, out / stl_name
        ys = sorted({float(v) for v in m.planform.y} | {float(c.y) for c in sspec.check_at})
        frame = Frame(**m.span_frame())
        try:
            solids = measure_step(step_path)
            if len(solids) != 1:
                raise CheckFailed(f'surface "{m.name}": {step_name} holds {len(solids)} solids, expected one; '
                                  "this is a geometry fault: rebuild before machining")
            ms = measure_step_solid(solids[0], ys, frame)
        except (ExportError, ValueError, IndexError, ArithmeticError) as exc:
            raise CheckFailed(f'surface "{m.name}": the written {step_name} cannot be measured ({exc}); '
                              "this is a geometry fault: rebuild before machining") from None
        try:
            st = measure_stl(stl_path, frame)
        except (OSError, ValueError, IndexError, ArithmeticError) as exc:
            raise CheckFailed(f'surface "{m.name}": the written {stl_name} cannot be measured ({exc}); '
                              "this is a geometry fault: rebuild before printing") from None
        intended = intended_figures(m).as_dict()
        expect = {k: getattr(sspec.expect, k) for k in type(sspec.expect).model_fields} if sspec.expect else {}
        records += compare_part(m.name, intended, ms["figures"], st["figures"], project.stl_tol,
                                {k: v for k, v in expect.items() if v is not None}, mirror=m.mirror)
        records += station_records(m.name, m, ms["stations"], sspec.check_at)
        t_sec = time.perf_counter()
        sec_recs, sec_table = section_records(m.name, m, ms["stations"], ms["axis"], sspec.check_at, expect)
        records += sec_recs
        section_seconds += time.perf_counter() - t_sec
        parts[m.name] = {"role": m.role, "step": step_name, "stl": stl_name,
                         "skin_sampling_mm": ms["sampling_mm"], "stl_triangles": st["triangles"],
                         "watertight": st["watertight"], "sections": sec_table}
    t3 = time.perf_counter()
    res = CheckResult(project.name, out, built, records, parts,
                      {"build_or_reuse": t1 - t0, "kernel_import": t2 - t1, "measure": t3 - t2,
                       "section_properties": section_seconds}, project.stl_tol)
    res.modified, res.stale, res.notes = modified, stale, notes
    res.files = states
    if project.spec.flight is not None:
        from ..hydro import balance_of

        try:
            res.balance = balance_of(project).as_dict()
        except GeomgenError as exc:  # the geometry check stands on its own; say why there is no balance
            why = "; ".join(getattr(exc, "problems", None) or [str(exc)])
            have = ", ".join(f'{m.role} "{m.name}" ({m.orientation})' for m in project.models)
            res.balance_skipped = f"[flight] balance skipped: {why} (this spec has: {have})"
    if write_record:
        from .text import format_markdown

        spec = project.spec
        made = made_from.set_geometry(spec) + made_from.table_of_all(spec, "expect", "check_at") + \
            made_from.flight(spec)
        record = [Output(output_name(project.name, "check", suffix=".md"), "text", format_markdown(res),
                         "check record: every figure intended / measured in STEP and STL, verdicts", made),
                  Output(output_name(project.name, "check", suffix=".json"), "json", res.as_dict(),
                         "the check record as JSON", made)]
        done = project.write("check", record)
        res.record_files = done.files
        res.notes += done.notes()
    return res

