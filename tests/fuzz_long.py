"""The long run of the command-line property: ≥ 10,000 generated specs through the command line.

    python tests/fuzz_long.py --cases 10000 --jobs 2 --log fuzz-long.tsv

The cases are split into chunks, each a fresh worker process (own Hypothesis seed, its own
temporary folders, removed case by case) so that a fault is logged and the run goes on: the
record is the count of every outcome, not the first failure. Every case is judged by
``fuzz_specs.run_cli_case`` - the same judge as the pytest property
``test_every_spec_is_refused_with_its_cause_or_checks_clean``. A case that takes longer than
``--case-timeout`` seconds is logged as a hang. Exit 0 only when no case had a problem.

Log: one tab-separated line per case (chunk, outcome, problem, message, parameters of the
faulty cases as JSON so that each can be replayed with ``--replay``).
"""

from __future__ import annotations

import argparse
import collections
import json
import os
import shutil
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


class Hang(Exception):
    pass


def _alarm(signum, frame):
    raise Hang()


def worker(seed: int, cases: int, log: Path, timeout: int) -> None:
    sys.path.insert(0, str(HERE))
    from fuzz_specs import run_cli_case, spec_params
    from hypothesis import HealthCheck, Phase, given, settings
    from hypothesis import seed as hseed

    signal.signal(signal.SIGALRM, _alarm)
    # a crash of the process (the CAD kernel) must name its case: the Python stack goes to a
    # crash file, and the running case's parameters sit in a file the parent reads on a crash
    import faulthandler

    crash_file = open(_side(log, seed, "crash.txt"), "w")
    faulthandler.enable(file=crash_file)
    running = _side(log, seed, "running.json")

    @hseed(seed)
    @settings(max_examples=cases, database=None, phases=[Phase.generate], deadline=None,
              suppress_health_check=list(HealthCheck))
    @given(spec_params(files=True))
    def one(params):
        d = Path(tempfile.mkdtemp(prefix="gfz"))
        running.write_text(json.dumps(params))
        signal.alarm(timeout)
        try:
            outcome, detail, problem = run_cli_case(params, d)
        except Hang:
            outcome, detail, problem = "hang", "", f"no answer in {timeout} s"
        except Exception as exc:  # the judge itself failing is a fault to look at too
            outcome, detail, problem = "error", repr(exc), "the run of the case raised"
        finally:
            signal.alarm(0)
            shutil.rmtree(d, ignore_errors=True)
        with open(log, "a") as f:
            f.write("\t".join([str(seed), outcome, problem, detail.replace("\n", " ").replace("\t", " ")[:600],
                               json.dumps(params) if problem else ""]) + "\n")

    one()
    running.unlink(missing_ok=True)


def _side(log: Path, seed: int, what: str) -> Path:
    return log.with_name(f"{log.name}.{seed}.{what}")


def _crashed(log: Path, seed: int, code: int) -> None:
    """Log the case a worker died on (signal or exit code), with its parameters and stack."""
    running, crash = _side(log, seed, "running.json"), _side(log, seed, "crash.txt")
    params = running.read_text() if running.exists() else "{}"
    stack = crash.read_text().replace("\n", " | ")[-600:] if crash.exists() else ""
    with open(log, "a") as f:
        f.write("\t".join([str(seed), "crash", f"the worker died (code {code})", stack, params]) + "\n")


def _params(params_json: str) -> dict:
    p = json.loads(params_json)
    if p.get("file_a"):
        p["file_a"] = tuple(p["file_a"])
    if "position" in p:
        p["position"] = tuple(p["position"])
    return p


def replay(params_json: str) -> None:
    sys.path.insert(0, str(HERE))
    from fuzz_specs import run_cli_case, spec_text

    p = _params(params_json)
    d = Path(tempfile.mkdtemp(prefix="gfz-replay"))
    print(spec_text(p))
    print(run_cli_case(p, d))
    print("folder:", d)


def recheck(log: Path) -> int:
    """Run every case a log records with a problem again (after a fix): 0 if all pass now."""
    sys.path.insert(0, str(HERE))
    from fuzz_specs import run_cli_case

    _, faults = summary(log)
    still = 0
    for f in faults:
        d = Path(tempfile.mkdtemp(prefix="gfz-recheck"))
        outcome, detail, problem = run_cli_case(_params(f[4]), d)
        shutil.rmtree(d, ignore_errors=True)
        still += bool(problem)
        print(f"{f[1]} then -> {outcome} now" + (f": {problem}: {detail[:300]}" if problem else ""))
    print(f"{len(faults)} logged cases with a problem; {still} still have one")
    return 1 if still else 0


def summary(log: Path) -> tuple[collections.Counter, list[list[str]]]:
    counts: collections.Counter = collections.Counter()
    faults = []
    for line in log.read_text().splitlines():
        parts = line.split("\t")
        if len(parts) < 3:
            continue
        counts[parts[1]] += 1
        if parts[2]:
            faults.append(parts)
    return counts, faults


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--cases", type=int, default=10_000)
    ap.add_argument("--jobs", type=int, default=os.cpu_count() or 1)
    ap.add_argument("--chunk", type=int, default=200)
    ap.add_argument("--seed", type=int, default=15_000, help="seed of the first chunk (chunk k: seed + k)")
    ap.add_argument("--log", type=Path, default=Path("fuzz-long.tsv"))
    ap.add_argument("--case-timeout", type=int, default=300)
    ap.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--replay", help="parameters (JSON) of one logged case: run it again and show it")
    ap.add_argument("--recheck", type=Path, help="a log: run every case it records with a problem again")
    a = ap.parse_args()
    if a.recheck:
        return recheck(a.recheck)
    if a.replay:
        replay(a.replay)
        return 0
    if a.worker:
        worker(a.seed, a.cases, a.log, a.case_timeout)
        return 0
    chunks = [(a.seed + k, min(a.chunk, a.cases - k * a.chunk)) for k in range((a.cases + a.chunk - 1) // a.chunk)]
    t0, running, done = time.time(), [], 0
    env = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1", MKL_NUM_THREADS="1")
    while chunks or running:
        while chunks and len(running) < a.jobs:
            s, n = chunks.pop(0)
            running.append(subprocess.Popen(
                [sys.executable, __file__, "--worker", "--seed", str(s), "--cases", str(n), "--log", str(a.log),
                 "--case-timeout", str(a.case_timeout)], env=env))
        time.sleep(2)
        for p in [p for p in running if p.poll() is not None]:
            running.remove(p)
            done += 1
            if p.returncode != 0:
                _crashed(a.log, int(p.args[p.args.index("--seed") + 1]), p.returncode)
            counts, faults = summary(a.log) if a.log.exists() else (collections.Counter(), [])
            print(f"[{time.time() - t0:7.0f} s] chunks done {done}: {sum(counts.values())} cases "
                  f"{dict(counts)}; with a problem {len(faults)}"
                  + ("" if p.returncode == 0 else f"; a worker exited {p.returncode}"), flush=True)
    counts, faults = summary(a.log)
    print(f"\n{sum(counts.values())} generated specs through `geomgen check` in {time.time() - t0:.0f} s")
    for k, v in sorted(counts.items()):
        print(f"  {k:12s} {v}")
    print(f"  with a problem: {len(faults)}")
    for f in faults:
        print("   ", f[1], "-", f[2], "-", f[3][:200])
    return 1 if faults else 0


if __name__ == "__main__":
    sys.exit(main())
