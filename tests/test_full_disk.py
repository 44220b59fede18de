"""A full disk during check, report and parts: exit 3 "cannot write" naming the file, no
traceback, earlier outputs byte-identical, no lock or staging folder left."""

from __future__ import annotations

import re
import subprocess
import tempfile
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import snapshot, wing_spec

from geomgen.cli import main


@pytest.fixture
def full_disk(tmp_path):
    """A 16 MiB tmpfs holding a built set, then filled to the last block."""
    # not under tmp_path: another pytest run on the machine may rename old temp folders, and
    # the mount would then be left behind under a name we no longer know
    mnt = Path(tempfile.mkdtemp(prefix="geomgen-full-disk-"))
    if subprocess.run(["mount", "-t", "tmpfs", "-o", "size=16m", "tmpfs", str(mnt)],
                      capture_output=True).returncode != 0:
        pytest.skip("cannot mount a tmpfs here (needs root)")
    try:
        spec = tmp_path / "s.toml"
        spec.write_text(wing_spec(te=0.5, extra="[surface.printing]\nscale = 0.5\n"))
        assert CliRunner().invoke(main, ["build", str(spec), "-o", str(mnt)]).exit_code == 0
        with open(mnt / "filler", "wb") as f:  # fill every free block
            try:
                while True:
                    f.write(b"\0" * 65536)
                    f.flush()
            except OSError:
                pass
        yield spec, mnt
    finally:
        if subprocess.run(["umount", str(mnt)], capture_output=True).returncode != 0:
            subprocess.run(["umount", "-l", str(mnt)], capture_output=True)
        mnt.rmdir()


@pytest.mark.slow
@pytest.mark.parametrize("command", ["check", "report", "parts", "drawings", "balance"])
def test_a_full_disk_gives_exit_3_cannot_write(full_disk, command):
    spec, mnt = full_disk
    before = snapshot(mnt)
    for _ in range(2):  # the second run must not find a stale lock of the first
        r = CliRunner().invoke(main, [command, str(spec), "-o", str(mnt)])
        assert r.exit_code == 3, r.output
        assert "Traceback" not in r.output
        # names the file and why (the kernel's STEP writer reports no reason of its own: the
        # folder's free space gives it)
        assert re.search(r"cannot write: \S+\.(step|stl|3mf|md|txt|json|html|png|dxf|svg|csv)\b", r.output), r.output
        assert re.search(r"no space left on (the )?device", r.output, re.I), r.output
        assert "another geomgen run" not in r.output
        assert snapshot(mnt) == before  # nothing half-written, no staging folder, no lock file


@pytest.mark.slow
def test_the_step_writer_on_a_full_disk_says_why(full_disk):
    """The kernel's STEP writer returns only "failed": the error adds the reason from the
    folder (here: no space left), and the file is named."""
    from types import SimpleNamespace

    from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox

    from geomgen.cad.export import write_step
    from geomgen.errors import ExportError

    _, mnt = full_disk
    box = SimpleNamespace(name="box", solid=BRepPrimAPI_MakeBox(200.0, 100.0, 50.0).Shape())
    with pytest.raises(ExportError) as err:
        write_step([box], mnt / "box.step", {})
    assert "box.step" in str(err.value)
    assert re.search(r"no space left on (the )?device", str(err.value), re.I), str(err.value)


@pytest.mark.slow
def test_new_on_a_full_disk_leaves_no_empty_spec(full_disk):
    _, mnt = full_disk
    before = snapshot(mnt)
    r = CliRunner().invoke(main, ["new", str(mnt / "starter.toml")])
    assert r.exit_code == 3 and "Traceback" not in r.output, r.output
    assert re.search(r"no space left on (the )?device", r.output, re.I), r.output
    assert not (mnt / "starter.toml").exists() and snapshot(mnt) == before


@pytest.mark.slow
def test_a_refused_build_on_a_full_disk_leaves_no_empty_folder(full_disk):
    spec, mnt = full_disk
    r = CliRunner().invoke(main, ["build", str(spec), "-o", str(mnt / "new" / "set")])
    assert r.exit_code == 3 and "Traceback" not in r.output, r.output
    assert not (mnt / "new").exists()
