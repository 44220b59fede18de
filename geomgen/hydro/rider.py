"""Where the rider stands, and the stabilizer shim for a wanted stabilizer lift.

Mast move. The balance puts the net centre of pressure (where the weight must act) at
``cp_from_mast_mm`` from the mast reference, fixed to the foil; the rider's weight acts at
``rider_from_mast_mm`` from the same point, fixed to the board. Sliding the mast along its
tracks by d (+ aft) carries the foil and its centre of pressure with it, so the weight sits
over the centre of pressure when d = rider − cp. Given per trim speed and at the cruise speed.

Shim. The stabilizer's incidence change that makes its trimmed lift (lift = weight, at the
cruise speed) equal the wanted value: secant steps on the full lattice of the changed set
(lift is close to linear in the incidence), to 0.1 N.
"""

from __future__ import annotations

import math

from .results import Stance
from .water import G

SHIM_TOL_N = 0.1
#: Largest shim the solver tries, deg: far beyond any shim a stabilizer mount takes.
SHIM_SEARCH_DEG = 15.0


def mast_moves(trim, rider_from_mast_mm: float) -> list[dict]:
    """Per trim point: where the weight must act from the mast and the mast move (mm, + aft);
    None with the reason where the set does not trim."""
    return [dict(speed_kmh=t.speed_kmh, cp_from_mast_mm=t.cp_from_mast_mm if t.trimmable else None,
                 mast_move_mm=rider_from_mast_mm - t.cp_from_mast_mm if t.trimmable else None,
                 reason=t.reason) for t in trim]


def solve_shim(lift_of, target_n: float, step_deg: float = 1.0, iterations: int = 6,
               limit_deg: float = SHIM_SEARCH_DEG) -> tuple[float, float]:
    """Incidence change (deg) with ``lift_of(change)`` = ``target_n``; returns (change, lift there).

    Secant steps kept within ±``limit_deg``; stops where ``lift_of`` is not a number (the
    changed set does not trim), returning the last change tried and nan. Never raises."""
    x0, f0 = 0.0, lift_of(0.0) - target_n
    if not math.isfinite(f0):
        return 0.0, math.nan
    x1 = step_deg if f0 < 0 else -step_deg
    f1 = lift_of(x1) - target_n
    for _ in range(iterations):
        if not math.isfinite(f1) or abs(f1) <= SHIM_TOL_N or f1 == f0:
            break
        x_new = min(max(x1 - f1 * (x1 - x0) / (f1 - f0), -limit_deg), limit_deg)
        if x_new == x1:
            break
        x0, x1, f0 = x1, x_new, f1
        f1 = lift_of(x1) - target_n
    return x1, f1 + target_n


def stance(flight, trim_at, mast_x, stab, lift_of, weight_x_mm=None) -> Stance | None:
    """The rider's stance and the shim (None when [flight] asks for neither).

    Parameters
    ----------
    flight : FlightSpec
    trim_at : callable(speed_kmh) -> TrimPoint of the set as it is
    mast_x : float or None, datum x of the mast reference
    stab : SurfaceModel or None, the stabilizer
    lift_of : callable(incidence change deg) -> stabilizer lift N trimmed at the cruise speed
    weight_x_mm : float, optional
        Datum x where the weight acts (``--cg``, ``weight_x_mm`` or the mast reference plus
        ``rider_from_mast_mm``: one point, see :func:`geomgen.hydro.analysis.weight_position`).
    """
    want_rider = weight_x_mm is not None
    want_shim = flight.stabilizer_lift_kgf is not None
    if not (want_rider or want_shim):
        return None
    speeds = sorted(flight.speeds_kmh)
    cruise = flight.cruise()
    notes = []
    st = Stance(cruise_kmh=cruise)
    at_cruise = trim_at(cruise)
    if want_rider:
        if mast_x is None:
            notes.append("no mast: no mast move (it is measured along the mast's tracks)")
        else:
            rider = weight_x_mm - mast_x
            st.rider_from_mast_mm = rider
            st.per_speed = mast_moves([trim_at(v) for v in speeds], rider)
            if at_cruise.trimmable:
                st.mast_move_mm = rider - at_cruise.cp_from_mast_mm
            else:
                notes.append(f"no mast move: {at_cruise.reason}")
    if want_shim:
        if stab is None:
            notes.append("no stabilizer: no shim")
        elif not at_cruise.trimmable:
            notes.append(f"no shim: {at_cruise.reason}")
        else:
            target = flight.stabilizer_lift_kgf * G
            d, got = solve_shim(lift_of, target)
            st.stabilizer = stab.name
            st.stabilizer_target_kgf = flight.stabilizer_lift_kgf
            st.stabilizer_lift_now_kgf = at_cruise.lift_n.get(stab.name, math.nan) / G
            if not math.isfinite(got):
                notes.append(f"no shim: with the stabilizer {d:+.1f}° off its incidence the set no longer trims at "
                             f"{cruise:g} km/h; no shim gives {flight.stabilizer_lift_kgf:+.2f} kgf there")
            elif abs(got - target) > SHIM_TOL_N:
                notes.append(f"no shim: within ±{SHIM_SEARCH_DEG:g}° the stabilizer reaches {got / G:+.2f} kgf at "
                             f"best, not {flight.stabilizer_lift_kgf:+.2f} kgf; the set may not trim with that "
                             "stabilizer lift at the cruise speed")
            else:
                st.shim_deg = d
                st.new_incidence_deg = stab.spec.incidence + d
                st.stabilizer_lift_reached_kgf = got / G
    st.notes = notes
    return st
