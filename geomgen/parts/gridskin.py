"""A tensor B-spline skin through a grid of section loops: the interpolation of
:func:`geomgen.geometry.skin.build_skin`, generalised to sections made here (core sections,
parting lines) and to a chordwise degree below 3.

Chordwise each section is interpolated over the shared loop parameter u; spanwise the
control points are interpolated over the span position v = y within each crease-free
segment, segments joined with a knot of full multiplicity (C0), exactly as the part's skin.
"""

from __future__ import annotations

import numpy as np
from scipy.interpolate import make_interp_spline

from ..geometry.skin import DEGREE, Skin


def skin_through(u: np.ndarray, segments, du: int = DEGREE) -> Skin:
    """Skin through ``segments``: a list of (ys (m,), grid (m, len(u), 3)) with m >= 4, each
    segment's first y equal to the previous segment's last y."""
    pole_blocks, knot_blocks = [], []
    tu = None
    for ys, grid in segments:
        ys = np.asarray(ys, float)
        chord_sp = make_interp_spline(u, np.asarray(grid, float), k=du, axis=1)
        tu = chord_sp.t
        span_sp = make_interp_spline(ys, chord_sp.c, k=DEGREE, axis=1)  # c: (nu, m, 3)
        pole_blocks.append(span_sp.c)
        knot_blocks.append(span_sp.t)
    poles = pole_blocks[0]
    tv = knot_blocks[0][:-1]
    for blk, kn in zip(pole_blocks[1:], knot_blocks[1:]):
        poles = np.concatenate([poles, blk[1:]], axis=0)
        tv = np.concatenate([tv, kn[DEGREE + 1:-1]])
    tv = np.concatenate([tv, knot_blocks[-1][-1:]])
    return Skin(tu=np.asarray(tu), tv=tv, poles=np.ascontiguousarray(np.moveaxis(poles, 0, 1)), du=du, dv=DEGREE)


def clip_segments(segments, lo: float, hi: float, min_len: float = 1e-6) -> list[np.ndarray]:
    """Loft segments (arrays of span positions) clipped to [lo, hi]; positions of a clipped
    segment are mapped affinely so the segment keeps its section count and spacing."""
    out = []
    for seg in segments:
        a, c = float(seg[0]), float(seg[-1])
        a2, c2 = max(a, lo), min(c, hi)
        if c2 - a2 <= min_len:
            continue
        out.append(a2 + (np.asarray(seg, float) - a) * (c2 - a2) / (c - a))
    return out
