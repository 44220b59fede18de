"""The balance command: text and JSON from the same analysis; errors as exit codes."""

from __future__ import annotations

import json

from click.testing import CliRunner
from conftest import DEMO

from geomgen.cli import main


def test_balance_text_and_json():
    r = CliRunner().invoke(main, ["balance", str(DEMO), "--cg", "-280"])
    assert r.exit_code == 0, r.output
    for word in ("Neutral point", "stabilizer", "kgf", "CAUTION", "static margin"):
        assert word.lower() in r.output.lower()
    j = json.loads(CliRunner().invoke(main, ["balance", str(DEMO), "--json"]).stdout)
    assert j["neutral_point_x_mm"] is not None and len(j["trim"]) == 4
    # common practice, no source: the stabilizer pushes down at cruise (22 km/h in the demo)
    cruise = next(t for t in j["trim"] if t["speed_kmh"] == 22.0)
    assert cruise["lift_n"]["stabilizer"] < 0


def test_demo_is_a_plausible_balanced_set():
    """Common practice, no source: at cruise (22 km/h in the demo) the stabilizer
    pushes down a few % of the weight (1-5 %); the balance point (net centre of pressure)
    moves a few cm over the speed range (under 6 cm) and stays ahead of the neutral point
    (stable in pitch) at every speed; the attitude stays between 0 and 10°."""
    j = json.loads(CliRunner().invoke(main, ["balance", str(DEMO), "--json"]).stdout)
    weight = j["mass_kg"] * 9.80665
    cruise = next(t for t in j["trim"] if t["speed_kmh"] == 22.0)
    assert 0.01 * weight <= -cruise["lift_n"]["stabilizer"] <= 0.05 * weight
    cps = [t["cp_x_mm"] for t in j["trim"]]
    assert max(cps) - min(cps) < 60.0
    assert all(cp < j["neutral_point_x_mm"] for cp in cps)
    assert all(0.0 < t["attitude_deg"] < 10.0 for t in j["trim"])


def test_balance_spec_error_exit_2(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(DEMO.read_text().replace("mass_kg = 85.0", "mass_kg = -1"))
    r = CliRunner().invoke(main, ["balance", str(p)])
    assert r.exit_code == 2 and "flight mass_kg" in r.output


def test_balance_reports_water_drag_envelope_and_stance(tmp_path):
    """The free surface, cavitation, drag, envelope and stance reach the text, the
    JSON and the written report/ files, each with its caution."""
    r = CliRunner().invoke(main, ["balance", str(DEMO), "-o", str(tmp_path)])
    assert r.exit_code == 0, r.output
    for words in ("Free surface", "Limits:", "Cavitation onset (first estimate", "Drag and power, trimmed (first",
                  "Usable envelope", "slide the mast", "shim it", "CAUTION"):
        assert words in r.output
    j = json.loads((tmp_path / "report" / "lakeside-cruiser-balance.json").read_text())
    assert j["free_surface"]["neutral_point_shift_mm"] is not None
    assert j["cavitation"]["first_kmh"] > 26.0
    assert j["performance"]["envelope_kmh"][0] < 14.0 < j["performance"]["envelope_kmh"][1]
    assert j["stance"]["mast_move_mm"] is not None and j["stance"]["shim_deg"] is not None
