"""Drawing the report's images in a second process while the check measures the files.

The images depend only on the drawing part of the report dict (geometry and hydrodynamics,
:func:`geomgen.report.data.drawing_data`), not on the measurements, so on a machine with two
cores they are rendered beside the check instead of after it. The worker is a new
interpreter running this module (``python -m geomgen.report.worker``): it reads the plain
dict from its stdin and writes the PNG bytes to stdout (pickle), so nothing of the caller's
state (its main script, the CAD kernel) is shared or run again, and no temporary file is
left anywhere. The worker ends itself as soon as its parent is gone (a kill of ``report``
leaves no worker behind). If the worker cannot start or fails, the images are drawn here
instead: the result is the same bytes either way.
"""

from __future__ import annotations

import os
import pickle
import subprocess
import sys
import threading
import time


def _render(drawing: dict) -> dict:
    from .plots import render_all

    return render_all(drawing)


class DrawingWorker:
    """Context manager; :meth:`result` returns key -> PNG bytes of every drawing."""

    def __init__(self, drawing: dict, progress=None):
        self.drawing, self.say = drawing, progress or (lambda m: None)
        self.proc: subprocess.Popen | None = None

    def __enter__(self):
        if (os.cpu_count() or 1) > 1 and os.environ.get("GEOMGEN_REPORT_INLINE") != "1":
            data = pickle.dumps(self.drawing, protocol=pickle.HIGHEST_PROTOCOL)
            try:
                self.proc = subprocess.Popen([sys.executable, "-m", "geomgen.report.worker", str(os.getpid())],
                                             stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                                             stderr=subprocess.DEVNULL)
                pipe = self.proc.stdin
                assert pipe is not None  # stdin=PIPE
                pipe.write(data)  # the worker reads it whole before it draws
                pipe.close()
            except OSError:
                if self.proc is not None:
                    self.proc.kill()
                    self.proc.wait()
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
        return False


def end_with_parent(parent_pid: int, every_s: float = 0.2) -> None:
    """End this process as soon as ``parent_pid`` is no longer its parent (the parent died,
    however: a SIGKILL gives the child no signal). A daemon thread polls ``getppid``."""
    def watch():
        while os.getppid() == parent_pid:
            time.sleep(every_s)
        os._exit(1)
    if os.getppid() != parent_pid:
        os._exit(1)
    threading.Thread(target=watch, daemon=True).start()


if __name__ == "__main__":  # the worker: python -m geomgen.report.worker PARENT_PID < IN.pickle > OUT
    end_with_parent(int(sys.argv[1]))
    drawing = pickle.loads(sys.stdin.buffer.read())
    sys.stdout.buffer.write(pickle.dumps(_render(drawing), protocol=pickle.HIGHEST_PROTOCOL))
