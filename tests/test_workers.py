"""Helper processes die with the command that started them (a SIGKILL of report or of
sweep -j leaves none running), and the report's drawing worker leaves no temporary file."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

PARENT = textwrap.dedent("""
    import subprocess, sys, time
    child = subprocess.Popen([sys.executable, "-c", sys.argv[1]])
    print(child.pid, flush=True)
    time.sleep(60)
""")

CHILD = {
    "report worker": "import os, time; from geomgen.report.worker import end_with_parent; "
                     "end_with_parent(os.getppid()); time.sleep(60)",
    "study pool worker": "import os, time; from geomgen.studies.run import _end_with_parent; "
                         "_end_with_parent(os.getppid()); time.sleep(60)",
}


def alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state not in ("Z", "X")


@pytest.mark.parametrize("which", list(CHILD))
def test_a_helper_ends_when_its_parent_is_killed(which):
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    p = subprocess.Popen([sys.executable, "-c", PARENT, CHILD[which]], stdout=subprocess.PIPE, text=True, env=env)
    child = int(p.stdout.readline())
    time.sleep(1.5)  # the child is up and watching
    assert alive(child)
    p.send_signal(signal.SIGKILL)
    p.wait()
    deadline = time.monotonic() + 10
    while alive(child) and time.monotonic() < deadline:
        time.sleep(0.1)
    try:
        assert not alive(child), f"{which} still running after its parent was killed"
    finally:
        if alive(child):
            os.kill(child, signal.SIGKILL)


def test_the_drawing_worker_uses_no_temporary_file(tmp_path, monkeypatch):
    import tempfile

    from geomgen.report import worker

    made = []
    real = tempfile.mkstemp
    monkeypatch.setattr(tempfile, "mkstemp", lambda *a, **k: made.append(a or k) or real(*a, **k))
    monkeypatch.setattr(worker, "_render", lambda d: {"k": repr(sorted(d.items())).encode()})
    monkeypatch.delenv("GEOMGEN_REPORT_INLINE", raising=False)
    before = set(Path(tempfile.gettempdir()).glob("geomgen-drawing-*"))
    with worker.DrawingWorker({"a": 1, "b": [2, 3]}) as w:
        assert w.proc is not None or (os.cpu_count() or 1) == 1
        images = w.result()
    assert images == {"k": repr(sorted({"a": 1, "b": [2, 3]}.items())).encode()}
    assert not made and set(Path(tempfile.gettempdir()).glob("geomgen-drawing-*")) == before
