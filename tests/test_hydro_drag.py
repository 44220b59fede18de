"""Drag, power and takeoff of the trimmed set."""

from __future__ import annotations

import math

import numpy as np
import pytest
from test_hydro import DEMO, models_of, surface

from geomgen.hydro import analyse, analyse_spec, format_hydro
from geomgen.hydro.drag import form_factor, ittc57, section_cd, spray_drag
from geomgen.spec import load_spec
from geomgen.spec.flight import FlightSpec


def test_ittc57_at_one_million():
    """ITTC-1957 line: C_F(1e6) = 0.004688 (Tupper, *Introduction to Naval Architecture*,
    Table 8.3; any naval-architecture text)."""
    assert float(ittc57(1e6)) == pytest.approx(0.004688, abs=1e-6)
    assert float(ittc57(1e7)) == pytest.approx(0.075 / 25.0)


def test_form_factor_formula():
    """Hoerner, *Fluid-Dynamic Drag* ch. 6 (from memory): 1 + 2 t/c + 60 (t/c)⁴."""
    assert float(form_factor(0.12)) == pytest.approx(1.0 + 0.24 + 60 * 0.12**4)
    assert float(section_cd(1e6, 0.0)) == pytest.approx(2 * 0.004688, abs=2e-6)
    assert spray_drag(1000.0, 0.015) == pytest.approx(0.24 * 1000.0 * 0.015**2)


def test_elliptic_loading_induced_drag():
    """Elliptic planform, flat: CDi = CL²/(π A) (Prandtl lifting-line theory; e.g. Katz &
    Plotkin §8.1), within 2 % of the lattice's Trefftz drag."""
    b2, c0 = 500.0, 120.0
    ys = np.linspace(0.0, b2, 13)
    st = [(round(float(y), 4), round(float(max(c0 * math.sqrt(max(1 - (y / b2) ** 2, 0.0)), 4.0)), 4), 0.0, 0.0)
          for y in ys]
    m = models_of(surface("w", "wing", st, interpolation="smooth"))
    r = analyse(m, span_panels=24, chord_panels=4, alpha_deg=4.0)
    aspect = r.surfaces[0].aspect_ratio
    assert r.cdi == pytest.approx(r.cl**2 / (math.pi * aspect), rel=0.02)


def test_demo_drag_grows_with_speed_above_the_best_and_power_too():
    r = analyse_spec(load_spec(DEMO))
    pf = r.performance
    sweep = pf.sweep
    total = [p["total_n"] for p in sweep]
    power = [p["power_w"] for p in sweep]
    assert all(a < b for a, b in zip(power, power[1:]))
    k = int(np.argmin(total))
    assert all(a < b for a, b in zip(total[k:], total[k + 1:]))        # past the best L/D, drag grows
    prof = [p["drag_n"]["front-wing profile"] for p in sweep]
    # over the riding speeds the induced drag falls as 1/V² (at much higher speeds the fixed
    # stabilizer's growing down-force turns it up again)
    ind = [p["drag_n"]["induced"] for p in sweep if p["speed_kmh"] <= 26.0]
    assert all(a < b for a, b in zip(prof, prof[1:])) and all(a > b for a, b in zip(ind, ind[1:]))
    for p in pf.points:
        assert p["total_n"] == pytest.approx(sum(p["drag_n"].values()))
        assert p["power_w"] == pytest.approx(p["total_n"] * p["speed_ms"])
        assert p["l_over_d"] == pytest.approx(85.0 * 9.80665 / p["total_n"])
    # the envelope runs from takeoff to the first plausibility guard or first cavitation
    assert pf.envelope_kmh[0] == pytest.approx(r.takeoff.speed_kmh)
    assert 26.0 < pf.envelope_kmh[1] <= r.cavitation.first_kmh and len(pf.envelope_reasons) == 2
    assert "default" in pf.notes[0]
    text = format_hydro(r)
    assert "Usable envelope" in text and "mast spray N" in text and "CAUTION" in text


def test_profile_drag_of_a_strip_by_hand():
    """A rectangle's profile drag is the section cd times q S at its one Reynolds number."""
    m = models_of(surface("w", "wing", [(0.0, 100.0, 0.0, 0.0), (400.0, 100.0, 0.0, 0.0)], incidence=4.0))
    fl = FlightSpec(mass_kg=20.0, speeds_kmh=[20.0], depth_mm=500.0)
    r = analyse(m, fl, span_panels=8, chord_panels=2)
    p = r.performance.points[0]
    v, w = p["speed_ms"], r.water
    q = 0.5 * w["density"] * v * v
    want = q * float(section_cd(v * 0.1 / w["viscosity"], 0.12)) * 0.8 * 0.1
    assert p["drag_n"]["w profile"] == pytest.approx(want, rel=2e-3)
