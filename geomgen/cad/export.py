"""Writers, one function per format, looked up in :data:`EXPORTERS`.

Each writer takes ``(parts, path, options)`` where ``parts`` is a list of
``(name, TopoDS_Shape)``; it writes exactly one file at ``path`` or raises ExportError.
Callers write into a staging folder and move files into place only when all succeeded.
"""

from __future__ import annotations

import math
from pathlib import Path

from OCP.BRepMesh import BRepMesh_IncrementalMesh
from OCP.StlAPI import StlAPI_Writer
from OCP.TopoDS import TopoDS_Compound, TopoDS_Shape
from OCP.BRep import BRep_Builder

from .. import defaults
from ..errors import ExportError


def _compound(shapes) -> TopoDS_Shape:
    comp = TopoDS_Compound()
    bld = BRep_Builder()
    bld.MakeCompound(comp)
    for s in shapes:
        bld.Add(comp, s)
    return comp


def write_step(parts, path: Path, options: dict) -> None:
    """STEP AP214 in mm; every part a named product (one part or an assembly)."""
    import cadquery as cq

    assy = cq.Assembly(name=options.get("assembly_name", Path(path).stem))
    for name, shape in parts:
        assy.add(cq.Shape.cast(shape), name=name)
    try:
        assy.export(str(path), exportType="STEP", unit="MM")
    except Exception as exc:  # the kernel reports failures as exceptions of its own
        raise ExportError(f"{path}: STEP writer failed: {exc}") from exc
    if not Path(path).is_file() or Path(path).stat().st_size == 0:
        raise ExportError(f"{path}: STEP writer produced no file")


def mesh(shape: TopoDS_Shape, linear_mm: float, angular_deg: float) -> None:
    """Triangulate ``shape`` in place with an absolute linear deflection (mm)."""
    BRepMesh_IncrementalMesh(shape, linear_mm, False, math.radians(angular_deg), True)


def write_stl(parts, path: Path, options: dict) -> None:
    """Binary STL of all parts, deflection ``stl_tol`` mm and ``stl_angle`` deg."""
    shape = parts[0][1] if len(parts) == 1 else _compound([s for _, s in parts])
    mesh(shape, options.get("stl_tol", defaults.STL_LINEAR_TOL_MM),
         options.get("stl_angle", defaults.STL_ANGULAR_TOL_DEG))
    writer = StlAPI_Writer()
    writer.ASCIIMode = False
    if not writer.Write(shape, str(path)):
        raise ExportError(f"{path}: STL writer failed")


#: format name -> (file suffix, writer)
EXPORTERS = {
    "step": (".step", write_step),
    "stl": (".stl", write_stl),
}
