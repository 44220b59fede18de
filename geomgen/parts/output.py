"""One file to write: its name, format and bodies; written only inside a staging folder."""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..errors import ExportError


@dataclass
class _Named:
    name: str
    solid: object


@dataclass
class Output:
    """``fmt``: step | stl | 3mf. ``bodies``: (name, solid); ``meshes``: (name, vertices, faces)
    for stl and 3mf (made before anything is written, so a mesh failure writes nothing)."""

    name: str
    fmt: str
    bodies: list = field(default_factory=list)
    meshes: list = field(default_factory=list)
    title: str = ""

    def write(self, path: Path) -> None:
        if self.fmt == "step":
            from ..cad.export import write_step

            write_step([_Named(n, s) for n, s in self.bodies], path, {"assembly_name": Path(self.name).stem})
        elif self.fmt == "stl":
            from ..cad.export import stl_bytes

            off, vs, fs = 0, [], []
            for _, v, f in self.meshes:
                vs.append(v)
                fs.append(f + off)
                off += len(v)
            try:
                Path(path).write_bytes(stl_bytes(np.concatenate(vs), np.concatenate(fs)))
            except OSError as exc:
                raise ExportError(f"{path}: cannot write STL: {exc.strerror or exc}") from None
        elif self.fmt == "3mf":
            from ..cad.threemf import write_3mf

            write_3mf(self.meshes, path, self.title or Path(self.name).stem)
        else:  # pragma: no cover
            raise ExportError(f"unknown format {self.fmt}")
