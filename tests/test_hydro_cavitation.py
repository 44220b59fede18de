"""2D panel method (Katz & Plotkin ch. 11 linear-strength vortex panels) and cavitation onset."""

from __future__ import annotations

import math

import numpy as np
import pytest
from test_hydro import DEMO

from geomgen.hydro import analyse_spec
from geomgen.hydro.cavitation import sigma
from geomgen.hydro.panel2d import section_flow, solve_nodes
from geomgen.hydro.water import P_ATM, G, water
from geomgen.sections.naca import naca
from geomgen.spec import load_spec


def ellipse_nodes(tc, n=160):
    phi = np.linspace(0.0, 2 * np.pi, n + 1)
    return np.column_stack([0.5 * (1 + np.cos(phi)), -0.5 * tc * np.sin(phi)])   # clockwise from the TE


@pytest.mark.parametrize("tc", [0.06, 0.12, 0.2])
def test_ellipse_max_speed_exact(tc):
    """Exact potential flow past an ellipse along its major axis: v_max/U = 1 + t/c
    (Katz & Plotkin §6 conformal mapping; any potential-flow text)."""
    f = solve_nodes(ellipse_nodes(tc))
    cp, _, _ = f.cp_min(0.0)
    assert math.sqrt(1.0 - cp) == pytest.approx(1.0 + tc, abs=0.004)


def test_naca0012_zero_lift_cp_min():
    """NACA 0012 at zero lift: (v/V)² max = 1.41 at x = 0.1, Cp,min ≈ −0.41 (Abbott & von
    Doenhoff, *Theory of Wing Sections*, App. I)."""
    f = section_flow(naca("0012"))
    cp, x, _ = f.cp_min(0.0)
    assert cp == pytest.approx(-0.41, abs=0.006)
    assert 0.05 < x < 0.2
    assert f.cl_unit[0] == pytest.approx(0.0, abs=1e-9)           # symmetric: no lift at zero angle


def test_convergence_with_panel_count():
    vals = [section_flow(naca("0012"), n).cp_min(0.0)[0] for n in (40, 80, 160)]
    assert abs(vals[2] - vals[1]) < abs(vals[1] - vals[0])
    assert abs(vals[2] - vals[1]) < 0.004


def test_lift_sign_slope_and_camber():
    """Thin-aerofoil theory: slope near 2π (thickness raises it a little), zero-lift angle of
    a NACA 2412 about −2.1° (Abbott & von Doenhoff, App. IV, from memory)."""
    f = section_flow(naca("2412"))
    assert 2 * math.pi < f.cl_unit[1] < 2 * math.pi * 1.15
    assert math.degrees(f.alpha_for(0.0)) == pytest.approx(-2.1, abs=0.2)
    cp_hi, _, upper = f.cp_min(0.8)
    assert upper and cp_hi < f.cp_min(0.3)[0]           # more lift, deeper suction on the upper side


def test_sigma_arithmetic():
    w = water("seawater", 15)
    v, h = 10.0, 0.5
    want = (101325.0 + 1025.9 * 9.80665 * 0.5 - 1705.0) / (0.5 * 1025.9 * 100.0)
    assert float(sigma(v, h, w.density, w.vapour_pa)) == pytest.approx(want, rel=1e-12)
    assert P_ATM == 101325.0 and G == 9.80665


def test_demo_cavitation_onset_consistent():
    r = analyse_spec(load_spec(DEMO))
    cv = r.cavitation
    names = [s["name"] for s in cv.surfaces]
    assert names == ["front-wing", "stabilizer", "mast"]
    wing = cv.surfaces[0]
    top = r.trim[-1].speed_kmh
    assert wing["onset_kmh"] > top                           # the demo rides clear of cavitation
    # at the onset the strip sits on the edge: −Cp,min = σ at its depth
    w = r.water
    s = float(sigma(wing["onset_ms"], wing["depth_mm"] * 1e-3, w["density"], w["vapour_pa"]))
    assert -wing["cp_min"] == pytest.approx(s, rel=1e-3)
    mast = cv.surfaces[2]
    assert mast["depth_mm"] == 0.0 and mast["cl"] == 0.0
    v = math.sqrt((P_ATM - w["vapour_pa"]) / (0.5 * w["density"] * -mast["cp_min"]))
    assert mast["onset_ms"] == pytest.approx(v)
    # margins fall with speed
    m = [row["front-wing"] for row in cv.margin_at_speeds]
    assert all(a > b for a, b in zip(m, m[1:]))
    assert cv.first_kmh == min(s["onset_kmh"] for s in cv.surfaces)
