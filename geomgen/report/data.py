"""The report's one data dict: check records, hydrodynamics and drawing geometry, JSON-able.

Everything the HTML and Markdown pages show, numbers and drawings alike, is read from the
dict :func:`report_data` returns (and written as ``<set>-report.json``); the renderers never
compute. Lengths mm, angles deg, areas cm², volumes cm³, forces N and kgf, speeds km/h and
m/s. Drawing coordinates are in the datum frame (x aft, y starboard, z up) unless a key
says ``section`` (a section's own frame: x from the leading edge along the chord, z toward
the upper side), rounded to 0.001 mm.
"""

from __future__ import annotations

import copy
import json
import math

import numpy as np

from .. import CAUTION, __version__
from ..errors import SpecError

#: Version of the report dict's layout (bump when a key changes meaning).
REPORT_FORMAT = 1

#: Points per side of a drawn section, samples along a drawn span.
SECTION_POINTS, SPAN_SAMPLES = 80, 81

#: Figures summarised per part (keys of the check records), in this order.
MAIN_FIGURES = ("span_mm", "projected_area_cm2", "aspect_ratio", "mac_mm", "mac_y_mm", "mac_le_x_mm",
                "mac_qc_x_mm", "volume_cm3", "wetted_area_cm2", "datum_area_cm2")


def _clean(v):
    """numpy -> Python, nan/inf -> None, tuples -> lists, recursively (strict JSON)."""
    if isinstance(v, np.ndarray):
        v = v.tolist()
    if isinstance(v, np.generic):
        v = v.item()
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, dict):
        return {str(k): _clean(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_clean(x) for x in v]
    return v


def _r(a, nd: int = 3) -> list:
    """Rounded list of a coordinate array (drawings only; table values stay unrounded)."""
    return np.round(np.asarray(a, float), nd).tolist()


def _span_axis(model) -> int:
    return int(np.argmax(np.abs(model.span_axis)))


def _span_samples(model) -> np.ndarray:
    """Span positions over the whole part, crowded toward the ends, stations included."""
    lo, hi = model.y_range
    t = 0.5 * (1.0 - np.cos(np.linspace(0.0, math.pi, SPAN_SAMPLES)))
    ys = set((lo + (hi - lo) * t).tolist())
    ys |= ({float(v) for v in model.station_breaks}
           | ({-float(v) for v in model.station_breaks} if model.mirror else set()))
    return np.array(sorted(v for v in ys if lo - 1e-9 <= v <= hi + 1e-9))


def _camber(section) -> tuple[float, float]:
    """(max camber % chord, signed: + toward the upper side; its position % chord)."""
    x = np.linspace(0.0, 1.0, 2001)
    yu, yl = section.surfaces_at(x)
    m = 0.5 * (yu + yl)
    i = int(np.argmax(np.abs(m)))
    return 100.0 * float(m[i]), 100.0 * float(x[i])


def _outline(model) -> dict:
    """Projected outline along the span: leading- and trailing-edge x at datum span positions."""
    ax = _span_axis(model)
    span, le, te = [], [], []
    for y in _span_samples(model):
        p = model.section_loop(float(y), SECTION_POINTS)
        span.append(float(p[:, ax].mean()))
        le.append(float(p[:, 0].min()))
        te.append(float(p[:, 0].max()))
    le_x, te_x = np.array(le), np.array(te)
    return {"axis": "xyz"[ax], "span_mm": _r(span), "le_x_mm": _r(le_x), "te_x_mm": _r(te_x),
            "quarter_chord_x_mm": _r(le_x + 0.25 * (te_x - le_x))}


def _section_shape(model, y: float) -> dict:
    """A station's finished section in its own frame (mm) with its mean line."""
    sec = model.section(y)
    c = float(model.chord(y))
    loop = sec.loop(SECTION_POINTS) * c
    x = 0.5 * (1.0 - np.cos(np.linspace(0.0, math.pi, SECTION_POINTS)))
    yu, yl = sec.surfaces_at(x)
    return {"x_mm": _r(loop[:, 0]), "z_mm": _r(loop[:, 1]),
            "mean_x_mm": _r(x * c), "mean_z_mm": _r(0.5 * (yu + yl) * c)}


def _stations(model) -> list[dict]:
    out = []
    for st, y in zip(model.spec.station, model.planform.y):
        y = float(y)
        sec = model.section(y)
        t, xt = sec.max_thickness()
        cam, xc = _camber(sec)
        c = float(model.chord(y))
        out.append({"y_mm": y, "chord_mm": c, "twist_deg": float(model.planform("twist", y)),
                    "section": model.base_section(y).label, "thickness_pct": 100.0 * t,
                    "thickness_mm": t * c, "thickness_at_pct": 100.0 * xt, "camber_pct": cam,
                    "camber_at_pct": xc, "shape": _section_shape(model, y)})
    return out


def _spanwise(model) -> dict:
    """Chord and twist from the root to the tip (half span of a mirrored part)."""
    y0, y1 = float(model.planform.y[0]), model.half_span
    t = 0.5 * (1.0 - np.cos(np.linspace(0.0, math.pi, SPAN_SAMPLES)))
    ys = np.unique(np.concatenate([y0 + (y1 - y0) * t, np.asarray(model.station_breaks, float)]))
    return {"y_mm": _r(ys), "chord_mm": _r(model.chord(ys)), "twist_deg": _r(model.planform("twist", ys), 4)}


def _section_props(model) -> dict:
    """Section properties for the report: the root section (with J) and its shape in its chord
    frame, second moments along the span (no J: the polygon figures are cheap), J at the stations."""
    from ..geometry.sectionprops import chord_frame, model_section_properties

    y0, y1 = float(model.planform.y[0]), float(model.half_span)
    root = model_section_properties(model, y0)
    axis = int(np.argmax(np.abs(model.span_axis)))
    shape, _, _ = chord_frame(model.section_loop(y0, SECTION_POINTS), axis)
    t = 0.5 * (1.0 - np.cos(np.linspace(0.0, math.pi * 0.97, 25)))
    ys = y0 + (y1 - y0) * t
    along = [model_section_properties(model, float(y), torsion=False) for y in ys]
    st = [model_section_properties(model, float(y)) for y in model.planform.y]
    return {"root": root.as_dict() | {"w_chord_mm3": root.w_chord_mm3, "y_mm": y0},
            "root_shape": {"x_mm": _r(shape[:, 0]), "z_mm": _r(shape[:, 1])},
            "span": {"y_mm": _r(ys - y0), "i_chord_mm4": [p.i_chord_mm4 for p in along],
                     "i_normal_mm4": [p.i_normal_mm4 for p in along]},
            "stations": {"y_mm": [float(y) - y0 for y in model.planform.y], "j_mm4": [p.j_solid_mm4 for p in st],
                         "j_shell_mm4": [p.j_shell_mm4 for p in st]}}


def _side(model) -> dict:
    """Side view (x–z): root and tip sections of a horizontal part, true shape; the root chord line."""
    y0 = 0.0 if model.mirror else float(model.planform.y[0])
    root = model.section_loop(y0, SECTION_POINTS)
    tip = model.section_loop(model.half_span, SECTION_POINTS)
    le, te = model.place(y0, np.array([[0.0, 0.0], [1.0, 0.0]]))  # chord line ends, datum
    angle = math.degrees(math.atan2(-(te[2] - le[2]), te[0] - le[0]))  # + = leading edge up
    return {"root_x_mm": _r(root[:, 0]), "root_z_mm": _r(root[:, 2]),
            "tip_x_mm": _r(tip[:, 0]), "tip_z_mm": _r(tip[:, 2]),
            "root_chord": {"le_x_mm": float(le[0]), "le_z_mm": float(le[2]), "te_x_mm": float(te[0]),
                           "te_z_mm": float(te[2]), "angle_deg": angle}}


def _top_section(model) -> dict:
    """Top view (x–y) of a vertical part: its root section, true shape."""
    p = model.section_loop(float(model.planform.y[0]), SECTION_POINTS)
    return {"x_mm": _r(p[:, 0]), "y_mm": _r(p[:, 1])}


def _mac(model, fig: dict) -> dict:
    """The MAC as drawn: its length at ȳ from the root, leading edge at the MAC leading-edge x.

    ``span_datum_mm`` lists the datum span coordinates where it is drawn (both halves of a
    mirrored part) along the part's span axis ``axis``."""
    ax = _span_axis(model)
    y = float(model.planform.y[0]) + (fig["mac_y_mm"] or 0.0)
    pos = [float(model.place(v, np.zeros((1, 2)))[0, ax]) for v in ([y, -y] if model.mirror else [y])]
    return {"length_mm": fig["mac_mm"], "y_mm": fig["mac_y_mm"], "le_x_mm": fig["mac_le_x_mm"],
            "qc_x_mm": fig["mac_qc_x_mm"], "axis": "xyz"[ax], "span_datum_mm": pos}


def _status(r) -> tuple[str, bool]:
    """Result word of a check record (marked, not only coloured) and whether it is bad."""
    if r.fault:
        return "✗ FAULT " + "+".join(r.fault) + (" and FAIL" if r.verdict == "FAIL" else ""), True
    if r.verdict == "FAIL":
        return "✗ FAIL", True
    if r.verdict == "pass":
        return "✓ pass", False
    return "✓ ok", False


def _check_section(res) -> dict:
    from ..check.text import summary_lines

    rows = []
    for r in res.records:
        d = r.as_dict()
        d["status"], d["bad"] = _status(r)
        rows.append(d)
    return {"ok": res.ok, "built": res.built, "stl_tol_mm": res.stl_tol,
            "skin_sampling_mm": max((p["skin_sampling_mm"] for p in res.parts.values()), default=None),
            "modified_since_written": list(res.modified), "summary": summary_lines(res),
            "parts": res.parts, "rows": rows}


def _balance(hyd: dict | None) -> dict | None:
    """Neutral point, centre of gravity and trim, plus the few derived numbers the page shows."""
    if hyd is None:
        return None
    ref = hyd["reference"]
    mast_x, mac = ref.get("mast_x_mm"), ref["mac_mm"]
    cg = hyd.get("cg_x_mm")
    pitch = [s["name"] for s in hyd["surfaces"] if s["in_pitch"]]
    trim = []
    for t in hyd.get("trim", []):
        cp = t.get("cp_from_mast_mm")
        cx = t.get("cp_x_mm")
        trim.append({**t, "cp_from_mast_pct_mac": (cp / mac * 100.0) if cp is not None else None,
                     "cp_x_pct_mac": (cx / mac * 100.0) if cx is not None else None,
                     "static_margin_pct": hyd.get("static_margin_pct")})
    water = hyd.get("water") or {}
    return {
        "reference_wing": ref["wing"], "mac_mm": mac, "mac_le_x_mm": ref["mac_le_x_mm"], "area_cm2": ref["area_cm2"],
        "mast": ref.get("mast"), "mast_x_mm": mast_x, "mast_reference": ref.get("mast_reference"),
        "moment_point_mm": ref["moment_point_mm"], "alpha_ref_deg": hyd["alpha_ref_deg"],
        "neutral_point_x_mm": hyd["neutral_point_x_mm"], "neutral_point_pct_mac": hyd["neutral_point_pct_mac"],
        "neutral_point_from_mast_mm": hyd.get("neutral_point_from_mast_mm"),
        "neutral_point_from_mast_pct_mac": hyd.get("neutral_point_from_mast_pct_mac"),
        "cg_x_mm": cg, "cg_from_mast_mm": (cg - mast_x) if cg is not None and mast_x is not None else None,
        "static_margin_pct": hyd.get("static_margin_pct"), "downwash_gradient": hyd.get("downwash_gradient"),
        "mass_kg": hyd.get("mass_kg"), "water": water.get("name"), "density_kg_m3": water.get("density"),
        "pitch_surfaces": pitch, "panels": hyd["panels"]["total"], "trim": trim,
        "takeoff": hyd.get("takeoff"), "notes": hyd.get("notes", []),
        "free_surface": hyd.get("free_surface"), "cavitation": hyd.get("cavitation"),
        "performance": hyd.get("performance"), "stance": hyd.get("stance"),
        "cg_source": hyd.get("cg_source"), "warnings": hyd.get("warnings") or [],
        "water_surface": water.get("surface"),
    }


def drawing_data(project, *, progress=None) -> dict:
    """Everything of the report that does not need the written files: the spec, the surfaces'
    intended figures, outlines, sections and spanwise curves, and the hydrodynamics. The
    drawings are rendered from this part alone, so they can be made while the check measures.

    Parameters
    ----------
    project : :class:`~geomgen.project.Project`
    progress : callable(str), optional
    """
    from ..geometry.figures import intended_figures
    from ..hydro import balance_of

    spec, models = project.spec, project.models
    say = progress or (lambda m: None)
    say("analysing the balance (vortex lattice)")
    hydro, skipped = None, None
    if spec.flight is not None or any(m.role in ("wing", "stabilizer") for m in models):
        try:
            hydro = balance_of(project)
        except SpecError as exc:
            skipped = "; ".join(exc.problems)
    hyd = _clean(hydro.as_dict()) if hydro is not None else None
    loading = {s["name"]: s["loading"] for s in (hyd or {}).get("surfaces", [])}

    say("laying out the drawings")
    surfaces = []
    for m in models:
        it = intended_figures(m).as_dict()
        fig = {k: it[k] for k in MAIN_FIGURES if k in it}
        s = {"name": m.name, "role": m.role, "orientation": m.orientation, "mirror": m.mirror,
             "position_mm": list(m.position), "reference": m.spec.reference, "incidence_deg": m.spec.incidence,
             "te_thickness_mm": m.te_thickness, "interpolation": m.spec.interpolation,
             "figures": fig, "measured": {}, "mac": _mac(m, fig), "outline": _outline(m),
             "stations": _stations(m), "spanwise": _spanwise(m), "loading": loading.get(m.name),
             "section_props": _section_props(m)}
        if m.orientation == "horizontal":
            s["side"] = _side(m)
        else:
            s["top_section"] = _top_section(m)
        surfaces.append(s)
    data = {
        "report_format": REPORT_FORMAT, "geomgen_version": __version__,
        "spec": {"name": spec.name, "file": project.spec_path.name, "datum_origin": spec.datum.origin},
        "caution": CAUTION,
        "surfaces": surfaces,
        "check": None,
        "balance": _balance(hyd),
        "hydro": hyd,
        "balance_skipped": skipped if spec.flight is not None else None,
    }
    return _clean(data)


def report_data(project, out_dir=None, *, progress=None, drawing: dict | None = None) -> dict:
    """The report's data: the drawing part (:func:`drawing_data`) and the check of the written
    files (building them first if missing or stale).

    Parameters
    ----------
    project : :class:`~geomgen.project.Project` (or a spec path)
        Its check and lattice solution are reused when already computed in this run.
    out_dir : output folder when ``project`` is a path
    progress : callable(str), optional
    drawing : the result of :func:`drawing_data` for this project, if already made

    Returns
    -------
    dict
        JSON-able (no nan): ``spec``, ``caution``, ``surfaces`` (figures, measured figures, MAC,
        stations, outlines, spanwise chord and twist, loading), ``check``, ``balance``, ``hydro``.
    """
    from ..check.run import check
    from ..project import Project

    project = Project.of(project, out_dir)
    data = copy.deepcopy(drawing) if drawing is not None else drawing_data(project, progress=progress)
    res = check(project, progress=progress)
    for s in data["surfaces"]:
        recs = {r.figure: r for r in res.records if r.part == s["name"]}
        s["measured"] = {k: recs[k].measured for k in MAIN_FIGURES if k in recs}
    data["check"] = _check_section(res)
    if res.balance_skipped:
        data["balance_skipped"] = res.balance_skipped
    data["comparison"] = _comparison(project)
    return _clean(data)


#: figures of a what-if comparison the report shows, in this order
COMPARISON_FIGURES = ("wing_lift_n", "stab_lift_n", "stab_lift_pct_weight", "drag_n", "lift_to_drag",
                      "neutral_point_x_mm", "static_margin_pct", "cp_from_mast_mm", "mast_move_mm", "takeoff_kmh",
                      "cavitation_kmh")


def _comparison(project) -> dict | None:
    """The set's latest what-if comparison (``geomgen compare`` into the same folder), if it is
    current (none of the inputs it was made from changed since, see the manifest); else None."""

    from ..outputs import output_name, read_manifest
    from ..outputs.manifest import changed_inputs
    from ..studies.figures import FIGURES, condition_words

    name = output_name(project.name, "compare", suffix=".json", folder="studies")
    entry = read_manifest(project.out_dir).get(name)
    if entry is None or changed_inputs(entry, project.output_info("report")):
        return None
    try:
        table = json.loads((project.out_dir / name).read_text())
    except (OSError, ValueError):
        return None
    keys = [k for k in COMPARISON_FIGURES if any(r.get(k) is not None for r in table.get("rows", []))]
    cond = table.get("condition")
    return {"file": name, "labels": table.get("labels", []), "figures": keys,
            "condition": condition_words(cond) if isinstance(cond, dict) else "the compared speed",
            "notes": [n for n in table.get("notes", []) if isinstance(n, str)],
            "headings": {k: f"{FIGURES[k][0]}{', ' + FIGURES[k][1] if FIGURES[k][1] else ''}" for k in keys},
            "rows": [{k: r.get(k) for k in keys} for r in table.get("rows", [])]}
