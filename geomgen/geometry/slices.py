"""Figures of a part from its cross-sections in planes normal to the span axis (numpy only).

A *slice* is the set of points where the part's surface meets the plane ``span = s``. From
the written skin (a B-spline read from the STEP file) a slice is an ordered polyline
(upper trailing edge -> leading edge -> lower trailing edge); from an STL mesh it is an
unordered set of edge crossings. Both give the projected chord (extent along datum x)
and the leading-edge x; ordered slices also give the true chord and the thickness.

Spanwise integrals use composite Gauss-Legendre nodes, crowded toward the ends where
curved planforms change fastest.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .skin import Skin

GAUSS = 4
INTERVALS = 40


def span_axis_of(bbox_min, bbox_max) -> int:
    """Datum axis (1 = y, 2 = z) along which the part spans: the longer of its y and z extents."""
    ext = np.asarray(bbox_max) - np.asarray(bbox_min)
    return 1 if ext[1] >= ext[2] else 2


def span_axis_of_grid(grid: np.ndarray) -> int:
    """Span axis of a skin sample grid (nu, nv, 3): the datum axis (y or z) that stays
    constant along the chordwise curves (the skin's sections are planar across the span)."""
    spread = [np.ptp(grid[:, :, k], axis=0).mean() / max(np.ptp(grid[:, :, k]), 1e-12) for k in (1, 2)]
    return 1 if spread[0] <= spread[1] else 2


def gauss_nodes(a: float, b: float) -> tuple[np.ndarray, np.ndarray]:
    """Composite Gauss nodes on [a, b], sub-intervals crowded toward both ends (sine map)."""
    t = 0.5 * (1 - np.cos(np.linspace(0, np.pi, INTERVALS + 1)))
    edges = a + (b - a) * t
    xg, wg = np.polynomial.legendre.leggauss(GAUSS)
    lo, hi = edges[:-1, None], edges[1:, None]
    return (0.5 * (hi - lo) * xg + 0.5 * (hi + lo)).ravel(), (0.5 * (hi - lo) * wg).ravel()


# -- slices of a B-spline skin ---------------------------------------------------------
def skin_grid(skin: Skin, per_span: int = 6) -> tuple[np.ndarray, float]:
    """Dense sample grid (nu, nv, 3) of a skin and its sampling deviation bound (mm).

    Samples ``per_span`` points in every knot span; the bound is the largest distance of a
    parameter midpoint from the straight line between its two neighbours, in either direction.
    """
    def params(t, deg):
        kn = np.unique(t[deg:len(t) - deg])
        f = np.linspace(0, 1, per_span + 1)[:-1]
        return np.append((kn[:-1, None] + (kn[1:] - kn[:-1])[:, None] * f).ravel(), kn[-1])

    u, v = params(skin.tu, skin.du), params(skin.tv, skin.dv)
    grid = skin.evaluate(u, v)
    um, vm = 0.5 * (u[1:] + u[:-1]), 0.5 * (v[1:] + v[:-1])
    du = np.linalg.norm(skin.evaluate(um, v) - 0.5 * (grid[1:] + grid[:-1]), axis=-1).max()
    dv = np.linalg.norm(skin.evaluate(u, vm) - 0.5 * (grid[:, 1:] + grid[:, :-1]), axis=-1).max()
    return grid, float(max(du, dv))


def slice_grid(grid: np.ndarray, axis: int, s: np.ndarray) -> np.ndarray:
    """Ordered slices (len(s), nu, 3) of a sample grid at span positions ``s``.

    Each chordwise column (fixed u) is a curve across the span; it must cross each plane
    once (the span coordinate monotone along it), which holds for lofted skins.
    """
    g = grid[:, :, axis]  # (nu, nv)
    if g[0, -1] < g[0, 0]:
        grid, g = grid[:, ::-1], g[:, ::-1]
    if (np.diff(g, axis=1) < -1e-9).any():
        raise ValueError("the skin folds back along the span; it cannot be sliced column-wise")
    s = np.atleast_1d(s)
    j = np.stack([np.searchsorted(col, s, side="left") - 1 for col in g])  # (nu, ns)
    j = np.clip(j, 0, g.shape[1] - 2)
    iu = np.arange(g.shape[0])[:, None]
    g0, g1 = g[iu, j], g[iu, j + 1]
    t = np.clip((s[None, :] - g0) / np.where(g1 > g0, g1 - g0, 1.0), 0.0, 1.0)[..., None]
    pts = (1 - t) * grid[iu, j] + t * grid[iu, j + 1]  # (nu, ns, 3)
    return pts.transpose(1, 0, 2)


def chord_and_thickness(sl: np.ndarray, axis: int) -> dict:
    """True chord, max thickness (mm) and its position (% chord) of an ordered slice (n, 3).

    The chord runs from the trailing-edge midpoint (between the two ends of the polyline) to
    the point farthest from it (the leading edge); thickness is measured normal to it.
    """
    te = 0.5 * (sl[0] + sl[-1])
    d = np.linalg.norm(sl - te, axis=1)
    i_le = int(np.argmax(d))
    chord = float(d[i_le])
    e = (te - sl[i_le]) / chord
    plane_axes = [k for k in range(3) if k != axis]
    # normal to the chord within the section plane
    n = np.zeros(3)
    a, b = plane_axes
    n[a], n[b] = -e[b], e[a]
    x = (sl - sl[i_le]) @ e
    h = (sl - sl[i_le]) @ n
    up_x, up_h = x[: i_le + 1][::-1], h[: i_le + 1][::-1]
    lo_x, lo_h = x[i_le:], h[i_le:]
    xs = np.linspace(0, chord, 4001)
    t = np.abs(np.interp(xs, up_x, up_h) - np.interp(xs, lo_x, lo_h))
    k = int(np.argmax(t))
    return {"chord_mm": chord, "thickness_mm": float(t[k]), "thickness_pct": 100 * float(t[k]) / chord,
            "at_pct": 100 * xs[k] / chord}


# -- planform figures from slice extents -------------------------------------------------
@dataclass
class Outline:
    """Span positions s (mm), leading-edge x and projected chord (mm) at each, with weights."""

    s: np.ndarray
    w: np.ndarray
    x_le: np.ndarray
    c: np.ndarray


def planform_figures(outline: Outline, span_lo: float, span_hi: float, root_chord: float, tip_chord: float,
                     root: float, tip: float, qc_root: float, qc_tip: float) -> dict:
    """Planform figures (Raymer §7.3 definitions) from an outline over the whole span.

    ``root``/``tip``: span coordinates of the root (centre of a mirrored part) and a tip.
    """
    s, w, x_le, c = outline.s, outline.w, outline.x_le, outline.c
    area = float(w @ c)
    span = span_hi - span_lo
    mac = float(w @ c**2) / area
    y_mac = float(w @ (c * np.abs(s - root))) / area
    xle = float(w @ (x_le * c)) / area
    sweep = math.degrees(math.atan2(qc_tip - qc_root, abs(tip - root)))
    return {"span_mm": span, "projected_area_cm2": area / 100, "aspect_ratio": span**2 / area, "mac_mm": mac,
            "mac_y_mm": y_mac, "mac_le_x_mm": xle, "mac_qc_x_mm": xle + mac / 4, "root_chord_mm": root_chord,
            "tip_chord_mm": tip_chord, "taper_ratio": tip_chord / root_chord, "sweep_qc_deg": sweep}


def root_of(s_lo: float, s_hi: float, chord_at) -> tuple[float, float, bool]:
    """(root, tip, mirrored): the centre of a part symmetric about its middle, else the end
    with the larger chord (a constant-chord part: its lower end)."""
    mid = 0.5 * (s_lo + s_hi)
    probe = np.linspace(0.05, 0.95, 7) * 0.5 * (s_hi - s_lo)
    ca, cb = chord_at(mid + probe), chord_at(mid - probe)
    sym = np.max(np.abs(ca - cb)) < 0.05 + 0.005 * float(np.mean(ca))  # mesh slices are coarser
    if sym and (s_lo < -1e-6 < 1e-6 < s_hi or abs(s_lo + s_hi) < 1e-3):
        return mid, s_hi, True
    eps = 1e-6 * (s_hi - s_lo)
    c_lo, c_hi = chord_at(np.array([s_lo + eps, s_hi - eps]))
    return (s_lo, s_hi, False) if c_lo >= c_hi - 1e-6 else (s_hi, s_lo, False)
