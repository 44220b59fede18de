"""Every number in a spec finite, of the right type and in a stated range; accepted but
meaningless values refused. Exit 2 naming the file and the field, nothing written."""

from __future__ import annotations

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen.cli import main

FLIGHT = "[flight]\nmass_kg = 80\nspeeds_kmh = [20]\n"


def refused(tmp_path, text, *fields):
    p = tmp_path / "s.toml"
    p.write_text(text)
    out = tmp_path / "out"
    r = CliRunner().invoke(main, ["balance", str(p), "-o", str(out)])
    assert r.exit_code == 2, r.output
    assert "Traceback" not in r.output and r.exception is None or isinstance(r.exception, SystemExit)
    assert str(p) in r.output
    for f in fields:
        assert f in r.output, (f, r.output)
    assert not out.exists()  # nothing written on refusal
    return r.output


def flight(line):
    return wing_spec().replace("[[surface]]", FLIGHT + line + "\n[[surface]]", 1)


@pytest.mark.parametrize("text,field", [
    (wing_spec(extra="position = [1e20, 0, 0]"), "position[0]"),            # was ZeroDivisionError
    (wing_spec(stations=[dict(y=0, chord=200), dict(y=1e20, chord=100)]), "station[1] y"),
    (wing_spec(stations=[dict(y=0, chord=200), dict(y=400, chord=1e-9)]), "station[1] chord"),
    (wing_spec(stations=[dict(y=0, chord="true"), dict(y=400, chord=100)]), "station[0] chord"),  # was a 1 mm chord
    (wing_spec(stations=[dict(y=0, chord=200), dict(y="true", chord=100)]), "station[1] y"),
    (wing_spec(stations=[dict(y=0, chord=200, twist="true"), dict(y=400, chord=100)]), "station[0] twist"),
    (wing_spec(incidence="true"), "incidence"),
    (wing_spec(incidence=1e9), "incidence"),
    (wing_spec(te="true"), "te_thickness"),
    (wing_spec(extra="loft_sections = true"), "loft_sections"),
    (flight("fluid = 0"), "fluid"),                                          # was ZeroDivisionError
    (flight("fluid = -1025"), "fluid"),                                      # was accepted
    (flight("fluid = inf"), "fluid"),
    (flight("fluid = true"), "fluid"),
    (flight("fluid = 'oil'"), "fluid"),
    (flight("weight_x_mm = 1e30"), "weight_x_mm"),
    (flight("weight_x_mm = nan"), "weight_x_mm"),
    (flight("span_panels = true"), "span_panels"),
    (wing_spec().replace("[[surface]]", "[flight]\nmass_kg = true\nspeeds_kmh = [20]\n[[surface]]", 1), "mass_kg"),
])
def test_numbers_out_of_range_or_of_the_wrong_type_are_refused(tmp_path, text, field):
    refused(tmp_path, text, field)


def test_fluid_density_message_states_the_range(tmp_path):
    out = refused(tmp_path, flight("fluid = -1025"), "flight fluid")
    assert "950" in out and "1250" in out
    p = tmp_path / "ok.toml"
    p.write_text(flight("fluid = 1000"))
    assert CliRunner().invoke(main, ["balance", str(p), "-o", str(tmp_path / "o2")]).exit_code == 0


@pytest.mark.parametrize("line,field", [
    ("span_mm = { value = 800, tol = inf }", "tol"),
    ("span_mm = { value = 800, tol = 1e300 }", "tol"),      # passes anything
    ("span_mm = { value = 800, tol = '1e400%' }", "tol"),
    ("span_mm = { value = 800, tol = '100%' }", "tol"),
    ("span_mm = { value = 800, tol = true }", "tol"),
    ("span_mm = { value = nan, tol = 1 }", "value"),        # wrote invalid JSON
])
def test_meaningless_expectations_are_refused(tmp_path, line, field):
    refused(tmp_path, wing_spec(extra="[surface.expect]\n" + line + "\n"), "expect span_mm", field)


def test_check_at_off_the_part_is_refused(tmp_path):
    """900 mm on a 400 mm half span once measured the tip and passed."""
    out = refused(tmp_path, wing_spec(extra="[[surface.check_at]]\ny = 900\nchord = { value = 100, tol = 1 }\n"),
                  'surface[0] "w" check_at[0] y', "off the part")
    assert out.count("spec error") == 1
    refused(tmp_path, wing_spec(extra="[[surface.check_at]]\ny = inf\n"), "check_at[0] y")


def test_a_check_at_on_a_round_tip_is_on_the_part(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(wing_spec(extra='tip = "round"\n[[surface.check_at]]\ny = 420\n'))
    r = CliRunner().invoke(main, ["balance", str(p), "-o", str(tmp_path / "o")])
    assert r.exit_code == 0, r.output


def two_surfaces(a: str, b: str) -> str:
    text = wing_spec(name=a)
    surf = text[text.index("[[surface]]"):].replace(f'name = "{a}"', f'name = "{b}"', 1)
    return text + surf


@pytest.mark.parametrize("text,field,what", [
    (wing_spec(name="assembly"), 'surface[0] "assembly" name', "clash"),       # was found after lofting
    (two_surfaces("wing", "Wing"), 'surface[1] "Wing" name', "already used"),  # one file on a case-insensitive disk
    (two_surfaces("wing", "wing-mount"), 'surface[1] "wing-mount" name', "clash"),
    (wing_spec(extra="[surface.shop]\nhotwire_cuts = [0, 0.0001, 0.0002, 400]\n"), "shop hotwire_cuts", "apart"),
])
def test_outputs_that_would_share_a_name_are_found_at_validation(tmp_path, text, field, what):
    refused(tmp_path, text, field, what)
