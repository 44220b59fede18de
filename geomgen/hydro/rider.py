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


def mast_moves(trim, rider_from_mast_mm: float) -> list[dict]:
    """Per trim point: where the weight must act from the mast and the mast move (mm, + aft)."""
    return [dict(speed_kmh=t.speed_kmh, cp_from_mast_mm=t.cp_from_mast_mm,
                 mast_move_mm=rider_from_mast_mm - t.cp_from_mast_mm) for t in trim]


def solve_shim(lift_of, target_n: float, step_deg: float = 1.0, iterations: int = 6) -> tuple[float, float]:
    """Incidence change (deg) with ``lift_of(change)`` = ``target_n``; returns (change, lift there)."""
    x0, f0 = 0.0, lift_of(0.0) - target_n
    x1 = step_deg if f0 < 0 else -step_deg
    f1 = lift_of(x1) - target_n
    for _ in range(iterations):
        if abs(f1) <= SHIM_TOL_N or f1 == f0:
            break
        x0, x1, f0 = x1, x1 - f1 * (x1 - x0) / (f1 - f0), f1
        f1 = lift_of(x1) - target_n
    return x1, f1 + target_n


def stance(flight, trim_at, mast_x, stab, lift_of) -> Stance | None:
    """The rider's stance and the shim (None when [flight] asks for neither).

    Parameters
    ----------
    flight : FlightSpec
    trim_at : callable(speed_kmh) -> TrimPoint of the set as it is
    mast_x : float or None, datum x of the mast reference
    stab : SurfaceModel or None, the stabilizer
    lift_of : callable(incidence change deg) -> stabilizer lift N trimmed at the cruise speed
    """
    want_rider = flight.rider_from_mast_mm is not None or (flight.weight_x_mm is not None and mast_x is not None)
    want_shim = flight.stabilizer_lift_kgf is not None
    if not (want_rider or want_shim):
        return None
    speeds = sorted(flight.speeds_kmh)
    cruise = flight.cruise()
    notes = []
    st = Stance(cruise_kmh=cruise)
    if want_rider:
        if mast_x is None:
            notes.append("no mast: no mast move (it is measured along the mast's tracks)")
        else:
            rider = flight.rider_from_mast_mm if flight.rider_from_mast_mm is not None else flight.weight_x_mm - mast_x
            st.rider_from_mast_mm = rider
            st.per_speed = mast_moves([trim_at(v) for v in speeds], rider)
            cp = trim_at(cruise).cp_from_mast_mm
            st.mast_move_mm = rider - cp if math.isfinite(cp) else math.nan
    if want_shim:
        if stab is None:
            notes.append("no stabilizer: no shim")
        else:
            target = flight.stabilizer_lift_kgf * G
            d, got = solve_shim(lift_of, target)
            st.stabilizer = stab.name
            st.stabilizer_target_kgf = flight.stabilizer_lift_kgf
            st.stabilizer_lift_now_kgf = lift_of(0.0) / G
            st.shim_deg = d
            st.new_incidence_deg = stab.spec.incidence + d
            st.stabilizer_lift_reached_kgf = got / G
            if abs(got - target) > SHIM_TOL_N:
                notes.append("the shim did not converge to 0.1 N: the set may not trim at the cruise speed")
    st.notes = notes
    return st
