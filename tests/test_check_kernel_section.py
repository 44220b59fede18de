"""A second, independent measurement path: the CAD kernel's own section of the written STEP
(BRepAlgoAPI_Section with a plane at the station) holds the check's chord, outline extent and
thickness within the build tolerance, on parts the check once got wrong (incidence, a first
station off span 0, close kinked stations, cambered and twisted sections, vertical parts) and
on generated ones drawn from the whole range the schema allows (slow: kernel)."""

from __future__ import annotations

import os

import numpy as np
import pytest
from conftest import wing_spec
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from geomgen import defaults
from geomgen.check.run import check
from geomgen.errors import GeomgenError

pytestmark = pytest.mark.slow


def kernel_section_edges(step_path, axis: int, at: float, per_edge: int = 1500) -> list[np.ndarray]:
    """Points (m, 3) of each edge of the kernel's section of the STEP's solid by the plane
    span = ``at``, sampled evenly in the edge's parameter (the kernel's own intersection
    curves)."""
    from OCP.BRepAdaptor import BRepAdaptor_Curve
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Section
    from OCP.gp import gp_Dir, gp_Pln, gp_Pnt
    from OCP.TopAbs import TopAbs_EDGE
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    from geomgen.cad.readback import read_step

    (_, solid), = read_step(step_path)
    o = [0.0, 0.0, 0.0]
    n = [0.0, 0.0, 0.0]
    o[axis], n[axis] = at, 1.0
    sec = BRepAlgoAPI_Section(solid, gp_Pln(gp_Pnt(*o), gp_Dir(*n)))
    sec.Build()
    assert sec.IsDone()
    edges = []
    exp = TopExp_Explorer(sec.Shape(), TopAbs_EDGE)
    while exp.More():
        c = BRepAdaptor_Curve(TopoDS.Edge_s(exp.Current()))
        ts = np.linspace(c.FirstParameter(), c.LastParameter(), per_edge)
        edges.append(np.array([(p.X(), p.Y(), p.Z()) for p in (c.Value(float(t)) for t in ts)]))
        exp.Next()
    return edges


def independent_figures(edges: list, axis: int, le_design: np.ndarray) -> dict:
    """Nominal chord, largest extent and thickness of a kernel section, computed here without
    the check's code: the trailing-edge flat is the section's straight edge (the cut of the
    ruled strip; none on a sharp edge), its midpoint the chord line's aft end (a sharp edge:
    the point farthest from the leading edge); the leading edge is the section point nearest
    the design's; thickness by binning the points along the chord line and taking upper minus
    lower in each thin bin."""
    from scipy.spatial.distance import pdist

    keep = [k for k in range(3) if k != axis]
    qs = [e[:, keep] for e in edges]
    q = np.vstack(qs)
    extent_all = float(np.ptp(q, axis=0).max())
    le = q[int(np.argmin(np.linalg.norm(q - le_design[keep], axis=1)))]
    flat = None
    for e in qs:
        a, b = e[0], e[-1]
        L = float(np.linalg.norm(b - a))
        if 0 < L < 0.2 * extent_all:
            u = (b - a) / L
            dev = np.abs((e - a) @ np.array([-u[1], u[0]])).max()
            if dev < 1e-6 * extent_all:
                flat = 0.5 * (a + b)
    te = flat if flat is not None else q[int(np.argmax(np.linalg.norm(q - le, axis=1)))]
    chord = float(np.linalg.norm(te - le))
    e = (te - le) / chord
    nrm = np.array([-e[1], e[0]])
    x, h = (q - le) @ e, (q - le) @ nrm
    bins = np.linspace(0.02 * chord, 0.98 * chord, 400)
    width = 0.004 * chord
    t = [np.ptp(h[np.abs(x - b) < width]) for b in bins if (np.abs(x - b) < width).sum() >= 2]
    extent = float(pdist(q[::3]).max())
    return {"chord": chord, "extent": extent, "thickness": float(max(t)), "flat": flat is not None}


def held_by_the_kernel(res, model, step_path, ys) -> None:
    frame = model.span_frame()
    for y in ys:
        at = frame["origin"] + frame["sign"] * y
        edges = kernel_section_edges(step_path, frame["axis"], at)
        ind = independent_figures(edges, frame["axis"], model.leading_edges_at([at])[0])
        assert ind["flat"] == model.te_open, (y, ind)
        recs = {r.figure.split("@")[0]: r for r in res.records if r.part == model.name and r.figure.endswith(f"@{y:g}")}
        # the binned thickness samples 0.8 % wide bins: it reads low by a bin's slope at most
        assert recs["chord"].step == pytest.approx(ind["chord"], abs=defaults.CHECK_LENGTH_MM), (y, ind)
        assert recs["extent"].step == pytest.approx(ind["extent"], abs=defaults.CHECK_LENGTH_MM), (y, ind)
        assert recs["thickness"].step == pytest.approx(ind["thickness"], abs=defaults.CHECK_THICKNESS_MM
                                                      + 0.004 * recs["chord"].step), (y, ind)


CASES = {
    "incidence 6, NACA 4415": wing_spec(te=0.3, incidence=6, section='naca = "4415"',
                                        stations=[dict(y=0, chord=240), dict(y=500, chord=120)]),
    "first station at 30 mm": wing_spec(mirror=False, te=0.3, section='naca = "2412"',
                                        stations=[dict(y=30, chord=150), dict(y=330, chord=50)]),
    "close zig-zag stations": wing_spec(mirror=False, te=0.2, section='naca = "2412"', stations=[
        dict(y=9.069, chord=26.519), dict(y=154.090, chord=31.537, sweep=-37.5),
        dict(y=158.571, chord=39.336, sweep=7.9)]),
    "twisted mast": wing_spec(mirror=False, te=0.4, orientation="vertical-up", section='naca = "0012"',
                              stations=[dict(y=50, chord=120), dict(y=450, chord=100, twist=-4)]),
    "fin, reflexed 5-digit": wing_spec(mirror=False, te=0.3, orientation="vertical-down", incidence=-3,
                                       section='naca = "23112"', stations=[
                                           dict(y=5, chord=90), dict(y=8, chord=85, dihedral=20),
                                           dict(y=140, chord=40, dihedral=-24, twist=3)]),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_the_kernels_own_section_holds_the_check(tmp_path, write_spec, name):
    from geomgen.project import Project

    p = write_spec(CASES[name])
    res = check(p, tmp_path / "o", write_record=False)
    assert not res.faults, [(r.figure, r.intended, r.step, r.stl) for r in res.faults]
    model = Project(p, tmp_path / "o").models[0]
    ys = [float(v) for v in model.planform.y]
    held_by_the_kernel(res, model, tmp_path / "o" / res.parts[model.name]["step"], ys)


@st.composite
def edge_weighted_part(draw):
    """A one-surface part from the whole schema range, weighted toward its edges: chords
    0.1-5,000 mm (log-uniform), station gaps down to tiny against the chord, kinked dihedral
    and zig-zag sweep, extreme camber and thickness, twist, any orientation, mirrored or not,
    a first station off span 0."""
    scale = 10 ** draw(st.floats(-0.5, 3.5))
    n = draw(st.integers(2, 4))
    y = draw(st.floats(0.0, 2.0)) * scale * draw(st.sampled_from([0.0, 0.0, 0.1, 1.0]))
    stations = []
    for k in range(n):
        c = scale * draw(st.floats(0.3, 1.0))
        s = dict(y=round(y, 3), chord=round(max(c, 0.1), 3))
        if k:
            s.update(sweep=draw(st.sampled_from([-40.0, -10.0, 0.0, 15.0, 45.0])),
                     dihedral=draw(st.sampled_from([-25.0, 0.0, 5.0, 30.0])),
                     twist=draw(st.sampled_from([-6.0, 0.0, 4.0])))
        stations.append(s)
        y += scale * draw(st.sampled_from([0.05, 0.2, 1.0, 3.0]))
    camber, pos, thick = draw(st.sampled_from([0, 2, 6, 9])), draw(st.sampled_from([2, 4, 7])), \
        draw(st.sampled_from([6, 12, 21, 30]))
    naca = f"{camber}{pos if camber else 0}{thick:02d}"
    te = round(min(0.02 * scale, draw(st.sampled_from([0.0, 0.05, 0.5]))), 4)
    return wing_spec(mirror=draw(st.booleans()), te=te, incidence=draw(st.sampled_from([-10.0, 0.0, 3.0, 12.0])),
                     orientation=draw(st.sampled_from(["horizontal", "vertical-up", "vertical-down"])),
                     interpolation=draw(st.sampled_from(["linear", "smooth"])),
                     section=f'naca = "{naca}"', stations=stations)


@settings(max_examples=3 if os.environ.get("GEOMGEN_FUZZ", "fast") == "fast" else 200, derandomize=True, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
@given(edge_weighted_part())
def test_generated_parts_are_refused_or_held_by_the_kernel(tmp_path_factory, text):
    """Either refused before writing (a geometry or spec error naming its cause) or every
    figure within tolerance and the kernel's section agreeing with the check's."""
    from geomgen.project import Project

    text = text.replace('role = "wing"', 'role = "fin"') if "vertical-down" in text else text
    text = text.replace('role = "wing"', 'role = "mast"') if "vertical-up" in text else text
    if 'role = "mast"' in text or 'role = "fin"' in text:
        text = text.replace("mirror = true", "mirror = false")
    d = tmp_path_factory.mktemp("k")
    p = d / "spec.toml"
    p.write_text(text)
    try:
        res = check(p, d / "o", write_record=False)
    except GeomgenError as exc:
        assert str(exc).strip()
        assert not (d / "o" / "cad").exists()
        return
    assert not res.faults, [(r.figure, r.intended, r.step, r.stl) for r in res.faults]
    model = Project(p, d / "o").models[0]
    ys = [float(v) for v in model.planform.y]
    held_by_the_kernel(res, model, d / "o" / res.parts[model.name]["step"], ys[:1] + ys[-1:])
