"""Study tables say what a number was made from: the speed (the one balance uses), the mass
and the water; their files hold plain numbers; family specs are specs geomgen accepts."""

from __future__ import annotations

import csv
import io
import json
import math
import tomllib

import pytest
from click.testing import CliRunner
from conftest import DEMO

from geomgen.cli import main
from geomgen.project import Project
from geomgen.studies import compare, family, parse_change, sweep, to_csv, to_json, to_text


def demo_at(tmp_path, cruise="22.0", mass="85.0", fluid='"seawater"', name="demo.toml", extra=""):
    """The demo with its cruise speed away from the middle of its speeds (22 of 14..26)."""
    text = DEMO.read_text().replace("cruise_kmh = 22.0", f"cruise_kmh = {cruise}")
    text = text.replace("mass_kg = 85.0", f"mass_kg = {mass}").replace('fluid = "seawater"', f"fluid = {fluid}")
    p = tmp_path / name
    p.write_text(text + extra)
    return p


def test_studies_use_the_cruise_speed_balance_uses_and_agree_with_it(tmp_path):
    from geomgen.hydro import balance_of

    spec = demo_at(tmp_path, cruise="18.0")
    project = Project(spec)
    t = compare(project, [[parse_change("shim:stabilizer-0.5")]])
    assert [r["cruise_kmh"] for r in t.rows] == [18.0, 18.0]
    alone = balance_of(project)
    trim = next(p for p in alone.trim if p.speed_kmh == 18.0)
    assert t.rows[0]["stab_lift_n"] == pytest.approx(trim.lift_n["stabilizer"], rel=1e-12)
    assert t.rows[0]["cp_from_mast_mm"] == pytest.approx(trim.cp_from_mast_mm, rel=1e-12)
    s = sweep(project, {"flight.mass_kg": [80.0]})
    assert s.rows[0]["cruise_kmh"] == 18.0
    f, _ = family(project, "stabilizer", [200.0])
    assert f.rows[0]["cruise_kmh"] == 18.0
    assert compare(project, [], [spec], cruise_kmh=26.0).rows[0]["cruise_kmh"] == 26.0  # --cruise says otherwise


def test_every_table_states_speed_mass_and_water(tmp_path):
    spec = demo_at(tmp_path, cruise="18.0")
    project = Project(spec)
    tables = [compare(project, [[parse_change("mast+10")]]), sweep(project, {"surface[stabilizer].incidence": [2.0]}),
              family(project, "stabilizer", [200.0])[0]]
    for t in tables:
        head = to_text(t).splitlines()[:3]
        assert any("18 km/h" in ln and "85 kg" in ln and "seawater" in ln for ln in head), head
        assert "the spec's cruise_kmh" in "\n".join(head)
        assert to_json(t)["condition"]["speed_kmh"] == 18.0
    t = compare(project, [], cruise_kmh=20.0)
    assert "20 km/h (--cruise)" in to_text(t)


def test_compare_with_says_when_mass_or_water_differ(tmp_path):
    spec = demo_at(tmp_path)
    other = demo_at(tmp_path, mass="95.0", fluid='"freshwater"', name="other.toml")
    t = compare(Project(spec), [], [other])
    text = to_text(t)
    assert "other.toml" in text and "mass 95 kg" in text and "freshwater" in text
    assert any("differ" in n for n in t.notes)
    same = compare(Project(spec), [], [demo_at(tmp_path, name="same.toml")])
    assert not any("differ" in n for n in same.notes)


def test_every_csv_json_and_parquet_column_reads_back(tmp_path):
    pytest.importorskip("pyarrow")
    import pyarrow.parquet as pq

    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["compare", str(DEMO), "--change", "shim:stabilizer-0.5", "-o", str(out)])
    assert r.exit_code == 0, r.output
    base = out / "studies" / "lakeside-cruiser-compare"
    rows = list(csv.DictReader(io.StringIO(base.with_suffix(".csv").read_text())))
    table = json.loads(base.with_suffix(".json").read_text())
    par = pq.read_table(base.with_suffix(".parquet")).to_pylist()
    assert len(rows) == len(table["rows"]) == len(par) == 2
    numeric = 0
    for got, js, pa in zip(rows, table["rows"], par):
        for col, text in got.items():
            want = js.get(col)
            if isinstance(want, (int, float)) and not isinstance(want, bool):
                numeric += 1
                assert float(text) == want, (col, text)  # a plain number: 42.66…, not np.float64(42.66…)
                assert pa[col] == want, col
            elif want is None:
                assert text == "" and pa.get(col) is None, (col, text)
            else:
                assert text == str(want) and pa[col] == str(want), col
    assert numeric > 20 and any(r["cavitation_kmh"] for r in rows)


def test_sweep_varies_a_number_in_a_position(tmp_path):
    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "surface[stabilizer].position[0]=330,390",
                                  "-o", str(out), "--json"])
    assert r.exit_code == 0, r.output
    rows = json.loads(r.stdout)["rows"]
    assert [row["surface[stabilizer].position[0]"] for row in rows] == [330.0, 390.0]
    assert rows[1]["cp_from_mast_mm"] < rows[0]["cp_from_mast_mm"]  # a longer fuselage, as compare's move
    bad = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "surface[stabilizer].station[0]=1,2"])
    assert bad.exit_code == 2 and "names a whole station" in bad.output
    bad = CliRunner().invoke(main, ["sweep", str(DEMO), "--vary", "surface[stabilizer].position[3]=1,2"])
    assert bad.exit_code == 2 and "position[3]" in bad.output


SHOP_SPEC = """
[surface.shop]
templates_at = [60.0, 150.0]
hotwire_cuts = [0.0, 90.0, 180.0]
[surface.printing]
split_at = [100.0]
[[surface.check_at]]
y = 120.0
chord = { value = 54.67, tol = 0.5 }
"""


def shop_spec(tmp_path):
    """The demo with shop, printing and check_at tables on the stabilizer."""
    text = DEMO.read_text()
    head, sep, tail = text.partition("# Mast:")
    p = tmp_path / "shop.toml"
    p.write_text(head + SHOP_SPEC + "\n" + sep + tail)
    return p


def test_family_scales_shop_positions_with_the_span_and_rounds_chords(tmp_path):
    spec = shop_spec(tmp_path)
    project = Project(spec)
    base = next(s for s in tomllib.loads(spec.read_text())["surface"] if s["name"] == "stabilizer")
    for keep, area in (("aspect", 300.0), ("chord", 180.0)):
        t, specs = family(project, "stabilizer", [area], keep)
        (text,) = specs.values()
        assert text.startswith("#") and "scaled" in text.splitlines()[0]
        data = tomllib.loads(text)
        stab = next(s for s in data["surface"] if s["name"] == "stabilizer")
        a = stab["station"][-1]["y"] / base["station"][-1]["y"]
        assert a != pytest.approx(1.0)
        assert stab["shop"]["templates_at"] == pytest.approx([v * a for v in base["shop"]["templates_at"]], abs=1e-3)
        assert stab["shop"]["hotwire_cuts"] == pytest.approx([v * a for v in base["shop"]["hotwire_cuts"]], abs=1e-3)
        assert stab["printing"]["split_at"] == pytest.approx([v * a for v in base["printing"]["split_at"]], abs=1e-3)
        assert [c["y"] for c in stab.get("check_at", [])] == pytest.approx([120.0 * a], abs=1e-3)
        for st in stab["station"]:
            assert st["chord"] == round(st["chord"], 3)
        # the member is a spec its own commands accept
        member = tmp_path / f"{keep}.toml"
        member.write_text(text)
        for cmd in ("drawings", "balance"):
            r = CliRunner().invoke(main, [cmd, str(member), "-o", str(tmp_path / f"out-{keep}")])
            assert r.exit_code == 0, r.output


@pytest.mark.slow
def test_family_specs_build_draw_and_check(tmp_path):
    spec = shop_spec(tmp_path)
    _, specs = family(Project(spec), "stabilizer", [300.0])
    (text,) = specs.values()
    member = tmp_path / "member.toml"
    member.write_text(text)
    for cmd in ("build", "drawings", "check", "parts"):
        r = CliRunner().invoke(main, [cmd, str(member), "-o", str(tmp_path / "out")])
        assert r.exit_code == 0, (cmd, r.output)


def test_family_table_shows_each_sizes_check(tmp_path):
    from geomgen.studies.study import Table

    t = Table("family", "size family", ["target_area_cm2"],
              [{"target_area_cm2": 200.0, "check": "ok", "cruise_kmh": 22.0},
               {"target_area_cm2": 240.0, "check": "FAULT", "cruise_kmh": 22.0}], ["a", "b"])
    text = to_text(t)
    line = next(ln for ln in text.splitlines() if ln.startswith("check"))
    assert "ok" in line and "FAULT" in line
    assert math.isfinite(float(to_csv(t).splitlines()[1].split(",")[1]))
