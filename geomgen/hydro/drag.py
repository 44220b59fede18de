"""Drag, power and lift-to-drag ratio of the trimmed set over the speed range (first estimates).

Each term is named with its source:

* friction line: ITTC-1957 model-ship correlation line, C_F = 0.075/(log₁₀Re − 2)² (ITTC
  1957; e.g. Tupper, *Introduction to Naval Architecture*, Table 8.3: C_F(1e6) = 0.004688);
* profile drag of a section: C_d = 2 C_F (1 + 2 t/c + 60 (t/c)⁴), both sides wetted, with
  Hoerner's thickness form factor (*Fluid-Dynamic Drag*, ch. 6; quoted from memory), per
  lattice strip at its own Reynolds number V c/ν, fully turbulent (no laminar run: high);
* induced drag: the lattice's Trefftz-plane drag (free-surface images included);
* mast below the still water: the same profile drag per unit length;
* spray where the mast pierces the surface: D = 0.24 q t² (Hoerner, *Fluid-Dynamic Drag*,
  ch. 10, surface-piercing struts; quoted from memory);
* junction of the mast with the fuselage: D = q t² (0.75 t/c − 0.0003/(t/c)²), at least 0
  (Hoerner, *Fluid-Dynamic Drag*, ch. 8, strut–wall junction; quoted from memory).

Not counted: the fuselage, wave making (high-Froude limit), ventilation, the board.
"""

from __future__ import annotations

import math

import numpy as np

from .results import Performance
from .trim import trim_point
from .water import G

KMH = 1.0 / 3.6

SOURCES = [
    "friction: ITTC-1957 line C_F = 0.075/(log10 Re − 2)², fully turbulent",
    "profile: 2 C_F (1 + 2 t/c + 60 (t/c)^4), Hoerner, Fluid-Dynamic Drag ch. 6 (from memory)",
    "induced: Trefftz plane of the lattice (free-surface images included)",
    "mast spray: 0.24 q t², Hoerner, Fluid-Dynamic Drag ch. 10 (from memory)",
    "mast junction: q t² (0.75 t/c − 0.0003/(t/c)²), Hoerner, Fluid-Dynamic Drag ch. 8 (from memory)",
    "not counted: fuselage, wave making, ventilation, board",
]


def ittc57(re):
    """ITTC-1957 friction coefficient at Reynolds number ``re``."""
    return 0.075 / (np.log10(np.asarray(re, float)) - 2.0) ** 2


def form_factor(tc):
    """Hoerner's thickness form factor of a section, 1 + 2 t/c + 60 (t/c)⁴ (from memory)."""
    tc = np.asarray(tc, float)
    return 1.0 + 2.0 * tc + 60.0 * tc**4


def section_cd(re, tc):
    """Profile drag coefficient of a section (both sides wetted) on its chord."""
    return 2.0 * ittc57(re) * form_factor(tc)


def spray_drag(q: float, t_m: float) -> float:
    """Spray drag of a strut of thickness ``t_m`` (m) piercing the surface at dynamic pressure ``q``, N."""
    return 0.24 * q * t_m * t_m


def junction_drag(q: float, t_m: float, tc: float) -> float:
    """Drag of a strut–wall junction, N (at least 0)."""
    return max(0.0, q * t_m * t_m * (0.75 * tc - 0.0003 / (tc * tc)))


class StripDrag:
    """Chord, width and t/c of the lattice strips (mm), for the profile drag."""

    def __init__(self, lat):
        self.lat = lat
        w = np.zeros(len(lat.strip_y))
        w[lat.strip] = lat.width
        self.width = w
        self.chord = lat.strip_chord
        cache = {}
        tc = []
        for k, y in enumerate(lat.strip_y):
            m = lat.models[lat.strip_surface[k]]
            key = (int(lat.strip_surface[k]), round(abs(y) if m.mirror else y, 6))
            if key not in cache:
                cache[key] = m.base_section(abs(y) if m.mirror else float(y)).max_thickness()[0]
            tc.append(cache[key])
        self.tc = np.array(tc)

    def per_surface(self, v: float, q: float, nu: float) -> np.ndarray:
        """(n_surfaces,) profile drag, N."""
        re = v * self.chord * 1e-3 / nu
        d = q * section_cd(re, self.tc) * self.chord * self.width * 1e-6
        return np.bincount(self.lat.strip_surface, d, minlength=len(self.lat.models))


def mast_geometry(mast, water_z):
    """Stations of a mast from its bottom (the junction) up to the still water or its top.

    Returns (span y (n,), chord mm (n,), t/c (n,), thickness at the top station mm, root
    thickness mm, root t/c, pierces the surface?)."""
    lo, hi = mast.y_range
    z_lo, z_hi = (float(mast.camber_points(y, [0.0])[0, 2]) for y in (lo, hi))
    y_bot, y_top = (lo, hi) if z_lo <= z_hi else (hi, lo)
    z_bot, z_top = min(z_lo, z_hi), max(z_lo, z_hi)
    pierces = water_z is not None and z_bot < water_z < z_top
    if pierces:
        y_top = y_bot + (y_top - y_bot) * (water_z - z_bot) / (z_top - z_bot)
    ys = np.linspace(y_bot, y_top, 41)
    c = np.asarray(mast.chord(ys), float)
    tc = np.array([mast.base_section(abs(y) if mast.mirror else float(y)).max_thickness()[0] for y in (y_bot, y_top)])
    tcs = np.linspace(tc[0], tc[1], len(ys))
    return ys, c, tcs, float(c[-1] * tcs[-1]), float(c[0] * tcs[0]), float(tcs[0]), pierces


def mast_drag(mast, water_z, v: float, q: float, nu: float) -> dict:
    """Mast drag terms at speed ``v`` m/s, N: ``profile``, ``spray``, ``junction``."""
    ys, c, tc, t_wl, t_root, tc_root, pierces = mast_geometry(mast, water_z)
    cd = section_cd(v * c * 1e-3 / nu, tc)
    per_len = q * cd * c * 1e-3                                   # N per m of span
    prof = float(np.sum(0.5 * (per_len[1:] + per_len[:-1]) * np.abs(np.diff(ys)) * 1e-3))
    return dict(profile=prof, spray=spray_drag(q, t_wl * 1e-3) if pierces else 0.0,
                junction=junction_drag(q, t_root * 1e-3, tc_root))


def point(flow, ctx, strips, all_models, water, water_z, mass_kg, v_kmh, weight_x=None, cl_max=None):
    """Drag, power and L/D at one trimmed speed (dict), or None when the set does not trim."""
    tp = trim_point(flow, ctx, v_kmh, mass_kg, water, weight_x, cl_max=cl_max)
    if not tp.trimmable:
        return None
    v = v_kmh * KMH
    q = 0.5 * water.density * v * v
    prof = strips.per_surface(v, q, water.viscosity)
    names = [m.name for m in flow.lat.models]
    parts = {f"{n} profile": float(d) for n, d in zip(names, prof)}
    parts["induced"] = tp.induced_drag_n
    for m in all_models:
        if m.role in ("mast", "fin"):
            md = mast_drag(m, water_z if m.role == "mast" else None, v, q, water.viscosity)
            parts[f"{m.name} profile"] = md["profile"]
            if m.role == "mast":
                parts[f"{m.name} spray"], parts[f"{m.name} junction"] = md["spray"], md["junction"]
    total = float(sum(parts.values()))
    weight = mass_kg * G
    return dict(speed_kmh=v_kmh, speed_ms=v, attitude_deg=tp.attitude_deg, lift_n=tp.lift_n, drag_n=parts,
                total_n=total, total_kgf=total / G, power_w=total * v, l_over_d=weight / total)


def performance(flow, ctx, all_models, water, water_z, mass_kg, speeds_kmh, takeoff, cavitation_kmh,
                cl_max_given: bool) -> Performance:
    """Drag over the ``[flight]`` speeds (those that trim) and a sweep from takeoff to first
    cavitation (for the plot)."""
    strips = StripDrag(flow.lat)
    cl_max = takeoff.cl_max if takeoff is not None else None
    pts = [p for p in (point(flow, ctx, strips, all_models, water, water_z, mass_kg, v, cl_max=cl_max)
                       for v in speeds_kmh) if p]
    lo = takeoff.speed_kmh if takeoff is not None and math.isfinite(takeoff.speed_kmh) else min(speeds_kmh)
    hi = cavitation_kmh if cavitation_kmh is not None and math.isfinite(cavitation_kmh) else max(speeds_kmh) * 1.5
    sweep = [p for p in (point(flow, ctx, strips, all_models, water, water_z, mass_kg, float(v))
                         for v in np.linspace(lo, max(hi, lo + 1.0), 25)) if p]
    notes = [f"takeoff from a section cl max of {takeoff.cl_max:g} "
             f"({'given' if cl_max_given else 'default, common practice, no source'})"
             if takeoff is not None else "no takeoff estimate"]
    return Performance(points=pts, sweep=sweep, takeoff_kmh=lo if takeoff is not None else math.nan,
                       first_cavitation_kmh=cavitation_kmh if cavitation_kmh is not None else math.nan,
                       envelope_kmh=[lo, hi] if takeoff is not None else [math.nan, hi],
                       sources=SOURCES, notes=notes)
