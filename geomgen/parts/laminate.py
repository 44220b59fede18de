"""Cores (the part offset inward by the laminate) and two-half moulds with an optional flange."""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..errors import GeometryError
from ..geometry.tessellate import tessellate
from ..sections.base import Section
from .core import plan_core
from .mould import parting_skin, plate_box, root_frame
from ..cad.loft import solid_from_skin, volume_mm3
from ..cad.ops import centroid, checked, fuse, make_tool, plane_face, prepared, skin_face, split, transformed
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
        what = f'surface "{name}" laminate mould'
        say(f"splitting the mould halves of {name}")
        ext = float(np.ptp(skin.poles.reshape(-1, 3), axis=0).max())
        pskin = parting_skin(model, skin, lam.flange + 15.0 + ext) if lam.parting == "stations" else None
        face = skin_face(pskin) if pskin is not None else plane_face(rf.le, rf.normal, rf.chord, 4 * ext + 1000.0)
        halves = split(prepared(solid, what), [face], what)
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
        found = undercuts(model, skin, rf, lam.parting)
        rep["mould"] = {"parting": lam.parting, "volume_part_mm3": v, "halves": [], "undercut": found,
                        "notes": undercut_words(name, lam.parting, found)}
        for half, body in zip(("upper", "lower"), halves):
            plate_v = 0.0
            if lam.flange > 0:
                box, flat = plate_box(rf, skin, pskin, lam.flange, lam.flange_thickness, half)
                pieces = split(make_tool(box), [face], f"{what} {half} flange")
                if len(pieces) != 2:
                    raise GeometryError(f"{what} {half} flange: the parting surface does not cross the plate "
                                        f"({len(pieces)} pieces); nothing was written")
                pieces.sort(key=lambda sh: float(centroid(sh) @ rf.normal))
                plate = pieces[0] if half == "upper" else pieces[1]
                plate_v = volume_mm3(plate)
                body = checked(fuse([body, plate], f"{what} {half} flange"), f"{what} {half} flange")[0]
            B, t = pose[half]
            posed = transformed(body, B, t, f"{what} {half}")
            fname = name_of("mould", half, suffix=".step")
            outs.append(shop_output(fname, "step", [(f"{name}-mould-{half}", posed)]))
            rep["mould"]["halves"].append({"half": half, "volume_mm3": vh[0 if half == "upper" else 1],
                                           "plate_mm3": plate_v, "volume_written_mm3": volume_mm3(posed),
                                           "datum_to_file": _matrix(B, t), "file": fname})
        rep["mould"]["flange"] = {"width": lam.flange, "thickness": lam.flange_thickness} if lam.flange else None
    return outs, rep
