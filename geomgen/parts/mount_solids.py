"""Mounting interface solids: the part with its pad and holes (datum frame) and the shims."""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..cad.loft import volume_mm3
from ..cad.mesh import mesh
from ..cad.ops import checked, cut, cut_features, prepared, prism
from ..errors import GeometryError
from .mount import plan_mount, plan_shims
from .output import shop_output


def mount_outputs(model, solid, spec, name_of, say, flight_words=None) -> tuple[list, dict, list]:
    """Outputs of ``[surface.mount]``: ``<set>-<surface>-mount.step`` and each shim's STL and STEP.

    Returns (outputs, report, tools) - the tools so that printing can cut the same features."""
    ms = model.spec.mount
    plan = plan_mount(model, ms)
    shims, p2 = plan_shims(model, ms, spec, flight_words)
    if plan.problems or p2:
        raise GeometryError("; ".join(plan.problems + p2) + "; nothing was written")
    say(f"cutting the mount of {model.name}")
    what = f'surface "{model.name}" mount'
    mounted, removed, v0, v1 = cut_features(prepared(solid, what), plan.tools, what)
    if abs(v0 - v1 - removed) > defaults.SHOP_VOLUME_BALANCE_REL * v0:
        raise GeometryError(f"{what}: the cut part ({v1:.0f} mm³) and the removed features ({removed:.0f} mm³) do "
                            f"not add up to the part ({v0:.0f} mm³); nothing was written")
    rep = dict(plan.report)
    rep.update(volume_mm3=v1, removed_mm3=removed, file=name_of("mount", suffix=".step"), shims=[])
    outs = [shop_output(name_of("mount", suffix=".step"), "step", [(f"{model.name}-mount", mounted)])]
    for i, sh in enumerate(shims):
        W = sh.width
        poly = np.array([[0, -0.5 * W, 0], [sh.length, -0.5 * W, 0], [sh.length, -0.5 * W, sh.t_aft],
                         [0, -0.5 * W, sh.t_fore]])
        wedge = prism(poly, (0, W, 0))
        from .frame import Tool

        h = max(sh.t_fore, sh.t_aft) + 2.0
        holes = [Tool("cylinder", (x, y, -1.0), (0, 0, 1), h, radius=r) for x, y, r in sh.holes]
        if sh.notch:
            holes.append(Tool("cylinder", (sh.notch[0], sh.notch[1], -1.0), (0, 0, 1), h, radius=sh.notch[2]))
        wn = f"{what} shim[{i}]"
        body = cut(checked(wedge, wn)[0], holes, wn)
        v, f = mesh(body, 0.02, wn)
        stl_name, step_name = name_of(sh.slug, suffix=".stl"), name_of(sh.slug, suffix=".step")
        outs += [shop_output(stl_name, "stl", [(f"{model.name}-{sh.slug}", body)], meshes=[(sh.slug, v, f)]),
                 shop_output(step_name, "step", [(f"{model.name}-{sh.slug}", body)])]
        rep["shims"].append({"angle": sh.angle, "label": sh.label, "words": sh.words, "length": sh.length,
                             "width": W, "t_fore": sh.t_fore, "t_aft": sh.t_aft, "holes": len(sh.holes),
                             "files": [stl_name, step_name], "volume_mm3": volume_mm3(body)})
    return outs, rep, plan.tools
