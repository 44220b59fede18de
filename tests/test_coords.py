"""Coordinate-file reader: files written from the NACA formulas are read back and compared
with the formula section; every kind of bad input gives a message naming file and fault."""

import re

import numpy as np
import pytest

from geomgen.errors import SpecError
from geomgen.sections import naca, parse_coordinates, read_coordinates
from geomgen.sections.base import cosine_s

NOISE = 5e-5
PER_SIDE = 61  # points per surface, leading edge included, cosine spaced (typical files)


def formula_points(designation, n=PER_SIDE):
    """Upper (n, 2) and lower (n, 2), each from the leading to the trailing edge."""
    sec, s = naca(designation), cosine_s(n)
    return np.column_stack(sec.upper(s)), np.column_stack(sec.lower(s))


def noisy(p, seed):
    return p + np.random.default_rng(seed).normal(0.0, NOISE, p.shape)


def fmt(p, decimals=6, sep=" "):
    return "\n".join(f"{x:.{decimals}f}{sep}{y:.{decimals}f}" for x, y in p)


def loop_text(up, lo, name="test section", **kw):
    return f"{name}\n{fmt(np.vstack([up[::-1], lo[1:]]), **kw)}\n"


def split_text(up, lo, name="test section"):
    return f"{name}\n{len(up)}. {len(lo)}.\n\n{fmt(up)}\n\n{fmt(lo)}\n"


def write(tmp_path, text, name="foil.dat"):
    path = tmp_path / name
    path.write_text(text)
    return path


def max_error(sec, designation, x_min=0.005):
    """Largest |y_fit - y_formula| over the formula's surface points with x >= x_min."""
    ref, s = naca(designation), cosine_s(400)
    err = 0.0
    for ref_curve, fit_curve in ((ref.upper, sec.upper), (ref.lower, sec.lower)):
        x, y = ref_curve(s)
        m = x >= x_min
        err = max(err, float(np.abs(fit_curve(x[m])[1] - y[m]).max()))
    return err


@pytest.mark.parametrize("designation", ["0012", "2412"])
@pytest.mark.parametrize("layout", ["loop", "split"])
@pytest.mark.parametrize("with_noise", [False, True])
def test_file_reads_back_as_the_formula(tmp_path, designation, layout, with_noise):
    up, lo = formula_points(designation)
    if with_noise:
        up, lo = noisy(up, 1), noisy(lo, 2)
        up[0] = lo[0]  # one leading-edge point shared by both surfaces, as in real files
    text = (loop_text if layout == "loop" else split_text)(up, lo)
    sec = read_coordinates(write(tmp_path, text))
    assert sec.source_info["layout"] == layout
    assert max_error(sec, designation) < 2e-4
    # a fit, not an interpolant: it departs from the points by about the noise, never more
    # than a few times it (the cambered nose, not smooth in sqrt(x), adds a little)
    assert sec.fit_deviation is not None
    assert 1e-6 < sec.fit_deviation < 4e-4
    np.testing.assert_allclose(sec.upper(np.array([0.0]))[1], 0.0, atol=1e-12)
    np.testing.assert_allclose(sec.lower(np.array([0.0]))[1], 0.0, atol=1e-12)


def test_surfaces_are_functions_of_chord_station():
    up, lo = formula_points("2412")
    sec = parse_coordinates(loop_text(up, lo))
    s = np.linspace(0.0, 1.0, 7)
    x, y = sec.upper(s)
    assert x.shape == y.shape == (7,) and np.array_equal(x, s)
    assert np.all(sec.upper(s[1:-1])[1] > sec.lower(s[1:-1])[1])


def test_open_trailing_edge_is_kept():
    up, lo = formula_points("2412")
    sec = parse_coordinates(loop_text(up, lo))
    assert sec.te_thickness() == pytest.approx(naca("2412").te_thickness(), abs=1e-4)
    t, x = sec.max_thickness()
    assert t == pytest.approx(0.12, abs=3e-4) and x == pytest.approx(0.3, abs=0.02)


def test_scaled_rotated_translated_file_is_normalised(tmp_path):
    up, lo = formula_points("2412")
    plain = parse_coordinates(loop_text(up, lo))
    ang, chord, shift = np.radians(7.0), 150.0, np.array([30.0, -12.0])
    rot = np.array([[np.cos(ang), -np.sin(ang)], [np.sin(ang), np.cos(ang)]])
    moved = [chord * p @ rot.T + shift for p in (up, lo)]
    sec = read_coordinates(write(tmp_path, loop_text(*moved, decimals=4)))
    info = sec.source_info
    assert info["chord"] == pytest.approx(chord, rel=1e-6)
    assert info["rotation_deg"] == pytest.approx(-7.0, abs=1e-4)
    assert info["leading_edge"] == pytest.approx(tuple(shift), abs=1e-4)
    x = np.linspace(0.0, 1.0, 201)
    for a, b in ((sec.upper, plain.upper), (sec.lower, plain.lower)):
        np.testing.assert_allclose(a(x)[1], b(x)[1], atol=2e-5)
    assert max_error(sec, "2412") < 2e-4


def test_loop_running_over_the_lower_surface_first():
    up, lo = formula_points("2412")
    sec = parse_coordinates(loop_text(lo, up))
    assert sec.source_info["reversed"] is True
    assert max_error(sec, "2412") < 2e-4


def test_noisy_fit_is_smooth():
    """Curvature of the NACA 0012 upper surface is negative from 10 % to 90 % chord; the
    fit of a noisy file keeps it so, where an interpolant through the points would not."""
    up, lo = formula_points("0012", 101)
    sec = parse_coordinates(loop_text(noisy(up, 3), noisy(lo, 4)))
    x = np.linspace(0.1, 0.9, 801)
    d2 = np.diff(sec.upper(x)[1], 2)
    assert np.count_nonzero(np.diff(np.sign(d2))) == 0
    # the same check on a straight line-by-line interpolant of the noisy points fails
    p = noisy(up, 3)
    m = (p[:, 0] > 0.1) & (p[:, 0] < 0.9)
    assert np.count_nonzero(np.diff(np.sign(np.diff(p[m, 1], 2)))) > 0


def test_commas_comments_blank_lines_and_no_name_line():
    up, lo = formula_points("0012")
    body = fmt(np.vstack([up[::-1], lo[1:]]), sep=", ").split("\n")
    body.insert(10, "# a comment")
    body.insert(30, "   ")
    sec = parse_coordinates("\n".join(body) + "\n\n\n")
    assert sec.source_info["name"] is None
    assert max_error(sec, "0012") < 2e-4


def test_exact_repeated_points_are_dropped():
    up, lo = formula_points("0012")
    pts = np.vstack([up[::-1], lo])  # leading edge written twice
    pts = np.insert(pts, 20, pts[20], axis=0)
    sec = parse_coordinates("rep\n" + fmt(pts))
    assert sec.source_info["points"] == 2 * PER_SIDE - 1


def test_split_layout_without_counts_line():
    up, lo = formula_points("2412")
    sec = parse_coordinates(f"name\n{fmt(up)}\n\n{fmt(lo)}\n")
    assert sec.source_info["layout"] == "split"
    assert max_error(sec, "2412") < 2e-4


def test_field_is_named_when_given(tmp_path):
    with pytest.raises(SpecError, match=r"^sections\.root\.file: .*nothere\.dat: file not found"):
        read_coordinates(tmp_path / "nothere.dat", field="sections.root.file")


# -- bad input: one test per kind, each message names the file and the fault ---------------


def raises(tmp_path, content, pattern, name="bad.dat"):
    path = tmp_path / name
    if isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content)
    with pytest.raises(SpecError) as exc:
        read_coordinates(path)
    msg = str(exc.value)
    assert name in msg, msg
    assert re.search(pattern, msg), msg
    return msg


def good_loop(designation="0012"):
    return loop_text(*formula_points(designation))


def test_missing_file(tmp_path):
    with pytest.raises(SpecError, match=r"missing\.dat: file not found"):
        read_coordinates(tmp_path / "missing.dat")


def test_directory(tmp_path):
    (tmp_path / "adir.dat").mkdir()
    with pytest.raises(SpecError, match=r"adir\.dat: is a directory"):
        read_coordinates(tmp_path / "adir.dat")


def test_binary_file(tmp_path):
    raises(tmp_path, b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", r"binary file \(contains NUL bytes\)")


def test_not_utf8(tmp_path):
    raises(tmp_path, "caf\xe9 section\n".encode("latin-1") + good_loop().encode(),
           r"not UTF-8 text \(byte 0xe9 at offset 3\)")


def test_empty_file(tmp_path):
    raises(tmp_path, "", r"empty file")
    raises(tmp_path, "\n  \n# only a comment\n", r"empty file")


def test_name_line_only(tmp_path):
    raises(tmp_path, "a name\n\n", r"no coordinate points after the name line")


def test_too_few_points(tmp_path):
    raises(tmp_path, "few\n1 0\n0.5 0.05\n0 0\n0.5 -0.05\n1 0\n", r"only 5 distinct points; .* at least 10")


def test_line_that_is_not_two_numbers(tmp_path):
    lines = good_loop().split("\n")
    lines[13] = "abc"  # line 14
    raises(tmp_path, "\n".join(lines), r"bad\.dat line 14: expected two numbers, got 'abc'")
    lines[13] = "0.5 0.01 0.02"
    raises(tmp_path, "\n".join(lines), r"line 14: expected two numbers, got '0.5 0.01 0.02'")


@pytest.mark.parametrize("value", ["nan", "inf", "-Infinity"])
def test_not_finite(tmp_path, value):
    lines = good_loop().split("\n")
    lines[7] = f"0.7 {value}"
    raises(tmp_path, "\n".join(lines), r"line 8: value is not finite")


def test_points_out_of_order(tmp_path):
    up, lo = formula_points("0012")
    pts = np.vstack([up[::-1], lo[1:]])
    pts[[40, 45]] = pts[[45, 40]]  # two upper points swapped: x runs back
    msg = raises(tmp_path, "x\n" + fmt(pts), r"not a single loop: x turns back on the upper surface")
    assert "line 46" in msg or "line 47" in msg


def test_two_loops_in_one_file(tmp_path):
    text = good_loop() + fmt(np.vstack([formula_points("0012")[0][::-1]])) + "\n"
    raises(tmp_path, text, r"not a single loop")


def test_only_one_surface(tmp_path):
    up, _ = formula_points("2412")
    raises(tmp_path, "upper only\n" + fmt(up), r"only one surface")
    raises(tmp_path, f"upper only\n{len(up)}. 0.\n\n" + fmt(up), r"line 2: only one surface")


def test_counts_line_disagrees(tmp_path):
    up, lo = formula_points("2412")
    raises(tmp_path, f"n\n{len(up)}. 70.\n\n{fmt(up)}\n\n{fmt(lo)}\n",
           r"line 2: the counts line gives 61 \+ 70 points but 122 follow")


def test_self_crossing(tmp_path):
    up, lo = formula_points("0012")
    up[:, 1] -= np.where(up[:, 0] > 0.5, 0.15 * (up[:, 0] - 0.5), 0.0)  # tail dives below
    raises(tmp_path, loop_text(up, lo), r"self-crossing outline: the upper surface passes below the lower")


def test_too_many_lines(tmp_path):
    raises(tmp_path, good_loop() + "\n" * 100_001, r"more than 100000 lines; refused")


def test_too_many_bytes(tmp_path):
    raises(tmp_path, good_loop() + "#" * 10_000_000, r"is larger than 10 MB, the most geomgen reads")


def test_parse_coordinates_names_its_source():
    with pytest.raises(SpecError, match=r"^pasted: empty file"):
        parse_coordinates("", source="pasted")
    with pytest.raises(SpecError, match=r"^pasted: binary file"):
        parse_coordinates(b"\x00\x01", source="pasted")
    with pytest.raises(SpecError, match=r"^pasted: 10\.0 MB; coordinate files over 10 MB are refused"):
        parse_coordinates("#" * 10_000_001, source="pasted")


def joukowski_points(n: int, mu: float = -0.1, b: float = 1.0) -> np.ndarray:
    """(n, 2) exact points of a Joukowski section: the circle through ζ = b centred at μ
    (real: a symmetric section with a cusped trailing edge), mapped by z = ζ + b²/ζ
    (Anderson, Fundamentals of Aerodynamics §4.x: conformal mapping; exact)."""
    a = abs(b - mu)
    zeta = mu + a * np.exp(1j * np.linspace(0.0, 2 * np.pi, n))
    z = zeta + b * b / zeta
    return np.column_stack([z.real, z.imag])


@pytest.mark.parametrize("n", [81, 241, 801])
def test_a_cusped_joukowski_section_is_read_as_it_is(n):
    """Every upper point lies above every lower one; the fit pinned only at the leading edge
    overshot at the cusp and was refused as self-crossing. Now it is read, meets itself at the
    trailing edge, and follows the exact points within its stated deviation."""
    p = joukowski_points(n)
    sec = parse_coordinates("joukowski\n" + fmt(p, 8), source="j.dat")
    assert abs(sec.te_thickness()) < 1e-8
    assert sec.fit_deviation < 5e-4
    # the exact section normalised as the reader does (chord 4.0333 from the cusp at z = 2)
    te = p[0]
    le = p[int(np.argmax(np.linalg.norm(p - te, axis=1)))]
    chord = float(np.linalg.norm(te - le))
    s = cosine_s(201)
    xu, yu = sec.upper(s)
    xl, yl = sec.lower(s)
    assert np.all(yu - yl >= -1e-6)
    # thickness at 30 and 60 % chord against the exact map's points, each side interpolated
    q = (p - le) / chord
    i = int(np.argmin(q[:, 0]))
    up, lo = q[:i + 1][::-1], q[i:]
    for x in (0.3, 0.6):
        exact_t = np.interp(x, up[:, 0], up[:, 1]) - np.interp(x, lo[:, 0], lo[:, 1])
        fitted_t = float(np.interp(x, xu, yu) - np.interp(x, xl, yl))
        assert fitted_t == pytest.approx(exact_t, abs=5e-4 + 1e-3 * (n < 100))


@pytest.mark.parametrize("kind", ["spike", "zigzag"])
def test_a_file_the_loft_cannot_follow_is_refused_naming_the_point(kind):
    """One point spiked by 0.3 chord, or every point moved ±0.2 % chord in turn: the smooth fit
    follows them and waves (14 and 46 changes of curvature against 0-2 on the formula's
    points), which the loft cannot carry between its samples (the check read the thickness
    2.2 mm low). Refused, the file's line named."""
    up, lo = formula_points("2412")
    p = np.vstack([up[::-1], lo[1:]])
    if kind == "spike":
        k = len(p) // 4
        p[k, 1] += 0.3
    else:
        p[:, 1] += 0.002 * (-1.0) ** np.arange(len(p))
    with pytest.raises(SpecError) as exc:
        parse_coordinates("test\n" + fmt(p), source="w.dat")
    msg = str(exc.value)
    assert "not fair" in msg and "w.dat line" in msg
    if kind == "spike":
        assert f"line {k + 2}" in msg  # the name line first, then the points


@pytest.mark.parametrize("designation", ["2412", "23112", "25112", "4415", "9730", "0006"])
@pytest.mark.parametrize("decimals,seed", [(6, None), (5, 1), (4, None), (5, 2)])
def test_real_files_are_fair(designation, decimals, seed):
    """The fairness rule refuses none of the formula's points at 4-6 decimals or with noise."""
    up, lo = formula_points(designation)
    p = np.vstack([up[::-1], lo[1:]])
    p = noisy(p, seed) if seed is not None else p
    parse_coordinates("test\n" + fmt(p, decimals), source="w.dat")
