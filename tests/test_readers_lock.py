"""Commands that read the output folder hold its lock and recover first: a check never
measures a half-committed set, never runs beside another writer, and a refused run leaves
no empty folder behind."""

from __future__ import annotations

import json
import os
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import snapshot, wing_spec

from geomgen.cli import main
from geomgen.errors import ExportError
from geomgen.outputs import Output, Staging, journal, write_set

ROOT = Path(__file__).resolve().parents[1]


def test_a_refused_write_leaves_no_empty_output_folder(tmp_path):
    out = tmp_path / "a" / "b"

    def fails(path):
        raise ExportError("refused on purpose")
    with pytest.raises(ExportError):
        write_set(out, [Output("report/s-x.txt", "file", fails)], {"set": "s", "spec_sha256": "a", "command": "x"})
    assert not (tmp_path / "a").exists()


def test_a_refused_run_keeps_a_folder_that_was_there(tmp_path):
    with pytest.raises(ExportError):
        with Staging(tmp_path):
            raise ExportError("refused")
    assert tmp_path.is_dir() and not any(tmp_path.iterdir())


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    root = tmp_path_factory.mktemp("readers")
    spec = root / "a.toml"
    spec.write_text(wing_spec(te=0.5))
    out = root / "out"
    r = CliRunner().invoke(main, ["build", str(spec), "-o", str(out)])
    assert r.exit_code == 0, r.output
    return spec, out


@pytest.mark.slow
def test_check_recovers_a_killed_commit_before_measuring(built, tmp_path):
    spec, out = built
    before = snapshot(out)
    names = [n for n in before if n.endswith((".step", ".stl"))]
    pid = os.fork()
    if pid == 0:  # another spec's build, killed after placing its files, before the switch
        def stop(step):
            if step == "placed geomgen-index.md":
                os._exit(9)
        journal._step = stop
        try:
            write_set(out, [Output(n, "bytes", b"not a solid\n") for n in names],
                      {"set": "t", "spec_sha256": "b" * 64, "command": "build"})
        finally:
            os._exit(0)
    _, status = os.waitpid(pid, 0)
    assert os.waitstatus_to_exitcode(status) == 9
    assert all((out / n).read_bytes() == b"not a solid\n" for n in names)  # placed, not switched
    r = CliRunner().invoke(main, ["check", str(spec), "-o", str(out), "--json"])
    assert r.exit_code == 0, r.output
    res = json.loads(r.stdout)
    assert res["built"] is False and res["ok"] and any("rolled back" in n for n in res["notes"])
    assert all((out / n).read_bytes() == before[n] for n in names)


HOLDER = textwrap.dedent("""
    import sys, time
    from geomgen.outputs.lock import FolderLock
    with FolderLock(sys.argv[1]):
        print("HOLDING", flush=True)
        time.sleep(30)
""")


@pytest.mark.slow
def test_check_does_not_measure_while_another_run_holds_the_folder(built, monkeypatch):
    from geomgen import defaults
    from geomgen.check.run import check

    spec, out = built
    p = subprocess.Popen([sys.executable, "-c", HOLDER, str(out)], cwd=ROOT, stdout=subprocess.PIPE, text=True)
    try:
        assert p.stdout.readline().strip() == "HOLDING"
        monkeypatch.setattr(defaults, "LOCK_WAIT_S", 0.3)
        with pytest.raises(ExportError, match=f"another geomgen run \\(process {p.pid}"):
            check(spec, out, write_record=False)  # reads only: still waits for the folder
    finally:
        p.kill()
        p.wait()
