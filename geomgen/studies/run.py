"""Running a study's variants: in this process, on a local process pool, or on a Dask
distributed cluster the user points to. Workers get spec text and return plain numbers
(kernel shapes never cross a process boundary), and BLAS runs single-threaded in every
executor, so the table is the same bytes whichever ran it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from ..errors import GeomgenError, SpecError
from .figures import variant_figures


@dataclass
class Task:
    """One variant to evaluate: its spec text and where its relative files resolve from."""

    text: str
    source: str
    cruise_kmh: float | None = None
    allow_outside_files: bool = False
    build_dir: str | None = None  # if given, build and check the variant into this folder too


def evaluate(task: Task) -> dict:
    """Figures of one task (the function every executor runs)."""
    import scipy.interpolate  # noqa: F401

    # load every numerical library first: a limit set before a BLAS is loaded misses it
    import scipy.linalg  # noqa: F401
    from threadpoolctl import threadpool_limits

    from .. import geometry, hydro  # noqa: F401

    with threadpool_limits(limits=1):
        row = variant_figures(task.text, task.source, cruise_kmh=task.cruise_kmh,
                              allow_outside_files=task.allow_outside_files)
    if task.build_dir is not None and "error" not in row:
        row.update(_build_and_check(task))
    return row


def _build_and_check(task: Task) -> dict:
    """Build and check one variant in its own output folder ``build_dir``: its spec
    (``variant.toml``) is written there through the commit like every other output (a file
    geomgen did not write, a link on the way: refused), then built and checked beside it."""
    import hashlib
    import tomllib

    from ..check.run import check
    from ..outputs import Output, write_set
    from ..project import Project

    assert task.build_dir is not None  # called only for a variant that is built
    out = Path(task.build_dir)
    text = task.text if task.text.endswith("\n") else task.text + "\n"
    try:
        write_set(out, [Output("variant.toml", "text", text, "the variant's spec, built and checked in this folder")],
                  {"set": tomllib.loads(text).get("name"), "spec": "variant.toml",
                   "spec_sha256": hashlib.sha256(text.encode("utf-8")).hexdigest(), "command": "variant"})
        res = check(Project(out / "variant.toml", out, allow_outside_files=True))
    except GeomgenError as exc:
        return {"check": "error", "check_error": str(exc)}
    figs = {r.figure: r.measured for r in res.records if r.part == res.records[0].part} if res.records else {}
    row = {"check": "ok" if res.ok else "FAULT", "measured_volume_cm3": figs.get("volume_cm3")}
    if not res.ok:
        bad = [f"{r.part} {r.figure}" for r in res.faults + res.failures][:5]
        row["check_error"] = (f"check found {len(res.faults)} geometry fault(s) and {len(res.failures)} failed "
                              f"expectation(s) ({', '.join(bad) or 'see its record'}): {out}")
    return row


def _end_with_parent(parent_pid: int) -> None:
    """Pool worker start: end when the study's process is gone (see report.worker)."""
    import os
    import threading
    import time

    def watch():
        while os.getppid() == parent_pid:
            time.sleep(0.2)
        os._exit(1)
    threading.Thread(target=watch, daemon=True).start()


@dataclass
class Executor:
    """Where the tasks run: ``jobs`` local processes, or a Dask scheduler ``address``."""

    jobs: int = 1
    address: str | None = None
    progress: Callable[[int, int], None] | None = field(default=None, repr=False)

    def map(self, tasks: list[Task]) -> list[dict]:
        say = self.progress or (lambda done, total: None)
        n = len(tasks)
        say(0, n)
        if self.address:
            return self._dask(tasks, say)
        if self.jobs <= 1 or n <= 1:
            rows: list = []
            for i, t in enumerate(tasks):
                rows.append(evaluate(t))
                say(i + 1, n)
            return rows
        import multiprocessing  # only a parallel run pays for the process pool's imports
        from concurrent.futures import ProcessPoolExecutor, as_completed

        rows = [None] * n
        import os  # beside the pool it serves

        # spawn: fresh interpreters, nothing inherited from this process (threads, kernel);
        # each worker ends itself when this process is gone (a SIGKILL leaves none running)
        with ProcessPoolExecutor(max_workers=self.jobs, mp_context=multiprocessing.get_context("spawn"),
                                 initializer=_end_with_parent, initargs=(os.getpid(),)) as pool:
            futures = {pool.submit(evaluate, t): i for i, t in enumerate(tasks)}
            for done, fut in enumerate(as_completed(futures), 1):
                rows[futures[fut]] = fut.result()
                say(done, n)
        return rows

    def _dask(self, tasks: list[Task], say) -> list[dict]:
        try:
            from distributed import Client, as_completed
        except ImportError:
            raise SpecError(["--scheduler needs the 'distributed' package (pip install 'dask[distributed]')"]) from None
        try:
            client = Client(self.address, timeout=10)
        except (OSError, TimeoutError) as exc:
            raise SpecError([f"--scheduler {self.address}: cannot reach the scheduler ({exc})"]) from None
        try:
            futures = client.map(evaluate, tasks, pure=False)
            index = {f.key: i for i, f in enumerate(futures)}
            rows: list = [None] * len(tasks)
            for done, fut in enumerate(as_completed(futures), 1):
                rows[index[fut.key]] = fut.result()
                say(done, len(tasks))
            return rows
        finally:
            client.close()
