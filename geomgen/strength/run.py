"""``geomgen loads``: first estimates of loads, stresses and stiffness of a foil set at a
condition the user states (speed and load factor; no default), for a material the user names."""

from __future__ import annotations

from .. import CAUTION, __version__
from ..errors import SpecError

#: Printed above and below every result of this package.
FIRST_ESTIMATE = (
    "FIRST ESTIMATES FOR PLANNING, NOT A STRUCTURAL ANALYSIS: beam theory on the intended solid "
    "sections of one material, loads from a linear inviscid lattice at one stated condition; no "
    "stress concentrations, joints, holes, laminate failure, fatigue, impact or buckling. A part must "
    "be proven by test and by qualified engineering before anyone rides it.")


def loads(project, speed_kmh: float, load_factor: float, material, allowable_mpa: float | None = None,
          side_force_n: float = 100.0) -> dict:
    """Loads and first estimates of every surface of ``project`` (a Project). Wings and
    stabilizers need the spec's ``[flight]`` mass; masts do not. Returns a JSON-able dict."""
    from ..hydro.guards import dimension_warnings
    from .estimate import mast_estimate, stiffness_along, wing_estimate

    models = project.models
    notes = []
    warnings = dimension_warnings(models)
    condition, wings = None, []
    lifting = [m for m in models if m.role in ("wing", "stabilizer") and m.orientation == "horizontal"]
    if lifting:
        if project.spec.flight is None:
            raise SpecError(f"{project.source}: flight: the loads of wings and stabilizers need the [flight] table "
                            "(mass_kg) to know the weight the stated load factor multiplies")
        from ..hydro.loading import loading_at

        cond, strips = loading_at(models, project.spec.flight, speed_kmh, load_factor)
        condition = dict(speed_kmh=cond.speed_kmh, load_factor=cond.load_factor, mass_kg=cond.mass_kg,
                         density_kg_m3=cond.density_kg_m3, attitude_deg=cond.attitude_deg,
                         total_lift_n=cond.lift_n, water=cond.water, cl_peak=cond.cl_peak, cl_max=cond.cl_max)
        warnings += cond.warnings or []
        by_name = {m.name: m for m in models}
        for st in strips:
            m = by_name[st.name]
            wings.append(wing_estimate(m, st, material, allowable_mpa, project.memo(("strength.table", m.name),
                                                                                   lambda m=m: stiffness_along(m))))
    masts = [mast_estimate(m, material, allowable_mpa, side_force_n,
                           project.memo(("strength.table", m.name), lambda m=m: stiffness_along(m)))
             for m in models if m.role == "mast"]
    for m in models:
        if m.role == "fin" or (m.role in ("wing", "stabilizer") and m not in lifting):
            notes.append(f'{m.role} "{m.name}": no loads known for it here; not estimated')
    notes.append("loads: lattice strip forces at the attitude where the set lifts load factor x weight at the "
                 "speed; bending about each section's chord-parallel centroidal axis; torsion about the "
                 "section centroid; solid sections (a laminated shell over a foam core is softer: see the "
                 "shell J in the check)")
    return {"geomgen_version": __version__, "spec": project.name, "first_estimate": FIRST_ESTIMATE,
            "material": material.as_dict(), "allowable_mpa": allowable_mpa, "condition": condition,
            "surfaces": wings, "masts": masts, "notes": notes, "warnings": warnings, "caution": CAUTION}


def format_loads(res: dict) -> str:
    """Plain-text summary of :func:`loads`."""
    mat = res["material"]
    out = [f"geomgen loads '{res['spec']}'", "", res["first_estimate"], "",
           f"material: {mat['name']}: E {mat['e_gpa']:g} GPa, G {mat['g_gpa']:g} GPa, "
           f"density {mat['density_kg_m3']:g} kg/m³" + (" (EXAMPLE value; " if mat["example"] else " (")
           + f"source: {mat['source']})"]
    c = res["condition"]
    if c:
        out.append(f"condition: {c['speed_kmh']:g} km/h, load factor {c['load_factor']:g} on {c['mass_kg']:g} kg: "
                   f"total lift {c['total_lift_n']:.0f} N at attitude {c['attitude_deg']:.2f}°")
        out.append(f"water: {c['water']}")
    allow = res["allowable_mpa"]
    out.append(f"allowable stress: {allow:g} MPa (given by the user)" if allow else
               "allowable stress: not given (no margin computed)")
    for w in res["surfaces"]:
        lift = w.get("half_lift_n", w.get("lift_n"))
        out += ["", f'{w["role"]} "{w["name"]}" (clamped at its {"centre" if w["mirrored"] else "root"}, '
                    f'{w["length_mm"]:.0f} mm to the tip{", each half" if w["mirrored"] else ""}):',
                f"  lift {lift:.0f} N{' per half' if w['mirrored'] else ''}; root shear {w['root_shear_n']:.0f} N, "
                f"root bending moment {w['root_moment_nm']:.1f} N·m, root torque {w['root_torque_nm']:+.2f} N·m",
                f"  bending stress: root {w['root_stress_mpa']:.1f} MPa, largest {w['max_stress_mpa']:.1f} MPa at "
                f"{w['max_stress_at_mm']:.0f} mm from the root" + _margin(w),
                f"  tip deflection {w['tip_deflection_mm']:.1f} mm, tip twist {w['tip_twist_deg']:+.2f}° "
                "(+ leading edge up)"]
    for m in res["masts"]:
        out += ["", f'mast "{m["name"]}" (clamped at the board, {m["length_mm"]:.0f} mm to the fuselage):',
                f"  per {m['side_force_n']:g} N side force at the fuselage: "
                f"deflection {m['tip_deflection_mm']:.1f} mm, root moment {m['root_moment_nm']:.1f} N·m, "
                f"bending stress {m['max_stress_mpa']:.1f} MPa at "
                f"{m['max_stress_at_mm']:.0f} mm" + _margin(m),
                f"  torsional stiffness {m['torsional_stiffness_nm_per_deg']:.2f} N·m per degree "
                f"({m['twist_per_nm_deg']:.3f}° per N·m)"]
        if "first_bending_hz_bare_in_air" in m:
            out.append(f"  first bending frequency {m['first_bending_hz_bare_in_air']:.1f} Hz: the bare mast in air, "
                       "nothing at its end (wings, fuselage and the water around it lower it a lot)")
    if res.get("warnings"):
        out += [""] + [f"warning: {w['message']}" for w in res["warnings"]]
    out += [""] + [f"note: {n}" for n in res["notes"]]
    out += ["", "CAUTION: " + res["first_estimate"], "CAUTION: " + res["caution"]]
    return "\n".join(out)


def _margin(d: dict) -> str:
    if "margin" not in d:
        return ""
    return (f"; allowable / stress - 1 = {d['margin']:+.2f} (a margin on this estimate only, not a verdict "
            "on the part)")


def write_loads(project, res: dict, text: str):
    """Write the summary (text) and the JSON into the set's ``report/``."""
    from ..outputs import Output, output_name
    from ..outputs import inputs as made_from

    made = made_from.set_geometry(project.spec) + made_from.flight(project.spec)
    return project.write("loads", [
        Output(output_name(project.name, "loads", suffix=".txt"), "text", text,
               "first estimates of loads, stresses and stiffness (what the loads command printed)", made),
        Output(output_name(project.name, "loads", suffix=".json"), "json", res, "the loads estimate as JSON", made)])
