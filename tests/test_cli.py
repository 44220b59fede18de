"""Every command through click's CliRunner: shared options, the one error handler, the output
set (folders by kind, index, stale files), exit codes. Slow tests build solids."""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner
from conftest import files_in, wing_spec

from geomgen.cli import main
from geomgen.outputs import INDEX, MANIFEST, read_manifest
from geomgen.sections import naca

SHOP = """
[surface.shop]
templates_at = [100.0]
"""


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def outside_spec(tmp_path, extra=""):
    """A spec in ``specs/`` whose coordinate file lies in the parent folder."""
    pts = naca("0012").loop(40)
    (tmp_path / "shared.dat").write_text("x\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts))
    sub = tmp_path / "specs"
    sub.mkdir(exist_ok=True)
    p = sub / "s.toml"
    p.write_text(wing_spec(section='file = "../shared.dat"', extra=extra))
    return p


# -- the outside-files flag: every command, before or after the subcommand ---------------------
FAST = ["balance", "drawings"]
SLOW = ["build", "check", "report", "parts"]


@pytest.mark.parametrize("cmd", FAST + [pytest.param(c, marks=pytest.mark.slow) for c in SLOW])
def test_outside_files_flag_is_honoured_by_every_command_in_either_place(tmp_path, cmd):
    spec = outside_spec(tmp_path)
    out = tmp_path / "o"
    refused = run(cmd, spec, *(["-o", out] if cmd != "balance" else []))
    assert refused.exit_code == 2 and "outside the spec's folder" in refused.output, refused.output
    assert "--allow-outside-files" in refused.output
    for args in (["--allow-outside-files", cmd, spec], [cmd, spec, "--allow-outside-files"]):
        r = run(*args, *(["-o", out] if cmd != "balance" else []))
        assert "outside the spec's folder" not in r.output, (args, r.output)
        assert "Traceback" not in r.output
        if cmd != "parts":  # parts refuses this spec for another reason: it has no shop tables
            assert r.exit_code == 0, (args, r.output)


# -- the one error handler -------------------------------------------------------------------
def test_a_write_failure_is_not_called_a_geometry_error(tmp_path, write_spec):
    blocker = tmp_path / "o"
    blocker.write_text("a file where the output folder should be")
    r = run("drawings", write_spec(wing_spec()), "-o", blocker / "sub")
    assert r.exit_code == 3 and "Traceback" not in r.output
    assert r.output.startswith("cannot write") and "geometry error" not in r.output


def test_new_refuses_a_dangling_link_and_a_missing_folder(tmp_path):
    link = tmp_path / "s.toml"
    link.symlink_to(tmp_path / "nowhere.toml")
    r = run("new", link)
    assert r.exit_code == 2 and "exists" in r.output and not (tmp_path / "nowhere.toml").exists()
    r = run("new", tmp_path / "missing" / "s.toml")
    assert r.exit_code == 2 and "does not exist" in r.output and "Traceback" not in r.output


def test_drawings_command_writes_its_folder_index_and_summary(tmp_path, write_spec):
    out = tmp_path / "o"
    r = run("drawings", write_spec(wing_spec(extra=SHOP)), "-o", out)
    assert r.exit_code == 0, r.output
    names = files_in(out)
    assert {"drawings/t-w-templates.dxf", "drawings/t-w-templates.svg", "drawings/t-w-offsets.csv",
            "report/t-drawings.txt", MANIFEST, INDEX} <= names
    man = read_manifest(out)
    assert set(man) == names - {MANIFEST, INDEX}
    assert {e["command"] for e in man.values()} == {"drawings"}
    index = (out / INDEX).read_text()
    for n in man:  # every file listed, with its command
        assert f"`{n}`" in index
    assert "`geomgen drawings`" in index
    # the summary printed and the summary written say the same per surface
    assert (out / "report/t-drawings.txt").read_text().splitlines()[2:4] == r.output.splitlines()[2:4]


def test_balance_writes_its_summary_only_when_given_a_folder(tmp_path, write_spec, monkeypatch):
    spec = write_spec(wing_spec() + "\n[flight]\nmass_kg = 80.0\nspeeds_kmh = [20.0]\n")
    monkeypatch.chdir(tmp_path)
    assert run("balance", spec).exit_code == 0 and not (tmp_path / "out").exists()
    r = run("balance", spec, "-o", tmp_path / "o", "--json")
    assert r.exit_code == 0, r.output
    assert json.loads((tmp_path / "o" / "report/t-balance.json").read_text())["neutral_point_x_mm"] == \
        json.loads(r.stdout)["neutral_point_x_mm"]


# -- stale files -----------------------------------------------------------------------------------
@pytest.mark.slow
def test_a_changed_spec_leaves_nothing_stale_looking_current(tmp_path):
    """Build, drawings, change the root chord, build again: the templates of the old chord
    must not stay beside the new STEP (they are geomgen's own, so they are removed and the
    user is told); a stale file edited by hand is left and flagged; check reports stale ones."""
    spec = tmp_path / "s.toml"
    spec.write_text(wing_spec(extra=SHOP))
    out = tmp_path / "o"
    assert run("build", spec, "-o", out).exit_code == 0
    assert run("drawings", spec, "-o", out).exit_code == 0
    assert (out / "drawings/t-w-templates.dxf").is_file()
    (out / "drawings/t-w-offsets.csv").write_text("edited by the shop\n")
    spec.write_text(wing_spec(extra=SHOP, stations=[dict(y=0, chord=210), dict(y=400, chord=100)]))
    r = run("build", spec, "-o", out)
    assert r.exit_code == 0, r.output
    assert not (out / "drawings/t-w-templates.dxf").exists() and not (out / "report/t-drawings.txt").exists()
    assert "removed" in r.output and "drawings/t-w-templates.dxf" in r.output
    assert (out / "drawings/t-w-offsets.csv").read_text() == "edited by the shop\n"  # not ours any more
    assert "edited" in r.output and "drawings/t-w-offsets.csv" in r.output
    assert "STALE" in (out / INDEX).read_text()
    # check names the stale file it finds
    c = run("check", spec, "-o", out)
    assert "STALE: drawings/t-w-offsets.csv" in c.output
    assert c.exit_code == 0, c.output  # the checked STEP and STL are right


@pytest.mark.slow
def test_report_exits_1_when_an_expectation_fails_like_check(tmp_path, write_spec):
    extra = "[surface.expect]\nspan_mm = { value = 790.0, tol = 1.0 }\n"  # the wing is 800 mm
    spec = write_spec(wing_spec(extra=extra))
    out = tmp_path / "o"
    r = run("report", spec, "-o", out)
    assert r.exit_code == 1, r.output
    assert (out / "report/t-report.html").is_file()  # written all the same, with the failure in it
    assert run("check", spec, "-o", out).exit_code == 1


@pytest.mark.slow
def test_parts_command_through_the_cli(tmp_path, write_spec):
    extra = ("[surface.printing]\nbuild_volume = [200.0, 200.0, 200.0]\n"
             "[surface.printing.locators]\npin_diameter = 3.0\n")
    spec = write_spec(wing_spec(te=0.5, extra=extra, stations=[dict(y=0, chord=120), dict(y=150, chord=80)]))
    out = tmp_path / "o"
    r = run("parts", spec, "-o", out)
    assert r.exit_code == 0, r.output
    names = files_in(out)
    assert any(n.startswith("print/t-w-piece") and n.endswith(".3mf") for n in names)
    assert {"report/t-parts.json", "report/t-parts.txt"} <= names
    assert {e["command"] for e in read_manifest(out).values()} == {"parts"}


@pytest.mark.slow
def test_an_edited_stl_is_a_clear_check_failure_not_a_traceback(tmp_path, write_spec):
    spec = write_spec(wing_spec())
    out = tmp_path / "o"
    assert run("build", spec, "-o", out).exit_code == 0
    (out / "print/t-w.stl").write_bytes(b"solid nonsense\nendsolid\n")
    r = run("check", spec, "-o", out)
    assert r.exit_code == 1 and "Traceback" not in r.output
    assert "t-w.stl" in r.output
