"""Benchmark figures of the design studies (printed, not asserted): an analysis-only sweep of
200 variants of the demo on 1 and 2 local workers, the speed-up, and peak memory per worker.

Run: ``.venv/bin/python bench/bench_studies.py`` (``make bench`` runs it too).
"""

from __future__ import annotations

import os
import resource
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "specs" / "demo-foilset.toml"


def main(n: int = 200):
    from geomgen.project import Project
    from geomgen.studies import Executor, sweep

    project = Project(DEMO)
    # 20 stabilizer incidences x 10 masses = 200 variants
    axes = {"surface[stabilizer].incidence": [1.0 + 0.1 * i for i in range(20)],
            "flight.mass_kg": [70.0 + 3.0 * i for i in range(n // 20)]}
    times = {}
    for jobs in (1, 2):
        t = time.perf_counter()
        table = sweep(project, axes, grid=True, executor=Executor(jobs=jobs))
        times[jobs] = time.perf_counter() - t
        ok = sum(1 for r in table.rows if "error" not in r)
        print(f"sweep of {len(table.rows)} variants, {jobs} worker(s): {times[jobs]:6.1f} s "
              f"({times[jobs] / len(table.rows) * 1000:.0f} ms a variant; {ok} analysed)")
    print(f"speed-up on 2 workers: {times[1] / times[2]:.2f}  [target >= 1.7 on 2 cores; cpus here: {os.cpu_count()}]")
    kib = 1024 if sys.platform != "darwin" else 1
    print(f"peak memory: this process {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / kib:.0f} MiB, "
          f"largest worker {resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / kib:.0f} MiB")


if __name__ == "__main__":
    main()
