"""Intended figures of a surface, integrated from the spec's geometry model.

Definitions (README "What the figures mean"): the planform figures are taken in the surface's
own reference plane, spanned by the root chord line and the span axis, so a mounting
incidence does not move them; the chord at each span is the nominal chord line (the section
family's leading edge to the trailing-edge midpoint) projected on that plane. MAC = ∫c² dy /
∫c dy, its spanwise position ȳ = ∫c|y| dy / ∫c dy from the root, its leading edge
x̄_LE = ∫x_LE c dy / ∫c dy (coordinate along the root chord line, equal to datum x at the root
reference point) (Raymer, Aircraft Design: A Conceptual Approach §7.3). Beside them the
outline's shadow on the datum plane normal to the lift direction (x-y for a horizontal
surface, x-z for a vertical one): ``datum_area_cm2``, ``datum_mac_mm``.
Integrals use Gauss-Legendre nodes on each station interval (exact for the cubic pieces).
"""

from __future__ import annotations

import math
import weakref
from dataclasses import asdict, dataclass

import numpy as np

GAUSS_NODES = 16
OUTLINE_POINTS = 400
#: Points per side of the section polygons of the centroid integral (polygon error ~1e-4 mm
#: on a 200 mm chord; at 150 it was 0.002 mm).
CENTROID_POINTS = 500


@dataclass
class Figures:
    """One surface's figures. Lengths mm, areas cm², volumes cm³, angles deg."""

    span_mm: float
    projected_area_cm2: float
    aspect_ratio: float
    mac_mm: float
    mac_y_mm: float
    mac_le_x_mm: float
    mac_qc_x_mm: float
    root_chord_mm: float
    tip_chord_mm: float
    taper_ratio: float
    sweep_qc_deg: float
    volume_cm3: float
    wetted_area_cm2: float = float("nan")
    centroid_mm: tuple = (float("nan"),) * 3
    datum_area_cm2: float = float("nan")
    datum_mac_mm: float = float("nan")

    def as_dict(self) -> dict:
        return asdict(self)


def _nodes(model) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes and weights over the half span, one block per station interval."""
    xg, wg = np.polynomial.legendre.leggauss(GAUSS_NODES)
    ys, ws = [], []
    br = model.station_breaks
    for a, b in zip(br[:-1], br[1:]):
        ys.append(0.5 * (b - a) * xg + 0.5 * (a + b))
        ws.append(0.5 * (b - a) * wg)
    return np.concatenate(ys), np.concatenate(ws)


def outline_at(model, y: float) -> tuple[float, float, float, float]:
    """At span ``y``: (leading-edge coordinate, chord) of the nominal chord line projected on
    the reference plane, and (foremost datum x, x extent) of the outline, mm."""
    from .chordline import chord_lines, datum_extent
    from .slices import RefPlane

    pts = model.section_loop(y, OUTLINE_POINTS)
    le, te = chord_lines(pts[None], model.leading_edge(y)[None])
    plane = RefPlane(np.asarray(model.R[:, 0], float), np.asarray(model.position, float))
    (x0,), (dc,) = datum_extent(pts[None])
    return float(plane.along(le)[0]), float((te[0] - le[0]) @ plane.e), float(x0), float(dc)


@dataclass(frozen=True)
class PlanformFigures:
    """The planform part of :class:`Figures`: the one set of reference figures that the build,
    the check, the balance and the report all use (in the reference plane), with the datum
    shadow beside them. Lengths mm, area cm²."""

    span_mm: float
    projected_area_cm2: float
    aspect_ratio: float
    mac_mm: float
    mac_y_mm: float
    mac_le_x_mm: float
    datum_area_cm2: float = float("nan")
    datum_mac_mm: float = float("nan")


_PLANFORM: "weakref.WeakKeyDictionary" = weakref.WeakKeyDictionary()


def planform_figures(model) -> PlanformFigures:
    """Span, planform area, aspect ratio, MAC, its span position and leading-edge coordinate
    of a :class:`SurfaceModel` in its reference plane, and the datum shadow's area and MAC,
    over the whole outline (a rounded tip included), once per model."""
    f = _PLANFORM.get(model)
    if f is None:
        y, w = _nodes(model)
        le, c, _, dc = np.array([outline_at(model, v) for v in y]).T
        area_half = float(w @ c)
        k = 2.0 if model.mirror else 1.0
        span = k * (model.half_span - (0.0 if model.mirror else float(model.planform.y[0])))
        area = k * area_half
        f = PlanformFigures(span_mm=span, projected_area_cm2=area / 100.0, aspect_ratio=span**2 / area,
                            mac_mm=float(w @ c**2) / area_half,
                            mac_y_mm=float(w @ (c * (y - model.planform.y[0]))) / area_half,
                            mac_le_x_mm=float(w @ (le * c)) / area_half,
                            datum_area_cm2=k * float(w @ dc) / 100.0, datum_mac_mm=float(w @ dc**2) / float(w @ dc))
        _PLANFORM[model] = f
    return f


def intended_figures(model) -> Figures:
    """Figures of a :class:`SurfaceModel` from its geometry (no CAD)."""
    y, w = _nodes(model)
    pf = planform_figures(model)
    mac, x_le = pf.mac_mm, pf.mac_le_x_mm
    k = 2.0 if model.mirror else 1.0
    vol = k * float(w @ np.array([model.section(v).area(1000) * float(model.chord(v)) ** 2 for v in y]))
    y0, y1 = float(model.planform.y[0]), float(model.half_span)  # root to the outermost section
    (le0, c0, _, _), (le1, c1, _, _) = outline_at(model, y0), outline_at(model, y1)
    sweep = math.degrees(math.atan2((le1 + c1 / 4) - (le0 + c0 / 4), y1 - y0))
    root, tip = (section_figures(model, v)["chord_mm"] for v in (y0, y1))
    return Figures(span_mm=pf.span_mm, projected_area_cm2=pf.projected_area_cm2, aspect_ratio=pf.aspect_ratio,
                   mac_mm=mac, mac_y_mm=pf.mac_y_mm, mac_le_x_mm=x_le, mac_qc_x_mm=x_le + mac / 4, root_chord_mm=root,
                   tip_chord_mm=tip, taper_ratio=tip / root, sweep_qc_deg=sweep, volume_cm3=vol / 1000.0,
                   wetted_area_cm2=surface_area(model) / 100.0, centroid_mm=tuple(centroid(model)),
                   datum_area_cm2=pf.datum_area_cm2, datum_mac_mm=pf.datum_mac_mm)


def _polygon(p2: np.ndarray) -> tuple[float, np.ndarray]:
    """(area, centroid (2,)) of a closed polygon (n, 2) by the shoelace formula."""
    x, y = p2[:, 0], p2[:, 1]
    xn, yn = np.roll(x, -1), np.roll(y, -1)
    cr = x * yn - xn * y
    a = 0.5 * cr.sum()
    return abs(a), np.array([((x + xn) * cr).sum(), ((y + yn) * cr).sum()]) / (6.0 * a)


def centroid(model) -> np.ndarray:
    """(3,) datum centroid of the solid, mm: ∫A(y)·c(y) dy / ∫A(y) dy over section planes."""
    y, w = _nodes(model)
    ys = np.concatenate([y, -y]) if model.mirror else y
    ws = np.concatenate([w, w]) if model.mirror else w
    num, den = np.zeros(3), 0.0
    for v, wi in zip(ys, ws):
        loop = model.section_loop(float(v), CENTROID_POINTS)
        # the section plane is normal to the span axis: drop that coordinate for the polygon
        span_ax = int(np.argmax(np.abs(model.span_axis)))
        keep = [i for i in range(3) if i != span_ax]
        a, c2 = _polygon(loop[:, keep])
        c3 = np.empty(3)
        c3[keep] = c2
        c3[span_ax] = loop[0, span_ax]
        num += wi * a * c3
        den += wi * a
    return num / den


def surface_area(model) -> float:
    """Total surface of the solid, mm²: skin and trailing-edge strip (the integral the check
    applies to the written file's skin) and the end caps as the model's section areas."""
    from .slices import skin_and_strip_area

    total = skin_and_strip_area(model.skin)
    ends = [model.y_range[0], model.y_range[1]]
    for e in ends:
        total += model.section(e).area(1000) * float(model.chord(e)) ** 2
    return total


#: Points per side of the section loop the intended chord and thickness are taken from.
SECTION_POINTS = 600


def section_figures(model, y: float) -> dict:
    """Chord, largest extent, max thickness (mm, % chord) and its position (% chord) of the
    finished section at ``y``, by the same definition the check applies to the written file's
    slice (:func:`geomgen.geometry.chordline.chord_and_thickness`: chord = the nominal chord
    line, the section family's leading edge to the trailing-edge midpoint, as typed;
    thickness normal to it; the extent beside it: on a cambered section it exceeds the
    chord slightly, NACA 4415 by about 0.07 %)."""
    from .chordline import chord_and_thickness

    axis = int(np.argmax(np.abs(model.span_axis)))
    return chord_and_thickness(model.section_loop(float(y), SECTION_POINTS), axis, model.leading_edge(y))


