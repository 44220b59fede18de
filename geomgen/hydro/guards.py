"""Plausibility guards: warnings (never refusals) where the balance leaves what a rider can ride.

Each guard is a stated limit; every figure stays computed, the warning says where it leaves
the limit and why. The same guards end the usable envelope (:func:`envelope`).

=====================  ==============================================================  =========
guard                  warns when                                                       limit
=====================  ==============================================================  =========
not trimmable          no attitude carries the weight, or a strip is past the section    cl max
                       cl max (below takeoff, past stall)
stabilizer share       the stabilizer lifts or pushes more than a share of the weight    10 %
centre-of-pressure     the net centre of pressure moves further than a rider shifts the  ±50 mm
travel                 weight (from where it is at the cruise speed)
track travel           the mast move under the rider is beyond ``[flight]``              50 mm
                       ``track_travel_mm``
shim range             the stabilizer shim is beyond a printable shim                    ±3°
part size              a span or chord that looks typed in metres or inches              see below
=====================  ==============================================================  =========

The limits are common practice, no source: a stabilizer carries a few per cent of the weight
either way (beyond a tenth the rider holds the difference with the back foot); a rider shifts
the weight a few cm by leaning before the stance has to change; mast tracks let the mast slide
a few cm either way; shims and mounts give a degree or two, three at most.
"""

from __future__ import annotations

import math

import numpy as np

from .water import G

#: Largest |stabilizer lift| as a share of the weight before a warning (common practice, no source).
STABILIZER_SHARE = 0.10
#: Largest movement of the net centre of pressure from its cruise position, mm, before a
#: warning: what a rider takes by leaning (common practice, no source).
CP_SHIFT_MM = 50.0
#: Largest |stabilizer shim| before a warning, deg (common practice, no source).
SHIM_RANGE_DEG = 3.0
#: A part's span below this (mm) looks typed in metres or inches: the smallest stabilizers
#: and fins span a few hundred mm (common practice, no source).
MIN_SPAN_MM = 100.0
#: A chord below this (mm) looks typed in metres or inches.
MIN_CHORD_MM = 10.0
#: Envelope search: points from takeoff to first cavitation, then bisection steps.
ENVELOPE_POINTS = 41
ENVELOPE_BISECTIONS = 14


def warning(kind: str, message: str, speed_kmh: float | None = None) -> dict:
    """One warning record: ``kind`` (a short key), ``message`` (words), ``speed_kmh`` (or None)."""
    return dict(kind=kind, message=message, speed_kmh=speed_kmh)


def stabilizer_share(tp, weight_n: float, stab: str | None) -> str | None:
    """Why the stabilizer's load at trim point ``tp`` is beyond :data:`STABILIZER_SHARE`, or None."""
    if stab is None or not tp.trimmable or stab not in tp.lift_n:
        return None
    lift = tp.lift_n[stab]
    share = lift / weight_n
    if abs(share) <= STABILIZER_SHARE:
        return None
    return (f"at {tp.speed_kmh:.1f} km/h the stabilizer {'pushes down' if lift < 0 else 'lifts'} "
            f"{abs(lift) / G:.1f} kgf, {abs(share) * 100:.1f} % of the weight (beyond {STABILIZER_SHARE * 100:.0f} %: "
            "the rider holds the difference with the feet)")


def cp_shift(tp, cp_cruise: float | None, cruise_kmh: float) -> str | None:
    """Why the net centre of pressure at ``tp`` is more than :data:`CP_SHIFT_MM` from where it
    is at the cruise speed, or None."""
    if cp_cruise is None or not tp.trimmable or not math.isfinite(tp.cp_x_mm):
        return None
    d = tp.cp_x_mm - cp_cruise
    if abs(d) <= CP_SHIFT_MM:
        return None
    return (f"at {tp.speed_kmh:.1f} km/h the net centre of pressure is {abs(d):.0f} mm "
            f"{'aft' if d > 0 else 'forward'} of where it is at the cruise speed {cruise_kmh:g} km/h "
            f"(beyond the ±{CP_SHIFT_MM:.0f} mm a rider shifts the weight by leaning)")


def trim_warnings(trim, weight_n: float, stab: str | None, cp_cruise: float | None, cruise_kmh: float) -> list[dict]:
    """Warnings over the ``[flight]`` speeds: not trimmable, stabilizer share, centre-of-pressure travel."""
    out = []
    for t in trim:
        if not t.trimmable:
            out.append(warning("not_trimmable", t.reason, t.speed_kmh))
            continue
        why = stabilizer_share(t, weight_n, stab)
        if why:
            out.append(warning("stabilizer_share", why, t.speed_kmh))
        why = cp_shift(t, cp_cruise, cruise_kmh)
        if why:
            out.append(warning("cp_travel", why, t.speed_kmh))
    cps = [t.cp_x_mm for t in trim if t.trimmable and math.isfinite(t.cp_x_mm)]
    if len(cps) > 1 and cp_cruise is None and max(cps) - min(cps) > 2 * CP_SHIFT_MM:
        out.append(warning("cp_travel", f"the net centre of pressure moves {max(cps) - min(cps):.0f} mm over the "
                                        f"trim speeds (beyond the ±{CP_SHIFT_MM:.0f} mm a rider shifts the weight)"))
    return out


def stance_warnings(st, track_travel_mm: float) -> list[dict]:
    """Mast move beyond the tracks; shim beyond :data:`SHIM_RANGE_DEG`."""
    out: list[dict] = []
    if st is None:
        return out
    if st.mast_move_mm is not None and abs(st.mast_move_mm) > track_travel_mm:
        out.append(warning("track_travel", f"the mast move of {st.mast_move_mm / 10:+.1f} cm at {st.cruise_kmh:g} km/h "
                                           f"is beyond the tracks' ±{track_travel_mm / 10:g} cm "
                                           "(flight.track_travel_mm): the rider cannot stand over the centre of "
                                           "pressure by sliding the mast alone", st.cruise_kmh))
    if st.shim_deg is not None and abs(st.shim_deg) > SHIM_RANGE_DEG:
        out.append(warning("shim_range", f"the stabilizer shim of {st.shim_deg:+.2f}° is beyond ±{SHIM_RANGE_DEG:g}° "
                                         "(a printable shim): change the stabilizer's incidence in the spec or its "
                                         "size instead", st.cruise_kmh))
    return out


def _unit_hint(value_mm: float, lo_mm: float) -> str:
    """'did you mean …' for a length that reads right in metres or inches, else ''."""
    for factor, unit in ((1000.0, "metres"), (25.4, "inches")):
        if lo_mm <= value_mm * factor <= 5000.0:
            return f": did you mean {value_mm * factor:g} mm (typed in {unit})?"
    return ": lengths are in mm"


def dimension_warnings(models) -> list[dict]:
    """Parts whose span or largest chord looks typed in metres or inches ("span 1.0 mm: did
    you mean 1000 mm?"). Lengths are mm everywhere in a spec."""
    from ..geometry.figures import planform_figures

    out = []
    for m in models:
        span = float(planform_figures(m).span_mm)
        chord = float(np.max(m.chord(m.planform.y)))
        if span < MIN_SPAN_MM:
            out.append(warning("part_size", f'{m.role} "{m.name}": span {span:g} mm{_unit_hint(span, MIN_SPAN_MM)}'))
        if chord < MIN_CHORD_MM:
            out.append(warning("part_size", f'{m.role} "{m.name}": largest chord {chord:g} mm'
                                            f'{_unit_hint(chord, MIN_CHORD_MM)}'))
    return out


def envelope(trim_at, lo_kmh: float, hi_kmh: float, hi_reason: str, guard) -> tuple[list, list]:
    """The usable envelope: from ``lo_kmh`` (takeoff) up to the first speed where ``guard(tp)``
    (a reason or None) says so, else to ``hi_kmh`` (first cavitation) with ``hi_reason``.

    Returns ([lo, hi] km/h, [reason at lo, reason at hi]). Scanned on
    :data:`ENVELOPE_POINTS` speeds, the end refined by bisection."""
    lo_reason = "the takeoff estimate"
    vs = np.linspace(lo_kmh, max(hi_kmh, lo_kmh), ENVELOPE_POINTS)
    prev = None
    for v in vs:
        why = guard(trim_at(float(v)))
        if why is None:
            prev = float(v)
            continue
        if prev is None:
            return [lo_kmh, lo_kmh], [lo_reason, why]
        a, b = prev, float(v)
        for _ in range(ENVELOPE_BISECTIONS):
            mid = 0.5 * (a + b)
            w = guard(trim_at(mid))
            if w is None:
                a = mid
            else:
                b, why = mid, w
        return [lo_kmh, a], [lo_reason, why]
    return [lo_kmh, hi_kmh], [lo_reason, hi_reason]
