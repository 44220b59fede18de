"""Print poses, the bed margin and the nozzle warnings of the printed pieces (numpy only, fast).

The synthetic piece is a cambered section (NACA 4412 ordinates by the published formula,
Abbott & von Doenhoff, ch. 6) extruded along the span: flat joint faces at both ends."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from geomgen.parts.pose import choose, flat_faces, measure

ROOT = Path(__file__).resolve().parents[1]


def section(n=60, chord=100.0, m=0.04, p=0.4, t=0.12):
    x = 0.5 * (1 - np.cos(np.linspace(0, np.pi, n)))
    yt = 5 * t * (0.2969 * np.sqrt(x) - 0.126 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1036 * x**4)
    yc = np.where(x < p, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * (1 - 2 * p + 2 * p * x - x**2))
    up = np.column_stack([x, yc + yt])[::-1]
    lo = np.column_stack([x, yc - yt])[1:-1]
    return np.concatenate([up, lo]) * chord  # closed loop, no repeated point, counter-clockwise


def prism(poly, length):
    """Closed mesh: the polygon in the x-z plane extruded along +y from 0 to ``length``."""
    k = len(poly)
    v = np.concatenate([np.column_stack([poly[:, 0], np.full(k, y), poly[:, 1]]) for y in (0.0, length)])
    c = len(v)
    v = np.vstack([v, [*poly.mean(0)[[0]], 0.0, poly.mean(0)[1]], [*poly.mean(0)[[0]], length, poly.mean(0)[1]]])
    f = []
    for i in range(k):
        j = (i + 1) % k
        f += [[i, j, k + j], [i, k + j, k + i]]
        f += [[c, j, i], [c + 1, k + i, k + j]]
    f = np.array(f)
    # outward orientation: flip all if the volume comes out negative
    p0, p1, p2 = v[f[:, 0]], v[f[:, 1]], v[f[:, 2]]
    if np.einsum("ij,ij->i", p0, np.cross(p1, p2)).sum() < 0:
        f = f[:, ::-1]
    return v, f


def test_a_piece_that_fits_upright_stands_on_a_joint_face_with_its_whole_section_on_the_bed():
    poly = section()
    v, f = prism(poly, 150.0)
    faces = flat_faces(v, f, [(0, 1, 0), (0, -1, 0), (0, 0, 1)])
    assert len(faces) == 2 and all(abs(abs(n[1]) - 1) < 1e-9 for n, _ in faces)
    po = choose(v, f, (200.0, 200.0, 200.0))
    x, z = poly[:, 0], poly[:, 1]
    area = 0.5 * abs(np.dot(x, np.roll(z, -1)) - np.dot(z, np.roll(x, -1)))  # shoelace
    assert po.contact_mm2 == pytest.approx(area, rel=1e-9)
    assert po.overhang_mm2 == pytest.approx(0.0, abs=1e-9) and not po.needs_support and po.fits
    w = v @ po.R.T + po.t
    assert w[:, 2].min() == pytest.approx(0.0, abs=1e-9) and np.ptp(w[:, 2]) == pytest.approx(150.0)


def test_a_piece_too_tall_to_stand_is_turned_on_the_bed_or_called_for_support_with_its_overhang():
    poly = section()
    v, f = prism(poly, 150.0)
    # 60 mm high: it can neither stand on a joint face nor on its leading edge, so it lies on its skin
    from geomgen.parts.frame import rotations24

    po = choose(v, f, (200.0, 200.0, 60.0), rotations24())
    assert po.fits and po.contact_mm2 == 0.0 and po.needs_support
    # the reported overhang is the area of the triangles facing down more than 45° from the vertical
    w = v @ po.R.T
    n = np.cross(w[f[:, 1]] - w[f[:, 0]], w[f[:, 2]] - w[f[:, 0]])
    a = 0.5 * np.linalg.norm(n, axis=1)
    steep = n[:, 2] / (2 * a) < -np.sqrt(0.5)
    assert po.overhang_mm2 == pytest.approx(a[steep].sum()) and po.overhang_mm2 > 0.3 * po.area_mm2
    c, o, t = measure(v, f, po.R)
    assert (c, o) == (po.contact_mm2, po.overhang_mm2)


def test_a_long_piece_is_turned_on_the_bed_to_fit_diagonally_when_square_does_not():
    v, f = prism(section(chord=100.0), 40.0)  # 100 x 40 footprint standing on its face: 100 x 12
    po = choose(v, f, (95.0, 95.0, 300.0))
    assert po.fits and po.contact_mm2 > 0 and po.size[0] <= 95 + 1e-6 and po.size[1] <= 95 + 1e-6


def test_bed_margin_is_kept_by_the_automatic_split_and_cannot_eat_the_bed():
    from geomgen.errors import SpecError
    from geomgen.geometry import build_models
    from geomgen.parts.printing import extents_local, plan_printing, printing_model
    from geomgen.spec.load import load_spec_text

    text = (ROOT / "specs/demo-stabilizer-shop.toml").read_text()
    text = text.replace("build_volume = [180.0, 180.0, 180.0]",
                        "build_volume = [120.0, 120.0, 120.0]\nbed_margin = 10.0")
    text = text.replace("pin_diameter = 2.0", "enabled = false")  # thin outer joints: no room for pins
    assert "bed_margin = 10.0" in text
    (m,) = build_models(load_spec_text(text))
    ps = m.spec.printing
    assert ps.usable_volume == (100.0, 100.0, 120.0)
    pm, _ = printing_model(m, ps)
    plan = plan_printing(pm, ps)
    assert not plan.problems
    for pc in plan.pieces:
        dims = np.abs(pc.M) @ extents_local(pm, *pc.span) * ps.scale
        assert (dims <= np.array(ps.usable_volume) + 1e-6).all()
    with pytest.raises(SpecError) as e:
        load_spec_text(text.replace("bed_margin = 10.0", "bed_margin = 58.0"))
    assert "bed_margin" in str(e.value)


def test_nozzle_warnings_name_the_features_a_printer_cannot_make():
    """The issue's case: the shop stabilizer at half scale with Ø1.0 mm pins (Ø1.2 mm
    locator holes) and thin walls at a 0.4 mm nozzle, and a 0.25 mm printed trailing edge."""
    from geomgen.geometry import build_models
    from geomgen.parts.pieces import nozzle_notes
    from geomgen.parts.printing import plan_printing, printing_model
    from geomgen.spec.load import load_spec_text

    text = (ROOT / "specs/demo-stabilizer-shop.toml").read_text()
    text = text.replace("build_volume = [180.0, 180.0, 180.0]", "scale = 0.5\nsplit_at = [-45.0, 45.0]\nmin_wall = 0.7")
    text = text.replace("min_te = 0.9 ", "# ").replace("pin_diameter = 2.0", "pin_diameter = 1.0")
    (m,) = build_models(load_spec_text(text))
    ps = m.spec.printing
    assert ps.min_te is None and ps.scale == 0.5
    pm, _ = printing_model(m, ps)
    plan = plan_printing(pm, ps)
    assert not plan.problems and len(plan.joints) == 2
    notes = nozzle_notes(plan, ps)
    assert any("trailing edge is 0.25 mm" in n for n in notes)
    assert any("locator holes" in n and "Ø1.20 mm" in n for n in notes)
    assert any("locator walls" in n for n in notes)
    # a 0.2 mm nozzle makes them: no locator or wall warning
    fine = ps.model_copy(update={"nozzle": 0.2})
    assert not [n for n in nozzle_notes(plan, fine) if "locator" in n]
    # the shipped demo (full size, thickened edge, Ø2 mm pins) draws no nozzle warning
    (d,) = build_models(load_spec_text((ROOT / "specs/demo-stabilizer-shop.toml").read_text()))
    dm, _ = printing_model(d, d.spec.printing)
    assert nozzle_notes(plan_printing(dm, d.spec.printing), d.spec.printing) == []


def test_piece_mesh_from_the_skin_is_closed_and_within_its_tolerance_of_the_surface():
    """Random points of the exact skin lie within the tolerance of the mesh (brute-force point
    to triangle distances), and the mesh's volume is the exact skin volume less at most
    tolerance x area (a chord of a convex surface lies inside it)."""
    from geomgen.cad.mesh import closed
    from geomgen.geometry import build_models
    from geomgen.geometry.slices import skin_volume_centroid
    from geomgen.parts.frame import Frame
    from geomgen.parts.skinmesh import _point_triangle, piece_mesh
    from geomgen.spec.load import load_spec_text

    (m,) = build_models(load_spec_text((ROOT / "specs/demo-stabilizer-shop.toml").read_text()))
    tol = 0.05
    v, f = piece_mesh(m.skin, m.y_range[0], m.y_range[1], tol, m.te_open, Frame.of(m).span_axis, "t")
    assert closed(f)
    p0, p1, p2 = v[f[:, 0]], v[f[:, 1]], v[f[:, 2]]
    vol = float(np.einsum("ij,ij->i", p0, np.cross(p1, p2)).sum() / 6.0)
    exact = skin_volume_centroid(m.skin)[0]
    assert 0 <= exact - vol <= tol * m.skin.area()
    rng = np.random.default_rng(1)
    u = rng.uniform(*m.skin.u_range, 60)
    w = rng.uniform(*m.y_range, 8)
    pts = m.skin.evaluate(u, w).reshape(-1, 3)
    d = np.array([_point_triangle(np.broadcast_to(q, p0.shape), p0, p1, p2).min() for q in pts])
    assert d.max() <= tol
