"""NACA sections against published tables and formulas (sources named per test)."""

import numpy as np
import pytest
from scipy.integrate import quad

from geomgen.errors import SpecError
from geomgen.sections import naca
from geomgen.sections.naca import FIVE_DIGIT_STANDARD, camber_5digit, parse_designation, thickness

# NACA 0012 half-thickness, % chord. Abbott & von Doenhoff, Theory of Wing Sections,
# Appendix I (also NACA Report 824).
X_PCT = [1.25, 2.5, 5, 10, 20, 30, 40, 50, 60, 80, 90, 100]
YT_0012 = [1.894, 2.615, 3.555, 4.683, 5.737, 6.002, 5.803, 5.294, 4.563, 2.623, 1.448, 0.126]


def test_naca0012_matches_tabulated_ordinates():
    sec = naca("0012")
    x = np.array(X_PCT) / 100
    yu, yl = sec.surfaces_at(x)
    # the table gives 3 decimals in % chord: agree to half a unit of the last digit
    np.testing.assert_allclose(yu * 100, YT_0012, atol=0.0006)
    np.testing.assert_allclose(-yl * 100, YT_0012, atol=0.0006)


# NACA 4412 ordinates, % chord, at the tabulated surface stations. Abbott & von Doenhoff,
# Theory of Wing Sections, Appendix II (NACA Report 824). Values written down from memory of
# that widely reproduced table; they agree with the formula to the table's rounding.
X_4412 = [1.25, 2.5, 5, 7.5, 10, 15, 20, 25, 30, 40, 50, 60, 70, 80, 90, 95]
YU_4412 = [2.44, 3.39, 4.73, 5.76, 6.59, 7.89, 8.80, 9.41, 9.76, 9.80, 9.19, 8.14, 6.69, 4.89, 2.71, 1.47]
YL_4412 = [-1.43, -1.95, -2.49, -2.74, -2.86, -2.88, -2.74, -2.50, -2.26, -1.80, -1.40, -1.00,
           -0.65, -0.39, -0.22, -0.16]


def test_naca4412_matches_tabulated_ordinates():
    """Tabulated to 2 decimals of % chord: agree within 0.015 % chord (rounding plus the
    table's own interpolation to round stations)."""
    yu, yl = naca("4412").surfaces_at(np.array(X_4412) / 100)
    np.testing.assert_allclose(yu * 100, YU_4412, atol=0.015)
    np.testing.assert_allclose(yl * 100, YL_4412, atol=0.015)


def test_thickness_form_area_matches_integral_of_formula():
    """Area / (t c²) of the 4-digit thickness form: 2∫y_t dx of the published formula
    (NACA Report 460), integrated by scipy.quad; 0.68508 open, 0.68088 closed."""
    for closed, expected in ((False, 0.68508), (True, 0.68088)):
        exact = 2 * quad(lambda x: thickness(x, 1.0, closed), 0, 1, limit=200)[0]
        assert exact == pytest.approx(expected, abs=1e-5)
        sec = naca("0015", closed_te=closed)
        assert sec.area() / 0.15 == pytest.approx(exact, rel=1e-5)


def test_cambered_area_equals_thickness_area():
    """The perpendicular construction keeps the area of the thickness form (to first order
    in camber slope; Abbott & von Doenhoff §6.4): 2412 within 0.1 % of 0.68508 * 0.12."""
    assert naca("2412").area() == pytest.approx(0.68508 * 0.12, rel=1e-3)


def test_max_thickness_position():
    """Open 4-digit form: maximum at x = 0.2998 (REFERENCES, formula derivative)."""
    t, x = naca("0012").max_thickness()
    assert t == pytest.approx(0.12, rel=1e-3)
    assert x == pytest.approx(0.2998, abs=1e-3)


def thin_airfoil_design_cl(dy, m):
    """Ideal-angle lift coefficient cl_i = π A1, A1 = (2/π)∫ dy_c/dx cosθ dθ
    (thin-airfoil theory, Anderson, Fundamentals of Aerodynamics §4.8)."""
    def f(th):
        return dy(0.5 * (1 - np.cos(th))) * np.cos(th)
    a1 = 2 / np.pi * quad(f, 0, np.pi, limit=400, points=[np.arccos(1 - 2 * m)])[0]
    return np.pi * a1


@pytest.mark.parametrize("P,xmax", [(1, 0.05), (2, 0.10), (3, 0.15), (4, 0.20), (5, 0.25)])
def test_5digit_mean_line_constants(P, xmax):
    """Standard 5-digit lines from the tabulated m, k1 (Abbott & von Doenhoff §6.6):
    maximum camber at x = P/20 and design lift coefficient 0.3 for L = 2."""
    x = np.linspace(0, 1, 200001)
    yc, _ = camber_5digit(x, 2, P, False)
    assert x[np.argmax(yc)] == pytest.approx(xmax, abs=1.5e-3)
    m = FIVE_DIGIT_STANDARD[P][0]
    cl = thin_airfoil_design_cl(lambda xx: camber_5digit(xx, 2, P, False)[1], m)
    # the 210 line's tabulated k1 (361.4) is rounded hard: it gives 0.308
    assert cl == pytest.approx(0.30, abs=0.01)


def test_reflexed_5digit_closes_and_reflexes():
    """Reflexed 231 line (NASA TM X-3284 constants): zero at both ends, negative slope
    change aft (reflex: the slope turns back up near the trailing edge)."""
    x = np.linspace(0, 1, 2001)
    yc, dy = camber_5digit(x, 2, 3, True)
    assert abs(yc[0]) < 1e-12 and abs(yc[-1]) < 1e-12
    assert dy[-1] > dy[len(x) * 3 // 4]
    cl = thin_airfoil_design_cl(lambda xx: camber_5digit(xx, 2, 3, True)[1], 0.2170)
    assert cl == pytest.approx(0.30, abs=0.01)


@pytest.mark.parametrize("bad", ["2", "ABCD", "2000", "2012", "24320", "23312", "26012", "123456", "02412"])
def test_malformed_designations_are_refused(bad):
    with pytest.raises(SpecError):
        naca(bad)


def test_parse_good_designations():
    assert parse_designation("NACA 23012")[0] == "5"
    assert parse_designation("0012")[1]["t"] == pytest.approx(0.12)
