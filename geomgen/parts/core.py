"""The core (plug) of a laminated part: each loft section offset inward by the laminate, re-lofted
through the same skin interpolation (numpy only).

A section of the skin at span y is offset within its plane. The laminate is measured normal
to the 3D surface, so where the skin leans spanwise (taper, dihedral) the in-plane offset is
t / sqrt(1 - n_s^2), n_s the span component of the skin's unit normal (from the skin's own
derivatives): the core then lies t from the skin in 3D, not only within the section.

Where the section is thinner than two laminates, or its nose is sharper than the laminate,
offsets cross over; an offset point is kept only if it lies at least t inside the tangent
plane of every outline point within a few laminates of it (exact for a locally convex skin),
and the kept points are joined by straight lines across the gaps (conservative: more
laminate there, never less). The core ends toward the
trailing edge where its own thickness falls to ``core_min_thickness`` (a flat edge there,
never an inverted one), and at most a laminate ahead of the part's trailing edge. The kept
upper and lower curves are resampled at cosine-spaced chord positions so every core section
has the same loop parameter as the part's loft, and corresponds point for point.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.spatial import cKDTree

from ..errors import GeometryError
from ..geometry.skin import Skin
from ..sections.base import Section
from .gridskin import clip_segments, skin_through

DENSE = 400  # points per side of the outline sampled from the skin


@dataclass
class CorePlan:
    skin: Skin
    span: tuple[float, float]
    stations: list[dict]  # per core section: chord extent, edge, least 3D laminate at its points


def _unit_normals(skin: Skin, u, v: float) -> np.ndarray:
    su, sv = skin.derivatives(u, [v])
    n = np.cross(su[:, 0], sv[:, 0])
    return n / np.linalg.norm(n, axis=1, keepdims=True)


def _normals(skin: Skin, u, y: float, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Unit normals at (u, y) and |n . e|; at a spanwise crease the larger of the two one-sided
    values of |n . e| (the laminate is kept at least t on both sides)."""
    lo, hi = skin.v_range
    y = float(np.clip(y, lo, hi))
    n = _unit_normals(skin, u, y)
    ne = np.abs(n @ e)
    if np.count_nonzero(np.abs(skin.tv - y) < 1e-9) >= skin.dv:
        for v in (y - 1e-6, y + 1e-6):
            if lo <= v <= hi:
                ne = np.maximum(ne, np.abs(_unit_normals(skin, u, v) @ e))
    return n, ne


def core_section(skin: Skin, e: np.ndarray, y: float, t: float, t_min: float, n_out: int = 80):
    """(2 n_out + 1, 3) core loop at span ``y`` (upper TE -> LE -> lower TE), and facts about it;
    None if no core of ``t_min`` fits in this section."""
    N = DENSE
    u = np.linspace(0.0, 1.0, 2 * N + 1)
    P = skin.evaluate(u, [y])[:, 0]
    n, ne = _normals(skin, u, y, e)
    n *= np.sign(((P.mean(axis=0) - P) * n).sum())  # inward
    w = n - (n @ e)[:, None] * e  # in-plane part of the unit normal, |w| = sqrt(1 - ne^2)
    wn = np.maximum(np.linalg.norm(w, axis=1), 1e-3)
    d = t / wn
    Q = P + (d / wn)[:, None] * w
    le = P[N]
    te = 0.5 * (P[0] + P[-1])
    c = te - le
    c -= (c @ e) * e
    chord = float(np.linalg.norm(c))
    c /= chord
    nd = np.cross(e, c)
    if ((P[:N] - le) @ nd).mean() < 0:
        nd = -nd
    def to2(X):
        return np.column_stack([(X - le) @ c, (X - le) @ nd])
    P2, Q2 = to2(P), to2(Q)
    W2 = np.column_stack([w @ c, w @ nd])
    # An offset point is kept if it lies t (3D) inside the tangent plane of every outline point
    # near it: offsets that crossed over (thin trailing edge, a nose sharper than the laminate,
    # a swept nose) come closer than t to some neighbour's tangent plane.
    near = cKDTree(P2).query_ball_point(Q2, 2.5 * d)
    ok = np.array([((Q2[j] - P2[nb]) * W2[nb]).sum(axis=1).min() >= 0.99 * t
                   for j, nb in enumerate(near)])
    idx = np.nonzero(ok)[0]
    if len(idx) < 8:
        return None
    i_le = int(idx[np.argmin(Q2[idx, 0])])
    chains = []
    for part in (idx[idx <= i_le][::-1], idx[idx >= i_le]):
        pts = Q2[part]
        keep = np.concatenate([[True], pts[1:, 0] > np.maximum.accumulate(pts[:, 0])[:-1]])
        chains.append(pts[keep])
    up, lo = chains
    if len(up) < 4 or len(lo) < 4:
        return None
    x_le = float(up[0, 0])
    x_hi = min(up[-1, 0], lo[-1, 0])
    g = np.linspace(x_le, x_hi, 3000)
    gap = np.interp(g, up[:, 0], up[:, 1]) - np.interp(g, lo[:, 0], lo[:, 1])
    if gap.max() < t_min:
        return None
    k0 = int(np.argmax(gap))
    below = np.nonzero(gap[k0:] < t_min)[0]
    if len(below):
        k = k0 + int(below[0])
        x_end = float(np.interp(t_min, [gap[k], gap[k - 1]], [g[k], g[k - 1]]))
    else:
        x_end = float(x_hi)
    x_end = min(x_end, chord - t)
    phi = np.linspace(0.0, np.pi, n_out + 1)
    xs = x_le + (x_end - x_le) * 0.5 * (1.0 - np.cos(phi))
    zu = np.interp(xs, up[:, 0], up[:, 1])
    zl = np.interp(xs, lo[:, 0], lo[:, 1])
    loop2 = np.concatenate([np.column_stack([xs[::-1], zu[::-1]]), np.column_stack([xs[1:], zl[1:]])])
    loop3 = le + loop2[:, :1] * c + loop2[:, 1:] * nd
    u0 = u[cKDTree(P).query(loop3)[1]]  # skin parameter of the nearest outline point (a start for projection)
    info = {"y": float(y), "chord": chord, "core_from": x_le / chord, "core_to": x_end / chord,
            "edge_mm": float(zu[-1] - zl[-1]), "max_core_mm": float(gap.max())}
    return loop3, info, u0


def closest_on_skin(skin: Skin, q: np.ndarray, uv: np.ndarray, iters: int = 15):
    """Nearest skin points to the points q (k, 3) from starting parameters uv (k, 2), by
    Gauss-Newton on the squared distance; returns (points, parameters)."""
    from scipy.interpolate import NdBSpline

    spl = NdBSpline((skin.tu, skin.tv), skin.poles, (skin.du, skin.dv))
    uv = np.array(uv, float)
    lo = np.array([skin.tu[0], skin.tv[0]])
    hi = np.array([skin.tu[-1], skin.tv[-1]])
    for _ in range(iters):
        S, Su, Sv = spl(uv), spl(uv, nu=(1, 0)), spl(uv, nu=(0, 1))
        r = S - q
        a11, a12, a22 = (Su * Su).sum(1), (Su * Sv).sum(1), (Sv * Sv).sum(1)
        g1, g2 = (Su * r).sum(1), (Sv * r).sum(1)
        det = np.maximum(a11 * a22 - a12**2, 1e-30)
        step = np.column_stack([-(a22 * g1 - a12 * g2) / det, -(a11 * g2 - a12 * g1) / det])
        uv = np.clip(uv + step, lo, hi)
    return spl(uv), uv


def plan_core(model, skin: Skin, t: float, t_min: float, n_out: int = 80) -> CorePlan:
    """The core skin of ``model`` (whose outer skin is ``skin``) for laminate ``t`` mm; the core
    stops a laminate short of each end cap and where no core of ``t_min`` fits."""
    e = np.asarray(model.span_axis, float)
    y_lo, y_hi = model.y_range
    lo, hi = y_lo + t, y_hi - t
    def exists(y):
        return core_section(skin, e, y, t, t_min, n_out) is not None
    for end in ("lo", "hi"):
        y = lo if end == "lo" else hi
        if exists(y):
            continue
        inner = 0.0 if model.mirror else 0.5 * (lo + hi)
        if not exists(inner):
            raise GeometryError(f'surface "{model.name}" laminate: no core fits: the part is thinner than 2 x '
                                f"{t:g} mm laminate + {t_min:g} mm core near span {inner:.1f} mm")
        a, b = inner, y
        while abs(b - a) > 0.2:
            m = 0.5 * (a + b)
            a, b = (m, b) if exists(m) else (a, m)
        if end == "lo":
            lo = a
        else:
            hi = a
    segs = clip_segments(model.loft_y(), lo, hi)
    loops, uvs, stations = [], [], []
    for seg in segs:
        for y in seg:
            res = core_section(skin, e, float(y), t, t_min, n_out)
            if res is None:
                raise GeometryError(f'surface "{model.name}" laminate: no core of {t_min:g} mm fits inside '
                                    f"{t:g} mm laminate at span {y:.1f} mm")
            loops.append(res[0])
            uvs.append(np.column_stack([res[2], np.full(len(res[2]), float(y))]))
            stations.append(res[1])
    shape = np.shape(loops)
    q = np.concatenate(loops)
    S, _ = closest_on_skin(skin, q, np.concatenate(uvs))
    dist = np.linalg.norm(q - S, axis=1).reshape(shape[:2])  # 3D laminate at every core point
    q = q.reshape(shape)
    grids, k = [], 0
    for seg in segs:
        grids.append((seg, q[k:k + len(seg)]))
        k += len(seg)
    for st, dd in zip(stations, dist):
        st["laminate_min_mm"] = float(dd.min())
    core = skin_through(Section.loop_parameter(n_out), grids)
    return CorePlan(core, (float(lo), float(hi)), stations)
