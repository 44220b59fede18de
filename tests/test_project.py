"""One project per command: the spec is loaded once, the models built once, the lattice
solved once, whatever pipelines the command runs (report = build + check + balance + pages)."""

from __future__ import annotations

import pytest
from click.testing import CliRunner
from conftest import DEMO, wing_spec

from geomgen.cli import main
from geomgen.project import Project, default_out_dir


def count_calls(monkeypatch, obj, name, counter, key):
    real = getattr(obj, name)

    def wrapped(*a, **k):
        counter[key] = counter.get(key, 0) + 1
        return real(*a, **k)

    monkeypatch.setattr(obj, name, wrapped)


def counters(monkeypatch) -> dict:
    import geomgen.geometry
    import geomgen.spec
    from geomgen.hydro import solve

    n: dict = {}
    count_calls(monkeypatch, geomgen.spec, "load_spec", n, "spec loads")
    count_calls(monkeypatch, geomgen.geometry, "build_models", n, "model builds")
    real = solve.Flow.solve.__func__

    def flow_solve(cls, lat):
        n["lattice solves"] = n.get("lattice solves", 0) + 1
        return real(cls, lat)

    monkeypatch.setattr(solve.Flow, "solve", classmethod(flow_solve))
    return n


def solves_of_one_analysis(monkeypatch) -> int:
    """Lattice solves of one analysis of the demo (the free surface and its deep-water twin
    and the shim's changed sets are lattices of their own)."""
    from geomgen.hydro import analyse_spec
    from geomgen.spec import load_spec

    n = counters(monkeypatch)
    analyse_spec(load_spec(DEMO))
    return n["lattice solves"]


@pytest.mark.slow
def test_report_loads_builds_and_solves_once(tmp_path, monkeypatch):
    one = solves_of_one_analysis(monkeypatch)
    n = counters(monkeypatch)
    r = CliRunner().invoke(main, ["report", str(DEMO), "-o", str(tmp_path / "o")])
    assert r.exit_code == 0, r.output
    assert n == {"spec loads": 1, "model builds": 1, "lattice solves": one}


def test_balance_loads_and_solves_once(monkeypatch):
    one = solves_of_one_analysis(monkeypatch)
    assert one >= 2                           # the free surface and its deep-water twin
    n = counters(monkeypatch)
    r = CliRunner().invoke(main, ["balance", str(DEMO)])
    assert r.exit_code == 0, r.output
    assert n == {"spec loads": 1, "model builds": 1, "lattice solves": one}


def test_project_memo_and_default_folder(write_spec):
    p = Project(write_spec(wing_spec()))
    assert p.models is p.models and p.name == "t"
    calls = []
    assert p.memo("k", lambda: calls.append(1) or 42) == 42 and p.memo("k", lambda: calls.append(1)) == 42
    assert calls == [1]
    assert default_out_dir("specs/demo-foilset.toml").as_posix() == "out/demo-foilset"
    assert Project.of(p) is p
    info = p.output_info("build")
    assert info["set"] == "t" and info["command"] == "build" and len(info["spec_sha256"]) == 64


def test_a_second_check_with_other_options_measures_again(tmp_path, write_spec):
    """The memo is keyed by how the check was asked: check(p) then check(p, rebuild=True,
    write_record=False) runs twice; check(p, out_b, stl_tol=0.01) measures in out_b at 0.01 mm
    and leaves p's own folder, tolerance and result alone."""
    from unittest import mock

    from geomgen.check import run as check_run
    from geomgen.project import Project

    p = Project(write_spec(wing_spec()), tmp_path / "a")
    calls = []
    real = check_run._check

    def counting(project, *a, **k):
        calls.append((project.out_dir, project.stl_tol))
        return real(project, *a, **k)

    with mock.patch.object(check_run, "_check", counting):
        r1 = check_run.check(p)
        r2 = check_run.check(p, rebuild=True, write_record=False)
        r3 = check_run.check(p, tmp_path / "b", stl_tol=0.01)
        r4 = check_run.check(p)
    assert len(calls) == 3 and r4 is not r3
    assert calls[2] == (tmp_path / "b", 0.01) and r3.out_dir == tmp_path / "b" and r3.stl_tol == 0.01
    assert p.out_dir == tmp_path / "a" and p.stl_tol != 0.01 and r1.out_dir == tmp_path / "a"
    assert r2.built and (tmp_path / "b" / "print").is_dir()
