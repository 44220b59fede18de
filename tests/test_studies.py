"""Design studies: what-if comparisons, size families and sweeps; identical tables from every
executor; trade facts in direction on the demo set (common practice, no source)."""

from __future__ import annotations

import json
import math
import tomllib

import pytest
from click.testing import CliRunner
from conftest import DEMO

from geomgen.cli import main
from geomgen.errors import SpecError
from geomgen.project import Project
from geomgen.studies import Executor, compare, family, parse_change, parse_values, sweep, to_csv
from geomgen.studies.changes import apply


@pytest.fixture(scope="module")
def demo_compare():
    project = Project(DEMO)
    sets = [[parse_change("area:stabilizer*1.3")], [parse_change("move:stabilizer+60")]]
    return project, compare(project, sets)


def test_bigger_stabilizer_pushes_down_harder_moves_the_centre_forward_and_costs_efficiency(demo_compare):
    """Common practice, no source: a bigger stabilizer pushes down harder at trim, moves the net
    centre of pressure forward (the mast goes back in its tracks to restore it) and costs
    efficiency."""
    _, t = demo_compare
    base, big = t.rows[0], t.rows[1]
    assert base["stab_lift_n"] < 0  # the demo's stabilizer pushes down at cruise
    assert big["stab_lift_n"] < base["stab_lift_n"]
    assert big["cp_from_mast_mm"] < base["cp_from_mast_mm"]
    assert big["mast_move_mm"] > 0
    assert big["lift_to_drag"] < base["lift_to_drag"]


def test_longer_fuselage_moves_the_centre_forward(demo_compare):
    """Common practice, no source: a longer fuselage moves the net centre of pressure forward
    (the stabilizer's down-force acts on a longer arm); see DEVELOPERS for what the lattice
    says of its down-force and efficiency."""
    _, t = demo_compare
    base, longer = t.rows[0], t.rows[2]
    assert longer["cp_from_mast_mm"] < base["cp_from_mast_mm"] and longer["mast_move_mm"] > 0
    assert longer["neutral_point_x_mm"] > base["neutral_point_x_mm"]  # more pitch stability


def test_each_figure_equals_the_balance_of_the_changed_spec_on_its_own(demo_compare, tmp_path):
    import tomli_w

    from geomgen.hydro import balance_of

    project, t = demo_compare
    data = tomllib.loads(DEMO.read_text())
    changed = tmp_path / "changed.toml"
    changed.write_text(tomli_w.dumps(apply(data, [parse_change("area:stabilizer*1.3")])))
    alone = balance_of(Project(changed))
    row = t.rows[1]
    trim = next(p for p in alone.trim if p.speed_kmh == row["cruise_kmh"])
    assert row["stab_lift_n"] == pytest.approx(trim.lift_n["stabilizer"], rel=1e-12)
    assert row["wing_lift_n"] == pytest.approx(trim.lift_n["front-wing"], rel=1e-12)
    assert row["cp_from_mast_mm"] == pytest.approx(trim.cp_from_mast_mm, rel=1e-12)
    assert row["neutral_point_x_mm"] == pytest.approx(alone.neutral_point_x_mm, rel=1e-12)
    assert row["takeoff_kmh"] == (pytest.approx(alone.takeoff.speed_kmh, rel=1e-12) if alone.takeoff else None)


@pytest.mark.parametrize("keep", ["aspect", "span", "chord"])
def test_family_hits_its_areas_and_scales_span_and_mac_by_its_rule(keep):
    project = Project(DEMO)
    t, specs = family(project, "stabilizer", [180.0, 260.0], keep)
    base = t.rows  # every member's planform figures ride in its row
    from geomgen.geometry.figures import intended_figures

    f0 = intended_figures(project.model("stabilizer"))
    a0 = f0.projected_area_cm2
    for r, target in zip(base, (180.0, 260.0)):
        assert "error" not in r, r
        area = r["stabilizer:projected_area_cm2"]
        assert area == pytest.approx(target, rel=5e-4)  # the check's area tolerance (defaults.CHECK_RELATIVE)
        k = target / a0
        span_f, mac_f = {"aspect": (math.sqrt(k), math.sqrt(k)), "span": (1.0, k), "chord": (k, 1.0)}[keep]
        assert r["stabilizer:span_mm"] == pytest.approx(f0.span_mm * span_f, rel=1e-9)
        # MAC is taken on the finished sections (their largest extent), whose 0.5 mm trailing
        # edge does not scale: a few 1e-5 of MAC, far inside the check's tolerance
        assert r["stabilizer:mac_mm"] == pytest.approx(f0.mac_mm * mac_f, rel=2e-4)
    assert len(specs) == 2 and all(tomllib.loads(s)["name"].startswith("lakeside-cruiser-stabilizer-")
                                   for s in specs.values())


def test_a_failing_variant_is_reported_in_its_row_and_does_not_stop_the_others():
    project = Project(DEMO)
    t = sweep(project, {"surface[stabilizer].station[1].chord": [40.0, -5.0, 44.0]})
    bad = [r for r in t.rows if r.get("error")]
    assert len(bad) == 1 and "chord" in bad[0]["error"]
    assert sum(1 for r in t.rows if r.get("stab_lift_n") is not None) == 2


def test_values_and_changes_parse_or_name_the_problem():
    assert parse_values("-1:1:0.5") == [-1.0, -0.5, 0.0, 0.5, 1.0]
    assert parse_values("70,80") == [70.0, 80.0]
    for bad in ("1:0:0.5", "a,b", "nan", "0:1:0"):
        with pytest.raises(SpecError):
            parse_values(bad)
    assert parse_change("mast-15").value == -15.0
    assert parse_change("area:stab.v2*1.1:span").keep == "span"
    with pytest.raises(SpecError, match="not understood"):
        parse_change("bigger stabilizer")
    with pytest.raises(SpecError, match="no surface named 'nope'"):
        apply(tomllib.loads(DEMO.read_text()), [parse_change("shim:nope+1")])


@pytest.mark.slow
def test_sweep_tables_are_identical_in_process_on_a_pool_and_on_a_dask_cluster():
    """The same sweep (a grid of 6) in this process, on 2 local processes and on a Dask
    LocalCluster on the loopback interface (no dashboard): the same CSV bytes."""
    from distributed import LocalCluster

    project = Project(DEMO)
    axes = {"surface[stabilizer].incidence": [1.5, 2.5, 3.5], "flight.mass_kg": [75.0, 90.0]}
    here = to_csv(sweep(project, axes, grid=True))
    pool = to_csv(sweep(project, axes, grid=True, executor=Executor(jobs=2)))
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                      dashboard_address=None) as cluster:
        dask = to_csv(sweep(project, axes, grid=True, executor=Executor(address=cluster.scheduler_address)))
    assert here == pool == dask
    assert here.count("\n") == 7


def test_cli_compare_family_and_sweep_write_their_tables(tmp_path):
    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["compare", str(DEMO), "--change", "area:stabilizer*1.2; mast+10", "-o", str(out)])
    assert r.exit_code == 0, r.output
    assert "stabilizer area ×1.2 (keep aspect) + mast moved +10 mm in x" in r.output and "CAUTION" in r.output
    assert (out / "studies/lakeside-cruiser-compare.csv").is_file()
    r = CliRunner().invoke(main, ["family", str(DEMO), "--surface", "stabilizer", "--areas", "200,240", "-o", str(out)])
    assert r.exit_code == 0, r.output
    assert (out / "studies/lakeside-cruiser-stabilizer-200cm2.toml").is_file()
    r = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "surface[stabilizer].incidence=2:3:0.5",
                                  "--plot", "stab_lift_n:surface[stabilizer].incidence", "-o", str(out), "--json"])
    assert r.exit_code == 0, r.output
    assert len(json.loads(r.stdout)["rows"]) == 3
    pngs = list((out / "studies").glob("*sweep-stab_lift_n*.png"))
    assert len(pngs) == 1 and pngs[0].read_bytes()[:4] == b"\x89PNG"
    bad = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "surface[nope].incidence=1,2", "-o", str(out)])
    assert bad.exit_code == 2 and "no surface named 'nope'" in bad.output


@pytest.mark.slow
def test_family_builds_and_checks_each_size_when_asked(tmp_path):
    """--build: every size is built and checked in its own folder, its verdict in its row."""
    project = Project(DEMO, tmp_path / "o")
    t, specs = family(project, "stabilizer", [200.0], "aspect", build_root=tmp_path / "o" / "family")
    (row,) = t.rows
    assert row["check"] == "ok", row
    member = next(iter(specs))
    built = tmp_path / "o" / "family" / member
    assert (built / "cad" / f"{member}-stabilizer.step").is_file()
    assert (built / "report" / f"{member}-check.json").is_file()


def test_the_report_carries_the_comparison_made_from_the_same_spec(tmp_path):
    """compare writes studies/<set>-compare.json; the report of the same spec and folder shows
    it as a section (values from that file); a changed spec does not show a stale one."""
    from geomgen.report.content import Table as PageTable
    from geomgen.report.content import _comparison as comparison_blocks
    from geomgen.report.data import _comparison

    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["compare", str(DEMO), "--change", "shim:stabilizer-0.5", "-o", str(out)])
    assert r.exit_code == 0, r.output
    c = _comparison(Project(DEMO, out))
    table = json.loads((out / "studies/lakeside-cruiser-compare.json").read_text())
    assert c["labels"] == table["labels"] and c["rows"][1]["stab_lift_n"] == table["rows"][1]["stab_lift_n"]
    blocks = comparison_blocks({"comparison": c})
    assert isinstance(blocks[1], PageTable) and len(blocks[1].header) == 3
    assert "22 km/h (the spec's cruise_kmh), mass 85 kg, seawater" in c["condition"]
    changed = tmp_path / "changed.toml"
    changed.write_text(DEMO.read_text() + "\n# a comment: the comparison still holds\n")
    assert _comparison(Project(changed, out)) == c
    changed.write_text(DEMO.read_text().replace("mass_kg = 85.0", "mass_kg = 90.0"))
    assert _comparison(Project(changed, out)) is None
