"""Cavitation onset: each strip's own section at its lattice lift coefficient, against σ.

For every strip of the lattice the 2D panel method (:mod:`geomgen.hydro.panel2d`) solves the
strip's unfinished section (the geometry model's ``base_section``) once; at a trimmed speed
V the lattice gives the strip's section lift coefficient cl = 2Γ/(V c), the panel method its
Cp,min at that cl, and the strip cavitates when −Cp,min ≥ σ with the cavitation number

    σ = (p_atm + ρ g h − p_v) / (½ ρ V²)

at the strip's depth h below the still water. Masts and fins run at zero lift (no
sideslip); a mast that pierces the surface is taken at the still-water line (h = 0, the
lowest σ along it). Without a water level every surface is taken at h = 0 (early, on the
safe side). The onset speed is the lowest trimmed speed at which any strip of the surface
cavitates, found on a 1 m/s grid and refined by bisection to 2e-5 m/s.
"""

from __future__ import annotations

import math

import numpy as np

from .panel2d import section_flow, section_flows
from .results import Cavitation
from .solve import solve_attitude
from .water import P_ATM, G

KMH = 1.0 / 3.6
V_STEP = 1.0       #: m/s, grid of the onset search (then bisection)
V_TOP = 45.0       #: m/s (162 km/h), end of the onset search


def sigma(v_ms: float, depth_m, rho: float, p_vapour: float, p_atm: float = P_ATM):
    """Cavitation number (p_atm + ρ g h − p_v)/(½ ρ V²) at depth ``depth_m`` (m) and speed ``v_ms``."""
    return (p_atm + rho * G * np.asarray(depth_m, float) - p_vapour) / (0.5 * rho * v_ms * v_ms)


class StripSections:
    """Panel solutions of the sections of the lattice strips of some surfaces (mirror halves shared)."""

    def __init__(self, lat, surfaces):
        self.idx = np.flatnonzero(np.isin(lat.strip_surface, surfaces))
        keys, secs = [], {}
        for k in self.idx:
            m = lat.models[lat.strip_surface[k]]
            y = float(lat.strip_y[k])
            key = (int(lat.strip_surface[k]), round(abs(y) if m.mirror else y, 6))
            if key not in secs:
                secs[key] = m.base_section(abs(y) if m.mirror else y)
            keys.append(key)
        solved = dict(zip(secs, section_flows(list(secs.values()))))
        self.n_sections = len(secs)
        flows = [solved[k] for k in keys]
        self.vt = np.stack([f.vt for f in flows])               # (S, 2, P)
        self.cl_unit = np.stack([f.cl_unit for f in flows])    # (S, 2)
        self.x = np.stack([f.x for f in flows])
        self.upper = np.stack([f.upper for f in flows])

    def cp_min(self, cl: np.ndarray):
        """(S,) Cp,min and (S,) panel index of it at section lift coefficients ``cl`` (S,)."""
        a, b = self.cl_unit[:, 0], self.cl_unit[:, 1]
        r, d = np.hypot(a, b), np.arctan2(b, a)
        ac = np.arccos(np.clip(cl / r, -1.0, 1.0))
        al = np.where(np.abs(d - ac) <= np.abs(d + ac), d - ac, d + ac)
        v = np.cos(al)[:, None] * self.vt[:, 0] + np.sin(al)[:, None] * self.vt[:, 1]
        cp = 1.0 - v * v
        i = np.argmin(cp, axis=1)
        return cp[np.arange(len(cp)), i], i


def _strip_depth_m(lat, idx, water_z):
    if water_z is None:
        return np.zeros(len(idx))
    z = np.bincount(lat.strip, lat.colloc[:, 2], minlength=len(lat.strip_y)) / \
        np.maximum(np.bincount(lat.strip, minlength=len(lat.strip_y)), 1)
    return np.maximum(water_z - z[idx], 0.0) * 1e-3


def _vertical(model, water, water_z):
    """Onset of a mast or fin at zero lift: at the still-water line, or at its shallowest point."""
    lo, hi = model.y_range
    ys = np.linspace(lo, hi, 25)
    z = np.array([model.camber_points(y, [0.25])[0, 2] for y in ys])
    if water_z is None or z.max() >= water_z:
        k = int(np.argmin(np.abs(z - water_z))) if water_z is not None and z.min() < water_z else len(ys) - 1
        depth = 0.0
    else:
        k, depth = int(np.argmax(z)), (water_z - float(z.max())) * 1e-3
    f = section_flow(model.base_section(abs(ys[k]) if model.mirror else ys[k]))
    cp, x, up = f.cp_min(0.0)
    v = (math.sqrt((P_ATM + water.density * G * depth - water.vapour_pa) / (0.5 * water.density * -cp))
         if cp < 0 else math.nan)
    return dict(name=model.name, role=model.role, onset_ms=v, onset_kmh=v / KMH, y_mm=float(ys[k]), x_over_c=x,
                side="either side (zero lift)", cl=0.0, cp_min=cp, depth_mm=depth * 1e3,
                where="at the still-water line" if depth == 0.0 and water_z is not None else
                ("no water level: taken at the surface" if water_z is None else "shallowest point"))


def cavitation(flow, ctx, all_models, water, water_z, mass_kg: float, v_start_ms: float,
               trim_speeds_kmh=()) -> Cavitation:
    """Cavitation onset per surface (the pitch lattice's lifting surfaces, masts and fins).

    Parameters
    ----------
    flow : Flow, ctx : Context
        The solved pitch lattice (free surface included when given) and its references.
    all_models : list of SurfaceModel
    water : Water
    water_z : float or None
        Datum z of the still water, mm.
    mass_kg : float
    v_start_ms : float
        Lowest speed searched (the takeoff speed when known), m/s.
    trim_speeds_kmh : sequence
        Speeds at which the worst margin σ + Cp,min is listed.
    """
    lat = flow.lat
    n_surf = len(lat.models)
    secs = StripSections(lat, list(range(n_surf)))
    idx = secs.idx
    depth = _strip_depth_m(lat, idx, water_z)
    s_ref = ctx.s_ref * 1e-6
    weight = mass_kg * G

    def state(v):
        """Margins −Cp,min − σ (S,), Cp,min, its panel, cl, or None if the set does not trim at v."""
        cl_set = weight / (0.5 * water.density * v * v * s_ref)
        a = solve_attitude(lambda al: float(flow.loads(al, ctx.ref)["lift"].sum()) / (0.5 * ctx.s_ref), cl_set)
        if not math.isfinite(a):
            return None
        cl = 2.0 * flow.strip_gamma(a)[idx] / lat.strip_chord[idx]
        cp, i = secs.cp_min(cl)
        return -cp - sigma(v, depth, water.density, water.vapour_pa), cp, i, cl

    surf_of = lat.strip_surface[idx]
    grid = np.arange(max(v_start_ms, V_STEP), V_TOP + 1e-9, V_STEP)
    states = [(v, state(v)) for v in grid]
    out = []
    for s in range(n_surf):
        sel = surf_of == s
        prev: float | None = None
        found: tuple[float | None, float] | None = None
        for v, st in states:
            if st is None:
                continue
            if st[0][sel].max() >= 0.0:
                found = (prev, v)
                break
            prev = v
        m = lat.models[s]
        rec = dict(name=m.name, role=m.role, onset_ms=math.nan, onset_kmh=math.nan, y_mm=math.nan, x_over_c=math.nan,
                   side="", cl=math.nan, cp_min=math.nan, depth_mm=math.nan,
                   where=f"no cavitation up to {V_TOP / KMH:.0f} km/h")
        if found is not None:
            lo, hi = found
            if lo is not None:
                for _ in range(16):
                    mid = 0.5 * (lo + hi)
                    st = state(mid)
                    if st is not None and st[0][sel].max() >= 0.0:
                        hi = mid
                    else:
                        lo = mid
            else:
                rec["where"] = "already at the lowest speed searched"
            marg, cp, i, cl = state(hi)
            k = np.flatnonzero(sel)[int(np.argmax(marg[sel]))]
            j = idx[k]
            rec.update(onset_ms=hi, onset_kmh=hi / KMH, y_mm=float(lat.strip_y[j]), x_over_c=float(secs.x[k, i[k]]),
                       side="upper" if secs.upper[k, i[k]] else "lower", cl=float(cl[k]), cp_min=float(cp[k]),
                       depth_mm=float(depth[k] * 1e3), where=rec["where"] if lo is None else "first strip to cavitate")
        out.append(rec)
    out += [_vertical(m, water, water_z) for m in all_models if m.role in ("mast", "fin")]
    at = []
    for v_kmh in trim_speeds_kmh:  # below the lowest speed searched (takeoff) the set does not fly
        st = state(v_kmh * KMH) if v_kmh * KMH >= v_start_ms * (1.0 - 1e-9) else None
        row = dict(speed_kmh=v_kmh)
        for s in range(n_surf):
            sel = surf_of == s
            row[lat.models[s].name] = None if st is None else float(-st[0][sel].max())
        at.append(row)
    fin = [r for r in out if math.isfinite(r["onset_ms"])]
    first = min(fin, key=lambda r: r["onset_ms"]) if fin else None
    notes = ["2D linear-strength vortex panels (Katz & Plotkin, ch. 11) on each strip's own section at its lattice "
             "cl; inviscid: no boundary layer, no laminar bubble, no tip-vortex cavitation (which often comes first), "
             "no nuclei or surface roughness (onset in practice can be earlier)",
             f"σ = (p_atm + ρ g h − p_v)/(½ ρ V²), p_atm = {P_ATM:g} Pa, p_v = {water.vapour_pa:g} Pa"
             + ("" if water_z is not None else "; no water level given: every surface taken at the surface, h = 0")]
    return Cavitation(surfaces=out, first_kmh=first["onset_kmh"] if first else math.nan,
                      first_surface=first["name"] if first else None, margin_at_speeds=at,
                      sections_solved=secs.n_sections, notes=notes)
