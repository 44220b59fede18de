"""Benchmark figures (printed, not asserted): demo build time per part and against loft
resolution, and the start-up time of ``geomgen --help``.

Run: ``make bench`` (or ``.venv/bin/python bench/bench.py``).
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "specs" / "demo-foilset.toml"


def median_time(fn, n=3):
    ts = []
    for _ in range(n):
        t = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts)


def command_times():
    """Each command on the demo set, as a user runs it (new process, fresh output folder)."""
    print("each command on the demo set (new process, fresh folder; check and report build first):")
    times = {}
    with tempfile.TemporaryDirectory() as tmp:
        for cmd in ("build", "check", "drawings", "balance", "report"):
            out = Path(tmp) / cmd
            args = ([sys.executable, "-m", "geomgen.cli", cmd, str(DEMO)]
                    + (["-o", str(out)] if cmd != "balance" else []))
            t = time.perf_counter()
            r = subprocess.run(args, capture_output=True, text=True)
            times[cmd] = time.perf_counter() - t
            print(f"  geomgen {cmd:<9} {times[cmd]:6.2f} s  (exit {r.returncode})")
        shop = ROOT / "specs" / "demo-stabilizer-shop.toml"
        t = time.perf_counter()
        r = subprocess.run([sys.executable, "-m", "geomgen.cli", "parts", str(shop), "-o", str(Path(tmp) / "parts")],
                           capture_output=True, text=True)
        print(f"  geomgen parts     {time.perf_counter() - t:6.2f} s  (exit {r.returncode}; {shop.name})")
        ratio = []
        for k in range(3):  # fresh folders, alternating, so a busy machine hurts both alike
            pair = {}
            for cmd in ("check", "report"):
                t = time.perf_counter()
                subprocess.run([sys.executable, "-m", "geomgen.cli", cmd, str(DEMO),
                                "-o", str(Path(tmp) / f"{cmd}{k}")], capture_output=True)
                pair[cmd] = time.perf_counter() - t
            ratio.append(pair["report"] / pair["check"])
    print(f"  report / check (median of 3 fresh pairs): {statistics.median(ratio):.2f}  [target <= 1.3]")
    return times


def main():
    command_times()
    help_t = median_time(lambda: subprocess.run([sys.executable, "-m", "geomgen.cli", "--help"],
                                                capture_output=True, check=True))
    print(f"geomgen --help (new process): {help_t:.2f} s  [target <= 0.5 s]")

    t = time.perf_counter()
    from geomgen.build import build
    from geomgen.cad import export  # noqa: F401  (kernel import counted here)
    from geomgen.cad.shape import SurfaceShape as Part
    from geomgen.geometry import build_models
    from geomgen.spec import load_spec, load_spec_text

    print(f"import of library and kernel: {time.perf_counter() - t:.2f} s (once per process)")
    with tempfile.TemporaryDirectory() as tmp:
        total = median_time(lambda: build(DEMO, Path(tmp) / "o"))
    print(f"demo build, all files (median of 3): {total:.2f} s  [target <= 5 s]")

    from geomgen.check.run import check

    with tempfile.TemporaryDirectory() as tmp:
        check(DEMO, Path(tmp) / "c", write_record=False)
        runs = [check(DEMO, Path(tmp) / "c", write_record=False).seconds for _ in range(3)]
    meas = statistics.median(r["measure"] for r in runs)
    print(f"check of the demo set, fresh outputs reused (median of 3): measure + compare {meas:.2f} s "
          f"[target <= 3 s]; reuse test {statistics.median(r['build_or_reuse'] for r in runs):.2f} s")

    print("\nper part (median of 3): loft solid | STEP | STL 0.05 mm")
    for model in build_models(load_spec(DEMO)):
        def loft():
            Part(model).solid

        p = Part(model)
        p.solid
        with tempfile.TemporaryDirectory() as tmp:
            st = median_time(lambda: export.write_step([p], Path(tmp) / "a.step", {}))
            sl = median_time(lambda: export.write_stl([p], Path(tmp) / "a.stl", {}))
        print(f"  {model.name:<12} {median_time(loft):6.2f} s | {st:5.2f} s | {sl:5.2f} s")

    print("\nfront wing against loft resolution (loft_sections per half span): loft + STEP")
    text = DEMO.read_text()
    for n in (12, 24, 48, 96):
        spec = load_spec_text(text.replace("loft_sections = 28", f"loft_sections = {n}"))
        wing = build_models(spec)[0]
        with tempfile.TemporaryDirectory() as tmp:
            def run():
                p = Part(wing)
                export.write_step([p], Path(tmp) / "w.step", {})
            print(f"  {n:4d} sections: {median_time(run):6.2f} s")


if __name__ == "__main__":
    main()
