"""Bad input: every problem at once, each naming the file and the field; exit 2 (3 for
geometry that cannot be made); nothing written; never a traceback."""

from __future__ import annotations

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen.cli import main
from geomgen.errors import GeometryError, SpecError
from geomgen.geometry import build_models
from geomgen.spec import load_spec


def problems_of(path) -> list[str]:
    with pytest.raises(SpecError) as exc:
        build_models(load_spec(path))
    return exc.value.problems


def run_build(path, out):
    return CliRunner().invoke(main, ["build", str(path), "-o", str(out)])


def test_malformed_toml_names_line(write_spec):
    p = write_spec("format = 1\nname = \n")
    (msg,) = problems_of(p)
    assert str(p) in msg and "line 2" in msg


def test_unknown_key_suggests_closest(write_spec):
    p = write_spec(wing_spec().replace("chord = 200", "chrod = 200"))
    msgs = problems_of(p)
    assert any("unknown key 'chrod'" in m and "did you mean 'chord'" in m and "station[0]" in m for m in msgs)
    assert any("chord: required field missing" in m for m in msgs)


def test_unknown_surface_key_suggests(write_spec):
    p = write_spec(wing_spec(extra="incidance = 2"))
    assert any("did you mean 'incidence'" in m for m in problems_of(p))


def test_missing_field(write_spec):
    p = write_spec(wing_spec().replace('role = "wing"\n', ""))
    assert any('surface[0] "w" role: required field missing' in m for m in problems_of(p))


def test_all_problems_at_once(write_spec):
    """chord <= 0, non-increasing stations and an unknown section, all reported together."""
    text = wing_spec(stations=[dict(y=0, chord=200), dict(y=300, chord=-10), dict(y=200, chord=50)])
    text = text.replace('section = "a"\ny = 200', 'section = "nope"\ny = 200')
    path = write_spec(text)
    msgs = problems_of(path)
    joined = "\n".join(msgs)
    assert "station[1] chord: Input should be greater than or equal to 0.1, got -10" in joined
    assert "station[2] y: must be greater than station[1].y = 300" in joined
    assert "station[2] section: unknown section 'nope'" in joined
    assert len(msgs) == 3 and all(m.startswith(f"{path}: ") for m in msgs)


def test_mirrored_root_must_be_at_zero(write_spec):
    p = write_spec(wing_spec(stations=[dict(y=10, chord=200), dict(y=300, chord=100)]))
    assert any("station[0] y: must be 0 for a mirrored surface" in m for m in problems_of(p))


@pytest.mark.parametrize("bad,expect", [("2O12", "not a NACA designation"), ("2012", "both be zero"),
                                        ("26012", "second digit"), ("123456", "4 or 5 digits")])
def test_bad_naca(write_spec, bad, expect):
    p = write_spec(wing_spec(section=f'naca = "{bad}"'))
    msgs = problems_of(p)
    assert any("sections a naca" in m and expect in m for m in msgs)


def test_unreadable_coordinate_file(write_spec):
    p = write_spec(wing_spec(section='file = "missing.dat"'))
    msgs = problems_of(p)
    assert any("sections a" in m and "missing.dat" in m for m in msgs)


def test_malformed_coordinate_file(write_spec, tmp_path):
    (tmp_path / "bad.dat").write_text("my section\n1.0 0.0\n0.5 abc\n0.0 0.0\n")
    msgs = problems_of(write_spec(wing_spec(section='file = "bad.dat"')))
    assert any("bad.dat" in m and "line 3" in m for m in msgs)


def test_trailing_edge_too_thick(write_spec):
    p = write_spec(wing_spec(te=3.0, stations=[dict(y=0, chord=200), dict(y=300, chord=40)]))
    (msg,) = problems_of(p)
    assert 'surface[0] "w" te_thickness: 3 mm is thicker than the section allows at station[1] (y=300)' in msg
    assert "at most" in msg


def test_cli_exit_2_and_no_traceback(write_spec, tmp_path):
    p = write_spec(wing_spec(stations=[dict(y=0, chord=0), dict(y=0, chord=100)]))
    res = run_build(p, tmp_path / "out")
    assert res.exit_code == 2
    assert "Traceback" not in res.output
    assert "spec error:" in res.output and "chord" in res.output
    assert not (tmp_path / "out").exists()


def test_cli_missing_spec_file(tmp_path):
    res = run_build(tmp_path / "nope.toml", tmp_path / "out")
    assert res.exit_code == 2 and "cannot read the spec" in res.output


def test_invalid_geometry_exit_3_nothing_written(write_spec, tmp_path):
    """A smooth chord curve that dips below zero between stations cannot be lofted."""
    st = [dict(y=0, chord=200), dict(y=100, chord=10), dict(y=110, chord=200), dict(y=300, chord=10)]
    p = write_spec(wing_spec(interpolation="smooth", mirror=False, stations=st))
    with pytest.raises(GeometryError):
        build_models(load_spec(p))
    res = run_build(p, tmp_path / "out")
    assert res.exit_code == 3 and "Traceback" not in res.output
    assert "geometry error" in res.output and "nothing was written" in res.output
    # names the file, the surface and the stations, as a spec error does
    assert f'geometry error: {p}: surface "w" chord' in res.output, res.output
    assert "station[0]" in res.output and "station[1]" in res.output
    assert not (tmp_path / "out").exists()


def test_self_crossing_section_refused(write_spec):
    """A blend extrapolated far past its sections turns the section inside out."""
    text = wing_spec(te=0.0, mirror=False) + '[sections.b]\nnaca = "0030"\n'
    text = text.replace('[[surface.station]]\nsection = "a"\ny = 400',
                        '[[surface.station]]\nsection = "a"\nblend = { section = "b", fraction = 1.0 }\ny = 400')
    build_models(load_spec(write_spec(text)))  # a real blend is fine
    import numpy as np

    from geomgen.geometry.polygon import polygon_crosses_itself

    bowtie = np.array([[0, 0], [1, 1], [1, 0], [0, 1]], float)
    assert polygon_crosses_itself(bowtie)
    assert not polygon_crosses_itself(np.array([[0, 0], [1, 0], [1, 1], [0, 1]], float))


def test_a_sharp_edge_closed_by_a_repeated_point_is_not_a_crossing():
    """Found by the long CLI property run: a sharp-edged loop whose last point repeats the
    first up to rounding (1e-19) had its two edge segments meeting there taken for a crossing,
    and a blended section was refused as "crossing itself". The two segments that meet at a
    repeated point are neighbours; a real crossing next to such an edge is still found."""
    import numpy as np

    from geomgen.geometry.polygon import polygon_crosses_itself
    from geomgen.sections import naca

    # the loop's edge points as the blended section gave them (unit chord): first and last
    # differ by 2e-19 in z, and the two edge segments meet there at a small angle
    first, last = np.array([1.0, -5.105846793396055e-05]), np.array([1.0, -5.1058467933960336e-05])
    s = 0.5 * (1 - np.cos(np.linspace(0, np.pi, 200)))
    sec = naca("4619", closed_te=True)
    up, lo = np.column_stack(sec.upper(s)), np.column_stack(sec.lower(s))
    loop = np.vstack([up[::-1], lo[1:]])
    loop[0], loop[1], loop[-2], loop[-1] = first, [0.9999376228035857, -3.461163656728579e-05], \
        [0.9999390096780750, -5.995371940543644e-05], last
    assert not polygon_crosses_itself(loop)
    twisted = loop.copy()
    twisted[-2] = [0.99994, -2.0e-05]  # now above the upper side's first segment: a real crossing
    assert polygon_crosses_itself(twisted)


def test_found_by_the_property_a_sharp_edged_blend_of_a_coordinate_file_builds(tmp_path):
    """The long run's case: section a from a coordinate file (98 points a side, 5 decimals),
    blended linearly into an inverted 4619 with a sharp edge: it builds."""
    import sys

    sys.path.insert(0, str(__import__("pathlib").Path(__file__).parent))
    from fuzz_specs import coordinate_files, spec_text

    p = {"a": "5316", "b": "4619", "invert_b": True, "thickness_b": None, "mirror": True,
         "orientation": "vertical-up", "interpolation": "linear", "incidence": -8.8, "te": 0.0, "tip": "flat",
         "reference": 0.25, "position": (0.0, 0.0, 0.0), "file_a": (98, 5, "loop"),
         "stations": [{"y": 0.0, "chord": 101.891, "section": "a"},
                      {"y": 10.0, "chord": 79.24, "x": 13.0, "twist": -2.48, "section": "b"},
                      {"y": 140.951, "chord": 56.711, "section": "b"}]}
    (tmp_path / "fz.toml").write_text(spec_text(p))
    for name, text in coordinate_files(p).items():
        (tmp_path / name).write_text(text)
    (m,) = build_models(load_spec(tmp_path / "fz.toml"))
    assert m.half_span == pytest.approx(140.951)


def test_a_crossing_section_is_refused_naming_its_stations_and_what_passes(write_spec, monkeypatch):
    """The refusal names the surface, where (station or the two stations around it) and what
    would pass (every refusal says what to change)."""
    import geomgen.geometry.model as gm

    p = write_spec(wing_spec(te=0.0, mirror=False))
    monkeypatch.setattr(gm, "polygon_crosses_itself", lambda loop: True)
    with pytest.raises(GeometryError) as exc:
        build_models(load_spec(p))
    msg = str(exc.value)
    assert 'surface "w"' in msg and "station[0]" in msg and "what passes:" in msg


def test_a_trailing_edge_too_thick_between_stations_names_both_stations(write_spec):
    """A smooth chord curve dips between stations; the trailing edge it cannot carry there is
    refused with the place between the two stations named."""
    st = [dict(y=0, chord=200), dict(y=300, chord=150), dict(y=400, chord=20), dict(y=450, chord=25)]
    p = write_spec(wing_spec(te=0.5, mirror=False, interpolation="smooth", stations=st, section='naca = "0006"'))
    with pytest.raises(SpecError) as exc:
        build_models(load_spec(p))
    (msg,) = exc.value.problems
    assert '"w" te_thickness' in msg
    assert "between station[2] (y=400) and station[3] (y=450)" in msg and "what passes: te_thickness <=" in msg
