"""Undercut check of the two mould halves for 3-axis machining from the parting side (numpy).

Each mould half's cavity holds the part's material on its side of the parting surface and is
cut by a tool moving along the root normal from the parting surface into the block. In a
section (a plane of constant span) the part's material on the half's side of the parting
line must then reach the parting line in every column along the machining direction: where
a column's material starts beyond the parting line, the tool would have to pass through mould
material to reach it (an undercut). Reported per half: the worst horizontal overhang beyond
the cavity's opening (how far the hidden material reaches past the last column the tool can
reach), its depth behind the parting line, and where (span position, leading or trailing
edge side).
"""

from __future__ import annotations

import numpy as np

from .mould import RootFrame, chord_points

#: overhang below this is the polygon's own resolution, not an undercut, mm
UNDERCUT_TOL_MM = 0.05


def _section_xz(skin, rf: RootFrame, y: float, n: int) -> np.ndarray:
    """Closed section outline at span ``y`` in (chord, normal) coordinates from the root LE."""
    p = skin.evaluate(np.linspace(skin.u_range[0], skin.u_range[1], n), [float(y)])[:, 0]
    q = p - rf.le
    return np.column_stack([q @ rf.chord, q @ rf.normal])


def _parting_z(skin, rf: RootFrame, y: float, parting: str):
    """The parting line of the section at ``y`` as a function X -> Z."""
    if parting == "root-chord":
        return lambda X: np.zeros_like(X)
    le, te = chord_points(skin, float(y))
    a = np.array([(le - rf.le) @ rf.chord, (le - rf.le) @ rf.normal])
    b = np.array([(te - rf.le) @ rf.chord, (te - rf.le) @ rf.normal])
    k = (b[1] - a[1]) / (b[0] - a[0])
    return lambda X: a[1] + k * (X - a[0])


def section_undercut(poly: np.ndarray, zp, side: int, columns: int = 1200) -> dict:
    """Undercut of one half (``side`` +1: the material above the parting line, -1: below) in
    one section polygon (k, 2) with the parting line ``zp`` (X -> Z)."""
    X = np.linspace(poly[:, 0].min(), poly[:, 0].max(), columns)[1:-1]
    a, b = poly, np.roll(poly, -1, axis=0)
    dx = b[:, 0] - a[:, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (X[:, None] - a[None, :, 0]) / dx[None, :]
    ok = (t >= 0) & (t < 1) & (np.abs(dx)[None, :] > 1e-15)
    Z = np.where(ok, a[None, :, 1] + t * (b[None, :, 1] - a[None, :, 1]), np.nan)
    z0 = zp(X)
    reach = np.zeros(len(X), bool)  # the half has material here and it touches the parting line
    hidden = np.zeros(len(X))  # depth of mould material between the parting line and hidden material
    for i in range(len(X)):
        zs = np.sort(Z[i][~np.isnan(Z[i])]) * side
        if len(zs) < 2:
            continue
        ints = [(lo, hi) for lo, hi in zip(zs[0::2], zs[1::2])]
        zz = z0[i] * side
        mine = [(max(lo, zz), hi) for lo, hi in ints if hi > zz + 1e-9]
        if not mine:
            continue
        first = mine[0]
        reach[i] = first[0] <= zz + 1e-9
        gaps = [m[0] - zz for m in mine if m[0] > zz + 1e-9]
        if gaps:
            hidden[i] = max(gaps)
    bad = hidden > UNDERCUT_TOL_MM
    if not bad.any():
        return {"overhang_mm": 0.0, "leading_mm": 0.0, "trailing_mm": 0.0, "depth_mm": 0.0, "edge": None}
    xr = X[reach]
    lo, hi = (xr.min(), xr.max()) if len(xr) else (X.mean(), X.mean())
    le = float(np.max(np.where(bad & (X < lo), lo - X, 0.0)))
    te = float(np.max(np.where(bad & (X > hi), X - hi, 0.0)))
    return {"overhang_mm": max(le, te), "leading_mm": le, "trailing_mm": te, "depth_mm": float(hidden[bad].max()),
            "edge": "leading" if le >= te else "trailing"}


def undercuts(model, skin, rf: RootFrame, parting: str, n_sections: int = 41, n: int = 600) -> dict:
    """Worst undercut of each half over the span: {half: {overhang_mm, depth_mm, y, edge}}."""
    y0, y1 = skin.v_range
    ys = np.unique(np.concatenate([np.linspace(y0, y1, n_sections), [v for v in model.loft_breaks() if y0 < v < y1]]))
    out = {}
    for half, side in (("upper", 1), ("lower", -1)):
        worst = {"overhang_mm": 0.0, "depth_mm": 0.0, "y": None, "edge": None}
        for y in sorted(ys, key=lambda v: (abs(v), -v)):  # of two mirrored equals, the starboard one
            r = section_undercut(_section_xz(skin, rf, y, n), _parting_z(skin, rf, y, parting), side)
            if r["edge"] is not None and (r["overhang_mm"], r["depth_mm"]) > (worst["overhang_mm"], worst["depth_mm"]):
                worst = {"overhang_mm": r["overhang_mm"], "depth_mm": r["depth_mm"], "y": float(y), "edge": r["edge"]}
        out[half] = worst
    return out


def undercut_at(skin, rf: RootFrame, parting: str, y: float, half: str = "upper", n: int = 1200) -> dict:
    """The undercut of one half in the section at span ``y`` (finer than the span survey)."""
    return section_undercut(_section_xz(skin, rf, y, n), _parting_z(skin, rf, y, parting),
                            1 if half == "upper" else -1, columns=4000)


def undercut_words(name: str, parting: str, found: dict) -> list[str]:
    """Warnings for the summary: each half with an undercut, worst first, and what to do."""
    out = []
    for half, w in found.items():
        if w["edge"] is None:
            continue
        out.append(f'mould {half} half of "{name}" has an UNDERCUT for 3-axis machining from the parting side: '
                   f"material of the part reaches {w['overhang_mm']:.1f} mm past the cavity's opening on the "
                   f"{w['edge']} edge side at span {w['y']:.0f} mm ({w['depth_mm']:.1f} mm behind the parting "
                   "surface); the part would lock in the mould"
                   + ('; parting = "stations" follows each section\'s chord line' if parting == "root-chord" else ""))
    return out
