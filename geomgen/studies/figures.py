"""The figures of one variant: what a designer compares, from the vortex-lattice analysis.

:func:`variant_figures` takes spec *text* (what a worker process or a remote worker gets) and
returns plain numbers, so any executor gives the same row. A variant that cannot be made or
balanced returns its error in the row instead of stopping the study.
"""

from __future__ import annotations

import math

from ..errors import GeomgenError

#: figure key -> (heading, unit), in table order
FIGURES = {
    "wing_lift_n": ("front wing lift", "N"),
    "stab_lift_n": ("stabilizer lift", "N"),
    "stab_lift_pct_weight": ("stabilizer lift", "% weight"),
    "attitude_deg": ("board attitude", "deg"),
    "induced_drag_n": ("induced drag", "N"),
    "drag_n": ("total drag", "N"),
    "lift_to_drag": ("lift / drag", ""),
    "neutral_point_x_mm": ("neutral point x", "mm"),
    "neutral_point_from_mast_mm": ("neutral point from mast", "mm"),
    "static_margin_pct": ("static margin", "% MAC"),
    "cp_from_mast_mm": ("net centre of pressure from mast", "mm"),
    "mast_move_mm": ("mast move to restore the base balance", "mm"),
    "takeoff_kmh": ("takeoff speed", "km/h"),
    "cavitation_kmh": ("cavitation onset", "km/h"),
    "projected_area_cm2": ("front wing projected area", "cm²"),
}


#: planform figures given per surface, as ``<surface>:<figure>``
SURFACE_FIGURES = ("projected_area_cm2", "span_mm", "aspect_ratio", "mac_mm", "volume_cm3")


def cruise_speed(flight) -> float:
    """The cruise speed a study compares at: the one ``balance`` trims the rider and the shim
    at (``cruise_kmh``, else the middle ``[flight]`` speed)."""
    return flight.cruise()


def condition(flight, cruise_kmh: float | None = None) -> dict:
    """What a study's figures are for: speed (and where it comes from), mass and water."""
    from ..hydro.water import water

    w = water(flight.fluid, flight.temperature_c, flight.viscosity_m2s)
    speed_from = ("--cruise" if cruise_kmh is not None else
                  "the spec's cruise_kmh" if flight.cruise_kmh is not None else "the middle [flight] speed")
    return {"speed_kmh": float(cruise_kmh if cruise_kmh is not None else flight.cruise()), "speed_from": speed_from,
            "mass_kg": float(flight.mass_kg), "water": w.name, "density_kg_m3": float(w.density)}


def condition_words(c: dict) -> str:
    """``18 km/h (the spec's cruise_kmh), mass 85 kg, seawater (1026.0 kg/m³)``."""
    return (f"{c['speed_kmh']:g} km/h ({c['speed_from']}), mass {c['mass_kg']:g} kg, "
            f"{c['water']} ({c['density_kg_m3']:.1f} kg/m³)")


def variant_figures(text: str, source: str = "<variant>", *, cruise_kmh: float | None = None,
                    allow_outside_files: bool = False) -> dict:
    """Figures of the spec in ``text`` trimmed at ``cruise_kmh`` (default :func:`cruise_speed`).

    Returns a dict of :data:`FIGURES` keys (None where a figure does not apply) plus
    ``cruise_kmh``; or ``{"error": message}`` when the variant cannot be made or balanced.
    """
    from ..geometry import build_models
    from ..geometry.figures import intended_figures
    from ..hydro import analyse
    from ..spec import load_spec_text

    try:
        spec = load_spec_text(text, source)
        spec._allow_outside_files = allow_outside_files  # type: ignore[attr-defined]
        if spec.flight is None:
            return {"error": f"{source}: a study needs a [flight] table (mass and speeds)"}
        v = cruise_kmh if cruise_kmh is not None else cruise_speed(spec.flight)
        flight = spec.flight.model_copy(update={"speeds_kmh": sorted(set(spec.flight.speeds_kmh) | {float(v)})})
        models = build_models(spec)
        res = analyse(models, flight)
    except GeomgenError as exc:
        return {"error": "; ".join(getattr(exc, "problems", None) or [str(exc)])}
    except (ValueError, ArithmeticError) as exc:  # a variant the numbers cannot carry
        return {"error": f"{source}: {exc}"}
    t = next((p for p in res.trim if abs(p.speed_kmh - v) < 1e-9), None)
    roles = {s.name: s.role for s in res.surfaces}
    out: dict[str, float | None] = {k: None for k in FIGURES}
    cond = condition(spec.flight, cruise_kmh)
    out["cruise_kmh"] = float(v)
    out.update(mass_kg=cond["mass_kg"], water=cond["water"], density_kg_m3=cond["density_kg_m3"])
    for m in models:  # each surface's planform, as the family table shows it
        f = intended_figures(m)
        for k in SURFACE_FIGURES:
            out[f"{m.name}:{k}"] = getattr(f, k)
        if m.role == "wing" and out["projected_area_cm2"] is None:
            out["projected_area_cm2"] = f.projected_area_cm2
    out.update(neutral_point_x_mm=res.neutral_point_x_mm, neutral_point_from_mast_mm=res.neutral_point_from_mast_mm,
               static_margin_pct=res.static_margin_pct,
               takeoff_kmh=res.takeoff.speed_kmh if res.takeoff is not None else None)
    if res.cavitation is not None and res.cavitation.first_kmh is not None:
        out["cavitation_kmh"] = res.cavitation.first_kmh
    perf = res.performance
    if perf is not None and perf.takeoff_kmh is not None and math.isfinite(perf.takeoff_kmh):
        out["takeoff_kmh"] = perf.takeoff_kmh
    point = next((p for p in (perf.points if perf is not None else []) if abs(p["speed_kmh"] - v) < 1e-9), None)
    if t is None or not t.trimmable:  # no trim at that speed: no trimmed figures (the reason is in the balance)
        return out
    weight = sum(t.lift_n.values())
    out["wing_lift_n"] = sum(v for k, v in t.lift_n.items() if roles.get(k) == "wing")
    stab = [v for k, v in t.lift_n.items() if roles.get(k) == "stabilizer"]
    out["stab_lift_n"] = sum(stab) if stab else None
    out["stab_lift_pct_weight"] = 100.0 * sum(stab) / weight if stab and weight else None
    out["attitude_deg"] = t.attitude_deg
    out["induced_drag_n"] = t.induced_drag_n
    if point is not None:  # profile (ITTC-1957 line, form factor), induced, mast spray and junction
        out["drag_n"] = point["total_n"]
        out["lift_to_drag"] = point["l_over_d"]
    out["cp_from_mast_mm"] = t.cp_from_mast_mm if t.cp_from_mast_mm is not None else t.cp_x_mm
    return {k: _plain(x) for k, x in out.items()}


def _plain(x):
    """A plain Python number (not numpy's), None where not finite; other values as they are."""
    if isinstance(x, bool) or x is None or isinstance(x, str):
        return x
    try:
        f = float(x)
    except (TypeError, ValueError):
        return x
    if not math.isfinite(f):
        return None
    return int(x) if isinstance(x, int) else f


def with_mast_moves(rows: list[dict], base: dict) -> list[dict]:
    """Fill ``mast_move_mm``: how far the mast must move in its tracks, aft +, so that the net
    centre of pressure sits where it sat under the rider in ``base``. Its place on the board is
    (mast place) + (cp from mast); keeping it means moving the mast by base − variant."""
    b = base.get("cp_from_mast_mm")
    for r in rows:
        c = r.get("cp_from_mast_mm")
        r["mast_move_mm"] = (b - c) if c is not None and b is not None else None
    return rows
