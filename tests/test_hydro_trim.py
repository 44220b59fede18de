"""Trim, balance and the hydro API: water properties (ITTC), internal consistency, and the
trade's rules of thumb (marked "common practice, no source")."""

from __future__ import annotations

import json
import math

import pytest
from test_hydro import DEMO, models_of, surface, trapezoid

from geomgen import CAUTION
from geomgen.errors import SpecError
from geomgen.geometry.model import build_models
from geomgen.hydro import G, analyse, analyse_spec, format_hydro, water
from geomgen.spec import load_spec, load_spec_text
from geomgen.spec.flight import FlightSpec
from geomgen.starter import STARTER

#: cruise speeds of the example set (the demo declares 22 km/h as its cruise)
FLIGHT = FlightSpec(mass_kg=85.0, speeds_kmh=[22.0, 25.0], cl_max=1.1)


def example_spec():
    """The example set's spec: the demo if the project has one, else the starter."""
    return load_spec(DEMO) if DEMO.exists() else load_spec_text(STARTER)


def variant(spec, role="stabilizer", **update):
    """Models of ``spec`` with the first surface of ``role`` changed by ``update``."""
    surfaces = list(spec.surface)
    i = next(k for k, s in enumerate(surfaces) if s.role == role)
    surfaces[i] = surfaces[i].model_copy(update=update)
    return build_models(spec.model_copy(update={"surface": surfaces}))


@pytest.fixture(scope="module")
def base():
    spec = example_spec()
    return spec, analyse(build_models(spec), FLIGHT)


# -- water ---------------------------------------------------------------------------------
def test_water_properties_are_the_ittc_2011_table_values():
    """ITTC 7.5-02-01-03 Fresh Water and Seawater Properties (2011), 15 °C and 20 °C."""
    assert (water("seawater").density, water("seawater").viscosity) == (1025.9, 1.189e-6)
    assert (water("freshwater").density, water("freshwater").viscosity) == (999.10, 1.1386e-6)
    assert water("seawater", 20).density == 1024.8 and water("freshwater", 20).viscosity == 1.0034e-6
    w = water(1020.0)
    assert w.density == 1020.0 and w.viscosity == 1.189e-6 and "seawater" in w.source
    assert water("freshwater", viscosity=1e-6).viscosity == 1e-6
    with pytest.raises(ValueError):
        water("seawater", 17)
    assert G == 9.80665  # standard gravity (CGPM 1901)


# -- trim consistency ---------------------------------------------------------------------
def test_trim_carries_the_weight_and_reports_consistent_units(base):
    """Definitions (no outside source): lift = m g at each trimmed speed; kgf = N / g; CL =
    W/(qS) with q = ½ρV²; Re = V·MAC/ν; attitude falls as speed rises."""
    _, r = base
    weight = FLIGHT.mass_kg * G
    rho, nu = r.water["density"], r.water["viscosity"]
    for t in r.trim:
        assert sum(t.lift_n.values()) == pytest.approx(weight, rel=1e-9)
        for k, v in t.lift_n.items():
            assert t.lift_kgf[k] == pytest.approx(v / G)
        v = t.speed_kmh / 3.6
        assert t.dynamic_pressure_pa == pytest.approx(0.5 * rho * v * v)
        assert t.cl == pytest.approx(weight / (t.dynamic_pressure_pa * r.reference["area_cm2"] * 1e-4))
        wing = next(s for s in r.surfaces if s.role == "wing")
        assert t.reynolds[wing.name] == pytest.approx(v * wing.mac_mm * 1e-3 / nu)
    assert r.trim[0].attitude_deg > r.trim[1].attitude_deg


def test_weight_at_the_centre_of_pressure_balances(base):
    """Definition: with the weight at the net centre of pressure the moment about it is zero;
    the moment about the mast equals the weight's lever arm times the weight."""
    spec, r = base
    t = r.trim[1]
    fl = FLIGHT.model_copy(update={"weight_x_mm": t.cp_x_mm})
    r2 = analyse(build_models(spec), fl)
    assert abs(r2.trim[1].moment_about_weight_nm) < 1e-6 * abs(t.moment_about_mast_nm) + 1e-9
    assert t.moment_about_mast_nm == pytest.approx(-t.cp_from_mast_mm * 1e-3 * FLIGHT.mass_kg * G, rel=1e-9)
    assert r2.static_margin_pct == pytest.approx((r2.neutral_point_x_mm - t.cp_x_mm) / r2.reference["mac_mm"] * 100)


def test_takeoff_speed_is_where_the_first_strip_reaches_cl_max(base):
    """Definition (own estimate, linear lattice): trimmed at the estimated takeoff speed, the
    front wing's most loaded strip sits at the given section cl max."""
    spec, r = base
    to = r.takeoff
    assert 5.0 < to.speed_kmh < 20.0  # common practice, no source: foils take off at walking-to-jogging pace
    fl = FLIGHT.model_copy(update={"speeds_kmh": [to.speed_kmh]})
    t = analyse(build_models(spec), fl).trim[0]
    wing = next(s for s in r.surfaces if s.role == "wing")
    assert t.cl_peak[wing.name] == pytest.approx(FLIGHT.cl_max, abs=1e-6)
    assert t.attitude_deg == pytest.approx(to.attitude_deg, abs=1e-4)


# -- common practice -------------------------------------------------------------------------
def test_stabilizer_pushes_down_and_wing_carries_more_than_the_weight(base):
    """Common practice, no source: with negative stabilizer incidence the stabilizer lift is
    negative at cruise and the front wing lifts more than the total weight."""
    _, r = base
    weight = FLIGHT.mass_kg * G
    for t in r.trim:
        lifts = {s.role: t.lift_n[s.name] for s in r.surfaces}
        assert lifts["stabilizer"] < 0 < weight < lifts["wing"]


@pytest.mark.parametrize("change", ["larger stabilizer", "longer fuselage"])
def test_larger_stabilizer_or_longer_fuselage_moves_np_aft_and_cp_forward(base, change):
    """Common practice, no source (tail-volume reasoning, Etkin & Reid): more tail volume moves
    the neutral point aft; a down-pushing stabilizer with more area or a longer arm moves the
    net centre of pressure forward."""
    spec, r = base
    stab = next(s for s in spec.surface if s.role == "stabilizer")
    if change == "larger stabilizer":
        models = variant(spec, station=[st.model_copy(update={"chord": 1.25 * st.chord}) for st in stab.station])
    else:
        x, y, z = stab.position
        models = variant(spec, position=(x + 80.0, y, z))
    r2 = analyse(models, FLIGHT)
    assert r2.neutral_point_x_mm > r.neutral_point_x_mm + 1.0
    for a, b in zip(r.trim, r2.trim):
        assert b.cp_x_mm < a.cp_x_mm


def test_stabilizer_shim_moves_the_balance_point_forward_by_1_to_3_cm(base):
    """Common practice, no source: a 0.5° shim that makes the stabilizer incidence more negative
    moves the balance point (net centre of pressure) forward, by about 1-3 cm at cruise speed
    (22-25 km/h here)."""
    spec, r = base
    stab = next(s for s in spec.surface if s.role == "stabilizer")
    r2 = analyse(variant(spec, incidence=stab.incidence - 0.5), FLIGHT)
    for a, b in zip(r.trim, r2.trim):
        assert 10.0 <= a.cp_x_mm - b.cp_x_mm <= 30.0


# -- options and API -----------------------------------------------------------------------
def test_flight_table_keys_validate_and_drive_the_analysis():
    """The ``[flight]`` keys added for the hydrodynamics (own spec; errors name the field)."""
    # the starter's own [flight] table replaced by one that sets every key, so the
    # assertions below always run (whatever the starter holds)
    text = STARTER.split("[flight]")[0] + (
        "\n[flight]\nmass_kg = 80.0\nspeeds_kmh = [22.0]\nfluid = \"freshwater\"\ntemperature_c = 20\n"
        "span_panels = 10\nchord_panels = 4\ncl_max = 1.0\ninclude_vertical = true\n")
    spec = load_spec_text(text)
    r = analyse_spec(spec)
    assert r.panels["span_panels_per_half"] == 10 and r.panels["chord_panels"] == 4
    assert r.water["density"] == 998.21 and r.lateral is not None and r.takeoff is not None
    for bad in ("speeds_kmh = [0.0]", "temperature_c = 17", "span_panels = 1"):
        with pytest.raises(SpecError) as err:
            load_spec_text(STARTER.split("[flight]")[0] + f"\n[flight]\nmass_kg = 80.0\n{bad}\n"
                           + ("speeds_kmh = [20.0]\n" if "speeds" not in bad else ""))
        assert "flight" in str(err.value)


def test_vertical_surfaces_only_in_pitch_when_asked():
    """Masts and fins stay out of the pitch balance unless asked (the issue's default)."""
    models = models_of(surface("w", "wing", trapezoid(350.0, 150.0, 70.0), position=(-100.0, 0.0, 0.0)),
                       surface("m", "mast", [(0.0, 120.0, 0.0, 0.0), (700.0, 120.0, 0.0, 0.0)], naca="0013",
                               mirror=False, orientation="vertical-up", position=(0.0, 0.0, 10.0)))
    plain = analyse(models, chord_panels=4)
    both = analyse(models, chord_panels=4, vertical_in_pitch=True)
    assert [s.role for s in plain.surfaces] == ["wing"]
    assert [s.role for s in both.surfaces] == ["wing", "mast"] and both.surfaces[1].in_pitch
    assert plain.reference["mast_x_mm"] == pytest.approx(-30.0)  # mast leading edge: 0.25 chord ahead


def test_result_is_json_and_the_report_has_units_and_the_caution(base):
    """Output contract of the issue (JSON via as_dict, text with units and the caution)."""
    _, r = base
    d = r.as_dict()
    json.dumps(d, allow_nan=False)
    assert d["surfaces"][0]["loading"]["c_cl_mm"]
    text = format_hydro(r)
    for word in ("km/h", "kgf", "% MAC", "cm²", "N·m", "neutral point", "CAUTION"):
        assert word.lower() in text.lower()
    assert " ".join(CAUTION.split()) in " ".join(text.split())
    lines = text.splitlines()
    rules = [i for i, ln in enumerate(lines) if ln and set(ln) <= {"-", " "}]
    assert len(rules) >= 2  # surfaces, trim (and free-surface, cavitation) tables: header, rule, rows of one width
    for i in rules:
        assert len(lines[i - 1]) == len(lines[i]) == len(lines[i + 1])


def test_balance_without_a_mast_states_positions_from_the_datum_origin():
    """No mast: the text gives datum x from the origin and no empty mast columns."""
    models = models_of(surface("w", "wing", trapezoid(300.0, 150.0, 100.0), position=(-200.0, 0.0, 0.0)),
                       surface("s", "stabilizer", trapezoid(120.0, 60.0, 40.0), position=(300.0, 0.0, 0.0),
                               incidence=-1.0))
    r = analyse(models, FLIGHT)
    assert r.reference["mast_x_mm"] is None and r.neutral_point_from_mast_mm is None
    text = format_hydro(r)
    assert "cp to mast" not in text and "M mast" not in text
    assert "ahead of the datum origin (no mast)" in text or "aft of the datum origin (no mast)" in text
    assert all(math.isfinite(t.cp_x_mm) for t in r.trim)
