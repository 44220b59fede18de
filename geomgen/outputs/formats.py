"""The one writer table every command uses: format name -> writer.

An :class:`Output` is a file still to be written: its name (from
:func:`geomgen.outputs.naming.output_name`), its format, what it is for, and the payload the
format's writer needs. Writers take ``(payload, path)``, write exactly one file at ``path``
or raise :class:`~geomgen.errors.ExportError`; they never return a status.

Generic formats live here (``bytes``, ``text``, ``json``, and ``file`` for a writer that
needs the path itself, e.g. ezdxf); the solid and mesh formats (``step``, ``stl``, ``3mf``)
are registered by :mod:`geomgen.cad.export` when the CAD edge is imported, so this module
never imports the kernel (meshio's ``register_format`` pattern).
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable

from ..errors import ExportError

Writer = Callable[[Any, Path], None]

#: format name -> writer(payload, path)
WRITERS: dict[str, Writer] = {}


def register_format(fmt: str, writer: Writer) -> None:
    """Add (or replace) the writer of ``fmt`` in :data:`WRITERS`."""
    WRITERS[fmt] = writer


@dataclass
class Output:
    """One file to write. ``purpose`` is a few words for the index (what a shop uses it for);
    ``inputs`` the keys of the spec's parts the file is made from (:mod:`.inputs`; None: all
    of the spec, so the file goes stale at any edit)."""

    name: str
    fmt: str
    payload: Any
    purpose: str = ""
    inputs: list[str] | None = None

    def write(self, path: Path) -> None:
        try:
            writer = WRITERS[self.fmt]
        except KeyError:
            raise ExportError(f"{self.name}: no writer for format '{self.fmt}' "
                              f"(known: {', '.join(sorted(WRITERS))})") from None
        try:
            writer(self.payload, Path(path))
        except OSError as exc:
            raise ExportError(f"{self.name}: cannot write: {exc.strerror or exc}") from None


def _bytes(data: bytes, path: Path) -> None:
    path.write_bytes(data)


def _text(text, path: Path) -> None:
    """``text``: a string, or a callable giving one when written (a summary of what was staged)."""
    text = text() if callable(text) else text
    path.write_text(text if text.endswith("\n") else text + "\n", encoding="utf-8")


def _json(data, path: Path) -> None:
    path.write_text(json.dumps(data, indent=1, ensure_ascii=False, default=float) + "\n", encoding="utf-8")


def _file(fn: Callable[[Path], None], path: Path) -> None:
    fn(path)


register_format("bytes", _bytes)
register_format("text", _text)
register_format("json", _json)
register_format("file", _file)
