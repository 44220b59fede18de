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
from . import hotwire, offsets, svg, templates
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


class ShopFiles(list):
    """The paths written (a plain ``list[Path]``), with what the summary needs."""

    def __init__(self, paths, spec_name: str, out_dir: Path, surfaces: list[SurfaceSummary], seconds: float):
        super().__init__(paths)
        self.spec_name = spec_name
        self.out_dir = out_dir
        self.surfaces = surfaces
        self.seconds = seconds


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


def write_shop_drawings(spec_path, out_dir, *, progress: Callable[[str], None] | None = None) -> ShopFiles:
    """Write templates, offset tables and hot-wire profiles of every surface of the spec.

    Raises SpecError (exit 2) for a bad spec or a span position off the part, GeometryError
    (exit 3) for geometry that cannot be made (e.g. a kerf offset that folds), ExportError
    (exit 3) when a file cannot be written. Nothing is written unless everything is.
    """
    from ..geometry import build_models
    from ..outputs import Staging, spec_digest
    from ..spec import load_spec

    t0 = time.perf_counter()
    say = progress or (lambda msg: None)
    spec = load_spec(spec_path)
    models = build_models(spec)
    _check_positions(models, spec_path)

    plans = []  # everything computed (and refused) before a file is opened
    for m in models:
        say(f"drawing {m.name}")
        shop = shop_of(m)
        cuts = cuts_of(m)
        tables = [offsets.offset_rows(c, shop.offset_pct) for c in cuts]
        plans.append((m, shop, cuts, tables, hotwire.panels_of(m)))

    summaries = []
    info = {"spec": Path(spec_path).name, "spec_sha256": spec_digest(spec_path), "outputs": "shop-drawings"}
    with Staging(out_dir) as stage:
        for m, shop, cuts, tables, panels in plans:
            stem = f"{spec.name}-{m.name}"
            side = upper_side(m)
            common = dict(spec_name=spec.name, model_name=m.name, side=side)
            layout = dict(spacing=shop.template_spacing_mm, height=shop.label_height_mm)

            name = f"{stem}-templates.dxf"
            say(f"writing {name}")
            templates.write_templates_dxf(cuts, stage.path(name), **common, **layout)
            name = f"{stem}-templates.svg"
            say(f"writing {name}")
            svg.write_templates_svg(cuts, stage.path(name), **common, **layout, margin=shop.template_margin_mm)
            name = f"{stem}-offsets.csv"
            say(f"writing {name}")
            offsets.write_offsets_csv(tables, stage.path(name), **common)
            for p in panels:
                for suffix, writer in ((".txt", hotwire.write_panel_txt), (".dxf", hotwire.write_panel_dxf)):
                    name = f"{stem}-hotwire-{p.tag}{suffix}"
                    say(f"writing {name}")
                    writer(p, stage.path(name), spec_name=spec.name, side=side, mirrored=bool(m.mirror))
            summaries.append(SurfaceSummary(m.name, len(cuts), sum(len(t.x_pct) for t in tables), len(panels),
                                            shop.kerf_mm, max((p.mid_deviation for p in panels), default=0.0)))
        files = stage.commit(info)
    return ShopFiles(files, spec.name, Path(out_dir), summaries, time.perf_counter() - t0)


def format_shop_summary(res: ShopFiles) -> str:
    """What was written, per surface, as aligned text (for the CLI)."""
    lines = [f"geomgen {__version__}: shop drawings of '{res.spec_name}' into {res.out_dir} "
             f"({len(res)} files, {res.seconds:.1f} s)", ""]
    lines.append(f"{'surface':<16} {'templates':>9} {'offset rows':>11} {'hot-wire panels':>15} "
                 f"{'kerf mm':>8} {'ruled cut dev. mm':>17}")
    for s in res.surfaces:
        lines.append(f"{s.name:<16} {s.templates:>9} {s.offset_rows:>11} {s.panels:>15} {s.kerf_mm:>8.2f} "
                     f"{s.worst_ruled_mm:>17.3f}")
    lines += ["", "files:"] + [f"  {Path(p).name}" for p in res]
    lines += ["", "Templates are 1:1 in mm: print the SVG at 100 % and check its rulers.",
              "'ruled cut dev.' is how far a straight hot-wire cut between a panel's ends strays from the "
              "intended surface halfway along it; where it is too large, add cut positions "
              "(hotwire_cuts in [surface.shop]) to shorten the panels.", "", f"CAUTION: {CAUTION}"]
    return "\n".join(lines)
