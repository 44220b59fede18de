"""The still-water surface: where it is, and what it does to the balance against deep water.

The lattice represents the surface by images (:func:`geomgen.hydro.lattice.image_lattice`):
the high-Froude-number limit, in which the surface stays flat and the perturbation potential
vanishes on it. Every surface of the lattice sees the images of every other, so the
stabilizer feels the front wing's image and its own.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import SpecError
from .results import FreeSurface
from .water import G

LIMITS = ("free surface by images, high-Froude-number limit: no wave making (fair only when the depth Froude "
          "number V/√(g·depth) is large, poor at low speed just after takeoff), no ventilation "
          "(air drawn down the mast or onto a foil near the surface), no spray, a flat still surface "
          "(no swell, no chop)")


def mast_top_z(mast) -> float:
    """Datum z of the top of a mast (the higher of its two ends, at the leading edge), mm."""
    lo, hi = mast.y_range
    return float(max(mast.camber_points(y, [0.0])[0, 2] for y in (lo, hi)))


def water_level(models, flight) -> tuple[float | None, str]:
    """Datum z of the still-water surface (mm) and how it was found; (None, why) for deep water."""
    if flight is None:
        return None, "no [flight] table: deep water"
    if flight.depth_mm is not None:
        return float(flight.depth_mm), f"the datum origin {flight.depth_mm:g} mm below the still water (given)"
    if flight.ride_height_mm is not None:
        mast = next((m for m in models if m.role == "mast"), None)
        if mast is None:
            raise SpecError("flight.ride_height_mm: the ride height is measured from the board on the top of the "
                            "mast, and this set has no mast; give flight.depth_mm (depth of the datum origin) "
                            "instead")
        top = mast_top_z(mast)
        return top - float(flight.ride_height_mm), (
            f"board {flight.ride_height_mm:g} mm above the still water on the top of mast '{mast.name}' "
            f"(z = {top:.0f} mm)")
    return None, "no ride_height_mm or depth_mm in [flight]: deep water"


def check_submerged(lat, water_z: float, field: str) -> None:
    """SpecError if any vortex of ``lat`` lies at or above the still water (the foil breaks the surface)."""
    problems = []
    z = np.concatenate([lat.A[:, 2], lat.B[:, 2], lat.colloc[:, 2], lat.A_te[:, 2], lat.B_te[:, 2]])
    s = np.concatenate([lat.surface] * 5)
    for i, m in enumerate(lat.models):
        top = float(z[s == i].max())
        if top >= water_z:
            problems.append(f"flight.{field}: surface '{m.name}' reaches {top - water_z:.0f} mm above the still "
                            f"water at this level: a foil that breaks the surface ventilates, which this model "
                            f"does not capture; ride lower or give a deeper level")
    if problems:
        raise SpecError(problems)


def depth_of(model, water_z: float) -> tuple[float, float]:
    """Depth of a surface's root quarter-chord point and of its shallowest quarter-chord point, mm."""
    lo, hi = model.y_range
    ys = np.linspace(0.0 if model.mirror else lo, hi, 41)
    z = np.array([model.camber_points(y, [0.25])[0, 2] for y in ys])
    return float(water_z - z[0]), float(water_z - z.max())


def compare(models, res, deep, water_z: float, how: str) -> FreeSurface:
    """What the surface changes against deep water: lift per surface, neutral point, trim."""
    c = res.reference["mac_mm"]
    per = []
    for m, s, d in zip(models, res.surfaces, deep.surfaces):
        root, top = depth_of(m, water_z)
        ratio = s.lift_slope_per_rad / d.lift_slope_per_rad if d.lift_slope_per_rad else math.nan
        per.append(dict(name=s.name, depth_root_mm=root, depth_min_mm=top, depth_over_mac=root / s.mac_mm,
                        lift_slope_ratio=ratio, lift_slope_change_pct=(ratio - 1.0) * 100.0,
                        cl_change_at_ref=s.cl - d.cl))
    trim = []
    h_ref = per[0]["depth_root_mm"] * 1e-3
    for t, u in zip(res.trim, deep.trim):
        trim.append(dict(speed_kmh=t.speed_kmh,
                         froude_depth=t.speed_ms / math.sqrt(G * h_ref) if h_ref > 0 else math.nan,
                         attitude_change_deg=t.attitude_deg - u.attitude_deg,
                         lift_change_n={k: t.lift_n.get(k, math.nan) - u.lift_n.get(k, math.nan) for k in t.lift_n},
                         cp_shift_mm=t.cp_x_mm - u.cp_x_mm, induced_drag_change_n=t.induced_drag_n - u.induced_drag_n))
    shift = res.neutral_point_x_mm - deep.neutral_point_x_mm
    return FreeSurface(water_z_mm=water_z, how=how, surfaces=per, neutral_point_shift_mm=shift,
                       neutral_point_shift_pct_mac=shift / c * 100.0, deep_neutral_point_x_mm=deep.neutral_point_x_mm,
                       trim=trim, limits=LIMITS)
