"""Shop drawings: templates (DXF, SVG), offset tables (CSV), hot-wire profiles; all through one
staging folder. Everything written is read back and compared with the section generator or a
published table; nothing here needs the CAD kernel."""

from __future__ import annotations

import csv
import io
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from conftest import DEMO, ROOT, wing_spec
from scipy.spatial import cKDTree

from geomgen import CAUTION
from geomgen.drawings import format_shop_summary, hotwire, svg, write_shop_drawings
from geomgen.drawings.hotwire import offset_loop, section_wire_path
from geomgen.errors import GeometryError, SpecError
from geomgen.geometry import build_models
from geomgen.outputs import INDEX, MANIFEST, read_manifest
from geomgen.sections import naca
from geomgen.sections.base import cosine_s
from geomgen.spec import load_spec

SVG = "{http://www.w3.org/2000/svg}"

#: A cambered, twisted, swept wing with a finite trailing edge and one extra template position.
TWISTED = dict(
    section='naca = "2412"', te=0.5, mirror=True, incidence=1.0,
    stations=[dict(y=0, chord=160), dict(y=150, chord=130, x=6, z=-2, twist=-1.5),
              dict(y=300, chord=70, x=20, z=-8, twist=-3.0)],
    extra="[surface.shop]\ntemplates_at = [75.0]\nkerf_mm = 0.8\nhotwire_points = 60\n")


def _write(write_spec, tmp_path, **kw):
    spec = write_spec(wing_spec(**kw))
    return spec, write_shop_drawings(spec, tmp_path / "out")


def _csv_rows(path: Path) -> list[dict]:
    text = "".join(ln for ln in path.read_text().splitlines(True) if not ln.startswith("#"))
    return list(csv.DictReader(io.StringIO(text)))


def _dist_to_polyline(points: np.ndarray, poly: np.ndarray) -> np.ndarray:
    """Distance of points to a closed polyline: nearest vertex, then its two segments (the
    polyline is much denser than the curvature, so the nearest segment touches that vertex)."""
    tree = cKDTree(poly)
    _, k = tree.query(points)
    n = len(poly)
    best = np.full(len(points), np.inf)
    for j0, j1 in ((k - 1) % n, k), (k, (k + 1) % n):
        a, b = poly[j0], poly[j1]
        d = b - a
        L2 = np.maximum(np.einsum("ij,ij->i", d, d), 1e-300)  # a sharp edge repeats its point
        t = np.clip(np.einsum("ij,ij->i", points - a, d) / L2, 0, 1)
        best = np.minimum(best, np.hypot(*(points - a - t[:, None] * d).T))
    return best


# -- templates -------------------------------------------------------------------------
def test_template_dxf_reads_back_within_001_mm(write_spec, tmp_path):
    spec, files = _write(write_spec, tmp_path, **TWISTED)
    model = build_models(load_spec(spec))[0]
    doc = ezdxf.readfile(tmp_path / "out" / "drawings/t-w-templates.dxf")
    assert doc.header["$INSUNITS"] == 4  # millimetres
    assert {"outline", "chord-line", "reference-mark", "labels"} <= {layer.dxf.name for layer in doc.layers}
    groups = {name: list(g) for name, g in doc.groups}
    assert sorted(groups) == ["template y=0", "template y=150", "template y=300", "template y=75"]
    for name, ents in groups.items():
        y = float(name.split("=")[1])
        chord = float(model.chord(y))
        (outline,) = [e for e in ents if e.dxftype() == "LWPOLYLINE"]
        assert outline.closed and outline.dxf.layer == "outline"
        (cl,) = [e for e in ents if e.dxf.layer == "chord-line"]
        le = np.array([cl.dxf.start.x, cl.dxf.start.y])
        assert le[0] == 0.0 and cl.dxf.end.x == pytest.approx(chord)  # LE at x = 0, true size
        got = np.array(list(outline.get_points("xy"))) - le
        want = model.section(y).loop(4000) * chord  # the intended finished section, mm
        assert _dist_to_polyline(want, got).max() < 0.01
        assert _dist_to_polyline(got, want).max() < 0.01
        marks = [e for e in ents if e.dxf.layer == "reference-mark" and e.dxftype() == "CIRCLE"]
        assert marks[0].dxf.center.x == pytest.approx(0.25 * chord)
        text = " ".join(e.dxf.text for e in ents if e.dxftype() == "TEXT")
        tw = float(model.planform("twist", y))
        assert f"chord {chord:.2f} mm" in text and f"twist {tw:+.2f} deg" in text
        assert f"chord line {tw + 1.0:+.2f} deg to datum x" in text


def test_template_svg_is_1to1_mm_with_rulers(write_spec, tmp_path):
    _write(write_spec, tmp_path, **TWISTED)
    root = ET.parse(tmp_path / "out" / "drawings/t-w-templates.svg").getroot()
    w_mm, h_mm = (float(root.get(k).removesuffix("mm")) for k in ("width", "height"))
    vb = [float(v) for v in root.get("viewBox").split()]
    assert root.get("width").endswith("mm") and root.get("height").endswith("mm")
    assert vb[:2] == [0, 0] and vb[2] == pytest.approx(w_mm) and vb[3] == pytest.approx(h_mm)  # 1 unit = 1 mm
    by_id = {e.get("id"): e for e in root.iter() if e.get("id")}
    bx, by = by_id["ruler-x-bar"], by_id["ruler-y-bar"]
    assert float(bx.get("x2")) - float(bx.get("x1")) == pytest.approx(100.0)
    assert float(bx.get("y2")) == float(bx.get("y1"))
    assert float(by.get("y2")) - float(by.get("y1")) == pytest.approx(50.0)
    assert float(by.get("x2")) == float(by.get("x1"))
    for rid, n, axis in (("ruler-x", 11, "x1"), ("ruler-y", 6, "y1")):
        ticks = sorted(float(e.get(axis)) for e in by_id[rid].iter(SVG + "line") if e.get("id") is None)
        assert len(ticks) == n and np.allclose(np.diff(ticks), 10.0)
    groups = [g for g in root.iter(SVG + "g") if g.get("class") == "template"]
    assert [g.get("id") for g in groups] == ["template-y0", "template-y75", "template-y150", "template-y300"]
    for g in groups:
        chord = float(g.get("data-chord-mm"))
        line = next(e for e in g.iter(SVG + "line") if e.get("class") == "chord-line")
        assert float(line.get("x2")) - float(line.get("x1")) == pytest.approx(chord, abs=1e-3)
        pts = np.array([p.split(",") for p in g.find(SVG + "polygon").get("points").split()], float)
        assert pts[:, 0].max() - pts[:, 0].min() == pytest.approx(chord, abs=0.05)
    text = " ".join(t.text for t in root.iter(SVG + "text"))
    assert "twist" in text and "chord frame" in text
    assert " ".join(CAUTION.split()[:6]) in text  # the caution in the footer


# -- offset tables ---------------------------------------------------------------------
def test_offsets_match_section_generator(write_spec, tmp_path):
    spec, _ = _write(write_spec, tmp_path, **TWISTED)
    model = build_models(load_spec(spec))[0]
    path = tmp_path / "out" / "drawings/t-w-offsets.csv"
    assert " ".join(CAUTION.split()[:6]) in path.read_text()
    rows = _csv_rows(path)
    assert sorted({float(r["y_mm"]) for r in rows}) == [0, 75, 150, 300]
    for r in rows:
        y, x = float(r["y_mm"]), float(r["x_pct"]) / 100
        sec, chord = model.section(y), float(model.chord(y))
        assert float(r["chord_mm"]) == pytest.approx(chord, abs=1e-3)
        assert float(r["x_mm"]) == pytest.approx(x * chord, abs=1e-4)
        if 0.0 < x < 1.0:  # away from the nose fold and the corner, exactly the generator's value
            yu, yl = sec.surfaces_at([x], n=20001)
            assert float(r["upper_mm"]) == pytest.approx(yu[0] * chord, abs=2e-4)
            assert float(r["lower_mm"]) == pytest.approx(yl[0] * chord, abs=2e-4)
        if x == 1.0:  # finished trailing edge: the edge thickness, 0.5 mm
            assert float(r["thickness_mm"]) == pytest.approx(0.5, abs=0.01)


#: Abbott & von Doenhoff, Theory of Wing Sections (1959), Appendix I, NACA 0012:
#: half-thickness y_t in % chord at x in % chord.
ABBOTT_0012 = {1.25: 1.894, 2.5: 2.615, 5: 3.555, 10: 4.683, 20: 5.737, 30: 6.002, 40: 5.803,
               50: 5.294, 60: 4.563, 80: 2.623, 90: 1.448}


@pytest.mark.parametrize("te", [0.252, 0.0])
def test_offsets_naca0012_against_abbott(write_spec, tmp_path, te):
    """At chord 100 mm, mm equal % chord. te = 0.252 mm is the open-edge formula's own edge
    (2 x 0.126 %, NACA Report 460 coefficients), so finishing leaves the section as published
    everywhere; te = 0 closes the edge, which changes only aft of the ramp start (50 %)."""
    pct = sorted(ABBOTT_0012) + [100.0]
    extra = "[surface.shop]\noffset_pct = [" + ", ".join(f"{p:g}" for p in pct) + "]\nhotwire = false\n"
    _write(write_spec, tmp_path, te=te, mirror=False, extra=extra,
           stations=[dict(y=0, chord=100), dict(y=200, chord=100)])
    rows = [r for r in _csv_rows(tmp_path / "out" / "drawings/t-w-offsets.csv") if float(r["y_mm"]) == 0.0]
    got = {float(r["x_pct"]): (float(r["upper_mm"]), float(r["lower_mm"])) for r in rows}
    for x, yt in ABBOTT_0012.items():
        if te == 0.0 and x > 50:
            continue
        # 3-decimal table; the formula reproduces it to +-0.0006 % chord
        assert got[x][0] == pytest.approx(yt, abs=1e-3), x
        assert got[x][1] == pytest.approx(-yt, abs=1e-3), x
    assert got[100.0][0] == pytest.approx(0.126 if te else 0.0, abs=1e-4)
    assert not list((tmp_path / "out").glob("*hotwire*"))  # hotwire = false


# -- hot-wire ------------------------------------------------------------------------
def _naca_outline_dense(section, chord, n=40000):
    s = cosine_s(n)
    xu, yu = section.upper(s[::-1])
    xl, yl = section.lower(s[1:])
    return np.column_stack([np.concatenate([xu, xl]), np.concatenate([yu, yl])]) * chord


@pytest.mark.parametrize("designation,te", [("2412", 0.5), ("0012", 0.0), ("4415", 1.0)])
def test_kerf_offset_is_half_kerf_from_the_true_outline(designation, te):
    chord, r = 150.0, 0.4
    sec = naca(designation).with_te_thickness(te / chord)
    path = section_wire_path(sec, chord, 80, r, 7, sharp=te == 0.0)
    d = _dist_to_polyline(path, _naca_outline_dense(sec, chord))
    assert np.abs(d - r).max() < 1e-6  # corners too: they are rounded at radius r
    plain = section_wire_path(sec, chord, 80, 0.0, 7, sharp=te == 0.0)
    assert len(path) == len(plain) + (7 - 1) * (1 if te == 0.0 else 2)


@pytest.mark.parametrize("ccw", [True, False])
def test_kerf_offset_on_circles(ccw):
    rng = np.random.default_rng(7)
    for ang in (np.linspace(0, 2 * np.pi, 200, endpoint=False),  # uniform
                np.sort(rng.uniform(0, 2 * np.pi, 300))):  # uneven spacing
        ang = ang if ccw else ang[::-1]
        R, r = 30.0, 0.75
        loop = R * np.column_stack([np.cos(ang), np.sin(ang)]) + [5.0, -2.0]
        out = offset_loop(loop, r)
        assert len(out) == len(loop)  # no corners on a circle
        assert np.abs(np.hypot(*(out - [5.0, -2.0]).T) - (R + r)).max() < 1e-6


def test_kerf_offset_rounds_square_corners_and_refuses_folds():
    sq = np.array([[0, 0], [10, 0], [10, 10], [0, 10]], float)
    out = offset_loop(np.concatenate([np.linspace(sq[i], sq[(i + 1) % 4], 5, endpoint=False) for i in range(4)]),
                      1.0, arc_points=5)
    assert len(out) == 20 + 4 * 4
    gap = np.maximum(np.maximum(-out, out - 10.0), 0.0)  # outside the 10 x 10 square, per axis
    assert np.allclose(np.hypot(*gap.T), 1.0)  # straight sides and rounded corners alike
    assert ((gap > 1e-9).all(axis=1)).sum() == 4 * 3  # the arcs' inner points lie off both sides
    # a 1 mm slot in a block cannot take an outward offset of 2 mm
    slot = np.array([[0, 0], [20, 0], [20, 10], [10.5, 10], [10.5, 2], [9.5, 2], [9.5, 10], [0, 10]], float)
    with pytest.raises(GeometryError, match="folds"):
        offset_loop(slot, 2.0)


def test_hotwire_ends_in_step_and_in_the_surface_frame(write_spec, tmp_path):
    kw = dict(TWISTED, incidence=0.0, extra="[surface.shop]\nhotwire_points = 40\n")
    spec, files = _write(write_spec, tmp_path, **kw)
    model = build_models(load_spec(spec))[0]
    names = sorted(p.name for p in files if "hotwire" in p.name)
    assert names == ["t-w-hotwire-0-150.dxf", "t-w-hotwire-0-150.gcode", "t-w-hotwire-0-150.txt",
                     "t-w-hotwire-150-300.dxf", "t-w-hotwire-150-300.gcode", "t-w-hotwire-150-300.txt"]
    lines = (tmp_path / "out" / "drawings/t-w-hotwire-150-300.txt").read_text().splitlines()
    assert lines[sum(ln.startswith("#") for ln in lines)] == "i,a_x_mm,a_z_mm,b_x_mm,b_z_mm"
    rows = np.array([ln.split(",") for ln in lines if ln[0].isdigit()], float)
    a, b = rows[:-1, 1:3], rows[:-1, 3:5]
    assert np.allclose(rows[-1], [len(rows) - 1, *rows[0, 1:]])  # closed: last row repeats the first
    # kerf 0, incidence 0, position 0: the paths are the model's own datum sections (x, z)
    for y, got in ((150.0, a), (300.0, b)):
        want = model.section_loop(y, 40)[:, [0, 2]]
        assert np.abs(got - want).max() < 1e-3
    doc = ezdxf.readfile(tmp_path / "out" / "drawings/t-w-hotwire-150-300.dxf")
    assert doc.header["$INSUNITS"] == 4
    ends = {e.dxf.layer: np.array(list(e.get_points("xy"))) for e in doc.modelspace().query("LWPOLYLINE")}
    assert len(ends["end-a"]) == len(ends["end-b"]) == len(a)
    assert np.abs(ends["end-b"] - b).max() < 1e-3


@pytest.mark.parametrize("te", [0.0, 0.6])
def test_hotwire_point_counts_match_with_kerf(write_spec, tmp_path, te):
    kw = dict(TWISTED, te=te, extra="[surface.shop]\nkerf_mm = 1.0\nhotwire_cuts = [0, 120, 300]\n")
    spec, files = _write(write_spec, tmp_path, **kw)
    model = build_models(load_spec(spec))[0]
    for panel in hotwire.panels_of(model):
        assert len(panel.a) == len(panel.b) == 2 * 100 + (0 if te == 0 else 1) + 6 * (1 if te == 0 else 2)
    txt = (tmp_path / "out" / "drawings/t-w-hotwire-120-300.txt").read_text()
    assert "kerf 1 mm: both paths offset outward by 0.5 mm" in txt and "panel y = 120 .. 300 mm" in txt


# -- whole or nothing, spec errors, demo ------------------------------------------------------
def _snapshot(d: Path) -> dict:
    return {p.relative_to(d).as_posix(): p.read_bytes() for p in sorted(d.rglob("*")) if p.is_file()}


def test_failing_writer_leaves_nothing(write_spec, tmp_path, monkeypatch):
    spec = write_spec(wing_spec(**TWISTED))
    out = tmp_path / "out"

    def boom(*a, **k):
        raise RuntimeError("disk on fire")

    with monkeypatch.context() as m:
        m.setattr(hotwire, "write_panel_dxf", boom)  # the last writer of the first surface
        with pytest.raises(RuntimeError):
            write_shop_drawings(spec, out)
    assert not out.exists()  # no partial files, no staging folder, not even the folder it would have made

    files = write_shop_drawings(spec, out)
    before = _snapshot(out)
    written = {p.relative_to(out).as_posix() for p in files}
    assert set(before) == written | {MANIFEST, INDEX}
    assert set(read_manifest(out)) == written
    with monkeypatch.context() as m:
        m.setattr(svg, "write_templates_svg", boom)
        with pytest.raises(RuntimeError):
            write_shop_drawings(write_spec(wing_spec(**dict(TWISTED, te=0.3))), out)
    assert _snapshot(out) == before  # earlier outputs byte-identical, nothing added


def test_positions_off_the_part_and_bad_tables_are_spec_errors(write_spec, tmp_path):
    spec = write_spec(wing_spec(**dict(TWISTED, extra="[surface.shop]\ntemplates_at = [75.0, 320.0]\n")))
    with pytest.raises(SpecError) as e:
        write_shop_drawings(spec, tmp_path / "out")
    assert 'surface[0] "w" shop templates_at[1]: 320 mm is off the part' in str(e.value)
    assert not (tmp_path / "out").exists()
    for extra, msg in (("offset_pct = [0, 10, 5]", "strictly increasing"),
                       ("kerf_mm = -1", "greater than or equal to 0"),
                       ("kerf = 1", "did you mean 'kerf_mm'")):
        with pytest.raises(SpecError, match=msg):
            load_spec(write_spec(wing_spec(**dict(TWISTED, extra=f"[surface.shop]\n{extra}\n"))))


def test_demo_set_and_summary(tmp_path):
    files = write_shop_drawings(DEMO, tmp_path)
    names = {p.name for p in files}
    for part in ("front-wing", "stabilizer", "mast"):
        for suffix in ("templates.dxf", "templates.svg", "offsets.csv"):
            assert f"lakeside-cruiser-{part}-{suffix}" in names
    assert "lakeside-cruiser-front-wing-hotwire-270-350.txt" in names
    text = format_shop_summary(files)
    assert "front-wing" in text and CAUTION in text
    mast = (tmp_path / "drawings/lakeside-cruiser-mast-templates.svg").read_text()
    assert "port side up" in mast  # a vertical-up part's upper side is its port side


def test_shop_drawings_never_import_the_kernel(write_spec, tmp_path):
    spec = write_spec(wing_spec())
    code = f"""
import sys
class Block:
    def find_spec(self, name, path=None, target=None):
        if name.split('.')[0] in ('cadquery', 'OCP'):
            raise ImportError('kernel blocked: ' + name)
sys.meta_path.insert(0, Block())
from geomgen.drawings import write_shop_drawings
files = write_shop_drawings({str(spec)!r}, {str(tmp_path / "out")!r})
assert not any(m.split('.')[0] in ('cadquery', 'OCP') for m in sys.modules)
print(len(files))
"""
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert res.returncode == 0, res.stderr
    assert int(res.stdout) == 8  # templates dxf + svg + pdf, offsets csv, one panel txt + dxf + gcode, the summary


def test_same_spec_same_drawing_bytes(tmp_path):
    """Templates (DXF, SVG, PDF), offsets, hot-wire files and the manifest are byte-identical
    across runs: no time stamps or random ids in them (the PDF and DXF once carried both)."""
    from conftest import DEMO, snapshot

    a, b = tmp_path / "a", tmp_path / "b"
    write_shop_drawings(DEMO, a)
    write_shop_drawings(DEMO, b)
    sa, sb = snapshot(a), snapshot(b)
    assert sa.keys() == sb.keys() and any(k.endswith(".pdf") for k in sa) and any(k.endswith(".dxf") for k in sa)
    assert [k for k in sa if sa[k] != sb[k]] == []


def test_templates_offsets_and_the_check_agree_on_the_chord(write_spec, tmp_path):
    """NACA 4415 typed at 240 mm: the template's chord line is 240 mm from the leading edge, its
    outline reaches ahead of it (Abbott & von Doenhoff §6.4: the upper surface laid square to
    the mean line) and the label says both lengths; the offset table starts at that foremost
    point and gives the chord as typed; the check's intended chord is the same 240 mm."""
    from scipy.spatial.distance import pdist

    from geomgen.geometry.figures import section_figures

    spec, _ = _write(write_spec, tmp_path, section='naca = "4415"', te=0.3,
                     stations=[dict(y=0, chord=240), dict(y=500, chord=120)])
    model = build_models(load_spec(spec))[0]
    doc = ezdxf.readfile(tmp_path / "out" / "drawings/t-w-templates.dxf")
    ents = dict((name, list(g)) for name, g in doc.groups)["template y=0"]
    (outline,) = [e for e in ents if e.dxftype() == "LWPOLYLINE"]
    (cl,) = [e for e in ents if e.dxf.layer == "chord-line"]
    pts = np.array(list(outline.get_points("xy"))) - [cl.dxf.start.x, cl.dxf.start.y]
    assert cl.dxf.end.x - cl.dxf.start.x == pytest.approx(240.0, abs=1e-9)
    extent = float(pdist(pts).max())
    assert 240.1 < extent < 240.3 and pts[:, 0].min() < -0.1
    text = " ".join(e.dxf.text for e in ents if e.dxftype() == "TEXT")
    assert "chord 240.00 mm" in text and f"outline {extent:.2f} end to end" in text
    rows = [r for r in _csv_rows(tmp_path / "out" / "drawings/t-w-offsets.csv") if float(r["y_mm"]) == 0.0]
    assert float(rows[0]["x_mm"]) == pytest.approx(pts[:, 0].min(), abs=0.01)
    assert float(rows[0]["thickness_mm"]) == 0.0
    assert all(float(r["chord_mm"]) == 240.0 for r in rows)
    f = section_figures(model, 0.0)
    assert f["chord_mm"] == pytest.approx(240.0, abs=1e-6) and f["extent_mm"] == pytest.approx(extent, abs=0.01)
