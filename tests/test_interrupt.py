"""Nothing lost at any instant: a commit stopped anywhere leaves the previous set or the new
one, whole, once the next run has recovered. Real signals in a subprocess, and a
forked child stopped at every single step of the commit."""

from __future__ import annotations

import os
import random
import shutil
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from conftest import snapshot

from geomgen.outputs import Output, Staging, journal, write_set

ROOT = Path(__file__).resolve().parents[1]
N = 120  # files per set: the commit takes long enough to be hit in the middle
OLD = {"set": "s", "spec_sha256": "a" * 64, "command": "drawings"}
NEW = {"set": "s", "spec_sha256": "b" * 64, "command": "drawings"}


def outputs(word: str, n: int = N) -> list[Output]:
    outs = [Output(f"drawings/s-{i:03d}.csv", "bytes", f"{word} {i}\n".encode() * 40) for i in range(n)]
    extra = "gone" if word == "old" else "added"  # a stale file removed; a file that is new
    return outs + [Output(f"report/s-{extra}.txt", "text", f"{word} only")]


@pytest.fixture
def sets(tmp_path):
    """(folder with the old set and a user's file, snapshot of old, snapshot of new)."""
    out = tmp_path / "o"
    write_set(out, outputs("old"), OLD)
    (out / "mine.txt").write_text("the shop's own notes")
    ref = tmp_path / "ref"
    shutil.copytree(out, ref)
    write_set(ref, outputs("new"), NEW)
    return out, snapshot(out), snapshot(ref)


def recovered(out: Path) -> list[str]:
    with Staging(out) as stage:
        return stage.recovered


SCRIPT = textwrap.dedent("""
    import sys
    sys.path.insert(0, {tests!r})
    from test_interrupt import outputs, NEW
    from geomgen.outputs import Output, write_set
    outs = outputs("new")
    def last(path):
        path.write_text("new only\\n")
        print("STAGED", flush=True)
    outs[-1] = Output(outs[-1].name, "file", last)
    try:
        write_set(sys.argv[1], outs, NEW)
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        sys.exit(130)
    print("DONE", flush=True)
""")


def run_and_signal(out: Path, sig, delay: float):
    p = subprocess.Popen([sys.executable, "-c", SCRIPT.format(tests=str(ROOT / "tests")), str(out)],
                         cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    assert p.stdout.readline().strip() == "STAGED"
    t0 = time.perf_counter()
    if delay is not None:
        time.sleep(delay)
        p.send_signal(sig)
    rest, err = p.communicate(timeout=60)
    return p.returncode, rest + err, time.perf_counter() - t0


def test_the_fixture_sets_differ_everywhere(sets):
    out, old, new = sets
    assert "report/s-gone.txt" in old and "report/s-gone.txt" not in new and "report/s-added.txt" in new
    assert new["mine.txt"] == old["mine.txt"] and new["drawings/s-007.csv"] != old["drawings/s-007.csv"]


@pytest.mark.slow  # a subprocess per instant: about 15 s
@pytest.mark.parametrize("sig", [signal.SIGKILL, signal.SIGINT])
def test_real_signals_at_many_instants(tmp_path, sets, sig):
    out, old, new = sets
    base = tmp_path / "base"
    shutil.copytree(out, base)
    code, _, span = run_and_signal(out, sig, None)  # how long the commit takes here
    assert code == 0 and snapshot(out) == new
    rng = random.Random(16)
    seen = set()
    for k in range(8):
        shutil.rmtree(out)
        shutil.copytree(base, out)
        delay = span * k / 6 if k < 7 else rng.uniform(0, span)
        code, text, _ = run_and_signal(out, sig, delay)
        assert "Traceback" not in text or "DONE" in text
        if sig == signal.SIGINT:  # rolled back (or finished) by the run itself, exit 130 one line
            late = "DONE" in text and code == -signal.SIGINT  # came after the run had finished
            assert (code in (0, 130) or late) and not journal.leftovers(out)
            if code == 130:
                assert text.strip().splitlines()[-1] == "interrupted"
        notes = recovered(out)
        after = snapshot(out)
        assert after in (old, new), f"a mix after {sig.name} at {delay * 1e3:.1f} ms (notes {notes})"
        assert not journal.leftovers(out)
        seen.add("old" if after == old else "new")
        if notes:
            assert recovered(out) == []  # said once, then clean
    assert seen  # (which side each instant landed on depends on the machine's speed)


def test_a_kill_at_every_step_of_the_commit(tmp_path, sets):
    """Fork a child per step of the commit and end it there (as SIGKILL would)."""
    out, old, new = sets
    small_old = tmp_path / "small"
    write_set(small_old, outputs("old", 3), OLD)
    (small_old / "mine.txt").write_text("x")
    before = snapshot(small_old)
    ref = tmp_path / "ref3"
    shutil.copytree(small_old, ref)
    write_set(ref, outputs("new", 3), NEW)
    after = snapshot(ref)
    k, outcomes = 0, []
    while True:
        k += 1
        work = tmp_path / f"w{k}"
        shutil.copytree(small_old, work)
        pid = os.fork()
        if pid == 0:  # child: stop dead at step k
            count = {"n": 0}

            def stop(what):
                count["n"] += 1
                if count["n"] == k:
                    os._exit(9)
            journal._step = stop
            try:
                write_set(work, outputs("new", 3), NEW)
            finally:
                os._exit(0)
        _, status = os.waitpid(pid, 0)
        notes = recovered(work)
        got = snapshot(work)
        assert got in (before, after), f"a mix when stopped at step {k}"
        outcomes.append((got == after, bool(notes)))
        if os.waitstatus_to_exitcode(status) == 0:  # ran past the last step: done
            break
    assert k > 10 and outcomes[0] == (False, True) and outcomes[-1] == (True, False)
    assert any(o == (True, True) for o in outcomes)  # some kills land after the switch: rolled forward


def test_leftover_staging_without_a_plan_is_removed_and_reported(sets):
    out, old, _ = sets
    pid = os.fork()
    if pid == 0:  # child: killed while writing its files, before any plan
        try:
            with Staging(out) as stage:
                stage.path("drawings/s-000.csv").write_bytes(b"x" * 5000)
                os._exit(9)
        finally:
            os._exit(1)
    _, status = os.waitpid(pid, 0)
    assert os.waitstatus_to_exitcode(status) == 9 and len(journal.leftovers(out)) == 1
    notes = [n for n in recovered(out) if "write lock" not in n]
    assert len(notes) == 1 and "interrupted" in notes[0] and "MB" in notes[0]
    assert snapshot(out) == old


def test_a_users_folder_named_like_staging_but_a_link_is_left_alone(tmp_path, sets):
    out, old, _ = sets
    mine = tmp_path / "elsewhere"
    mine.mkdir()
    (mine / "keep").write_text("k")
    (out / ".geomgen-staging-mine").symlink_to(mine)
    assert recovered(out) == [] and (mine / "keep").exists()
