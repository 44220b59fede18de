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

from .data import REPORT_FORMAT, report_data

__all__ = ["write_report", "report_data", "render_files", "REPORT_FORMAT"]


def _slug(key: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "-", key)


def render_files(data: dict, progress=None) -> dict:
    """File name -> bytes of every report file rendered from ``data`` (nothing written)."""
    from .plots import render_all
    from .render import to_html, to_markdown

    name = data["spec"]["name"]
    images = render_all(data, progress)
    files = {f"{name}-report-{_slug(k)}.png": png for k, png in images.items()}
    image_files = {k: f"{name}-report-{_slug(k)}.png" for k in images}
    files[f"{name}-report.json"] = (json.dumps(data, indent=1, ensure_ascii=False, allow_nan=False) + "\n").encode()
    files[f"{name}-report.html"] = to_html(data, images).encode("utf-8")
    files[f"{name}-report.md"] = to_markdown(data, image_files).encode("utf-8")
    return files


def write_report(spec_path, out_dir, *, progress=None, check_result=None, hydro=None) -> list[Path]:
    """Check ``spec_path``'s outputs in ``out_dir`` (building them if missing or stale), analyse
    the balance and write the design report there: ``<set>-report.html`` (self-contained),
    ``<set>-report.md`` with its PNG drawings, and ``<set>-report.json`` (the data both pages
    are rendered from). All files are written whole or not at all, with the manifest.

    Parameters
    ----------
    spec_path : path of the spec (TOML)
    out_dir : output folder
    progress : callable(str), optional
        Receives short progress messages.
    check_result, hydro : optional
        A :class:`CheckResult` / :class:`HydroResult` already computed for this spec and folder.

    Returns
    -------
    list of Path
        The files written, HTML first.

    Raises
    ------
    SpecError, GeometryError, ExportError, CheckFailed
        As :func:`geomgen.check.run.check`; nothing of the report is written then.
    """
    from ..outputs import Staging

    say = progress or (lambda m: None)
    data = report_data(spec_path, out_dir, progress=progress, check_result=check_result, hydro=hydro)
    files = render_files(data, progress)
    say("writing the report")
    order = sorted(files, key=lambda n: (not n.endswith(".html"), not n.endswith(".md"), not n.endswith(".json"), n))
    with Staging(out_dir) as stage:
        for n in order:
            stage.path(n).write_bytes(files[n])
        return stage.commit({"spec": Path(spec_path).name})
