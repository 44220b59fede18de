"""One writer per output folder, and files geomgen did not write left alone."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from conftest import snapshot

from geomgen.errors import ExportError
from geomgen.outputs import MANIFEST, Output, Staging, write_set
from geomgen.outputs.lock import LOCK, FolderLock

ROOT = Path(__file__).resolve().parents[1]
INFO = {"set": "s", "spec_sha256": "a" * 64, "command": "drawings"}

HOLDER = textwrap.dedent("""
    import sys, time
    from geomgen.outputs import Output, write_set
    def slow(path):
        print("HOLDING", flush=True)
        time.sleep(float(sys.argv[2]))
        path.write_text("slow")
    write_set(sys.argv[1], [Output("report/s-slow.txt", "file", slow)], {"set": "s", "spec_sha256": "a" * 64,
              "command": "drawings"})
    print("DONE", flush=True)
""")


def holder(out: Path, seconds: float) -> subprocess.Popen:
    p = subprocess.Popen([sys.executable, "-c", HOLDER, str(out), str(seconds)], cwd=ROOT,
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    assert p.stdout.readline().strip() == "HOLDING"
    return p


def test_a_second_run_waits_then_refuses_naming_the_first(tmp_path):
    out = tmp_path / "o"
    first = holder(out, 30)
    try:
        t0 = time.perf_counter()
        with pytest.raises(ExportError, match=f"process {first.pid}") as e:
            with Staging(out, lock_wait_s=0.5) as stage:
                stage.add(Output("report/s-other.txt", "text", "x"))
                stage.commit(INFO)
        assert time.perf_counter() - t0 >= 0.5 and "nothing was written" in str(e.value)
        assert not (out / "report" / "s-other.txt").exists()
    finally:
        first.kill()
        first.wait()


def test_a_second_run_that_waits_long_enough_goes_after_the_first(tmp_path):
    out = tmp_path / "o"
    first = holder(out, 0.5)
    with Staging(out, lock_wait_s=20) as stage:
        stage.add(Output("report/s-other.txt", "text", "x"))
        stage.commit(INFO)
    assert first.wait(timeout=20) == 0
    names = {e["name"] for e in json.loads((out / MANIFEST).read_text())["files"]}
    assert names == {"report/s-slow.txt", "report/s-other.txt"}  # nobody's entries lost


def test_a_dead_owners_lock_is_taken_over_and_said(tmp_path):
    out = tmp_path / "o"
    first = holder(out, 30)
    first.send_signal(signal.SIGKILL)
    first.wait()
    assert (out / LOCK).exists()  # the dead run's lock file, with its pid
    done = write_set(out, [Output("report/s-other.txt", "text", "x")], INFO)
    assert any(f"process {first.pid}" in n and "no longer running" in n for n in done.notes())
    assert any("interrupted" in n for n in done.notes())  # its staging folder was removed too
    assert not (out / LOCK).exists() and not list(out.glob(".geomgen-staging-*"))


def test_the_lock_is_reentrant_in_one_process(tmp_path):
    with FolderLock(tmp_path, 0.2), FolderLock(tmp_path, 0.2):
        pass
    assert not (tmp_path / LOCK).exists()


def test_a_users_own_manifest_is_never_replaced(tmp_path):
    (tmp_path / MANIFEST).write_text('{"files": [], "mine": true}')
    before = snapshot(tmp_path)
    with pytest.raises(ExportError, match="not written by geomgen"):
        write_set(tmp_path, [Output("report/s-a.txt", "text", "x")], INFO)
    assert snapshot(tmp_path) == before and not list(tmp_path.glob(".geomgen-*"))


def test_an_edited_output_is_refused_unless_told(tmp_path):
    write_set(tmp_path, [Output("report/s-a.txt", "text", "x")], INFO)
    (tmp_path / "report" / "s-a.txt").write_text("the shop's correction")
    before = snapshot(tmp_path)
    with pytest.raises(ExportError, match="edited after geomgen wrote") as e:
        write_set(tmp_path, [Output("report/s-a.txt", "text", "y")], INFO)
    assert "--overwrite-edited" in str(e.value) and snapshot(tmp_path) == before
    write_set(tmp_path, [Output("report/s-a.txt", "text", "y")], INFO, overwrite_edited=True)
    assert (tmp_path / "report" / "s-a.txt").read_text() == "y\n"


def test_a_linked_output_folder_is_refused(tmp_path):
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    out = tmp_path / "o"
    out.mkdir()
    (out / "report").symlink_to(elsewhere)
    with pytest.raises(ExportError, match="link"):
        write_set(out, [Output("report/s-a.txt", "text", "x")], INFO)
    assert not list(elsewhere.iterdir())


def test_lock_file_as_a_link_is_refused(tmp_path):
    (tmp_path / "target").write_text("keep")
    (tmp_path / LOCK).symlink_to(tmp_path / "target")
    with pytest.raises(ExportError, match="lock"):
        write_set(tmp_path, [Output("report/s-a.txt", "text", "x")], INFO)
    assert (tmp_path / "target").read_text() == "keep"
    assert os.path.islink(tmp_path / LOCK)


def test_cli_refuses_an_edited_output_and_the_flag_replaces_it(tmp_path, write_spec):
    from click.testing import CliRunner
    from conftest import wing_spec

    from geomgen.cli import main

    spec, out = write_spec(wing_spec()), tmp_path / "o"
    assert CliRunner().invoke(main, ["balance", str(spec), "-o", str(out)]).exit_code == 0
    edited = next((out / "report").glob("*-balance.txt"))
    edited.write_text("my notes")
    r = CliRunner().invoke(main, ["balance", str(spec), "-o", str(out)])
    assert r.exit_code == 3 and "cannot write" in r.output and "--overwrite-edited" in r.output
    assert edited.read_text() == "my notes" and "Traceback" not in r.output
    r = CliRunner().invoke(main, ["--overwrite-edited", "balance", str(spec), "-o", str(out)])
    assert r.exit_code == 0 and edited.read_text() != "my notes"
