"""The balance command: text and JSON from the same analysis; errors as exit codes."""

from __future__ import annotations

import json

from click.testing import CliRunner

from geomgen.cli import main

from conftest import DEMO


def test_balance_text_and_json():
    r = CliRunner().invoke(main, ["balance", str(DEMO), "--cg", "-280"])
    assert r.exit_code == 0, r.output
    for word in ("Neutral point", "stabilizer", "kgf", "CAUTION", "static margin"):
        assert word.lower() in r.output.lower()
    j = json.loads(CliRunner().invoke(main, ["balance", str(DEMO), "--json"]).stdout)
    assert j["neutral_point_x_mm"] is not None and len(j["trim"]) == 4
    # common practice, no source: the stabilizer pushes down at cruise
    assert all(t["lift_n"]["stabilizer"] < 0 for t in j["trim"])


def test_balance_spec_error_exit_2(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(DEMO.read_text().replace("mass_kg = 85.0", "mass_kg = -1"))
    r = CliRunner().invoke(main, ["balance", str(p)])
    assert r.exit_code == 2 and "flight mass_kg" in r.output
