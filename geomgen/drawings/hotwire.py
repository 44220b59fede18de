"""Hot-wire profiles: the two end outlines of each foam-core panel, in step point for point.

A panel runs between two neighbouring cut positions (default: the stations). Both ends
are sampled at the same chord parameter (uniform in the section's angle parameter, the
one the loft uses), so row i of one end and row i of the other lie on the same ruled
line of the cut and a two-ended wire stays in step.

Frame: the surface's own frame, x aft from the root reference point along the chord
direction at zero twist, z toward the section's upper side; each end carries its twist
(about its reference point) and its sweep and dihedral offsets, not the incidence (a
setting of the whole part). The ends are ``y_b - y_a`` apart along the span.

Kerf: the wire removes material, so its path is the outline offset outward by half the
kerf. The offset is exact for the smooth outline (each point moves along the section's
true normal, from its analytic curves) and rounded around the trailing-edge corners with
a fixed number of points; a path that would fold over itself is refused.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import CAUTION, __version__
from ..errors import ExportError, GeometryError
from ..geometry.polygon import polygon_crosses_itself
from ..geometry.surface import rot_y
from ..sections.base import Section
from .common import distance_to_dense_polyline, distance_to_polyline, fmt_y, save_dxf, shop_of

#: Finite-difference steps for the analytic normals (angle parameter, chord parameter).
H_PHI, H_S = 1e-6, 1e-5
#: Turning angle above which a vertex of a loop counts as a corner (normals estimated), deg.
CORNER_DEG = 30.0


# -- offsetting a closed loop ----------------------------------------------------------
def signed_area(p: np.ndarray) -> float:
    """Shoelace area of a closed loop (positive: counter-clockwise)."""
    x, y = p[:, 0], p[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def _unit(v: np.ndarray) -> np.ndarray:
    return v / np.linalg.norm(v, axis=-1, keepdims=True)


def _outward(tangent: np.ndarray, ccw: bool) -> np.ndarray:
    n = np.column_stack([tangent[:, 1], -tangent[:, 0]])
    return _unit(n if ccw else -n)


def find_corners(p: np.ndarray, corner_deg: float = CORNER_DEG) -> list[int]:
    """Vertices of the closed loop ``p`` where the direction turns more than ``corner_deg``."""
    e = np.roll(p, -1, axis=0) - p
    e_in = np.roll(e, 1, axis=0)
    turn = np.arctan2(e_in[:, 0] * e[:, 1] - e_in[:, 1] * e[:, 0], np.einsum("ij,ij->i", e_in, e))
    return [int(i) for i in np.nonzero(np.abs(turn) > math.radians(corner_deg))[0]]


def estimate_normals(p: np.ndarray, corners: list[int]) -> tuple[np.ndarray, dict]:
    """Outward unit normals of a closed loop through the points ``p``, second-order accurate in
    the point spacing (``np.gradient`` over chord length), estimated per smooth run between
    corners; and for each corner its (incoming, outgoing) normals."""
    n = len(p)
    ccw = signed_area(p) > 0
    normals = np.zeros_like(p)
    cn: dict[int, list] = {i: [None, None] for i in corners}
    if not corners:
        k = 3
        q = np.concatenate([p[-k:], p, p[:k]])
        u = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(q, axis=0).T))])
        t = np.column_stack([np.gradient(q[:, 0], u), np.gradient(q[:, 1], u)])[k:-k]
        return _outward(t, ccw), {}
    cs = sorted(corners)
    for a, b in zip(cs, cs[1:] + [cs[0] + n]):
        idx = np.arange(a, b + 1) % n
        q = p[idx]
        if len(q) == 2:
            t = np.repeat((q[1] - q[0])[None], 2, axis=0)
        else:
            u = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(q, axis=0).T))])
            t = np.column_stack([np.gradient(q[:, 0], u, edge_order=2), np.gradient(q[:, 1], u, edge_order=2)])
        nn = _outward(t, ccw)
        normals[idx[1:-1]] = nn[1:-1]
        cn[a][1] = nn[0]
        cn[b % n][0] = nn[-1]
    return normals, {i: tuple(v) for i, v in cn.items()}


def offset_loop(p: np.ndarray, r: float, *, normals: np.ndarray | None = None,
                corner_normals: dict | None = None, arc_points: int = 7,
                corner_deg: float = CORNER_DEG) -> np.ndarray:
    """Closed loop ``p`` (n, 2) offset outward by ``r`` (>= 0).

    Each smooth vertex moves by ``r`` along its outward normal (given, e.g. from the
    analytic curve, or estimated); each corner (given through ``corner_normals`` as
    ``{index: (incoming normal, outgoing normal)}``, or found where the loop turns more
    than ``corner_deg``) becomes ``arc_points`` points on a circle of radius ``r`` about it
    (a concave corner: the mitre point, repeated, so the count never changes). The result
    has ``n + (arc_points - 1) * corners`` points whatever ``r`` is, as long as r > 0; with
    ``r == 0`` the loop comes back unchanged. Raises GeometryError when the offset path
    folds over itself (``r`` too large for a concave stretch) instead of returning it.
    """
    p = np.asarray(p, float)
    if r < 0:
        raise ValueError("offset must be >= 0")
    if r == 0:
        return p.copy()
    if normals is None or corner_normals is None:
        est, cn = estimate_normals(p, find_corners(p, corner_deg) if corner_normals is None else list(corner_normals))
        normals = est if normals is None else np.asarray(normals, float)
        corner_normals = cn if corner_normals is None else corner_normals
    ccw = signed_area(p) > 0
    out = []
    for i, v in enumerate(p):
        if i not in corner_normals:
            out.append(v + r * normals[i])
            continue
        n_in, n_out = (np.asarray(x, float) for x in corner_normals[i])
        a0 = math.atan2(n_in[1], n_in[0])
        sweep = (math.atan2(n_out[1], n_out[0]) - a0 + math.pi) % (2 * math.pi) - math.pi
        if (sweep > 0) == ccw:  # convex: round the corner
            ang = a0 + sweep * np.linspace(0.0, 1.0, arc_points)
            out.extend(v + r * np.column_stack([np.cos(ang), np.sin(ang)]))
        else:  # concave: where the two offset edges meet
            m = v + r * (n_in + n_out) / (1.0 + float(n_in @ n_out))
            out.extend([m] * arc_points)
    q = np.array(out)
    if polygon_crosses_itself(q) or distance_to_polyline(q, p).min() < 0.5 * r:
        raise GeometryError(f"an outward offset of {r:g} mm folds over itself (a concave stretch or a "
                            "gap narrower than the offset); use a smaller kerf")
    return q


# -- section outlines with their true normals --------------------------------------------
def section_loop_normals(section: Section, n: int) -> tuple[np.ndarray, np.ndarray]:
    """``section.loop(n)`` (unit chord) and the outward unit normals of the true curves there.

    Tangents by central differences in the angle parameter (in which the section is smooth,
    the nose included); at the trailing-edge ends, where that parameter stalls, by a
    one-sided second-order difference in the chord parameter.
    """
    p = section.loop(n)

    def at(side, phi):  # points of one side at angle parameter phi, s = (1 - cos phi) / 2
        return np.column_stack(side(0.5 * (1.0 - np.cos(phi))))

    def at_s(side, s):
        return np.column_stack(side(np.asarray(s, float)))

    inner = np.linspace(0.0, math.pi, n + 1)[1:-1]
    # tangents in loop order: the upper side runs toward the nose (phi decreasing)
    t_up = at(section.upper, inner - H_PHI) - at(section.upper, inner + H_PHI)
    t_lo = at(section.lower, inner + H_PHI) - at(section.lower, inner - H_PHI)
    t_le = at(section.lower, np.array([H_PHI])) - at(section.upper, np.array([H_PHI]))
    ends = [1.0, 1.0 - H_S, 1.0 - 2 * H_S]
    u, lo = at_s(section.upper, ends), at_s(section.lower, ends)
    t_te_up = -(3 * u[0] - 4 * u[1] + u[2])
    t_te_lo = 3 * lo[0] - 4 * lo[1] + lo[2]
    tang = np.concatenate([[t_te_up], t_up[::-1], t_le, t_lo, [t_te_lo]])
    return p, _outward(tang, signed_area(p) > 0)


def section_wire_path(section: Section, chord: float, n: int, r: float, arc_points: int,
                      sharp: bool) -> np.ndarray:
    """Wire path around one end, chord frame, mm: the outline from the upper trailing edge over
    the nose to the lower trailing edge, offset by ``r``; the trailing edge closes it (one
    corner when ``sharp``, two corners and the flat edge otherwise)."""
    p, nrm = section_loop_normals(section, n)
    p = p * chord
    ccw = signed_area(p) > 0
    if sharp:  # the two trailing-edge points coincide: one corner between the sides
        n_lower_te = nrm[-1]
        p, nrm = p[:-1], nrm[:-1]
        corners = {0: (n_lower_te, nrm[0])}
    else:
        f = p[0] - p[-1]  # the flat edge, lower corner -> upper corner
        nf = _outward(f[None], ccw)[0]
        corners = {0: (nf, nrm[0]), len(p) - 1: (nrm[-1], nf)}
    return offset_loop(p, r, normals=nrm, corner_normals=corners, arc_points=arc_points)


# -- panels ------------------------------------------------------------------------------
def to_surface_frame(model, y: float, pts: np.ndarray) -> np.ndarray:
    """Chord-frame points (mm, LE at 0) of the section at ``y`` -> surface frame (x, z), mm."""
    pf = model.planform
    xr, zr, tw = (float(pf(k, y)) for k in ("x", "z", "twist"))
    c = float(model.chord(y))
    d = np.column_stack([pts[:, 0] - model.spec.reference * c, np.zeros(len(pts)), pts[:, 1]])
    loc = d @ rot_y(tw).T
    return np.column_stack([loc[:, 0] + xr, loc[:, 2] + zr])


@dataclass
class Panel:
    """One foam-core panel of a surface: the wire paths of both ends (surface frame, mm)."""

    surface: str
    y_a: float
    y_b: float
    chord_a: float
    chord_b: float
    twist_a: float
    twist_b: float
    a: np.ndarray
    b: np.ndarray
    kerf: float
    mid_deviation: float  # largest distance of the ruled cut from the intended section mid-panel, mm

    @property
    def tag(self) -> str:
        return f"{fmt_y(self.y_a)}-{fmt_y(self.y_b)}"


def ruled_mid_deviation(model, ya: float, yb: float, m: int = 400) -> float:
    """Largest distance between the ruled cut (ends joined at equal chord parameter) and the
    intended section halfway along the panel, mm."""
    ends = [to_surface_frame(model, y, model.section(y).loop(m) * float(model.chord(y))) for y in (ya, yb)]
    ym = 0.5 * (ya + yb)
    want = to_surface_frame(model, ym, model.section(ym).loop(4 * m) * float(model.chord(ym)))
    return float(distance_to_dense_polyline(0.5 * (ends[0] + ends[1]), want).max())


def panels_of(model) -> list[Panel]:
    """Every panel of ``model`` (empty when its shop table turns hot-wire profiles off)."""
    shop = shop_of(model)
    if not shop.hotwire:
        return []
    cuts = shop.hotwire_cuts or [float(v) for v in model.planform.y]
    r = 0.5 * shop.kerf_mm
    sharp = not model.te_open
    out = []
    for ya, yb in zip(cuts[:-1], cuts[1:]):
        ends = []
        for y in (ya, yb):
            c = float(model.chord(y))
            try:
                path = section_wire_path(model.section(y), c, shop.hotwire_points, r,
                                         shop.hotwire_corner_points, sharp)
            except GeometryError as exc:
                raise GeometryError(f'surface "{model.name}" hot-wire profile at y = {y:g} mm: {exc}; '
                                    "nothing was written") from None
            ends.append(to_surface_frame(model, y, path))
        out.append(Panel(model.name, ya, yb, float(model.chord(ya)), float(model.chord(yb)),
                         float(model.planform("twist", ya)), float(model.planform("twist", yb)),
                         ends[0], ends[1], shop.kerf_mm, ruled_mid_deviation(model, ya, yb)))
    return out


def _header(p: Panel, spec_name: str, side: str, mirrored: bool) -> list[str]:
    lines = [
        f"geomgen {__version__} hot-wire profiles: set '{spec_name}', surface '{p.surface}', "
        f"panel y = {fmt_y(p.y_a)} .. {fmt_y(p.y_b)} mm",
        f"CAUTION: {CAUTION}",
        f"end A at y = {fmt_y(p.y_a)} mm: chord {p.chord_a:.2f} mm, twist {p.twist_a:+.2f} deg; "
        f"end B at y = {fmt_y(p.y_b)} mm: chord {p.chord_b:.2f} mm, twist {p.twist_b:+.2f} deg; "
        f"the ends are {p.y_b - p.y_a:.2f} mm apart",
        "frame: x aft from the root reference point, z toward the "
        f"{side}, mm; twist, sweep and dihedral offsets applied, incidence not",
        (f"kerf {p.kerf:g} mm: both paths offset outward by {p.kerf / 2:g} mm (this is the wire path, "
         "not the part)") if p.kerf > 0 else "kerf 0: the paths are the part's outline",
        f"{len(p.a)} points per end, same chord parameter at both ends (row i of A goes with row i of B); "
        "start at the upper trailing edge, over the nose, back along the lower side; "
        "the last row repeats the first (closed)",
        f"ruled cut vs the intended surface halfway along the panel: largest deviation "
        f"{p.mid_deviation:.3f} mm",
    ]
    if mirrored:
        lines.append("mirrored part: the other side's panel is the same with the ends swapped")
    return lines


def write_panel_txt(p: Panel, path, *, spec_name: str, side: str, mirrored: bool) -> None:
    """Plain-text coordinates: '#' header, then ``i,a_x_mm,a_z_mm,b_x_mm,b_z_mm`` rows."""
    a, b = np.vstack([p.a, p.a[:1]]), np.vstack([p.b, p.b[:1]])
    try:
        with open(path, "w", encoding="utf-8", newline="\n") as f:
            for line in _header(p, spec_name, side, mirrored):
                f.write(f"# {line}\n")
            f.write("i,a_x_mm,a_z_mm,b_x_mm,b_z_mm\n")
            for i, (pa, pb) in enumerate(zip(a, b)):
                f.write(f"{i},{pa[0]:.4f},{pa[1]:.4f},{pb[0]:.4f},{pb[1]:.4f}\n")
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None


def write_panel_dxf(p: Panel, path, *, spec_name: str, side: str, mirrored: bool) -> None:
    """Both end paths as closed polylines (layers ``end-a``, ``end-b``), a mark at the root
    reference point and the header as text; units mm."""
    import ezdxf

    doc = ezdxf.new("R2010", units=4)
    doc.header["$MEASUREMENT"] = 1
    for name, color in (("end-a", 1), ("end-b", 5), ("reference-mark", 3), ("labels", 8)):
        doc.layers.add(name, color=color)
    msp = doc.modelspace()
    msp.add_lwpolyline([tuple(map(float, v)) for v in p.a], close=True, dxfattribs={"layer": "end-a"})
    msp.add_lwpolyline([tuple(map(float, v)) for v in p.b], close=True, dxfattribs={"layer": "end-b"})
    msp.add_line((-3.0, 0.0), (3.0, 0.0), dxfattribs={"layer": "reference-mark"})
    msp.add_line((0.0, -3.0), (0.0, 3.0), dxfattribs={"layer": "reference-mark"})
    top = float(max(p.a[:, 1].max(), p.b[:, 1].max())) + 6.0
    left = float(min(p.a[:, 0].min(), p.b[:, 0].min()))
    lines = [ln for ln in _header(p, spec_name, side, mirrored) if not ln.startswith("CAUTION")]
    for i, text in enumerate(reversed(lines)):
        msp.add_text(text, height=2.5, dxfattribs={"layer": "labels"}).set_placement((left, top + 4.0 * i))
    try:
        save_dxf(doc, path)
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None
