"""Printable pieces plan: scale, trailing-edge thickening, joints, locators, spar channels and
print poses (numpy only).

Design lengths (the part, span positions, features cut into it) are full size; hardware and
printer sizes (rod and pin diameters, clearances, walls, build volume) are printed mm and
are divided by the scale before they are cut into the full-size part. Walls are measured on
the geometry model's sections (planes of constant span) as the distance from a hole's or
channel's centre to the section outline, less its radius.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import GeometryError
from ..geometry.surface import SurfaceModel
from .frame import Frame, Tool, clearance, cylinder_between, line_crossings, rotations24, section_local, slot_tools


@dataclass
class Piece:
    index: int
    span: tuple[float, float]
    dims_local: np.ndarray  # design mm along local X, Y, Z
    outboard: int  # +1 / -1: local span direction that points up in the upright pose
    M: np.ndarray  # printer = M @ local (a rotation)
    pose: str
    fits: bool | None


@dataclass
class PrintPlan:
    model: SurfaceModel
    scale: float
    bounds: list[float]
    pieces: list[Piece]
    tools: list[Tool]
    joints: list[dict]
    spars: list[dict]
    te_mm: float
    problems: list[str] = field(default_factory=list)
    split_how: str = "none"


def printing_model(model: SurfaceModel, ps) -> tuple[SurfaceModel, list[str]]:
    """The model with its trailing edge raised to ``min_te`` printed mm (if asked)."""
    if ps.min_te is None or ps.min_te / ps.scale <= model.te_thickness:
        return model, []
    new = model.with_te_thickness(ps.min_te / ps.scale)
    where = sorted({float(abs(v)) for seg in new.loft_y() for v in seg})
    bad = new.te_too_thick(where)
    if bad:
        y, limit, _ = min(bad, key=lambda b: b[1])
        return model, [f'surface "{model.name}" printing min_te: {ps.min_te:g} printed mm ({ps.min_te / ps.scale:.2f} '
                       f"mm full size) is thicker than the section can take at y = {y:.1f} mm (at most "
                       f"{limit:.2f} mm full size)"]
    return new, []


def extents_local(model, a: float, b: float) -> np.ndarray:
    """(3,) extents (X, Y, Z) of the part between span positions a < b, local frame, mm."""
    ys = np.linspace(a, b, max(3, int(math.ceil((b - a) / 10.0)) + 1))
    ys = np.unique(np.concatenate([ys, [v for v in model.loft_breaks() if a < v < b]]))
    polys = np.concatenate([section_local(model, float(y), 48) for y in ys])
    return np.array([np.ptp(polys[:, 0]), b - a, np.ptp(polys[:, 1])])


def choose_pose(dims_print: np.ndarray, outboard: int, volume) -> tuple[np.ndarray, str, bool | None]:
    """Rotation printer = M @ local: upright (span up, inner face on the bed) if it fits, else lying
    flat (upper side up), else any axis-aligned pose that fits."""
    best = None
    for M in rotations24():
        up = M[:, 1] * outboard
        if up[2] == 1 and M[0, 0] == 1:
            pref, name = 0, "upright"
        elif up[2] == 1:
            pref, name = 1, "upright"
        elif M[2, 2] == 1 and abs(M[0, 1]) == 1:
            pref, name = 2, "flat"
        elif M[2, 2] == 1:
            pref, name = 3, "flat"
        else:
            pref, name = 4, "on edge"
        d = np.abs(M) @ dims_print
        fits = None if volume is None else bool((d <= np.asarray(volume) + 1e-6).all())
        key = (0 if fits in (None, True) else 1, pref)
        if best is None or key < best[0]:
            best = (key, M, name, fits)
    assert best is not None  # at least one axis-aligned pose
    return best[1], best[2], best[3]


def _fits(model, a, b, scale, volume) -> bool:
    d = np.sort(extents_local(model, a, b) * scale)
    return bool((d <= np.sort(np.asarray(volume)) + 1e-6).all())


def _grow(model, a, limit, scale, volume, avoid, tol=0.5) -> float:
    """Largest b in (a, limit] with [a, b] fitting and b outside the avoided intervals."""
    if _fits(model, a, limit, scale, volume):
        b = limit
    else:
        lo, hi = a, limit
        if not _fits(model, a, a + tol, scale, volume):
            return a
        while hi - lo > tol:
            mid = 0.5 * (lo + hi)
            lo, hi = (mid, hi) if _fits(model, a, mid, scale, volume) else (lo, mid)
        b = lo
    for lo_, hi_ in avoid:
        if lo_ < b < hi_ and b < limit:
            b = lo_
    return b


def _widest_centre(model, y_hi, scale, volume, avoid) -> float:
    """Half width c of the widest centre piece [-c, c] that fits (an odd piece count), kept out of ``avoid``."""
    lo, hi = 0.0, y_hi
    if _fits(model, -hi, hi, scale, volume):
        return hi
    while hi - lo > 0.5:
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if _fits(model, -mid, mid, scale, volume) else (lo, mid)
    c = lo
    for alo, ahi in avoid:
        if alo < c < ahi:
            c = alo
    return c


def auto_split(model, scale, volume, odd: bool, avoid) -> tuple[list[float], str]:
    """Joint positions so every piece fits ``volume``; symmetric on a mirrored part."""
    y_lo, y_hi = model.y_range

    def outward(start):
        cuts, a = [], start
        while a < y_hi - 1e-9:
            b = _grow(model, a, y_hi, scale, volume, avoid)
            if b <= a + 1e-9:
                raise GeometryError(
                    f'surface "{model.name}" printing: the part at span {a:.1f} mm (about '
                    f"{' x '.join(f'{v:.0f}' for v in extents_local(model, a, a + 1) * scale)} printed mm) "
                    f"does not fit the build volume {' x '.join(f'{v:g}' for v in volume)} mm in any axis-aligned pose")
            if b < y_hi - 1e-9:
                cuts.append(b)
            a = b
        # even out the pieces beyond ``start`` when equal lengths fit too (one piece fewer if
        # the greedy split left a sliver)
        k = len(cuts) + 1
        for kk in (k - 1, k):
            eq = list(np.linspace(start, y_hi, kk + 1)[1:-1])
            if kk >= 1 and all(_fits(model, p, q, scale, volume) for p, q in zip([start] + eq, eq + [y_hi])) \
                    and not any(lo < c < hi for c in eq for lo, hi in avoid):
                return eq
        return cuts

    if not model.mirror:
        cuts = outward(y_lo)
        return cuts, f"{len(cuts) + 1} piece(s) from the root"
    options = []
    if not odd and not any(lo < 0.0 < hi for lo, hi in avoid):
        half = outward(0.0)
        options.append(([-c for c in half[::-1]] + [0.0] + half, "even"))
    c = _widest_centre(model, y_hi, scale, volume, avoid)
    if c >= y_hi - 1e-9:
        options.append(([], "odd"))
    elif c > 0.5:
        half = outward(c)
        options.append(([-v for v in half[::-1]] + [-c, c] + half, "odd"))
    if not options:
        raise GeometryError(f'surface "{model.name}" printing: no centre piece fits the build volume '
                            f"{' x '.join(f'{v:g}' for v in volume)} mm")
    cuts, how = min(options, key=lambda o: (len(o[0]), o[1] != "odd"))
    return cuts, f"{len(cuts) + 1} pieces ({how} count)"


def _spar_point(model, y, f, h):
    sec = model.section(y)
    yu, yl = sec.surfaces_at(np.array([f]))
    return model.place(float(y), np.array([[f, float(yl[0] + h * (yu[0] - yl[0]))]]))[0]


def plan_spars(model, ps) -> tuple[list[Tool], list[dict], list[str]]:
    """Straight rod channels, each checked against the sections along its whole length."""
    F = Frame.of(model)
    s = ps.scale
    wall = ps.min_wall / s
    y_lo, y_hi = model.y_range
    tools, recs, problems = [], [], []
    for i, sp in enumerate(ps.spar):
        fa, fb = sp.chord_ends
        rods = [(tuple(sp.span), (fa, fb))]
        if model.mirror and sp.mirror and sp.span[0] >= 0:
            rods.append(((-sp.span[1], -sp.span[0]), (fb, fa)))
        for (ya, yb), (f1, f2) in rods:
            label = f'surface "{model.name}" printing spar[{i}] (span {ya:g} .. {yb:g} mm)'
            r = 0.5 * (sp.diameter + sp.clearance) / s
            if ya < y_lo + wall or yb > y_hi - wall:
                problems.append(f"{label}: the channel must end at least min_wall = {ps.min_wall:g} printed mm inside "
                                f"the part's ends (span {y_lo:g} .. {y_hi:g} mm)")
                continue
            A, B = _spar_point(model, ya, f1, sp.height), _spar_point(model, yb, f2, sp.height)
            Al, Bl = F.to_local(A), F.to_local(B)
            d = Bl - Al
            cos = abs(d[1]) / np.linalg.norm(d)
            r_eff = r / cos
            ys = np.linspace(ya, yb, max(41, int((yb - ya) / 2.0) + 1))
            worst: tuple[float, float | None] = (math.inf, None)
            for y in ys:
                c = Al + (y - ya) / (yb - ya) * d
                w = float(clearance(c[[0, 2]], section_local(model, float(y), 100))[0]) - r_eff
                if w < worst[0]:
                    worst = (w, float(y))
            rec = {"index": i, "diameter": sp.diameter, "channel_diameter": sp.diameter + sp.clearance,
                   "span": [ya, yb], "chord": [f1, f2], "start": A.tolist(), "end": B.tolist(),
                   "wall_printed_mm": worst[0] * s, "wall_at_y": worst[1]}
            recs.append(rec)
            if worst[0] < wall:
                ch = f"{label}: the Ø{sp.diameter + sp.clearance:g} mm channel"
                problems.append(f"{ch} breaks out of the skin at span {worst[1]:.1f} mm" if worst[0] < 0 else
                                f"{ch} leaves {worst[0] * s:.2f} printed mm of wall at span {worst[1]:.1f} mm, less "
                                f"than min_wall = {ps.min_wall:g} mm")
                continue
            tools.append(cylinder_between(A, B, r, label=label))
    return tools, recs, problems


def plan_locators(model, ps, joints, spars, mount_holes) -> tuple[list[Tool], list[dict], list[str]]:
    """A round pin hole (forward) and a slotted hole (aft) across each joint, where the section
    leaves min_wall around them and away from spar channels and mount holes."""
    lc = ps.locators
    if not lc.enabled or not joints:
        return [], [], []
    F = Frame.of(model)
    s = ps.scale
    r = 0.5 * (lc.pin_diameter + lc.clearance) / s
    dep = (0.5 * lc.pin_length + 0.5) / s
    ext = lc.slot_extra / s
    wall = ps.min_wall / s
    y_lo, y_hi = model.y_range
    tools, recs, problems = [], [], []
    for yj in joints:
        label = f'surface "{model.name}" printing joint at span {yj:g} mm'
        ys3 = [float(np.clip(v, y_lo, y_hi)) for v in (yj - dep, yj, yj + dep)]
        polys = [section_local(model, y, 150) for y in ys3]
        p0 = polys[1]
        xle, xte = p0[:, 0].min(), p0[:, 0].max()
        fs = np.arange(0.04, 0.92, 0.0025)
        X = xle + fs * (xte - xle)
        lo, hi = line_crossings(p0, X)
        pts = np.column_stack([X, 0.5 * (lo + hi)])
        good = ~np.isnan(pts[:, 1])

        def room(q):  # clearance of points q (k, 2) from outline, spars and mount holes, less the pin radius
            c = np.min([clearance(q, p) for p in polys], axis=0) - r
            for sp in spars:
                (ya, yb), A, B, rr = sp
                if ya - dep <= yj <= yb + dep:
                    t = np.clip((yj - ya) / (yb - ya), 0, 1)
                    cen = (A + t * (B - A))[[0, 2]]
                    c = np.minimum(c, np.linalg.norm(q - cen, axis=1) - r - rr)
            for hx, hy, hr in mount_holes:
                if abs(hy - yj) < dep + hr + wall:
                    hl = F.to_local(np.array([hx, hy, F.position[2]]))
                    c = np.minimum(c, np.abs(q[:, 0] - hl[0]) - r - hr)
            return c

        round_ok = good & (room(np.where(good[:, None], pts, 0.0)) >= wall)
        ia = [i for i in np.nonzero(round_ok)[0] if 0.12 <= fs[i] <= 0.5] or list(np.nonzero(round_ok)[0])
        if not ia:
            problems.append(f"{label}: no place for a Ø{2 * r * s:.2f} mm round locator hole with "
                            f"min_wall = {ps.min_wall:g} mm (section too thin, or spars and mount holes in the way)")
            continue
        a = ia[0]
        pa = pts[a]
        best = None
        for b in range(len(fs) - 1, a, -1):
            if not good[b] or pts[b, 0] - pa[0] < 2 * r + ext + wall or fs[b] > 0.8:
                continue
            u = (pts[b] - pa) / np.linalg.norm(pts[b] - pa)
            seg = pts[b] + np.linspace(-0.5 * ext, 0.5 * ext, 5)[:, None] * u
            if room(seg).min() >= wall:
                best = b
                break
        if best is None:
            problems.append(f"{label}: no place for the slotted locator hole aft of the round one with "
                            f"min_wall = {ps.min_wall:g} mm")
            continue
        pb = pts[best]
        u = (pb - pa) / np.linalg.norm(pb - pa)
        def to3(p, y):
            return F.to_datum(np.array([p[0], y, p[1]]))
        tools.append(cylinder_between(to3(pa, yj - dep), to3(pa, yj + dep), r, label=f"{label} round locator"))
        e1, e2 = pb - 0.5 * ext * u, pb + 0.5 * ext * u
        tools += slot_tools(to3(e1, yj - dep), to3(e2, yj - dep), F.span_axis, r, 2 * dep,
                            label=f"{label} slotted locator")
        wa = float(room(pa[None])[0]) * s
        wb = float(room(pb + np.linspace(-0.5 * ext, 0.5 * ext, 5)[:, None] * u).min()) * s
        recs.append({"y": yj, "hole_diameter": 2 * r * s, "depth_each_side": dep * s, "slot_length": (2 * r + ext) * s,
                     "round": {"chord_fraction": float(fs[a]), "datum": to3(pa, yj).tolist(), "wall_printed_mm": wa},
                     "slot": {"chord_fraction": float(fs[best]), "datum": to3(pb, yj).tolist(), "wall_printed_mm": wb}})
    return tools, recs, problems


def plan_printing(pm: SurfaceModel, ps, mount_tools=(), mount_holes=()) -> PrintPlan:
    """Everything to cut and split for printing the model ``pm`` (already through
    :func:`printing_model`); problems are collected, not raised."""
    model = pm
    problems: list[str] = []
    y_lo, y_hi = pm.y_range
    s = ps.scale
    avoid = [(hy - hr - 2.0, hy + hr + 2.0) for _, hy, hr in mount_holes]
    how = "none"
    if ps.split_at:
        cuts = list(ps.split_at)
        for c in cuts:
            if not (y_lo + 1.0 < c < y_hi - 1.0):
                problems.append(f'surface "{model.name}" printing split_at: {c:g} mm is not inside the part '
                                f"(span {y_lo:g} .. {y_hi:g} mm)")
            elif any(lo < c < hi for lo, hi in avoid):
                problems.append(f'surface "{model.name}" printing split_at: the joint at {c:g} mm cuts through a '
                                "mount hole; move it or use an odd count")
        how = f"{len(cuts) + 1} pieces at split_at"
    elif ps.build_volume is not None:
        cuts, how = auto_split(pm, s, ps.usable_volume, ps.odd_count, avoid)
    else:
        cuts = []
    bounds = [float(v) for v in [y_lo] + list(cuts) + [y_hi]]
    cuts = bounds[1:-1]
    pieces = []
    for i, (a, b) in enumerate(zip(bounds[:-1], bounds[1:])):
        dims = extents_local(pm, a, b)
        out = (-1 if 0.5 * (a + b) < -1e-9 else 1) if pm.mirror else 1
        M, pose, fits = choose_pose(dims * s, out, ps.usable_volume)
        pieces.append(Piece(i, (a, b), dims, out, M, pose, fits))
        if fits is False:
            problems.append(f'surface "{model.name}" printing: piece {i + 1} (span {a:.1f} .. {b:.1f} mm, '
                            f"{' x '.join(f'{v:.0f}' for v in dims * s)} printed mm) does not fit the build volume "
                            f"{' x '.join(f'{v:g}' for v in ps.usable_volume)} mm (after bed_margin)")
    spar_tools, spars, p2 = plan_spars(pm, ps)
    F = Frame.of(pm)
    spar_lines = [((sp["span"][0], sp["span"][1]), F.to_local(np.array(sp["start"])), F.to_local(np.array(sp["end"])),
                   0.5 * sp["channel_diameter"] / s) for sp in spars]
    loc_tools, joints, p3 = plan_locators(pm, ps, cuts, spar_lines, mount_holes)
    tools = list(mount_tools) + spar_tools + loc_tools
    return PrintPlan(pm, s, bounds, pieces, tools, joints, spars, pm.te_thickness, problems + p2 + p3, how)
