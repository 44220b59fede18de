"""Section properties of a closed cross-section: area, centroid, second moments, principal
axes, section moduli and torsion constants (numpy; the warping solution by ``sectionproperties``).

Frame: a section is taken in its own chord frame, x from the leading edge along the chord
line (toward the trailing edge), z normal to it toward the upper side (for a mast or fin:
toward the side the section's upper surface faces). The chord line is that of
:func:`geomgen.geometry.chordline.section_frame` (from the point farthest from the trailing-edge
midpoint to that midpoint), so the
intended section (from the model) and the measured one (a slice of the written STEP) are
put in the same frame by the same code.

Second moments are about axes through the centroid: ``i_chord`` about the axis parallel to
the chord line (bending by lift, the stiff direction's weak axis), ``i_normal`` about the
axis normal to it (bending in the chord plane), ``i_product`` their product moment. Polygon
formulas by Green's theorem (any strength-of-materials text; e.g. Roark's *Formulas for
Stress and Strain*, section properties table).

Torsion constants:

* ``j_solid``: Saint-Venant torsion constant of the solid section by a finite-element
  solution of the warping function (PyPI package ``sectionproperties``), on a polygon of
  :data:`J_POINTS_PER_SIDE` points per side;
* ``j_shell``: a closed shell of uniform laminate thickness t by the Bredt–Batho formula
  J = 4 A_m² t / s_m, A_m and s_m the area and length of the wall's median line (the
  outline offset inward by t/2). Where the section is thinner than two laminates (toward
  the trailing edge) the offset cuts the tail off; that solid tail adds little to J.
"""

from __future__ import annotations

import math
import weakref
from dataclasses import asdict, dataclass
from typing import Optional

import numpy as np

#: Points per side (upper, lower) of the polygon meshed for the warping solution (cosine
#: spaced in arc length). On a NACA 2412 of 200 mm chord: 30 per side J 0.52 % low, 50 per
#: side 0.2 % low, 90 per side 0.06 % low (against an extrapolation of 40-160 per side),
#: 0.15 s per section at 50 (tests/test_sectionprops.py shows the convergence on an ellipse).
J_POINTS_PER_SIDE = 50

#: Largest triangle of the warping mesh, as a fraction of the section area (a floor for
#: polygons with few points; an aerofoil's mesh is set by its points).
MESH_MIN_ELEMENTS = 50
#: Polygon points closer than this fraction of the section's size to the point before them are
#: one point for the mesher.
MESH_POINT_GAP = 1e-6


@dataclass
class SectionProps:
    """Properties of one section. mm, mm², mm³, mm⁴, degrees. ``None``: not asked or not defined."""

    chord_mm: float
    area_mm2: float
    centroid_x_mm: float  # from the leading edge along the chord
    centroid_z_mm: float  # from the chord line, toward the upper side
    i_chord_mm4: float
    i_normal_mm4: float
    i_product_mm4: float
    i_major_mm4: float
    i_minor_mm4: float
    principal_deg: float  # angle of the minor-inertia axis from the chord line, deg (leading edge up +)
    w_upper_mm3: float  # i_chord / distance of the upper extreme fibre from the centroid
    w_lower_mm3: float
    w_le_mm3: float  # i_normal / distance of the leading edge from the centroid
    w_te_mm3: float
    j_solid_mm4: Optional[float] = None
    laminate_mm: Optional[float] = None
    shell_area_mm2: Optional[float] = None
    shell_i_chord_mm4: Optional[float] = None
    j_shell_mm4: Optional[float] = None

    @property
    def w_chord_mm3(self) -> float:
        """Smaller section modulus about the chord-parallel axis (the extreme fibre)."""
        return min(self.w_upper_mm3, self.w_lower_mm3)

    def as_dict(self) -> dict:
        return asdict(self)


def polygon_moments(p2: np.ndarray) -> dict:
    """Area, centroid and centroidal second moments of a closed polygon (n, 2), any orientation.

    ``ixx`` = ∫(y - ȳ)² dA, ``iyy`` = ∫(x - x̄)² dA, ``ixy`` = ∫(x - x̄)(y - ȳ) dA.
    """
    p = np.asarray(p2, float)
    c0 = p.mean(axis=0)  # work about a nearby point: fewer cancellation digits lost
    x, y = p[:, 0] - c0[0], p[:, 1] - c0[1]
    xn, yn = np.roll(x, -1), np.roll(y, -1)
    cr = x * yn - xn * y
    a = 0.5 * cr.sum()
    if abs(a) < 1e-300:
        raise ValueError("polygon has no area")
    cx = ((x + xn) * cr).sum() / (6 * a)
    cy = ((y + yn) * cr).sum() / (6 * a)
    ixx = (cr * (y * y + y * yn + yn * yn)).sum() / 12.0
    iyy = (cr * (x * x + x * xn + xn * xn)).sum() / 12.0
    ixy = (cr * (x * yn + 2 * x * y + 2 * xn * yn + xn * y)).sum() / 24.0
    s = 1.0 if a > 0 else -1.0  # clockwise polygons give negative integrals
    a, ixx, iyy, ixy = s * a, s * ixx, s * iyy, s * ixy
    return {"area": a, "cx": cx + c0[0], "cy": cy + c0[1], "ixx": ixx - a * cy * cy, "iyy": iyy - a * cx * cx,
            "ixy": ixy - a * cx * cy}


def principal(ixx: float, iyy: float, ixy: float) -> tuple[float, float, float]:
    """(I major, I minor, angle deg of the axis of the *minor* second moment from x).

    For an aerofoil (wide along x) the minor-inertia axis lies near the chord line."""
    mean, half = 0.5 * (ixx + iyy), 0.5 * (ixx - iyy)
    r = math.hypot(half, ixy)
    # I(θ) about an axis at θ from x: mean + half cos 2θ - ixy sin 2θ; minimum at 2θ = atan2(-ixy, half) + π
    th = 0.5 * math.atan2(ixy, -half)
    th = (th + math.pi / 2) % math.pi - math.pi / 2
    return mean + r, mean - r, math.degrees(th)


def _largest(geom):
    if geom.is_empty:
        return None
    if geom.geom_type == "MultiPolygon":
        return max(geom.geoms, key=lambda g: g.area)
    return geom


def bredt_batho_j(p2: np.ndarray, t: float) -> tuple[Optional[float], Optional[float], Optional[float]]:
    """(J mm⁴, shell area mm², shell second moment about the chord-parallel centroidal axis of
    the outline mm⁴) of a closed shell of thickness ``t`` inside the outline ``p2``.

    J = 4 A_m² t / s_m (Bredt–Batho, thin-walled closed section of uniform thickness; e.g.
    Roark, torsion of thin-walled closed sections), median line = outline offset by t/2.
    ``None``s when the section is too thin to hold a shell."""
    from shapely.geometry import Polygon

    outer = Polygon(p2)
    if not outer.is_valid:
        outer = outer.buffer(0)
    median = _largest(outer.buffer(-0.5 * t))
    inner = _largest(outer.buffer(-t))
    if median is None or inner is None:
        return None, None, None
    j = 4.0 * median.area ** 2 * t / median.exterior.length
    mo = polygon_moments(np.asarray(outer.exterior.coords)[:-1])
    mi = polygon_moments(np.asarray(inner.exterior.coords)[:-1])
    # the shell's I about the outline's centroidal axis: outline minus core (parallel axis theorem)
    i_shell = mo["ixx"] - (mi["ixx"] + mi["area"] * (mi["cy"] - mo["cy"]) ** 2)
    return j, mo["area"] - mi["area"], i_shell


def warping_j(p2: np.ndarray) -> float:
    """Saint-Venant torsion constant (mm⁴) of a solid polygon by the warping function
    (finite elements, ``sectionproperties``; six-node triangles through the polygon's points)."""
    import matplotlib

    matplotlib.use("Agg")  # sectionproperties imports pyplot; never ask for a display
    from sectionproperties.analysis.section import Section
    from sectionproperties.pre.geometry import Geometry
    from shapely.geometry import Polygon

    from .polygon import without_repeats

    # no repeated points reach the mesher: a sharp trailing edge written first and last (or
    # 1e-17 mm apart) made Triangle corrupt its memory and crash the process some calls later
    # (found by the long CLI run; tests/test_sectionprops.py)
    poly = Polygon(without_repeats(p2, MESH_POINT_GAP))
    if not poly.is_valid:
        poly = _largest(poly.buffer(0))
    geom = Geometry(poly)
    # triangles follow the polygon's points, and are at most 1/MESH_MIN_ELEMENTS of the area
    geom.create_mesh(mesh_sizes=[poly.area / MESH_MIN_ELEMENTS])
    # the frame analysis solves the warping function only (no shear functions): J at a third of the time
    _, _, _, _, j, _ = Section(geom).calculate_frame_properties(solver_type="direct")
    return float(j)


def resample_sides(p2: np.ndarray, i_le: int, n: int) -> np.ndarray:
    """The polygon (upper TE -> LE at ``i_le`` -> lower TE) resampled to ``n`` points per side,
    cosine spaced in arc length (crowded at both edges), (2n - 1, 2)."""
    out = []
    f = 0.5 * (1 - np.cos(np.linspace(0.0, np.pi, n)))
    for side in (p2[: i_le + 1][::-1], p2[i_le:]):
        s = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(side, axis=0), axis=1))])
        q = f * s[-1]
        out.append(np.column_stack([np.interp(q, s, side[:, 0]), np.interp(q, s, side[:, 1])]))
    return np.vstack([out[0][::-1], out[1][1:]])


def chord_frame(points: np.ndarray, axis: int) -> tuple[np.ndarray, int, float]:
    """(points (n, 2) in the chord frame, index of the leading edge, chord mm) of an ordered
    section polyline (n, 3) in a plane normal to datum ``axis``."""
    from .chordline import section_frame

    chord, i_le, e, nrm = section_frame(points, axis)
    d = points - points[i_le]
    return np.column_stack([d @ e, d @ nrm]), i_le, chord


def section_properties(points: np.ndarray, axis: int, *, laminate_mm: float | None = None,
                       torsion: bool = True) -> SectionProps:
    """Properties of an ordered section polyline (n, 3) (upper TE -> LE -> lower TE, closed
    across the trailing edge) lying in a plane normal to datum ``axis``."""
    p, i_le, chord = chord_frame(np.asarray(points, float), axis)
    m = polygon_moments(p)
    i_maj, i_min, ang = principal(m["ixx"], m["iyy"], m["ixy"])
    zmax, zmin = p[:, 1].max() - m["cy"], m["cy"] - p[:, 1].min()
    xle, xte = m["cx"] - p[:, 0].min(), p[:, 0].max() - m["cx"]
    props = SectionProps(chord_mm=chord, area_mm2=m["area"], centroid_x_mm=m["cx"], centroid_z_mm=m["cy"],
                         i_chord_mm4=m["ixx"], i_normal_mm4=m["iyy"], i_product_mm4=m["ixy"], i_major_mm4=i_maj,
                         i_minor_mm4=i_min, principal_deg=ang, w_upper_mm3=m["ixx"] / zmax,
                         w_lower_mm3=m["ixx"] / zmin, w_le_mm3=m["iyy"] / xle, w_te_mm3=m["iyy"] / xte)
    if torsion:
        props.j_solid_mm4 = warping_j(resample_sides(p, i_le, J_POINTS_PER_SIDE))
    if laminate_mm:
        props.laminate_mm = laminate_mm
        props.j_shell_mm4, props.shell_area_mm2, props.shell_i_chord_mm4 = bredt_batho_j(p, laminate_mm)
    return props


#: Points per side of the intended section loop the polygon figures are taken from (the
#: polygon's area is within 1e-5 relative of the section's on a 12 % section).
SECTION_POINTS = 600


_CACHE: "weakref.WeakKeyDictionary" = weakref.WeakKeyDictionary()


def model_section_properties(model, y: float, *, torsion: bool = True) -> SectionProps:
    """Intended properties of a :class:`SurfaceModel`'s finished section at span ``y`` (the
    model's span coordinate), with the shell of its ``[surface.laminate]`` thickness if it has
    one. Computed once per model and position (the report, the check and the loads share them)."""
    per = _CACHE.setdefault(model, {})
    y = round(float(y), 9)
    hit = per.get((y, True)) or (None if torsion else per.get((y, False)))
    if hit is None:
        axis = int(np.argmax(np.abs(model.span_axis)))
        lam = model.spec.laminate.thickness if model.spec.laminate is not None else None
        hit = per[(y, torsion)] = section_properties(model.section_loop(y, SECTION_POINTS), axis, laminate_mm=lam,
                                                     torsion=torsion)
    return hit
