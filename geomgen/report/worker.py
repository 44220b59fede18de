"""Drawing the report's images in a second process while the check measures the files.

The images depend only on the drawing part of the report dict (geometry and hydrodynamics,
:func:`geomgen.report.data.drawing_data`), not on the measurements, so on a machine with two
cores they are rendered beside the check instead of after it. The worker is a new
interpreter running this module (``python -m geomgen.report.worker IN``): it reads the plain
dict from a file and writes the PNG bytes to stdout (pickle), so nothing of the caller's
state (its main script, the CAD kernel) is shared or run again. If the worker cannot start
or fails, the images are drawn here instead: the result is the same bytes either way.
"""

from __future__ import annotations

import os
import pickle
import subprocess
import sys
import tempfile


def _render(drawing: dict) -> dict:
    from .plots import render_all

    return render_all(drawing)


class DrawingWorker:
    """Context manager; :meth:`result` returns key -> PNG bytes of every drawing."""

    def __init__(self, drawing: dict, progress=None):
        self.drawing, self.say = drawing, progress or (lambda m: None)
        self.proc: subprocess.Popen | None = None
        self.tmp: str | None = None

    def __enter__(self):
        if (os.cpu_count() or 1) > 1 and os.environ.get("GEOMGEN_REPORT_INLINE") != "1":
            try:
                fd, self.tmp = tempfile.mkstemp(prefix="geomgen-drawing-", suffix=".pickle")
                with os.fdopen(fd, "wb") as f:
                    pickle.dump(self.drawing, f, protocol=pickle.HIGHEST_PROTOCOL)
                self.proc = subprocess.Popen([sys.executable, "-m", "geomgen.report.worker", self.tmp],
                                             stdin=subprocess.DEVNULL, stdout=subprocess.PIPE,
                                             stderr=subprocess.DEVNULL)
            except OSError:
                self.proc = None
        return self

    def result(self) -> dict:
        if self.proc is not None:
            try:
                out, _ = self.proc.communicate(timeout=600)
                if self.proc.returncode == 0:
                    images = pickle.loads(out)
                    if isinstance(images, dict) and all(isinstance(v, bytes) for v in images.values()):
                        return images
            except (subprocess.TimeoutExpired, pickle.UnpicklingError, EOFError, ValueError):
                self.proc.kill()
            self.proc = None
        self.say("drawing the views")
        return _render(self.drawing)

    def __exit__(self, *exc):
        if self.proc is not None and self.proc.poll() is None:
            self.proc.kill()
            self.proc.wait()
        if self.tmp:
            try:
                os.remove(self.tmp)
            except OSError:
                pass
        return False


if __name__ == "__main__":  # the worker: python -m geomgen.report.worker IN.pickle > OUT
    with open(sys.argv[1], "rb") as f:
        drawing = pickle.load(f)
    sys.stdout.buffer.write(pickle.dumps(_render(drawing), protocol=pickle.HIGHEST_PROTOCOL))
