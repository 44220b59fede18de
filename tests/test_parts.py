"""3D shop parts: mounting pad and holes, shims, printable pieces, cores and mould halves.

Kernel tests build the test spec once (module fixture) and measure what was written: STEP
read back through OCP, STL through trimesh, 3MF unzipped and parsed. All numbers in the
test spec are invented.
"""

from __future__ import annotations

import json
import math
import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
import zipfile
from pathlib import Path

import numpy as np
import pytest
import trimesh

from geomgen.errors import GeometryError, SpecError
from geomgen.geometry import build_models
from geomgen.spec.load import load_spec_text

SPEC = """\
format = 1
name = "tw"
[datum]
origin = "test origin"
[sections.a]
naca = "2412"
[sections.s]
naca = "0009"
[[surface]]
name = "wing"
role = "wing"
mirror = true
position = [-100.0, 0.0, -30.0]
incidence = 1.5
te_thickness = 0.5
loft_sections = 8
[[surface.station]]
y = 0
chord = 150
section = "a"
[[surface.station]]
y = 250
chord = 90
x = 20
z = -8
section = "a"
[surface.mount]
side = "upper"
pad_z = -20.0
pad_x = [-115.0, -60.0]
pad_width = 40.0
min_wall = 2.0
[[surface.mount.hole]]
x = -100.0
diameter = 5.0
depth = 10.0
insert = { diameter = 8.0, depth = 8.0 }
[[surface.mount.hole]]
x = -75.0
diameter = 5.5
counterbore = { diameter = 10.0, depth = 3.0 }
[[surface.mount.hole]]
x = -75.0
y = 12.0
diameter = 5.5
countersink = { angle = 90.0, diameter = 11.0 }
[[surface.mount.shim]]
angle = -0.5
[surface.printing]
scale = 0.8
min_te = 0.8
build_volume = [180.0, 180.0, 210.0]
mesh_tol = 0.05
[surface.printing.locators]
pin_diameter = 2.0
[[surface.printing.spar]]
diameter = 3.0
span = [20.0, 230.0]
chord = 0.35
[surface.laminate]
thickness = 1.0
flange = 20.0
[[surface]]
name = "stab"
role = "stabilizer"
mirror = true
position = [300.0, 0.0, -25.0]
incidence = -2.0
[[surface.station]]
y = 0
chord = 80
section = "s"
[[surface.station]]
y = 150
chord = 50
section = "s"
"""


def models(text=SPEC):
    return {m.name: m for m in build_models(load_spec_text(text))}


# -- spec ----------------------------------------------------------------------------
def test_spec_tables_report_each_problem_with_its_field_path():
    bad = SPEC.replace('pad_x = [-115.0, -60.0]', 'pad_x = [-60.0, -115.0]') \
              .replace("depth = 10.0\ninsert", "depth = 10.0\ncounterbore = { diameter = 9.0, depth = 2.0 }\ninsert") \
              .replace("min_te = 0.8", "min_tee = 0.8")
    with pytest.raises(SpecError) as exc:
        load_spec_text(bad, "s.toml")
    text = "\n".join(exc.value.problems)
    assert 'surface[0] "wing" mount pad_x: must be [fore, aft]' in text
    assert "hole[0]: give at most one of counterbore, countersink, insert" in text
    assert "printing: unknown key 'min_tee'; did you mean 'min_te'?" in text


def test_schema_describes_the_shop_tables_with_units():
    from geomgen.spec.model import Spec

    schema = json.dumps(Spec.model_json_schema())
    for words in ("datum z of the pad plane, mm", "rod diameter, printed mm", "laminate thickness over the core, mm",
                  "printer build volume [x, y, z], mm"):
        assert words in schema


# -- plans (numpy, no kernel) ----------------------------------------------------------
def test_pad_through_the_far_skin_is_refused_naming_surface_and_feature():
    from geomgen.parts.mount import plan_mount

    m = models()["wing"]
    ms = m.spec.mount.model_copy(update={"pad_z": -37.0})
    problems = plan_mount(m, ms).problems
    assert any(p.startswith('surface "wing" mount pad: the plane z = -37 mm cuts through the lower skin')
               for p in problems), problems


def test_thin_wall_under_an_insert_is_refused_with_the_wall_left():
    from geomgen.parts.mount import plan_mount

    m = models()["wing"]
    hole = m.spec.mount.hole[0].model_copy(update={"depth": 15.0})
    plan = plan_mount(m, m.spec.mount.model_copy(update={"hole": [hole]}))
    msg = " ".join(plan.problems)
    assert 'surface "wing" mount hole[0] (x=-100, y=0): the insert hole leaves' in msg
    assert "less than min_wall = 2 mm" in msg
    # the reported wall is the lower skin's distance below the hole bottom, from the model's section
    from geomgen.parts.frame import line_crossings, section_datum_xz

    lo, _ = line_crossings(section_datum_xz(m, 0.0), [-100.0])
    rec = plan.report["holes"][0]
    assert rec["bottom_z"] == pytest.approx(-35.0)
    assert rec["wall_mm"] <= (-35.0 - lo[0]) + 1e-9


def test_pad_on_the_lower_skin_measures_toward_the_upper_skin():
    """Signs for a part sitting on the fuselage: the pad cuts the lower skin, the insert pocket
    enters from below, the counterbore sits on the upper skin."""
    from geomgen.parts.frame import line_crossings, section_datum_xz
    from geomgen.parts.mount import plan_mount
    from geomgen.spec.parts import MountSpec

    m = models()["wing"]
    ms = MountSpec(side="lower", pad_z=-35.5, pad_x=(-115, -60), pad_width=40,
                   hole=[{"x": -100, "diameter": 5, "insert": {"diameter": 8, "depth": 8}},
                         {"x": -75, "diameter": 5.5, "counterbore": {"diameter": 10, "depth": 3}}])
    plan = plan_mount(m, ms)
    assert not plan.problems
    insert, cbore = plan.report["holes"]
    assert insert["bottom_z"] == pytest.approx(-27.5)  # 8 mm up from the pad
    _, hi = line_crossings(section_datum_xz(m, 0.0), [-75.0])
    assert cbore["counterbore_bottom_z"] == pytest.approx(hi[0] - 3.0, abs=1e-6)
    assert cbore["wall_mm"] == pytest.approx(cbore["counterbore_bottom_z"] + 35.5, abs=0.05)
    box = plan.tools[0]
    assert box.kind == "box" and box.origin[2] + box.length == pytest.approx(-35.5)  # removes below the pad


def test_pad_above_the_skin_names_the_true_nearest_and_farthest_gaps_and_the_skin_heights():
    import re as _re

    from geomgen.parts.mount import plan_mount

    m = models()["wing"]
    ms = m.spec.mount.model_copy(update={"pad_z": -5.0})
    plan = plan_mount(m, ms)
    msg = [p for p in plan.problems if "does not reach" in p][0]
    near, far, z0, z1 = map(float, _re.search(r"nearest ([\d.]+) mm away, farthest ([\d.]+) mm\); the upper skin over "
                                              r"the footprint lies at z = (-?[\d.]+) \.\. (-?[\d.]+) mm", msg).groups())
    # measured apart: the upper skin's height on a dense grid over the footprint
    from geomgen.parts.frame import line_crossings, section_datum_xz

    x0, x1 = ms.pad_x
    hs = []
    for y in np.linspace(-20.0, 20.0, 41):
        _, hi = line_crossings(section_datum_xz(m, float(y), 400), np.linspace(x0, x1, 221))
        hs += list(hi[~np.isnan(hi)])
    assert near == pytest.approx(-5.0 - max(hs), abs=0.02) and far == pytest.approx(-5.0 - min(hs), abs=0.02)
    assert (z0, z1) == (pytest.approx(min(hs), abs=0.02), pytest.approx(max(hs), abs=0.02))
    assert near < far


def test_pad_auto_seats_for_the_contact_asked_and_a_partial_contact_is_warned():
    from geomgen.parts.mount import plan_mount

    m = models()["wing"]
    for target in (0.3, 0.6, 0.9):
        plan = plan_mount(m, m.spec.mount.model_copy(update={"pad_z": "auto", "pad_contact": target}))
        pad = plan.report["pad"]
        assert pad["flat_fraction"] == pytest.approx(target, abs=3.0 / (61 * 31))  # the grid: ties of equal height
        assert pad["auto"] == {"contact_target": target}
        assert bool(pad["notes"]) == (target < 0.5), pad["notes"]
    # the same pad given by hand at the auto height gives the same result
    z = plan.report["pad"]["z"]
    again = plan_mount(m, m.spec.mount.model_copy(update={"pad_z": z}))
    assert again.report["pad"]["flat_fraction"] == pytest.approx(0.9, abs=1e-3)


def test_spar_channel_leaving_the_skin_is_refused():
    from geomgen.parts.printing import plan_spars

    m = models()["wing"]
    ps = m.spec.printing
    ok_tools, recs, problems = plan_spars(m, ps)
    assert not problems and len(ok_tools) == 2  # the rod and its mirror image
    assert all(r["wall_printed_mm"] >= ps.min_wall for r in recs)
    fat = ps.spar[0].model_copy(update={"diameter": 12.0})
    _, _, problems = plan_spars(m, ps.model_copy(update={"spar": [fat]}))
    assert problems and problems[0].startswith('surface "wing" printing spar[0]')
    assert "breaks out of the skin at span" in problems[0]


def test_spar_wall_matches_a_dense_skin_measurement():
    """The reported least wall of the channel is re-measured on the B-spline skin itself
    (dense sampling at the reported span), not on the model's section polygon."""
    from geomgen.parts.frame import Frame
    from geomgen.parts.printing import plan_spars

    m = models()["wing"]
    ps = m.spec.printing
    _, recs, _ = plan_spars(m, ps)
    r = recs[0]
    y = r["wall_at_y"]
    F = Frame.of(m)
    A, B = F.to_local(np.array(r["start"])), F.to_local(np.array(r["end"]))
    c = A + (y - A[1]) / (B[1] - A[1]) * (B - A)
    pts = F.to_local(m.skin.evaluate(np.linspace(0, 1, 20001), [y])[:, 0])[:, [0, 2]]
    d = np.linalg.norm(pts - c[[0, 2]], axis=1).min()
    cos = abs((B - A)[1]) / np.linalg.norm(B - A)
    wall = (d - 0.5 * r["channel_diameter"] / ps.scale / cos) * ps.scale
    assert r["wall_printed_mm"] == pytest.approx(wall, abs=0.01)


def test_shim_words_explain_the_sign():
    from geomgen.parts.mount import plan_shims
    from geomgen.spec.parts import MountSpec

    spec = load_spec_text(SPEC)
    ms = {m.name: m for m in build_models(spec)}
    stab_mount = MountSpec(pad_z=-15.0, pad_x=(280.0, 320.0), pad_width=30.0, shim=[{"angle": -0.5}])
    (sh,), problems = plan_shims(ms["stab"], stab_mount, spec)
    assert not problems and sh.slug == "shim-minus0.5deg"
    text = " ".join(sh.words)
    assert "stabilizer's leading edge goes down 0.5°" in text
    assert "The front wing's angle to the fuselage and board does not change" in text
    assert "(decalage) grows by 0.5° (3.5° -> 4°)" in text
    # part below the fuselage, leading edge down: the gap opens at the front
    assert sh.t_fore == pytest.approx(1.0 + 40.0 * math.tan(math.radians(0.5))) and sh.t_aft == 1.0
    (wsh,), _ = plan_shims(ms["wing"], ms["wing"].spec.mount, spec)
    assert "angle to the fuselage and board changes by -0.5°" in " ".join(wsh.words)
    assert "(decalage) shrinks by 0.5° (3.5° -> 3°)" in " ".join(wsh.words)


def test_shim_words_give_the_trim_change_from_the_hydrodynamics():
    """With a [flight] table the shim's effect in trimmed flight comes from the project's vortex
    lattice: a stabilizer leading edge down pushes the tail down, so the board rides nose-up
    and the weight must move forward (the same sign as the decalage rule of thumb)."""
    from conftest import DEMO

    from geomgen.hydro import shim_trim_change
    from geomgen.parts.mount import plan_shims
    from geomgen.project import Project
    from geomgen.spec.parts import MountSpec

    project = Project(DEMO)
    stab = project.models[1]
    words, why = shim_trim_change(project, stab.name, -0.5)
    assert why is None
    (sh,), _ = plan_shims(stab, MountSpec(pad_z=-19.6, pad_x=(415, 470), pad_width=30, shim=[{"angle": -0.5}]),
                          project.spec, {-0.5: words})
    text = " ".join(sh.words)
    assert "In trimmed flight at 22 km/h" in text
    assert "more nose-up" in text and "further forward to balance" in text


def test_automatic_split_fits_the_build_volume_and_keeps_the_mount_in_one_piece():
    from geomgen.parts.printing import extents_local, plan_printing, printing_model

    m = models()["wing"]
    ps = m.spec.printing
    pm, _ = printing_model(m, ps)
    holes = [(h.x, h.y, 5.0) for h in m.spec.mount.hole]
    plan = plan_printing(pm, ps, (), holes)
    assert not plan.problems
    assert len(plan.pieces) == 3 and "odd" in plan.split_how  # an even split would cut the holes at y = 0
    a, b = plan.pieces[1].span
    assert a < -17 and b > 17
    for pc in plan.pieces:
        assert pc.fits and pc.pose == "upright"
        dims = np.abs(pc.M) @ extents_local(pm, *pc.span) * ps.scale
        assert (dims <= np.array(ps.build_volume) + 1e-6).all()


def test_trailing_edge_thicker_than_the_section_allows_is_refused():
    from geomgen.parts.printing import printing_model

    m = models()["wing"]
    _, problems = printing_model(m, m.spec.printing.model_copy(update={"min_te": 6.0}))
    assert problems and problems[0].startswith('surface "wing" printing min_te')


def test_threemf_package_in_millimetres():
    from geomgen.cad.threemf import write_3mf

    v = np.array([[0, 0, 0], [10, 0, 0], [0, 10, 0], [0, 0, 10]], float)
    f = np.array([[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]])
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / "t.3mf"
        write_3mf([("tet", v, f)], p)
        v2, f2, unit = read_3mf(p)[0]
    assert unit == "millimeter"
    assert mesh_volume(v2, f2) == pytest.approx(1000.0 / 6.0)


# -- helpers for the written files ------------------------------------------------------
def read_3mf(path):
    """[(vertices, faces, unit)] per object of a 3MF package."""
    with zipfile.ZipFile(path) as z:
        names = z.namelist()
        assert "[Content_Types].xml" in names and "_rels/.rels" in names
        rels = ET.fromstring(z.read("_rels/.rels"))
        target = rels[0].get("Target").lstrip("/")
        root = ET.fromstring(z.read(target))
    ns = {"m": "http://schemas.microsoft.com/3dmanufacturing/core/2015/02"}
    out = []
    for obj in root.findall("m:resources/m:object", ns):
        v = np.array([[float(e.get(k)) for k in "xyz"] for e in obj.findall("m:mesh/m:vertices/m:vertex", ns)])
        f = np.array([[int(e.get(k)) for k in ("v1", "v2", "v3")]
                      for e in obj.findall("m:mesh/m:triangles/m:triangle", ns)])
        out.append((v, f, root.get("unit")))
    return out


def mesh_volume(v, f):
    p0, p1, p2 = v[f[:, 0]], v[f[:, 1]], v[f[:, 2]]
    return float(np.einsum("ij,ij->i", p0, np.cross(p1, p2)).sum() / 6.0)


@pytest.fixture(scope="module")
def shop(tmp_path_factory):
    from geomgen.parts import write_shop_parts

    out = tmp_path_factory.mktemp("shop")
    spec = out / "tw.toml"
    spec.write_text(SPEC)
    res = write_shop_parts(spec, out / "parts")
    return res


def _faces(solid, kind):
    from OCP.BRepAdaptor import BRepAdaptor_Surface
    from OCP.TopAbs import TopAbs_FACE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    out = []
    exp = TopExp_Explorer(solid, TopAbs_FACE)
    while exp.More():
        face = TopoDS.Face_s(exp.Current())
        a = BRepAdaptor_Surface(face)
        if a.GetType() == kind:
            out.append((face, a))
        exp.Next()
    return out


def _one(path):
    from geomgen.cad.readback import read_step

    (name, solid), = read_step(path)
    return solid


def _segments_along_z(solid, x, y):
    """Material intervals (z0, z1) of a vertical line through the solid, by the kernel's
    line-shape intersector."""
    from OCP.gp import gp_Dir, gp_Lin, gp_Pnt
    from OCP.IntCurvesFace import IntCurvesFace_ShapeIntersector

    it = IntCurvesFace_ShapeIntersector()
    it.Load(solid, 1e-7)
    it.Perform(gp_Lin(gp_Pnt(x, y, 0.0), gp_Dir(0, 0, 1)), -1e5, 1e5)
    zs = []
    for z in sorted(it.Pnt(i).Z() for i in range(1, it.NbPnt() + 1)):
        if not zs or z - zs[-1] > 1e-6:  # a line through an edge meets both of its faces
            zs.append(z)
    return list(zip(zs[::2], zs[1::2]))


# -- mount, measured from the written STEP -----------------------------------------------------
@pytest.mark.slow
def test_hole_axes_are_parallel_to_the_datum_normal(shop):
    from OCP.GeomAbs import GeomAbs_Cone, GeomAbs_Cylinder

    solid = _one(shop.out_dir / "cad/tw-wing-mount.step")
    axes = [a.Cylinder().Axis().Direction() for _, a in _faces(solid, GeomAbs_Cylinder)]
    axes += [a.Cone().Axis().Direction() for _, a in _faces(solid, GeomAbs_Cone)]
    assert len(axes) >= 6  # insert pocket + hole, two bolt holes, counterbore, countersink
    for d in axes:
        assert math.degrees(math.acos(min(1.0, abs(d.Z())))) < 0.01


@pytest.mark.slow
def test_pad_is_flat_at_the_datum_height(shop):
    from OCP.BRep import BRep_Tool
    from OCP.GeomAbs import GeomAbs_Plane
    from OCP.TopAbs import TopAbs_VERTEX
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    solid = _one(shop.out_dir / "cad/tw-wing-mount.step")
    pads = []
    for face, a in _faces(solid, GeomAbs_Plane):
        n = a.Plane().Axis().Direction()
        if abs(abs(n.Z()) - 1.0) < 1e-9 and abs(a.Plane().Location().Z() + 20.0) < 0.01:
            pads.append(face)
    assert len(pads) == 1
    exp = TopExp_Explorer(pads[0], TopAbs_VERTEX)
    zs = []
    while exp.More():
        zs.append(BRep_Tool.Pnt_s(TopoDS.Vertex_s(exp.Current())).Z())
        exp.Next()
    assert len(zs) > 4 and max(abs(z + 20.0) for z in zs) < 0.01
    # and it carries the holes that enter from the pad (insert, counterbore and countersink holes)
    pad = shop.report["surfaces"][0]["mount"]["pad"]
    assert 0.3 < pad["flat_fraction"] < 1.0


@pytest.mark.slow
def test_reported_walls_match_measurements_of_the_written_part(shop):
    solid = _one(shop.out_dir / "cad/tw-wing-mount.step")
    mount = shop.report["surfaces"][0]["mount"]
    items = [(f"hole {h['index']}", h) for h in mount["holes"]] + [("pad", mount["pad"])]
    for what, rec in items:
        x, y = rec["wall_at"]
        z0, z1 = rec["wall_z"]
        segs = _segments_along_z(solid, x, y)
        seg = max(segs, key=lambda s: min(s[1], z1) - max(s[0], z0))
        assert seg[1] - seg[0] == pytest.approx(rec["wall_mm"], abs=0.01), (what, segs, rec)


# -- printed pieces --------------------------------------------------------------------
@pytest.mark.slow
def test_piece_volumes_and_removed_features_add_up_to_the_whole(shop):
    from geomgen.cad.loft import area_mm2, solid_from_skin, volume_mm3
    from geomgen.parts.printing import printing_model

    p = shop.report["surfaces"][0]["printing"]
    s = p["scale"]
    m = models()["wing"]
    pm, _ = printing_model(m, m.spec.printing)
    solid = solid_from_skin(pm.skin, te_open=True)  # lofted anew, not from the report
    whole, area = volume_mm3(solid), area_mm2(solid)
    pieces = sum(trimesh.load(shop.out_dir / pc["files"][0], force="mesh").volume for pc in p["pieces"]) / s**3
    assert p["volume_removed_mm3"] > 0
    # the written meshes and the removed features make the part, within the meshes' chordal
    # tolerance (a chord of a convex skin lies inside it: at most tolerance x area)
    tol = p["mesh_tol"] / s
    assert 0 < whole - (pieces + p["volume_removed_mm3"]) <= tol * area


@pytest.mark.slow
def test_every_mesh_is_watertight_and_the_3mf_matches_the_stl(shop):
    stls = sorted(shop.out_dir.glob("print/*.stl"))
    assert len(stls) == 6  # three pieces, joint test, core, shim
    for stl in stls:
        mesh = trimesh.load(stl, force="mesh")
        assert mesh.is_watertight and mesh.is_winding_consistent, stl.name
        assert mesh.volume > 0
    for pc in shop.report["surfaces"][0]["printing"]["pieces"]:
        stl, tmf = (shop.out_dir / f for f in pc["files"])
        mesh = trimesh.load(stl, force="mesh")
        (v, f, unit), = read_3mf(tmf)
        assert unit == "millimeter"
        assert mesh_volume(v, f) == pytest.approx(mesh.volume, rel=1e-6)
        assert mesh.volume == pytest.approx(pc["volume_printed_mm3"], rel=1e-5)
    parts = read_3mf(shop.out_dir / "print/tw-wing-joint-test.3mf")
    assert len(parts) == 2 and all(trimesh.Trimesh(v, f).is_watertight for v, f, _ in parts)


def _material(mesh, centre, half=0.1):
    """Share of a small cube at ``centre`` that lies inside the mesh (manifold booleans)."""
    import manifold3d as m3

    mf = m3.Manifold(m3.Mesh64(np.asarray(mesh.vertices, float), np.asarray(mesh.faces, np.uint64)))
    cube = m3.Manifold.cube([2 * half] * 3, center=True).translate(list(map(float, centre)))
    return (mf ^ cube).volume() / (2 * half) ** 3


@pytest.mark.slow
def test_pieces_stand_on_a_flat_face_inside_the_margin_and_carry_locators(shop):
    p = shop.report["surfaces"][0]["printing"]
    usable = np.array(p["build_volume"]) - [2 * p["bed_margin"], 2 * p["bed_margin"], 0]
    assert p["bed_margin"] == 8.0  # the default
    for pc in p["pieces"]:
        mesh = trimesh.load(shop.out_dir / pc["files"][0], force="mesh")
        assert (mesh.extents <= usable + 1e-6).all()
        assert mesh.bounds[0][2] == pytest.approx(0.0, abs=1e-6)  # on the bed
        # a flat face lies on the bed: the triangles at z = 0 facing down make a real area
        n, a = mesh.face_normals, mesh.area_faces
        low = (mesh.vertices[mesh.faces][:, :, 2] < 1e-6).all(axis=1) & (n[:, 2] < -0.999)
        assert a[low].sum() == pytest.approx(pc["bed_contact_mm2"], rel=1e-6) and a[low].sum() > 500
        assert "joint face" in pc["pose"] and not pc["needs_support"]
        steep = (n[:, 2] < -np.sin(np.radians(45))) & ~low
        assert a[steep].sum() == pytest.approx(pc["overhang_mm2"], rel=0.02, abs=1.0)  # single-precision STL
    joint = mesh_bounds = trimesh.load(shop.out_dir / "print/tw-wing-joint-test.stl", force="mesh")
    assert (joint.extents <= usable + 1e-6).all() and mesh_bounds.bounds[0][2] == pytest.approx(0.0, abs=1e-6)
    # locator holes: empty on the hole axis just inside the joint face, material beside it
    centre = p["pieces"][1]
    T = np.array(centre["datum_to_print"])
    mesh = trimesh.load(shop.out_dir / centre["files"][0], force="mesh")
    for j in p["joints"]:
        r = 0.5 * j["hole_diameter"]
        for kind in ("round", "slot"):
            d = np.array(j[kind]["datum"], float)
            d[1] += np.sign(-j["y"]) * 1.0  # 1 mm into the centre piece
            q = T[:3, :3] @ d + T[:3, 3]
            assert _material(mesh, q) == pytest.approx(0.0, abs=1e-9), (j["y"], kind)
            up = T[:3, :3] @ np.array([0.0, 0.0, 1.0])
            up /= np.linalg.norm(up)  # datum z in print: across the hole (walls are over 1.2 mm)
            assert _material(mesh, q + up * (r + 0.4)) == pytest.approx(1.0, abs=1e-9), (j["y"], kind)
    # the rod channels run through the centre piece: empty on their axes
    for sp in p["spars"]:
        a, b = np.array(sp["start"]), np.array(sp["end"])
        mid = a + (np.sign(sp["span"][0]) * 60.0 - sp["span"][0]) / (sp["span"][1] - sp["span"][0]) * (b - a)
        assert _material(mesh, T[:3, :3] @ mid + T[:3, 3]) == pytest.approx(0.0, abs=1e-9)


# -- cores and moulds ----------------------------------------------------------------------
def _outer_skin_face():
    from OCP.GeomAbs import GeomAbs_BSplineSurface

    from geomgen.cad.loft import area_mm2
    from geomgen.cad.shape import SurfaceShape as Part

    solid = Part(models()["wing"]).solid
    return max((f for f, _ in _faces(solid, GeomAbs_BSplineSurface)), key=area_mm2)


@pytest.mark.slow
def test_core_lies_a_laminate_inside_the_skin(shop):
    """Points of the written core's skin at several stations, mapped back to the datum frame,
    are 1.0 mm (the laminate) from the part's skin within 0.02 mm, measured by the kernel."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeVertex
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape
    from OCP.GeomAbs import GeomAbs_BSplineSurface
    from OCP.gp import gp_Pnt

    from geomgen.cad.loft import area_mm2
    from geomgen.cad.measure import skin_of

    lam = shop.report["surfaces"][0]["laminate"]
    core = _one(shop.out_dir / lam["core"]["files"][0])
    T = np.array(lam["core"]["datum_to_file"])
    face = max((f for f, _ in _faces(core, GeomAbs_BSplineSurface)), key=area_mm2)
    cs = skin_of(face)
    outer = _outer_skin_face()
    u = np.concatenate([np.linspace(0.1, 0.35, 4), np.linspace(0.65, 0.85, 4)])  # upper and lower, away from edges
    d = []
    for v in (-200.0, -60.0, 0.0, 90.0, 180.0, 235.0):
        pts = cs.evaluate(u, [v])[:, 0]
        pts = (pts - T[:3, 3]) @ T[:3, :3]  # file -> datum (T is a rotation and a shift)
        for p in pts:
            dist = BRepExtrema_DistShapeShape(BRepBuilderAPI_MakeVertex(gp_Pnt(*map(float, p))).Vertex(), outer)
            d.append(dist.Value())
    assert np.allclose(d, 1.0, atol=0.02), np.round(d, 4)


@pytest.mark.slow
def test_moulds_are_stock_blocks_less_the_part_registered_and_tightly_bounded(shop):
    """Each mould half read back: the stock block less its half of the part (cavity volumes add
    up to the part, measured apart), the file's volume as reported, dowel and bolt holes
    through both halves at the same datum places, the parting face up with the root leading
    edge at the machine origin, and a CAD program's default bounding box that of the block."""
    from geomgen.cad.loft import volume_mm3
    from geomgen.cad.ops import bbox, loose_bbox
    from geomgen.cad.shape import SurfaceShape as Part
    from geomgen.parts.mould import chord_points

    m = models()["wing"]
    whole = volume_mm3(Part(m).solid)
    mould = shop.report["surfaces"][0]["laminate"]["mould"]
    assert sum(h["cavity_mm3"] for h in mould["halves"]) == pytest.approx(whole, rel=1e-3)
    le, te = chord_points(m.skin, 0.0)
    for h in mould["halves"]:
        solid = _one(shop.out_dir / h["file"])
        assert volume_mm3(solid) == pytest.approx(h["volume_written_mm3"], rel=1e-4)  # through a STEP round trip
        bmin, bmax = bbox(solid)
        assert np.allclose(bmax - bmin, h["stock_size_mm"], atol=1e-3)
        lmin, lmax = loose_bbox(solid)
        assert (bmin - lmin).max() < 3.0 and (lmax - bmax).max() < 3.0  # no far-reaching control net
        T = np.array(h["datum_to_file"])
        lem, tem = (T[:3, :3] @ p + T[:3, 3] for p in (le, te))
        assert np.allclose(lem, 0.0, atol=1e-6)  # root leading edge at the machine origin
        assert abs(tem[2]) < 1e-6  # on the parting plane at the root
        # the parting face up (it follows the 8 mm anhedral), the block 15 mm (default) behind the cavity below
        assert 0 <= bmax[2] < 8.5 and bmin[2] < -15
        for hole in mould["holes"]:
            p = T[:3, :3] @ np.array(hole["datum"]) + T[:3, 3]
            segs = _segments_along_z(solid, p[0], p[1])
            assert segs == [], (h["half"], hole)  # the hole runs through the whole block
            q = p + [0.5 * hole["diameter"] + 1.0, 0, 0]
            assert _segments_along_z(solid, q[0], q[1]), (h["half"], hole)  # material beside it
    assert len([x for x in mould["holes"] if x["kind"] == "dowel"]) == 4


@pytest.mark.slow
def test_summary_names_the_files_the_shims_and_the_caution(shop):
    from geomgen.parts import format_parts_summary

    text = format_parts_summary(shop)
    assert "tw-wing-shim-minus0.5deg.stl" in text and "thick end forward" in text
    assert "piece 2:" in text and "fits" in text and "CAUTION" in text
    assert "mount: pad at datum z = -20.00 mm" in format_parts_summary(shop.out_dir / "report/tw-parts.json")
    manifest = json.loads((shop.out_dir / "geomgen-manifest.json").read_text())
    assert {f["name"] for f in manifest["files"]} == {p.relative_to(shop.out_dir).as_posix() for p in shop}
    assert {"report/tw-parts.json", "report/tw-parts.txt"} <= {f["name"] for f in manifest["files"]}


@pytest.mark.slow
def test_refused_geometry_writes_nothing(tmp_path):
    from geomgen.parts import write_shop_parts

    spec = tmp_path / "bad.toml"
    spec.write_text(SPEC.replace("pad_z = -20.0", "pad_z = -37.0"))
    with pytest.raises(GeometryError, match='surface "wing" mount pad'):
        write_shop_parts(spec, tmp_path / "out")
    assert not (tmp_path / "out").exists() or not any((tmp_path / "out").rglob("*"))


# -- a real slicer as a test client -------------------------------------------------------
SLICER = shutil.which("prusa-slicer")


def _info(path) -> dict:
    r = subprocess.run([SLICER, "--info", str(path)], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr[-2000:]
    return dict(tuple(s.strip() for s in line.split("=", 1)) for line in r.stdout.splitlines() if "=" in line)


def _extrusion_xy(gcode: Path) -> np.ndarray:
    """(x, y) of every extruding move of a G-code file."""
    pts, x, y = [], None, None
    for line in gcode.read_text().splitlines():
        if line.startswith("G1"):
            w = dict(re.findall(r"([XYE])(-?[\d.]+)", line.split(";")[0]))
            x, y = float(w.get("X", x if x is not None else "nan")), float(w.get("Y", y if y is not None else "nan"))
            if float(w.get("E", 0)) > 0:
                pts.append((x, y))
    return np.array(pts)


@pytest.mark.slow
@pytest.mark.skipif(SLICER is None, reason="prusa-slicer (Debian package) is not installed; .ci/run installs it")
def test_every_piece_slices_as_written_inside_the_bed(shop, tmp_path):
    """Each piece and the joint test, as written, is a closed mesh to the slicer (nothing to
    repair) and slices in place (no arranging) with its skirt inside the printer's bed, the
    bed's origin at its centre as the files are laid out."""
    p = shop.report["surfaces"][0]["printing"]
    bx, by, bz = p["build_volume"]
    files = [pc["files"][0] for pc in p["pieces"]] + [p["joint_test"]["files"][0]]
    for name in files:
        path = shop.out_dir / name
        info = _info(path)
        assert info.get("manifold") == "yes", (name, info)
        assert not {"open_edges", "facets_removed", "facets_reversed", "backwards_edges"} & set(info), (name, info)
        out = tmp_path / (path.stem + ".gcode")
        bed = f"{-bx / 2:g}x{-by / 2:g},{bx / 2:g}x{-by / 2:g},{bx / 2:g}x{by / 2:g},{-bx / 2:g}x{by / 2:g}"
        r = subprocess.run([SLICER, "--export-gcode", f"--bed-shape={bed}", "--max-print-height", f"{bz:g}",
                            "--dont-arrange", "--nozzle-diameter", "0.8", "--layer-height", "0.6",
                            "--first-layer-height", "0.6", "--fill-density", "0%", "--perimeters", "1",
                            "--loglevel", "2", "-o", str(out), str(path)], capture_output=True, text=True, timeout=300)
        assert r.returncode == 0 and out.exists(), (name, r.stdout[-2000:], r.stderr[-2000:])
        assert "repair" not in (r.stdout + r.stderr).lower(), name
        xy = _extrusion_xy(out)
        assert len(xy) > 100
        assert (np.abs(xy[:, 0]) <= bx / 2).all() and (np.abs(xy[:, 1]) <= by / 2).all(), (name, xy.min(0), xy.max(0))


@pytest.mark.slow
def test_root_chord_parting_moulds_are_made_and_warn_of_their_undercut(tmp_path):
    """The flat root-chord parting (the other path of the mould code) makes both halves and
    warns of the nose undercut the stations parting avoids."""
    from conftest import ROOT

    from geomgen.parts import write_shop_parts

    text = (ROOT / "specs" / "demo-stabilizer-shop.toml").read_text()
    assert 'parting = "stations"' in text
    spec = tmp_path / "rc.toml"
    spec.write_text(text.replace('parting = "stations"', 'parting = "root-chord"'))
    shop = write_shop_parts(spec, tmp_path / "out")
    mould = shop.report["surfaces"][0]["laminate"]["mould"]
    assert mould["parting"] == "root-chord" and len(mould["halves"]) == 2
    for h in mould["halves"]:
        assert (shop.out_dir / h["file"]).stat().st_size > 1000
    assert any("UNDERCUT" in n for n in mould.get("notes", []))
