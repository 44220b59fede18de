"""Printable pieces: each piece lofted from the part's skin between its joints (the skin cut
exactly at the joint spans, so no kernel split and no trimmed skin), its features cut feature
by feature, posed on the print bed (scaled) and meshed; a joint test slice across one joint.

Check: the pieces' volumes plus the material the features removed (computed apart, as
commons) must give the volume of the whole part, lofted in one piece, within 0.1 %."""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..errors import GeometryError
from .frame import Frame, Tool
from .mount import plan_mount
from .printing import choose_pose, plan_printing, printing_model
from ..cad.loft import solid_from_skin, volume_mm3
from ..cad.ops import bbox, common, cut_features, make_tool, prepared, sub_skin, transformed
from ..cad.mesh import mesh
from .output import shop_output


#: A printed edge thinner than this is one line of a common nozzle or less (common practice,
#: no source); the summary says so.
THIN_PRINTED_EDGE_MM = 0.4


def _posed(shape, A, t, what):
    """``shape`` moved by p -> A p + t, then shifted so it sits on z = 0 centred on x, y = 0."""
    s1 = transformed(shape, A, t, what)
    lo, hi = bbox(s1)
    shift = np.array([-0.5 * (lo[0] + hi[0]), -0.5 * (lo[1] + hi[1]), -lo[2]])
    return transformed(s1, np.eye(3), shift, what), t + shift


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
    F = Frame.of(pm)
    say(f"cutting the printed pieces of {name}")
    te_open = pm.te_open
    v_whole = volume_mm3(solid_from_skin(pm.skin, te_open=te_open, name=name))
    solids, vols, removed = [], [], 0.0
    for pc in plan.pieces:
        a, b = pc.span
        pw = f"{what} piece {pc.index + 1}"
        bare = prepared(solid_from_skin(sub_skin(pm.skin, a, b), te_open=te_open, name=pw), pw)
        tl = [t for t in plan.tools if _overlaps(t, F, a, b)]
        piece, rem, _, vol = cut_features(bare, tl, pw, probes=lambda t, a=a, b=b: _probes(t, F, a, b))
        solids.append(piece)
        vols.append(vol)
        removed += rem
    err = abs(sum(vols) + removed - v_whole)
    if err > defaults.SHOP_VOLUME_BALANCE_REL * v_whole:
        raise GeometryError(f"{what}: pieces ({sum(vols):.0f} mm³) and removed features ({removed:.0f} mm³) do not "
                            f"add up to the part ({v_whole:.0f} mm³); nothing was written")
    outs, pieces = [], []
    n = len(solids)
    for pc, sh, vol in zip(plan.pieces, solids, vols):
        tag = f"piece{pc.index + 1}of{n}"
        say(f"meshing {name} {tag}")
        A = s * pc.M @ F.R.T
        posed, t = _posed(sh, A, -A @ F.position, f"{what} {tag}")
        v, f = mesh(posed, ps.mesh_tol, f"{what} {tag}")
        lo, hi = bbox(posed)
        files = [name_of(tag, suffix=sfx) for sfx in (".step", ".stl", ".3mf")]
        outs += [shop_output(files[0], "step", [(f"{name}-{tag}", posed)]),
                 shop_output(files[1], "stl", meshes=[(tag, v, f)]),
                 shop_output(files[2], "3mf", meshes=[(f"{name}-{tag}", v, f)])]
        pieces.append({"index": pc.index + 1, "span": list(pc.span), "pose": pc.pose, "fits": pc.fits,
                       "size_printed_mm": (hi - lo).tolist(), "volume_design_mm3": vol,
                       "volume_printed_mm3": vol * s**3, "datum_to_print": _matrix(A, t),
                       "files": files})
    notes = []
    if plan.te_mm * s < THIN_PRINTED_EDGE_MM:
        notes.append(f"the printed trailing edge is {plan.te_mm * s:.2f} mm, thinner than one line of a common "
                     f"{THIN_PRINTED_EDGE_MM:g} mm nozzle; set printing.min_te to thicken it")
    rep = {"notes": notes, "scale": s, "te_thickness_mm": plan.te_mm, "te_printed_mm": plan.te_mm * s,
           "split": plan.split_how, "joints": plan.joints, "spars": plan.spars, "pieces": pieces,
           "volume_whole_mm3": v_whole, "volume_removed_mm3": removed, "volume_pieces_mm3": sum(vols), "balance_error_rel": err / v_whole,
           "build_volume": list(ps.build_volume) if ps.build_volume else None, "mesh_tol": ps.mesh_tol}
    if ps.joint_test and plan.joints:
        outs += _joint_test(pm, plan, solids, F, name_of, what, rep)
    return outs, rep


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


def _joint_test(pm, plan, pieces, F, name_of, what, rep) -> list:
    """A slice across the innermost joint, its two halves standing joint face up."""
    ps = pm.spec.printing
    s = plan.scale
    j = min(plan.joints, key=lambda jt: abs(jt["y"]))
    yj = j["y"]
    w = (0.5 * ps.locators.pin_length + 0.5 + 3.0) / s
    i = plan.bounds.index(yj)
    a, b = max(yj - w, plan.bounds[i - 1]), min(yj + w, plan.bounds[i + 1])
    tw = f"{what} joint test"
    lo, hi = bbox(pieces[i - 1])
    loc = F.to_local(np.array([[x, y, z] for x in (lo[0], hi[0]) for y in (lo[1], hi[1]) for z in (lo[2], hi[2])]))
    X0, X1 = loc[:, 0].min() - 5.0, loc[:, 0].max() + 5.0
    Z0, Z1 = loc[:, 2].min() - 5.0, loc[:, 2].max() + 5.0
    halves = []
    for piece, (p, q) in ((pieces[i - 1], (a, yj)), (pieces[i], (yj, b))):
        slab = Tool("box", F.to_datum([X0, p, Z1]), F.span_axis, q - p, xdir=F.R[:, 0], size=(X1 - X0, Z1 - Z0))
        got = common(piece, make_tool(slab), tw)
        if len(got) != 1:
            raise GeometryError(f"{tw}: the slice came out as {len(got)} solids; nothing was written")
        halves.append(got[0])
    bodies, meshes, x = [], [], 0.0
    for k, (sh, up) in enumerate(zip(halves, (1, -1))):
        M, _, _ = choose_pose(np.ones(3), up, None)
        A = s * M @ F.R.T
        posed, t = _posed(sh, A, -A @ F.position, tw)
        lo, hi = bbox(posed)
        dx = (x - lo[0]) if k else 0.0
        if k:
            from ..cad.ops import transformed as tr

            posed = tr(posed, np.eye(3), (dx, 0.0, 0.0), tw)
        x = bbox(posed)[1][0] + 10.0
        nm = f"{pm.name}-joint-test-{'ab'[k]}"
        bodies.append((nm, posed))
        v, f = mesh(posed, ps.mesh_tol, tw)
        meshes.append((nm, v, f))
    files = [name_of("joint-test", suffix=sfx) for sfx in (".step", ".stl", ".3mf")]
    rep["joint_test"] = {"y": yj, "span": [a, b], "files": files}
    return [shop_output(files[0], "step", bodies), shop_output(files[1], "stl", meshes=meshes),
            shop_output(files[2], "3mf", meshes=meshes)]
