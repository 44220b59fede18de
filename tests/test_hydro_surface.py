"""Free surface (image system, high-Froude-number limit) and the lattice memory budget."""

from __future__ import annotations

import pytest
from test_hydro import DEMO, models_of, surface

from geomgen.errors import SpecError
from geomgen.hydro import analyse_spec
from geomgen.hydro.lattice import build_lattice
from geomgen.hydro.solve import Flow
from geomgen.spec import load_spec, load_spec_text

C = 100.0


def _rect(aspect):
    return models_of(surface("w", "wing", [(0.0, C, 0.0, 0.0), (aspect * C / 2, C, 0.0, 0.0)]))


def _slope(models, depth_over_c):
    lat = build_lattice(models, 24, 4)
    lat.water_z = None if depth_over_c is None else depth_over_c * C
    return float(Flow.solve(lat).slopes(0.0, [0.0, 0.0, 0.0])["lift"].sum())


def hoerner_2d(h_c):
    """2D lift ratio of a foil at depth h under a free surface (biplane image), L/L∞ =
    (16(h/c)² + 1)/(16(h/c)² + 2): Hoerner, *Fluid-Dynamic Lift*, quoted from memory."""
    return (16 * h_c**2 + 1) / (16 * h_c**2 + 2)


def test_deep_limit_and_trend():
    m = _rect(8)
    deep = _slope(m, None)
    assert _slope(m, 1e5) / deep == pytest.approx(1.0, abs=1e-6)
    ratios = [_slope(m, h) / deep for h in (0.25, 0.5, 1.0, 2.0, 4.0)]
    assert all(a < b for a, b in zip(ratios, ratios[1:])), ratios   # less lift nearer the surface
    assert all(r < 1.0 for r in ratios)


@pytest.mark.parametrize("h_c", [0.5, 1.0, 2.0])
def test_high_aspect_rectangle_in_hoerner_band(h_c):
    """A = 20 rectangle: the section sees Hoerner's 2D factor F; the trailing vortices' images
    add downwash between none and all of a second wake (h ≪ b: the image pair lies on the
    wing's own). Lifting-line slope a/(1 + k a/(πA)), a = 2πF, k = 1 (none) .. 2 (doubled);
    the lattice ratio must fall in that band (± 0.01)."""
    import math

    aspect = 20.0
    m = _rect(aspect)
    ratio = _slope(m, h_c) / _slope(m, None)
    a0, a = 2 * math.pi, 2 * math.pi * hoerner_2d(h_c)
    deep_ll = a0 / (1 + a0 / (math.pi * aspect))
    lo = a / (1 + 2 * a / (math.pi * aspect)) / deep_ll
    hi = a / (1 + a / (math.pi * aspect)) / deep_ll
    assert lo - 0.01 <= ratio <= hi + 0.01, (lo, ratio, hi)


def _demo_text(extra=""):
    return DEMO.read_text() + extra


def test_demo_reports_free_surface_against_deep_water():
    spec = load_spec(DEMO)
    assert spec.flight.ride_height_mm is not None
    r = analyse_spec(spec)
    fs = r.free_surface
    assert fs is not None and "no wave making" in fs.limits and "ventilation" in fs.limits
    assert [s["name"] for s in fs.surfaces] == ["front-wing", "stabilizer"]
    assert all(s["lift_slope_ratio"] < 1.0 for s in fs.surfaces)
    deep = analyse_spec(spec, free_surface=False)
    assert deep.free_surface is None
    assert fs.neutral_point_shift_mm == pytest.approx(r.neutral_point_x_mm - deep.neutral_point_x_mm)
    assert fs.trim[0]["attitude_change_deg"] == pytest.approx(r.trim[0].attitude_deg - deep.trim[0].attitude_deg)


def test_foil_above_water_and_no_mast_refused():
    text = _demo_text().replace("ride_height_mm = 150.0", "ride_height_mm = 900.0")
    with pytest.raises(SpecError, match="flight.ride_height_mm: surface 'front-wing' reaches"):
        analyse_spec(load_spec_text(text))
    wing_only = ('format = 1\nname = "t"\n[datum]\norigin = "o"\n'
                 + surface("w", "wing", [(0.0, C, 0.0, 0.0), (400.0, C, 0.0, 0.0)])
                 + "[flight]\nmass_kg = 80\nspeeds_kmh = [20]\nride_height_mm = 100\n")
    with pytest.raises(SpecError, match="no mast; give flight.depth_mm"):
        analyse_spec(load_spec_text(wing_only))
    r = analyse_spec(load_spec_text(wing_only.replace("ride_height_mm", "depth_mm")))
    assert r.free_surface.water_z_mm == 100.0


def test_memory_budget_refused_before_allocating():
    text = _demo_text().replace('fluid = "seawater"', 'fluid = "seawater"\nspan_panels = 100\nchord_panels = 40')
    # refused when the spec is read (the panel count is known then), naming the fields
    with pytest.raises(SpecError, match=r"flight.span_panels, .*chord_panels: .* GiB"):
        analyse_spec(load_spec_text(text))
    # and again by the lattice itself, for callers that ask for more panels than the spec
    from geomgen.geometry import build_models
    from geomgen.hydro.lattice import build_lattice

    with pytest.raises(SpecError, match=r"GiB budget"):
        build_lattice(build_models(load_spec_text(_demo_text())), 100, 40)
