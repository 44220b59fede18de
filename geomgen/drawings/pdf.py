"""Print-ready section templates (PDF, ``fpdf2``) at a chosen paper size.

One template a page when it fits the paper's printable area (portrait or landscape); else
the template is tiled over pages that overlap by ``overlap`` mm, with numbered alignment
crosses in every overlap band (each appears on both pages it joins). Every page carries a
100 mm ruler (50 mm on narrow paper) with 10 mm ticks to check the print's scale, the page's
place in the tiling, and the print-at-100 % note. Same outline, chord line, reference mark
and datum line as the SVG (:mod:`geomgen.drawings.svg`).

Page coordinates: mm from the top left corner, y down; template (chord frame) z goes up.
"""

from __future__ import annotations

import datetime
import math
from dataclasses import dataclass

from .. import CAUTION
from ..errors import ExportError
from .common import Cut
from .templates import MARK_MM, MARK_RADIUS_MM, datum_segment, line_step, sheet_notes

#: paper sizes (portrait width, height), mm
PAPER = {"A4": (210.0, 297.0), "Letter": (215.9, 279.4), "A3": (297.0, 420.0)}
#: unprinted border most desktop printers need, mm (common practice, no source)
BORDER_MM = 10.0
#: band at the top (title) and the bottom (ruler, notes) of every page, mm
HEAD_MM, FOOT_MM = 10.0, 26.0
#: space around a template's outline and label lines, mm
PAD_MM = 5.0


@dataclass
class PageRecord:
    """What one page shows: the template (its span position), the window of the template's
    chord frame on this page (x0, z_top, width, height in mm) and the window's top left
    corner on the page."""

    y: float
    tile: tuple[int, int]
    tiles: tuple[int, int]
    window: tuple[float, float, float, float]
    at: tuple[float, float]
    orientation: str
    ruler_mm: float
    crosses: list[tuple[int, float, float]]  # (number, x, z) in the chord frame


def _latin(t: str) -> str:
    return t.encode("latin-1", "replace").decode("latin-1")


def _extent(c: Cut, side: str, height: float):
    """(x0, x1, z_bottom, z_top, label lines) of a template with its labels under it."""
    x = c.outline[:, 0]
    z = c.outline[:, 1]
    seg = datum_segment(c)
    zs = [float(z.min()), float(z.max()), -MARK_MM, MARK_MM] + ([seg[0][1], seg[1][1]] if seg is not None else [])
    lines = c.label_lines(side, "°")
    width_text = max(len(t) for t in lines) * 0.55 * height
    x0 = min(float(x.min()), 0.0) - PAD_MM
    x1 = max(float(x.max()), width_text) + PAD_MM
    zb = min(zs) - 2.0 - len(lines) * line_step(height) - PAD_MM
    return x0, x1, zb, max(zs) + PAD_MM, lines


def layout(cuts: list[Cut], side: str, height: float, paper: str, overlap: float) -> list[PageRecord]:
    """The pages: per template one page if it fits, else its tiles."""
    pw, ph = PAPER[paper]
    pages = []
    for c in cuts:
        x0, x1, zb, zt, _ = _extent(c, side, height)
        w, h = x1 - x0, zt - zb
        best = None
        for orient, (W, H) in (("P", (pw, ph)), ("L", (ph, pw))):
            uw, uh = W - 2 * BORDER_MM, H - 2 * BORDER_MM - HEAD_MM - FOOT_MM
            nx = 1 if w <= uw else math.ceil((w - overlap) / (uw - overlap))
            ny = 1 if h <= uh else math.ceil((h - overlap) / (uh - overlap))
            if best is None or nx * ny < best[0]:
                best = (nx * ny, orient, nx, ny, uw, uh, W)
        assert best is not None  # two orientations tried
        _, orient, nx, ny, uw, uh, W = best
        sx = (w - overlap) / nx + overlap if nx > 1 else w  # tiles share the template evenly
        sy = (h - overlap) / ny + overlap if ny > 1 else h
        crosses, k = [], 0
        for i in range(1, nx):  # crosses in the middle of each overlap band
            for j in range(ny):
                k += 1
                crosses.append((k, x0 + i * (sx - overlap) + 0.5 * overlap, zt - (j * (sy - overlap) + 0.5 * sy)))
        for j in range(1, ny):
            for i in range(nx):
                k += 1
                crosses.append((k, x0 + i * (sx - overlap) + 0.5 * sx, zt - j * (sy - overlap) - 0.5 * overlap))
        ruler = 100.0 if uw >= 110.0 else 50.0
        for j in range(ny):
            for i in range(nx):
                win = (x0 + i * (sx - overlap), zt - j * (sy - overlap), sx, sy)
                pages.append(PageRecord(c.y, (j + 1, i + 1), (ny, nx), win, (BORDER_MM, BORDER_MM + HEAD_MM),
                                        orient, ruler, crosses))
    return pages


def write_templates_pdf(cuts: list[Cut], path, *, spec_name: str, model_name: str, side: str, height: float,
                        paper: str = "A4", overlap: float = 15.0) -> list[PageRecord]:
    """Write the templates of one surface as a PDF (see the module notes); returns the pages."""
    from fpdf import FPDF

    pages = layout(cuts, side, height, paper, overlap)
    by_y = {c.y: c for c in cuts}
    pdf = FPDF(unit="mm", format=PAPER[paper])
    # a fixed date, as in the STEP header: the same spec gives the same bytes (and manifest)
    pdf.set_creation_date(datetime.datetime(2000, 1, 1, tzinfo=datetime.timezone.utc))
    pdf.set_creator("geomgen")
    pdf.set_producer("geomgen")
    pdf.set_auto_page_break(False)
    pdf.set_compression(False)
    title = sheet_notes(spec_name, model_name, side)[0]
    pt = height * 72.0 / 25.4  # label height in points
    for n, pg in enumerate(pages, 1):
        c = by_y[pg.y]
        pdf.add_page(orientation=pg.orientation)
        H = pdf.h
        x0w, ztw, ww, hw = pg.window
        ax, ay = pg.at
        def px(x):  # chord frame -> page
            return ax + (x - x0w)
        def py(z):
            return ay + (ztw - z)
        pdf.set_font("helvetica", size=pt)
        pdf.set_text_color(0)
        tile = ("" if pg.tiles == (1, 1)
                else f" - tile row {pg.tile[0]} of {pg.tiles[0]}, column {pg.tile[1]} of {pg.tiles[1]}")
        pdf.text(BORDER_MM, BORDER_MM + height,
                 _latin(f"{title}; template at y = {c.y:g} mm{tile}; page {n} of {len(pages)}"))
        with pdf.rect_clip(ax, ay, ww, hw):
            pdf.set_line_width(0.25)
            pdf.set_draw_color(0)
            pdf.polyline([(px(x), py(z)) for x, z in c.outline], polygon=True)
            pdf.set_line_width(0.15)
            pdf.set_draw_color(200, 0, 0)
            pdf.line(px(0.0), py(0.0), px(c.chord), py(0.0))
            pdf.set_draw_color(0, 128, 0)
            pdf.line(px(c.ref_x - MARK_MM), py(0.0), px(c.ref_x + MARK_MM), py(0.0))
            pdf.line(px(c.ref_x), py(-MARK_MM), px(c.ref_x), py(MARK_MM))
            pdf.circle(x=px(c.ref_x), y=py(0.0), radius=MARK_RADIUS_MM)
            seg = datum_segment(c)
            if seg is not None:
                pdf.set_draw_color(0, 0, 200)
                pdf.set_dash_pattern(dash=3, gap=1.5)
                pdf.line(px(seg[0][0]), py(seg[0][1]), px(seg[1][0]), py(seg[1][1]))
                pdf.set_dash_pattern()
            _, _, _, _, lines = _extent(c, side, height)
            zl = min([float(c.outline[:, 1].min()), -MARK_MM]) - 2.0 - height
            for i, t in enumerate(lines):
                pdf.text(px(0.0), py(zl - i * line_step(height)), _latin(t))
            pdf.set_draw_color(0)
            pdf.set_line_width(0.15)
            for k, x, z in pg.crosses:
                pdf.line(px(x) - 4, py(z), px(x) + 4, py(z))
                pdf.line(px(x), py(z) - 4, px(x), py(z) + 4)
                pdf.circle(x=px(x), y=py(z), radius=2.0)
                pdf.text(px(x) + 2.5, py(z) - 2.5, f"{k}")
        # ruler and notes in the foot band, outside the template window
        ry = H - BORDER_MM - FOOT_MM + 5.0
        pdf.set_draw_color(0)
        pdf.set_line_width(0.2)
        pdf.line(BORDER_MM, ry, BORDER_MM + pg.ruler_mm, ry)
        for k in range(int(pg.ruler_mm / 10.0) + 1):
            x = BORDER_MM + 10.0 * k
            pdf.line(x, ry, x, ry + (4.0 if k % 5 == 0 else 2.5))
        pdf.text(BORDER_MM + pg.ruler_mm + 3.0, ry + 3.0, f"{pg.ruler_mm:g} mm")
        notes = [f"Print at 100 % (actual size, no fit to page); the ruler must measure {pg.ruler_mm:g} mm.",
                 "Join tiles by laying the numbered crosses on each other." if pg.tiles != (1, 1) else "",
                 "CAUTION: " + CAUTION.split(".")[0] + "."]
        for i, t in enumerate([t for t in notes if t]):
            pdf.text(BORDER_MM, ry + 8.0 + i * line_step(height), _latin(t))
    try:
        pdf.output(str(path))
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None
    return pages
