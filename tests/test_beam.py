"""Beam figures against closed forms (Roark, Formulas for Stress and Strain: cantilever and
torsion cases; elliptic loading from lifting-line theory, e.g. Katz & Plotkin)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from geomgen.strength.beam import (
    deflection,
    distributed_shear_and_moment,
    first_bending_frequency,
    shear_and_moment,
    torque,
    torsional_stiffness,
    twist,
)


def test_cantilever_end_load():
    # δ = F L³ / (3 E I), root moment F L, root stress F L / W
    L, F, E, I = 800.0, 100.0, 70e3, 2.0e4  # noqa: E741 (I: second moment of area)
    s = np.linspace(0, L, 4001)
    v, m = shear_and_moment(s, [L + 1e-9], [F])
    assert v[0] == pytest.approx(F) and m[0] == pytest.approx(F * L)
    _, d = deflection(s, m, np.full_like(s, E * I))
    assert d[-1] == pytest.approx(F * L**3 / (3 * E * I), rel=1e-5)


def test_shaft_end_torque():
    # φ = T L / (G J); stiffness G J / L
    L, T, G, J = 750.0, 5000.0, 26e3, 7e4
    s = np.linspace(0, L, 101)
    t = torque(s, [L + 1e-9], [T])
    assert twist(s, t, np.full_like(s, G * J))[-1] == pytest.approx(T * L / (G * J), rel=1e-12)
    assert torsional_stiffness(s, np.full_like(s, G * J)) == pytest.approx(G * J / L, rel=1e-12)


def test_elliptic_loading_root_moment():
    # elliptic loading of total lift W on span 2s: root bending moment (W/2)(4s/(3π)) (the
    # half-lift acts at the centroid of a quarter ellipse, 4s/(3π) from the root)
    W, semi = 900.0, 400.0
    n = 4000
    edges = np.linspace(0, semi, n + 1)
    y = 0.5 * (edges[1:] + edges[:-1])
    l0 = 4 * W / (math.pi * 2 * semi)  # peak load per mm, ∫ l0 √(1 - (y/s)²) dy over 2s = W
    f = l0 * np.sqrt(1 - (y / semi) ** 2) * np.diff(edges)
    v, m = shear_and_moment(np.array([0.0]), y, f)
    assert v[0] == pytest.approx(W / 2, rel=1e-5)
    assert m[0] == pytest.approx(W / 2 * 4 * semi / (3 * math.pi), rel=1e-5)


def test_uniform_rectangular_wing_as_a_beam():
    # uniform running load w on a uniform cantilever: M(0) = w L² / 2, δ = w L⁴ / (8 E I)
    L, w, E, I = 400.0, 1.2, 60e3, 1.1e5  # noqa: E741 (I: second moment of area)
    s = np.linspace(0, L, 4001)
    v, m = distributed_shear_and_moment(s, np.full_like(s, w))
    assert v[0] == pytest.approx(w * L) and m[0] == pytest.approx(w * L**2 / 2, rel=1e-6)
    _, d = deflection(s, m, np.full_like(s, E * I))
    assert d[-1] == pytest.approx(w * L**4 / (8 * E * I), rel=1e-5)


def test_uniform_cantilever_first_frequency():
    # exact: f = (1.8751² / 2π) √(E I / (m L⁴)); Rayleigh with the static shape is a little above
    L, E, I, m = 800.0, 70e3, 2e4, 1289.6e-9 * 2700  # noqa: E741 (I: second moment of area); mm, MPa, mm⁴, kg/mm
    s = np.linspace(0, L, 2001)
    f = first_bending_frequency(s, np.full_like(s, E * I), np.full_like(s, m))
    exact = 1.87510407**2 / (2 * math.pi) * math.sqrt(E * I * 1e3 / (m * L**4))
    assert exact < f < exact * 1.01
