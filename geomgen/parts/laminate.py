"""Cores (the part offset inward by the laminate) and two-half moulds with an optional flange."""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..cad.loft import solid_from_skin, volume_mm3
from ..cad.ops import (
    bbox,
    centroid,
    cut_features,
    loose_bbox,
    make_tool,
    plane_face,
    prepared,
    skin_face,
    split,
    subtract,
    transformed,
)
from ..errors import GeometryError
from ..geometry.tessellate import tessellate
from ..sections.base import Section
from .core import plan_core
from .frame import Tool
from .mould import parting_skin, root_frame
from .output import shop_output
from .undercut import undercut_words, undercuts


def _matrix(B, t) -> list[list[float]]:
    return np.vstack([np.column_stack([B, t]), [0, 0, 0, 1]]).tolist()


def laminate_outputs(model, solid, name_of, say) -> tuple[list, dict]:
    lam = model.spec.laminate
    name = model.name
    skin = model.skin
    rf = root_frame(model, skin)
    machine = lam.pose == "machine"
    pose = {h: (rf.pose(h) if machine else (np.eye(3), np.zeros(3))) for h in ("upper", "lower")}
    outs: list = []
    rep: dict = {"thickness": lam.thickness, "pose": lam.pose}
    if lam.core:
        what = f'surface "{name}" laminate core'
        say(f"offsetting the core of {name}")
        cp = plan_core(model, skin, lam.thickness, lam.core_min_thickness)
        core = solid_from_skin(cp.skin, te_open=True, name=what)
        B, t = pose["upper"]
        core_p = transformed(core, B, t, what)
        v0 = np.concatenate([seg for seg in model.loft_y()])
        v0 = v0[(v0 >= cp.span[0]) & (v0 <= cp.span[1])]
        v0 = np.unique(np.concatenate([v0, cp.span]))
        verts, faces = tessellate(cp.skin, True, Section.loop_parameter(10), v0, defaults.STL_LINEAR_TOL_MM)
        verts = verts @ B.T + t
        st = cp.stations
        rep["core"] = {"span": list(cp.span), "volume_mm3": volume_mm3(core), "datum_to_file": _matrix(B, t),
                       "min_thickness": lam.core_min_thickness,
                       "chord_from": [min(x["core_from"] for x in st), max(x["core_from"] for x in st)],
                       "chord_to": [min(x["core_to"] for x in st), max(x["core_to"] for x in st)],
                       "laminate_min_mm": min(x["laminate_min_mm"] for x in st),
                       "files": [name_of("core", suffix=".step"), name_of("core", suffix=".stl")]}
        outs += [shop_output(name_of("core", suffix=".step"), "step", [(f"{name}-core", core_p)]),
                 shop_output(name_of("core", suffix=".stl"), "stl", meshes=[("core", verts, faces)])]
    if lam.mould:
        outs += _moulds(model, solid, skin, rf, lam, machine, name_of, say, rep)
    return outs, rep


def _moulds(model, solid, skin, rf, lam, machine, name_of, say, rep) -> list:
    """Two-part female mould: per half a stock block on its side of the parting surface less
    the part, with registration dowel holes and bolt holes through the flange; each half in
    its machining pose (parting face up, cavity open to the tool)."""
    name = model.name
    what = f'surface "{name}" laminate mould'
    say(f"cutting the mould halves of {name}")
    B, t = rf.pose("upper")  # upper pose: machine Z along the part's upper normal
    v0, v1 = skin.v_range
    pts = skin.evaluate(np.linspace(0, 1, 81), np.linspace(v0, v1, 61)).reshape(-1, 3) @ B.T + t
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    # the parting surface reaches just past the block (its control net too: a CAD program's
    # default bounding box is then the block's): each chord line to 2 mm beyond the block's
    # fore and aft faces, the ends 2 mm beyond its span faces
    pskin = (parting_skin(model, skin, lam.flange + 2.0, (lo[1] - lam.flange - 2.0, hi[1] + lam.flange + 2.0), rf)
             if lam.parting == "stations" else None)
    # the root-chord plane, centred on the root leading edge, reaches past every block face
    half = float(np.ptp(pts, axis=0).max()) + lam.flange + 2.0
    face = skin_face(pskin) if pskin is not None else plane_face(rf.le, rf.normal, rf.chord, half)
    part = prepared(solid, what)
    halves = split(part, [face], what)
    if len(halves) != 2:
        hint = "; try parting = \"stations\"" if lam.parting == "root-chord" else ""
        raise GeometryError(f"{what}: the parting surface splits the part into {len(halves)} pieces, not an "
                            f"upper and a lower half{hint}; nothing was written")
    halves.sort(key=lambda sh: -float(centroid(sh) @ rf.normal))
    v = volume_mm3(solid)
    vh = [volume_mm3(h) for h in halves]
    if abs(sum(vh) - v) > defaults.SHOP_VOLUME_BALANCE_REL * v:
        raise GeometryError(f"{what}: the halves ({sum(vh):.0f} mm³) do not add up to the part ({v:.0f} mm³); "
                            "nothing was written")
    x0, y0 = lo[0] - lam.flange, lo[1] - lam.flange
    x1, y1 = hi[0] + lam.flange, hi[1] + lam.flange
    z0, z1 = lo[2] - lam.flange_thickness, hi[2] + lam.flange_thickness
    box = Tool("box", B.T @ (np.array([x0, y0, z0]) - t), B[2], z1 - z0, xdir=B[0], size=(x1 - x0, y1 - y0))
    blocks = split(make_tool(box), [face], f"{what} stock")
    if len(blocks) != 2:
        raise GeometryError(f"{what}: the parting surface does not divide the stock block ({len(blocks)} pieces); "
                            "nothing was written")
    blocks.sort(key=lambda sh: -float(centroid(sh) @ rf.normal))
    blk = (x0, y0, z0, x1, y1, z1)
    creases = sorted({float((B @ (rf.le + y * rf.span) + t)[0]) for y in model.loft_breaks()})
    holes = _mould_holes(lam, blk, creases)
    hole_rec = [{"kind": k, "diameter": d, "machine_xy_upper_pose": [float(x), float(y)],
                 "datum": (B.T @ (np.array([x, y, 0.0]) - t)).tolist()} for x, y, d, k in holes]
    found = undercuts(model, skin, rf, lam.parting)
    rep["mould"] = {"parting": lam.parting, "volume_part_mm3": v, "halves": [], "undercut": found,
                    "notes": undercut_words(name, lam.parting, found), "holes": hole_rec,
                    "flange": {"width": lam.flange, "thickness": lam.flange_thickness}}
    outs = []
    for k, half in enumerate(("upper", "lower")):
        hw = f"{what} {half}"
        block = blocks[k]
        vb = volume_mm3(block)
        mould = subtract(block, part, hw)
        vm = volume_mm3(mould)
        if abs(vb - vm - vh[k]) > defaults.SHOP_VOLUME_BALANCE_REL * vb:
            raise GeometryError(f"{hw}: the block ({vb:.0f} mm³) less the cavity ({vb - vm:.0f} mm³) does not match "
                                f"the part's {half} half ({vh[k]:.0f} mm³); nothing was written")
        if holes:
            mould = cut_features(mould, _hole_tools(holes, B, t, blk, half), hw)[0]
        Bp, tp = rf.pose("lower" if half == "upper" else "upper") if machine else (np.eye(3), np.zeros(3))
        posed = transformed(mould, Bp, tp, hw)
        blo, bhi = bbox(posed)
        llo, lhi = loose_bbox(posed)
        fname = name_of("mould", half, suffix=".step")
        outs.append(shop_output(fname, "step", [(f"{name}-mould-{half}", posed)]))
        rep["mould"]["halves"].append({"half": half, "volume_mm3": vh[k], "cavity_mm3": vb - vm,
                                       "stock_mm3": vb, "volume_written_mm3": volume_mm3(posed),
                                       "stock_size_mm": (bhi - blo).tolist(), "bbox_mm": [blo.tolist(), bhi.tolist()],
                                       "loose_bbox_mm": [llo.tolist(), lhi.tolist()],
                                       "datum_to_file": _matrix(Bp, tp), "file": fname})
    return outs


def _mould_holes(lam, block, creases) -> list[tuple[float, float, float, str]]:
    """Registration dowel holes near the four corners and bolt holes along the two long sides,
    in the middle of the flange band (x, y in the upper machine pose, diameter, kind). Bolt
    holes keep clear of the parting surface's creases (machine x ``creases``): a hole centred
    on one was seen to be silently left out by the kernel's cut."""
    x0, y0, z0, x1, y1, z1 = block
    if lam.flange < 2.0 * max(lam.pin_diameter, lam.bolt_diameter):
        return []
    w = 0.5 * lam.flange
    out = [(x, y, lam.pin_diameter, "dowel") for x, y in ((x0 + w, y0 + w), (x1 - w, y0 + w), (x1 - w, y1 - w),
                                                          (x0 + w, y1 - w))]
    long_x = (x1 - x0) >= (y1 - y0)
    a, b = ((x0 + w, x1 - w) if long_x else (y0 + w, y1 - w))
    n = max(2, int(np.ceil((b - a) / lam.bolt_spacing)) + 1)
    ts = np.linspace(a, b, n + 1)
    for m in 0.5 * (ts[:-1] + ts[1:]):  # between the dowels, clear of them
        if long_x:
            near = [c for c in creases if abs(m - c) < 1.5 * lam.bolt_diameter]
            if near:
                m = near[0] + 1.5 * lam.bolt_diameter
            out += [(m, y0 + w, lam.bolt_diameter, "bolt"), (m, y1 - w, lam.bolt_diameter, "bolt")]
        else:
            out += [(x0 + w, m, lam.bolt_diameter, "bolt"), (x1 - w, m, lam.bolt_diameter, "bolt")]
    return out


def _hole_tools(holes, B, t, block, half) -> list:
    """Through holes along machine Z (datum tools), each with a probe in this half's flange."""
    x0, y0, z0, x1, y1, z1 = block
    zp = z1 - 1.0 if half == "upper" else z0 + 1.0
    def to_datum(p):
        return B.T @ (np.asarray(p, float) - t)
    return [Tool("cylinder", to_datum([x, y, z0 - 1.0]), B[2], z1 - z0 + 2.0, radius=0.5 * d,
                 label=f"mould {kind} hole at {x:.0f}, {y:.0f}", probe=to_datum([x, y, zp])) for x, y, d, kind in holes]
