"""Print poses of meshed pieces (numpy only): a flat face of the piece on the bed where one
exists (a joint face, the root face, the mounting pad), turned on the bed to fit the usable
build volume; else the axis-aligned pose with the least overhang, marked as needing support.

Overhang: the area of triangles that face downward more steeply than 45° from the vertical
(normal's z below -sin 45°), not counting what lies on the bed. The 45° rule is common
practice for fused-filament printing, no source.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: downward-facing area steeper than this from the vertical needs support (common practice, no source)
OVERHANG_DEG = 45.0
#: a piece whose overhang is at most this share of its surface (holes' roofs, small ledges) is
#: bridged by the slicer without support (common practice, no source)
SUPPORT_SHARE = 0.01


@dataclass
class Pose:
    R: np.ndarray  # printed = R @ p + t
    t: np.ndarray
    face: str  # what lies on the bed
    contact_mm2: float
    overhang_mm2: float
    area_mm2: float
    size: np.ndarray
    fits: bool | None

    @property
    def needs_support(self) -> bool:
        return self.contact_mm2 <= 0.0 or self.overhang_mm2 > SUPPORT_SHARE * self.area_mm2


def _tri(v, f):
    p0, p1, p2 = v[f[:, 0]], v[f[:, 1]], v[f[:, 2]]
    c = np.cross(p1 - p0, p2 - p0)
    a = 0.5 * np.linalg.norm(c, axis=1)
    n = c / np.maximum(2 * a, 1e-300)[:, None]
    return n, a, p0


def flat_faces(v, f, normals, tol=1e-4) -> list[tuple[np.ndarray, float]]:
    """(outward unit normal, area) of the design's flat faces (``normals``: their outward
    directions, e.g. the joint faces and the pad) that the whole piece lies behind, so it can
    stand on them, largest first. Only design faces count: on a faceted mesh every facet of a
    convex skin is a supporting plane, but a piece laid on one touches the bed along a line."""
    n, a, p0 = _tri(v, f)
    out = []
    for nn in normals:
        nn = np.asarray(nn, float) / np.linalg.norm(nn)
        top = (v @ nn).max()
        on = (n @ nn > 1 - 1e-9) & (p0 @ nn > top - tol)
        if on.any():
            out.append((nn, float(a[on].sum())))
    out.sort(key=lambda o: -o[1])
    return out


def _down(nrm) -> np.ndarray:
    """A rotation taking the unit vector ``nrm`` to -z."""
    a = np.asarray(nrm, float)
    b = np.array([0.0, 0.0, -1.0])
    c = float(a @ b)
    if c < -1 + 1e-12:
        return np.diag([1.0, -1.0, -1.0])
    k = np.cross(a, b)
    K = np.array([[0, -k[2], k[1]], [k[2], 0, -k[0]], [-k[1], k[0], 0]])
    return np.eye(3) + K + K @ K / (1 + c)


def _yaws(v2) -> list[float]:
    """Turns on the bed worth trying: each edge of the footprint's convex hull along x (one of
    them gives the least bounding rectangle), and 0."""
    from scipy.spatial import ConvexHull

    try:
        h = v2[ConvexHull(v2).vertices]
    except Exception:
        return [0.0]
    e = np.roll(h, -1, axis=0) - h
    return [0.0] + list(-np.arctan2(e[:, 1], e[:, 0]))


def _rz(t):
    c, s = math.cos(t), math.sin(t)
    return np.array([[c, -s, 0], [s, c, 0], [0, 0, 1.0]])


def measure(v, f, R) -> tuple[float, float, float]:
    """(contact, overhang, total) areas, mm², of the mesh turned by R and set on z = 0."""
    w = v @ R.T
    n, a, _ = _tri(w, f)
    z0 = w[:, 2].min()
    zt = w[f, 2]
    on_bed = (np.abs(zt - z0) < 1e-4).all(axis=1) & (n[:, 2] < -0.999)
    steep = n[:, 2] < -math.sin(math.radians(OVERHANG_DEG))
    return float(a[on_bed].sum()), float(a[steep & ~on_bed].sum()), float(a.sum())


def _fit(w, usable):
    size = np.ptp(w, axis=0)
    return size, (None if usable is None else bool((size <= np.asarray(usable) + 1e-6).all()))


def choose(v, f, usable, fallbacks=(), normals=((0, 1, 0), (0, -1, 0))) -> Pose:
    """The pose of the mesh (printed mm) for a usable volume [x, y, z] (None: no limit).

    ``normals``: outward directions of the design's flat faces. Flat faces first: one that fits,
    then one needing no support, then the largest contact;
    ``fallbacks``: rotations tried when no flat face gives a pose that fits."""
    cands = []
    for nrm, area in flat_faces(v, f, normals):
        R0 = _down(nrm)
        w0 = v @ R0.T
        for yaw in _yaws(w0[:, :2]):
            R = _rz(yaw) @ R0
            size, fits = _fit(v @ R.T, usable)
            cands.append((R, "flat face", fits, size))
            if fits in (None, True):
                break
    if not any(c[2] in (None, True) for c in cands):
        for R in fallbacks:
            size, fits = _fit(v @ R.T, usable)
            cands.append((np.asarray(R, float), "no flat face fits: lying on its skin", fits, size))
    best = None
    for R, what, fits, size in cands:
        contact, over, total = measure(v, f, R)
        key = (0 if fits in (None, True) else 1, over > SUPPORT_SHARE * total, -contact, over)
        if best is None or key < best[0]:
            best = (key, Pose(R, np.zeros(3), what, contact, over, total, size, fits))
    assert best is not None  # at least one candidate pose
    p = best[1]
    w = v @ p.R.T
    lo, hi = w.min(axis=0), w.max(axis=0)
    p.t = np.array([-0.5 * (lo[0] + hi[0]), -0.5 * (lo[1] + hi[1]), -lo[2]])
    return p
