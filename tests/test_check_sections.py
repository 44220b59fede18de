"""Section properties in the check: intended vs measured on the written STEP, check_at and
root expect figures."""

from __future__ import annotations

import pytest
from conftest import wing_spec

from geomgen.spec import load_spec_text

# NACA 4-digit thickness integral (Abbott & von Doenhoff eq. 6.2 integrated): A = 0.685079 t c²
NACA_AREA = 10 * (0.2969 * 2 / 3 - 0.1260 / 2 - 0.3516 / 3 + 0.2843 / 4 - 0.1015 / 5)


def test_spec_accepts_section_figures(write_spec):
    text = wing_spec(extra="") + (
        "[surface.expect]\nroot_area_mm2 = { value = 3288, tol = '1%' }\nroot_j_mm4 = { value = 1, tol = 1 }\n"
        "[[surface.check_at]]\ny = 100\narea_mm2 = { value = 2000, tol = 20 }\ni_chord_mm4 = { value = 5, tol = 1 }\n"
        "j_mm4 = { value = 5, tol = '2%' }\n")
    spec = load_spec_text(text, "t.toml")
    assert spec.surface[0].check_at[0].area_mm2.value == 2000
    assert spec.surface[0].expect.root_j_mm4.tol == 1


@pytest.mark.slow
def test_check_measures_section_properties_on_the_step(tmp_path, write_spec):
    from geomgen.check.run import check

    area = NACA_AREA * 0.12 * 200.0**2
    laminate = "[surface.laminate]\nthickness = 1.0\ncore = false\nmould = false\n"
    text = wing_spec(mirror=False, te=0.5, extra=laminate) + (
        f"[surface.expect]\nroot_area_mm2 = {{ value = {area:.1f}, tol = '1%' }}\n"
        "[[surface.check_at]]\ny = 200\ni_chord_mm4 = { value = 1.0, tol = 1.0 }\n")
    res = check(write_spec(text), tmp_path / "o", write_record=False)
    by = {r.figure: r for r in res.records}
    # intended and measured agree within the build tolerance at every station
    for key in ("area@0", "i_chord@0", "i_normal@0", "j_solid@0", "j_shell@0", "area@400", "j_solid@200"):
        r = by[key]
        assert not r.fault and abs(r.step - r.intended) < 1e-3 * abs(r.intended), key
    assert by["area@0"].verdict == "pass"
    assert by["i_chord@200"].verdict == "FAIL"  # a wrong number on the sheet is caught
    assert by["j_shell@0"].intended < by["j_solid@0"].intended
    table = res.parts["w"]["sections"]
    assert [t["y_mm"] for t in table] == [0.0, 200.0, 400.0]
    assert table[0]["measured"]["laminate_mm"] == 1.0


def _open_loop(designation, chord, te, n, shift=0.0):
    """Ordered loop (upper TE -> LE -> lower TE) of a NACA section with an open edge ``te`` mm,
    in the x-z plane at y = 0, n points a side (cosine spaced, optionally shifted along them)."""
    import numpy as np

    from geomgen.sections import naca

    sec = naca(designation)
    b = np.clip(0.5 * (1 - np.cos(np.linspace(0, np.pi, n) + shift)), 0, 1)
    b[0], b[-1] = 0.0, 1.0
    xu, zu = sec.upper(b)
    xl, zl = sec.lower(b)
    # open the edge: add te/2 · x/c to each side (the build's own method is not the point here)
    zu, zl = zu + 0.5 * te / chord * xu, zl - 0.5 * te / chord * xl
    up = np.column_stack([xu, np.zeros_like(xu), zu])[::-1] * chord
    lo = np.column_stack([xl, np.zeros_like(xl), zl])[1:] * chord
    return np.vstack([up, lo])


def test_chord_line_runs_to_the_trailing_edge_midpoint_whatever_the_sampling():
    """Found by the long CLI property run: the chord line aimed at whichever trailing-edge
    corner lay farther from the nose, so two samplings of one open-edged section (the model's
    and the written file's slice) tilted it by te/chord apart, and the second moment about it
    (I_xx(θ) = I_xx cos²θ + I_zz sin²θ − 2 I_xz sinθ cosθ, any mechanics text) moved 0.7 % on
    a 400 mm root and 7 % on a 37 mm chord with a 1 mm edge: a false fault. The line now runs
    from the leading edge (located between samples) to the edge midpoint: a symmetric section
    gives exactly the x axis, and two samplings agree."""
    import numpy as np

    from geomgen.geometry.chordline import section_frame
    from geomgen.geometry.sectionprops import section_properties

    fine = _open_loop("0012", 37.0, 1.0, 600)
    coarse = _open_loop("0012", 37.0, 1.0, 41, shift=0.013)
    for loop in (fine, coarse):
        _, _, e, _ = section_frame(loop, 1)
        np.testing.assert_allclose(e, [1.0, 0.0, 0.0], atol=2e-5)
    a, b = _open_loop("2412", 37.0, 1.0, 600), _open_loop("2412", 37.0, 1.0, 57, shift=0.02)
    ia, ib = section_properties(a, 1, torsion=False), section_properties(b, 1, torsion=False)
    assert ib.i_chord_mm4 == pytest.approx(ia.i_chord_mm4, rel=3e-3)  # the polygon's chordal error only
