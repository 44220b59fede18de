"""Section templates at 1:1: the sheet layout shared by the DXF and the SVG, and the DXF writer.

Every template is drawn in its section's chord frame (see :mod:`geomgen.drawings.common`):
chord line along +x with the leading edge at x = 0, the upper side up, true size in mm.
Templates are stacked down the sheet, the root on top; the DXF moves each one only along
y, so its x coordinates are the chord frame's own. Each template carries its chord line,
a mark at the reference point (the twist axis), a dashed line along the datum x axis
through that point (so the twist and incidence can be set on a jig) and a label.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

import numpy as np

from .. import CAUTION, __version__
from ..errors import ExportError
from .common import Cut, fmt_y, save_dxf

#: Layers (DXF) and classes (SVG), with AutoCAD colour indices for the DXF.
LAYERS = {"outline": 7, "chord-line": 1, "reference-mark": 3, "datum-line": 5, "labels": 8}
#: Half size of the reference-point cross, mm, and the radius of its circle.
MARK_MM, MARK_RADIUS_MM = 3.0, 1.0
#: The datum line runs from about the leading edge to about the trailing edge, overrunning
#: each by this fraction of the chord.
DATUM_OVERRUN = 0.03
#: Gap between a template's outline and its first label line, mm.
LABEL_GAP_MM = 3.0
#: Angles below this are drawn without a datum line (it would lie on the chord line), deg.
DATUM_MIN_DEG = 0.01


@dataclass
class Slot:
    """Where one template sits on the sheet (y up; the top of the first template at y = 0)."""

    cut: Cut
    y0: float  # sheet y of the chord line
    labels: list[tuple[float, str]]  # (baseline y, text)
    bottom: float

    def datum_segment(self) -> tuple[np.ndarray, np.ndarray] | None:
        return datum_segment(self.cut)


def datum_segment(c: Cut) -> tuple[np.ndarray, np.ndarray] | None:
    """End points of the datum line in the chord frame (through the reference point, along the
    datum x axis, about as long as the chord), or None when it would lie on the chord line."""
    if abs(c.pitch) < DATUM_MIN_DEG:
        return None
    u = np.array(c.datum_direction())
    ref = np.array([c.ref_x, 0.0])
    fore, aft = c.ref_x + DATUM_OVERRUN * c.chord, c.chord - c.ref_x + DATUM_OVERRUN * c.chord
    return ref - fore * u, ref + aft * u


def line_step(height: float) -> float:
    """Baseline-to-baseline distance of label lines, mm."""
    return 1.6 * height


def stack(cuts: list[Cut], *, spacing: float, height: float, side: str, deg: str = "°") -> list[Slot]:
    """Lay the templates one under the other; each gets its label lines under its outline."""
    slots, cursor = [], 0.0
    for c in cuts:
        z = c.outline[:, 1]
        seg = datum_segment(c)
        dz = [seg[0][1], seg[1][1]] if seg is not None else [0.0]
        up = max(float(z.max()), max(dz), MARK_MM)
        down = min(float(z.min()), min(dz), -MARK_MM)
        y0 = cursor - up
        base = y0 + down - LABEL_GAP_MM - height
        labels = [(base - i * line_step(height), t) for i, t in enumerate(c.label_lines(side, deg))]
        bottom = labels[-1][0] - 0.4 * height
        slots.append(Slot(c, y0, labels, bottom))
        cursor = bottom - spacing
    return slots


def sheet_notes(spec_name: str, model_name: str, side: str) -> list[str]:
    """Title and the frame statement printed on every template sheet."""
    return [
        f"{spec_name} / {model_name}: section templates, 1:1, mm (geomgen {__version__})",
        f"Each template in its section's chord frame: chord line horizontal, leading edge at x = 0, "
        f"{side} up. Twist and incidence are not applied: the label gives them, and the dashed line "
        f"through the reference point runs along the datum x axis (aft).",
    ]


def wrap(text: str, width_mm: float, height: float) -> list[str]:
    """Wrap ``text`` to about ``width_mm`` at text height ``height`` (sans-serif estimate)."""
    chars = max(30, int(width_mm / (0.55 * height)))
    return textwrap.wrap(text, chars)


def write_templates_dxf(cuts: list[Cut], path, *, spec_name: str, model_name: str, side: str,
                        spacing: float, height: float) -> None:
    """One DXF with every template of a surface; units mm ($INSUNITS = 4).

    Each template's entities form a DXF group named ``template y=<y>`` so a reader can
    pick a section out; its chord line starts at the leading edge.
    """
    import ezdxf

    doc = ezdxf.new("R2010", setup=["linetypes"], units=4)  # 4 = millimetres
    doc.header["$MEASUREMENT"] = 1  # metric
    for name, color in LAYERS.items():
        layer = doc.layers.add(name, color=color)
        if name == "datum-line":
            layer.dxf.linetype = "DASHED"
    msp = doc.modelspace()
    slots = stack(cuts, spacing=spacing, height=height, side=side, deg=" deg")
    width = max(float(c.outline[:, 0].max()) for c in cuts)
    notes = sheet_notes(spec_name, model_name, side)
    lines = ([notes[0]] + wrap(notes[1], max(width, 120.0), height)
             + wrap("CAUTION: " + CAUTION, max(width, 120.0), height))
    for i, text in enumerate(lines):
        msp.add_text(text, height=height, dxfattribs={"layer": "labels"}).set_placement(
            (0.0, LABEL_GAP_MM + (len(lines) - 1 - i) * line_step(height)))
    for s in slots:
        c, dy = s.cut, s.y0
        ents = [msp.add_lwpolyline([(float(x), float(z) + dy) for x, z in c.outline], close=True,
                                   dxfattribs={"layer": "outline"}),
                msp.add_line((0.0, dy), (c.chord, dy), dxfattribs={"layer": "chord-line"}),
                msp.add_line((c.ref_x - MARK_MM, dy), (c.ref_x + MARK_MM, dy), dxfattribs={"layer": "reference-mark"}),
                msp.add_line((c.ref_x, dy - MARK_MM), (c.ref_x, dy + MARK_MM), dxfattribs={"layer": "reference-mark"}),
                msp.add_circle((c.ref_x, dy), MARK_RADIUS_MM, dxfattribs={"layer": "reference-mark"})]
        seg = s.datum_segment()
        if seg is not None:
            a, b = seg
            ents.append(msp.add_line((a[0], a[1] + dy), (b[0], b[1] + dy), dxfattribs={"layer": "datum-line"}))
        for base, text in s.labels:
            t = msp.add_text(text, height=height, dxfattribs={"layer": "labels"})
            t.set_placement((0.0, base))
            ents.append(t)
        doc.groups.new(f"template y={fmt_y(c.y)}").set_data(ents)
    try:
        save_dxf(doc, path)
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None
