"""Plane polygons: repeated points, and the self-crossing test shared by the section check and
the hot-wire paths."""

from __future__ import annotations

import numpy as np


def without_repeats(p: np.ndarray, rel: float = 1e-12) -> np.ndarray:
    """The closed polygon ``p`` (n, 2) without points within ``rel`` x its size of the point
    before them (the last point counts as before the first): a sharp trailing edge written as
    both the first and the last point keeps one of them."""
    p = np.asarray(p, float)
    scale = float(np.ptp(p, axis=0).max()) if len(p) else 0.0
    if scale <= 0.0:
        return p[:1]
    return p[np.linalg.norm(p - np.roll(p, 1, axis=0), axis=1) > rel * scale]


def polygon_crosses_itself(p: np.ndarray, block: int = 256) -> bool:
    """True if the closed 2D polygon ``p`` (n, 2) crosses itself (two non-adjacent edges meet).

    Repeated points (a sharp trailing edge written as both the first and the last point, or
    any zero-length edge) are dropped first, so the two edges that meet there count as
    adjacent; a point within 1e-12 of the polygon's size from an edge's line counts as on it.
    (Without both, a sharp-edged section whose closing point differed from its first by
    1e-19 was "crossing itself" at the edge and refused: found by the long CLI property run.)
    """
    p = without_repeats(p, 1e-12)
    n = len(p)
    if n < 4:
        return False
    scale = float(np.ptp(p, axis=0).max())
    a, b = p, np.roll(p, -1, axis=0)
    eps = 1e-12 * scale * scale

    def side(p0, p1, q):  # sign of q relative to the line p0->p1, rows x columns; 0 when on it
        c = ((p1[:, None, 0] - p0[:, None, 0]) * (q[None, :, 1] - p0[:, None, 1])
             - (p1[:, None, 1] - p0[:, None, 1]) * (q[None, :, 0] - p0[:, None, 0]))
        return np.where(np.abs(c) <= eps, 0.0, np.sign(c))

    for i0 in range(0, n, block):
        ai, bi = a[i0:i0 + block], b[i0:i0 + block]
        hit = (side(ai, bi, a) * side(ai, bi, b) < 0) & (side(a, b, ai).T * side(a, b, bi).T < 0)
        i, j = np.indices(hit.shape)
        i = i + i0
        near = (np.abs(i - j) <= 1) | (np.abs(i - j) == n - 1)
        if (hit & ~near).any():
            return True
    return False
