"""Nothing lost, nothing foreign touched, same input same bytes, untrusted paths refused."""

from __future__ import annotations

import hashlib
import json
import os
import subprocess

import pytest
from click.testing import CliRunner
from conftest import DEMO, snapshot, wing_spec

from geomgen.build import build
from geomgen.cli import main
from geomgen.errors import ExportError, SpecError
from geomgen.outputs import MANIFEST


@pytest.mark.slow
def test_same_spec_same_bytes(tmp_path):
    """STEP (fixed header time stamp), STL and manifest are byte-identical across builds."""
    a, b = build(DEMO, tmp_path / "a"), build(DEMO, tmp_path / "b")
    sa, sb = snapshot(a.out_dir), snapshot(b.out_dir)
    assert sa.keys() == sb.keys() and all(sa[k] == sb[k] for k in sa)
    head = sa["cad/lakeside-cruiser-mast.step"][:400].decode()
    assert "'2000-01-01T00:00:00'" in head and "geomgen" in head


@pytest.mark.slow
def test_manifest_lists_name_size_hash(tmp_path):
    res = build(DEMO, tmp_path / "o")
    m = json.loads((tmp_path / "o" / MANIFEST).read_text())
    for f in m["files"]:
        data = (tmp_path / "o" / f["name"]).read_bytes()
        assert f["size"] == len(data) and f["sha256"] == hashlib.sha256(data).hexdigest()
    assert {f["name"] for f in m["files"]} == {p.relative_to(tmp_path / "o").as_posix() for p in res.files}


@pytest.mark.slow
@pytest.mark.parametrize("fmt", ["step", "stl"])
def test_a_failing_writer_of_each_format_loses_nothing(tmp_path, write_spec, monkeypatch, fmt):
    from geomgen.cad import export

    out = tmp_path / "o"
    spec = write_spec(wing_spec(te=0.5))
    build(spec, out)
    (out / "mine.txt").write_text("not geomgen's")
    before = snapshot(out)
    suffix, _ = export.EXPORTERS[fmt]

    def broken(parts, path, options):
        path.write_bytes(b"partial")
        raise ExportError(f"{path}: simulated failure")

    monkeypatch.setitem(export.EXPORTERS, fmt, (suffix, broken))
    with pytest.raises(ExportError):
        build(spec, out)
    assert snapshot(out) == before


@pytest.mark.slow
def test_failure_while_moving_into_place_restores_previous_outputs(tmp_path, write_spec, monkeypatch):
    out = tmp_path / "o"
    spec = write_spec(wing_spec(te=0.5))
    build(spec, out)
    before = snapshot(out)
    spec.write_text(wing_spec(te=0.7))  # a changed part, so the new files differ
    real = os.replace
    calls = {"n": 0}

    def flaky(src, dst):
        calls["n"] += 1
        if calls["n"] == 4:  # half-way through the swap
            raise OSError(28, "No space left on device")
        return real(src, dst)

    monkeypatch.setattr(os, "replace", flaky)
    with pytest.raises(ExportError, match="put back"):
        build(spec, out)
    monkeypatch.setattr(os, "replace", real)
    assert snapshot(out) == before


@pytest.mark.slow
def test_full_disk_on_a_tiny_filesystem(tmp_path, write_spec):
    """A 64 KiB tmpfs: the build cannot fit; earlier small outputs stay byte-identical."""
    mnt = tmp_path / "tiny"
    mnt.mkdir()
    if subprocess.run(["mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", str(mnt)],
                      capture_output=True).returncode != 0:
        pytest.skip("cannot mount a tmpfs here (needs root)")
    try:
        (mnt / "keep.txt").write_text("shop notes")
        before = snapshot(mnt)
        r = CliRunner().invoke(main, ["build", str(write_spec(wing_spec(te=0.5))), "-o", str(mnt)])
        assert r.exit_code == 3 and "Traceback" not in r.output
        assert snapshot(mnt) == before  # no partial file, no staging folder left
    finally:
        subprocess.run(["umount", str(mnt)])


def test_coordinate_files_outside_the_spec_folder_are_refused(tmp_path):
    from geomgen.geometry import build_models
    from geomgen.sections import naca
    from geomgen.spec import load_spec

    pts = naca("0012").loop(40)
    (tmp_path / "shared.dat").write_text("x\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts))
    sub = tmp_path / "specs"
    sub.mkdir()
    text = wing_spec(section='file = "../shared.dat"')
    (sub / "s.toml").write_text(text)
    with pytest.raises(SpecError, match="outside the spec's folder"):
        build_models(load_spec(sub / "s.toml"))
    build_models(load_spec(sub / "s.toml", allow_outside_files=True))
    # a link inside the folder that points outside is the same thing
    (sub / "link.dat").symlink_to(tmp_path / "shared.dat")
    (sub / "t.toml").write_text(wing_spec(section='file = "link.dat"'))
    with pytest.raises(SpecError, match="outside the spec's folder"):
        build_models(load_spec(sub / "t.toml"))
    r = CliRunner().invoke(main, ["--allow-outside-files", "balance", str(sub / "s.toml")])
    assert "outside" not in r.output


@pytest.mark.parametrize("content,expect", [
    (b"\x00\x01\x02binary\xff", "binary"),
    (b"name\n1.0 0.0\nnan 0.1\n0.0 0.0\n0.5 -0.1\n1.0 0.0\n", "line 3"),
    (b"", "empty"),
])
def test_untrusted_coordinate_files_give_clear_messages(tmp_path, content, expect):
    (tmp_path / "c.dat").write_bytes(content)
    (tmp_path / "s.toml").write_text(wing_spec(section='file = "c.dat"'))
    r = CliRunner().invoke(main, ["balance", str(tmp_path / "s.toml")])
    assert r.exit_code == 2 and "Traceback" not in r.output
    assert "c.dat" in r.output and expect in r.output.lower()
