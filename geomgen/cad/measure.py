"""Measure written STEP files through the kernel: mass properties, extents, and the skin's
B-spline as numpy arrays (so the outline can be sliced fast, without kernel sections).

Nothing here knows the spec.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from OCP.BRep import BRep_Tool
from OCP.BRepGProp import BRepGProp
from OCP.Geom import Geom_BSplineSurface
from OCP.GProp import GProp_GProps
from OCP.TopAbs import TopAbs_FACE
from OCP.TopExp import TopExp_Explorer
from OCP.TopLoc import TopLoc_Location
from OCP.TopoDS import TopoDS

from .. import defaults
from ..errors import ExportError
from ..geometry.skin import Skin
from .readback import read_step


@dataclass
class MeasuredSolid:
    """What the kernel reads from one solid of a STEP file (mm)."""

    name: str
    bbox_min: np.ndarray  # extents of the skin samples (span: exact, its ends are boundary curves)
    bbox_max: np.ndarray
    skin: Skin
    n_faces: int
    solid: object = None

    def kernel_volume_centroid(self) -> tuple[float, np.ndarray]:
        """(volume mm³, centre (3,) mm) by the kernel's own integral at ``defaults.GPROP_EPS``.

        Not used by the check (the skin's exact quadrature is: the kernel's integral read a
        sawtooth planform 0.21 % low at any accuracy asked, and costs about 0.3 s a part);
        kept for comparisons with other programs that use the kernel."""
        vp = GProp_GProps()
        BRepGProp.VolumeProperties_s(self.solid, vp, defaults.GPROP_EPS, True)
        c = vp.CentreOfMass()
        return float(vp.Mass()), np.array([c.X(), c.Y(), c.Z()])


def _full_knots(n: int, get_knot, get_mult) -> np.ndarray:
    out = []
    for i in range(1, n + 1):
        out += [get_knot(i)] * get_mult(i)
    return np.array(out, float)


def skin_of(face) -> Skin:
    """The face's B-spline surface as a numpy :class:`Skin` (location applied; non-rational)."""
    loc = TopLoc_Location()
    srf = BRep_Tool.Surface_s(face, loc)
    bs = Geom_BSplineSurface.DownCast(srf) if hasattr(Geom_BSplineSurface, "DownCast") else srf
    if bs is None or not isinstance(bs, Geom_BSplineSurface):
        raise ExportError("the skin face is not a B-spline surface")
    if bs.IsUPeriodic() or bs.IsVPeriodic():  # a closed skin (sharp edge) may come back periodic
        bs = Geom_BSplineSurface.DownCast(bs.Copy()) if hasattr(Geom_BSplineSurface, "DownCast") else bs.Copy()
        if bs.IsUPeriodic():
            bs.SetUNotPeriodic()
        if bs.IsVPeriodic():
            bs.SetVNotPeriodic()
    if bs.IsURational() or bs.IsVRational():
        raise ExportError("the skin face is a rational B-spline; geomgen writes non-rational skins")
    trsf = loc.Transformation()
    nu, nv = bs.NbUPoles(), bs.NbVPoles()
    poles = np.empty((nu, nv, 3))
    for i in range(1, nu + 1):
        for j in range(1, nv + 1):
            p = bs.Pole(i, j).Transformed(trsf)
            poles[i - 1, j - 1] = (p.X(), p.Y(), p.Z())
    tu = _full_knots(bs.NbUKnots(), bs.UKnot, bs.UMultiplicity)
    tv = _full_knots(bs.NbVKnots(), bs.VKnot, bs.VMultiplicity)
    return Skin(tu=tu, tv=tv, poles=poles, du=bs.UDegree(), dv=bs.VDegree())


def _pole_count(face) -> int:
    """Poles of a face's B-spline surface (0 if not a B-spline): the skin has by far the most."""
    srf = BRep_Tool.Surface_s(face)
    return srf.NbUPoles() * srf.NbVPoles() if isinstance(srf, Geom_BSplineSurface) else 0


def measure_solid(name: str, solid) -> MeasuredSolid:
    faces = []
    exp = TopExp_Explorer(solid, TopAbs_FACE)
    while exp.More():
        faces.append(TopoDS.Face_s(exp.Current()))
        exp.Next()
    skin = skin_of(max(faces, key=_pole_count))
    # extents of the skin (the end sections are its boundary curves, so this is the span)
    from ..geometry.slices import skin_grid

    grid, _ = skin_grid(skin, per_span=2)
    pts = grid.reshape(-1, 3)
    return MeasuredSolid(name=name, bbox_min=pts.min(axis=0), bbox_max=pts.max(axis=0), skin=skin,
                         n_faces=len(faces), solid=solid)


def measure_step(path) -> list[MeasuredSolid]:
    """Every solid of a STEP file, measured."""
    return [measure_solid(n, s) for n, s in read_step(path)]
