"""Kernel operations for the shop parts: feature solids, booleans checked after each step,
splits, rigid/scaling transforms and bounding boxes (OCP). Meshes: :mod:`.mesh`."""

from __future__ import annotations

import numpy as np
from OCP.Bnd import Bnd_Box
from OCP.BRepAlgoAPI import BRepAlgoAPI_Common, BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse, BRepAlgoAPI_Splitter
from OCP.BRepBndLib import BRepBndLib
from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace, BRepBuilderAPI_MakePolygon, BRepBuilderAPI_Transform
from OCP.BRepGProp import BRepGProp
from OCP.BRepPrimAPI import BRepPrimAPI_MakeBox, BRepPrimAPI_MakeCone, BRepPrimAPI_MakeCylinder, BRepPrimAPI_MakePrism
from OCP.gp import gp_Ax2, gp_Ax3, gp_Dir, gp_Pln, gp_Pnt, gp_Trsf, gp_Vec
from OCP.GProp import GProp_GProps
from OCP.TopAbs import TopAbs_SOLID
from OCP.TopExp import TopExp_Explorer
from OCP.TopoDS import TopoDS, TopoDS_Shape
from OCP.TopTools import TopTools_ListOfShape

from .. import defaults
from ..errors import GeometryError
from .loft import bspline_surface, volume_mm3


def _P(v):
    return gp_Pnt(*map(float, v))


def _D(v):
    return gp_Dir(*map(float, v))


def prepared(solid, what: str):
    """The solid with its faces divided where they are only C0 (the skin's creases: the
    centreline of a mirrored part, stations of a linear one). Booleans whose intersection
    curves cross such a crease were seen to fail here, invalid or silently removing nothing;
    on the divided solid the same cuts succeed. The geometry is unchanged."""
    from OCP.GeomAbs import GeomAbs_C1
    from OCP.ShapeUpgrade import ShapeUpgrade_ShapeDivideContinuity

    div = ShapeUpgrade_ShapeDivideContinuity(solid)
    div.SetBoundaryCriterion(GeomAbs_C1)
    div.SetPCurveCriterion(GeomAbs_C1)
    div.SetSurfaceCriterion(GeomAbs_C1)
    div.Perform()
    return checked(div.Result(), what)[0]


def make_tool(tool, turn: float = 0.0) -> TopoDS_Shape:
    """OCP solid of a :class:`geomgen.parts.frame.Tool`; ``turn`` (deg) rotates the seam of a
    cylinder or cone about its axis (the solid is the same)."""
    if tool.kind in ("cylinder", "cone"):
        a = np.asarray(tool.axis, float)
        ref = np.array([1.0, 0.0, 0.0]) if abs(a[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
        x = ref - (ref @ a) * a
        x /= np.linalg.norm(x)
        t = np.radians(turn)
        x = np.cos(t) * x + np.sin(t) * np.cross(a, x)
        ax = gp_Ax2(_P(tool.origin), _D(a), _D(x))
        if tool.kind == "cylinder":
            return BRepPrimAPI_MakeCylinder(ax, float(tool.radius), float(tool.length)).Shape()
        return BRepPrimAPI_MakeCone(ax, float(tool.radius), float(tool.radius2), float(tool.length)).Shape()
    if tool.kind == "box":
        ax = gp_Ax2(_P(tool.origin), _D(tool.axis), _D(tool.xdir))
        return BRepPrimAPI_MakeBox(ax, float(tool.size[0]), float(tool.size[1]), float(tool.length)).Shape()
    raise ValueError(f"unknown tool kind {tool.kind}")


#: Seam turns tried in order when a boolean comes out invalid: the kernel was seen to make an
#: unorientable hole wall for one seam position and a valid one for another (same solid).
SEAM_TURNS = (0.0, 90.0, 180.0, 37.0, 253.0)


def solids(shape) -> list:
    out = []
    exp = TopExp_Explorer(shape, TopAbs_SOLID)
    while exp.More():
        out.append(TopoDS.Solid_s(exp.Current()))
        exp.Next()
    return out


def _lists(args, tools):
    la, lt = TopTools_ListOfShape(), TopTools_ListOfShape()
    for s in args:
        la.Append(s)
    for s in tools:
        lt.Append(s)
    return la, lt


def _run(op, args, tools, what: str):
    la, lt = _lists(args, tools)
    op.SetArguments(la)
    op.SetTools(lt)
    op.SetRunParallel(True)
    op.Build()
    if not op.IsDone():
        raise GeometryError(f"{what}: the kernel's boolean operation failed; nothing was written")
    return op.Shape()


def valid(shape) -> list[str]:
    """Problems with a solid (empty = fine): the kernel's shape check and a positive volume.
    The sign needs no accuracy, so the volume here is the kernel's quick default integral."""
    from OCP.BRepCheck import BRepCheck_Analyzer

    out = []
    if not BRepCheck_Analyzer(shape).IsValid():
        out.append("the kernel's shape check fails")
    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props)
    if props.Mass() <= 0:
        out.append("the volume is not positive (inside out or open)")
    return out


def checked(shape, what: str, count: int | None = 1) -> list:
    """The solids of ``shape``, each checked; refuse a wrong count or an invalid solid."""
    out = solids(shape)
    if count is not None and len(out) != count:
        raise GeometryError(f"{what}: expected {count} solid(s), the kernel gave {len(out)}; nothing was written")
    for s in out:
        problems = valid(s)
        if problems:
            raise GeometryError(f"{what}: the result is invalid ({'; '.join(problems)}); nothing was written")
    return out


def fuse(shapes, what: str):
    """Union of shapes (a single shape if only one)."""
    shapes = list(shapes)
    if len(shapes) == 1:
        return shapes[0]
    return _run(BRepAlgoAPI_Fuse(), shapes[:1], shapes[1:], what)


def state(solid, point) -> str:
    """'in', 'out' or 'on': where ``point`` lies with respect to ``solid``."""
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier
    from OCP.TopAbs import TopAbs_IN, TopAbs_OUT

    st = BRepClass3d_SolidClassifier(solid, _P(point), defaults.KERNEL_CLASSIFIER_TOL_MM).State()
    return "in" if st == TopAbs_IN else "out" if st == TopAbs_OUT else "on"


def features_of(tools) -> list[tuple[str, list]]:
    """Tools grouped into features by label, in order of first appearance."""
    groups: dict[str, list] = {}
    for t in tools:
        groups.setdefault(t.label, []).append(t)
    return list(groups.items())


def cut_features(shape, tools, what: str, probes=None) -> tuple[object, float, float, float]:
    """``shape`` less each feature in turn (tools grouped by label), every step checked.

    Each step must give one valid solid, and a feature's probe points that were inside before
    must be outside after (a boolean that silently removes nothing is refused). The material
    removed is computed apart, as the common of the shape and each feature, and must account
    for the change of volume. A step that fails is retried with the tools' seams turned (the
    kernel was seen to fail for one seam position and succeed for another). The volume balance
    is checked once at the end; if it fails, the steps are redone with the balance checked at
    each, to find and retry the faulty one. Returns (solid, removed mm³, volume before, after).

    ``probes``: tool -> list of points (default: the tool's own probe)."""
    v0 = volume_mm3(shape)
    def tol(v, rem):
        return defaults.BOOLEAN_VOLUME_REL * v + defaults.BOOLEAN_REMOVED_REL * rem
    try:
        cur, removed, _ = _cut_steps(shape, v0, tools, what, probes, each=False)
        v1 = volume_mm3(cur)
        if abs(v0 - v1 - removed) <= tol(v0, removed):
            return cur, removed, v0, v1
    except GeometryError:
        pass
    cur, removed, v1 = _cut_steps(shape, v0, tools, what, probes, each=True)
    return cur, removed, v0, v1


def _cut_steps(shape, v0, tools, what, probes, each: bool):
    cur, v_cur, removed = shape, v0, 0.0
    for label, group in features_of(tools):
        pts = [p for t in group for p in (probes(t) if probes else ([t.probe] if t.probe is not None else []))]
        pts = [p for p in pts if state(cur, p) == "in"]
        err: GeometryError | None = None
        for turn in SEAM_TURNS:
            try:
                tool = fuse([make_tool(t, turn) for t in group], f"{what}: {label}")
                res = checked(_run(BRepAlgoAPI_Cut(), [cur], [tool], f"{what}: {label}"), f"{what}: {label}")[0]
                if any(state(res, p) == "in" for p in pts):
                    raise GeometryError(f"{what}: {label}: the kernel's cut left the feature's material in place; "
                                        "nothing was written")
                rem = sum(volume_mm3(x) for x in solids(_run(BRepAlgoAPI_Common(), [cur], [tool], f"{what}: {label}")))
                v_res = volume_mm3(res) if each else None
                if each and abs(v_cur - v_res - rem) > (defaults.BOOLEAN_VOLUME_REL * v_cur
                                                        + defaults.BOOLEAN_REMOVED_REL * rem):
                    raise GeometryError(f"{what}: {label}: the cut part and the removed material ({rem:.1f} mm³) do "
                                        f"not add up ({v_cur - v_res:.1f} mm³ left the part); nothing was written")
                break
            except GeometryError as exc:
                err, res = exc, None
        if res is None:
            assert err is not None  # every seam turn failed
            raise err
        cur, v_cur, removed = res, v_res, removed + rem
    return cur, removed, v_cur


def cut(shape, tools, what: str):
    """``shape`` less ``tools`` (Tool objects) feature by feature, checked (see cut_features)."""
    return cut_features(shape, tools, what)[0] if tools else shape


def subtract(shape, other, what: str):
    """``shape`` less the solid ``other`` (one valid solid expected)."""
    return checked(_run(BRepAlgoAPI_Cut(), [shape], [other], what), what)[0]


def loose_bbox(shape) -> tuple[np.ndarray, np.ndarray]:
    """The box a CAD program shows by default: from the faces' surfaces and control nets,
    not optimised to the trimmed faces."""
    b = Bnd_Box()
    BRepBndLib.Add_s(shape, b, False)
    x0, y0, z0, x1, y1, z1 = b.Get()
    return np.array([x0, y0, z0]), np.array([x1, y1, z1])


def common(shape, tool, what: str):
    return checked(_run(BRepAlgoAPI_Common(), [shape], [tool], what), what, count=None)


def split(shape, faces, what: str) -> list:
    """Solids of ``shape`` split by ``faces``, each checked."""
    la, lt = _lists([shape], faces)
    sp = BRepAlgoAPI_Splitter()
    sp.SetArguments(la)
    sp.SetTools(lt)
    sp.SetRunParallel(True)
    sp.Build()
    if not sp.IsDone():
        raise GeometryError(f"{what}: the kernel's split failed; nothing was written")
    return checked(sp.Shape(), what, count=None)


def plane_face(origin, normal, xdir, half: float):
    """Square planar face of half-size ``half`` centred at ``origin``."""
    pln = gp_Pln(gp_Ax3(_P(origin), _D(normal), _D(xdir)))
    return BRepBuilderAPI_MakeFace(pln, -half, half, -half, half).Face()


def skin_face(skin):
    surface = bspline_surface(skin.poles, skin.tu, skin.tv, skin.du, skin.dv)
    return BRepBuilderAPI_MakeFace(surface, defaults.KERNEL_FACE_TOL_MM).Face()


def prism(polygon, vec):
    """Solid swept from a planar closed polygon (k, 3) along ``vec``."""
    mk = BRepBuilderAPI_MakePolygon()
    for p in polygon:
        mk.Add(_P(p))
    mk.Close()
    face = BRepBuilderAPI_MakeFace(mk.Wire(), True).Face()
    return BRepPrimAPI_MakePrism(face, gp_Vec(*map(float, vec))).Shape()


def transformed(shape, A: np.ndarray, t, what: str):
    """``shape`` moved by p -> A p + t, A a rotation times a positive scale; checked."""
    A = np.asarray(A, float)
    s = float(np.cbrt(np.linalg.det(A)))
    Rm = A / s
    tr = gp_Trsf()
    tr.SetValues(*Rm[0], 0.0, *Rm[1], 0.0, *Rm[2], 0.0)
    out = BRepBuilderAPI_Transform(shape, tr, True).Shape()
    if abs(s - 1.0) > 1e-12:
        sc = gp_Trsf()
        sc.SetScale(gp_Pnt(0, 0, 0), s)
        out = BRepBuilderAPI_Transform(out, sc, True).Shape()
    mv = gp_Trsf()
    mv.SetTranslation(gp_Vec(*map(float, t)))
    out = BRepBuilderAPI_Transform(out, mv, True).Shape()
    return checked(out, what)[0] if len(solids(shape)) == 1 else out


def bbox(shape) -> tuple[np.ndarray, np.ndarray]:
    b = Bnd_Box()
    BRepBndLib.AddOptimal_s(shape, b, False, False)
    x0, y0, z0, x1, y1, z1 = b.Get()
    return np.array([x0, y0, z0]), np.array([x1, y1, z1])


def centroid(shape) -> np.ndarray:
    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape, props, defaults.GPROP_EPS, True)
    c = props.CentreOfMass()
    return np.array([c.X(), c.Y(), c.Z()])


def sub_skin(skin, v0: float, v1: float):
    """The part of a skin between span parameters v0 < v1, exactly (knots inserted to full
    multiplicity by the kernel's segmenting), as a numpy Skin: a piece of the part with natural
    boundaries, so no kernel split and no trimmed faces are needed to cut it out."""
    from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeFace as _MF

    from .measure import skin_of

    srf = bspline_surface(skin.poles, skin.tu, skin.tv, skin.du, skin.dv)
    u0, u1 = float(skin.tu[0]), float(skin.tu[-1])
    srf.Segment(u0, u1, float(v0), float(v1))
    return skin_of(_MF(srf, defaults.KERNEL_FACE_TOL_MM).Face())
