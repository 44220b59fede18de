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


@dataclass
class _Pad:
    """The pad plane and footprint of one mount, in ``w`` (height toward the pad); makes the
    feature tools along datum z."""

    S: _Sections
    sgn: int
    wp: float  # the pad plane
    x0: float
    x1: float
    y0: float
    y1: float
    w_min: float  # the part's extent in w, widened by TOOL_MARGIN: where tools start and end
    w_max: float

    def in_pad(self, p) -> bool:
        return bool((self.x0 <= p[0] <= self.x1) and (self.y0 <= p[1] <= self.y1))

    def w_top(self, pts):
        """(w_far, w_near) at points (x, y), the near side cut down to the pad inside its footprint."""
        wf, wn = self.S.w_at(pts)
        wn = np.array([min(v, self.wp) if self.in_pad(p) else v for v, p in zip(wn, np.atleast_2d(pts))])
        return wf, wn

    def zt(self, w):  # w -> datum z
        return self.sgn * w

    def tool(self, x, y, w_from, w_to, r, label, r2=None, probe=None) -> Tool:
        """A feature along datum z; ``probe`` (dx, w): a point the feature removes."""
        kind = "cylinder" if r2 is None else "cone"
        pr = None if probe is None else (x + probe[0], y, self.zt(probe[1]))
        return Tool(kind, (x, y, self.zt(w_from)), (0, 0, self.sgn), w_to - w_from, radius=r,
                    radius2=0.0 if r2 is None else r2, label=label, probe=pr)


@dataclass
class _Wall:
    """The thinnest wall a hole leaves: thickness, where (x, y), its ends in w, what it is."""

    mm: float
    at: np.ndarray
    w_lo: float
    w_hi: float
    what: str


@dataclass
class _PadScan:
    """The pad plane against the near skin over the footprint's grid."""

    n_cut: int = 0  # grid points where the plane cuts material
    n_all: int = 0
    min_wall: tuple = (math.inf, None, None)  # (mm, (x, y), (z pad, z far skin)) away from holes
    gap: float = 0.0  # largest gap between plane and skin where it does not cut
    depth: float = 0.0  # deepest cut
    deepest: tuple[float, float] | None = None
    through: tuple[float, float] | None = None  # first point where the plane cuts the far skin
    nearest: float = math.inf  # smallest gap where it does not cut
    skin_w: list[float] = field(default_factory=list)


def _auto_pad_z(S: _Sections, ms, sgn: int, name: str):
    """``ms`` with the pad height that leaves pad_contact of the footprint's grid points above
    the plane, or a MountPlan with the problem when the footprint misses the part."""
    x0, x1 = ms.pad_x
    wn = np.concatenate([S.w(np.linspace(x0, x1, 61), float(y))[1] for y in
                         np.linspace(ms.pad_y - 0.5 * ms.pad_width, ms.pad_y + 0.5 * ms.pad_width, 31)])
    wn = np.where(np.isnan(wn), -np.inf, wn)
    if not np.isfinite(wn).any():
        return MountPlan([], {"pad": {}, "holes": []}, [f'surface "{name}" mount pad: the footprint x {x0:g} .. '
                                                      f"{x1:g} mm misses the part; nothing would be flat"])
    k = int(np.ceil(ms.pad_contact * len(wn)))
    return ms.model_copy(update={"pad_z": float(sgn * (np.sort(wn)[::-1][k - 1] - 1e-6))})


def _hole_kind(h) -> tuple[str, float]:
    """(kind, radius of the hole's widest feature)."""
    r = 0.5 * h.diameter
    kind = "insert" if h.insert else "counterbore" if h.counterbore else "countersink" if h.countersink \
        else "blind" if h.depth is not None else "through"
    R = {"insert": 0.5 * h.insert.diameter if h.insert else 0, "counterbore": 0.5 * h.counterbore.diameter
         if h.counterbore else 0, "countersink": 0.5 * h.countersink.diameter if h.countersink else 0}.get(kind, r)
    return kind, R


def _through(g: _Pad, h, r, wf0, wt0, label) -> tuple[_Wall, list[Tool]]:
    """Just outside the hole: the material the bolt clamps."""
    ringr = _ring(h.x, h.y, r / RING)
    a, b = g.w_top(ringr)
    grip = b - a
    k = int(np.argmin(grip))
    wall = _Wall(float(grip[k]), ringr[k], float(a[k]), float(b[k]), "material along the bolt")
    return wall, [g.tool(h.x, h.y, g.w_min, g.w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0)))]


def _counterbore(g: _Pad, h, r, R, wf0, wt0, label, near, rec) -> tuple[_Wall, list[Tool]]:
    cb = h.counterbore
    w_cb = wf0 + cb.depth
    ringr = _ring(h.x, h.y, RING * R)  # on the recess bottom, outside the hole
    a, b = g.w_top(ringr)
    rem = b - w_cb
    k = int(np.argmin(rem))
    wall = _Wall(float(rem[k]), ringr[k], w_cb, float(b[k]),
                 f"material between the counterbore bottom and the {near} side")
    rec.update(counterbore_diameter=cb.diameter, counterbore_depth=cb.depth, counterbore_bottom_z=g.zt(w_cb))
    return wall, [g.tool(h.x, h.y, g.w_min, g.w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0))),
                  g.tool(h.x, h.y, g.w_min, w_cb, R, label, probe=(0.5 * (r + R), wf0 + 0.5 * cb.depth))]


def _countersink(g: _Pad, h, r, R, wf0, wt0, label, near, rec) -> tuple[_Wall, list[Tool]]:
    cs = h.countersink
    tn = math.tan(math.radians(0.5 * cs.angle))
    w_cs = wf0 + (R - r) / tn
    rho = 1.0 / RING * r
    ringr = _ring(h.x, h.y, rho)
    a, b = g.w_top(ringr)
    w_cone = wf0 + (R - rho) / tn
    rem = b - w_cone
    k = int(np.argmin(rem))
    wall = _Wall(float(rem[k]), ringr[k], w_cone, float(b[k]), f"material between the countersink and the {near} side")
    rec.update(countersink_diameter=cs.diameter, countersink_angle=cs.angle, countersink_depth=w_cs - wf0)
    mc = TOOL_MARGIN
    rp = 0.5 * (r + R)
    return wall, [g.tool(h.x, h.y, g.w_min, g.w_max, r, label, probe=(0.0, 0.5 * (wf0 + wt0))),
                  g.tool(h.x, h.y, wf0 - mc, w_cs, R + mc * tn, label, r2=r, probe=(rp, wf0 + 0.5 * (R - rp) / tn))]


def _blind(g: _Pad, h, kind, r, R, wt0, label, far, rec) -> tuple[_Wall, list[Tool]]:
    """A blind hole or an insert pocket: measured down to the far skin."""
    depth = h.depth if h.depth is not None else h.insert.depth
    w_b = wt0 - depth
    parts = [(r, w_b)]
    tools = []
    if kind == "insert":
        w_i = wt0 - h.insert.depth
        parts.append((R, w_i))
        rec.update(insert_diameter=h.insert.diameter, insert_depth=h.insert.depth)
        tools.append(g.tool(h.x, h.y, w_i, g.w_max, R, label, probe=(0.0, 0.5 * (wt0 + w_i))))
        if w_b < w_i - 1e-9:
            tools.append(g.tool(h.x, h.y, w_b, w_i + 0.01, r, label, probe=(0.0, 0.5 * (w_b + w_i))))
    else:
        tools.append(g.tool(h.x, h.y, w_b, g.w_max, r, label, probe=(0.0, 0.5 * (wt0 + w_b))))
    rec.update(depth=depth, bottom_z=g.zt(w_b))
    best = None
    for rr, wb in parts:
        ringr = np.vstack([[h.x, h.y], _ring(h.x, h.y, RING * rr)])
        a, _ = g.w_top(ringr)
        rem = wb - a
        k = int(np.argmin(rem))
        if best is None or rem[k] < best[0]:
            best = (float(rem[k]), ringr[k], float(a[k]), wb)
    assert best is not None  # parts holds the hole itself
    what = f"material between the {'pocket' if kind == 'insert' else 'hole'} bottom and the {far} skin"
    return _Wall(*best, what), tools


def _plan_hole(g: _Pad, ms, i: int, h, where: str, near: str, far: str, tools: list[Tool],
               problems: list[str]) -> dict | None:
    """One hole's tools (into ``tools``) and record, its wall checked against min_wall; None
    (and a problem) when it runs off the part."""
    label = f"{where} hole[{i}] (x={h.x:g}, y={h.y:g})"
    r = 0.5 * h.diameter
    kind, R = _hole_kind(h)
    probe = np.vstack([[h.x, h.y], _ring(h.x, h.y, R)])
    wf, wn = g.w_top(probe)
    if np.isnan(wf).any():
        problems.append(f"{label}: the hole runs off the part (no material under part of its "
                        f"Ø{2 * R:g} mm footprint); move it inside the section")
        return None
    wf0, wt0 = float(wf[0]), float(wn[0])
    rec = {"index": i, "x": h.x, "y": h.y, "kind": kind, "diameter": h.diameter,
           "near_z": g.zt(wt0), "far_z": g.zt(wf0)}
    if kind == "through":
        wall, made = _through(g, h, r, wf0, wt0, label)
    elif kind == "counterbore":
        wall, made = _counterbore(g, h, r, R, wf0, wt0, label, near, rec)
    elif kind == "countersink":
        wall, made = _countersink(g, h, r, R, wf0, wt0, label, near, rec)
    else:
        wall, made = _blind(g, h, kind, r, R, wt0, label, far, rec)
    tools += made
    at = wall.at
    rec.update(wall_mm=wall.mm, wall_what=wall.what, wall_at=[float(at[0]), float(at[1])],
               wall_z=sorted([g.zt(wall.w_lo), g.zt(wall.w_hi)]))
    if wall.mm <= 0:
        side = near if kind in ("counterbore", "countersink") else far
        problems.append(f"{label}: the {kind} hole breaks through the {side} side "
                        f"(wall {wall.mm:.2f} mm at x={at[0]:.1f}, y={at[1]:.1f})")
    elif wall.mm < ms.min_wall:
        problems.append(f"{label}: the {kind} hole leaves {wall.mm:.2f} mm ({wall.what}) at x={at[0]:.1f}, "
                        f"y={at[1]:.1f}, less than min_wall = {ms.min_wall:g} mm")
    return rec


def _scan_pad(g: _Pad, keep_out, pad_z: float) -> _PadScan:
    """Walk the footprint's grid: where the plane cuts, how deep, the gaps, the far-skin wall."""
    xs = np.linspace(g.x0, g.x1, 61)
    ys = np.linspace(g.y0, g.y1, 31)
    wp = g.wp
    sc = _PadScan()
    for y in ys:
        wf, wn = g.S.w(xs, float(y))
        sc.n_all += len(xs)
        have = ~np.isnan(wf)
        sc.skin_w += list(wn[have])
        cut = have & (wn > wp)
        sc.n_cut += int(cut.sum())
        if (have & ~cut).any():
            sc.gap = max(sc.gap, float((wp - wn[have & ~cut]).max()))
            sc.nearest = min(sc.nearest, float((wp - wn[have & ~cut]).min()))
        if not cut.any():
            continue
        k = int(np.argmax(np.where(cut, wn, -np.inf)))
        if wn[k] - wp > sc.depth:
            sc.depth, sc.deepest = float(wn[k] - wp), (float(xs[k]), float(y))
        bad = cut & (wf >= wp)
        if bad.any() and sc.through is None:
            sc.through = (float(xs[bad][0]), float(y))
        free = np.array([all(math.hypot(x - hx, y - hy) > hr + 0.5 for hx, hy, hr in keep_out) for x in xs])
        m = cut & free
        if m.any():
            wall = wp - wf
            k = int(np.argmin(np.where(m, wall, np.inf)))
            if wall[k] < sc.min_wall[0]:
                sc.min_wall = (float(wall[k]), (float(xs[k]), float(y)), (float(pad_z), float(g.sgn * wf[k])))
    return sc


def _pad_record(g: _Pad, sc: _PadScan, ms, auto: bool, where: str, near: str, far: str,
                problems: list[str]) -> dict:
    """The pad's report entry; its problems (nothing flat, cutting through, thin wall) into ``problems``."""
    n_cut, n_all, gap, nearest, min_wall = sc.n_cut, sc.n_all, sc.gap, sc.nearest, sc.min_wall
    zs = sorted(g.sgn * v for v in (min(sc.skin_w), max(sc.skin_w))) if sc.skin_w else None
    pad = {"side": ms.side, "z": ms.pad_z, "x": list(ms.pad_x), "y": [g.y0, g.y1],
           "flat_fraction": n_cut / n_all, "max_cut_mm": sc.depth, "max_gap_mm": gap,
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
    elif sc.through is not None:
        problems.append(f"{where} pad: the plane z = {ms.pad_z:g} mm cuts through the {far} skin at "
                        f"x={sc.through[0]:.1f}, y={sc.through[1]:.1f}")
    elif min_wall[1] is not None:
        pad.update(wall_mm=min_wall[0], wall_at=list(min_wall[1]), wall_z=sorted(min_wall[2]))
        if min_wall[0] < ms.min_wall:
            problems.append(f"{where} pad: leaves {min_wall[0]:.2f} mm to the {far} skin at x={min_wall[1][0]:.1f}, "
                            f"y={min_wall[1][1]:.1f}, less than min_wall = {ms.min_wall:g} mm")
    return pad


def plan_mount(model, ms) -> MountPlan:
    """Pad and hole tools of ``model`` (a horizontal SurfaceModel) for the MountSpec ``ms``,
    with every wall measured; problems are collected, not raised."""
    sgn = 1 if ms.side == "upper" else -1
    near, far = (ms.side, "lower" if ms.side == "upper" else "upper")
    S = _Sections(model, sgn)
    auto = ms.pad_z == "auto"
    if auto:
        ms = _auto_pad_z(S, ms, sgn, model.name)
        if isinstance(ms, MountPlan):
            return ms
    w_all = sgn * model.skin.poles.reshape(-1, 3)[:, 2]
    x0, x1 = ms.pad_x
    g = _Pad(S, sgn, sgn * ms.pad_z, x0, x1, ms.pad_y - 0.5 * ms.pad_width, ms.pad_y + 0.5 * ms.pad_width,
             float(w_all.min()) - TOOL_MARGIN, float(w_all.max()) + TOOL_MARGIN)
    problems: list[str] = []
    where = f'surface "{model.name}" mount'
    tools: list[Tool] = []
    holes = []
    for i, h in enumerate(ms.hole):
        rec = _plan_hole(g, ms, i, h, where, near, far, tools, problems)
        if rec is not None:
            holes.append(rec)
    # the hole features, (x, y, radius): the pad's wall is measured away from them
    keep_out = [(h.x, h.y, _hole_kind(h)[1]) for h in ms.hole]
    sc = _scan_pad(g, keep_out, ms.pad_z)
    pad = _pad_record(g, sc, ms, auto, where, near, far, problems)
    if sc.n_cut:
        zlo, zhi = (ms.pad_z, sgn * g.w_max) if sgn > 0 else (sgn * g.w_max, ms.pad_z)
        probe = (sc.deepest[0], sc.deepest[1], g.zt(g.wp + 0.5 * sc.depth)) if sc.depth > 0.02 and sc.deepest \
            else None
        tools.insert(0, Tool("box", (x0, g.y0, zlo), (0, 0, 1), zhi - zlo, xdir=(1, 0, 0), size=(x1 - x0, g.y1 - g.y0),
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
