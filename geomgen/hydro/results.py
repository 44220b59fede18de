"""Result records of the hydrodynamic analysis (plain dataclasses, ``as_dict()`` for JSON).

Units are in the field names: mm, deg, N, kgf, N·m, m/s, km/h, Pa. Coefficients are
dimensionless; a surface's own coefficients use its own projected area and MAC, the set's
use the front wing's (the reference surface).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field
from typing import Optional

import numpy as np


def _clean(v):
    """nan/inf -> None and numpy scalars -> Python numbers, recursively (JSON has no nan)."""
    if isinstance(v, np.generic):
        v = v.item()
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, dict):
        return {k: _clean(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_clean(x) for x in v]
    return v


class _Record:
    def as_dict(self) -> dict:
        """Plain dict for JSON (nan becomes None)."""
        return _clean(asdict(self))  # type: ignore[call-overload]  # every subclass is a dataclass


@dataclass
class Loading(_Record):
    """Spanwise loading at the reference attitude: one entry per lattice strip.

    ``y_mm`` is the signed span coordinate of the strip's collocation station (the part's own span axis),
    ``c_cl_mm`` the section lift coefficient times local chord (c·cl = 2Γ/V), ``cl`` the
    section lift coefficient.
    """

    y_mm: list
    chord_mm: list
    c_cl_mm: list
    cl: list


@dataclass
class SurfaceHydro(_Record):
    """One surface in the set, at the reference attitude (coefficients on its own area and MAC).

    ``lift_slope_*`` and ``zero_lift_attitude_deg`` are in the set (downwash included);
    ``lift_slope_alone_per_rad`` and ``span_efficiency`` (of the attitude loading, Trefftz
    plane) are for the surface alone; ``cdi`` is its share of the set's Trefftz drag;
    ``ac_pct_mac`` is from the leading edge of its own MAC.
    """

    name: str
    role: str
    in_pitch: bool
    area_cm2: float
    span_mm: float
    aspect_ratio: float
    mac_mm: float
    mac_le_x_mm: float
    cl: float
    lift_slope_per_rad: float
    lift_slope_per_deg: float
    lift_slope_alone_per_rad: float
    zero_lift_attitude_deg: float
    ac_x_mm: float
    ac_pct_mac: float
    cm_ac: float
    cdi: float
    span_efficiency: float
    loading: Loading


@dataclass
class TrimPoint(_Record):
    """Lift = weight at one speed. Moments positive nose up; x positive aft.

    ``trimmable`` is False when no attitude of the searched range carries the weight, or when
    at that attitude a surface's most loaded strip is past the section cl max (below the
    takeoff speed, or past stall): then ``reason`` says which in words, and the figures that
    depend on the attitude are left out (None in JSON)."""

    speed_kmh: float
    speed_ms: float
    dynamic_pressure_pa: float
    attitude_deg: float
    cl: float
    lift_n: dict
    lift_kgf: dict
    cl_peak: dict
    reynolds: dict
    cp_x_mm: float
    cp_from_mast_mm: float
    moment_about_mast_nm: float
    induced_drag_n: float
    moment_about_weight_nm: Optional[float] = None
    below_takeoff_speed: Optional[bool] = None
    trimmable: bool = True
    reason: Optional[str] = None


@dataclass
class Takeoff(_Record):
    """Lowest speed that carries the weight before the front wing's first strip reaches cl max."""

    cl_max: float
    attitude_deg: float
    speed_ms: float
    speed_kmh: float
    limiting_y_mm: float


@dataclass
class Lateral(_Record):
    """Sideslip derivatives (per deg, reference area and span of the front wing), with the
    masts and fins in the lattice. Moments right-hand about the datum axes at the moment
    reference point: roll about +x (aft), yaw about +z (up)."""

    side_force_per_deg: float
    roll_moment_per_deg: float
    yaw_moment_per_deg: float
    side_force_slope_per_deg: dict
    at_zero_sideslip: dict


@dataclass
class FreeSurface(_Record):
    """The still-water surface and what it changes against deep water (same set, same speeds).

    ``surfaces``: per surface its depth (root quarter chord and shallowest point, mm; root
    depth over its MAC), lift-slope ratio to deep water and CL change at the reference
    attitude. ``trim``: per speed the change of attitude (deg), of each surface's lift (N),
    of the centre of pressure (mm, + aft) and of the induced drag (N)."""

    water_z_mm: float
    how: str
    surfaces: list
    neutral_point_shift_mm: float
    neutral_point_shift_pct_mac: float
    deep_neutral_point_x_mm: float
    trim: list
    limits: str


@dataclass
class Cavitation(_Record):
    """Cavitation onset per surface (lifting surfaces trimmed, masts and fins at zero lift).

    ``surfaces``: per surface the onset speed (m/s, km/h; None if none up to the search's
    end), where (span y mm, chord x/c, side), the strip's cl and Cp,min there and its depth
    (mm). ``margin_at_speeds``: per trim speed and lifting surface, σ + Cp,min of the worst
    strip (positive: no cavitation)."""

    surfaces: list
    first_kmh: float
    first_surface: Optional[str]
    margin_at_speeds: list
    sections_solved: int
    notes: list


@dataclass
class Performance(_Record):
    """Drag, power and lift-to-drag ratio of the trimmed set (first estimates).

    ``points`` at the ``[flight]`` speeds and ``sweep`` from takeoff to first cavitation: per
    speed the attitude, lift per surface (N), each drag term (N, named), the total (N, kgf),
    the power (W) and L/D (weight over total drag). ``envelope_kmh``: [takeoff, where the
    first plausibility guard or the first cavitation ends it], ``envelope_reasons`` the words
    for each end (:mod:`geomgen.hydro.guards`)."""

    points: list
    sweep: list
    takeoff_kmh: float
    first_cavitation_kmh: float
    envelope_kmh: list
    sources: list
    notes: list
    envelope_reasons: list = field(default_factory=list)


@dataclass
class Stance(_Record):
    """Where the rider stands and the stabilizer shim, at the cruise speed (km/h).

    ``mast_move_mm``: how far to slide the mast in its tracks (+ aft) so the net centre of
    pressure sits under the rider; ``per_speed``: the same at each trim speed. ``shim_deg``:
    stabilizer incidence change (+ leading edge up) for ``stabilizer_target_kgf``."""

    cruise_kmh: float
    rider_from_mast_mm: Optional[float] = None
    mast_move_mm: Optional[float] = None
    per_speed: list = field(default_factory=list)
    stabilizer: Optional[str] = None
    stabilizer_target_kgf: Optional[float] = None
    stabilizer_lift_now_kgf: Optional[float] = None
    shim_deg: Optional[float] = None
    new_incidence_deg: Optional[float] = None
    stabilizer_lift_reached_kgf: Optional[float] = None
    notes: list = field(default_factory=list)


@dataclass
class HydroResult(_Record):
    """The set at the reference attitude, its neutral point and (with a ``[flight]``) its trim.

    ``cg_x_mm``: datum x where the weight acts, from ``cg_source`` ("--cg", "flight.weight_x_mm"
    or "flight.rider_from_mast_mm"); ``static_margin_pct`` = (neutral point − it) / MAC.
    ``warnings``: plausibility warnings (:mod:`geomgen.hydro.guards`), each a dict of
    ``kind``, ``message``, ``speed_kmh``."""

    reference: dict
    panels: dict
    alpha_ref_deg: float
    cl: float
    lift_slope_per_rad: float
    lift_slope_per_deg: float
    zero_lift_attitude_deg: float
    cm: float
    cm_alpha_per_rad: float
    cm_alpha_per_deg: float
    neutral_point_x_mm: float
    neutral_point_from_mast_mm: Optional[float]
    neutral_point_from_mast_pct_mac: Optional[float]
    neutral_point_pct_mac: float
    cdi: float
    span_efficiency: float
    side_force_coeff: float
    roll_moment_coeff: float
    yaw_moment_coeff: float
    downwash_gradient: Optional[float]
    surfaces: list
    cg_x_mm: Optional[float] = None
    static_margin_pct: Optional[float] = None
    water: Optional[dict] = None
    mass_kg: Optional[float] = None
    trim: list = field(default_factory=list)
    takeoff: Optional[Takeoff] = None
    lateral: Optional[Lateral] = None
    free_surface: Optional[FreeSurface] = None
    cavitation: Optional[Cavitation] = None
    performance: Optional[Performance] = None
    stance: Optional[Stance] = None
    notes: list = field(default_factory=list)
    caution: str = ""
    cg_source: Optional[str] = None
    warnings: list = field(default_factory=list)
