"""Writers, one function per format, looked up in :data:`EXPORTERS`.

Each writer takes ``(bodies, path, options)``: ``bodies`` is a list of objects with ``.name``,
``.solid`` (OCP shape) and ``.mesh(tol)`` (vertices, faces); it writes exactly one file at
``path`` or raises ExportError, never returns a status. Importing this module registers the
formats in the one writer table (:data:`geomgen.outputs.WRITERS`); commands write through it
into a staging folder and move files into place only when all succeeded.
"""

from __future__ import annotations

import errno
import os
import re
from pathlib import Path

import numpy as np

from .. import __version__, defaults
from ..errors import ExportError


def write_step(parts, path: Path, options: dict) -> None:
    """STEP AP214 in mm through OCP's XCAF writer; every part a named product.

    One part gives a file with that one named product; several give an assembly named
    ``options['assembly_name']`` with a named component per part.
    """
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.Interface import Interface_Static
    from OCP.STEPCAFControl import STEPCAFControl_Writer
    from OCP.STEPControl import STEPControl_AsIs
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDataStd import TDataStd_Name
    from OCP.TDocStd import TDocStd_Document
    from OCP.TopLoc import TopLoc_Location
    from OCP.XCAFDoc import XCAFDoc_DocumentTool

    doc = TDocStd_Document(TCollection_ExtendedString("geomgen"))
    tool = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    def name(label, text):
        return TDataStd_Name.Set_s(label, TCollection_ExtendedString(text))
    if len(parts) == 1:
        name(tool.AddShape(parts[0].solid, False), parts[0].name)
    else:
        top = tool.NewShape()
        name(top, options.get("assembly_name", Path(path).stem))
        for p in parts:
            lbl = tool.AddShape(p.solid, False)
            name(lbl, p.name)
            name(tool.AddComponent(top, lbl, TopLoc_Location()), p.name)
        tool.UpdateAssemblies()
    Interface_Static.SetCVal_s("write.step.unit", "MM")
    Interface_Static.SetCVal_s("write.step.schema", "AP214IS")
    writer = STEPCAFControl_Writer()
    writer.SetNameMode(True)
    if not writer.Transfer(doc, STEPControl_AsIs):
        raise ExportError(f"{path}: STEP transfer failed")
    _fixed_header(writer, Path(path).name)
    if writer.Write(str(path)) != IFSelect_RetDone:
        raise ExportError(f"{path}: STEP writer failed{_why_not_written(Path(path))}")
    if len(parts) > 1:
        _renumber_occurrences(Path(path))
    if not Path(path).is_file() or Path(path).stat().st_size == 0:
        raise ExportError(f"{path}: STEP writer produced no file")


def _why_not_written(path: Path) -> str:
    """The likely reason a file could not be written, read from the folder (the kernel's STEP
    writer reports only that it failed, no operating-system error)."""
    folder = path.parent
    try:
        if not os.access(folder, os.W_OK):
            return f" ({os.strerror(errno.EACCES).lower()} in {folder})"
        st = os.statvfs(folder)
        free = st.f_bavail * st.f_frsize
        if free < 1 << 20:
            return f" ({os.strerror(errno.ENOSPC).lower()}: {free // 1024} KiB free)"
    except OSError:
        pass
    return ""


#: The STEP header's time stamp is fixed so the same spec and version give the same bytes;
#: when a file was made is recorded by the file system and the build, not inside the file.
STEP_TIME_STAMP = "2000-01-01T00:00:00"


def _fixed_header(writer, file_name: str) -> None:
    """Deterministic FILE_NAME header: fixed time stamp, geomgen as author and system."""
    from OCP.APIHeaderSection import APIHeaderSection_MakeHeader
    from OCP.TCollection import TCollection_HAsciiString

    hdr = APIHeaderSection_MakeHeader(writer.ChangeWriter().Model())
    hdr.SetName(TCollection_HAsciiString(file_name))
    hdr.SetTimeStamp(TCollection_HAsciiString(STEP_TIME_STAMP))
    hdr.SetAuthorValue(1, TCollection_HAsciiString("geomgen"))
    hdr.SetOrganizationValue(1, TCollection_HAsciiString("geomgen"))
    hdr.SetOriginatingSystem(TCollection_HAsciiString(f"geomgen {__version__}"))
    hdr.SetAuthorisation(TCollection_HAsciiString(""))


def _renumber_occurrences(path: Path) -> None:
    """Number assembly occurrences 1, 2, ... in file order (the writer keeps a process-wide
    counter, so a second build in one process would otherwise differ in these ids)."""
    text = path.read_bytes()
    counter = iter(range(1, 1 << 30))
    text = re.sub(rb"NEXT_ASSEMBLY_USAGE_OCCURRENCE\('\d+'",
                  lambda m: b"NEXT_ASSEMBLY_USAGE_OCCURRENCE('%d'" % next(counter), text)
    path.write_bytes(text)


STL_HEADER = b"geomgen binary STL, units mm".ljust(80, b" ")


def stl_bytes(vertices: np.ndarray, faces: np.ndarray) -> bytes:
    """Binary STL of a mesh (mm). Fixed header, no time stamp: same mesh, same bytes."""
    tri = vertices[faces].astype(np.float64)
    n = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
    ln = np.linalg.norm(n, axis=1, keepdims=True)
    n = np.divide(n, ln, out=np.zeros_like(n), where=ln > 0)
    rec = np.zeros(len(faces), dtype=[("n", "<f4", 3), ("v", "<f4", (3, 3)), ("a", "<u2")])
    rec["n"], rec["v"] = n, tri
    return STL_HEADER + np.uint32(len(faces)).tobytes() + rec.tobytes()


def write_stl(parts, path: Path, options: dict) -> None:
    """Binary STL of all parts with chordal deviation ``stl_tol`` mm."""
    tol = options.get("stl_tol", defaults.STL_LINEAR_TOL_MM)
    meshes = [p.mesh(tol) for p in parts]
    offset, faces = 0, []
    for v, f in meshes:
        faces.append(f + offset)
        offset += len(v)
    data = stl_bytes(np.concatenate([v for v, _ in meshes]), np.concatenate(faces))
    try:
        Path(path).write_bytes(data)
    except OSError as exc:
        raise ExportError(f"{path}: cannot write STL: {exc.strerror or exc}") from None


def write_3mf(parts, path: Path, options: dict) -> None:
    """3MF package (unit millimetre) of the same meshes as the STL, one object per part."""
    from .threemf import write_3mf as write_package

    tol = options.get("stl_tol", defaults.STL_LINEAR_TOL_MM)
    write_package([(p.name, *p.mesh(tol)) for p in parts], path, title=options.get("assembly_name", ""))


#: format name -> (file suffix, writer) of the solid and mesh formats
EXPORTERS = {
    "step": (".step", write_step),
    "stl": (".stl", write_stl),
    "3mf": (".3mf", write_3mf),
}


def _register() -> None:
    """Put the solid and mesh formats into the one writer table of :mod:`geomgen.outputs`.

    Their payload is ``(bodies, options)``: bodies with ``.name``, ``.solid``, ``.mesh(tol)``."""
    from ..outputs import register_format

    for fmt in EXPORTERS:  # looked up at write time, so the table stays the one place to change
        def write(payload, path, fmt=fmt):
            return EXPORTERS[fmt][1](payload[0], path, payload[1])

        register_format(fmt, write)


_register()
