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
from .solve import ATTITUDE_RANGE, solve_attitude
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


def untrimmable(speed_kmh: float, cl_needed: float) -> str:
    """Why no attitude of the searched range carries the weight at ``speed_kmh``."""
    lo, hi = (math.degrees(a) for a in ATTITUDE_RANGE)
    return (f"not trimmable at {speed_kmh:g} km/h: the set would need a lift coefficient of {cl_needed:.2f} on the "
            f"front wing's area, which the lattice gives at no attitude from {lo:.0f}° to {hi:.0f}°")


def past_cl_max(speed_kmh: float, peak: dict, cl_max: float, v_takeoff_kmh: float | None = None) -> str | None:
    """Why the trim at ``speed_kmh`` is past stall (the first surface whose most loaded strip
    has |cl| above ``cl_max``), or None."""
    for name, cl in peak.items():
        if abs(cl) > cl_max * (1.0 + 1e-6):
            below = (f", below the estimated takeoff at {v_takeoff_kmh:.1f} km/h"
                     if v_takeoff_kmh is not None and math.isfinite(v_takeoff_kmh) and speed_kmh < v_takeoff_kmh
                     else "")
            return (f"not trimmable at {speed_kmh:g} km/h: '{name}' would need a section cl of {cl:.2f}, past its "
                    f"cl max {cl_max:g}{below}")
    return None


def trim_point(flow, ctx, speed_kmh: float, mass_kg: float, water, weight_x_mm=None,
               v_takeoff: float | None = None, cl_max: float | None = None) -> TrimPoint:
    """Solve the attitude for lift = weight at one speed and report the balance.

    Never raises: a speed that does not trim comes back with ``trimmable`` False and the
    reason in words.

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
    cl_max : float, optional
        Section maximum lift coefficient: a trim where any surface's most loaded strip
        passes it is not trimmable (past stall). None: no such test.
    """
    v = speed_kmh * KMH
    rho = water.density
    q = 0.5 * rho * v * v
    weight = mass_kg * G
    f_n, f_nm = rho * v * v * 1e-6, rho * v * v * 1e-9
    names = [m.name for m in ctx.models]
    re = {m.name: v * ctx.figures[i].mac_mm * 1e-3 / water.viscosity for i, m in enumerate(ctx.models)}
    cl_needed = weight / (q * ctx.s_ref * 1e-6)
    a = solve_attitude(lambda al: set_cl(flow, ctx, al), cl_needed)
    nan = math.nan
    below = None if v_takeoff is None or not math.isfinite(v_takeoff) else v < v_takeoff

    def blank(reason: str) -> TrimPoint:
        return TrimPoint(speed_kmh=speed_kmh, speed_ms=v, dynamic_pressure_pa=q, attitude_deg=nan, cl=cl_needed,
                         lift_n={n: nan for n in names}, lift_kgf={n: nan for n in names}, cl_peak={}, reynolds=re,
                         cp_x_mm=nan, cp_from_mast_mm=nan,
                         moment_about_mast_nm=nan, induced_drag_n=nan, below_takeoff_speed=below,
                         trimmable=False, reason=reason)

    if not math.isfinite(a):
        return blank(untrimmable(speed_kmh, cl_needed))
    peak = {}
    for i, name in enumerate(names):
        cl, _ = _strip_cl(flow, ctx, a, i)
        peak[name] = float(cl[np.argmax(np.abs(cl))])
    if cl_max is not None:
        why = past_cl_max(speed_kmh, peak, cl_max, v_takeoff / KMH if v_takeoff is not None else None)
        if why is not None:
            tp = blank(why)
            tp.cl_peak = peak
            return tp
    ld = flow.loads(a, ctx.ref)
    lift = ld["lift"] * f_n
    total = float(lift.sum())
    m_ref = float(ld["moment"][:, 1].sum()) * f_nm
    x_cp = float(ctx.ref[0] - m_ref / total * 1e3)
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
