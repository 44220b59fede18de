"""The balance never breaks and says when a set leaves what a rider can ride: speeds that do
not trim are reported with the reason, every plausibility guard warns (text, JSON, report)
and ends the usable envelope, the weight has one position, and every command of a set trims
in the same water."""

from __future__ import annotations

import json
import math
import re

import pytest
from click.testing import CliRunner
from conftest import DEMO

from geomgen.cli import main
from geomgen.errors import SpecError
from geomgen.geometry.model import build_models
from geomgen.hydro import analyse_spec, format_hydro
from geomgen.hydro.guards import CP_SHIFT_MM, SHIM_RANGE_DEG, STABILIZER_SHARE, dimension_warnings
from geomgen.spec import load_spec_text
from geomgen.starter import STARTER

G = 9.80665
DEMO_TEXT = DEMO.read_text()
NAN = re.compile(r"\bnan\b", re.IGNORECASE)


def demo_with(**flight) -> str:
    """The demo spec's text with [flight] lines replaced or added (values as TOML text)."""
    text = DEMO_TEXT
    for k, v in flight.items():
        pat = re.compile(rf"^{k} = .*$", re.MULTILINE)
        if v is None:
            text = pat.sub("", text)
        elif pat.search(text):
            text = pat.sub(f"{k} = {v}", text)
        else:
            text += f"\n{k} = {v}\n"
    return text


def run(text: str):
    return analyse_spec(load_spec_text(text))


def kinds(r) -> list[str]:
    return [w["kind"] for w in r.warnings]


def no_nan(r) -> str:
    """The text and JSON of a result, asserted free of NaN; returns the text."""
    text = format_hydro(r)
    assert not NAN.search(text), [line for line in text.splitlines() if NAN.search(line)]
    json.dumps(r.as_dict(), allow_nan=False)
    return text


@pytest.fixture(scope="module")
def demo():
    return run(DEMO_TEXT)


# -- reproductions ---------------------------------------------------------------------------
def test_cruise_below_any_trim_with_a_shim_target_is_reported_not_raised(tmp_path):
    """cruise 5 km/h with stabilizer_lift_kgf = -2 stopped with a traceback (exit 1)."""
    p = tmp_path / "slow.toml"
    p.write_text(demo_with(cruise_kmh="5.0"))
    r = CliRunner().invoke(main, ["balance", str(p)])
    assert r.exit_code == 0 and r.exception is None or isinstance(r.exception, SystemExit), r.output
    assert "Traceback" not in r.output and not NAN.search(r.output)
    assert "not trimmable at 5 km/h: the set would need a lift coefficient of" in r.output
    assert "no shim: not trimmable at 5 km/h" in r.output and "shim it" not in r.output
    j = json.loads(CliRunner().invoke(main, ["balance", str(p), "--json"]).stdout)
    assert j["stance"]["shim_deg"] is None and j["stance"]["mast_move_mm"] is None
    assert any(w["kind"] == "not_trimmable" and w["speed_kmh"] == 5.0 for w in j["warnings"])
    assert len([t for t in j["trim"] if t["trimmable"]]) == 4  # the other speeds still computed


def test_mast_move_without_a_shim_target_has_no_nan():
    r = run(demo_with(cruise_kmh="5.0", stabilizer_lift_kgf=None))
    text = no_nan(r)
    assert "no mast move: not trimmable at 5 km/h" in text and "slide the mast" not in text


def test_a_trim_speed_below_takeoff_is_a_row_with_its_reason():
    r = run(demo_with(speeds_kmh="[5.0, 9.0, 22.0]"))
    text = no_nan(r)
    t5, t9, t22 = r.trim
    assert not t5.trimmable and not t9.trimmable and t22.trimmable
    assert t9.reason.startswith("not trimmable at 9 km/h: 'front-wing' would need a section cl of")
    assert f"past its cl max 1.1, below the estimated takeoff at {r.takeoff.speed_kmh:.1f} km/h" in t9.reason
    rows = [line for line in text.splitlines() if line.lstrip().startswith(("5.0  not", "9.0  not"))]
    assert len(rows) >= 2  # in the trim table (and the mast-move table)
    assert t22.attitude_deg == pytest.approx(1.68, abs=0.01)


def test_cruise_below_takeoff_warns_and_gives_no_shim():
    """At cruise 9 km/h, under its takeoff estimate, the shim was advised without a word."""
    r = run(demo_with(cruise_kmh="9.0"))
    text = no_nan(r)
    assert "warning: cruise speed: not trimmable at 9 km/h" in text and "below the estimated takeoff" in text
    assert r.stance.shim_deg is None
    assert "not_trimmable" not in kinds(run(DEMO_TEXT))


def test_every_attitude_figure_is_left_out_of_an_untrimmable_row():
    r = run(demo_with(speeds_kmh="[2.0, 22.0]"))
    t = r.trim[0].as_dict()
    assert t["trimmable"] is False and t["attitude_deg"] is None and t["cp_x_mm"] is None
    assert t["lift_n"] == {"front-wing": None, "stabilizer": None}
    assert r.free_surface.as_dict()["trim"][0]["attitude_change_deg"] is None
    assert [p["speed_kmh"] for p in r.performance.points] == [22.0]
    assert r.cavitation.margin_at_speeds[0]["front-wing"] is None


# -- the guards: each triggered once, and not ------------------------------------------------
def test_stabilizer_share_guard(demo):
    assert "stabilizer_share" not in kinds(demo)
    r = run(demo_with(speeds_kmh="[22.0, 34.0]"))
    w = [w for w in r.warnings if w["kind"] == "stabilizer_share"]
    assert [x["speed_kmh"] for x in w] == [34.0]
    t = r.trim[1]
    assert abs(t.lift_n["stabilizer"]) > STABILIZER_SHARE * 85.0 * G
    assert f"{abs(t.lift_kgf['stabilizer']):.1f} kgf" in w[0]["message"]


def test_centre_of_pressure_travel_guard(demo):
    """At 40 km/h the net centre of pressure sits far forward of its cruise place."""
    assert "cp_travel" not in kinds(demo)
    r = run(demo_with(speeds_kmh="[16.0, 22.0, 40.0]"))
    w = [w for w in r.warnings if w["kind"] == "cp_travel"]
    assert [x["speed_kmh"] for x in w] == [40.0]
    assert r.trim[0].cp_x_mm - r.trim[2].cp_x_mm > CP_SHIFT_MM and "forward" in w[0]["message"]


def test_track_travel_guard(demo):
    assert "track_travel" not in kinds(demo) and abs(demo.stance.mast_move_mm) < 50.0
    far = run(demo_with(rider_from_mast_mm="-340.0"))
    w = [w for w in far.warnings if w["kind"] == "track_travel"]
    assert len(w) == 1 and f"{far.stance.mast_move_mm / 10:+.1f} cm" in w[0]["message"]
    assert abs(far.stance.mast_move_mm) > 50.0
    longer = run(demo_with(rider_from_mast_mm="-340.0", track_travel_mm="120.0"))
    assert "track_travel" not in kinds(longer)


def test_shim_range_guard(demo):
    assert "shim_range" not in kinds(demo) and abs(demo.stance.shim_deg) < SHIM_RANGE_DEG
    r = run(demo_with(stabilizer_lift_kgf="-12.0"))
    assert abs(r.stance.shim_deg) > SHIM_RANGE_DEG
    w = [w for w in r.warnings if w["kind"] == "shim_range"]
    assert len(w) == 1 and f"{r.stance.shim_deg:+.2f}°" in w[0]["message"]


def test_part_size_guard_names_metres_and_inches(demo):
    assert "part_size" not in kinds(demo)
    # a wing of two stations typed in metres, another in inches
    spec = load_spec_text(wing_in("metres", 1.0, 0.2))
    msgs = [w["message"] for w in dimension_warnings(build_models(spec))]
    assert any("span 2 mm: did you mean 2000 mm (typed in metres)?" in m for m in msgs), msgs
    spec = load_spec_text(wing_in("inches", 15.0, 7.0))
    msgs = [w["message"] for w in dimension_warnings(build_models(spec))]
    assert any("span 30 mm: did you mean 762 mm (typed in inches)?" in m for m in msgs), msgs
    assert any("largest chord 7 mm: did you mean 177.8 mm (typed in inches)?" in m for m in msgs), msgs
    r = analyse_spec(load_spec_text(wing_in("metres", 1.0, 0.2)))
    assert "part_size" in kinds(r)
    no_nan(r)


def wing_in(unit: str, half_span: float, chord: float) -> str:
    """The demo with its front wing replaced by a two-station wing typed in other units."""
    a = DEMO_TEXT.index('[[surface]]\nname = "front-wing"')
    b = DEMO_TEXT.index('[[surface]]\nname = "stabilizer"')
    wing = (f'[[surface]]\nname = "front-wing"\nrole = "wing"\nmirror = true\nposition = [-0.27, 0.0, -0.03]\n'
            f'te_thickness = 0.0\n[[surface.station]]\ny = 0.0\nchord = {chord}\nsection = "wing-root"\n'
            f'[[surface.station]]\ny = {half_span}\nchord = {chord / 2}\nsection = "wing-tip"\n\n')
    return DEMO_TEXT[:a] + f"# front wing typed in {unit}\n" + wing + DEMO_TEXT[b:]


def test_cavitation_guard(demo):
    assert "cavitation" not in kinds(demo)
    r = run(demo_with(speeds_kmh="[22.0, 60.0]"))
    assert [w["speed_kmh"] for w in r.warnings if w["kind"] == "cavitation"] == [60.0]


def test_loads_warn_past_the_section_cl_max(tmp_path):
    """loads --speed 15 --load-factor 3 ran past the section cl max without a word."""
    args = ["--material", "pla-printed", "-o", str(tmp_path), "--json"]
    j = json.loads(CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "15", "--load-factor", "3"] + args).stdout)
    w = [w for w in j["warnings"] if w["kind"] == "past_cl_max"]
    assert w and "front-wing" in w[0]["message"] and "past its cl max 1.1" in w[0]["message"]
    assert abs(j["condition"]["cl_peak"]["front-wing"]) > 1.1
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "22", "--load-factor", "1"] + args[:-1])
    assert r.exit_code == 0 and "warning:" not in r.output and "water: free surface at z = 600 mm" in r.output


# -- the envelope ends at the first guard --------------------------------------------------
def test_envelope_ends_where_the_first_guard_says(demo):
    pf = demo.performance
    lo, hi = pf.envelope_kmh
    assert lo == pytest.approx(demo.takeoff.speed_kmh) and pf.envelope_reasons[0] == "the takeoff estimate"
    assert hi < demo.cavitation.first_kmh and "stabilizer" in pf.envelope_reasons[1]
    # just inside the end the stabilizer is within its share, just outside beyond it
    r_in, r_out = run(demo_with(speeds_kmh=f"[{hi - 0.2:.2f}]")), run(demo_with(speeds_kmh=f"[{hi + 0.2:.2f}]"))
    assert abs(r_in.trim[0].lift_n["stabilizer"]) <= STABILIZER_SHARE * 85.0 * G
    assert abs(r_out.trim[0].lift_n["stabilizer"]) > STABILIZER_SHARE * 85.0 * G
    assert f"to {hi:.1f} km/h (" in format_hydro(demo)


# -- one weight position ----------------------------------------------------------------------
def test_rider_position_weight_x_and_cg_give_one_static_margin(demo, tmp_path):
    mast_x = demo.reference["mast_x_mm"]
    assert demo.cg_source == "flight.rider_from_mast_mm" and demo.cg_x_mm == pytest.approx(mast_x - 240.0)
    by_x = run(demo_with(rider_from_mast_mm=None, weight_x_mm=f"{mast_x - 240.0}"))
    by_cg = analyse_spec(load_spec_text(demo_with(rider_from_mast_mm=None)), cg_x_mm=mast_x - 240.0)
    assert by_x.cg_source == "flight.weight_x_mm" and by_cg.cg_source == "--cg"
    for r in (by_x, by_cg):
        assert r.static_margin_pct == pytest.approx(demo.static_margin_pct)
        assert r.stance.mast_move_mm == pytest.approx(demo.stance.mast_move_mm)
    assert "(from flight.rider_from_mast_mm)" in format_hydro(demo)
    with pytest.raises(SpecError) as e:
        load_spec_text(demo_with(weight_x_mm="-240.0"))
    assert "weight_x_mm or rider_from_mast_mm, not both" in str(e.value)


# -- one water ---------------------------------------------------------------------------------
def test_loads_and_balance_trim_in_the_same_water(demo, tmp_path):
    """loads trimmed in deep water (1.606°), balance with the free surface (1.679°) at 22 km/h."""
    j = json.loads(CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "22", "--load-factor", "1", "--material",
                                             "pla-printed", "-o", str(tmp_path), "--json"]).stdout)
    t = next(t for t in demo.trim if t.speed_kmh == 22.0)
    assert j["condition"]["attitude_deg"] == pytest.approx(t.attitude_deg, abs=1e-6)
    want = f"free surface at z = {demo.water['surface_z_mm']:.0f} mm ({demo.water['surface']})"
    assert j["condition"]["water"] == want
    assert "Water: free surface at z = 600 mm" in format_hydro(demo)
    deep = run(demo_with(ride_height_mm=None))
    assert deep.water["free_surface"] is False and "Water: no ride_height_mm or depth_mm" in format_hydro(deep)


# -- the starter is a plausible foil ------------------------------------------------------------
def test_starter_is_a_plausible_foil_held_to_every_guard():
    """Common practice, no source: the stabilizer pushes down a few per cent of the weight at
    cruise (1-5 %); takeoff and cruise lie inside the usable envelope; no guard warns."""
    r = analyse_spec(load_spec_text(STARTER))
    assert r.warnings == [], r.warnings
    weight = r.mass_kg * G
    cruise = next(t for t in r.trim if t.speed_kmh == r.stance.cruise_kmh)
    assert 0.01 * weight <= -cruise.lift_n["stabilizer"] <= 0.05 * weight
    lo, hi = r.performance.envelope_kmh
    assert lo == pytest.approx(r.takeoff.speed_kmh) and lo < min(t.speed_kmh for t in r.trim)
    assert max(t.speed_kmh for t in r.trim) < hi
    assert r.static_margin_pct > 0 and r.free_surface is not None


# -- no NaN, no traceback, over the speeds -------------------------------------------------------
COARSE = "span_panels = 4\nchord_panels = 2\n"


@pytest.mark.parametrize("name,text", [("demo", DEMO_TEXT), ("starter", STARTER)])
def test_cruise_speeds_1_to_80_kmh_never_break(name, text):
    """Every cruise (and trim) speed from 1 to 80 km/h: figures or a reason, never NaN or a traceback
    (a coarse lattice, for time: the same code)."""
    base = text.rstrip() + "\n" + COARSE
    cruise = re.compile(r"^cruise_kmh = .*$", re.MULTILINE)
    speeds = re.compile(r"^speeds_kmh = .*$", re.MULTILINE)
    for v in range(1, 81):
        t = speeds.sub(f"speeds_kmh = [{v}.0, 22.0]", cruise.sub(f"cruise_kmh = {v}.0", base))
        r = run(t)
        no_nan(r)
        tp = r.trim[0]
        assert tp.trimmable or tp.reason.startswith(f"not trimmable at {v} km/h")
        if not tp.trimmable:
            assert any(w["kind"] == "not_trimmable" and w["speed_kmh"] == v for w in r.warnings)


@pytest.mark.parametrize("speed", ["1.0", "9.0", "40.0", "80.0"])
def test_balance_command_at_odd_cruise_speeds(tmp_path, speed):
    p = tmp_path / "s.toml"
    p.write_text(demo_with(cruise_kmh=speed))
    for extra in ([], ["--json"]):
        r = CliRunner().invoke(main, ["balance", str(p)] + extra)
        assert r.exit_code == 0 and "Traceback" not in r.output and not NAN.search(r.output), r.output[-2000:]


def test_property_any_speed_mass_and_shim_never_breaks():
    """Hypothesis over the whole allowed range of speed, mass, wanted stabilizer lift and the
    stabilizer's incidence: a result without NaN, never an exception."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    base = DEMO_TEXT.rstrip() + "\n" + COARSE

    @settings(max_examples=30, deadline=None, suppress_health_check=list(HealthCheck), derandomize=True)
    @given(speed=st.floats(0.1, 200.0), cruise=st.floats(0.1, 200.0), mass=st.floats(0.5, 1000.0),
           stab_kgf=st.floats(-500.0, 500.0), incidence=st.floats(-30.0, 30.0))
    def check(speed, cruise, mass, stab_kgf, incidence):
        t = (base.replace("speeds_kmh = [14.0, 18.0, 22.0, 26.0]", f"speeds_kmh = [{speed!r}]")
             .replace("cruise_kmh = 22.0", f"cruise_kmh = {cruise!r}")
             .replace("mass_kg = 85.0", f"mass_kg = {mass!r}")
             .replace("stabilizer_lift_kgf = -2.0", f"stabilizer_lift_kgf = {stab_kgf!r}")
             .replace("incidence = 2.5", f"incidence = {incidence!r}"))
        r = run(t)
        no_nan(r)
        st_ = r.stance
        assert st_.shim_deg is None or (math.isfinite(st_.shim_deg) and abs(st_.shim_deg) <= 15.0)

    check()


# -- command-line mistakes are usage errors ------------------------------------------------------
def test_unknown_material_is_a_usage_error_with_the_closest_name(tmp_path):
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "20", "--load-factor", "1", "--material",
                                  "carbon-ud", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "usage error:" in r.output and "spec error" not in r.output
    assert "closest: 'carbon-epoxy-ud'" in r.output and "aluminium-6061-t6" in r.output
    r = CliRunner().invoke(main, ["loads", str(DEMO), "--speed", "20", "--load-factor", "1", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "usage error: name a material" in r.output
    r = CliRunner().invoke(main, ["--no-such-flag", "balance", str(DEMO)])
    assert r.exit_code == 2 and "usage error:" in r.output
    r = CliRunner().invoke(main, [])
    assert "usage error" not in r.output and "Usage:" in r.output  # no arguments: the help


# -- the report shows them ----------------------------------------------------------------------
def report_html(tmp_path, text: str) -> tuple[dict, str]:
    from test_report import fake_check

    from geomgen.project import Project
    from geomgen.report import render_files, report_data

    tmp_path.mkdir(parents=True, exist_ok=True)
    spec = tmp_path / "demo.toml"
    spec.write_text(text)
    res = fake_check(spec, tmp_path / "out")
    project = Project(spec, tmp_path / "out")
    project.memo("check.result", lambda: res)
    data = report_data(project)
    import html

    return data, html.unescape(render_files(data)["report/lakeside-cruiser-report.html"].decode())


def test_report_shows_warnings_envelope_reasons_weight_and_water(tmp_path):
    data, html = report_html(tmp_path / "a", demo_with(speeds_kmh="[16.0, 22.0, 40.0]"))
    b = data["balance"]
    assert [w["kind"] for w in b["warnings"]] == ["stabilizer_share", "cp_travel"]
    assert "Plausibility warnings" in html and b["warnings"][1]["message"] in html
    env = b["performance"]["envelope_reasons"]
    assert env[0] == "the takeoff estimate" and "stabilizer" in env[1] and env[1] in html
    assert b["cg_source"] == "flight.rider_from_mast_mm" and "No centre of gravity given" not in html
    assert b["static_margin_pct"] is not None and b["water_surface"] in html
    data, html = report_html(tmp_path / "b", demo_with(speeds_kmh="[5.0, 22.0]"))
    assert data["balance"]["trim"][0]["reason"] in html  # the row of a speed that does not trim
    assert not NAN.search(html)
    data, html = report_html(tmp_path / "c", DEMO_TEXT)
    assert data["balance"]["warnings"] == [] and "None: every trim speed trims" in html


@pytest.mark.slow
def test_check_of_a_set_with_an_untrimmable_cruise_keeps_its_exit_code(tmp_path):
    """check stopped with a traceback and exit 1 (the 'check failed' code) at cruise 5 km/h."""
    p = tmp_path / "slow.toml"
    p.write_text(demo_with(cruise_kmh="5.0"))
    r = CliRunner().invoke(main, ["check", str(p), "-o", str(tmp_path / "out")])
    assert r.exit_code == 0 and "Traceback" not in r.output, r.output[-3000:]
    assert "warning: cruise speed: not trimmable at 5 km/h" in r.output and not NAN.search(r.output)
    assert "water: free surface at z = 600 mm" in r.output


def test_study_option_mistakes_are_usage_errors(tmp_path):
    r = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "flight.mass_kg", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "usage error: Invalid value for --vary" in r.output
    r = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "flight.mass_kg=80,90", "--plot",
                                  "stab_lift:flight.mass_kg", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "usage error:" in r.output and "closest output: 'stab_lift_n'" in r.output
    r = CliRunner().invoke(main, ["compare", str(DEMO), "--change", "wobble", "-o", str(tmp_path)])
    assert r.exit_code == 2 and "usage error: Invalid value for --change: change 'wobble'" in r.output


@pytest.mark.slow
def test_build_of_a_wing_typed_in_metres_says_so(tmp_path):
    """A wing typed in metres was built without a word (span 1.0 mm, area 0.0 cm²)."""
    p = tmp_path / "metres.toml"
    p.write_text(wing_in("metres", 1.0, 0.2))
    r = CliRunner().invoke(main, ["build", str(p), "-o", str(tmp_path / "out")])
    assert r.exit_code == 0, r.output
    line = 'warning: wing "front-wing": span 2 mm: did you mean 2000 mm (typed in metres)?'
    assert line in r.output and line in (tmp_path / "out/report/lakeside-cruiser-build.txt").read_text()
    r = CliRunner().invoke(main, ["build", str(DEMO), "-o", str(tmp_path / "demo")])
    assert r.exit_code == 0 and "warning:" not in r.output
