"""First estimates of strength and stiffness: the beam figures of real parts against closed
forms (Roark, Formulas for Stress and Strain: cantilever end load F L³/(3EI), uniform load
w L⁴/(8EI), torsion T L/(GJ)); the loads command's refusals and outputs."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner
from conftest import DEMO, wing_spec

from geomgen.cli import main
from geomgen.geometry import build_models
from geomgen.geometry.sectionprops import model_section_properties
from geomgen.hydro.loading import StripLoads
from geomgen.spec import load_spec_text
from geomgen.strength import MATERIALS, material_of
from geomgen.strength.estimate import mast_estimate, wing_estimate

ALU = MATERIALS["aluminium-6061-t6"]


def rect(**kw):
    text = wing_spec(stations=[dict(y=0, chord=150), dict(y=500, chord=150)], te=0.5, **kw)
    return build_models(load_spec_text(text, "t.toml"))[0]


def test_uniform_rectangular_wing_against_the_closed_form_beam():
    # constant section: a uniform running load w on a cantilever of length L gives root
    # moment w L²/2, tip deflection w L⁴/(8 E I); a load through the centroid gives no twist
    m = rect(mirror=True)
    p = model_section_properties(m, 0.0)
    n, L, w = 400, 500.0, 0.8  # N/mm
    y = (np.arange(n) + 0.5) * L / n
    c = np.array([p.centroid_x_mm - 0.25 * 150, 0.0, 0.0])  # the reference point sits at 25 % chord
    pts = np.column_stack([np.full(n, c[0]), y, np.zeros(n)])
    f = np.tile([0.0, 0.0, w * L / n], (n, 1))
    strips = StripLoads("w", "wing", y, np.full(n, L / n), f[:, 2], pts, f)
    r = wing_estimate(m, strips, ALU)
    ei = ALU.e_gpa * 1e3 * p.i_chord_mm4
    assert r["root_moment_nm"] * 1e3 == pytest.approx(w * L**2 / 2, rel=1e-4)
    assert r["tip_deflection_mm"] == pytest.approx(w * L**4 / (8 * ei), rel=2e-3)
    assert r["root_stress_mpa"] == pytest.approx(w * L**2 / 2 / p.w_chord_mm3, rel=1e-4)
    assert abs(r["tip_twist_deg"]) < 1e-3


def test_lift_ahead_of_the_centroid_twists_the_leading_edge_up():
    m = rect(mirror=True)
    p = model_section_properties(m, 0.0)
    L, F, arm = 500.0, 50.0, 20.0
    at = np.array([L - 1e-6])
    x = p.centroid_x_mm - 0.25 * 150 - arm  # force line 20 mm ahead of the centroid
    strips = StripLoads("w", "wing", at, np.array([1.0]), np.array([F]), np.array([[x, L, 0.0]]),
                        np.array([[0.0, 0.0, F]]))
    r = wing_estimate(m, strips, ALU)
    gj = ALU.g_gpa * 1e3 * p.j_solid_mm4
    assert r["root_torque_nm"] == pytest.approx(F * arm * 1e-3, rel=1e-3)
    assert r["tip_twist_deg"] == pytest.approx(math.degrees(F * arm * L / gj), rel=1e-3)


def test_constant_mast_as_a_cantilever():
    # F L³/(3EI) at the fuselage, F L / W at the clamp, torsional stiffness G J / L
    text = wing_spec(name="m", mirror=False, orientation="vertical-down",
                     stations=[dict(y=0, chord=120), dict(y=700, chord=120)], te=0.5)
    text = text.replace('role = "wing"', 'role = "mast"')
    m = build_models(load_spec_text(text, "t.toml"))[0]
    p = model_section_properties(m, 0.0)
    r = mast_estimate(m, ALU, allowable_mpa=100.0)
    E, G, L = ALU.e_gpa * 1e3, ALU.g_gpa * 1e3, 700.0
    assert r["tip_deflection_mm"] == pytest.approx(100 * L**3 / (3 * E * p.i_chord_mm4), rel=1e-4)
    assert r["max_stress_mpa"] == pytest.approx(100 * L / p.w_chord_mm3, rel=1e-4)
    assert r["torsional_stiffness_nm_per_deg"] == pytest.approx(G * p.j_solid_mm4 / L * 1e-3 * math.pi / 180, rel=1e-4)
    assert r["margin"] == pytest.approx(100.0 / r["max_stress_mpa"] - 1)
    exact = 1.8751**2 / (2 * math.pi) * math.sqrt(E * p.i_chord_mm4 * 1e3 / (2700e-9 * p.area_mm2 * L**4))
    assert exact < r["first_bending_hz_bare_in_air"] < 1.01 * exact


def test_material_table_entries_are_marked_examples_with_a_source():
    for m in MATERIALS.values():
        assert m.example and m.source and 0 < m.g_gpa < m.e_gpa
    assert not material_of(None, 40.0, 15.0).example


def test_loads_command_text_json_and_files(tmp_path):
    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "25", "--load-factor", "2", "--material",
                                  "aluminium-6061-t6", "--allowable", "200", "-o", str(out), "--json"])
    assert r.exit_code == 0, r.output
    j = json.loads(r.stdout)
    wing = next(s for s in j["surfaces"] if s["role"] == "wing")
    # half the lift acts a little outboard of an elliptic loading's 4s/(3π) (Katz & Plotkin,
    # lifting-line theory): a tapered wing with a round tip is close to elliptic
    arm = wing["root_moment_nm"] * 1e3 / wing["half_lift_n"]
    assert 0.85 < arm / (4 * wing["length_mm"] / (3 * math.pi)) < 1.15
    assert j["condition"]["total_lift_n"] == pytest.approx(2 * 85 * 9.80665, rel=1e-3)
    assert "margin" in wing and "FIRST ESTIMATES" in j["first_estimate"]
    names = sorted(p.name for p in (out / "report").iterdir())
    assert any(n.endswith("-loads.txt") for n in names) and any(n.endswith("-loads.json") for n in names)
    assert "CAUTION" in (out / "report" / next(n for n in names if n.endswith("-loads.txt"))).read_text()


def test_loads_needs_a_stated_condition_and_a_material(tmp_path, write_spec):
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--material", "aluminium-6061-t6", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "--speed" in r.output
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "20", "--load-factor", "1", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "material" in r.output and "aluminium-6061-t6" in r.output
    spec = write_spec(wing_spec())  # no [flight]: the weight is unknown
    r = CliRunner().invoke(main, ["loads", str(spec), "--speed", "20", "--load-factor", "1", "--material",
                                  "pla-printed", "-o", str(tmp_path / "x")])
    assert r.exit_code == 2 and "flight" in r.output and "Traceback" not in r.output
    assert not (tmp_path / "x" / "report").exists()


def test_loads_honours_the_outside_files_flag(tmp_path):
    from test_cli import outside_spec

    spec = outside_spec(tmp_path)
    args = ["loads", str(spec), "--speed", "20", "--load-factor", "1", "--material", "pla-printed", "-o",
            str(tmp_path / "o")]
    r = CliRunner().invoke(main, args)
    assert r.exit_code == 2 and "outside the spec's folder" in r.output
    r = CliRunner().invoke(main, ["--allow-outside-files"] + args)
    assert "outside the spec's folder" not in r.output and "flight" in r.output  # the next refusal: no [flight]
