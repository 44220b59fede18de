"""Intended figures of a surface, integrated from the spec's geometry model.

Definitions (DEVELOPERS.md): the outline is projected on the datum plane normal to the lift
direction (x-y for a horizontal surface, x-z for a vertical one). MAC = ∫c² dy / ∫c dy,
its spanwise position ȳ = ∫c|y| dy / ∫c dy from the root, its leading edge
x̄_LE = ∫x_LE c dy / ∫c dy (datum x) (Raymer, Aircraft Design: A Conceptual Approach §7.3).
Integrals use Gauss-Legendre nodes on each station interval (exact for the cubic pieces).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

GAUSS_NODES = 16
OUTLINE_POINTS = 400


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


def outline_at(model, y: float) -> tuple[float, float]:
    """(leading-edge coordinate, projected chord) of the section at ``y``, mm, along datum x."""
    pts = model.section_loop(y, OUTLINE_POINTS)
    return float(pts[:, 0].min()), float(pts[:, 0].max() - pts[:, 0].min())


def intended_figures(model) -> Figures:
    """Figures of a :class:`SurfaceModel` from its geometry (no CAD)."""
    y, w = _nodes(model)
    le, c = np.array([outline_at(model, v) for v in y]).T
    area_half = float(w @ c)
    mac = float(w @ c**2) / area_half
    y_mac = float(w @ (c * (y - model.planform.y[0]))) / area_half
    x_le = float(w @ (le * c)) / area_half
    k = 2.0 if model.mirror else 1.0
    half = model.half_span - (0.0 if model.mirror else float(model.planform.y[0]))
    span = k * half
    area = k * area_half
    vol = k * float(w @ np.array([model.section(v).area() * float(model.chord(v)) ** 2 for v in y]))
    y0, y1 = float(model.planform.y[0]), float(model.planform.half_span)  # sweep: root to last station
    (le0, c0), (le1, c1) = outline_at(model, y0), outline_at(model, y1)
    sweep = math.degrees(math.atan2((le1 + c1 / 4) - (le0 + c0 / 4), y1 - y0))
    root, tip = float(model.chord(y0)), float(model.planform("chord", model.planform.half_span))
    return Figures(span_mm=span, projected_area_cm2=area / 100.0, aspect_ratio=span**2 / area, mac_mm=mac,
                   mac_y_mm=y_mac, mac_le_x_mm=x_le, mac_qc_x_mm=x_le + mac / 4, root_chord_mm=root,
                   tip_chord_mm=tip, taper_ratio=tip / root, sweep_qc_deg=sweep, volume_cm3=vol / 1000.0)
