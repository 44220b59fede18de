"""The shaper's 2D outputs: section templates (DXF, printable SVG), offset tables (CSV) and
hot-wire profiles (text, DXF), per surface. Pure numpy + ezdxf; never the CAD kernel.

Entry point: :func:`write_shop_drawings`. Files, per surface ``<set>-<surface>``:

* ``-templates.dxf`` / ``-templates.svg``: every station and ``templates_at`` position, 1:1;
* ``-offsets.csv``: heights above/below the chord line at ``offset_pct`` chord positions;
* ``-hotwire-<ya>-<yb>.txt`` / ``.dxf``: both end paths of each foam panel, in step.

Everything goes through one :class:`geomgen.outputs.Staging`: either every file is written
(and recorded in the manifest) or none is, and earlier outputs stay as they were.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

from .. import CAUTION, __version__
from ..errors import SpecError
from . import gcode, hotwire, offsets, pdf, svg, templates
from .common import cuts_of, position_problems, shop_of, upper_side

__all__ = ["write_shop_drawings", "format_shop_summary", "ShopFiles", "SurfaceSummary"]


@dataclass
class SurfaceSummary:
    name: str
    templates: int
    offset_rows: int
    panels: int
    kerf_mm: float
    worst_ruled_mm: float  # largest mid-panel deviation of a ruled hot-wire cut, mm
    warnings: list | None = None  # panels whose straight cut strays beyond cut_tol_mm


class ShopFiles(list):
    """The paths written (a plain ``list[Path]``), with what the summary needs."""

    def __init__(self, paths, spec_name: str, out_dir: Path, surfaces: list[SurfaceSummary], seconds: float):
        super().__init__(paths)
        self.spec_name = spec_name
        self.out_dir = out_dir
        self.surfaces = surfaces
        self.seconds = seconds
        self.notes: list[str] = []


def _check_positions(models, source) -> None:
    problems = []
    for i, m in enumerate(models):
        shop = shop_of(m)
        where = f'{source}: surface[{i}] "{m.name}"'
        problems += position_problems(m, where, shop.templates_at, "templates_at")
        if shop.hotwire_cuts:
            problems += position_problems(m, where, shop.hotwire_cuts, "hotwire_cuts")
    if problems:
        raise SpecError(problems)


def write_shop_drawings(project, out_dir=None, *, progress: Callable[[str], None] | None = None,
                        allow_outside_files: bool = False) -> ShopFiles:
    """Write templates, offset tables and hot-wire profiles of every surface of the project
    (a :class:`~geomgen.project.Project`, or a spec path) into its output set.

    Raises SpecError (exit 2) for a bad spec or a span position off the part, GeometryError
    (exit 3) for geometry that cannot be made (e.g. a kerf offset that folds), ExportError
    (exit 3) when a file cannot be written. Nothing is written unless everything is.
    """
    from ..outputs import Output, output_name
    from ..outputs import inputs as made_from
    from ..project import Project

    project = Project.of(project, out_dir, allow_outside_files=allow_outside_files)
    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    models = project.models
    _check_positions(models, project.source)

    plans = []  # everything computed (and refused) before a file is opened
    for m in models:
        say(f"drawing {m.name}")
        shop = shop_of(m)
        cuts = cuts_of(m)
        tables = [offsets.offset_rows(c, shop.offset_pct) for c in cuts]
        plans.append((m, shop, cuts, tables, hotwire.panels_of(m)))

    set_name = project.name
    summaries: list = []
    outputs: list = []
    spec = project.spec
    for m, shop, cuts, tables, panels in plans:
        first = len(outputs)
        side = upper_side(m)
        common = dict(spec_name=set_name, model_name=m.name, side=side)
        layout = dict(spacing=shop.template_spacing_mm, height=shop.label_height_mm)
        def name(*w, suffix):
            return output_name(set_name, m.name, *w, suffix=suffix, folder="drawings")
        outputs += [
            Output(name("templates", suffix=".dxf"), "file",
                   lambda p, cuts=cuts, common=common, layout=layout:
                   templates.write_templates_dxf(cuts, p, **common, **layout),
                   f"{m.name}: 1:1 section templates (DXF, mm)"),
            Output(name("templates", suffix=".svg"), "file",
                   lambda p, cuts=cuts, common=common, layout=layout, shop=shop:
                   svg.write_templates_svg(cuts, p, **common, **layout, margin=shop.template_margin_mm),
                   f"{m.name}: 1:1 section templates to print at 100 % (check the rulers)"),
            Output(name("templates", suffix=".pdf"), "file",
                   lambda p, cuts=cuts, common=common, shop=shop:
                   pdf.write_templates_pdf(cuts, p, **common, height=shop.label_height_mm, paper=shop.paper,
                                           overlap=shop.tile_overlap_mm),
                   f"{m.name}: section templates to print at 100 % on {shop.paper} (tiled with crosses where larger)"),
            Output(name("offsets", suffix=".csv"), "file",
                   lambda p, tables=tables, common=common: offsets.write_offsets_csv(tables, p, **common),
                   f"{m.name}: offset table, heights above and below the chord line (mm)")]
        for pn in panels:
            for suffix, writer, what in ((".txt", hotwire.write_panel_txt, "points"),
                                         (".dxf", hotwire.write_panel_dxf, "DXF")):
                outputs.append(Output(
                    name("hotwire", pn.tag, suffix=suffix), "file",
                    lambda p, pn=pn, writer=writer, side=side, m=m:
                    writer(pn, p, spec_name=set_name, side=side, mirrored=bool(m.mirror)),
                    f"{m.name}: hot-wire end paths of one foam panel ({what}, kerf offset)"))
            outputs.append(Output(
                name("hotwire", pn.tag, suffix=".gcode"), "file",
                lambda p, pn=pn, side=side, shop=shop: gcode.write_panel_gcode(pn, p, shop=shop, spec_name=set_name,
                                                                               side=side),
                f"{m.name}: four-axis hot-wire G-code of one foam panel (towers X/Y and U/V)"))
        # a surface's drawings: its geometry (drawn in its own frame, not lofted) and its [surface.shop]
        for o in outputs[first:]:
            o.inputs = made_from.geometry(spec, m.name, made_from.PLACEMENT + made_from.LOFT_ONLY) + \
                made_from.tables(spec, m.name, "shop")
        summaries.append(SurfaceSummary(m.name, len(cuts), sum(len(t.x_pct) for t in tables), len(panels),
                                        shop.kerf_mm, max((p.mid_deviation for p in panels), default=0.0),
                                        [f"{m.name} panel y = {p.y_a:g} .. {p.y_b:g} mm: the straight hot-wire cut "
                                         f"strays {p.mid_deviation:.2f} mm from the surface (tolerance "
                                         f"{shop.cut_tol_mm:g} mm); add a cut position at y = "
                                         f"{0.5 * (p.y_a + p.y_b):g} in hotwire_cuts" for p in panels
                                         if p.mid_deviation > shop.cut_tol_mm]))
    res = ShopFiles([], set_name, project.out_dir, summaries, 0.0)
    res.extend(project.out_dir / o.name for o in outputs)
    res.seconds = time.perf_counter() - t0
    outputs.append(Output(output_name(set_name, "drawings", suffix=".txt"), "text",
                          lambda: format_shop_summary(res, for_file=True),
                          "what the drawings command wrote, per surface",
                          made_from.set_geometry(spec, made_from.PLACEMENT + made_from.LOFT_ONLY) +
                          made_from.table_of_all(spec, "shop")))
    done = project.write("drawings", outputs, say)
    res[:] = done.files  # the summary file too
    res.notes = done.notes()
    res.seconds = time.perf_counter() - t0
    return res


def format_shop_summary(res: ShopFiles, for_file: bool = False) -> str:
    """What was written, per surface, as aligned text (for the CLI; ``for_file``: the copy in
    the set, without time or folder, so the same spec gives the same bytes)."""
    head = f"geomgen {__version__}: shop drawings of '{res.spec_name}'"
    lines = [head if for_file else f"{head} into {res.out_dir} ({len(res)} files, {res.seconds:.1f} s)", ""]
    lines.append(f"{'surface':<16} {'templates':>9} {'offset rows':>11} {'hot-wire panels':>15} "
                 f"{'kerf mm':>8} {'ruled cut dev. mm':>17}")
    for s in res.surfaces:
        lines.append(f"{s.name:<16} {s.templates:>9} {s.offset_rows:>11} {s.panels:>15} {s.kerf_mm:>8.2f} "
                     f"{s.worst_ruled_mm:>17.3f}")
    lines += ["", "files:"] + [f"  {Path(p).relative_to(res.out_dir) if Path(p).is_relative_to(res.out_dir) else p}"
                               for p in res]
    lines += [f"WARNING: {w}" for s in res.surfaces for w in (s.warnings or [])]
    lines += [f"note: {n}" for n in getattr(res, "notes", [])]
    lines += ["", "Templates are 1:1 in mm: print the PDF or the SVG at 100 % and check the rulers.",
              "'ruled cut dev.' is how far a straight hot-wire cut between a panel's ends strays from the "
              "intended surface halfway along it; where it is too large, add cut positions "
              "(hotwire_cuts in [surface.shop]) to shorten the panels.", "", f"CAUTION: {CAUTION}"]
    return "\n".join(lines)
