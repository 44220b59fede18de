"""Triangle meshes of solids by the kernel's mesher, joined into one watertight mesh."""

from __future__ import annotations

import numpy as np
from OCP.BRep import BRep_Tool
from OCP.BRepMesh import BRepMesh_IncrementalMesh
from OCP.TopAbs import TopAbs_EDGE, TopAbs_FACE, TopAbs_REVERSED
from OCP.TopExp import TopExp, TopExp_Explorer
from OCP.TopLoc import TopLoc_Location
from OCP.TopoDS import TopoDS
from OCP.TopTools import TopTools_IndexedMapOfShape

from .. import defaults
from ..errors import ExportError


def mesh(shape, tol: float, what: str, angle: float = 0.5) -> tuple[np.ndarray, np.ndarray]:
    """Watertight triangle mesh of a solid by the kernel's mesher (chordal deviation ``tol`` mm).

    Faces are joined topologically: the nodes of each edge's discretisation get one index,
    shared by every face that edge bounds (found through the edge's polygon on each face's
    triangulation), and only the end nodes of edges are matched by position (at the solid's
    vertices). Raise ExportError if the result is not closed."""
    from scipy.spatial import cKDTree

    BRepMesh_IncrementalMesh(shape, float(tol), False, float(angle), True)
    emap = TopTools_IndexedMapOfShape()
    TopExp.MapShapes_s(shape, TopAbs_EDGE, emap)
    coords: list[np.ndarray] = []
    n_glob = 0
    edge_ids: dict[int, tuple[np.ndarray, np.ndarray]] = {}  # edge index -> (params, global ids)
    ends: list[int] = []
    faces = []
    exp = TopExp_Explorer(shape, TopAbs_FACE)
    while exp.More():
        face = TopoDS.Face_s(exp.Current())
        loc = TopLoc_Location()
        tri = BRep_Tool.Triangulation_s(face, loc)
        if tri is None:
            raise ExportError(f"{what}: the kernel could not mesh a face")
        trsf = loc.Transformation()
        nn = tri.NbNodes()
        V = np.array([(lambda p: (p.X(), p.Y(), p.Z()))(tri.Node(i).Transformed(trsf)) for i in range(1, nn + 1)])
        gid = np.full(nn, -1)
        ee = TopExp_Explorer(face, TopAbs_EDGE)
        while ee.More():
            edge = TopoDS.Edge_s(ee.Current())
            ee.Next()
            poly = BRep_Tool.PolygonOnTriangulation_s(edge, tri, loc)
            if poly is None:
                continue
            idx = np.array([poly.Node(i) for i in range(1, poly.NbNodes() + 1)]) - 1
            par = np.array([poly.Parameter(i) for i in range(1, poly.NbNodes() + 1)]) if poly.HasParameters() \
                else np.arange(len(idx), dtype=float)
            order = np.argsort(par)
            idx, par = idx[order], par[order]
            key = emap.FindIndex(edge)
            if key in edge_ids:
                p0, g0 = edge_ids[key]
                if len(p0) == len(par) and np.allclose(p0, par, atol=1e-9, rtol=0):
                    gid[idx] = g0
                    continue
                raise ExportError(f"{what}: the kernel meshed a shared edge differently on its two faces")
            new = np.arange(n_glob, n_glob + len(idx))
            coords.append(V[idx])
            n_glob += len(idx)
            gid[idx] = new
            edge_ids[key] = (par, new)
            ends += [int(new[0]), int(new[-1])]
        rest = np.nonzero(gid < 0)[0]
        gid[rest] = np.arange(n_glob, n_glob + len(rest))
        coords.append(V[rest])
        n_glob += len(rest)
        f = np.array([tri.Triangle(i).Get() for i in range(1, tri.NbTriangles() + 1)], int) - 1
        if face.Orientation() == TopAbs_REVERSED:
            f = f[:, ::-1]
        faces.append(gid[f])
        exp.Next()
    Vg, F = np.concatenate(coords), np.concatenate(faces)
    # edge ends meet at the solid's vertices: match those (and only those) by position
    lab = np.arange(len(Vg))
    at = np.unique(ends)
    for i, j in cKDTree(Vg[at]).query_pairs(defaults.MESH_MERGE_TOL_MM):
        a, b = lab[at[i]], lab[at[j]]
        lab[lab == max(a, b)] = min(a, b)
    Vg, F = _collapse_short_edges(Vg, lab[F], min(defaults.MESH_SHORT_EDGE_MM, 0.05 * tol))
    if not closed(F):
        raise ExportError(f"{what}: the kernel's mesh is not watertight; nothing was written")
    if len(np.unique(Vg.astype(np.float32), axis=0)) != len(Vg):
        raise ExportError(f"{what}: two mesh vertices coincide in single precision (STL); nothing was written")
    return Vg, F


def _collapse_short_edges(V, F, eps: float):
    """Collapse edges shorter than ``eps`` mm, one at a time, where that keeps the mesh a closed
    manifold (the link condition: the ends' common neighbours are just the two opposite corners).

    The kernel's mesher puts nodes micrometres apart where a surface's parameterisation slows
    down (the skin at a trailing edge); in a single-precision STL they would coincide."""
    F = np.array(F)
    e = np.concatenate([F[:, [0, 1]], F[:, [1, 2]], F[:, [2, 0]]])
    e = np.unique(np.sort(e, axis=1), axis=0)
    L = np.linalg.norm(V[e[:, 0]] - V[e[:, 1]], axis=1)
    short = e[np.argsort(L)][np.sort(L) < eps]
    vf: dict[int, set] = {}
    for i, f in enumerate(F):
        for v in f:
            vf.setdefault(int(v), set()).add(i)
    alive = np.ones(len(F), bool)
    into: dict[int, int] = {}  # collapsed vertex -> the vertex it went into

    def rep(v):
        while v in into:
            v = into[v]
        return v

    for a, b in short.tolist():
        a, b = rep(a), rep(b)
        if a == b or np.linalg.norm(V[a] - V[b]) >= eps:
            continue
        shared = vf[a] & vf[b]
        if len(shared) != 2:
            continue
        def ring(v):
            return {int(x) for i in vf[v] for x in F[i]} - {v}
        opposite = {int(x) for i in shared for x in F[i]} - {a, b}
        if ring(a) & ring(b) != opposite:
            continue
        for i in shared:
            alive[i] = False
            for v in F[i]:
                vf[int(v)].discard(i)
        for i in vf[b]:
            F[i][F[i] == b] = a
            vf[a].add(i)
        vf[b] = set()
        into[b] = a
    F = F[alive]
    used, F = np.unique(F, return_inverse=True)
    return V[used], F.reshape(-1, 3)


def closed(F: np.ndarray) -> bool:
    """True if every edge is used exactly twice, once in each direction."""
    e = np.concatenate([F[:, [0, 1]], F[:, [1, 2]], F[:, [2, 0]]]).astype(np.int64)
    n = int(F.max()) + 1
    key, rkey = e[:, 0] * n + e[:, 1], e[:, 1] * n + e[:, 0]
    return len(np.unique(key)) == len(key) and bool(np.isin(rkey, key).all())
