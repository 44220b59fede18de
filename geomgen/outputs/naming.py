"""The one naming rule of every file geomgen writes, and the folders a shop looks in.

An output folder holds one *output set* per spec (the spec's ``name``), laid out by kind:

============  ====================================================================
folder        what is in it
============  ====================================================================
``cad/``      STEP solids: each surface, the assembly, shop parts (mount, moulds…)
``print/``    meshes to print or view: STL and 3MF of surfaces, pieces and shims
``drawings/`` the shaper's 1:1 templates, offset tables and hot-wire profiles
``report/``   the design report, the check record and each command's summary
``studies/``  what-if comparisons, size families and sweeps: tables, plots, specs
============  ====================================================================

plus ``geomgen-manifest.json`` (what geomgen wrote, with hashes) and ``geomgen-index.md``
(every file, what it is for, which command made it) at the top.
"""

from __future__ import annotations

import re
from pathlib import PurePosixPath

#: folder -> what a shop finds there (also the index's headings)
FOLDERS = {
    "cad": "CAD solids (STEP, mm)",
    "print": "meshes to print or view (STL, 3MF, mm)",
    "drawings": "shaper's drawings (1:1 DXF/SVG templates, offset tables, hot-wire profiles)",
    "report": "design report, check record and command summaries",
    "studies": "design studies: what-if comparisons, size families, sweeps (tables, plots, variant specs)",
}

#: file suffix -> folder, where the caller does not say
_FOLDER_OF_SUFFIX = {".step": "cad", ".stl": "print", ".3mf": "print", ".dxf": "drawings", ".svg": "drawings",
                     ".csv": "drawings", ".html": "report", ".md": "report", ".json": "report", ".png": "report",
                     ".txt": "report", ".toml": "studies", ".parquet": "studies"}

MANIFEST = "geomgen-manifest.json"
INDEX = "geomgen-index.md"

_SAFE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.+-]*$")


def output_name(set_name: str, *words: str, suffix: str, folder: str | None = None) -> str:
    """Relative path (POSIX) of one output: ``<folder>/<set>[-<word>…]<suffix>``.

    Parameters
    ----------
    set_name : the spec's ``name`` (the output set)
    words : what the file holds, most general first (a surface name, then e.g. ``templates``)
    suffix : file suffix with its dot (``.step``)
    folder : one of :data:`FOLDERS`; by default chosen from the suffix

    >>> output_name("demo", "front-wing", suffix=".step")
    'cad/demo-front-wing.step'
    >>> output_name("demo", "check", suffix=".md")
    'report/demo-check.md'
    """
    folder = folder or _FOLDER_OF_SUFFIX.get(suffix.lower(), "report")
    if folder not in FOLDERS:
        raise ValueError(f"unknown output folder {folder!r}; one of {', '.join(FOLDERS)}")
    stem = "-".join([set_name, *[w for w in words if w]])
    name = stem + suffix
    if not _SAFE.match(name) or ".." in name:
        raise ValueError(f"output name {name!r} is not a plain file name")
    return str(PurePosixPath(folder) / name)


def folder_of(name: str) -> str:
    """The folder part of an output name ('' for top-level files)."""
    p = PurePosixPath(name)
    return str(p.parent) if str(p.parent) != "." else ""
