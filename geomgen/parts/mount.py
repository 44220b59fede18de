"""Mounting interface plan: the flat pad, bolt holes and incidence shims (numpy only).

Everything is measured on the geometry model's sections: the section at datum y of a
horizontal surface lies in the plane y = const, so a line parallel to datum z at (x, y)
meets the part where it crosses that section polygon. ``w`` below is the height measured
toward the pad (w = z for a pad on the upper skin, w = -z on the lower skin): the pad
removes w > w_pad, the "far" skin is the one away from the pad.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .. import defaults
from .frame import Tool, line_crossings, section_datum_xz

#: How far feature tools reach beyond the part, mm (keeps tool faces off the skin).
TOOL_MARGIN = 5.0
#: Rings where walls are measured sit this fraction inside a feature's radius (a vertical
#: line there meets the feature's flat bottom, not its cylindrical wall).
RING = 0.98


@dataclass
class MountPlan:
    tools: list[Tool]
    report: dict
    problems: list[str] = field(default_factory=list)


class _Sections:
    """Vertical crossings of a horizontal surface's sections, cached per span position."""

    def __init__(self, model, sgn: int):
        self.model, self.sgn = model, sgn
        self.lo, self.hi = model.y_range
        self._cache: dict = {}

    def w(self, x, y: float):
        """(w_far, w_near) at datum x values on the section y; NaN where there is no material."""
        x = np.atleast_1d(np.asarray(x, float))
        if not (self.lo - 1e-9 <= y <= self.hi + 1e-9):
            return np.full(len(x), np.nan), np.full(len(x), np.nan)
        key = round(float(y), 6)
        if key not in self._cache:
            self._cache[key] = section_datum_xz(self.model, float(y))
        lo, hi = line_crossings(self._cache[key], x)
        return (lo, hi) if self.sgn > 0 else (-hi, -lo)

    def w_at(self, pts):
        pts = np.atleast_2d(pts)
        out = np.array([self.w([p[0]], p[1]) for p in pts])[:, :, 0]
        return out[:, 0], out[:, 1]


def _ring(x, y, r, n=16):
    a = np.linspace(0, 2 * np.pi, n, endpoint=False)
    return np.column_stack([x + r * np.cos(a), y + r * np.sin(a)])


def plan_mount(model, ms) -> MountPlan:
    """Pad and hole tools of ``model`` (a horizontal SurfaceModel) for the MountSpec ``ms``,
    with every wall measured; problems are collected, not raised."""
    name = model.name
    sgn = 1 if ms.side == "upper" else -1
    near, far = (ms.side, "lower" if ms.side == "upper" else "upper")
    S = _Sections(model, sgn)
    auto = ms.pad_z == "auto"
    if auto:  # the height that leaves pad_contact of the footprint's grid points above the plane
        x0, x1 = ms.pad_x
        wn = np.concatenate([S.w(np.linspace(x0, x1, 61), float(y))[1] for y in
                             np.linspace(ms.pad_y - 0.5 * ms.pad_width, ms.pad_y + 0.5 * ms.pad_width, 31)])
        wn = np.where(np.isnan(wn), -np.inf, wn)
        if not np.isfinite(wn).any():
            return MountPlan([], {"pad": {}, "holes": []}, [f'surface "{name}" mount pad: the footprint x {x0:g} .. '
                                                          f"{x1:g} mm misses the part; nothing would be flat"])
        k = int(np.ceil(ms.pad_contact * len(wn)))
        ms = ms.model_copy(update={"pad_z": float(sgn * (np.sort(wn)[::-1][k - 1] - 1e-6))})
    poles = model.skin.poles.reshape(-1, 3)
    w_all = sgn * poles[:, 2]
    w_min, w_max = float(w_all.min()) - TOOL_MARGIN, float(w_all.max()) + TOOL_MARGIN
    wp = sgn * ms.pad_z
    x0, x1 = ms.pad_x
    y0, y1 = ms.pad_y - 0.5 * ms.pad_width, ms.pad_y + 0.5 * ms.pad_width
    problems: list[str] = []
    where = f'surface "{name}" mount'

    def in_pad(p):
        return (x0 <= p[0] <= x1) and (y0 <= p[1] <= y1)

    def w_top(pts):
        wf, wn = S.w_at(pts)
        wn = np.array([min(v, wp) if in_pad(p) else v for v, p in zip(wn, np.atleast_2d(pts))])
        return wf, wn

    def zt(w):  # w -> datum z
        return sgn * w

    def tool(x, y, w_from, w_to, r, label, r2=None, probe=None):
        """A feature along datum z; ``probe`` (dx, w): a point the feature removes."""
        kind = "cylinder" if r2 is None else "cone"
        pr = None if probe is None else (x + probe[0], y, zt(probe[1]))
        return Tool(kind, (x, y, zt(w_from)), (0, 0, sgn), w_to - w_from, radius=r,
                    radius2=0.0 if r2 is None else r2, label=label, probe=pr)

    # -- holes ----------------------------------------------------------------------
    tools: list[Tool] = []
    holes = []
    keep_out = []  # (x, y, radius) of hole features: the pad's wall is measured away from them
    for i, h in enumerate(ms.hole):
        label = f"{where} hole[{i}] (x={h.x:g}, y={h.y:g})"
        r = 0.5 * h.diameter
        kind = "insert" if h.insert else "counterbore" if h.counterbore else "countersink" if h.countersink \
            else "blind" if h.depth is not None else "through"
        R = {"insert": 0.5 * h.insert.diameter if h.insert else 0, "counterbore": 0.5 * h.counterbore.diameter
             if h.counterbore else 0, "countersink": 0.5 * h.countersink.diameter if h.countersink else 0}.get(kind, r)
        keep_out.append((h.x, h.y, R))
        probe = np.vstack([[h.x, h.y], _ring(h.x, h.y, R)])
        wf, wn = w_top(probe)
        if np.isnan(wf).any():
            problems.append(f"{label}: the hole runs off the part (no material under part of its "
                            f"Ø{2 * R:g} mm footprint); move it inside the section")
            continue
        wf0, wt0 = float(wf[0]), float(wn[0])
        rec = {"index": i, "x": h.x, "y": h.y, "kind": kind, "diameter": h.diameter,
               "near_z": zt(wt0), "far_z": zt(wf0)}
        if kind == "through":  # just outside the hole: the material the bolt clamps
            ringr = _ring(h.x, h.y, r / RING)
            a, b = w_top(ringr)
            grip = b - a
            k = int(np.argmin(grip))
            wall, at, wall_lo, wall_hi = float(grip[k]), ringr[k], float(a[k]), float(b[k])
            what = "material along the bolt"
            tools.append(tool(h.x, h.y, w_min, w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0))))
        elif kind == "counterbore":
            cb = h.counterbore
            w_cb = wf0 + cb.depth
            ringr = _ring(h.x, h.y, RING * R)  # on the recess bottom, outside the hole
            a, b = w_top(ringr)
            rem = b - w_cb
            k = int(np.argmin(rem))
            wall, at, wall_lo, wall_hi = float(rem[k]), ringr[k], w_cb, float(b[k])
            what = f"material between the counterbore bottom and the {near} side"
            rec.update(counterbore_diameter=cb.diameter, counterbore_depth=cb.depth, counterbore_bottom_z=zt(w_cb))
            tools += [tool(h.x, h.y, w_min, w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0))),
                      tool(h.x, h.y, w_min, w_cb, R, label, probe=(0.5 * (r + R), wf0 + 0.5 * cb.depth))]
        elif kind == "countersink":
            cs = h.countersink
            tn = math.tan(math.radians(0.5 * cs.angle))
            w_cs = wf0 + (R - r) / tn
            rho = 1.0 / RING * r
            ringr = _ring(h.x, h.y, rho)
            a, b = w_top(ringr)
            w_cone = wf0 + (R - rho) / tn
            rem = b - w_cone
            k = int(np.argmin(rem))
            wall, at, wall_lo, wall_hi = float(rem[k]), ringr[k], w_cone, float(b[k])
            what = f"material between the countersink and the {near} side"
            rec.update(countersink_diameter=cs.diameter, countersink_angle=cs.angle, countersink_depth=w_cs - wf0)
            mc = TOOL_MARGIN
            rp = 0.5 * (r + R)
            tools += [tool(h.x, h.y, w_min, w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0))),
                      tool(h.x, h.y, wf0 - mc, w_cs, R + mc * tn, label, r2=r, probe=(rp, wf0 + 0.5 * (R - rp) / tn))]
        else:  # blind or insert: measured down to the far skin
            depth = h.depth if h.depth is not None else h.insert.depth
            w_b = wt0 - depth
            parts = [(r, w_b)]
            if kind == "insert":
                w_i = wt0 - h.insert.depth
                parts.append((R, w_i))
                rec.update(insert_diameter=h.insert.diameter, insert_depth=h.insert.depth)
                tools.append(tool(h.x, h.y, w_i, w_max, R, label, probe=(0.0, 0.5 * (wt0 + w_i))))
                if w_b < w_i - 1e-9:
                    tools.append(tool(h.x, h.y, w_b, w_i + 0.01, r, label, probe=(0.0, 0.5 * (w_b + w_i))))
            else:
                tools.append(tool(h.x, h.y, w_b, w_max, r, label, probe=(0.0, 0.5 * (wt0 + w_b))))
            rec.update(depth=depth, bottom_z=zt(w_b))
            best = None
            for rr, wb in parts:
                ringr = np.vstack([[h.x, h.y], _ring(h.x, h.y, RING * rr)])
                a, _ = w_top(ringr)
                rem = wb - a
                k = int(np.argmin(rem))
                if best is None or rem[k] < best[0]:
                    best = (float(rem[k]), ringr[k], float(a[k]), wb)
            wall, at, wall_lo, wall_hi = best
            what = f"material between the {'pocket' if kind == 'insert' else 'hole'} bottom and the {far} skin"
        rec.update(wall_mm=wall, wall_what=what, wall_at=[float(at[0]), float(at[1])],
                   wall_z=sorted([zt(wall_lo), zt(wall_hi)]))
        if wall <= 0:
            side = near if kind in ("counterbore", "countersink") else far
            problems.append(f"{label}: the {kind} hole breaks through the {side} side "
                            f"(wall {wall:.2f} mm at x={at[0]:.1f}, y={at[1]:.1f})")
        elif wall < ms.min_wall:
            problems.append(f"{label}: the {kind} hole leaves {wall:.2f} mm ({what}) at x={at[0]:.1f}, "
                            f"y={at[1]:.1f}, less than min_wall = {ms.min_wall:g} mm")
        holes.append(rec)

    # -- pad ------------------------------------------------------------------------
    xs = np.linspace(x0, x1, 61)
    ys = np.linspace(y0, y1, 31)
    n_cut = n_all = 0
    min_wall = (math.inf, None, None)
    gap = 0.0
    depth = 0.0
    deepest = None
    through = None
    nearest = math.inf
    skin_w: list[float] = []
    for y in ys:
        wf, wn = S.w(xs, float(y))
        n_all += len(xs)
        have = ~np.isnan(wf)
        skin_w += list(wn[have])
        cut = have & (wn > wp)
        n_cut += int(cut.sum())
        if (have & ~cut).any():
            gap = max(gap, float((wp - wn[have & ~cut]).max()))
            nearest = min(nearest, float((wp - wn[have & ~cut]).min()))
        if cut.any():
            k = int(np.argmax(np.where(cut, wn, -np.inf)))
            if wn[k] - wp > depth:
                depth, deepest = float(wn[k] - wp), (float(xs[k]), float(y))
            bad = cut & (wf >= wp)
            if bad.any() and through is None:
                through = (float(xs[bad][0]), float(y))
            free = np.array([all(math.hypot(x - hx, y - hy) > hr + 0.5 for hx, hy, hr in keep_out) for x in xs])
            m = cut & free
            if m.any():
                wall = wp - wf
                k = int(np.argmin(np.where(m, wall, np.inf)))
                if wall[k] < min_wall[0]:
                    min_wall = (float(wall[k]), (float(xs[k]), float(y)), (float(ms.pad_z), float(sgn * wf[k])))
    zs = sorted(sgn * v for v in (min(skin_w), max(skin_w))) if skin_w else None
    pad = {"side": ms.side, "z": ms.pad_z, "x": list(ms.pad_x), "y": [y0, y1],
           "flat_fraction": n_cut / n_all, "max_cut_mm": depth, "max_gap_mm": gap,
           "min_gap_mm": None if math.isinf(nearest) else nearest, "skin_z_range": zs,
           "auto": {"contact_target": ms.pad_contact} if auto else None, "notes": []}
    rng = f"; the {near} skin over the footprint lies at z = {zs[0]:.2f} .. {zs[1]:.2f} mm" if zs else ""
    if n_cut == 0:
        problems.append(f"{where} pad: the plane z = {ms.pad_z:g} mm does not reach the {near} skin anywhere in "
                        f"its footprint (nearest {nearest:.2f} mm away, farthest {gap:.2f} mm){rng}; nothing would "
                        "be flat")
    elif n_cut < n_all and n_cut / n_all < defaults.PAD_CONTACT_WARN:
        pad["notes"].append(f"the pad is flat over only {100 * n_cut / n_all:.0f} % of its footprint (gaps up to "
                            f"{gap:.2f} mm to the skin{rng}): the fuselage bears on part of it; "
                            f'lower pad_z or set pad_z = "auto" with pad_contact')
    elif through is not None:
        problems.append(f"{where} pad: the plane z = {ms.pad_z:g} mm cuts through the {far} skin at "
                        f"x={through[0]:.1f}, y={through[1]:.1f}")
    elif min_wall[1] is not None:
        pad.update(wall_mm=min_wall[0], wall_at=list(min_wall[1]), wall_z=sorted(min_wall[2]))
        if min_wall[0] < ms.min_wall:
            problems.append(f"{where} pad: leaves {min_wall[0]:.2f} mm to the {far} skin at x={min_wall[1][0]:.1f}, "
                            f"y={min_wall[1][1]:.1f}, less than min_wall = {ms.min_wall:g} mm")
    if n_cut:
        zlo, zhi = (ms.pad_z, sgn * w_max) if sgn > 0 else (sgn * w_max, ms.pad_z)
        probe = (deepest[0], deepest[1], zt(wp + 0.5 * depth)) if depth > 0.02 else None
        tools.insert(0, Tool("box", (x0, y0, zlo), (0, 0, 1), zhi - zlo, xdir=(1, 0, 0), size=(x1 - x0, y1 - y0),
                             label=f"{where} pad", probe=probe))
    return MountPlan(tools, {"pad": pad, "holes": holes, "min_wall_mm": ms.min_wall}, problems)


# -- shims ----------------------------------------------------------------------------
@dataclass
class ShimPlan:
    """A wedge in its print pose: flat face on z = 0, forward end at x = 0, y centred."""

    angle: float
    length: float
    width: float
    t_fore: float
    t_aft: float
    holes: list[tuple[float, float, float]]  # (x, y, radius) in the print pose
    notch: tuple[float, float, float] | None
    slug: str
    label: str
    words: list[str]


def _decalage(spec, model, angle):
    wing = next((s for s in spec.surface if s.role == "wing"), None)
    stab = next((s for s in spec.surface if s.role == "stabilizer"), None)
    if wing is None or stab is None:
        return None
    before = wing.incidence - stab.incidence
    after = before + (angle if model.spec.role == "wing" else -angle) if model.name in (wing.name, stab.name) \
        else before
    return before, after


def plan_shims(model, ms, spec, flight_words: dict | None = None) -> tuple[list[ShimPlan], list[str]]:
    """Wedges for the shims of MountSpec ``ms`` with the words that explain each one's sign.

    ``flight_words``: shim angle -> what it does in trimmed flight (from the hydrodynamics,
    worked out by the caller; see :func:`geomgen.hydro.shim_trim_change`)."""
    out, problems = [], []
    x0, x1 = ms.pad_x
    xc = 0.5 * (x0 + x1)
    role = model.spec.role
    what = {"wing": "front wing", "stabilizer": "stabilizer"}.get(role, role)
    for i, sh in enumerate(ms.shim):
        L = sh.length or (x1 - x0)
        W = sh.width or ms.pad_width
        tn = math.tan(math.radians(abs(sh.angle)))
        thick_aft = (sh.angle > 0) == (ms.side == "upper")
        t_thin, t_thick = sh.min_thickness, sh.min_thickness + L * tn
        t_fore, t_aft = (t_thin, t_thick) if thick_aft else (t_thick, t_thin)
        fx = xc - 0.5 * L
        holes = []
        for j, h in enumerate(ms.hole):
            r = 0.5 * (h.diameter + sh.hole_clearance)
            px, py = h.x - fx, h.y - ms.pad_y
            inside = (r + 1.0 <= px <= L - r - 1.0) and (abs(py) <= 0.5 * W - r - 1.0)
            outside = px < -r or px > L + r or abs(py) > 0.5 * W + r
            if inside:
                holes.append((px, py, r))
            elif not outside:
                problems.append(f'surface "{model.name}" mount shim[{i}]: hole[{j}] (x={h.x:g}, y={h.y:g}) lies on '
                                f"the shim's edge; change the shim's length or width")
        nr = min(1.5, 0.1 * W)
        notch = (0.0, 0.0, nr) if all(math.hypot(px, py) > r + nr + 0.5 for px, py, r in holes) else None
        a = sh.angle
        sign_word = "plus" if a > 0 else "minus"
        slug = f"shim-{sign_word}{abs(a):g}deg"
        label = f"{model.name} {a:+g}°"
        new_inc = model.spec.incidence + a
        words = [f"{label}: the {what}'s leading edge goes {'up' if a > 0 else 'down'} {abs(a):g}° relative to "
                 f"the fuselage (incidence {model.spec.incidence:g}° -> {new_inc:g}°; positive = leading edge up)."]
        dec = _decalage(spec, model, a)
        grows = (a > 0) == (role == "wing")
        dec_txt = f" ({dec[0]:g}° -> {dec[1]:g}°)" if dec else ""
        if role == "wing":
            words.append(f"The front wing's angle to the fuselage and board changes by {a:+g}°; its angle to the "
                         f"stabilizer (decalage) {'grows' if grows else 'shrinks'} by {abs(a):g}°{dec_txt}.")
        else:
            words.append(f"The front wing's angle to the fuselage and board does not change; its angle to the "
                         f"{what} (decalage) {'grows' if grows else 'shrinks'} by {abs(a):g}°{dec_txt}.")
        flight = (flight_words or {}).get(a)
        if flight:
            words.append(flight)
        words.append("More decalage: the foil tends to pitch nose up and lift earlier, at lower speed; less: the "
                     "opposite (common practice, no source).")
        words.append(f"Fit: flat face on the pad, thick end {'aft' if thick_aft else 'forward'} "
                     f"({t_thick:.2f} mm), thin end {t_thin:.2f} mm"
                     + ("; the half-round notch marks the forward end." if notch else "."))
        out.append(ShimPlan(a, L, W, t_fore, t_aft, holes, notch, slug, label, words))
    return out, problems
