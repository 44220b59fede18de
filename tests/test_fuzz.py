"""Property-based tests: valid specs anywhere in the parameter space give a valid solid
whose measured figures agree with the intended ones, or a named, located refusal; broken
specs give a named error with exit 2. Never a traceback.

Fast profile by default; the long profile (GEOMGEN_FUZZ=long, ≥ 10,000 cases) is run with
``make fuzz-long`` and its result recorded in DEVELOPERS.md.
"""

from __future__ import annotations

import re

import numpy as np
import pytest
from click.testing import CliRunner
from fuzz_specs import BAD_VALUES, PROFILE, run_cli_case, spec_params, spec_text
from hypothesis import given, settings
from hypothesis import strategies as st

from geomgen.errors import GeometryError, SpecError
from geomgen.geometry import build_models
from geomgen.geometry.figures import intended_figures
from geomgen.spec import load_spec_text

settings.load_profile(PROFILE)

#: generated specs through the command line in the long profile (GEOMGEN_FUZZ_CASES overrides)
CLI_CASES = int(__import__("os").environ.get("GEOMGEN_FUZZ_CASES", "10000"))


def models_or_refusal(text):
    """The models, or None when the spec is refused with a clean, located message."""
    try:
        return build_models(load_spec_text(text, "fz.toml"))
    except SpecError as exc:
        assert exc.problems and all(p.startswith("fz.toml: ") for p in exc.problems)
        return None
    except GeometryError as exc:
        assert 'surface "part"' in str(exc)
        return None


@given(spec_params())
def test_valid_specs_give_watertight_meshes_matching_the_intended_volume(params):
    """Geometry core (no kernel): skin, watertight mesh, volume within tolerance × area."""
    import trimesh

    from geomgen.cad.shape import SurfaceShape as Part

    models = models_or_refusal(spec_text(params))
    if models is None:
        return
    m = models[0]
    f = intended_figures(m)
    assert f.projected_area_cm2 > 0 and f.volume_cm3 > 0 and f.mac_mm > 0
    # the skin spans the part: every station is a loft section (found by the long CLI run)
    lo, hi = m.skin.v_range
    assert hi == pytest.approx(m.half_span, abs=1e-9)
    assert lo == pytest.approx(-m.half_span if m.mirror else float(m.planform.y[0]), abs=1e-9)
    v, faces = Part(m).mesh(0.05)
    mesh = trimesh.Trimesh(v, faces, process=True)
    assert mesh.is_watertight and mesh.is_winding_consistent
    assert abs(mesh.volume - f.volume_cm3 * 1000) <= 0.05 * mesh.area + 1e-3 * f.volume_cm3 * 1000


@pytest.mark.slow
@settings(max_examples=6 if PROFILE == "fast" else 300, derandomize=PROFILE == "fast")
@given(spec_params())
def test_valid_specs_give_valid_solids_measured_as_intended(params):
    """Through the kernel: a valid solid whose STEP volume and outline match the intended."""
    from geomgen.cad.loft import check_solid
    from geomgen.cad.measure import measure_solid
    from geomgen.cad.shape import SurfaceShape as Part
    from geomgen.check.measure import measure_step_solid

    models = models_or_refusal(spec_text(params))
    if models is None:
        return
    m = models[0]
    f = intended_figures(m)
    try:
        solid = Part(m).solid
    except GeometryError as exc:  # refused before writing: must name the part
        assert "part" in str(exc)
        return
    assert check_solid(solid) == []
    from geomgen.geometry.slices import Frame

    meas = measure_step_solid(measure_solid("part", solid), frame=Frame(**m.span_frame()))["figures"]
    # the volume of the solid's skin by its exact quadrature (the kernel's own integral read
    # 0.16-0.21 % off on some generated parts at any accuracy asked: see check.measure)
    assert meas["volume_cm3"] == pytest.approx(f.volume_cm3, rel=1e-3)
    assert meas["span_mm"] == pytest.approx(f.span_mm, abs=0.05)
    assert meas["projected_area_cm2"] == pytest.approx(f.projected_area_cm2, rel=2e-3)


def _log(outcome: str, detail: str = "") -> None:
    """With GEOMGEN_FUZZ_LOG set, one line per generated spec (the long run's counts)."""
    import os

    path = os.environ.get("GEOMGEN_FUZZ_LOG")
    if path:
        with open(path, "a") as f:
            f.write(outcome + "\t" + detail.replace("\n", " ")[:300] + "\n")


@pytest.mark.slow
@settings(max_examples=5 if PROFILE == "fast" else CLI_CASES, derandomize=PROFILE == "fast")
@given(spec_params(files=True))
def test_every_spec_is_refused_with_its_cause_or_checks_clean(tmp_path_factory, params):
    """Through the command line: a plausible spec is either refused before anything
    is written (exit 2 or 3, the part or the field named) or builds and its written files check
    clean (exit 0: no geometry fault; these specs carry no expectations). The long run of
    10,000 and more goes through ``tests/fuzz_long.py`` (same judge, several processes)."""
    outcome, detail, problem = run_cli_case(params, tmp_path_factory.mktemp("fz"))
    _log(outcome, detail)
    assert not problem, f"{problem}: {outcome}: {detail}"


BASE = spec_text({"a": "2412", "b": "0012", "invert_b": False, "thickness_b": None, "mirror": True,
                  "orientation": "horizontal", "interpolation": "linear", "incidence": 1.0, "te": 0.5,
                  "tip": "flat", "reference": 0.25,
                  "stations": [{"y": 0.0, "chord": 200.0, "section": "a"},
                               {"y": 400.0, "chord": 100.0, "x": 20.0, "z": -10.0, "twist": -1.0, "section": "b"}]})


def corrupt(text: str, where: str, bad: str) -> str:
    """Put ``bad`` at the TOML path ``where`` (table.key) of the base spec, or add the key."""
    table, key = where.rsplit(".", 1) if "." in where else ("", where)
    header = {"": None, "surface": "[[surface]]", "station": "[[surface.station]]", "sections": "[sections.a]"}[table]
    lines = text.splitlines()
    start = 0 if header is None else lines.index(header) + 1
    end = next((i for i in range(start, len(lines)) if lines[i].startswith("[")), len(lines))
    for i in range(start, end):
        if re.match(rf"{re.escape(key)}\s*=", lines[i]):
            lines[i] = f"{key} = {bad}"
            break
    else:
        lines.insert(end, f"{key} = {bad}")
    return "\n".join(lines) + "\n"


@pytest.mark.parametrize("where,bad", BAD_VALUES)
def test_every_field_wrong_in_turn_is_named(where, bad, tmp_path):
    from geomgen.cli import main

    text = corrupt(BASE, where, bad)
    p = tmp_path / "bad.toml"
    p.write_text(text)
    with pytest.raises(SpecError) as exc:
        build_models(load_spec_text(text, str(p)))
    key = where.rsplit(".", 1)[-1]
    assert any(key in m and m.startswith(str(p)) for m in exc.value.problems), exc.value.problems
    r = CliRunner().invoke(main, ["balance", str(p)])
    assert r.exit_code == 2 and "Traceback" not in r.output


@given(st.text(max_size=400))
def test_arbitrary_text_is_a_clean_spec_error(text):
    try:
        load_spec_text(text, "junk.toml")
    except SpecError as exc:
        assert all(p.startswith("junk.toml: ") for p in exc.problems)


def test_found_by_the_property_stl_centroid_of_a_long_mirrored_vertical_part():
    """Found by test_every_spec_is_refused_with_its_cause_or_checks_clean: the STEP agrees with
    the intended centroid; the STL's centroid sat 0.63 mm off along the span of this 1.65 m
    thin mirrored part at 0.05 mm chordal tolerance, over a fixed 0.2 mm allowance. It is the
    chordal error itself (it halves with the tolerance), so the allowance is now the mesh's
    own bound, tol · Σ A_i |x_i − c| / V (the mesh and surface differ by a shell at most tol
    thick); the check must accept the file and the bound must hold at every tolerance."""
    import trimesh

    from geomgen.geometry.figures import centroid
    from geomgen.geometry.tessellate import surface_mesh

    p = {"a": "0006", "b": "0006", "invert_b": True, "thickness_b": 9.27, "mirror": True,
         "orientation": "vertical-down", "interpolation": "linear", "incidence": 0.0, "te": 0.0, "tip": "flat",
         "reference": 0.0, "position": (0.0, 0.0, 0.0),
         "stations": [{"y": 0.0, "chord": 361.4, "section": "a"},
                      {"y": 300.0, "chord": 143.891, "x": 0.0, "dihedral": -18.3, "twist": -2.36, "section": "a"},
                      {"y": 524.632, "chord": 372.411, "x": 0.0, "dihedral": 13.19, "twist": 4.67, "section": "a"},
                      {"y": 824.632, "chord": 368.976, "x": 0.0, "z": 34.05, "twist": -8.4, "section": "a"}]}
    m = build_models(load_spec_text(spec_text(p), "fz.toml"))[0]
    from geomgen.check.compare import compare_part
    from geomgen.geometry.figures import intended_figures

    c = centroid(m)
    for tol in (0.05, 0.02):
        v, f = surface_mesh(m, tol)
        mesh = trimesh.Trimesh(v, f, process=True)
        lever = (mesh.area_faces[:, None] * np.abs(mesh.triangles_center - mesh.center_mass)).sum(0) / mesh.volume
        err = np.abs(mesh.center_mass - c)
        assert (err <= tol * lever).all(), (tol, err, tol * lever)
    # the mesh refined at its quad centres (and split along the closer diagonal) keeps it far
    # closer than the 0.63 mm it once faulted with
    assert err[2] < 0.1
    # the check's record: STL centroid within its tolerance, no fault
    stl = {"centroid_mm": tuple(mesh.center_mass), "centroid_lever": tuple(lever)}
    recs = compare_part("p", intended_figures(m).as_dict(), None, stl, 0.02, {})
    assert not [r for r in recs if r.fault]


NUMERIC_FIELDS = ["surface.reference", "surface.incidence", "surface.te_thickness", "surface.loft_sections",
                  "surface.tip_length", "surface.tip_end", "station.y", "station.chord", "station.twist",
                  "station.x", "station.z"]
HOSTILE = st.one_of(
    st.sampled_from(["inf", "-inf", "nan", "true", "false", '"1"', "[]", "{}", "1e308", "-1e308"]),
    st.floats(min_value=1e5, max_value=1e308).map(repr),
    st.floats(min_value=-1e308, max_value=-1e5).map(repr))


@given(st.sampled_from(NUMERIC_FIELDS), HOSTILE)
def test_hostile_numbers_are_refused_naming_the_field(where, bad):
    """Any hostile value in any number of the spec: exit 2 naming the file and the field,
    no traceback, nothing written."""
    import tempfile
    from pathlib import Path

    from geomgen.cli import main

    with tempfile.TemporaryDirectory() as d:
        p, out = Path(d) / "h.toml", Path(d) / "out"
        p.write_text(corrupt(BASE, where, bad))
        r = CliRunner().invoke(main, ["balance", str(p), "-o", str(out)])
        assert r.exit_code == 2 and "Traceback" not in r.output, r.output
        key = where.rsplit(".", 1)[-1]
        assert any(line.startswith(f"spec error: {p}") and key in line for line in r.output.splitlines()), r.output
        assert not out.exists()


@pytest.mark.slow
def test_found_by_the_property_a_kinked_outline_is_integrated_piece_by_piece(tmp_path):
    """Found by the long run through the command line: a planform whose chord drops from 189
    to 53 mm within 31 mm of the root and rises again (linear stations, round tip) measured a
    MAC span position 0.085 mm off (tolerance 0.05): the measurement integrated across the
    kinks of its outline. It now integrates between the skin's creases, read from the file."""
    from geomgen.cli import main

    p = {"a": "21012", "b": "21012", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "horizontal", "interpolation": "linear", "incidence": 0.0, "te": 0.0, "tip": "round",
         "reference": 0.0, "position": (0.0, 0.0, 0.0),
         "stations": [{"y": 0.0, "chord": 188.74, "section": "a"},
                      {"y": 31.446, "chord": 52.589, "x": 10.0, "z": 15.963817721423297, "twist": 0.441,
                       "section": "a"},
                      {"y": 309.589, "chord": 178.491, "sweep": 0.0, "z": 0.0, "twist": 0.0, "section": "a"},
                      {"y": 392.828, "chord": 194.073, "x": 0.0, "z": 0.0, "twist": 0.0, "section": "a"}]}
    spec = tmp_path / "fz.toml"
    spec.write_text(spec_text(p))
    r = CliRunner().invoke(main, ["check", str(spec), "-o", str(tmp_path / "out"), "--json"])
    assert r.exit_code == 0, r.output
    import json

    rec = {x["figure"]: x for x in json.loads(r.stdout)["records"]}
    assert abs(rec["mac_y_mm"]["step"] - rec["mac_y_mm"]["intended"]) < 0.02


@pytest.mark.slow
def test_found_by_the_property_a_sawtooth_planform_checks_clean(tmp_path):
    """Found by the long run: chords 13 / 42 / 10 / 40 mm at 5 mm spacing. The skin holds the
    intended volume (its exact quadrature, and a fine mesh of the kernel's solid), but the
    kernel's volume integral read 0.21 % low at any accuracy asked: the STEP volume is now the
    skin's exact quadrature from the file (the kernel's is computed only on demand)."""
    from geomgen.cli import main

    st = lambda y, c: {"y": y, "chord": c, "x": 0.0, "z": 0.0, "twist": 0.0, "section": "a"}  # noqa: E731
    p = {"a": "21012", "b": "21012", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "horizontal", "interpolation": "linear", "incidence": 0.0, "te": 0.0, "tip": "flat",
         "reference": 0.0, "position": (0.0, 0.0, 0.0),
         "stations": [{"y": 0.0, "chord": 40.0, "section": "a"}, st(267.562, 13.333), st(272.562, 41.557),
                      st(277.562, 9.538), st(282.562, 40.0)]}
    spec = tmp_path / "fz.toml"
    spec.write_text(spec_text(p))
    r = CliRunner().invoke(main, ["check", str(spec), "-o", str(tmp_path / "out"), "--json"])
    assert r.exit_code == 0, r.output


@pytest.mark.slow
def test_found_by_the_property_the_stl_outline_is_integrated_between_its_rows(tmp_path):
    """Found by the long run: chord 40 → 40 → 20 → 40 mm within 92 mm of the root; the STL's
    MAC span position read 0.21 mm off (tolerance 0.15): its outline, piecewise linear between
    the mesh's rows of vertices, was integrated across the kinks. It is now integrated row by row."""
    import json

    from geomgen.cli import main

    st = lambda y, c: {"y": y, "chord": c, "x": 0.0, "z": 0.0, "twist": 0.0, "section": "a"}  # noqa: E731
    p = {"a": "21012", "b": "21012", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "horizontal", "interpolation": "linear", "incidence": 0.0, "te": 0.0, "tip": "flat",
         "reference": 0.0, "position": (0.0, 0.0, 0.0),
         "stations": [{"y": 0.0, "chord": 40.0, "section": "a"}, st(5.0, 40.0), st(10.0, 20.0), st(92.31, 40.0),
                      st(337.31, 40.0)]}
    spec = tmp_path / "fz.toml"
    spec.write_text(spec_text(p))
    r = CliRunner().invoke(main, ["check", str(spec), "-o", str(tmp_path / "out"), "--json"])
    assert r.exit_code == 0, r.output
    rec = {x["figure"]: x for x in json.loads(r.stdout)["records"]}
    assert abs(rec["mac_y_mm"]["stl"] - rec["mac_y_mm"]["intended"]) < 0.05


@pytest.mark.slow
@pytest.mark.parametrize("file_a", [(60, 6, "loop"), (25, 5, "split")])
def test_a_coordinate_file_section_through_the_command_line_checks_clean(tmp_path, file_a):
    """The long run's generator also writes section ``a`` as a coordinate file (the NACA
    formula's points): such a spec goes through ``geomgen check`` clean, like its NACA twin."""
    p = {"a": "4412", "b": "0012", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "horizontal", "interpolation": "linear", "incidence": 1.0, "te": 0.6, "tip": "flat",
         "reference": 0.25, "position": (0.0, 0.0, 0.0), "file_a": file_a,
         "stations": [{"y": 0.0, "chord": 200.0, "section": "a"},
                      {"y": 300.0, "chord": 120.0, "x": 30.0, "z": 5.0, "twist": -1.0, "section": "b"}]}
    assert 'file = "a.dat"' in spec_text(p)
    assert run_cli_case(p, tmp_path) == ("clean", "", "")


@pytest.mark.slow
def test_found_by_the_property_an_open_edge_on_a_short_chord_checks_clean(tmp_path):
    """Found by the long CLI run: a 1 mm open edge on a 37 mm chord (section from a
    coordinate file). The chord line aimed at the farther trailing-edge corner, which was the
    upper one in the model's loop and the lower one in the file's slice: the second moment
    about it read 7 % apart (a false fault). The line now runs to the edge midpoint."""
    p = {"a": "22112", "b": "21012", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "vertical-up", "interpolation": "smooth", "incidence": 6.643, "te": 1.0, "tip": "round",
         "reference": 0.0, "position": (0.0, 0.0, 0.0), "file_a": (25, 5, "loop"),
         "stations": [{"y": 0.0, "chord": 50.0, "section": "b"},
                      {"y": 15.022, "chord": 36.741, "sweep": -25.319267389262322, "z": 42.56918491816296,
                       "twist": -5.421703790819449, "section": "a"}]}
    assert run_cli_case(p, tmp_path) == ("clean", "", "")


@pytest.mark.slow
def test_found_by_the_property_a_sheared_twisted_part_checks_clean(tmp_path):
    """Found by the long CLI run: the mid station 126 mm aft of its neighbour over 5 mm of
    span, 8° of twist between them. The STL's triangles across the twisted slivers bulged past
    the mesh tolerance and added 0.2 % of wetted area (a false STL fault); quads are now
    refined at their centres and split along the closer diagonal."""
    p = {"a": "24112", "b": "0014", "invert_b": False, "thickness_b": 17.881392094617834, "mirror": True,
         "orientation": "horizontal", "interpolation": "linear", "incidence": -9.843057252154379, "te": 0.0,
         "tip": "flat", "reference": 0.0, "position": (0.0, 0.0, 0.0), "file_a": (25, 6, "loop"),
         "stations": [{"y": 0.0, "chord": 205.648, "section": "b"},
                      {"y": 5.0, "chord": 219.486, "x": -15.783898543773006, "dihedral": 1.7565942756862704e-59,
                       "twist": 1.1, "section": "a"},
                      {"y": 10.0, "chord": 226.213, "x": 110.66897534215485, "dihedral": 15.709003801521568,
                       "twist": -6.984266610582267, "section": "b"}]}
    assert run_cli_case(p, tmp_path) == ("clean", "", "")


@pytest.mark.slow
def test_found_by_the_property_the_stl_mac_span_position_of_a_long_thin_part(tmp_path):
    """Found by the long CLI run (four specs of one family): a 585 mm part of 40 / 12 / 8 mm
    chords, smooth interpolation. The STEP holds the intended MAC span position; the STL's
    read 0.19 mm off against a fixed 0.15 mm allowance. Each projected chord of a mesh within
    tol of the surface is within 2·tol, which can move ȳ by tol (ȳ² + (l − ȳ)²) / (A − 2 tol l)
    (about 1 mm here): the STL allowance is that bound (never less than before), and the STL's
    error stays inside it at two mesh tolerances (it shrinks with the tolerance)."""
    import json

    from click.testing import CliRunner

    from geomgen.cli import main

    p = {"a": "21012", "b": "21012", "invert_b": False, "thickness_b": None, "mirror": False,
         "orientation": "horizontal", "interpolation": "smooth", "incidence": 8.519915367807492, "te": 0.3,
         "tip": "flat", "reference": 0.25, "position": (-460.17961790285875, -233.81737794167202, -676.473687642718),
         "stations": [{"y": 0.0, "chord": 40.0, "section": "a"},
                      {"y": 291.132, "chord": 11.803, "x": 0.0, "z": -1.0647570339068828, "twist": 0.0, "section": "a"},
                      {"y": 585.045, "chord": 8.0, "x": 0.0, "z": 0.0, "twist": 0.0, "section": "a"}]}
    (tmp_path / "a").mkdir()
    assert run_cli_case(p, tmp_path / "a") == ("clean", "", "")
    errs = []
    for tol in (0.05, 0.02):
        out = tmp_path / f"o{tol}"
        r = CliRunner().invoke(main, ["check", str(tmp_path / "a" / "fz.toml"), "-o", str(out), "--stl-tol", str(tol),
                                      "--json"])
        assert r.exit_code == 0, r.output
        rec = next(x for x in json.loads(r.stdout)["records"] if x["figure"] == "mac_y_mm")
        assert abs(rec["step"] - rec["intended"]) <= rec["tol_step"]
        assert abs(rec["stl"] - rec["intended"]) <= rec["tol_stl"]
        errs.append(abs(rec["stl"] - rec["intended"]))
    assert errs[1] < errs[0]  # the STL's own error, shrinking with its tolerance


@pytest.mark.slow
def test_found_by_the_property_a_short_round_tipped_part_checks_clean(tmp_path):
    """Found by the long CLI run: a 10 mm-span mirrored part, 270 → 82 mm chord and a round
    tip. Its intended wetted area came from 4 × 4 Gauss nodes a knot span and read 0.11 % low
    against the file's (|Sᵤ × Sᵥ| is no polynomial; the tip's spans need more nodes): both
    now use 6 × 16, which agree with 8 × 32 to 1e-6."""
    p = {"a": "4410", "b": "0019", "invert_b": False, "thickness_b": None, "mirror": True,
         "orientation": "vertical-up", "interpolation": "smooth", "incidence": -7.346559240561126, "te": 1.0,
         "tip": "round", "reference": 0.25, "position": (0.0, 0.0, 0.0), "file_a": None,
         "stations": [{"y": 0.0, "chord": 270.272, "section": "a"},
                      {"y": 5.0, "chord": 82.441, "sweep": -5.960464477539063e-08, "dihedral": 1.2,
                       "twist": 9.999999999999998, "section": "b"}]}
    (m,) = build_models(load_spec_text(spec_text(p), "fz.toml"))
    assert m.skin.area() == pytest.approx(m.skin.area(8, 32), rel=1e-6)
    assert run_cli_case(p, tmp_path) == ("clean", "", "")


@settings(max_examples=60, deadline=None)
@given(st.text(max_size=300))
def test_compare_with_arbitrary_text_is_a_clean_spec_error_naming_that_file(tmp_path_factory, text):
    """The other spec of ``compare --with`` meets the same guards as the main spec."""
    from conftest import DEMO

    from geomgen.project import Project
    from geomgen.studies import compare

    p = tmp_path_factory.mktemp("with") / "other.toml"
    p.write_text(text)
    try:
        compare(Project(DEMO), [], [p])
    except SpecError as exc:
        assert exc.problems and all(m.startswith(str(p)) for m in exc.problems), exc.problems
