"""Spanwise loading of each wing and stabilizer at a stated condition: the attitude where the
set lifts ``load_factor`` × weight at a speed (for the strength estimate, geomgen.strength).

Forces scale as ρV² from the unit-speed, unit-density lattice solution (see trim.py).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import SpecError
from ..spec.flight import DEFAULT_CL_MAX
from .analysis import _context, pitch_surfaces
from .lattice import build_lattice
from .solve import Flow, lift_axis, solve_attitude
from .trim import KMH, set_cl
from .water import G
from .water import water as resolve_water


@dataclass
class StripLoads:
    """One surface's strips on its starboard (or only) half, root to tip. Datum mm, N."""

    name: str
    role: str
    y_mm: np.ndarray  # the model's span coordinate of the strip (0 = centre plane of a mirrored part)
    width_mm: np.ndarray  # strip width along the span
    lift_n: np.ndarray  # strip force along the lift direction
    cp_mm: np.ndarray  # (k, 3) datum point where the strip's force acts (its panels' force centre)
    force_n: np.ndarray  # (k, 3) strip force vector, datum axes


@dataclass
class Condition:
    speed_kmh: float
    load_factor: float
    mass_kg: float
    density_kg_m3: float
    attitude_deg: float
    lift_n: float
    water: str = "deep water"
    cl_peak: dict | None = None
    cl_max: float | None = None
    warnings: list | None = None


def loading_at(models, flight, speed_kmh: float, load_factor: float) -> tuple[Condition, list[StripLoads]]:
    """Strip loads of every wing and stabilizer where the set lifts ``load_factor`` times the
    weight of ``flight.mass_kg`` at ``speed_kmh`` (linear lattice: no stall).

    The same water as the balance: the free surface when ``[flight]`` states a ride height or
    a depth, else deep water (stated in ``Condition.water``). A condition where a surface's
    most loaded strip passes the section cl max (the balance's takeoff estimate uses the same
    value) is computed and warned of in ``Condition.warnings``."""
    from .freesurface import check_submerged, water_level
    from .guards import warning

    lifting = pitch_surfaces(models)
    ns, nc = flight.span_panels, flight.chord_panels
    ctx = _context(lifting, models)
    lat = build_lattice(lifting, ns, nc)
    water_z, how = water_level(models, flight)
    if water_z is not None:
        check_submerged(lat, water_z, "ride_height_mm" if flight.ride_height_mm is not None else "depth_mm")
        lat.water_z = water_z
        how = f"free surface at z = {water_z:.0f} mm ({how})"
    flow = Flow.solve(lat)
    w = resolve_water(flight.fluid, flight.temperature_c, flight.viscosity_m2s)
    v = speed_kmh * KMH
    q = 0.5 * w.density * v * v
    lift = load_factor * flight.mass_kg * G
    a = solve_attitude(lambda al: set_cl(flow, ctx, al), lift / (q * ctx.s_ref * 1e-6))
    if not math.isfinite(a):
        raise SpecError(f"the set cannot lift {load_factor:g} x the weight at {speed_kmh:g} km/h within the "
                        "lattice's attitude range; give a higher speed or a lower load factor")
    cl_max = flight.cl_max if flight.cl_max is not None else DEFAULT_CL_MAX
    peak, warns = {}, []
    g = flow.strip_gamma(a)
    for i, m in enumerate(lifting):
        sel = lat.strip_surface == i
        cl = 2.0 * g[sel] / lat.strip_chord[sel]
        k = int(np.argmax(np.abs(cl)))
        peak[m.name] = float(cl[k])
        if abs(cl[k]) > cl_max:
            warns.append(warning("past_cl_max", f"at {speed_kmh:g} km/h and load factor {load_factor:g} "
                                                "the attitude is "
                                                f"{math.degrees(a):.1f}° and '{m.name}' reaches a section cl of "
                                                f"{cl[k]:.2f} (at |y| = {abs(lat.strip_y[sel][k]):.0f} mm), past its "
                                                f"cl max {cl_max:g}: the section stalls before it carries this load "
                                                "(the linear lattice has no stall)", speed_kmh))
    f_n = w.density * v * v * 1e-6
    F = flow.forces(a) * f_n  # (panels, 3) N
    up = lift_axis(a)
    out = []
    for i, m in enumerate(lifting):
        sel = flow.surface == i
        strips = flow.strip[sel]
        ids = np.unique(strips)
        fz = F[sel] @ up
        fs = np.stack([np.bincount(strips, F[sel][:, k], minlength=ids.max() + 1)[ids] for k in range(3)], axis=1)
        lz = np.bincount(strips, fz, minlength=ids.max() + 1)[ids]
        # force centre of each strip: lift-weighted mean of its panels' force points
        mids = flow.mid[sel]
        with np.errstate(invalid="ignore", divide="ignore"):
            cp = np.stack([np.bincount(strips, fz * mids[:, k], minlength=ids.max() + 1)[ids] / lz
                           for k in range(3)], axis=1)
        width = np.bincount(strips, lat.width[flow.idx][sel], minlength=ids.max() + 1)[ids] / nc
        y = lat.strip_y[ids]
        keep = y > 0 if m.mirror else np.ones(len(y), bool)
        order = np.argsort(y[keep])
        out.append(StripLoads(m.name, m.role, y[keep][order], width[keep][order], lz[keep][order],
                              cp[keep][order], fs[keep][order]))
    cond = Condition(speed_kmh, load_factor, flight.mass_kg, w.density, math.degrees(a), lift, how, peak, cl_max,
                     warns)
    return cond, out
