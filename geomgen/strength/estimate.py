"""First estimates of a part as a beam clamped at its root: wings and stabilizers under the
lattice's spanwise loading, masts per 100 N of side force at the fuselage.

Assumptions (printed with every result): the solid section of one material (E, G) at every
span position, intended from the spec's sections (the check holds the written file to them);
straight elastic beam along the span axis through the section centroids; lift bends the part
about its chord-parallel centroidal axis (the product moment, sweep, dihedral and incidence
coupling are left out); torsion about the centroid (for a solid, nearly symmetric section
the shear centre lies close to it); the fuselage joint and the mast clamp are rigid.
"""

from __future__ import annotations

import math

import numpy as np

from ..geometry.sectionprops import model_section_properties, polygon_moments
from . import beam

#: Span positions (root to tip, inclusive) where section properties are computed; between
#: them I, J and W are interpolated in log scale (they go roughly as chord⁴ and chord³).
STIFFNESS_POINTS = 9
#: Grid of the beam integrals (trapezoidal rule), points root to tip.
GRID = 801
#: Points of the spanwise tables in the results (plots, JSON).
TABLE_POINTS = 41


def _root_y(model) -> float:
    return 0.0 if model.mirror else float(model.planform.y[0])


def stiffness_along(model, points: int = STIFFNESS_POINTS) -> dict:
    """Section properties at ``points`` span positions from the root to just inside the tip:
    ``s_mm`` (from the root), ``area_mm2``, ``i_chord_mm4``, ``w_mm3`` (the smaller modulus
    about the chord-parallel axis), ``j_mm4``, ``chord_mm``."""
    y0, y1 = _root_y(model), float(model.half_span)
    # the last point stays inside the tip's flat end (a round tip's chord falls steeply)
    ys = y0 + (y1 - y0) * 0.5 * (1 - np.cos(np.linspace(0, np.pi * 0.97, points)))
    props = [model_section_properties(model, float(y)) for y in ys]
    return {"s_mm": ys - y0, "chord_mm": np.array([p.chord_mm for p in props]),
            "area_mm2": np.array([p.area_mm2 for p in props]),
            "i_chord_mm4": np.array([p.i_chord_mm4 for p in props]),
            "w_mm3": np.array([p.w_chord_mm3 for p in props]),
            "j_mm4": np.array([p.j_solid_mm4 for p in props])}


def _along(s: np.ndarray, table: dict, key: str) -> np.ndarray:
    return np.exp(np.interp(s, table["s_mm"], np.log(table[key])))


def _centroid(model, y: float) -> np.ndarray:
    """Datum centroid (3,) of the finished section at span ``y``."""
    loop = model.section_loop(float(y), 200)
    ax = int(np.argmax(np.abs(model.span_axis)))
    keep = [k for k in range(3) if k != ax]
    m = polygon_moments(loop[:, keep])
    c = np.empty(3)
    c[keep], c[ax] = (m["cx"], m["cy"]), loop[0, ax]
    return c


def _table(s, **cols) -> dict:
    idx = np.unique(np.linspace(0, len(s) - 1, TABLE_POINTS).round().astype(int))
    return {"s_mm": s[idx].tolist(), **{k: np.asarray(v)[idx].tolist() for k, v in cols.items()}}


def _stress(s, moment, table, allowable_mpa):
    w = _along(s, table, "w_mm3")
    stress = np.abs(moment) / w
    k = int(np.argmax(stress))
    out = {"root_stress_mpa": float(stress[0]), "max_stress_mpa": float(stress[k]), "max_stress_at_mm": float(s[k])}
    if allowable_mpa:
        out["allowable_mpa"] = allowable_mpa
        out["margin"] = allowable_mpa / float(stress[k]) - 1.0
    return out, stress


def wing_estimate(model, strips, material, allowable_mpa: float | None = None, table: dict | None = None) -> dict:
    """Shear, bending moment, stress, tip deflection and twist of a wing or stabilizer under its
    strip loads (:class:`geomgen.hydro.loading.StripLoads`)."""
    table = table or stiffness_along(model)
    y0 = _root_y(model)
    length = float(model.half_span) - y0
    s = np.linspace(0.0, length, GRID)
    at = strips.y_mm - y0
    axis = model.span_axis / np.linalg.norm(model.span_axis)
    # torque about the span axis through each strip's section centroid (positive: leading edge up)
    tq = np.array([np.cross(cp - _centroid(model, y), f) @ axis
                   for y, cp, f in zip(strips.y_mm, strips.cp_mm, strips.force_n)])
    shear, moment = beam.shear_and_moment(s, at, strips.lift_n)
    t = beam.torque(s, at, tq)
    e, g = material.e_gpa * 1e3, material.g_gpa * 1e3  # MPa
    ei, gj = e * _along(s, table, "i_chord_mm4"), g * _along(s, table, "j_mm4")
    slope, defl = beam.deflection(s, moment, ei)
    phi = beam.twist(s, t, gj)
    stress_fig, stress = _stress(s, moment, table, allowable_mpa)
    return {"name": model.name, "role": model.role, "length_mm": length, "mirrored": model.mirror,
            "half_lift_n" if model.mirror else "lift_n": float(np.sum(strips.lift_n)),
            "root_shear_n": float(shear[0]), "root_moment_nm": float(moment[0]) * 1e-3,
            "root_torque_nm": float(t[0]) * 1e-3, **stress_fig,
            "tip_deflection_mm": float(defl[-1]), "tip_slope_deg": math.degrees(float(slope[-1])),
            "tip_twist_deg": math.degrees(float(phi[-1])),
            "root_section": {"i_chord_mm4": float(table["i_chord_mm4"][0]), "w_mm3": float(table["w_mm3"][0]),
                             "j_mm4": float(table["j_mm4"][0]), "area_mm2": float(table["area_mm2"][0])},
            "spanwise": _table(s, shear_n=shear, moment_nm=moment * 1e-3, torque_nm=t * 1e-3, stress_mpa=stress,
                               ei_nm2=ei * 1e-6, gj_nm2=gj * 1e-6, deflection_mm=defl,
                               twist_deg=np.degrees(phi))}


def mast_estimate(model, material, allowable_mpa: float | None = None, side_force_n: float = 100.0,
                  table: dict | None = None) -> dict:
    """A mast clamped at the board (its root station) with ``side_force_n`` across it at its
    tip (the fuselage): deflection and bending stress there, torsional stiffness, and the
    first bending frequency of the bare mast in air."""
    table = table or stiffness_along(model)
    length = float(model.half_span) - _root_y(model)
    s = np.linspace(0.0, length, GRID)
    shear, moment = beam.shear_and_moment(s, [length + 1e-9], [side_force_n])
    e, g = material.e_gpa * 1e3, material.g_gpa * 1e3
    ei, gj = e * _along(s, table, "i_chord_mm4"), g * _along(s, table, "j_mm4")
    _, defl = beam.deflection(s, moment, ei)
    stress_fig, stress = _stress(s, moment, table, allowable_mpa)
    k_t = beam.torsional_stiffness(s, gj)  # N·mm/rad
    out = {"name": model.name, "role": model.role, "length_mm": length, "side_force_n": side_force_n,
           "tip_deflection_mm": float(defl[-1]), "root_moment_nm": float(moment[0]) * 1e-3, **stress_fig,
           "torsional_stiffness_nm_per_deg": k_t * 1e-3 * math.pi / 180.0,
           "twist_per_nm_deg": 1e3 / k_t * 180.0 / math.pi,
           "root_section": {"i_chord_mm4": float(table["i_chord_mm4"][0]), "w_mm3": float(table["w_mm3"][0]),
                            "j_mm4": float(table["j_mm4"][0]), "area_mm2": float(table["area_mm2"][0])},
           "spanwise": _table(s, moment_nm=moment * 1e-3, stress_mpa=stress, ei_nm2=ei * 1e-6, gj_nm2=gj * 1e-6,
                              deflection_mm=defl)}
    if math.isfinite(material.density_kg_m3):
        m = material.density_kg_m3 * 1e-9 * _along(s, table, "area_mm2")  # kg/mm
        out["first_bending_hz_bare_in_air"] = beam.first_bending_frequency(s, ei, m)
    return out
