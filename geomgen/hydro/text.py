"""Plain-text report of a :class:`HydroResult`: aligned tables with units, and the caution."""

from __future__ import annotations

import math
import textwrap

from .water import G


def _f(v, fmt: str) -> str:
    """Format a number, '—' for None/nan."""
    if v is None or (isinstance(v, float) and not math.isfinite(v)):
        return "—"
    return format(v, fmt)


def table(headers: list[str], rows: list[list[str]], left: int = 1) -> list[str]:
    """Aligned table: the first ``left`` columns left-aligned, the rest right-aligned."""
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]

    def line(cells):
        return "  ".join(c.ljust(w) if i < left else c.rjust(w) for i, (c, w) in enumerate(zip(cells, widths)))

    return [line(headers), line(["-" * w for w in widths])] + [line(r) for r in rows]


def format_hydro(r) -> str:
    """Text report of the hydrodynamic analysis.

    Parameters
    ----------
    r : HydroResult

    Returns
    -------
    str
        Lines for a terminal: reference, per-surface table, set figures, neutral point,
        trim table (if trimmed), takeoff estimate, sideslip (if computed), notes, caution.
    """
    ref, p = r.reference, r.panels
    out = [f"Hydrodynamics: vortex-lattice method, {p['total']} panels "
           f"({p['span_panels_per_half']} strips per half span, {p['chord_panels']} along the chord)",
           f"Reference: front wing '{ref['wing']}', S = {ref['area_cm2']:.1f} cm², "
           f"MAC = {ref['mac_mm']:.1f} mm, span = {ref['span_mm']:.1f} mm"]
    if ref["mast_x_mm"] is not None:
        out.append(f"Mast reference: '{ref['mast']}' {ref['mast_reference']}, x = {ref['mast_x_mm']:.1f} mm")
    else:
        out.append("No mast: positions are datum x, from the datum origin")
    mp = ref["moment_point_mm"]
    out += [f"Datum x aft, z up; moments about x = {mp[0]:.1f} mm, z = {mp[2]:.1f} mm, positive nose up",
            f"Reference attitude {r.alpha_ref_deg:.2f}° (free stream to the datum x axis)", ""]
    rows = [[s.name, s.role, _f(s.area_cm2, ".1f"), _f(s.aspect_ratio, ".2f"), _f(s.cl, ".4f"),
             _f(s.lift_slope_per_rad, ".3f"), _f(s.lift_slope_per_deg, ".4f"), _f(s.lift_slope_alone_per_rad, ".3f"),
             _f(s.zero_lift_attitude_deg, ".2f"), _f(s.ac_x_mm, ".1f"), _f(s.ac_pct_mac, ".1f"),
             _f(s.cm_ac, ".4f"), _f(s.cdi, ".5f"), _f(s.span_efficiency, ".3f")] for s in r.surfaces]
    out += table(["surface", "role", "area cm²", "AR", "CL", "CLα /rad", "CLα /deg", "alone /rad",
                  "zero-lift °", "ac x mm", "ac % MAC", "Cm ac", "CDi", "e alone"], rows, left=2)
    out += ["", "CLα in the set includes the downwash; 'alone' is the surface by itself. "
                "Surface coefficients on its own area and MAC.", ""]
    out.append(f"Set: CL {r.cl:.4f}, CLα {r.lift_slope_per_rad:.3f} /rad ({r.lift_slope_per_deg:.4f} /deg), "
               f"zero-lift attitude {_f(r.zero_lift_attitude_deg, '.2f')}°, Cm {r.cm:.4f}, "
               f"Cmα {r.cm_alpha_per_rad:.3f} /rad ({r.cm_alpha_per_deg:.5f} /deg), CDi {r.cdi:.5f}, "
               f"e {_f(r.span_efficiency, '.3f')}")
    out.append(neutral_point_line(r))
    if r.downwash_gradient is not None:
        out.append(f"Downwash gradient at the stabilizer (1 − CLα in set / CLα alone): {r.downwash_gradient:.3f}")
    if r.static_margin_pct is not None:
        src = f" (from {r.cg_source})" if r.cg_source else ""
        out.append(f"Static margin with the weight at x = {r.cg_x_mm:.1f} mm{src}: {r.static_margin_pct:+.1f} % MAC "
                   f"({'stable' if r.static_margin_pct > 0 else 'unstable'} in pitch)")
    if r.trim:
        w = r.water
        out += ["", f"Trim, lift = weight: {r.mass_kg:g} kg ({r.mass_kg * G:.0f} N), {w['name']} "
                    f"ρ = {w['density']:g} kg/m³, ν = {w['viscosity']:.4g} m²/s ({w['source']})",
                water_line(w)]
        names = [s.name for s in r.surfaces]
        mast = ref["mast_x_mm"] is not None
        heads = ["km/h", "m/s", "attitude °"] + [f"{n} N (kgf)" for n in names] + \
                ["cp x mm"] + (["cp to mast mm", "M mast N·m"] if mast else []) + ["Di N"] + [f"Re {n}" for n in names]
        if r.cg_x_mm is not None:
            heads.insert(heads.index("Di N"), "M weight N·m")
        rows = []
        for t in r.trim:
            row = [_f(t.speed_kmh, ".1f"), _f(t.speed_ms, ".2f"), _f(t.attitude_deg, ".2f")]
            row += [f"{_f(t.lift_n.get(n), '.0f')} ({_f(t.lift_kgf.get(n), '.1f')})" for n in names]
            row += [_f(t.cp_x_mm, ".1f")]
            if mast:
                row += [_f(t.cp_from_mast_mm, "+.1f"), _f(t.moment_about_mast_nm, "+.1f")]
            if r.cg_x_mm is not None:
                row.append(_f(t.moment_about_weight_nm, "+.1f"))
            row += [_f(t.induced_drag_n, ".1f")] + [_f(t.reynolds.get(n), ".3g") for n in names]
            rows.append(row)
        lines = table(heads, rows, left=0)
        for k, t in enumerate(r.trim):  # a speed that does not trim: the reason in its row
            if not t.trimmable:
                lines[2 + k] = f"{_f(t.speed_kmh, '.1f').rjust(len(heads[0]))}  {t.reason}"
        out += lines
        out.append("cp: where the weight must act for balance (negative 'to mast': ahead of it). "
                   "Lift is negative when a surface pushes down." if mast else
                   "cp x: where the weight must act for balance, datum x from the datum origin (no mast; "
                   "negative: ahead of it). Lift is negative when a surface pushes down.")
    if r.takeoff is not None:
        to = r.takeoff
        out.append(f"Estimated takeoff: {_f(to.speed_kmh, '.1f')} km/h ({_f(to.speed_ms, '.2f')} m/s) at attitude "
                   f"{_f(to.attitude_deg, '.1f')}°, where the front wing's section cl first reaches {to.cl_max:g} "
                   f"(at |y| = {_f(to.limiting_y_mm, '.0f')} mm)")
    optional = ((r.lateral, sideslip_lines), (r.free_surface, free_surface_lines), (r.cavitation, cavitation_lines),
                (r.performance, performance_lines), (r.stance, stance_lines))
    for part, lines_of in optional:  # the analyses that ran, in this order
        if part is not None:
            out += lines_of(part)
    if r.warnings:
        out += ["", "Warnings (plausibility guards: where the set leaves what a rider can ride; warnings, not "
                    "refusals):"]
        out += [f"warning: {w['message']}" for w in r.warnings]
    out += [""] + [f"Note: {n}" for n in r.notes]
    out += [""] + textwrap.wrap("CAUTION: " + r.caution, 100)
    return "\n".join(out)


def neutral_point_line(r) -> str:
    """Where the neutral point is: datum x, % of the front wing's MAC, and from the mast (or datum origin)."""
    np_line = (f"Neutral point: x = {r.neutral_point_x_mm:.1f} mm, {r.neutral_point_pct_mac:.1f} % MAC "
               f"from the front wing's MAC leading edge")
    if r.neutral_point_from_mast_mm is not None:
        d = r.neutral_point_from_mast_mm
        np_line += (f"; {abs(d):.1f} mm {'aft of' if d >= 0 else 'ahead of'} the mast reference "
                    f"({r.neutral_point_from_mast_pct_mac:+.1f} % MAC)")
    else:
        d = r.neutral_point_x_mm
        np_line += f"; {abs(d):.1f} mm {'aft of' if d >= 0 else 'ahead of'} the datum origin (no mast)"
    return np_line


def sideslip_lines(la) -> list[str]:
    """The sideslip derivatives and each surface's share of the side force."""
    out = ["", f"Sideslip (masts and fins in the lattice): CYβ {la.side_force_per_deg:.5f} /deg, "
               f"Clβ {la.roll_moment_per_deg:.5f} /deg, Cnβ {la.yaw_moment_per_deg:.5f} /deg "
               "(right-hand about datum x and z, front-wing S and span)"]
    out += ["  " + ", ".join(f"{k} {v:.5f}" for k, v in la.side_force_slope_per_deg.items()) + " (CYβ share /deg)"]
    return out


def free_surface_lines(fs) -> list[str]:
    """The free-surface comparison against deep water, with the model's limits."""
    out = ["", f"Free surface: still water at z = {fs.water_z_mm:.0f} mm ({fs.how}); against deep water:"]
    rows = [[s["name"], _f(s["depth_root_mm"], ".0f"), _f(s["depth_min_mm"], ".0f"), _f(s["depth_over_mac"], ".2f"),
             _f(s["lift_slope_change_pct"], "+.2f")] for s in fs.surfaces]
    out += table(["surface", "depth root mm", "depth min mm", "depth/MAC", "CLα change %"], rows)
    out.append(f"Neutral point moves {fs.neutral_point_shift_mm:+.1f} mm ({fs.neutral_point_shift_pct_mac:+.2f} % MAC; "
               f"+ aft) from {fs.deep_neutral_point_x_mm:.1f} mm in deep water")
    if fs.trim:
        names = list(fs.trim[0]["lift_change_n"])
        rows = [[_f(t["speed_kmh"], ".1f"), _f(t["froude_depth"], ".2f"), _f(t["attitude_change_deg"], "+.2f")]
                + [_f(t["lift_change_n"][n], "+.1f") for n in names]
                + [_f(t["cp_shift_mm"], "+.1f"), _f(t["induced_drag_change_n"], "+.2f")] for t in fs.trim]
        out += table(["km/h", "V/√(g·h)", "attitude Δ°"] + [f"{n} ΔL N" for n in names] + ["cp Δ mm", "Di Δ N"],
                     rows, left=0)
    out += textwrap.wrap("Limits: " + fs.limits + ".", 100)
    return out


def cavitation_lines(cv) -> list[str]:
    """Cavitation onset per surface, the margins at the trim speeds, and the method's limits."""
    out = ["", "Cavitation onset (first estimate; trimmed, lift = weight):"]
    rows = [[s["name"], _f(s["onset_kmh"], ".1f"), _f(s["onset_ms"], ".2f"), _f(s["y_mm"], ".0f"),
             _f(s["x_over_c"], ".3f"), s["side"], _f(s["cl"], ".3f"), _f(s["cp_min"], ".3f"), _f(s["depth_mm"], ".0f"),
             s["where"]] for s in cv.surfaces]
    out += table(["surface", "km/h", "m/s", "y mm", "x/c", "side", "cl", "Cp,min", "depth mm", "where"], rows)
    if cv.first_surface:
        out.append(f"First cavitation: '{cv.first_surface}' at about {cv.first_kmh:.0f} km/h.")
    if cv.margin_at_speeds:
        names = [k for k in cv.margin_at_speeds[0] if k != "speed_kmh"]
        rows = [[_f(m["speed_kmh"], ".1f")] + [_f(m[n], ".2f") for n in names] for m in cv.margin_at_speeds]
        out += ["Margin σ + Cp,min of the worst strip (positive: no cavitation):"]
        out += table(["km/h"] + names, rows, left=0)
    for n in cv.notes:
        out += textwrap.wrap("Cavitation: " + n, 100)
    return out


def performance_lines(pf) -> list[str]:
    """Drag, power and L/D at the [flight] speeds, the usable envelope and the drag sources."""
    out = ["", "Drag and power, trimmed (first estimates):"]
    if pf.points:
        terms = list(pf.points[0]["drag_n"])
        rows = [[_f(p["speed_kmh"], ".1f"), _f(p["attitude_deg"], ".2f")] + [_f(p["drag_n"][k], ".1f") for k in terms]
                + [_f(p["total_n"], ".1f"), _f(p["total_kgf"], ".2f"), _f(p["power_w"], ".0f"),
                   _f(p["l_over_d"], ".1f")]
                for p in pf.points]
        out += table(["km/h", "attitude °"] + [f"{k} N" for k in terms] + ["total N", "kgf", "power W", "L/D"], rows,
                     left=0)
    out.append(envelope_line(pf))
    out += [f"Drag: {s}" for s in pf.sources] + pf.notes
    return out


def water_line(w: dict) -> str:
    """The water every command of the set trims in (the free surface or deep water)."""
    if w.get("free_surface"):
        return f"Water: free surface at z = {w['surface_z_mm']:.0f} mm ({w['surface']})"
    return f"Water: {w.get('surface') or 'deep water'}"


def envelope_line(pf) -> str:
    """The usable envelope and what ends it at each side."""
    lo, hi = pf.envelope_kmh
    why = pf.envelope_reasons or ["takeoff", "first cavitation"]
    return (f"Usable envelope: from {_f(lo, '.1f')} km/h ({why[0]}) to {_f(hi, '.1f')} km/h ({why[1]}); "
            "estimates: test before relying on either end.")


def stance_lines(st) -> list[str]:
    """Mast move under the rider and the stabilizer shim."""
    out = ["", f"Rider and shim at the cruise speed {st.cruise_kmh:g} km/h (first estimates; try on the water):"]
    if st.mast_move_mm is not None:
        d = st.mast_move_mm
        out.append(f"Rider's weight {abs(st.rider_from_mast_mm):.0f} mm "
                   f"{'ahead of' if st.rider_from_mast_mm < 0 else 'aft of'} the mast reference: slide the mast "
                   f"{abs(d) / 10:.1f} cm {'aft' if d > 0 else 'forward'} to put the centre of pressure under it.")
    if st.per_speed:
        rows = [[_f(p["speed_kmh"], ".1f"), _f(p["cp_from_mast_mm"], "+.1f"),
                 _f(p["mast_move_mm"] / 10 if p["mast_move_mm"] is not None else None, "+.1f")] for p in st.per_speed]
        lines = table(["km/h", "cp to mast mm", "mast move cm (+ aft)"], rows, left=0)
        for k, p in enumerate(st.per_speed):
            if p["mast_move_mm"] is None and p.get("reason"):
                lines[2 + k] = f"{_f(p['speed_kmh'], '.1f').rjust(4)}  {p['reason']}"
        out += lines
    if st.shim_deg is not None:
        out.append(f"Stabilizer '{st.stabilizer}': {st.stabilizer_lift_now_kgf:+.2f} kgf now; for "
                   f"{st.stabilizer_target_kgf:+.2f} kgf shim it {st.shim_deg:+.2f}° (leading edge "
                   f"{'up' if st.shim_deg > 0 else 'down'}; incidence {st.new_incidence_deg:.2f}°), "
                   f"reaching {st.stabilizer_lift_reached_kgf:+.2f} kgf.")
    out += [f"Note: {n}" for n in st.notes]
    return out
