"""The three studies: compare (what if, side by side), size family, sweep; and their tables.

Every study starts from a project's spec *data*, makes variants as spec text
(:mod:`geomgen.studies.changes`), runs them through an :class:`~geomgen.studies.run.Executor`
and returns a :class:`Table` (rows of input values and figures). Nothing here writes files;
:func:`study_outputs` turns a table into the outputs of the set (CSV, JSON, text, Parquet
where pyarrow is installed, PNG plots).
"""

from __future__ import annotations

import itertools
import math
import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import SpecError
from .changes import Change, apply, get_value
from .figures import FIGURES, condition, condition_words, with_mast_moves
from .run import Executor, Task


@dataclass
class Table:
    """A study's result: ``inputs`` (the varied values' names), ``rows`` (dicts), a title."""

    kind: str
    title: str
    inputs: list[str]
    rows: list[dict]
    labels: list[str] = field(default_factory=list)  # one per row
    notes: list[str] = field(default_factory=list)
    condition: dict | None = None  # speed (and where it comes from), mass, water of the base

    def state_condition(self, project, cruise_kmh) -> "Table":
        """Record the base's condition and note every row made at another speed, mass or water
        (a value the study does not vary)."""
        fl = project.spec.flight
        self.condition = condition(fl, cruise_kmh) if fl is not None else None
        if self.condition is None:
            return self
        base, varied = self.condition, set(self.inputs)
        for lab, r in zip(self.labels, self.rows):
            if "error" in r:
                continue
            differ = []
            if "flight.cruise_kmh" not in varied and r.get("cruise_kmh") is not None \
                    and abs(r["cruise_kmh"] - base["speed_kmh"]) > 1e-9:
                differ.append(f"speed {r['cruise_kmh']:g} km/h")
            if "flight.mass_kg" not in varied and r.get("mass_kg") is not None \
                    and abs(r["mass_kg"] - base["mass_kg"]) > 1e-9:
                differ.append(f"mass {r['mass_kg']:g} kg")
            if "flight.fluid" not in varied and r.get("water") is not None and \
                    (r["water"] != base["water"] or abs(r["density_kg_m3"] - base["density_kg_m3"]) > 1e-9):
                differ.append(f"{r['water']} ({r['density_kg_m3']:.1f} kg/m³)")
            if differ:
                self.notes.append(f"{lab}: {', '.join(differ)}: differ from the base ({condition_words(base)}); "
                                  "its figures are for another condition")
        return self

    @property
    def columns(self) -> list[str]:
        keys = list(self.inputs) + [k for k in FIGURES] + ["cruise_kmh"]
        extra = sorted({k for r in self.rows for k in r} - set(keys) - {"error", "label"})
        return ["label"] + keys + extra + ["error"]


def _base(project) -> tuple[dict, str]:
    """The base spec's data, from the very text that was validated (not read again)."""
    from ..spec import read_spec_text

    text = getattr(project.spec, "_text", None)
    if text is None:
        text = read_spec_text(project.spec_path)
    return tomllib.loads(text), text


def _other(path, allow_outside_files: bool) -> dict:
    """Another spec to compare with: read and validated exactly as the base spec is (regular
    file, size cap, nesting, TOML errors), every problem named against that file."""
    from ..spec import load_spec

    return tomllib.loads(load_spec(path, allow_outside_files)._text)  # type: ignore[attr-defined]  # set by load_spec


def _task(project, data: dict, cruise_kmh, build_dir=None, source=None) -> Task:
    import tomli_w

    source = Path(source) if source is not None else project.spec_path
    if build_dir is not None:  # its spec is read from its own folder: coordinate files by full path
        data = _with_full_file_paths(data, source.parent)
    return Task(tomli_w.dumps(data), str(source), cruise_kmh, project.allow_outside_files,
                str(build_dir) if build_dir is not None else None)


def _with_full_file_paths(data: dict, base_dir: Path) -> dict:
    """``data`` with every coordinate file of ``[sections]`` given by its full path, resolved
    by the spec's own rule (relative to the folder of the spec as it was named)."""
    import copy

    data = copy.deepcopy(data)
    for sec in (data.get("sections") or {}).values():
        if isinstance(sec, dict) and isinstance(sec.get("file"), str) and not Path(sec["file"]).is_absolute():
            sec["file"] = os.path.abspath(base_dir / sec["file"])
    return data


def _build_folders(root, members: list[str]) -> list[Path]:
    """One output folder per variant under ``root``, each checked before anything runs: no
    link or file on the way (else ExportError: nothing is written)."""
    from ..outputs.journal import inside

    root = Path(root)
    for m in members:
        inside(root.parent, f"{root.name}/{m}/variant.toml")
    return [root / m for m in members]


def _run(project, datas: list[dict], executor: Executor, cruise_kmh, build_dirs=None, sources=None) -> list[dict]:
    """Evaluate every variant; ``sources``: the spec file each one's relative files and
    messages refer to (default the project's)."""
    n = len(datas)
    tasks = [_task(project, d, cruise_kmh, (build_dirs or [None] * n)[i], (sources or [None] * n)[i])
             for i, d in enumerate(datas)]
    return executor.map(tasks)


def compare(project, change_sets: list[list[Change]], others=(), *, executor: Executor | None = None,
            cruise_kmh: float | None = None) -> Table:
    """The base spec, each set of changes applied to it, and other spec files, side by side.
    ``mast_move_mm`` of each column is the move that restores the base's balance point."""
    data, _ = _base(project)
    datas, labels = [data], ["base"]
    for cs in change_sets:
        datas.append(apply(data, cs))
        labels.append(" + ".join(c.label for c in cs))
    sources = [None] * len(datas)
    for other in others:
        datas.append(_other(other, project.allow_outside_files))
        labels.append(Path(other).name)
        sources.append(other)  # its own folder for its coordinate files, its own name in messages
    rows = _run(project, datas, executor or Executor(), cruise_kmh, sources=sources)
    for r, lab in zip(rows, labels):
        r["label"] = lab
    with_mast_moves(rows, rows[0])
    return Table("compare", f"what if: {project.spec_path.name}", [], rows, labels).state_condition(project, cruise_kmh)


def family(project, surface: str, areas_cm2: list[float], keep: str = "aspect", *,
           executor: Executor | None = None, cruise_kmh: float | None = None, build_root=None) -> tuple[Table, dict]:
    """One spec per target projected area of ``surface`` (scaled by ``keep``: aspect ratio, span
    or chord). Returns the table and {member name: spec text}. A member's ``expect`` and
    ``check_at`` tables are dropped (they were the base's calculation sheet)."""
    import tomli_w

    from ..geometry.figures import intended_figures

    data, _ = _base(project)
    model = next((m for m in project.models if m.name == surface), None)
    if model is None:
        raise SpecError([f"{project.source}: no surface named '{surface}' "
                         f"(the spec has: {', '.join(m.name for m in project.models)})"])
    a0 = intended_figures(model).projected_area_cm2
    datas, labels, texts = [], [], {}
    for a in areas_cm2:
        if not (math.isfinite(a) and a > 0):
            raise SpecError([f"family: area {a!r} cm² must be a positive number"])
        d = apply(data, [Change("area", surface, a / a0, keep)])
        member = f"{project.name}-{surface}-{a:g}cm2"
        d["name"] = member
        for s in d.get("surface", []):
            if s.get("name") == surface:  # the base's calculation sheet is not this size's
                s.pop("expect", None)
                at = [{k: v for k, v in c.items() if k in ("y", "profile_tol")} for c in s.pop("check_at", [])]
                if at:
                    s["check_at"] = at
        datas.append(d)
        labels.append(f"{surface} {a:g} cm²")
        texts[member] = _family_header(project, surface, a, a0, keep) + tomli_w.dumps(d)
    builds = _build_folders(build_root, [d["name"] for d in datas]) if build_root is not None else None
    rows = _run(project, datas, executor or Executor(), cruise_kmh, builds)
    for r, lab, a in zip(rows, labels, areas_cm2):
        r["label"], r["target_area_cm2"] = lab, a
    t = Table("family", f"size family of {surface} ({project.spec_path.name}, keep {keep})", ["target_area_cm2"],
              rows, labels, [f"scaled from {a0:.1f} cm² keeping its {keep}"])
    return t.state_condition(project, cruise_kmh), texts


def _family_header(project, surface: str, area: float, a0: float, keep: str) -> str:
    """The comment lines a family member starts with: what was scaled, and how."""
    return "\n".join([
        f"# Size-family member made by geomgen family from {project.spec_path.name}: surface \"{surface}\" scaled",
        f"# from {a0:.1f} to {area:g} cm² keeping its {keep}; station spans, sweep and dihedral offsets and the",
        "# span positions of its shop tables (templates_at, hotwire_cuts, split_at, check_at y) scaled with the",
        "# span, chords with the chord (rounded to 0.001 mm). Its expect table and check_at expected values",
        "# were the base's calculation sheet and are left out. The base's comments are not carried over.",
        ""]) + "\n"


def parse_values(text: str) -> list[float]:
    """``a,b,c`` or ``start:stop:step`` (stop included when the steps land on it)."""
    try:
        if ":" in text:
            a, b, st = (float(x) for x in text.split(":"))
            if st == 0 or (b - a) / st < 0:
                raise ValueError("the step must go from start toward stop")
            n = int(math.floor((b - a) / st + 1e-9)) + 1
            if n > 100_000:
                raise ValueError(f"{n} values; at most 100000")
            return [round(a + i * st, 12) for i in range(n)]
        vals = [float(x) for x in text.split(",") if x.strip()]
        if not vals:
            raise ValueError("no values")
        if not all(math.isfinite(v) for v in vals):
            raise ValueError("values must be finite")
        return vals
    except ValueError as exc:
        raise SpecError([f"values '{text}': {exc}"]) from None


def sweep(project, axes: dict[str, list[float]], *, grid: bool = False, executor: Executor | None = None,
          cruise_kmh: float | None = None, build_root=None, limit: int = 20_000) -> Table:
    """Vary spec values (``path -> values``): one at a time about the base, or every
    combination (``grid``). Each row holds the input values and the figures."""
    data, _ = _base(project)
    for path in axes:
        get_value(data, path)  # every path names a value of this spec (SpecError otherwise)
    combos: list[dict] = []
    if grid:
        n = math.prod(len(v) for v in axes.values())
        if n > limit:
            raise SpecError([f"sweep grid of {n} variants; at most {limit} (a limit no design needs)"])
        combos = [dict(zip(axes, vals)) for vals in itertools.product(*axes.values())]
    else:
        base_vals = {p: get_value(data, p) for p in axes}
        for p, vals in axes.items():
            combos += [{**base_vals, p: v} for v in vals]
        if len(combos) > limit:
            raise SpecError([f"sweep of {len(combos)} variants; at most {limit}"])
    datas = [apply(data, [Change("set", p, v) for p, v in c.items()]) for c in combos]
    builds = _build_folders(build_root, [f"variant-{i + 1:05d}" for i in range(len(datas))]) if build_root else None
    rows = _run(project, datas, executor or Executor(), cruise_kmh, builds)
    for i, (r, c) in enumerate(zip(rows, combos)):
        r.update(c)
        r["label"] = f"variant {i + 1}"
    base_row = next((r for r in rows if all(r[p] == get_value(data, p) for p in axes) and "error" not in r), None)
    if base_row is not None:
        with_mast_moves(rows, base_row)
    return Table("sweep", f"sweep of {', '.join(axes)} ({'grid' if grid else 'one at a time'})", list(axes), rows,
                 [r["label"] for r in rows]).state_condition(project, cruise_kmh)
