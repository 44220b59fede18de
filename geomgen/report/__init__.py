"""The design report: one data dict (JSON) rendered as a self-contained HTML page and Markdown.

Data path: :func:`report_data` (check of the written files + hydrodynamics + drawing
geometry) -> ``<set>-report.json``; :func:`content.page` says what the page holds, reading
that dict only; :mod:`render` writes it as HTML (images embedded) and Markdown (PNG files
beside it); :mod:`plots` draws the images from the same dict.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from .data import REPORT_FORMAT, drawing_data, report_data
from .worker import DrawingWorker

__all__ = ["write_report", "report_data", "drawing_data", "render_files", "ReportFiles", "REPORT_FORMAT"]


def _slug(key: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "-", key)


def render_files(data: dict, progress=None, images: dict | None = None) -> dict:
    """Output name -> bytes of every report file rendered from ``data`` (nothing written).

    ``images``: the drawings (key -> PNG bytes) if already rendered from the same data."""
    from ..outputs import output_name
    from .render import to_html, to_markdown

    name = data["spec"]["name"]
    if images is None:
        from .plots import render_all

        images = render_all(data, progress)
    image_names = {k: output_name(name, "report", _slug(k), suffix=".png") for k in images}
    files = {image_names[k]: png for k, png in images.items()}
    # the Markdown page sits beside its images: link them by file name
    image_files = {k: Path(v).name for k, v in image_names.items()}
    files[output_name(name, "report", suffix=".json")] = \
        (json.dumps(data, indent=1, ensure_ascii=False, allow_nan=False) + "\n").encode()
    files[output_name(name, "report", suffix=".html")] = to_html(data, images).encode("utf-8")
    files[output_name(name, "report", suffix=".md")] = to_markdown(data, image_files).encode("utf-8")
    return files


class ReportFiles(list):
    """The written paths (HTML first), with ``ok``: False when the check found a fault or a
    failed expectation (the command exits 1 then, like ``check``)."""

    def __init__(self, files, ok: bool, notes: list[str]):
        super().__init__(files)
        self.ok, self.notes = ok, notes


def write_report(project, out_dir=None, *, progress=None, allow_outside_files: bool = False) -> ReportFiles:
    """Check the project's outputs (building them if missing or stale), analyse the balance and
    write the design report into the output set: ``report/<set>-report.html`` (self-contained),
    ``report/<set>-report.md`` with its PNG drawings, and ``report/<set>-report.json`` (the
    data both pages are rendered from). Written whole or not at all, with the manifest.

    Parameters
    ----------
    project : :class:`~geomgen.project.Project` or path of the spec (TOML)
    out_dir : output folder (a path ``project`` only; default ``out/<spec stem>``)
    progress : callable(str), optional
        Receives short progress messages.

    Returns
    -------
    ReportFiles
        The files written, HTML first, and the check's verdict.

    Raises
    ------
    SpecError, GeometryError, ExportError, CheckFailed
        As :func:`geomgen.check.run.check`; nothing of the report is written then.
    """
    from ..outputs import holding
    from ..project import Project

    project = Project.of(project, out_dir, allow_outside_files=allow_outside_files)
    with holding(project.out_dir) as recovered:  # what it reads cannot change under it
        files = _write_report(project, progress)
    files.notes[:0] = recovered
    return files


def _write_report(project, progress) -> ReportFiles:
    from ..outputs import Output

    say = progress or (lambda m: None)
    drawing = drawing_data(project, progress=progress)
    with DrawingWorker(drawing, progress) as images:  # drawn in a second process while the check runs
        data = report_data(project, progress=progress, drawing=drawing)
        files = render_files(data, progress, images=images.result())
    say("writing the report")
    order = sorted(files, key=lambda n: (not n.endswith(".html"), not n.endswith(".md"), not n.endswith(".json"), n))
    purpose = {".html": "the design report, one self-contained page (open in a browser)",
               ".md": "the design report as Markdown, with its drawings beside it",
               ".json": "every number of the report, with the paths the pages cite",
               ".png": "a drawing of the Markdown report"}
    outs = [Output(n, "bytes", files[n], purpose[Path(n).suffix]) for n in order]
    done = project.write("report", outs)
    return ReportFiles(done.files, bool(data["check"]["ok"]), done.notes())
