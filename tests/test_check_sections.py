"""Section properties in the check: intended vs measured on the written STEP, check_at and
root expect figures."""

from __future__ import annotations

import pytest

from geomgen.spec import load_spec_text

from conftest import wing_spec

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
    text = wing_spec(mirror=False, te=0.5, extra="[surface.laminate]\nthickness = 1.0\ncore = false\nmould = false\n") + (
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
