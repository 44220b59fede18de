"""The chord line of a section slice and the figures taken along it (numpy only): one
definition of chord, extent and thickness, shared by the intended section (sampled from the
model) and the measured one (sliced from a written file).

The nominal chord runs from the section family's leading edge (NACA Report 460: where the
mean line starts; a coordinate file: its point farthest from the trailing edge) to the
trailing-edge midpoint; the largest extent is a caliper's reading, a little longer on a
cambered section; thickness is square to the chord line.
"""

from __future__ import annotations

import math

import numpy as np


def section_diameter(points: np.ndarray) -> tuple[float, int, int]:
    """(largest distance between two points of a section, index of one end, of the other).

    The section lies in a plane; the pair is searched among its convex hull's vertices.
    """
    from scipy.spatial import ConvexHull

    p = np.asarray(points, float)
    keep = np.ptp(p, axis=0) > 1e-9 * max(float(np.ptp(p)), 1e-300)
    idx = np.arange(len(p))
    if keep.sum() == 2:
        try:
            idx = ConvexHull(p[:, keep]).vertices
        except Exception:  # degenerate hull: use every point
            pass
    from scipy.spatial.distance import pdist

    q = p[idx]
    d = pdist(q)  # condensed: pairs (i < j) in row order
    k = int(np.argmax(d))
    n = len(q)
    # row i of the condensed matrix starts at i n - i (i + 1) / 2
    starts = np.arange(n) * n - np.arange(n) * (np.arange(n) + 1) // 2
    i = int(np.searchsorted(starts, k, side="right") - 1)
    j = int(k - starts[i] + i + 1)
    return float(d[k]), int(idx[i]), int(idx[j])


def chord_lines(sl: np.ndarray, le_hint: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """(leading edges (ns, 3), trailing-edge midpoints (ns, 3)) of ordered section polylines
    (ns, n, 3) (upper trailing edge -> leading edge -> lower trailing edge): the nominal chord
    line of each, from the section family's leading edge to the trailing-edge midpoint
    (between the polyline's two ends).

    Where the leading edge is depends on the family (NACA Report 460: the start of the mean
    line, which on a cambered section lies behind the outline's foremost point and nearer the
    trailing edge than the outline's farthest point; a coordinate file: its point farthest
    from the trailing edge). ``le_hint`` (ns, 3), where the design puts it, picks it on the
    outline: the outline point nearest the hint. Without a hint it is the point farthest from
    the trailing-edge midpoint. Either way it is located between samples by a parabola
    through the best sample and its neighbours. The trailing edge always comes from the
    outline itself, so a scaled or moved section reads its own chord. (Aiming the line at
    the trailing-edge corner that happened to be farther flipped it by te/chord between two
    samplings of one section: an open 1 mm edge on a 37 mm chord moved the second moment
    about the chord line 7 %.)"""
    sl = np.asarray(sl, float)
    ns, n = sl.shape[:2]
    te = 0.5 * (sl[:, 0] + sl[:, -1])
    lo, hi = max(1, n // 8), n - 1 - max(1, n // 8)  # the nose, away from the trailing edge
    if le_hint is None:
        d = np.linalg.norm(sl - te[:, None, :], axis=-1)
    else:
        d = -np.sum((sl - np.asarray(le_hint, float)[:, None, :]) ** 2, axis=-1)
        lo, hi = 1, n - 2
    i = lo + np.argmax(d[:, lo:hi + 1], axis=1)
    k = np.arange(ns)
    d0, d1, d2 = d[k, i - 1], d[k, i], d[k, i + 1]
    den = d0 - 2 * d1 + d2
    f = np.where(den < 0, 0.5 * (d0 - d2) / np.where(den < 0, den, -1.0), 0.0)
    f = np.clip(f, -0.5, 0.5)[:, None]  # vertex of the parabola, in samples from i
    p0, p1, p2 = sl[k, i - 1], sl[k, i], sl[k, i + 1]
    le = p1 + 0.5 * f * (p2 - p0) + 0.5 * f * f * (p2 - 2 * p1 + p0)
    return le, te


def datum_extent(sl: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(foremost datum x (ns,), x extent (ns,)) of ordered section polylines (ns, n, 3): the
    foremost point located between samples by a parabola through the foremost sample and its
    neighbours (the samples alone cut the nose: 0.15 mm of a 1,600 mm chord's shadow); the
    aftmost is a trailing-edge corner, a sample."""
    x = np.asarray(sl, float)[:, :, 0]
    ns, n = x.shape
    i = np.clip(np.argmin(x, axis=1), 1, n - 2)
    k = np.arange(ns)
    x0, x1, x2 = x[k, i - 1], x[k, i], x[k, i + 1]
    den = x0 - 2 * x1 + x2
    lo = np.where(den > 0, x1 - (x2 - x0) ** 2 / (8 * np.where(den > 0, den, 1.0)), x1)
    lo = np.minimum(lo, x.min(axis=1))
    return lo, x.max(axis=1) - lo


def chord_line_of_points(points: np.ndarray, aft: np.ndarray, le_hint: np.ndarray | None = None,
                         te_corners: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """(leading edge (3,), trailing-edge midpoint (3,)) of an unordered planar section (a mesh
    slice), by the definition of :func:`chord_lines`.

    The trailing edge starts at the slice's own convex-hull vertex farthest along ``aft`` (3,)
    (roughly the chord direction): one corner of the edge (or the point of a sharp edge). The
    other corner is the slice point nearest that one moved by the design's flat,
    ``te_corners`` (2, 3) (the design's upper and lower corner there), taken the way round
    that lands on the slice: a NACA open edge finished much thinner than its own is a
    flat slanted nearly along the chord, which no local test on the points tells from the
    surface. Without ``te_corners``, a hull edge at the aft vertex that runs across the
    chord (within 45° of the normal) is taken for the flat. The trailing-edge midpoint is
    halfway between the corners. The leading edge is the point nearest ``le_hint`` (3,) when
    given (the section family's leading edge, see :func:`chord_lines`), else the point
    farthest from that midpoint. Both ends are points of the slice, so a moved or scaled
    section reads its own chord."""
    from scipy.spatial import ConvexHull

    p = np.asarray(points, float)
    e = np.asarray(aft, float) / np.linalg.norm(aft)
    c = p - p.mean(axis=0)
    nrm = np.linalg.svd(c, full_matrices=False)[2][-1]  # normal of the slice's plane
    for _ in range(2):
        f = np.cross(nrm, e)
        f /= np.linalg.norm(f)
        q = np.column_stack([c @ e, c @ f])
        try:
            hv = ConvexHull(q).vertices  # counter-clockwise
        except Exception:  # degenerate: every point on a line
            hv = np.array([int(np.argmin(q[:, 0])), int(np.argmax(q[:, 0]))])
        j = int(np.argmax(q[hv, 0]))
        pa = p[hv[j]]
        te = pa
        if te_corners is not None:
            k = np.asarray(te_corners, float)
            flat = k[1] - k[0]
            if np.linalg.norm(flat) > 0:
                # pa is one corner: the one from which the design's flat lands on the slice (a
                # flat square to the chord leaves both corners equally far aft)
                best = None
                for f_ in (flat, -flat):
                    dist = np.linalg.norm(p - (pa + f_), axis=1)
                    i = int(np.argmin(dist))
                    if best is None or dist[i] < best[0]:
                        best = (dist[i], p[i])
                assert best is not None  # two candidates tried
                te = 0.5 * (pa + best[1])
        else:
            best = None
            for nb in (hv[j - 1], hv[(j + 1) % len(hv)]):
                v = p[nb] - pa
                lv = float(np.linalg.norm(v))
                if lv > 0 and abs(v @ e) < math.cos(math.radians(45.0)) * lv and (best is None or lv < best[0]):
                    best = (lv, p[nb])
            if best is not None:
                te = 0.5 * (pa + best[1])
        if le_hint is None:
            le = p[int(np.argmax(np.linalg.norm(p - te, axis=1)))]
        else:
            le = p[int(np.argmin(np.linalg.norm(p - np.asarray(le_hint, float), axis=1)))]
        e = (te - le) / np.linalg.norm(te - le)
    return le, te


def ordered_extent(sl: np.ndarray) -> float:
    """Largest extent (mm) of an ordered section polyline (n, 3): the farthest pair of samples,
    each end that is not a polyline end (a trailing-edge corner) located between samples by a
    parabola through its distances from the other end (samples alone cut the nose: 0.07 mm of
    a 3,000 mm chord's extent between two samplings)."""
    sl = np.asarray(sl, float)
    d, a, b = section_diameter(sl)
    n = len(sl)
    for k, other in ((a, b), (b, a)):
        if 0 < k < n - 1:
            r = np.linalg.norm(sl[k - 1:k + 2] - sl[other], axis=1)
            den = r[0] - 2 * r[1] + r[2]
            if den < 0:
                d = max(d, float(r[1] - (r[2] - r[0]) ** 2 / (8 * den)))
    return d


def section_frame(sl: np.ndarray, axis: int, le_hint=None) -> tuple[float, int, np.ndarray, np.ndarray]:
    """(nominal chord, index of the leading-edge sample, unit chord direction (3,), unit normal
    (3,)) of an ordered section polyline (n, 3) in a plane normal to datum ``axis``: the chord
    line of :func:`chord_lines` (leading edge to trailing-edge midpoint), the normal in the
    section plane (toward +z for a horizontal part with the chord along +x)."""
    hint = None if le_hint is None else np.asarray(le_hint, float)[None]
    le, te = (v[0] for v in chord_lines(np.asarray(sl, float)[None], hint))
    i_le = int(np.argmin(np.linalg.norm(sl - le, axis=1)))
    e = te - le
    chord = float(np.linalg.norm(e))
    e = e / chord
    a, b = [k for k in range(3) if k != axis]
    nrm = np.zeros(3)
    nrm[a], nrm[b] = -e[b], e[a]
    return chord, i_le, e, nrm


def chord_and_thickness(sl: np.ndarray, axis: int, le_hint=None) -> dict:
    """Chord, largest extent, max thickness (mm) and its position (% chord) of an ordered
    section polyline (n, 3) (upper trailing edge -> leading edge -> lower trailing edge).

    This is the one definition of these figures, used for the intended section (sampled from
    the model) and for the measured one (sliced from the written file):

    * chord: the nominal chord, the length of the chord line from the leading edge to the
      trailing-edge midpoint (:func:`chord_lines`): the chord the user typed.
    * extent: the section's largest extent, the distance between its two farthest points, as
      a caliper measures it. On a cambered section it exceeds the chord a little (the upper
      surface lies ahead of the mean line's leading edge: NACA 4415 by 0.07 %).
    * thickness: the largest distance between upper and lower surface measured normal to
      the chord line, at equal position along it; its position in % of the chord from the
      leading edge.
    """
    sl = np.asarray(sl, float)
    chord, i_le, e, nrm = section_frame(sl, axis, le_hint)
    le = chord_lines(sl[None], None if le_hint is None else np.asarray(le_hint, float)[None])[0][0]
    x = (sl - le) @ e
    h = (sl - le) @ nrm
    up_x, up_h = np.append(0.0, x[: i_le + 1][::-1]), np.append(0.0, h[: i_le + 1][::-1])
    lo_x, lo_h = np.append(0.0, x[i_le:]), np.append(0.0, h[i_le:])
    up_o, lo_o = np.argsort(up_x, kind="stable"), np.argsort(lo_x, kind="stable")
    xs = np.linspace(0, chord, 4001)
    t = np.abs(np.interp(xs, up_x[up_o], up_h[up_o]) - np.interp(xs, lo_x[lo_o], lo_h[lo_o]))
    k = int(np.argmax(t))
    return {"chord_mm": chord, "extent_mm": ordered_extent(sl), "thickness_mm": float(t[k]),
            "thickness_pct": 100 * float(t[k]) / chord, "at_pct": 100 * xs[k] / chord}
