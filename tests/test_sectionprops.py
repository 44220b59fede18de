"""Section properties against closed forms (the source beside each check)."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from geomgen.geometry.sectionprops import (
    bredt_batho_j,
    polygon_moments,
    principal,
    resample_sides,
    section_properties,
    warping_j,
)
from geomgen.sections import naca


def ellipse(a, b, n):
    th = np.linspace(0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([a * np.cos(th), b * np.sin(th)])


def rectangle(w, h, per_side):
    t = np.linspace(0, 1, per_side, endpoint=False)
    c = [(-w / 2, -h / 2), (w / 2, -h / 2), (w / 2, h / 2), (-w / 2, h / 2)]
    pts = [np.column_stack([p[0] + (q[0] - p[0]) * t, p[1] + (q[1] - p[1]) * t]) for p, q in zip(c, c[1:] + c[:1])]
    return np.vstack(pts)


def test_ellipse_area_and_second_moments():
    # Roark, Formulas for Stress and Strain, section properties of a solid ellipse:
    # A = π a b, I about the major axis = π a b³ / 4, about the minor axis π a³ b / 4
    a, b = 100.0, 6.0
    m = polygon_moments(ellipse(a, b, 20000) + [30.0, -4.0])
    assert m["area"] == pytest.approx(math.pi * a * b, rel=1e-6)
    assert (m["cx"], m["cy"]) == pytest.approx((30.0, -4.0), abs=1e-9)
    assert m["ixx"] == pytest.approx(math.pi * a * b**3 / 4, rel=1e-6)
    assert m["iyy"] == pytest.approx(math.pi * a**3 * b / 4, rel=1e-6)
    assert abs(m["ixy"]) < 1e-6 * m["iyy"]
    # clockwise gives the same figures
    m2 = polygon_moments(ellipse(a, b, 20000)[::-1])
    assert m2["ixx"] == pytest.approx(m["ixx"], rel=1e-12)


def test_rectangle_and_rotated_principal_axes():
    # b h, b h³/12 (any strength-of-materials text); a rectangle turned by 20°: the principal
    # axes come back at 20° with the unrotated moments
    w, h = 80.0, 10.0
    p = rectangle(w, h, 4)
    m = polygon_moments(p)
    assert m["area"] == pytest.approx(w * h)
    assert m["ixx"] == pytest.approx(w * h**3 / 12)
    assert m["iyy"] == pytest.approx(h * w**3 / 12)
    r = math.radians(20.0)
    rot = np.array([[math.cos(r), -math.sin(r)], [math.sin(r), math.cos(r)]])
    mr = polygon_moments(p @ rot.T)
    i1, i2, ang = principal(mr["ixx"], mr["iyy"], mr["ixy"])
    assert (i1, i2) == pytest.approx((h * w**3 / 12, w * h**3 / 12), rel=1e-9)
    assert ang == pytest.approx(20.0, abs=1e-9)


def test_rectangle_torsion_constant():
    # Roark (Table of torsion formulas, solid rectangle 2a x 2b, a >= b; coefficients from memory):
    # K = a b³ [16/3 - 3.36 (b/a) (1 - b⁴ / (12 a⁴))]
    a, b = 20.0, 5.0
    k = a * b**3 * (16 / 3 - 3.36 * b / a * (1 - b**4 / (12 * a**4)))
    assert warping_j(rectangle(2 * a, 2 * b, 40)) == pytest.approx(k, rel=5e-3)


def test_ellipse_torsion_constant():
    # Roark, solid ellipse: J = π a³ b³ / (a² + b²)
    a, b = 100.0, 6.0
    exact = math.pi * a**3 * b**3 / (a * a + b * b)
    assert warping_j(ellipse(a, b, 120)) == pytest.approx(exact, rel=2e-3)


def test_torsion_constant_converges_with_the_mesh():
    # J from the warping function on finer polygons/meshes approaches the exact value, the
    # error falling roughly with the square of the point spacing
    a, b = 50.0, 5.0
    exact = math.pi * a**3 * b**3 / (a * a + b * b)
    err = [abs(warping_j(ellipse(a, b, n)) / exact - 1) for n in (30, 60, 120)]
    assert err[0] > err[1] > err[2]
    assert err[2] < 1e-3
    assert err[0] / err[2] > 8


def _ramanujan(a, b):
    h = ((a - b) / (a + b)) ** 2
    return math.pi * (a + b) * (1 + 3 * h / (10 + math.sqrt(4 - 3 * h)))


def test_thin_elliptic_tube_bredt_batho():
    # Bredt–Batho, J = 4 A_m² t / s_m (Roark, thin-walled closed sections); the median line is
    # the ellipse (a, b), the outline is offset from it by t/2; its length by Ramanujan's formula
    a, b, t = 50.0, 10.0, 0.5
    th = np.linspace(0, 2 * np.pi, 4000, endpoint=False)
    # outer outline: the median ellipse offset outward by t/2 along its normal
    x, y = a * np.cos(th), b * np.sin(th)
    nx, ny = b * np.cos(th), a * np.sin(th)
    nn = np.hypot(nx, ny)
    outer = np.column_stack([x + 0.5 * t * nx / nn, y + 0.5 * t * ny / nn])
    j, area, _ = bredt_batho_j(outer, t)
    expect = 4 * (math.pi * a * b) ** 2 * t / _ramanujan(a, b)
    assert j == pytest.approx(expect, rel=2e-3)
    assert area == pytest.approx(_ramanujan(a, b) * t, rel=5e-3)


def test_thin_tube_bredt_batho_against_warping_solution():
    # the same tube meshed as a solid annulus: the warping solution tends to Bredt–Batho as t -> 0
    import matplotlib

    matplotlib.use("Agg")
    from sectionproperties.analysis.section import Section
    from sectionproperties.pre.geometry import Geometry
    from shapely.geometry import Polygon

    a, b, t = 50.0, 10.0, 0.5
    outer = Polygon(ellipse(a + t / 2, b + t / 2, 240))
    ring = outer.difference(outer.buffer(-t))
    g = Geometry(ring)
    g.create_mesh(mesh_sizes=[0.0])
    sec = Section(g)
    sec.calculate_geometric_properties()
    sec.calculate_warping_properties()
    j_bb, _, _ = bredt_batho_j(np.asarray(outer.exterior.coords)[:-1], t)
    assert j_bb == pytest.approx(sec.get_j(), rel=0.02)


def test_naca_0012_area_against_its_thickness_integral():
    # NACA 4-digit thickness (Abbott & von Doenhoff, eq. 6.2): y_t = 5t(0.2969√x - 0.1260x - 0.3516x²
    # + 0.2843x³ - 0.1015x⁴); its integral 2∫y_t dx = 10 t (0.2969·2/3 - 0.063 - 0.3516/3 + 0.2843/4
    # - 0.1015/5) = 0.685079 t (chord² units)
    k = 10 * (0.2969 * 2 / 3 - 0.1260 / 2 - 0.3516 / 3 + 0.2843 / 4 - 0.1015 / 5)
    m = polygon_moments(naca("0012").loop(2000))
    assert m["area"] == pytest.approx(k * 0.12, rel=1e-5)
    # camber moves the area very little (thickness laid normal to a gently curved mean line)
    assert polygon_moments(naca("2412").loop(2000))["area"] == pytest.approx(k * 0.12, rel=2e-3)


def test_section_properties_of_a_placed_section():
    # a NACA 0012 of 200 mm chord, twisted and placed in a plane y = 50: frame-free figures
    sec = naca("0012", closed_te=True).loop(300) * 200.0  # sharp edge: chord line = x axis
    tw = math.radians(7.0)
    x = sec[:, 0] * math.cos(tw) + sec[:, 1] * math.sin(tw)
    z = -sec[:, 0] * math.sin(tw) + sec[:, 1] * math.cos(tw)
    pts = np.column_stack([x + 12.0, np.full(len(x), 50.0), z - 3.0])
    p = section_properties(pts, 1, laminate_mm=1.0)
    flat = polygon_moments(sec)
    assert p.chord_mm == pytest.approx(200.0, rel=1e-6)
    assert p.area_mm2 == pytest.approx(flat["area"], rel=1e-9)
    assert p.i_chord_mm4 == pytest.approx(flat["ixx"], rel=1e-6)
    assert abs(p.centroid_z_mm) < 1e-6 and abs(p.principal_deg) < 1e-6
    # symmetric 12 % section: the thickest fibre sits at 6 % chord either side
    assert p.w_upper_mm3 == pytest.approx(p.w_lower_mm3, rel=1e-6)
    assert p.j_solid_mm4 < p.i_chord_mm4 * 4  # thin section: J ~ 4 I_chord (thin-strip limit)
    assert p.j_solid_mm4 > p.i_chord_mm4 * 2.5
    assert 0 < p.j_shell_mm4 < p.j_solid_mm4
    # a cambered section has a product moment and turned principal axes
    q = section_properties(np.column_stack([naca("4412").loop(300)[:, 0] * 200, np.zeros(601),
                                            naca("4412").loop(300)[:, 1] * 200]), 1, torsion=False)
    assert q.centroid_z_mm > 0 and abs(q.principal_deg) > 0.1


def test_resample_keeps_the_edges():
    p = naca("0012").loop(500)
    r = resample_sides(p, 500, 40)
    assert len(r) == 79
    assert r[0] == pytest.approx(p[0]) and r[-1] == pytest.approx(p[-1]) and r[39] == pytest.approx(p[500])



def _sharp_edged_polygons():
    """The torsion polygon (upper TE -> LE -> lower TE) of a sharp-edged 40 mm section on which
    the long CLI run crashed: its first and last points are 8.7e-18 mm apart, one point once
    sectionproperties rounds them; and the same with the two exactly equal."""
    import json

    data = json.loads((Path(__file__).parent / "data" / "sharp_edge_torsion_polygon.json").read_text())
    near = np.array(data["points_mm"])
    exact = near.copy()
    exact[-1] = exact[0]
    return near, exact

def test_the_torsion_mesher_gets_no_repeated_point(monkeypatch):
    """Triangle (the mesher under sectionproperties) corrupts its memory on repeated points and
    crashed the process some calls later (found by the long CLI run on a sharp-edged 8 mm
    tip): the polygon it is given holds each point once."""
    import sectionproperties.pre.pre as pre

    seen = []
    real = pre.create_mesh

    def spy(points, *args, **kwargs):
        seen.append(np.asarray(points, float))
        return real(points, *args, **kwargs)

    monkeypatch.setattr(pre, "create_mesh", spy)
    for poly in _sharp_edged_polygons():
        assert warping_j(poly) > 0
    for pts in seen:
        gaps = np.linalg.norm(pts[:, None, :] - pts[None, :, :], axis=-1) + np.eye(len(pts))
        assert gaps.min() > 1e-9, gaps.min()


@pytest.mark.slow
def test_many_torsion_solutions_of_sharp_edged_sections_do_not_crash(tmp_path):
    """The crash itself, in a separate process: 60 rounds crashed within 30 before the fix."""
    import subprocess
    import sys

    script = tmp_path / "loop.py"
    script.write_text(
        "import sys\nsys.path.insert(0, %r)\n" % str(Path(__file__).parent)
        + "from test_sectionprops import _sharp_edged_polygons\n"
        "from geomgen.geometry.sectionprops import warping_j\n"
        "polys = _sharp_edged_polygons()\n"
        "for _ in range(60):\n"
        "    for p in polys:\n"
        "        warping_j(p)\n")
    r = subprocess.run([sys.executable, str(script)], capture_output=True, text=True, timeout=600)
    assert r.returncode == 0, r.stderr[-2000:]
