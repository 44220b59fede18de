"""Benchmark figure (printed, not asserted): ``geomgen parts`` on an invented 900 mm front
wing with every printing feature (mounting pad with insert, counterbore and countersink holes,
a shim, automatic split for a 250 mm printer, locators, two rod spar channels, joint test),
as a user runs it (new process, fresh folder). Target: <= 10 s.

Run: ``.venv/bin/python bench/bench_parts.py``.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import tempfile
import time
from pathlib import Path

SPEC = """\
format = 1
name = "bench-wing"
[datum]
origin = "bench origin"
[sections.r]
naca = "2413"
[sections.t]
naca = "2410"
[[surface]]
name = "front-wing"
role = "wing"
mirror = true
position = [-265.0, 0.0, -28.0]
reference = 0.25
incidence = 1.5
te_thickness = 0.6
loft_sections = 28
[[surface.station]]
y = 0.0
chord = 200.0
section = "r"
[[surface.station]]
y = 170.0
chord = 185.0
x = 3.0
z = -3.0
section = "r"
[[surface.station]]
y = 330.0
chord = 140.0
x = 14.0
z = -13.0
twist = -1.0
section = "r"
[[surface.station]]
y = 450.0
chord = 60.0
x = 40.0
z = -34.0
twist = -2.5
section = "t"
[surface.mount]
pad_z = -17.5
pad_x = [-300.0, -180.0]
pad_width = 40.0
[[surface.mount.hole]]
x = -285.0
diameter = 6.0
insert = { diameter = 9.0, depth = 8.0 }
[[surface.mount.hole]]
x = -230.0
diameter = 6.0
counterbore = { diameter = 11.0, depth = 4.0 }
[[surface.mount.hole]]
x = -200.0
diameter = 6.0
countersink = { diameter = 12.0 }
[[surface.mount.shim]]
angle = 0.5
[surface.printing]
build_volume = [250.0, 250.0, 250.0]
odd_count = true
min_te = 0.9
[[surface.printing.spar]]
diameter = 4.0
span = [20.0, 320.0]
chord = [0.3, 0.33]
[[surface.printing.spar]]
diameter = 3.0
span = [20.0, 260.0]
chord = 0.55
"""


def main():
    with tempfile.TemporaryDirectory() as tmp:
        spec = Path(tmp) / "bench-wing.toml"
        spec.write_text(SPEC)
        t = time.perf_counter()
        r = subprocess.run([sys.executable, "-m", "geomgen.cli", "parts", str(spec), "-o", str(Path(tmp) / "out")],
                           capture_output=True, text=True)
        dt = time.perf_counter() - t
        if r.returncode:
            print(r.stdout[-3000:], r.stderr[-2000:])
        stages = [(float(m.group(1)), m.group(2)) for m in re.finditer(r"\[\s*([\d.]+) s\] (.*)", r.stdout + r.stderr)]
        first_write = [(t, "writing the files") for t, w in stages if w.startswith("writing")][:1]
        marks = sorted([(t, w) for t, w in stages if not w.startswith("writing")] + first_write) + [(dt, "(end)")]
        print("stages (seconds from start, as the command reports them):")
        for (t0, w), (t1, _) in zip(marks, marks[1:]):
            print(f"  {t0:6.2f} .. {t1:6.2f}  {w}")
        pieces = [t for t, w in marks if w.startswith("cutting the printed pieces")]
        after = [t for t, w in marks if pieces and t > pieces[0] and not w.startswith("posing")]
        if pieces and after:
            print(f"printed pieces (cut, posed, joint test): {after[0] - pieces[0]:.2f} s")
        print(f"geomgen parts, 900 mm front wing with every printing feature: {dt:.2f} s (exit {r.returncode}) "
              "[target <= 10 s]; machine load now: " + " ".join(f"{x:.1f}" for x in os.getloadavg()))

if __name__ == "__main__":
    main()
