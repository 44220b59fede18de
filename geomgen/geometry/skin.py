"""The skin of a surface as one tensor-product B-spline (numpy/scipy; no CAD kernel).

Every loft section is the same loop (upper trailing edge -> leading edge -> lower trailing
edge) at the same uniform parameter u, so sections correspond point for point. Chordwise,
each section is interpolated by a cubic B-spline over u (not-a-knot ends); because
interpolation is linear in the data and every section shares u, the control points of all
sections share one knot vector. Spanwise, the control points are interpolated by a cubic
over span position v = y (mm) within each crease-free segment; segments are joined with a
knot of multiplicity 3 (C0), so the skin follows linear station interpolation without
overshoot and stays one surface across the centreline of a mirrored part.

The CAD edge turns (knots, poles) into a ``Geom_BSplineSurface`` unchanged, so this module is
also the exact description of the written skin, which tests sample with scipy.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.interpolate import BSpline, make_interp_spline

from ..sections.base import Section

DEGREE = 3


def gauss_params(t: np.ndarray, deg: int, nodes: int) -> tuple[np.ndarray, np.ndarray]:
    """(parameters, weights) of ``nodes``-point Gauss-Legendre quadrature on every knot span
    of the knot vector ``t`` of degree ``deg``."""
    kn = np.unique(t[deg:len(t) - deg])
    xg, wg = np.polynomial.legendre.leggauss(nodes)
    a, b = kn[:-1, None], kn[1:, None]
    return (0.5 * (b - a) * xg + 0.5 * (a + b)).ravel(), (0.5 * (b - a) * wg).ravel()


@dataclass
class Skin:
    """Tensor B-spline: poles (nu, nv, 3) mm, full knot vectors tu, tv (degree 3 both)."""

    tu: np.ndarray
    tv: np.ndarray
    poles: np.ndarray
    du: int = DEGREE
    dv: int = DEGREE

    def evaluate(self, u, v) -> np.ndarray:
        """Points (len(u), len(v), 3) at parameters u (chordwise) and v (spanwise)."""
        bu = BSpline(self.tu, self.poles, self.du, axis=0)(np.atleast_1d(u))  # (nu_eval, nv, 3)
        return BSpline(self.tv, np.moveaxis(bu, 1, 0), self.dv, axis=0)(np.atleast_1d(v)).transpose(1, 0, 2)

    def derivatives(self, u, v) -> tuple[np.ndarray, np.ndarray]:
        """(dP/du, dP/dv), each (len(u), len(v), 3)."""
        u, v = np.atleast_1d(u), np.atleast_1d(v)
        su = BSpline(self.tu, self.poles, self.du, axis=0).derivative()(u)
        su = BSpline(self.tv, np.moveaxis(su, 1, 0), self.dv, axis=0)(v).transpose(1, 0, 2)
        sv = BSpline(self.tu, self.poles, self.du, axis=0)(u)
        sv = BSpline(self.tv, np.moveaxis(sv, 1, 0), self.dv, axis=0).derivative()(v).transpose(1, 0, 2)
        return su, sv


    @property
    def u_range(self) -> tuple[float, float]:
        return float(self.tu[0]), float(self.tu[-1])

    @property
    def v_range(self) -> tuple[float, float]:
        return float(self.tv[0]), float(self.tv[-1])

    def area(self, nodes: int = 6, span_nodes: int = 16) -> float:
        """Surface area, mm², by Gauss-Legendre quadrature on every knot span (``nodes`` a
        chordwise span, ``span_nodes`` a spanwise one). |Sᵤ × Sᵥ| is not a polynomial: 4 × 4
        nodes read a 10 mm-span round-tipped part 0.11 % low (found by the long CLI run);
        6 × 16 agree with 8 × 32 to 3e-7 there and to 1e-12 on the demo wing."""
        u, wu = gauss_params(self.tu, self.du, nodes)
        v, wv = gauss_params(self.tv, self.dv, span_nodes)
        su, sv = self.derivatives(u, v)
        return float(wu @ np.linalg.norm(np.cross(su, sv), axis=-1) @ wv)


def build_skin(model, n_side: int | None = None) -> Skin:
    """Skin through the loft sections of ``model`` (a SurfaceModel), each sampled at
    ``n_side`` points a side (default: the model's ``loft_points_per_side``)."""
    n_side = model.loft_points_per_side if n_side is None else n_side
    u = Section.loop_parameter(n_side)
    pole_blocks, knot_blocks = [], []
    tu = None
    for seg in model.loft_y():
        grid = np.stack([model.section_loop(float(y), n_side) for y in seg])  # (m, nu, 3)
        chord_sp = make_interp_spline(u, grid, k=DEGREE, axis=1)
        tu = chord_sp.t
        span_sp = make_interp_spline(seg, chord_sp.c, k=DEGREE, axis=1)  # c: (mv, nu, 3)
        pole_blocks.append(span_sp.c)
        knot_blocks.append(span_sp.t)
    poles = pole_blocks[0]
    tv = knot_blocks[0][:-1]  # drop one end knot: the joint gets multiplicity 3
    for blk, kn in zip(pole_blocks[1:], knot_blocks[1:]):
        poles = np.concatenate([poles, blk[1:]], axis=0)
        tv = np.concatenate([tv, kn[DEGREE + 1:-1]])
    tv = np.concatenate([tv, knot_blocks[-1][-1:]])
    return Skin(tu=np.asarray(tu), tv=tv, poles=np.ascontiguousarray(np.moveaxis(poles, 0, 1)))
