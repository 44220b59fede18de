"""Section properties at the stations: intended (the model's sections) vs measured (slices of
the written STEP), with the spec's ``check_at`` and root ``expect`` figures."""

from __future__ import annotations

import numpy as np

from .. import defaults
from ..geometry.sectionprops import SectionProps, model_section_properties, section_properties
from .compare import Record, outside

#: key -> (label, unit, SectionProps field, check_at field, root expect field)
SECTION_FIGURES = {
    "area": ("section area", "mm²", "area_mm2", "area_mm2", "root_area_mm2"),
    "i_chord": ("I about chord-parallel axis", "mm⁴", "i_chord_mm4", "i_chord_mm4", "root_i_chord_mm4"),
    "i_normal": ("I about chord-normal axis", "mm⁴", "i_normal_mm4", "i_normal_mm4", "root_i_normal_mm4"),
    "w_chord": ("section modulus (extreme fibre)", "mm³", "w_chord_mm3", None, None),
    "j_solid": ("torsion constant J, solid", "mm⁴", "j_solid_mm4", "j_mm4", "root_j_mm4"),
    "j_shell": ("torsion constant J, laminate shell", "mm⁴", "j_shell_mm4", None, None),
}


def _tolerances(p: SectionProps, points2d: np.ndarray) -> dict:
    """Build tolerance of each figure (see defaults.CHECK_SECTION_MM)."""
    d = defaults.CHECK_SECTION_MM
    perim = float(np.linalg.norm(np.diff(np.vstack([points2d, points2d[:1]]), axis=0), axis=1).sum())
    h = max(float(p.w_chord_mm3 and p.i_chord_mm4 / p.w_chord_mm3), 1e-9)  # extreme fibre distance
    half_chord = 0.5 * p.chord_mm
    t_i = d * perim * h * h
    tol: dict[str, float | None] = {"area": d * perim, "i_chord": t_i, "i_normal": d * perim * half_chord ** 2,
           "w_chord": t_i / h + p.i_chord_mm4 * d / h ** 2}
    for k in ("j_solid", "j_shell"):
        v = getattr(p, k + "_mm4")
        tol[k] = None if v is None else defaults.CHECK_TORSION_REL * v + 4 * t_i
    return tol


def _value(p: SectionProps, attr: str):
    return getattr(p, attr)


def section_records(part: str, model, measured_stations: list, axis: int, check_at: list,
                    expect: dict) -> tuple[list[Record], list[dict]]:
    """(records, per-station {y_mm, intended, measured} dicts for the JSON) of one part."""
    from ..geometry.sectionprops import chord_frame

    wanted = {float(s.y): s for s in check_at}
    root_y = 0.0 if model.mirror else float(model.planform.y[0])
    lam = model.spec.laminate.thickness if model.spec.laminate is not None else None
    records, table = [], []
    for ms in measured_stations:
        y = ms["y_mm"]
        it = model_section_properties(model, y)
        me = section_properties(ms["points"], axis, laminate_mm=lam)
        tol = _tolerances(it, chord_frame(ms["points"], axis)[0])
        ca = wanted.get(y)
        table.append({"y_mm": y, "intended": it.as_dict() | {"w_chord_mm3": it.w_chord_mm3},
                      "measured": me.as_dict() | {"w_chord_mm3": me.w_chord_mm3}})
        for key, (label, unit, attr, ca_field, root_field) in SECTION_FIGURES.items():
            iv, mv = _value(it, attr), _value(me, attr)
            if iv is None:
                continue
            rec = Record(part, f"{key}@{y:g}", f"  {label} at {y:g} mm", unit, iv, step=mv, tol_step=tol[key])
            if mv is None or outside(mv, iv, tol[key]):
                rec.fault.append("STEP")
            exp = getattr(ca, ca_field) if (ca is not None and ca_field) else None
            if exp is None and root_field and abs(y - root_y) < 1e-9:
                exp = expect.get(root_field)
            if exp is not None:
                rec.expected, rec.expected_tol = exp.value, exp.tolerance_for(exp.value)
                rec.verdict = "pass" if mv is not None and abs(mv - exp.value) <= rec.expected_tol else "FAIL"
            records.append(rec)
    return records, table
