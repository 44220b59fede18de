"""The check pass: figures measured from the written files against textbook formulas and
against the intended geometry; verdicts and exit codes (slow: builds with the kernel)."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner
from conftest import DEMO, wing_spec

from geomgen.check.run import check
from geomgen.cli import main

pytestmark = pytest.mark.slow


def measured(res, part, fig):
    (r,) = [r for r in res.records if r.part == part and r.figure == fig]
    return r


def test_trapezoid_measured_against_raymer(tmp_path, write_spec):
    """Straight taper with sweep, measured from the STEP: S = (b/2)(cr+ct),
    MAC = (2/3)cr(1+λ+λ²)/(1+λ), ȳ = (b/6)(1+2λ)/(1+λ), x_LE(MAC) = x_LE,root + ȳ tanΛ_LE
    (Raymer, Aircraft Design: A Conceptual Approach §7.3): within 0.05 %."""
    cr, ct, half, xt = 200.0, 80.0, 400.0, 60.0  # reference 0: x offsets move the leading edge
    p = write_spec(wing_spec(te=0.0, reference=0.0, stations=[dict(y=0, chord=cr), dict(y=half, chord=ct, x=xt)]))
    res = check(p, tmp_path / "o", write_record=False)
    lam, b = ct / cr, 2 * half
    ybar = b / 6 * (1 + 2 * lam) / (1 + lam)
    expect = {"projected_area_cm2": b / 2 * (cr + ct) / 100,
              "mac_mm": 2 / 3 * cr * (1 + lam + lam**2) / (1 + lam),
              "mac_y_mm": ybar,
              "mac_le_x_mm": 0.0 + ybar * xt / half}
    for fig, val in expect.items():
        r = measured(res, "w", fig)
        for m in (r.step, r.stl):
            assert m == pytest.approx(val, rel=5e-4, abs=0.05 if fig == "mac_le_x_mm" else 0), (fig, m, val)
    assert measured(res, "w", "mac_le_x_mm").step == pytest.approx(expect["mac_le_x_mm"], abs=0.02)
    assert res.ok


def test_elliptic_planform(tmp_path, write_spec):
    """Elliptic planform (quarter-chord line straight; the rounded tip closes it to 3 % of c0):
    S = πbc₀/4 and MAC = 8c₀/(3π) (Raymer §7.3), measured from the STEP within 0.1 %."""
    c0, h = 160.0, 400.0
    extra = f'tip = "round"\ntip_length = {h - 0.5}\ntip_end = 0.03\nloft_sections = 60'
    p = write_spec(wing_spec(te=0.0, extra=extra,
                             stations=[dict(y=0, chord=c0), dict(y=0.5, chord=c0 * math.sqrt(1 - (0.5 / h) ** 2))]))
    res = check(p, tmp_path / "o", write_record=False)
    area = measured(res, "w", "projected_area_cm2").step
    mac = measured(res, "w", "mac_mm").step
    assert area == pytest.approx(math.pi * 2 * h * c0 / 4 / 100, rel=1e-3)
    assert mac == pytest.approx(8 * c0 / (3 * math.pi), rel=1e-3)


def test_volume_against_integral_of_the_naca_formula(tmp_path, write_spec):
    """Measured STEP volume within 0.1 % of ∫A(y)dy with A = k t c², k = 2∫y_t dx integrated
    numerically from the NACA Report 460 formula (closed edge); STL within its tolerance."""
    from scipy.integrate import quad

    from geomgen.sections.naca import thickness

    k = 2 * quad(lambda x: thickness(x, 1.0, True), 0, 1, limit=200)[0]
    p = write_spec(wing_spec(te=0.0, mirror=False, section='naca = "0012"\nclosed_te = true',
                             stations=[dict(y=0, chord=200), dict(y=300, chord=150), dict(y=450, chord=60)]))
    res = check(p, tmp_path / "o", write_record=False)
    def c2(a, b, ca, cb):  # ∫c² for linear c
        return (b - a) * (ca**2 + ca * cb + cb**2) / 3
    exact = k * 0.12 * (c2(0, 300, 200, 150) + c2(300, 450, 150, 60)) / 1000
    r = measured(res, "w", "volume_cm3")
    assert r.step == pytest.approx(exact, rel=1e-3)
    assert abs(r.stl - exact) <= r.tol_stl


@pytest.mark.slow
@pytest.mark.parametrize("te,tip,mirror,interp", [(0.0, "flat", False, "linear"), (0.6, "flat", True, "linear"),
                                                  (0.4, "round", True, "smooth"), (1.0, "round", False, "linear")])
def test_wetted_area_from_the_file_skin_matches_the_kernel_at_tight_accuracy(tmp_path, te, tip, mirror, interp):
    """The measured wetted area (skin, trailing-edge strip and end caps by quadrature of the
    file's own poles) agrees with the CAD kernel's surface integral of the same file asked
    for 1e-8 relative accuracy (slow there, hence not used in the check) to 1e-5."""
    from geomgen.cad.loft import area_mm2
    from geomgen.cad.measure import measure_step, read_step
    from geomgen.check.measure import skin_surface_area

    stations = [dict(y=0, chord=200), dict(y=150, chord=180, x=15, z=5, twist=-1), dict(y=400, chord=90, x=60, z=-20)]
    spec = wing_spec(te=te, mirror=mirror, interpolation=interp, section='naca = "4412"', stations=stations)
    spec = spec.replace("reference = 0.25", f'reference = 0.25\ntip = "{tip}"')
    p = tmp_path / "w.toml"
    p.write_text(spec)
    res = check(p, tmp_path / "o", write_record=False)
    step = next((tmp_path / "o").rglob("*.step"))
    ((_, solid),), (ms,) = read_step(step), measure_step(step)
    kernel = area_mm2(solid, 1e-8)
    assert skin_surface_area(ms.skin) == pytest.approx(kernel, rel=1e-5)
    assert measured(res, "w", "wetted_area_cm2").step == pytest.approx(kernel / 100, rel=1e-5)


def test_wetted_area_of_a_box_skin_is_its_six_faces():
    """A bilinear skin around a 100 × 20 section loop, 300 long (open at one chord edge, which the
    strip closes; caps at both ends): the area is the box's, 2(100·300 + 20·300 + 100·20)."""
    from geomgen.check.measure import skin_surface_area
    from geomgen.geometry.skin import Skin

    # loop: (100,0,+10) -> (0,0,+10) -> (0,0,-10) -> (100,0,-10), the strip closes x = 100
    loop = np.array([[100, 0, 10], [0, 0, 10], [0, 0, -10], [100, 0, -10]], float)
    poles = np.stack([loop + [0, y, 0] for y in (0.0, 300.0)], axis=1)  # (4, 2, 3)
    skin = Skin(tu=np.array([0, 0, 1 / 3, 2 / 3, 1, 1.0]), tv=np.array([0, 0, 1, 1.0]), poles=poles, du=1, dv=1)
    assert skin_surface_area(skin) == pytest.approx(2 * (100 * 300 + 20 * 300 + 100 * 20), rel=1e-12)


def test_wrong_expectation_fails_with_exit_1_and_names_it(tmp_path, write_spec):
    p = write_spec(wing_spec(extra="[surface.expect]\nmac_mm = { value = 150.0, tol = 0.5 }"))
    r = CliRunner().invoke(main, ["check", str(p), "-o", str(tmp_path / "o")])
    assert r.exit_code == 1
    assert 'EXPECTATION FAILED: surface "w" MAC: expected 150 ± 0.5 mm, measured 155.5' in r.output
    assert "CAUTION" in r.output


def test_scaled_step_is_caught_as_a_geometry_fault(tmp_path):
    """A STEP scaled by 1.01 after the build (hand edit, wrong export) must not pass."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
    from OCP.gp import gp_Pnt, gp_Trsf

    from geomgen.cad.export import write_step
    from geomgen.cad.readback import read_step

    out = tmp_path / "o"
    first = check(DEMO, out, write_record=False)
    assert first.ok
    path = out / "cad/lakeside-cruiser-stabilizer.step"
    (name, solid), = read_step(path)
    tr = gp_Trsf()
    tr.SetScale(gp_Pnt(0, 0, 0), 1.01)
    scaled = BRepBuilderAPI_Transform(solid, tr, True).Shape()

    class Fake:
        pass

    fake = Fake()
    fake.name, fake.solid = name, scaled
    write_step([fake], path, {})
    res = check(DEMO, out, write_record=False)
    assert not res.ok and not res.built
    assert "cad/lakeside-cruiser-stabilizer.step" in res.modified
    faulty = {r.figure for r in res.faults if r.part == "stabilizer"}
    assert {"span_mm", "mac_mm", "volume_cm3", "projected_area_cm2"} <= faulty
    assert not any(r.part == "front-wing" for r in res.faults)


def test_check_at_stations_and_record_files(tmp_path, write_spec):
    """Named stations: chord, thickness and profile at 100 and 200 mm, as a shop measures."""
    extra = ("[[surface.check_at]]\ny = 100.0\nchord = { value = 175.0, tol = 0.5 }\n"
             "thickness = { value = 21.0, tol = 0.2 }\nprofile_tol = 0.25\n"
             "[[surface.check_at]]\ny = 200.0\nchord = { value = 140.0, tol = 0.5 }\nprofile_tol = 0.25\n")
    p = write_spec(wing_spec(te=0.5, extra=extra, stations=[dict(y=0, chord=200), dict(y=400, chord=100)]))
    res = check(p, tmp_path / "o")
    # linear taper: chord 175 at 100 mm (exact), thickness 12 % of it = 21.0 (NACA 0012, max t = t)
    assert measured(res, "w", "chord@100").step == pytest.approx(175.0, abs=0.05)
    assert measured(res, "w", "thickness@100").step == pytest.approx(21.0, abs=0.05)
    assert measured(res, "w", "chord@200").verdict == "FAIL"  # 150 mm, not 140
    prof = measured(res, "w", "profile@100")
    assert prof.step < 0.01 and prof.verdict == "pass"
    assert (tmp_path / "o" / "report/t-check.md").read_text().startswith("# Check record: t")
    data = json.loads((tmp_path / "o" / "report/t-check.json").read_text())
    assert data["ok"] is False and any(r["figure"] == "chord@200" for r in data["records"])
    manifest = json.loads((tmp_path / "o" / "geomgen-manifest.json").read_text())
    assert {"cad/t-w.step", "report/t-check.md"} <= {f["name"] for f in manifest["files"]}


def test_check_json_and_reuse(tmp_path):
    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["check", str(DEMO), "-o", str(out), "--json"])
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert data["ok"] and data["built"]
    # the balance from the same geometry model rides along (the demo has a [flight] table)
    assert data["balance"]["neutral_point_x_mm"] < 0 and len(data["balance"]["trim"]) == 4
    again = json.loads(CliRunner().invoke(main, ["check", str(DEMO), "-o", str(out), "--json"]).stdout)
    assert again["built"] is False  # fresh outputs are reused, not rebuilt


def test_check_without_a_mast_states_positions_from_the_datum_origin(tmp_path, write_spec):
    """A wing alone with a [flight] table is a normal spec: the check writes its
    record, and the balance lines place the neutral point and the centre of pressure from the
    datum origin (there is no mast to measure from)."""
    from geomgen.check.text import format_terminal

    text = wing_spec(te=0.0, stations=[dict(y=0, chord=150), dict(y=300, chord=100)])
    p = write_spec(text + "[flight]\nmass_kg = 60.0\nspeeds_kmh = [20.0, 25.0]\n")
    res = check(p, tmp_path / "o")
    assert res.balance["neutral_point_from_mast_mm"] is None
    md = (tmp_path / "o" / "report/t-check.md").read_text()
    assert json.loads((tmp_path / "o" / "report/t-check.json").read_text())["balance"] is not None
    for page in (md, format_terminal(res)):
        assert "the datum origin" in page and "the mast" not in page.split("CAUTION")[0].split("Balance")[-1]
    x = res.balance["neutral_point_x_mm"]
    assert f"{abs(x):.1f} mm {'ahead of' if x < 0 else 'behind'} the datum origin" in md
