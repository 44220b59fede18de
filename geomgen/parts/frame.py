"""Section polygons, distances and the feature-solid descriptions shared by the shop plans.

Frames: the datum frame (x aft, y starboard, z up) and the surface's local frame (X along
the root chord line, Y along the span, Z toward the upper side; see
:mod:`geomgen.geometry.surface`). Sections lie in planes of constant span (local Y).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike


@dataclass
class Tool:
    """A feature solid to be removed (or kept), in the datum frame, mm.

    ``cylinder``: base centre ``origin``, unit ``axis``, ``length``, ``radius``.
    ``cone``: base radius ``radius`` at ``origin``, top radius ``radius2`` at ``origin + length * axis``.
    ``box``: corner ``origin``, edges ``size[0]`` along ``xdir``, ``size[1]`` along ``axis x xdir``,
    ``length`` along ``axis``.
    """

    kind: str
    origin: ArrayLike  # points and directions: stored as float arrays
    axis: ArrayLike
    length: float
    radius: float = 0.0
    radius2: float = 0.0
    xdir: ArrayLike | None = None
    size: tuple[float, float] = (0.0, 0.0)
    label: str = ""
    probe: ArrayLike | None = None  # a point inside the part that this tool must remove (a check)

    def __post_init__(self):
        self.origin = np.asarray(self.origin, float)
        self.axis = np.asarray(self.axis, float) / np.linalg.norm(self.axis)
        if self.xdir is not None:
            self.xdir = np.asarray(self.xdir, float) / np.linalg.norm(self.xdir)
        if self.probe is not None:
            self.probe = np.asarray(self.probe, float)
        if self.length <= 0:
            raise ValueError(f"{self.label}: tool length must be positive, got {self.length}")

    def transformed(self, M: np.ndarray, t: np.ndarray) -> "Tool":
        """The tool moved by the rigid motion p -> M p + t (M a rotation)."""
        return Tool(self.kind, M @ self.origin + t, M @ self.axis, self.length, self.radius, self.radius2,
                    None if self.xdir is None else M @ self.xdir, self.size, self.label,
                    None if self.probe is None else M @ self.probe + t)


def cylinder_between(a, b, radius: float, label: str = "") -> Tool:
    a, b = np.asarray(a, float), np.asarray(b, float)
    return Tool("cylinder", a, b - a, float(np.linalg.norm(b - a)), radius=radius, label=label)


def slot_tools(a, b, axis, radius: float, length: float, label: str = "") -> list[Tool]:
    """A stadium-shaped slot: end circles at ``a`` and ``b`` (base points), extruded ``length``
    along ``axis``; three tools (two cylinders and the box between)."""
    a, b, axis = (np.asarray(v, float) for v in (a, b, axis))
    axis = axis / np.linalg.norm(axis)
    out = [Tool("cylinder", a, axis, length, radius=radius, label=label),
           Tool("cylinder", b, axis, length, radius=radius, label=label)]
    d = b - a
    d = d - (d @ axis) * axis
    span = float(np.linalg.norm(d))
    if span > 1e-9:
        xd = d / span
        yd = np.cross(axis, xd)
        out.append(Tool("box", a - radius * yd, axis, length, xdir=xd, size=(span, 2 * radius), label=label))
    return out


@dataclass
class Frame:
    """The local frame of a surface: datum = R @ local + position."""

    R: np.ndarray
    position: np.ndarray
    span_axis: np.ndarray = field(init=False)

    def __post_init__(self):
        self.span_axis = self.R[:, 1]

    @classmethod
    def of(cls, model) -> "Frame":
        return cls(np.asarray(model.R, float), np.asarray(model.position, float))

    def to_local(self, p) -> np.ndarray:
        return (np.asarray(p, float) - self.position) @ self.R

    def to_datum(self, q) -> np.ndarray:
        return np.asarray(q, float) @ self.R.T + self.position


def section_local(model, y: float, n: int = 120) -> np.ndarray:
    """(2n+1, 2) closed section polygon at span ``y`` in local (X, Z), mm."""
    q = Frame.of(model).to_local(model.section_loop(float(y), n))
    return q[:, [0, 2]]


def section_datum_xz(model, y: float, n: int = 200) -> np.ndarray:
    """(2n+1, 2) section polygon at span ``y`` of a horizontal surface in datum (x, z), mm."""
    return model.section_loop(float(y), n)[:, [0, 2]]


def line_crossings(poly: np.ndarray, xs) -> tuple[np.ndarray, np.ndarray]:
    """Lowest and highest second coordinate where the lines first = xs cross the closed polygon.

    Returns (lo, hi), NaN where a line misses the polygon."""
    xs = np.atleast_1d(np.asarray(xs, float))
    a, b = poly, np.roll(poly, -1, axis=0)
    dx = b[:, 0] - a[:, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (xs[:, None] - a[None, :, 0]) / dx[None, :]
    ok = (t >= 0.0) & (t <= 1.0) & (np.abs(dx)[None, :] > 1e-15)
    z = a[None, :, 1] + t * (b[None, :, 1] - a[None, :, 1])
    lo = np.where(ok, z, np.inf).min(axis=1)
    hi = np.where(ok, z, -np.inf).max(axis=1)
    miss = ~ok.any(axis=1)
    lo[miss] = np.nan
    hi[miss] = np.nan
    return lo, hi


def distance_to_polygon(pts, poly: np.ndarray, near: int = 0) -> np.ndarray:
    """Distance (same units) from each 2D point to the closed polygon's boundary.

    ``near`` > 0: only the edges at the ``near`` vertices closest to each point are measured
    (a k-d tree; exact for a dense polygon, and far faster for many points)."""
    p = np.atleast_2d(np.asarray(pts, float))
    if near:
        from scipy.spatial import cKDTree

        m = len(poly)
        _, iv = cKDTree(poly).query(p, k=min(near, m))
        ia = np.concatenate([iv, (iv - 1) % m], axis=1)  # edges (i, i+1) and (i-1, i)
        a, b = poly[ia], poly[(ia + 1) % m]
        d = b - a
        L2 = np.maximum((d * d).sum(-1), 1e-30)
        t = np.clip(((p[:, None, :] - a) * d).sum(-1) / L2, 0.0, 1.0)
        c = a + t[..., None] * d
        return np.sqrt(((p[:, None, :] - c) ** 2).sum(-1)).min(axis=1)
    a, b = poly, np.roll(poly, -1, axis=0)
    d = b - a
    L2 = np.maximum((d * d).sum(axis=1), 1e-30)
    t = np.clip(((p[:, None, :] - a[None]) * d[None]).sum(-1) / L2[None], 0.0, 1.0)
    c = a[None] + t[..., None] * d[None]
    return np.sqrt(((p[:, None, :] - c) ** 2).sum(-1)).min(axis=1)


def inside_polygon(pts, poly: np.ndarray) -> np.ndarray:
    """Even-odd point-in-polygon test for 2D points."""
    p = np.atleast_2d(np.asarray(pts, float))
    a, b = poly, np.roll(poly, -1, axis=0)
    cond = (a[None, :, 1] > p[:, None, 1]) != (b[None, :, 1] > p[:, None, 1])
    with np.errstate(divide="ignore", invalid="ignore"):
        xint = a[None, :, 0] + (p[:, None, 1] - a[None, :, 1]) * (b[None, :, 0] - a[None, :, 0]) / \
            (b[None, :, 1] - a[None, :, 1])
    return ((cond & (p[:, None, 0] < xint)).sum(axis=1) % 2) == 1


def clearance(pts, poly: np.ndarray) -> np.ndarray:
    """Signed distance to the polygon boundary: positive inside, negative outside."""
    d = distance_to_polygon(pts, poly)
    return np.where(inside_polygon(pts, poly), d, -d)


def rotations24() -> list[np.ndarray]:
    """The 24 proper rotations that map coordinate axes onto coordinate axes."""
    out = []
    for perm in itertools.permutations(range(3)):
        for signs in itertools.product((1, -1), repeat=3):
            M = np.zeros((3, 3))
            for i, (j, s) in enumerate(zip(perm, signs)):
                M[j, i] = s
            if np.linalg.det(M) > 0:
                out.append(M)
    return out
