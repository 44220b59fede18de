"""Build through the CLI and the library: summary, whole-or-nothing outputs, foreign files."""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner
from conftest import DEMO, files_in, snapshot, wing_spec

from geomgen.build import build
from geomgen.cli import main
from geomgen.errors import ExportError
from geomgen.outputs import INDEX, MANIFEST

pytestmark = pytest.mark.slow


def test_cli_build_prints_files_and_figures(tmp_path):
    res = CliRunner().invoke(main, ["build", str(DEMO), "-o", str(tmp_path / "o")])
    assert res.exit_code == 0, res.output
    for word in ("front-wing", "stabilizer", "mast", "area cm²", "MAC mm", "CAUTION",
                 "lakeside-cruiser-assembly.step", "lakeside-cruiser-front-wing.stl"):
        assert word in res.output
    manifest = json.loads((tmp_path / "o" / MANIFEST).read_text())
    assert {f["name"] for f in manifest["files"]} == files_in(tmp_path / "o") - {MANIFEST, INDEX}
    assert all(f["command"] == "build" and f["set"] == "lakeside-cruiser" for f in manifest["files"])
    assert (tmp_path / "o" / "report/lakeside-cruiser-build.txt").read_text().startswith("geomgen ")


def test_failed_writer_leaves_earlier_outputs_byte_identical(tmp_path, write_spec, monkeypatch):
    out = tmp_path / "o"
    spec = write_spec(wing_spec(te=0.5))
    build(spec, out)
    before = snapshot(out)

    from geomgen.cad import export

    def broken(parts, path, options):
        path.write_bytes(b"half a file")
        raise ExportError(f"{path}: simulated writer failure")

    monkeypatch.setitem(export.EXPORTERS, "stl", (".stl", broken))
    with pytest.raises(ExportError):
        build(spec, out)
    assert snapshot(out) == before  # same names, same bytes, no staging folder left


def test_read_only_folder_is_a_clear_error(tmp_path, write_spec):
    import os

    if os.geteuid() == 0:
        pytest.skip("root ignores folder permissions")
    out = tmp_path / "ro"
    out.mkdir()
    out.chmod(0o500)
    with pytest.raises(ExportError):
        build(write_spec(wing_spec()), out)


def test_foreign_file_is_never_overwritten(tmp_path, write_spec):
    out = tmp_path / "o"
    (out / "cad").mkdir(parents=True)
    foreign = out / "cad/t-w.step"
    foreign.write_text("the shop's own file")
    (out / "notes.txt").write_text("keep me")
    res = CliRunner().invoke(main, ["build", str(write_spec(wing_spec())), "-o", str(out)])
    assert res.exit_code == 3 and "not written by geomgen" in res.output
    assert foreign.read_text() == "the shop's own file"
    assert files_in(out) == {"notes.txt", "cad/t-w.step"}


def test_rebuild_replaces_own_files_and_keeps_others(tmp_path, write_spec):
    out = tmp_path / "o"
    spec = write_spec(wing_spec())
    build(spec, out)
    (out / "notes.txt").write_text("keep me")
    build(spec, out)
    assert (out / "notes.txt").read_text() == "keep me"


def test_new_writes_a_spec_that_builds(tmp_path, monkeypatch):
    runner = CliRunner()
    monkeypatch.chdir(tmp_path)
    assert runner.invoke(main, ["new", "s.toml"]).exit_code == 0
    again = runner.invoke(main, ["new", "s.toml"])
    assert again.exit_code == 2  # never overwrites
    res = runner.invoke(main, ["build", "s.toml", "-o", "o"])
    assert res.exit_code == 0, res.output


def test_schema_is_json_schema():
    res = CliRunner().invoke(main, ["schema"])
    schema = json.loads(res.output)
    assert schema["type"] == "object" and "surface" in schema["properties"]


def test_optional_3mf_holds_the_same_mesh_in_millimetres(tmp_path, write_spec):
    """3MF (3D Manufacturing Format core spec): a zip whose model part says unit="millimeter";
    its mesh encloses the same volume as the STL written beside it."""
    import xml.etree.ElementTree as ET
    import zipfile

    import numpy as np
    import trimesh

    out = tmp_path / "o"
    r = CliRunner().invoke(main, ["build", str(write_spec(wing_spec(te=0.5))), "-o", str(out), "--3mf"])
    assert r.exit_code == 0, r.output
    with zipfile.ZipFile(out / "print/t-w.3mf") as z:
        root = ET.fromstring(z.read("3D/3dmodel.model"))
    assert root.get("unit") == "millimeter"
    ns = {"m": root.tag.split("}")[0][1:]}
    v = np.array([[float(e.get(k)) for k in "xyz"] for e in root.iterfind(".//m:vertex", ns)])
    f = np.array([[int(e.get(k)) for k in ("v1", "v2", "v3")] for e in root.iterfind(".//m:triangle", ns)])
    stl = trimesh.load(out / "print/t-w.stl", force="mesh")
    assert trimesh.Trimesh(v, f).volume == pytest.approx(stl.volume, rel=1e-5)
