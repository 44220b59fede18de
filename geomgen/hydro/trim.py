"""Trim of the set at each speed (lift = weight) and the estimated takeoff speed.

The attitude is the angle between the free stream and the datum x axis (the fuselage
attitude); the free stream is rotated, not the geometry. Forces scale as ρV² from the
unit-speed, unit-density lattice solution: newtons = ρ V² · 1e-6 · (mm² result), newton
metres = ρ V² · 1e-9 · (mm³ result).
"""

from __future__ import annotations

import math

import numpy as np

from .results import Takeoff, TrimPoint
from .solve import solve_attitude
from .water import G

KMH = 1.0 / 3.6  #: m/s per km/h


def _strip_cl(flow, ctx, alpha: float, surface: int) -> tuple[np.ndarray, np.ndarray]:
    """Section lift coefficients and span coordinates (mm) of one surface's strips."""
    lat = flow.lat
    sel = lat.strip_surface == surface
    g = flow.strip_gamma(alpha)[sel]
    return 2.0 * g / lat.strip_chord[sel], lat.strip_y[sel]


def set_cl(flow, ctx, alpha: float) -> float:
    """Lift coefficient of the set (front-wing area) at ``alpha`` rad."""
    return float(flow.loads(alpha, ctx.ref)["lift"].sum() / (0.5 * ctx.s_ref))


def takeoff(flow, ctx, mass_kg: float, rho: float, cl_max: float) -> Takeoff:
    """Speed at which lift = weight with the front wing's most loaded strip at ``cl_max``.

    Linear lattice, so this is an estimate: the section stalls where the lattice says the
    local cl reaches the given section maximum, with no viscous or nonlinear effects.
    """
    iw = ctx.ref_index
    a = solve_attitude(lambda al: float(_strip_cl(flow, ctx, al, iw)[0].max()), cl_max)
    if not math.isfinite(a):
        return Takeoff(cl_max, math.nan, math.nan, math.nan, math.nan)
    cl, y = _strip_cl(flow, ctx, a, iw)
    c_set = set_cl(flow, ctx, a)
    v = math.sqrt(2.0 * mass_kg * G / (rho * ctx.s_ref * 1e-6 * c_set)) if c_set > 0 else math.nan
    return Takeoff(cl_max=cl_max, attitude_deg=math.degrees(a), speed_ms=v, speed_kmh=v / KMH,
                   limiting_y_mm=float(abs(y[int(np.argmax(cl))])))


def trim_point(flow, ctx, speed_kmh: float, mass_kg: float, water, weight_x_mm=None,
               v_takeoff: float | None = None) -> TrimPoint:
    """Solve the attitude for lift = weight at one speed and report the balance.

    Parameters
    ----------
    flow : Flow
        Solved pitch lattice.
    ctx : Context
        Reference quantities (see :mod:`geomgen.hydro.analysis`).
    speed_kmh : float
    mass_kg : float
    water : Water
    weight_x_mm : float, optional
        Datum x where the weight acts; gives the moment left over about it.
    v_takeoff : float, optional
        Estimated takeoff speed, m/s; flags trim points below it.
    """
    v = speed_kmh * KMH
    rho = water.density
    q = 0.5 * rho * v * v
    weight = mass_kg * G
    f_n, f_nm = rho * v * v * 1e-6, rho * v * v * 1e-9
    names = [m.name for m in ctx.models]
    re = {m.name: v * ctx.figures[i].mac_mm * 1e-3 / water.viscosity for i, m in enumerate(ctx.models)}
    a = solve_attitude(lambda al: set_cl(flow, ctx, al), weight / (q * ctx.s_ref * 1e-6))
    nan = math.nan
    below = None if v_takeoff is None or not math.isfinite(v_takeoff) else v < v_takeoff
    if not math.isfinite(a):
        return TrimPoint(speed_kmh=speed_kmh, speed_ms=v, dynamic_pressure_pa=q, attitude_deg=nan, cl=nan,
                         lift_n={}, lift_kgf={}, cl_peak={}, reynolds=re, cp_x_mm=nan, cp_from_mast_mm=nan,
                         moment_about_mast_nm=nan, induced_drag_n=nan, below_takeoff_speed=below)
    ld = flow.loads(a, ctx.ref)
    lift = ld["lift"] * f_n
    total = float(lift.sum())
    m_ref = float(ld["moment"][:, 1].sum()) * f_nm
    x_cp = float(ctx.ref[0] - m_ref / total * 1e3)
    peak = {}
    for i, name in enumerate(names):
        cl, _ = _strip_cl(flow, ctx, a, i)
        peak[name] = float(cl[np.argmax(np.abs(cl))])
    m_w = None if weight_x_mm is None else m_ref + (weight_x_mm - ctx.ref[0]) * 1e-3 * total
    return TrimPoint(
        speed_kmh=speed_kmh, speed_ms=v, dynamic_pressure_pa=q, attitude_deg=math.degrees(a),
        cl=total / (q * ctx.s_ref * 1e-6),
        lift_n={n: float(x) for n, x in zip(names, lift)},
        lift_kgf={n: float(x) / G for n, x in zip(names, lift)},
        cl_peak=peak, reynolds=re, cp_x_mm=x_cp,
        cp_from_mast_mm=x_cp - ctx.mast_x if ctx.mast_x is not None else nan,
        moment_about_mast_nm=m_ref if ctx.mast_x is not None else nan,
        induced_drag_n=float(ld["drag_i"].sum()) * f_n,
        moment_about_weight_nm=m_w, below_takeoff_speed=below)
