"""Watertight triangle mesh of the part between two span positions, straight from the skin's
B-spline (numpy; the caps triangulated by ``manifold3d``): no kernel solid and no kernel
mesher, so a printed piece is meshed in milliseconds.

Nodes: chordwise (u) and spanwise (v) parameters are chosen greedily along dense samples so
that every chord between neighbouring nodes stays within half the tolerance of the curve it
replaces, on several lines of the other parameter; the skin's creases (v knots of full
multiplicity: the centreline, stations of a linear loft) are always nodes. The result is then
measured: the skin at every cell's centre and at the middle of each cell's diagonal lies within
the tolerance of the mesh, or the grid is refined and measured again.
"""

from __future__ import annotations

import numpy as np

from ..errors import GeometryError

#: dense samples per parameter direction for the node choice
SAMPLES = 2001


def _sag(P, i, j) -> float:
    """Largest distance of the points P[:, i:j+1] (lines x samples x 3) from the chords P[:, i]-P[:, j]."""
    a, b = P[:, i, None, :], P[:, j, None, :]
    q = P[:, i:j + 1, :]
    d = b - a
    L2 = np.maximum((d * d).sum(-1), 1e-300)
    t = np.clip(((q - a) * d).sum(-1) / L2, 0.0, 1.0)
    return float(np.sqrt(((q - a - t[..., None] * d) ** 2).sum(-1)).max())


def _nodes(t, P, tol, must=()) -> np.ndarray:
    """Greedy subset of the sample parameters ``t`` (P: lines x len(t) x 3 points) with every
    chord within ``tol``; the parameters in ``must`` are nodes."""
    must_i = sorted({int(np.argmin(np.abs(t - m))) for m in must} | {0, len(t) - 1})
    out, i = [0], 0
    for stop in must_i[1:]:
        while i < stop:
            if _sag(P, i, stop) <= tol:
                j = stop
            else:  # i + step is good, i + 2 step bad (or the stop, known bad): double, then bisect
                step = 1
                while i + 2 * step < stop and _sag(P, i, i + 2 * step) <= tol:
                    step *= 2
                lo, hi = i + step, min(stop, i + 2 * step)
                while hi - lo > 1:
                    mid = (lo + hi) // 2
                    lo, hi = (mid, hi) if _sag(P, i, mid) <= tol else (lo, mid)
                j = lo
            out.append(j)
            i = j
    return t[np.unique(out)]


def _grid(skin, a, b, tol, te_open):
    u0, u1 = skin.u_range
    tu = np.linspace(u0, u1, SAMPLES)
    tv = np.linspace(a, b, SAMPLES)
    kv = [k for k, c in zip(*np.unique(skin.tv, return_counts=True)) if a < k < b and c >= skin.dv]
    tv = np.unique(np.concatenate([tv, kv]))
    lines_v = np.unique(np.concatenate([np.linspace(a, b, 9), kv]))
    us = _nodes(tu, skin.evaluate(tu, lines_v).transpose(1, 0, 2), tol)
    vs = _nodes(tv, skin.evaluate(np.linspace(u0, u1, 41), tv), tol, must=kv)
    return us, vs


def _triangles(nu, nv, wrap: bool):
    """Two triangles per grid cell of an nu x nv node grid (index i * nv + j); ``wrap``: the
    last u column joins the first (closed section)."""
    cols = nu if wrap else nu - 1
    i = np.arange(cols)[:, None]
    j = np.arange(nv - 1)[None, :]
    i2 = (i + 1) % nu
    p00, p10, p01, p11 = i * nv + j, i2 * nv + j, i * nv + j + 1, i2 * nv + j + 1
    t = np.stack([np.stack([p00, p10, p11], -1), np.stack([p00, p11, p01], -1)], 2)
    return t.reshape(-1, 3)


def piece_mesh(skin, a: float, b: float, tol: float, te_open: bool, span_axis, what: str):
    """(vertices, faces) of the closed part between span parameters a < b, outward oriented."""
    import manifold3d as m3

    span_axis = np.asarray(span_axis, float)
    for attempt in range(4):
        us, vs = _grid(skin, a, b, 0.5 * tol / 2**attempt, te_open)
        P = skin.evaluate(us, vs)  # nu x nv x 3
        if not te_open:
            P = P[:-1]  # the last section point is the first: one column
        nu, nv = P.shape[:2]
        V = P.reshape(-1, 3)
        F = _triangles(nu, nv, wrap=True)  # an open edge is closed by the flat strip's two triangles per cell
        err = _deviation(skin, us if te_open else us[:-1], vs, V, nu, nv, te_open)
        if err <= tol:
            break
    else:
        raise GeometryError(f"{what}: the skin mesh stays {err:.3f} mm from the surface after refining "
                            f"(tolerance {tol:g} mm); nothing was written")
    # caps: the ring at v = a and at v = b, triangulated in their plane
    e1 = V[0] - V[(nu // 2) * nv]
    e1 = e1 - (e1 @ span_axis) * span_axis
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(span_axis, e1)
    caps = []
    for j, outward in ((0, -span_axis), (nv - 1, span_axis)):
        ring = np.arange(nu) * nv + j
        q = np.column_stack([V[ring] @ e1, V[ring] @ e2])
        area2 = np.dot(q[:, 0], np.roll(q[:, 1], -1)) - np.dot(q[:, 1], np.roll(q[:, 0], -1))
        order = ring if area2 > 0 else ring[::-1]
        qq = q if area2 > 0 else q[::-1]
        tri = order[np.asarray(m3.triangulate([np.ascontiguousarray(qq)]), dtype=np.int64)]
        n = np.cross(V[tri[0, 1]] - V[tri[0, 0]], V[tri[0, 2]] - V[tri[0, 0]])
        caps.append(tri if n @ outward > 0 else tri[:, ::-1])
    from ..cad.mesh import closed

    for skin_f in (F, F[:, ::-1]):
        allf = np.concatenate([skin_f] + caps)
        if closed(allf):
            return V, allf
    raise GeometryError(f"{what}: the skin mesh did not close; nothing was written")


def _deviation(skin, us, vs, V, nu, nv, te_open) -> float:
    """Largest distance from the skin to the mesh, measured at nine points inside each cell
    (quarter, half and three-quarter parameters) against the cell's two triangles."""
    G = V.reshape(nu, nv, 3)
    A, B, C, D = G[:-1, :-1], G[1:, :-1], G[1:, 1:], G[:-1, 1:]
    return max(_cells(skin, us, vs, fu, fv, A, B, C, D) for fu in (0.25, 0.5, 0.75) for fv in (0.25, 0.5, 0.75))


def _cells(skin, us, vs, fu, fv, A, B, C, D) -> float:
    u = us[:-1] + fu * np.diff(us)
    v = vs[:-1] + fv * np.diff(vs)
    S = skin.evaluate(u, v)  # cell (i, j) -> S[i, j]: u of column i, v of row j
    d = np.minimum(_point_triangle(S, A, B, C), _point_triangle(S, A, C, D))
    return float(d.max())


def _point_triangle(p, a, b, c):
    """Distance from points p to triangles (a, b, c), elementwise (all ... x 3)."""
    ab, ac, ap = b - a, c - a, p - a
    n = np.cross(ab, ac)
    nn = np.maximum((n * n).sum(-1), 1e-300)
    # barycentric coordinates of the projection
    w_b = (np.cross(ap, ac) * n).sum(-1) / nn
    w_c = (np.cross(ab, ap) * n).sum(-1) / nn
    inside = (w_b >= 0) & (w_c >= 0) & (w_b + w_c <= 1)
    d_plane = np.abs((ap * n).sum(-1)) / np.sqrt(nn)

    def seg(x, y):
        d = y - x
        t = np.clip(((p - x) * d).sum(-1) / np.maximum((d * d).sum(-1), 1e-300), 0, 1)
        return np.linalg.norm(p - x - t[..., None] * d, axis=-1)

    d_edge = np.minimum(np.minimum(seg(a, b), seg(b, c)), seg(c, a))
    return np.where(inside, d_plane, d_edge)
