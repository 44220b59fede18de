"""Printable pieces: each piece meshed watertight straight from the part's skin between its
joints (:mod:`.skinmesh`, within the mesh tolerance, measured); its features are then cut
from that mesh with mesh booleans (:mod:`.meshcut`), and it is laid on the bed in a pose that
prints (:mod:`.pose`). A joint test slice across one joint is cut from the pieces the same way.

Checks: each bare piece's mesh lies within its chordal tolerance of the exact solid (volume
difference at most tolerance x area), the pieces together make the part, and each feature's
removed material (the common, computed apart) accounts for the change of the piece's volume.
"""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..cad.mesh import closed
from ..errors import GeometryError
from ..geometry.slices import skin_volume_centroid
from .frame import Frame, rotations24
from .meshcut import cut_features, from_arrays, slab, to_arrays
from .mount import plan_mount
from .output import shop_output
from .pose import choose
from .printing import plan_printing, printing_model
from .skinmesh import piece_mesh

#: A printed edge thinner than this is one line of a common nozzle or less (common practice,
#: no source); the summary says so.
THIN_PRINTED_EDGE_MM = 0.4
#: a round hole narrower than this many extrusion widths comes out undersized or closed
#: (common practice, no source)
MIN_HOLE_LINES = 3.0
#: a wall or edge thinner than this many extrusion widths prints as a gap or a single
#: wobbly line (common practice, no source)
MIN_WALL_LINES = 2.0


def _groups(tools):
    groups: dict[str, list] = {}
    for t in tools:
        groups.setdefault(t.label, []).append(t)
    return list(groups.items())


def _usable(ps):
    return None if ps.build_volume is None else np.asarray(ps.usable_volume, float)


def _face_name(R, pc, plan, F, pm) -> str:
    """What the pose (printed = R @ scaled local) puts on the bed, in words."""
    down = R.T @ np.array([0.0, 0.0, -1.0])  # the local direction that points down
    down /= np.linalg.norm(down)
    a, b = pc.span
    if abs(down[1]) > 0.999:
        y = b if down[1] > 0 else a
        if y in plan.bounds[1:-1]:
            return f"joint face (span {y:.1f} mm) on the bed"
        return f"{'root' if not pm.mirror and y == plan.bounds[0] else 'tip'} face (span {y:.1f} mm) on the bed"
    ddown = F.R @ down
    if abs(abs(ddown[2]) - 1) < 1e-6 and pm.spec.mount is not None and pm.spec.printing.mount:
        return "mounting pad on the bed"
    return "flat face on the bed"


def print_outputs(model, name_of, say) -> tuple[list, dict]:
    ps = model.spec.printing
    name = model.name
    what = f'surface "{name}" printing'
    pm, problems = printing_model(model, ps)
    mount_tools, holes = [], []
    if ps.mount and model.spec.mount is not None:
        mp = plan_mount(pm, model.spec.mount)
        problems += mp.problems
        mount_tools = mp.tools
        holes = [(h["x"], h["y"], max(0.5 * h["diameter"], 0.5 * h.get("insert_diameter", 0),
                                      0.5 * h.get("counterbore_diameter", 0), 0.5 * h.get("countersink_diameter", 0)))
                 for h in mp.report["holes"]]
    if problems:
        raise GeometryError("; ".join(problems) + "; nothing was written")
    plan = plan_printing(pm, ps, mount_tools, holes)
    if plan.problems:
        raise GeometryError("; ".join(plan.problems) + "; nothing was written")
    s = plan.scale
    tol = ps.mesh_tol / s  # design mm
    F = Frame.of(pm)
    say(f"cutting the printed pieces of {name}")
    te_open = pm.te_open
    v_whole, a_whole = skin_volume_centroid(pm.skin)[0], pm.skin.area()  # exact integrals of the skin
    made, removed, v_bare = [], 0.0, 0.0
    for pc in plan.pieces:
        a, b = pc.span
        pw = f"{what} piece {pc.index + 1}"
        v, f = piece_mesh(pm.skin, a, b, tol, te_open, F.span_axis, pw)
        mf = from_arrays(v, f, pw)
        v_bare += mf.volume()
        tl = [t for t in plan.tools if _overlaps(t, F, a, b)]
        need = {t.label for t in tl if _probes(t, F, a, b)}
        mf, rem, _ = cut_features(mf, _groups(tl), pw, tol, lambda label: label in need)
        if len(mf.decompose()) != 1:
            raise GeometryError(f"{pw}: the features cut the piece into {len(mf.decompose())} parts; "
                                "nothing was written")
        made.append(mf)
        removed += rem
    err = abs(v_bare - v_whole)
    if err > tol * a_whole:
        raise GeometryError(f"{what}: the meshed pieces ({v_bare:.0f} mm³) differ from the part ({v_whole:.0f} mm³) by "
                            f"more than the mesh tolerance allows ({tol * a_whole:.0f} mm³); nothing was written")
    usable = _usable(ps)
    fall = rotations24()
    flat = [(0.0, 1.0, 0.0), (0.0, -1.0, 0.0)]  # joint and end faces (local span direction)
    if ps.mount and pm.spec.mount is not None:  # the pad: its outward normal is datum +z on the upper side
        flat.append(F.R.T @ np.array([0.0, 0.0, 1.0 if pm.spec.mount.side == "upper" else -1.0]))
    outs, pieces, notes = [], [], []
    n = len(made)
    A_local = s * F.R.T  # datum -> printed, before the pose's turn
    for pc, mf in zip(plan.pieces, made):
        tag = f"piece{pc.index + 1}of{n}"
        say(f"posing {name} {tag}")
        vd, fd = to_arrays(mf, defaults.MESH_SHORT_EDGE_MM)
        vl = (vd - F.position) @ A_local.T
        po = choose(vl, fd, usable, fall, flat)
        vp = vl @ po.R.T + po.t
        _check_mesh(vp, fd, f"{what} {tag}")
        A, t = po.R @ A_local, po.t - po.R @ A_local @ F.position
        files = [name_of(tag, suffix=sfx) for sfx in (".stl", ".3mf")]
        outs += [shop_output(files[0], "stl", meshes=[(tag, vp, fd)]),
                 shop_output(files[1], "3mf", meshes=[(f"{name}-{tag}", vp, fd)])]
        face = _face_name(po.R, pc, plan, F, pm) if po.face == "flat face" else po.face
        rec = {"index": pc.index + 1, "span": list(pc.span), "pose": face, "fits": po.fits,
               "size_printed_mm": po.size.tolist(), "volume_design_mm3": mf.volume(),
               "volume_printed_mm3": mf.volume() * s**3, "bed_contact_mm2": po.contact_mm2,
               "overhang_mm2": po.overhang_mm2, "overhang_fraction": po.overhang_mm2 / po.area_mm2,
               "needs_support": po.needs_support, "datum_to_print": _matrix(A, t), "files": files}
        pieces.append(rec)
        if po.fits is False:
            raise GeometryError(f"{what} {tag}: {' x '.join(f'{v:.1f}' for v in po.size)} mm in its pose does not fit "
                                f"the build volume less bed_margin ({' x '.join(f'{v:g}' for v in usable)} mm); "
                                "nothing was written")
        if po.needs_support:
            notes.append(f"piece {pc.index + 1} needs support: {po.overhang_mm2:.0f} mm² "
                         f"({100 * po.overhang_mm2 / po.area_mm2:.0f} % of its surface) overhangs more than 45°"
                         + ("" if po.contact_mm2 > 0 else ", and no flat face lies on the bed"))
    notes += nozzle_notes(plan, ps)
    rep = {"notes": notes, "scale": s, "te_thickness_mm": plan.te_mm, "te_printed_mm": plan.te_mm * s,
           "split": plan.split_how, "joints": plan.joints, "spars": plan.spars, "pieces": pieces,
           "volume_whole_mm3": v_whole, "volume_removed_mm3": removed, "volume_bare_mesh_mm3": v_bare,
           "volume_pieces_mm3": sum(p["volume_design_mm3"] for p in pieces), "balance_error_rel": err / v_whole,
           "build_volume": list(ps.build_volume) if ps.build_volume else None, "bed_margin": ps.bed_margin,
           "usable_volume": None if usable is None else usable.tolist(), "nozzle": ps.nozzle, "mesh_tol": ps.mesh_tol}
    if ps.joint_test and plan.joints:
        outs += _joint_test(pm, plan, made, F, name_of, what, rep, usable)
    return outs, rep


def nozzle_notes(plan, ps) -> list[str]:
    """Warnings about features the nozzle cannot make (printed mm)."""
    w = ps.line_width
    out = []
    te = plan.te_mm * plan.scale
    if te < MIN_WALL_LINES * w:
        out.append(f"the printed trailing edge is {te:.2f} mm, thinner than two extrusion widths "
                   f"({MIN_WALL_LINES * w:.2f} mm at a {ps.nozzle:g} mm nozzle): it prints ragged or not at all; "
                   "set printing.min_te to thicken it")
    for j in plan.joints:
        d = j["hole_diameter"]
        if d < MIN_HOLE_LINES * w:
            out.append(f"locator holes at span {j['y']:g} mm are Ø{d:.2f} mm, under three extrusion widths "
                       f"({MIN_HOLE_LINES * w:.2f} mm): they print undersized or closed; drill them out or use a "
                       "larger pin")
        wall = min(j["round"]["wall_printed_mm"], j["slot"]["wall_printed_mm"])
        if wall < MIN_WALL_LINES * w:
            out.append(f"locator walls at span {j['y']:g} mm are {wall:.2f} mm, under two extrusion widths "
                       f"({MIN_WALL_LINES * w:.2f} mm): the slicer may leave them out")
    for sp in plan.spars:
        if sp["channel_diameter"] < MIN_HOLE_LINES * w:
            out.append(f"the Ø{sp['channel_diameter']:g} mm spar channel is under three extrusion widths "
                       f"({MIN_HOLE_LINES * w:.2f} mm): it prints undersized or closed")
        if sp["wall_printed_mm"] < MIN_WALL_LINES * w:
            out.append(f"the spar channel leaves {sp['wall_printed_mm']:.2f} mm of wall at span "
                       f"{sp['wall_at_y']:.1f} mm, under two extrusion widths ({MIN_WALL_LINES * w:.2f} mm)")
    return out


def _check_mesh(v, f, what):
    if not closed(f):
        raise GeometryError(f"{what}: the cut mesh is not closed; nothing was written")
    if len(np.unique(v.astype(np.float32), axis=0)) != len(v):
        raise GeometryError(f"{what}: two mesh vertices coincide in single precision (STL); nothing was written")


def _overlaps(tool, F, a: float, b: float) -> bool:
    """True if the tool reaches into the span interval [a, b] (local Y), with a small margin."""
    if tool.kind == "box":
        c = np.array([tool.origin + i * tool.size[0] * tool.xdir + j * tool.size[1] * np.cross(tool.axis, tool.xdir)
                      + k * tool.length * tool.axis for i in (0, 1) for j in (0, 1) for k in (0, 1)])
        r = 0.0
    else:
        c = np.array([tool.origin, tool.origin + tool.length * tool.axis])
        r = max(tool.radius, tool.radius2)
    y = F.to_local(c)[:, 1]
    return y.min() - r < b + 1e-6 and y.max() + r > a - 1e-6


def _probes(tool, F, a: float, b: float) -> list:
    """Points inside the part between spans a and b that ``tool`` must remove: its own probe if
    it lies there, else for a tool along the span (rod channel, locator) the point on its axis
    in the middle of its stretch within [a, b]."""
    if tool.probe is not None:
        return [tool.probe] if a < F.to_local(tool.probe)[1] < b else []
    if tool.kind != "cylinder" or abs(tool.axis @ F.span_axis) < 0.5:
        return []
    ya, yb = F.to_local(tool.origin)[1], F.to_local(tool.origin + tool.length * tool.axis)[1]
    lo, hi = max(min(ya, yb), a), min(max(ya, yb), b)
    if hi - lo < 1e-3:
        return []
    s = (0.5 * (lo + hi) - ya) / (yb - ya)
    return [tool.origin + s * tool.length * tool.axis]


def _matrix(A, t) -> list[list[float]]:
    return np.vstack([np.column_stack([A, t]), [0, 0, 0, 1]]).tolist()


def _joint_test(pm, plan, made, F, name_of, what, rep, usable) -> list:
    """A slice across the innermost joint: its two halves, each on a flat face, side by side."""
    ps = pm.spec.printing
    s = plan.scale
    j = min(plan.joints, key=lambda jt: abs(jt["y"]))
    yj = j["y"]
    w = (0.5 * ps.locators.pin_length + 0.5 + 3.0) / s
    i = plan.bounds.index(yj)
    a, b = max(yj - w, plan.bounds[i - 1]), min(yj + w, plan.bounds[i + 1])
    tw = f"{what} joint test"
    A_local = s * F.R.T
    halves = []
    for mf, (p, q) in ((made[i - 1], (a, yj + 1.0)), (made[i], (yj - 1.0, b))):  # past the joint face
        vd = to_arrays(mf)[0]
        loc = F.to_local(vd)
        X0, X1 = loc[:, 0].min() - 5.0, loc[:, 0].max() + 5.0
        Z0, Z1 = loc[:, 2].min() - 5.0, loc[:, 2].max() + 5.0
        got = slab(mf, F.to_datum([X0, p, Z1]), F.span_axis, F.R[:, 0], (X1 - X0, Z1 - Z0), q - p)
        if len(got.decompose()) != 1:
            raise GeometryError(f"{tw}: the slice came out as {len(got.decompose())} solids; nothing was written")
        vd, fd = to_arrays(got, defaults.MESH_SHORT_EDGE_MM)
        vl = (vd - F.position) @ A_local.T
        po = choose(vl, fd, usable)
        halves.append((vl @ po.R.T + po.t, fd))
    gap = 10.0
    sizes = [np.ptp(v, axis=0) for v, _ in halves]
    placed = None
    for ax in (0, 1):
        total = sizes[0][ax] + gap + sizes[1][ax]
        other = max(sizes[0][1 - ax], sizes[1][1 - ax])
        if usable is None or (total <= usable[ax] + 1e-6 and other <= usable[1 - ax] + 1e-6):
            d0, d1 = np.zeros(3), np.zeros(3)  # halves side by side along ``ax``, centred together
            d0[ax] = -halves[0][0][:, ax].max() - 0.5 * gap
            d1[ax] = -halves[1][0][:, ax].min() + 0.5 * gap
            placed = [(halves[0][0] + d0, halves[0][1]), (halves[1][0] + d1, halves[1][1])]
            allv = np.concatenate([v for v, _ in placed])
            mid = 0.5 * (allv.min(axis=0) + allv.max(axis=0))
            mid[2] = 0.0
            placed = [(v - mid, f) for v, f in placed]
            break
    if placed is None:
        raise GeometryError(f"{tw}: its two halves ({' x '.join(f'{v:.1f}' for v in sizes[0][:2])} and "
                            f"{' x '.join(f'{v:.1f}' for v in sizes[1][:2])} mm) do not fit side by side in the build "
                            f"volume less bed_margin ({' x '.join(f'{v:g}' for v in usable[:2])} mm); set "
                            "printing.joint_test = false or a smaller bed_margin; nothing was written")
    meshes = []
    for k, (v, f) in enumerate(placed):
        _check_mesh(v, f, tw)
        meshes.append((f"{pm.name}-joint-test-{'ab'[k]}", v, f))
    allv = np.concatenate([v for v, _ in placed])
    files = [name_of("joint-test", suffix=sfx) for sfx in (".stl", ".3mf")]
    rep["joint_test"] = {"y": yj, "span": [a, b], "files": files, "size_printed_mm": np.ptp(allv, axis=0).tolist()}
    return [shop_output(files[0], "stl", meshes=meshes), shop_output(files[1], "3mf", meshes=meshes)]
