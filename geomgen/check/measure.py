"""Measured figures of written files: STEP (kernel mass properties + sliced B-spline skin)
and STL (trimesh mass properties + sliced mesh). Never reads the spec; ``stations`` are
only the span positions (from the root) where the caller wants chord and thickness."""

from __future__ import annotations

import numpy as np

from ..geometry.slices import (Outline, chord_and_thickness, gauss_nodes, planform_figures, root_of, skin_grid,
                     slice_grid, span_axis_of, span_axis_of_grid)


def _direction(root: float, tip: float) -> float:
    return 1.0 if tip >= root else -1.0


def measure_step_solid(ms, stations=()) -> dict:
    """Figures of one :class:`~geomgen.cad.measure.MeasuredSolid`.

    Returns ``{"figures": {...}, "stations": [...], "sampling_mm": bound}``.
    """
    grid, dev = skin_grid(ms.skin)
    axis = span_axis_of_grid(grid)
    lo, hi = float(ms.bbox_min[axis]), float(ms.bbox_max[axis])
    eps = 1e-7 * (hi - lo)

    def extents(s):
        sl = slice_grid(grid, axis, np.clip(s, lo + eps, hi - eps))
        return sl[:, :, 0].min(axis=1), np.ptp(sl[:, :, 0], axis=1), sl

    s, w = gauss_nodes(lo, hi)
    x_le, c, _ = extents(s)
    root, tip, _ = root_of(lo, hi, lambda q: extents(q)[1])
    (xr, xt), (cr, ct), ends = extents(np.array([root, tip]))
    cr_true = chord_and_thickness(ends[0], axis)["chord_mm"]
    ct_true = chord_and_thickness(ends[1], axis)["chord_mm"]
    fig = planform_figures(Outline(s, w, x_le, c), lo, hi, cr_true, ct_true, root, tip, xr + cr / 4, xt + ct / 4)
    fig.update(volume_cm3=ms.volume_mm3 / 1000, wetted_area_cm2=ms.area_mm2 / 100,
               centroid_mm=tuple(float(v) for v in ms.centroid))
    d = _direction(root, tip)
    st = []
    for y in stations:
        _, _, sl = extents(np.array([root + d * float(y)]))
        st.append({"y_mm": float(y), **chord_and_thickness(sl[0], axis), "points": sl[0]})
    return {"figures": fig, "stations": st, "sampling_mm": dev, "axis": axis}


def _mesh_slices(vertices: np.ndarray, edges: np.ndarray, axis: int, s: np.ndarray) -> list[np.ndarray]:
    """Points where mesh edges cross each plane span = s_k (unordered), list of (n_k, 3)."""
    g = vertices[:, axis]
    ga, gb = g[edges[:, 0]], g[edges[:, 1]]
    out = []
    for sk in s:
        m = (((ga <= sk) & (gb >= sk)) | ((gb <= sk) & (ga >= sk))) & (ga != gb)  # ties count
        t = ((sk - ga[m]) / (gb[m] - ga[m]))[:, None]
        out.append((1 - t) * vertices[edges[m, 0]] + t * vertices[edges[m, 1]])
    return out


def _diameter(p: np.ndarray) -> float:
    """Largest distance between two points of a planar point set (its convex hull's diameter)."""
    from scipy.spatial import ConvexHull

    keep = np.ptp(p, axis=0) > 1e-9
    q = p[:, keep]
    try:
        q = q[ConvexHull(q).vertices]
    except Exception:  # degenerate hull: use all points
        pass
    d = np.linalg.norm(q[:, None, :] - q[None, :, :], axis=-1)
    return float(d.max())


def measure_stl(path) -> dict:
    """Figures of an STL file: trimesh mass properties, outline from mesh slices."""
    import trimesh

    mesh = trimesh.load(path, force="mesh", process=True)
    if mesh.is_empty:
        raise ValueError(f"{path}: no triangles")
    lo_b, hi_b = mesh.bounds
    axis = span_axis_of(lo_b, hi_b)
    lo, hi = float(lo_b[axis]), float(hi_b[axis])
    edges = mesh.edges_unique
    eps = 1e-6 * (hi - lo)

    def extents(s):
        sl = _mesh_slices(mesh.vertices, edges, axis, np.clip(s, lo + eps, hi - eps))
        x_le = np.array([p[:, 0].min() for p in sl])
        return x_le, np.array([np.ptp(p[:, 0]) for p in sl]), sl

    s, w = gauss_nodes(lo, hi)
    x_le, c, _ = extents(s)
    root, tip, _ = root_of(lo, hi, lambda q: extents(q)[1])
    (xr, xt), (cr, ct), ends = extents(np.array([root, tip]))
    fig = planform_figures(Outline(s, w, x_le, c), lo, hi, _diameter(ends[0]), _diameter(ends[1]), root, tip,
                           xr + cr / 4, xt + ct / 4)
    fig.update(volume_cm3=float(mesh.volume) / 1000, wetted_area_cm2=float(mesh.area) / 100,
               centroid_mm=tuple(float(v) for v in mesh.center_mass))
    return {"figures": fig, "watertight": bool(mesh.is_watertight), "triangles": int(len(mesh.faces)),
            "area_mm2": float(mesh.area), "axis": axis}
