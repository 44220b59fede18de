"""Benchmark: section properties of the demo set at every station, solid and shell.

Prints seconds for the intended sections (from the model) and for slices of the model's own
B-spline skin (what the check slices from the written STEP, without the kernel). Target:
both together <= 3 s on 2 cores. Run: python bench/bench_sections.py
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))


def main() -> None:
    import numpy as np

    from geomgen.geometry.sectionprops import model_section_properties, section_properties
    from geomgen.geometry.slices import SkinSlicer
    from geomgen.project import Project

    t0 = time.perf_counter()
    project = Project(ROOT / "specs" / "demo-foilset.toml", Path("/tmp/geomgen-bench-sections"))
    models = project.models
    from geomgen.geometry.sectionprops import warping_j

    th = np.linspace(0, 2 * np.pi, 60, endpoint=False)
    warping_j(np.column_stack([50 * np.cos(th), 5 * np.sin(th)]))  # imports and first-call set-up (not cached)
    t1 = time.perf_counter()
    n = 0
    for m in models:
        for y in m.planform.y:
            model_section_properties(m, float(y))
            n += 1
    t2 = time.perf_counter()
    for m in models:
        fr = m.span_frame()
        slicer = SkinSlicer(m.skin, fr["axis"])
        s = fr["root"] + fr["sign"] * np.asarray(m.planform.y, float)
        lo, hi = sorted(m.skin.evaluate([0.5], list(m.skin.v_range))[0, :, fr["axis"]])
        for sl in slicer.slice(np.clip(s, lo + 1e-6, hi - 1e-6)):
            section_properties(sl, fr["axis"], laminate_mm=1.0)
    t3 = time.perf_counter()
    print(f"set-up (spec, models, imports): {t1 - t0:.2f} s")
    print(f"section properties, intended, {n} stations (solid J; shell J where laminated): {t2 - t1:.2f} s")
    print(f"section properties, sliced skin, {n} stations (solid J and a 1 mm shell): {t3 - t2:.2f} s")
    print(f"total (target <= 3 s): {t3 - t1:.2f} s")


if __name__ == "__main__":
    main()
