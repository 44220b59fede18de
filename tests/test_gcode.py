"""Four-axis hot-wire G-code: the wire line through the two tower positions of every move,
evaluated at the two block faces, reproduces the sections there (numpy only)."""

from __future__ import annotations

import numpy as np
import pytest

from geomgen.drawings.common import distance_to_dense_polyline, shop_of
from geomgen.drawings.gcode import panel_gcode, read_moves
from geomgen.drawings.hotwire import panels_of, to_surface_frame
from geomgen.geometry import build_models
from geomgen.spec.load import load_spec_text

SPEC = """\
format = 1
name = "hw"
[datum]
origin = "test origin"
[sections.a]
naca = "2412"
[sections.b]
naca = "0010"
[[surface]]
name = "w"
role = "wing"
position = [0.0, 0.0, 0.0]
[[surface.station]]
y = 0
chord = 180
section = "a"
[[surface.station]]
y = 300
chord = 90
x = 40
z = -12
twist = -2.0
section = "b"
[surface.shop]
machine_width_mm = 800.0
block_from_left_mm = 150.0
kerf_mm = {kerf}
cut_tol_mm = {tol}
"""


def model(kerf=0.0, tol=0.5):
    (m,) = build_models(load_spec_text(SPEC.format(kerf=kerf, tol=tol)))
    return m


def faces(text, p, shop):
    """The wire's points at both block faces, surface frame, from the G-code's tower moves."""
    mv = read_moves(text)
    xy, uv = mv[:, :2], mv[:, 2:]
    W, d, L = shop.machine_width_mm, shop.block_from_left_mm, p.y_b - p.y_a
    shift = np.array([float(v) for v in text.split("surface-frame point + [")[1].split("]")[0].split(",")])
    def at(Y):
        return xy + (uv - xy) * Y / W - shift
    return at(d), at(d + L)


def test_the_path_at_the_block_faces_reproduces_the_sections():
    m = model(tol=5.0)
    shop = shop_of(m)
    (p,) = panels_of(m)
    text, info = panel_gcode(p, shop, spec_name="hw", side="upper side")
    fa, fb = faces(text, p, shop)
    assert len(fa) == len(p.a) + 3  # lead-in start, the loop, back to its start, lead-out end
    for face, y in ((fa, p.y_a), (fb, p.y_b)):
        loop = m.section(y).loop(4000) * float(m.chord(y))
        want = to_surface_frame(m, y, loop)
        d = distance_to_dense_polyline(face[1:-2], want)
        assert d.max() < 0.01, (y, d.max())  # G-code rounds to 0.001 mm at the towers
    # lead-in and lead-out: straight from a point 10 mm behind the upper trailing edge
    assert np.allclose(fa[0], fa[1] + [10.0, 0.0], atol=0.005) and np.allclose(fa[-1], fa[0], atol=1e-9)
    # every coordinate the towers are sent to is positive
    assert (read_moves(text) > 0).all()
    assert not info["flagged"] and "WARNING" not in text


def test_kerf_moves_the_face_path_outward_by_half_the_kerf():
    m = model(kerf=1.0)
    (p,) = panels_of(m)
    text, _ = panel_gcode(p, shop_of(m), spec_name="hw", side="upper side")
    fa, _ = faces(text, p, shop_of(m))
    want = to_surface_frame(m, 0.0, m.section(0.0).loop(4000) * 180.0)
    d = distance_to_dense_polyline(fa[1:-2], want)
    assert np.median(d) == pytest.approx(0.5, abs=0.01)


def test_a_panel_straying_beyond_the_tolerance_is_flagged_with_where_to_cut():
    m = model(tol=0.05)
    (p,) = panels_of(m)
    assert p.mid_deviation > 0.05
    text, info = panel_gcode(p, shop_of(m), spec_name="hw", side="upper side")
    assert info["flagged"] and "add a cut position at y = 150" in text
    assert all(line.count("(") <= 1 for line in text.splitlines())  # G-code comments do not nest


def test_mirror_on_a_mast_is_refused_with_its_field():
    from geomgen.errors import SpecError

    text = SPEC.format(kerf=0.0, tol=0.5).replace('role = "wing"', 'role = "mast"\norientation = "vertical-up"\n'
                                                  "mirror = true")
    with pytest.raises(SpecError) as e:
        load_spec_text(text)
    assert "surface" in str(e.value) and "mirror" in str(e.value) and "mast has one side only" in str(e.value)


def test_smooth_planform_of_a_mirrored_part_has_zero_slope_at_the_mirror_plane():
    """Three stations, mirrored: the spline through the mirrored stations is even in y, so
    the chord's slope at the centreline is zero (a not-a-knot spline through the stations alone
    has 0.033 there, a point at the root in the top view)."""
    text = SPEC.format(kerf=0.0, tol=0.5).replace('role = "wing"', 'role = "wing"\nmirror = true\n'
                                                  'interpolation = "smooth"')
    text = text.replace("[[surface.station]]\ny = 300", "[[surface.station]]\ny = 150\nchord = 160\nsection = \"a\"\n"
                        "[[surface.station]]\ny = 300")
    (m,) = build_models(load_spec_text(text))
    h = 1e-4
    slope = (m.planform("chord", h) - m.planform("chord", 0.0)) / h
    assert abs(float(slope)) < 1e-3
    assert float(m.planform("chord", 150.0)) == pytest.approx(160.0)
