"""Undercut check of the mould halves for 3-axis machining from the parting side (numpy only).

Reference figures: the issue's measurement of the earlier shop demo stabilizer (95/50 mm
chords over 210 mm, incidence -2°, tip raised 3 mm and 24 mm aft) split on the root chord
plane: the nose overhangs the parting line by 1.3 mm at 100 mm span, 3.6 mm at 150 mm and
8.7 mm at 200 mm. Independent of that, the check also finds the trailing edge region lying
wholly above the plane (the larger undercut)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from geomgen.geometry import build_models
from geomgen.parts.mould import root_frame
from geomgen.parts.undercut import undercut_at, undercut_words, undercuts
from geomgen.spec.load import load_spec_text

ROOT = Path(__file__).resolve().parents[1]


def earlier_demo(parting="root-chord"):
    text = (ROOT / "specs/demo-stabilizer-shop.toml").read_text()
    for a, b in (("position = [330.0, 0.0, -22.0]", "position = [430.0, 0.0, -22.0]"),
                 ("incidence = 2.5", "incidence = -2.0"), ("chord = 80.0", "chord = 95.0"),
                 ("y = 180.0\nchord = 42.0\nx = 20.0", "y = 210.0\nchord = 50.0\nx = 24.0"),
                 ('parting = "stations"', f'parting = "{parting}"')):
        assert a in text, a
        text = text.replace(a, b)
    start, end = text.index("[surface.mount]"), text.index("[surface.laminate]")
    (m,) = build_models(load_spec_text(text[:start] + text[end:]))
    return m


def test_root_chord_parting_reproduces_the_measured_nose_overhang_and_finds_the_trailing_edge():
    m = earlier_demo()
    rf = root_frame(m, m.skin)
    for y, nose in ((100.0, 1.3), (150.0, 3.6), (200.0, 8.7)):
        r = undercut_at(m.skin, rf, "root-chord", y, "upper")
        assert r["leading_mm"] == pytest.approx(nose, abs=0.06), y
        assert r["trailing_mm"] > r["leading_mm"] and r["depth_mm"] > 0
        assert undercut_at(m.skin, rf, "root-chord", y, "lower")["edge"] is None
    found = undercuts(m, m.skin, rf, "root-chord")
    assert found["upper"]["edge"] == "trailing" and abs(found["upper"]["y"]) > 200
    assert found["lower"]["edge"] is None
    words = undercut_words("stabilizer", "root-chord", found)
    assert len(words) == 1 and "UNDERCUT" in words[0] and 'parting = "stations"' in words[0]


def test_a_plane_through_a_symmetric_untwisted_section_has_no_undercut_and_a_raised_one_has():
    """Hand check on a symmetric section (NACA 0012 by the formula of Abbott & von Doenhoff,
    ch. 6): split on its chord there is no undercut; with the plane 2 mm below the chord the
    part above it overhangs the opening from where the plane meets the lower surface to the
    nose and to the trailing edge."""
    from geomgen.parts.undercut import section_undercut

    x = 0.5 * (1 - np.cos(np.linspace(0, np.pi, 801)))
    yt = 0.6 * (0.2969 * np.sqrt(x) - 0.126 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1015 * x**4)
    c = 100.0
    poly = np.concatenate([np.column_stack([x, yt])[::-1], np.column_stack([x, -yt])[1:-1]]) * c
    flat = section_undercut(poly, lambda X: np.zeros_like(X), +1, columns=4000)
    assert flat["edge"] is None
    low = section_undercut(poly, lambda X: np.full_like(X, -2.0), +1, columns=4000)
    from scipy.optimize import brentq

    def t(u):
        return c * 0.6 * (0.2969 * np.sqrt(u) - 0.126 * u - 0.3516 * u**2 + 0.2843 * u**3 - 0.1015 * u**4) - 2.0
    x1, x2 = c * brentq(t, 1e-9, 0.3), c * brentq(t, 0.3, 1.0)  # where the lower surface is 2 mm below the chord
    assert low["leading_mm"] == pytest.approx(x1, abs=0.05)
    assert low["trailing_mm"] == pytest.approx(c - x2, abs=0.05)
    # deepest behind the plane: at the trailing edge, whose lower corner is 0.126 mm below the chord
    assert low["depth_mm"] == pytest.approx(2.0 - (t(1.0) + 2.0), abs=0.01)


def test_stations_parting_has_no_undercut_on_a_wing_without_twist():
    m = earlier_demo("stations")
    rf = root_frame(m, m.skin)
    found = undercuts(m, m.skin, rf, "stations")
    assert all(w["edge"] is None for w in found.values())
