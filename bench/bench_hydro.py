"""Time the vortex-lattice neutral point of the demo set against panel count, and the
balance with free surface, cavitation and drag (its targets).

Usage: ``.venv/bin/python bench/bench_hydro.py [SPEC]`` (default specs/demo-foilset.toml, else
/tmp/foil.toml). Prints, per panel count, the lattice size, the wall time of
:func:`geomgen.hydro.neutral_point` (best of 3, lattice built and solved each time), of a full
:func:`geomgen.hydro.analyse` with trim, and the neutral point with its change from the finest
count in % MAC. OpenBLAS threads matter on a shared 2-core machine: try
``OPENBLAS_NUM_THREADS=1`` as well (the thread count in effect is printed).
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

from geomgen.geometry.model import build_models
from geomgen.hydro import analyse, neutral_point
from geomgen.hydro.analysis import figures_of
from geomgen.spec import load_spec
from geomgen.spec.flight import DEFAULT_CHORD_PANELS, DEFAULT_SPAN_PANELS

ROOT = Path(__file__).resolve().parents[1]
COUNTS = [(8, 4), (12, 4), (DEFAULT_SPAN_PANELS, DEFAULT_CHORD_PANELS), (24, 8), (32, 12), (48, 16)]


def best_of(fn, n: int = 3) -> float:
    times = []
    for _ in range(n):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)


def print_water_figures(spec_path: Path) -> None:
    """Targets: the demo balance with free surface and cavitation (<= 2 s on 2 cores),
    the 2D panel method (<= 20 ms a section), the lattice memory budget."""
    from geomgen.defaults import LATTICE_MATRICES, LATTICE_MEMORY_BUDGET_BYTES
    from geomgen.hydro import analyse_spec
    from geomgen.hydro.panel2d import PANELS_PER_SIDE, section_flow, section_flows
    from geomgen.sections.naca import naca

    spec = load_spec(spec_path)
    for k in range(2):
        t, c = time.perf_counter(), time.process_time()
        r = analyse_spec(spec)
        wall, cpu = time.perf_counter() - t, time.process_time() - c
        print(f"balance analysis (free surface {'on' if r.free_surface else 'off'}, cavitation over "
              f"{r.cavitation.sections_solved} sections, drag, shim){' (first run)' if k == 0 else ''}: "
              f"wall {wall:.2f} s, CPU {cpu:.2f} s   target <= 2 s")
    secs = [naca(d) for d in ("0012", "2412", "4415", "0009", "2410", "6409", "0015", "2413")] * 4
    t, c = time.perf_counter(), time.process_time()
    for s in secs[:8]:
        section_flow(s)
    one, one_c = (time.perf_counter() - t) / 8, (time.process_time() - c) / 8
    t, c = time.perf_counter(), time.process_time()
    section_flows(secs)
    many, many_c = (time.perf_counter() - t) / len(secs), (time.process_time() - c) / len(secs)
    print(f"2D panel method, {2 * PANELS_PER_SIDE} panels: alone wall {one * 1000:.1f} ms (CPU {one_c * 1000:.1f}) "
          f"a section, batched ({len(secs)}) wall {many * 1000:.1f} ms (CPU {many_c * 1000:.1f})   target <= 20 ms")
    print(f"load average now {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores (wall times grow with it)")
    n = int((LATTICE_MEMORY_BUDGET_BYTES / (LATTICE_MATRICES * 8)) ** 0.5)
    print(f"lattice memory budget {LATTICE_MEMORY_BUDGET_BYTES / 2**30:.1f} GiB: up to about {n} panels "
          f"({LATTICE_MATRICES} N² float64 matrices); larger problems are refused before allocating\n")


def main(argv: list[str]) -> int:
    spec_path = Path(argv[1]) if len(argv) > 1 else ROOT / "specs" / "demo-foilset.toml"
    if not spec_path.exists():
        spec_path = Path("/tmp/foil.toml")
    spec = load_spec(spec_path)
    models = build_models(spec)
    wing = next(m for m in models if m.role == "wing")
    t0 = time.perf_counter()
    mac = figures_of(wing).mac_mm
    t_fig = time.perf_counter() - t0
    print(f"spec: {spec_path}")
    print(f"OPENBLAS_NUM_THREADS={os.environ.get('OPENBLAS_NUM_THREADS', '(unset)')}, cpus={os.cpu_count()}")
    print(f"front-wing reference figures (first call, cached after): {t_fig * 1000:.0f} ms\n")
    rows = []
    for ns, nc in COUNTS:
        x = neutral_point(models, ns, nc)
        t_np = best_of(lambda: neutral_point(models, ns, nc), 3 if ns * nc < 400 else 1)
        t_full = best_of(lambda: analyse(models, spec.flight, span_panels=ns, chord_panels=nc), 1)
        n = sum((2 * ns if m.mirror else ns) * nc for m in models if m.role in ("wing", "stabilizer"))
        rows.append((ns, nc, n, t_np, t_full, x))
    print_water_figures(spec_path)
    x_ref = rows[-1][-1]
    print(f"{'strips/half':>11} {'chord':>5} {'panels':>6} {'NP s':>7} {'analyse s':>9} {'NP x mm':>9} "
          f"{'vs finest %MAC':>14}")
    for ns, nc, n, t_np, t_full, x in rows:
        mark = "  <- default" if (ns, nc) == (DEFAULT_SPAN_PANELS, DEFAULT_CHORD_PANELS) else ""
        print(f"{ns:>11} {nc:>5} {n:>6} {t_np:>7.3f} {t_full:>9.3f} {x:>9.2f} {(x - x_ref) / mac * 100:>14.3f}{mark}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
