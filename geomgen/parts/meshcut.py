"""Mesh booleans for the printed pieces (``manifold3d``): the pieces are meshes in the end, so
their features are cut from the watertight mesh of the bare piece, and every result is a
closed oriented 2-manifold by construction of the library (checked again here).

Feature solids (:class:`geomgen.parts.frame.Tool`) become polyhedra whose flats lie at the
nominal radius: a hole is never smaller than asked (the polygon's corners are outside the
circle by at most the mesh tolerance, or by the segment count's own sag when that is finer).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import GeometryError


def _m():
    import manifold3d

    return manifold3d


def from_arrays(v: np.ndarray, f: np.ndarray, what: str):
    """Manifold of a closed triangle mesh (double precision); refuse a mesh that is not one."""
    m3 = _m()
    mf = m3.Manifold(m3.Mesh64(np.ascontiguousarray(v, dtype=np.float64), np.ascontiguousarray(f, dtype=np.uint64)))
    if mf.status() != m3.Error.NoError or mf.is_empty():
        raise GeometryError(f"{what}: the mesh is not a closed manifold ({mf.status().name}); nothing was written")
    return mf


def to_arrays(mf, eps: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """Vertices and triangles; ``eps`` > 0: first collapse edges shorter than ``eps`` mm
    (a cut across a thin trailing edge leaves vertices nanometres apart, which a
    single-precision STL would merge), moving no surface by more than ``eps``."""
    if eps > 0:
        mf = mf.simplify(eps)
    mesh = mf.to_mesh64()
    v = np.asarray(mesh.vert_properties, dtype=float)[:, :3]
    f = np.asarray(mesh.tri_verts, dtype=np.int64)
    return v, f


def segments(radius: float, tol: float) -> int:
    """Sides of a polygon whose sag from a circle of ``radius`` is at most ``tol`` (at least 12)."""
    if radius <= tol:
        return 12
    return max(12, int(math.ceil(math.pi / math.acos(1.0 - tol / radius))))


def _placed(mf, origin, axis, xdir):
    """``mf`` (built along +z from the origin, x along its first edge) moved to the frame."""
    z = np.asarray(axis, float)
    x = np.asarray(xdir, float)
    x = x - (x @ z) * z
    x /= np.linalg.norm(x)
    y = np.cross(z, x)
    M = np.column_stack([x, y, z, np.asarray(origin, float)])
    return mf.transform(M)


def tool_manifold(tool, tol: float):
    """Manifold of a feature solid; ``tol``: largest sag of curved walls, mm."""
    m3 = _m()
    if tool.kind in ("cylinder", "cone"):
        r1 = float(tool.radius)
        r2 = float(tool.radius if tool.kind == "cylinder" else tool.radius2)
        n = segments(max(r1, r2), tol)
        k = 1.0 / math.cos(math.pi / n)  # flats at the nominal radius
        body = m3.Manifold.cylinder(float(tool.length), r1 * k, r2 * k, n)
        a = tool.axis
        ref = np.array([1.0, 0.0, 0.0]) if abs(a[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
        return _placed(body, tool.origin, a, ref)
    if tool.kind == "box":
        body = m3.Manifold.cube([float(tool.size[0]), float(tool.size[1]), float(tool.length)])
        return _placed(body, tool.origin, tool.axis, tool.xdir)
    raise ValueError(f"unknown tool kind {tool.kind}")


def union(parts):
    m3 = _m()
    parts = list(parts)
    return parts[0] if len(parts) == 1 else m3.Manifold.batch_boolean(parts, m3.OpType.Add)


def cut_features(piece, groups, what: str, tol: float, must_remove) -> tuple[Any, float, list[dict]]:
    """``piece`` (a Manifold) less each feature (``groups``: [(label, [Tool])]) in turn.

    ``must_remove(label)`` is True where the feature reaches into this piece's material by its
    plan (a probe point inside): such a feature that removes nothing is refused. The removed
    material is computed apart (the common of the piece and the feature) and must account for
    the change of volume. Returns (piece, removed mm³, [{label, removed_mm3}])."""
    removed, recs = 0.0, []
    for label, tools in groups:
        tool = union([tool_manifold(t, tol) for t in tools])
        v0 = piece.volume()
        common = piece ^ tool
        res = piece - tool
        if res.status() != _m().Error.NoError or res.is_empty():
            raise GeometryError(f"{what}: {label}: the mesh cut failed; nothing was written")
        rem = common.volume()
        if must_remove(label) and rem <= 0.0:
            raise GeometryError(f"{what}: {label}: the cut removed no material where the plan puts the feature; "
                                "nothing was written")
        if abs(v0 - res.volume() - rem) > 1e-6 * v0 + 1e-3:
            raise GeometryError(f"{what}: {label}: the cut part and the removed material ({rem:.1f} mm³) do not add "
                                f"up ({v0 - res.volume():.1f} mm³ left the part); nothing was written")
        piece, removed = res, removed + rem
        recs.append({"label": label, "removed_mm3": rem})
    return piece, removed, recs


def slab(piece, origin, axis, xdir, size, length):
    """The common of ``piece`` and a box (corner ``origin``, edges along ``xdir``,
    ``axis x xdir`` and ``axis``)."""
    m3 = _m()
    box = _placed(m3.Manifold.cube([float(size[0]), float(size[1]), float(length)]), origin, axis, xdir)
    return piece ^ box
