"""Printable section templates: one SVG sheet per surface at 1:1.

The sheet's ``width``/``height`` are given in mm and its ``viewBox`` in the same mm, so
one user unit is one millimetre on paper when printed at 100 % ("actual size"). A 100 mm
ruler (x) and a 50 mm ruler (y), both with 10 mm ticks, sit at the top left: measure
them on the print to catch a printer's scaling. Same layout and content as the DXF
(:mod:`geomgen.drawings.templates`), plus the rulers and a footer with the caution.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET

from .. import CAUTION
from ..errors import ExportError
from ..sections.readfile import printable
from .common import Cut, fmt_y
from .templates import MARK_MM, MARK_RADIUS_MM, line_step, sheet_notes, stack, wrap

SVG_NS = "http://www.w3.org/2000/svg"
#: Ruler lengths and tick spacing, mm.
RULER_X_MM, RULER_Y_MM, TICK_MM = 100.0, 50.0, 10.0
#: Width of the left column holding the y ruler, mm.
RULER_COLUMN_MM = 16.0
STROKE = {"outline": "0.25", "chord-line": "0.15", "reference-mark": "0.15", "datum-line": "0.15", "ruler": "0.2"}
COLOR = {"outline": "#000", "chord-line": "#c00", "reference-mark": "#080", "datum-line": "#00c", "ruler": "#000"}


def _n(v: float) -> str:
    return f"{v:.4f}".rstrip("0").rstrip(".") or "0"


def _line(parent, x1, y1, x2, y2, cls, **extra):
    attrs = {"x1": _n(x1), "y1": _n(y1), "x2": _n(x2), "y2": _n(y2), "class": cls,
             "stroke": COLOR.get(cls, "#000"), "stroke-width": STROKE.get(cls, "0.15")}
    attrs.update(extra)
    return ET.SubElement(parent, "line", attrs)


def _text(parent, x, y, text, size, cls="label", anchor="start"):
    el = ET.SubElement(parent, "text", {"x": _n(x), "y": _n(y), "font-size": _n(size),
                                        "font-family": "sans-serif", "class": cls, "text-anchor": anchor})
    el.text = printable(text, 10_000)  # XML 1.0 has no control characters
    return el


def _ruler_x(parent, x0, y, size):
    g = ET.SubElement(parent, "g", {"id": "ruler-x", "class": "ruler", "data-length-mm": _n(RULER_X_MM)})
    _line(g, x0, y, x0 + RULER_X_MM, y, "ruler", id="ruler-x-bar")
    for k in range(int(RULER_X_MM / TICK_MM) + 1):
        x = x0 + k * TICK_MM
        long = k % 5 == 0
        _line(g, x, y, x, y + (4.0 if long else 2.5), "ruler")
        if long:
            _text(g, x, y + 4.0 + size, f"{k * TICK_MM:g}" + (" mm" if k * TICK_MM == RULER_X_MM else ""),
                  size, "ruler-label", "middle")


def _ruler_y(parent, x, y0, size):
    g = ET.SubElement(parent, "g", {"id": "ruler-y", "class": "ruler", "data-length-mm": _n(RULER_Y_MM)})
    _line(g, x, y0, x, y0 + RULER_Y_MM, "ruler", id="ruler-y-bar")
    for k in range(int(RULER_Y_MM / TICK_MM) + 1):
        y = y0 + k * TICK_MM
        long = k % 5 == 0
        _line(g, x, y, x + (4.0 if long else 2.5), y, "ruler")
        if long:
            _text(g, x + 5.0, y + 0.35 * size, f"{k * TICK_MM:g}" + (" mm" if k * TICK_MM == RULER_Y_MM else ""),
                  size, "ruler-label")


def write_templates_svg(cuts: list[Cut], path, *, spec_name: str, model_name: str, side: str,
                        spacing: float, height: float, margin: float) -> None:
    """Write the printable template sheet of one surface (see the module notes)."""
    slots = stack(cuts, spacing=spacing, height=height, side=side)
    x0 = margin + RULER_COLUMN_MM  # sheet x of every leading edge
    text_w = max(len(t) for s in slots for _, t in s.labels) * 0.55 * height
    content = max(max(float(c.outline[:, 0].max()) for c in cuts), text_w, RULER_X_MM + 8.0)
    W = x0 + content + margin
    notes = sheet_notes(spec_name, model_name, side)
    head = [notes[0]] + wrap(notes[1], W - 2 * margin, height)
    foot = ["Print at 100 % (actual size, no fit-to-page); the rulers must measure "
            f"{RULER_X_MM:g} mm and {RULER_Y_MM:g} mm."] + wrap("CAUTION: " + CAUTION, W - 2 * margin, height)
    step = line_step(height)
    ruler_y = margin + len(head) * step + 2.0
    T = ruler_y + 4.0 + 2 * height + 4.0  # sheet y of the top of the first template
    body = max(-slots[-1].bottom, RULER_Y_MM + 2.0)
    H = T + body + 2 * spacing + len(foot) * step + margin

    svg = ET.Element("svg", {"xmlns": SVG_NS, "version": "1.1", "width": f"{_n(W)}mm", "height": f"{_n(H)}mm",
                             "viewBox": f"0 0 {_n(W)} {_n(H)}"})
    ET.SubElement(svg, "title").text = f"{spec_name} {model_name} section templates 1:1 mm"
    ET.SubElement(svg, "rect", {"x": "0", "y": "0", "width": _n(W), "height": _n(H), "fill": "#fff"})
    for i, t in enumerate(head):
        _text(svg, margin, margin + height + i * step, t, height, "title")
    _ruler_x(svg, x0, ruler_y, 0.8 * height)
    _ruler_y(svg, margin + 2.0, T, 0.8 * height)

    for s in slots:
        c = s.cut
        g = ET.SubElement(svg, "g", {"id": f"template-y{fmt_y(c.y)}", "class": "template",
                                     "data-y-mm": _n(c.y), "data-chord-mm": _n(c.chord)})
        Y = T - s.y0  # sheet y of the chord line; chord-frame z goes up, sheet y down
        pts = " ".join(f"{_n(x0 + x)},{_n(Y - z)}" for x, z in c.outline)
        ET.SubElement(g, "polygon", {"points": pts, "class": "outline", "fill": "none",
                                     "stroke": COLOR["outline"], "stroke-width": STROKE["outline"]})
        _line(g, x0, Y, x0 + c.chord, Y, "chord-line")
        rx = x0 + c.ref_x
        _line(g, rx - MARK_MM, Y, rx + MARK_MM, Y, "reference-mark")
        _line(g, rx, Y - MARK_MM, rx, Y + MARK_MM, "reference-mark")
        ET.SubElement(g, "circle", {"cx": _n(rx), "cy": _n(Y), "r": _n(MARK_RADIUS_MM), "class": "reference-mark",
                                    "fill": "none", "stroke": COLOR["reference-mark"],
                                    "stroke-width": STROKE["reference-mark"]})
        seg = s.datum_segment()
        if seg is not None:
            a, b = seg
            _line(g, x0 + a[0], Y - a[1], x0 + b[0], Y - b[1], "datum-line", **{"stroke-dasharray": "3 1.5"})
        for base, t in s.labels:
            _text(g, x0, T - base, t, height)

    fy = T + body + 2 * spacing
    for i, t in enumerate(foot):
        _text(svg, margin, fy + i * step, t, height, "footer")
    tree = ET.ElementTree(svg)
    ET.indent(tree, space=" ")
    try:
        tree.write(path, encoding="utf-8", xml_declaration=True)
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None
