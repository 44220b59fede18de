"""``analyse``: the set's lift, moments, neutral point and trim from one vortex lattice.

Conventions (DESIGN.md): datum x aft, y starboard, z up; mm, deg. The attitude alpha is
the angle of the free stream to the datum x axis, positive nose up (the free stream is
rotated, not the geometry). Pitching moments are positive nose up.

Reference quantities:

* the **front wing** (first surface with role ``wing``; else the first lifting surface)
  gives the reference area S (projected), MAC c̄ and span b of the set's coefficients;
* the **mast reference** is the datum x of the mast's leading edge at its root station
  (the spec's first station, y = 0), from the mean line of the unfinished section;
* moments are taken about R = (mast reference x, 0, z of the front wing's root
  quarter-chord point); without a mast, about x = 0 (the datum origin) at that height;
* the neutral point is x_np = x_R − (dM_R/dα)/(dL/dα): the x on that line about which the
  pitching moment does not change with attitude (dCm/dα = 0).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from .. import CAUTION
from ..errors import SpecError
from ..geometry.figures import PlanformFigures, planform_figures
from ..spec.flight import DEFAULT_CHORD_PANELS, DEFAULT_CL_MAX, DEFAULT_SPAN_PANELS
from .cavitation import cavitation
from .drag import performance
from .freesurface import LIMITS, check_submerged, compare, water_level
from .guards import cp_shift, dimension_warnings, envelope, stabilizer_share, stance_warnings, trim_warnings, warning
from .lattice import build_lattice
from .results import HydroResult, Lateral, Loading, SurfaceHydro
from .rider import stance
from .solve import Flow, solve_attitude
from .trim import takeoff, trim_point
from .vortex import WAKE_CORE
from .water import G
from .water import water as resolve_water

PITCH_ROLES = ("wing", "stabilizer")
VERTICAL_ROLES = ("mast", "fin")
DEG = math.pi / 180.0


@dataclass
class Context:
    """Reference quantities of one lattice (mm, mm²)."""

    models: list
    figures: list
    ref_index: int
    s_ref: float
    c_ref: float
    b_ref: float
    ref: np.ndarray
    mast_x: float | None


def mast_reference_x(mast) -> float:
    """Datum x of a mast's leading edge at its root station (spec's first station), mm."""
    return float(mast.camber_points(float(mast.planform.y[0]), [0.0])[0, 0])


def figures_of(model) -> PlanformFigures:
    """Projected area, span, aspect ratio, MAC and MAC leading-edge x of ``model``.

    The intended figures of :func:`geometry.figures.planform_figures`, the same numbers the
    build, the check and the report show (the whole outline, a rounded tip included).
    """
    return planform_figures(model)


def _context(models, all_models) -> Context:
    figs = [figures_of(m) for m in models]
    iw = next((i for i, m in enumerate(models) if m.role == "wing"), 0)
    wing = models[iw]
    mast = next((m for m in all_models if m.role == "mast"), None)
    mast_x = mast_reference_x(mast) if mast is not None else None
    z_ref = float(wing.camber_points(float(wing.planform.y[0]) if not wing.mirror else 0.0, [0.25])[0, 2])
    f = figs[iw]
    return Context(models=list(models), figures=figs, ref_index=iw, s_ref=f.projected_area_cm2 * 100.0,
                   c_ref=f.mac_mm, b_ref=f.span_mm, ref=np.array([mast_x or 0.0, 0.0, z_ref]), mast_x=mast_x)


def span_efficiency(flow, ctx, alpha: float, area: float, aspect: float, i: int | None = None) -> float:
    """Span efficiency of the loading added by attitude, from the Trefftz plane.

    The Trefftz drag is quadratic in the circulations, so CDi = CDi0 + k CL + CL²/(π A e);
    e = CLα² / (π A · d²CDi/dα²) is that of the additional (attitude) loading, independent of
    the attitude and of camber and twist (1 for an elliptic load). ``i`` selects one surface
    of ``flow``; default the whole lattice. ``area`` mm², ``aspect`` its aspect ratio.
    """
    h = 1e-3
    sel = slice(None) if i is None else i
    d = [flow.loads(alpha + k * h, ctx.ref) for k in (-1, 0, 1)]
    dl = (np.sum(d[2]["lift"][sel]) - np.sum(d[0]["lift"][sel])) / (2 * h)
    d2 = (np.sum(d[2]["drag_i"][sel]) - 2 * np.sum(d[1]["drag_i"][sel]) + np.sum(d[0]["drag_i"][sel])) / h**2
    return float(2.0 * dl * dl / (0.5 * area * math.pi * aspect * d2)) if d2 > 0 else math.nan


def _surface(flow, ctx, i: int, alpha: float, ld, sl) -> SurfaceHydro:
    """Figures of surface ``i`` at ``alpha`` rad; ``ld``/``sl`` are the set's loads and slopes there."""
    m, f = ctx.models[i], ctx.figures[i]
    s, c = f.projected_area_cm2 * 100.0, f.mac_mm
    q_s = 0.5 * s
    lift, dl = float(ld["lift"][i]), float(sl["lift"][i])
    my, dmy = float(ld["moment"][i, 1]), float(sl["moment"][i, 1])
    lifts = abs(dl) > 1e-6 * q_s  # a mast or fin in the pitch balance carries no lift at β = 0
    x_ac = float(ctx.ref[0] - dmy / dl) if lifts else math.nan
    cl = lift / q_s
    cdi = float(ld["drag_i"][i]) / q_s
    solo = flow.alone(i)
    alone = solo.slopes(alpha, ctx.ref)["lift"][i] / q_s
    e = span_efficiency(solo, ctx, alpha, s, f.aspect_ratio, i) if lifts else math.nan
    a0 = solve_attitude(lambda a: float(flow.loads(a, ctx.ref)["lift"][i]), 0.0) if lifts else math.nan
    sel = flow.lat.strip_surface == i
    g = flow.strip_gamma(alpha)[sel]
    chord = flow.lat.strip_chord[sel]
    loading = Loading(y_mm=flow.lat.strip_y[sel].tolist(), chord_mm=chord.tolist(),
                      c_cl_mm=(2.0 * g).tolist(), cl=(2.0 * g / chord).tolist())
    return SurfaceHydro(
        name=m.name, role=m.role, in_pitch=True, area_cm2=f.projected_area_cm2, span_mm=f.span_mm,
        aspect_ratio=f.aspect_ratio, mac_mm=c, mac_le_x_mm=f.mac_le_x_mm, cl=cl,
        lift_slope_per_rad=dl / q_s, lift_slope_per_deg=dl / q_s * DEG, lift_slope_alone_per_rad=float(alone),
        zero_lift_attitude_deg=math.degrees(a0), ac_x_mm=x_ac, ac_pct_mac=(x_ac - f.mac_le_x_mm) / c * 100.0,
        cm_ac=(my + (x_ac - ctx.ref[0]) * lift) / (q_s * c), cdi=cdi, span_efficiency=e, loading=loading)


def _lateral(flow, ctx, alpha: float) -> Lateral:
    """Sideslip derivatives at ``alpha`` (rad) about zero sideslip."""
    qs = 0.5 * ctx.s_ref
    sl = flow.slopes(alpha, ctx.ref, wrt="beta")
    ld = flow.loads(alpha, ctx.ref)
    return Lateral(
        side_force_per_deg=float(sl["side"].sum()) / qs * DEG,
        roll_moment_per_deg=float(sl["moment"][:, 0].sum()) / (qs * ctx.b_ref) * DEG,
        yaw_moment_per_deg=float(sl["moment"][:, 2].sum()) / (qs * ctx.b_ref) * DEG,
        side_force_slope_per_deg={m.name: float(sl["side"][i]) / qs * DEG for i, m in enumerate(ctx.models)},
        at_zero_sideslip=dict(side_force_coeff=float(ld["side"].sum()) / qs,
                              roll_moment_coeff=float(ld["moment"][:, 0].sum()) / (qs * ctx.b_ref),
                              yaw_moment_coeff=float(ld["moment"][:, 2].sum()) / (qs * ctx.b_ref)))


def pitch_surfaces(models) -> list:
    """Horizontal wings and stabilizers: the surfaces of the pitch balance (SpecError if none)."""
    lifting = [m for m in models if m.role in PITCH_ROLES and m.orientation == "horizontal"]
    if not lifting:
        raise SpecError("surface: the balance needs at least one horizontal surface with role 'wing' or 'stabilizer'")
    return lifting


def analyse(models, flight=None, *, span_panels: int | None = None, chord_panels: int | None = None,
            alpha_deg: float = 0.0, cg_x_mm: float | None = None, include_vertical: bool | None = None,
            vertical_in_pitch: bool | None = None, free_surface: bool = True, _lattice=None) -> HydroResult:
    """Vortex-lattice analysis of a foil set: coefficients, neutral point and trim.

    Parameters
    ----------
    models : list of SurfaceModel
        From :func:`geomgen.geometry.model.build_models`; every wing and stabilizer is solved
        together (the stabilizer sits in the wing's downwash).
    flight : FlightSpec, optional
        The spec's ``[flight]`` table; with it the set is trimmed at each speed. Its panel
        counts and options are used unless the keyword arguments below are given.
    span_panels : int, optional
        Strips per half span (cosine spaced); default ``FlightSpec`` default.
    chord_panels : int, optional
        Panels along the chord; default ``FlightSpec`` default.
    alpha_deg : float
        Reference attitude for the coefficients, derivatives and loading, deg.
    cg_x_mm : float, optional
        Datum x of the centre of gravity (overrides ``flight.weight_x_mm``), mm.
    include_vertical : bool, optional
        Also solve masts and fins and report sideslip derivatives.
    vertical_in_pitch : bool, optional
        Count masts and fins in the pitch balance (default: left out).
    free_surface : bool
        Put the still-water surface of ``flight`` (``ride_height_mm`` or ``depth_mm``) in the
        lattice and compare with deep water; False: deep water.

    Returns
    -------
    HydroResult
    """
    fl = flight
    ns = span_panels or (fl.span_panels if fl else DEFAULT_SPAN_PANELS)
    nc = chord_panels or (fl.chord_panels if fl else DEFAULT_CHORD_PANELS)
    inc_v = include_vertical if include_vertical is not None else bool(fl and fl.include_vertical)
    v_pitch = vertical_in_pitch if vertical_in_pitch is not None else bool(fl and fl.vertical_in_pitch)
    lifting = pitch_surfaces(models)
    vertical = [m for m in models if m not in lifting]
    pitch_models = lifting + (vertical if v_pitch else [])
    ctx = _context(pitch_models, models)
    cg, cg_source = weight_position(cg_x_mm, fl, ctx.mast_x)
    lat = _lattice if _lattice is not None else build_lattice(pitch_models, ns, nc)
    water_z, how = water_level(models, fl) if free_surface else (None, "deep water")
    if water_z is not None:
        check_submerged(lat, water_z, "ride_height_mm" if fl.ride_height_mm is not None else "depth_mm")
        lat.water_z = water_z
    flow = Flow.solve(lat)

    a = alpha_deg * DEG
    ld, sl = flow.loads(a, ctx.ref), flow.slopes(a, ctx.ref)
    qs, c, b = 0.5 * ctx.s_ref, ctx.c_ref, ctx.b_ref
    lift, dl = float(ld["lift"].sum()), float(sl["lift"].sum())
    dm = float(sl["moment"][:, 1].sum())
    x_np = float(ctx.ref[0] - dm / dl)
    cdi = float(ld["drag_i"].sum()) / qs
    ar = b * b / ctx.s_ref
    surfaces = [_surface(flow, ctx, i, a, ld, sl) for i in range(len(pitch_models))]
    for s in surfaces:
        s.in_pitch = s.role in PITCH_ROLES or v_pitch
    stab = next((s for s in surfaces if s.role == "stabilizer"), None)
    dw = 1.0 - stab.lift_slope_per_rad / stab.lift_slope_alone_per_rad if stab else None
    f_ref = ctx.figures[ctx.ref_index]
    notes = [
        f"reference: front wing '{ctx.models[ctx.ref_index].name}' (S, MAC, span)",
        "mast reference: leading edge at the mast's root station" if ctx.mast_x is not None
        else "no mast: positions are datum x",
        f"moments about x = {ctx.ref[0]:.1f} mm, z = {ctx.ref[2]:.1f} mm; positive nose up",
        "linear, inviscid lattice: no stall, no friction or profile drag; trailing vortices follow the surface "
        "to the trailing edge, then run along +x",
        f"a surface sees another's wake through a vortex core of {WAKE_CORE:g} local chord (wake thickness "
        "and displacement); 0.1 chord more or less moves a neutral point about 2 % MAC",
    ]
    notes.append(f"free surface: {how}; {LIMITS}" if water_z is not None else f"{how}: no free surface")
    if cg is None and fl is not None and fl.rider_from_mast_mm is not None:
        notes.append("flight.rider_from_mast_mm: the set has no mast to measure it from, so no weight position and "
                     "no static margin (give flight.weight_x_mm instead)")
    if water_z is not None and inc_v and vertical:
        notes.append("sideslip figures are for deep water (the mast pierces the surface; no images)")
    result = HydroResult(
        reference=dict(wing=ctx.models[ctx.ref_index].name, area_cm2=ctx.s_ref / 100.0, mac_mm=c, span_mm=b,
                       mac_le_x_mm=f_ref.mac_le_x_mm, mast_x_mm=ctx.mast_x,
                       mast=next((m.name for m in models if m.role == "mast"), None),
                       mast_reference="leading edge at the root station",
                       moment_point_mm=ctx.ref.tolist()),
        panels=dict(span_panels_per_half=ns, chord_panels=nc, total=lat.n,
                    surfaces=[m.name for m in pitch_models]),
        alpha_ref_deg=alpha_deg, cl=lift / qs, lift_slope_per_rad=dl / qs, lift_slope_per_deg=dl / qs * DEG,
        zero_lift_attitude_deg=math.degrees(
            solve_attitude(lambda al: float(flow.loads(al, ctx.ref)["lift"].sum()), 0.0)),
        cm=float(ld["moment"][:, 1].sum()) / (qs * c), cm_alpha_per_rad=dm / (qs * c),
        cm_alpha_per_deg=dm / (qs * c) * DEG, neutral_point_x_mm=x_np,
        neutral_point_from_mast_mm=x_np - ctx.mast_x if ctx.mast_x is not None else None,
        neutral_point_from_mast_pct_mac=(x_np - ctx.mast_x) / c * 100.0 if ctx.mast_x is not None else None,
        neutral_point_pct_mac=(x_np - f_ref.mac_le_x_mm) / c * 100.0,
        cdi=cdi, span_efficiency=span_efficiency(flow, ctx, a, ctx.s_ref, ar),
        side_force_coeff=float(ld["side"].sum()) / qs,
        roll_moment_coeff=float(ld["moment"][:, 0].sum()) / (qs * b),
        yaw_moment_coeff=float(ld["moment"][:, 2].sum()) / (qs * b),
        downwash_gradient=dw, surfaces=surfaces, cg_x_mm=cg,
        static_margin_pct=(x_np - cg) / c * 100.0 if cg is not None else None,
        notes=notes, caution=CAUTION, cg_source=cg_source)

    if inc_v and vertical:  # sideslip with masts and fins in the lattice
        if v_pitch:
            lflow, lctx = flow, ctx
        else:
            lctx = _context(lifting + vertical, models)
            lflow = Flow.solve(build_lattice(lifting + vertical, ns, nc))
        result.lateral = _lateral(lflow, lctx, a)

    if fl is not None:
        w = resolve_water(fl.fluid, fl.temperature_c, fl.viscosity_m2s)
        result.water, result.mass_kg = water_statement(w, water_z, how), fl.mass_kg
        cl_max = fl.cl_max if fl.cl_max is not None else DEFAULT_CL_MAX
        result.takeoff = takeoff(flow, ctx, fl.mass_kg, w.density, cl_max)
        v_to = result.takeoff.speed_ms
        result.trim = [trim_point(flow, ctx, v, fl.mass_kg, w, cg, v_to, cl_max) for v in fl.speeds_kmh]
        if free_surface:  # not for the deep-water twin of a comparison
            start = v_to if v_to and math.isfinite(v_to) else min(fl.speeds_kmh) / 3.6
            result.cavitation = cavitation(flow, ctx, models, w, water_z, fl.mass_kg, start, fl.speeds_kmh)
            result.performance = performance(flow, ctx, models, w, water_z, fl.mass_kg, fl.speeds_kmh,
                                             result.takeoff, result.cavitation.first_kmh, fl.cl_max is not None)
            result.stance = _stance(models, pitch_models, fl, flow, ctx, w, water_z, ns, nc, cg, cl_max, v_to)
            _guard(result, flow, ctx, fl, w, cl_max, pitch_models, v_to)
    if free_surface:
        result.warnings = dimension_warnings(models) + result.warnings
    if water_z is not None:
        deep = analyse(models, fl, span_panels=ns, chord_panels=nc, alpha_deg=alpha_deg, cg_x_mm=cg_x_mm,
                       include_vertical=False, vertical_in_pitch=v_pitch, free_surface=False,
                       _lattice=replace(lat, water_z=None))
        result.free_surface = compare(pitch_models, result, deep, water_z, how)
    return result


def weight_position(cg_x_mm, flight, mast_x) -> tuple[float | None, str | None]:
    """Datum x where the weight acts (mm) and where it comes from: one point, three ways to say it.

    ``--cg`` (``cg_x_mm``) wins; else ``flight.weight_x_mm`` (datum x); else the mast
    reference plus ``flight.rider_from_mast_mm`` (the rider's weight from the mast). The
    static margin, the moment about the weight and the mast move all use this point."""
    if cg_x_mm is not None:
        return float(cg_x_mm), "--cg"
    if flight is None:
        return None, None
    if flight.weight_x_mm is not None:
        return float(flight.weight_x_mm), "flight.weight_x_mm"
    if flight.rider_from_mast_mm is not None and mast_x is not None:
        return float(mast_x + flight.rider_from_mast_mm), "flight.rider_from_mast_mm"
    return None, None


def water_statement(w, water_z, how: str) -> dict:
    """The water of every command of a set: its properties and its surface, in one dict."""
    return {**w.as_dict(), "surface_z_mm": water_z, "surface": how,
            "free_surface": water_z is not None}


def _guard(result, flow, ctx, fl, w, cl_max, pitch_models, v_to=None) -> None:
    """Plausibility warnings over the trim and the stance, and the usable envelope they end."""
    stab = next((m.name for m in pitch_models if m.role == "stabilizer"), None)
    weight = fl.mass_kg * G
    speeds = sorted(fl.speeds_kmh)
    cruise = fl.cruise_kmh if fl.cruise_kmh is not None else speeds[len(speeds) // 2]

    def trim_at(v):
        return trim_point(flow, ctx, v, fl.mass_kg, w, v_takeoff=v_to, cl_max=cl_max)

    at_cruise = trim_at(cruise)
    cp_cruise = at_cruise.cp_x_mm if at_cruise.trimmable else None
    warns = trim_warnings(result.trim, weight, stab, cp_cruise, cruise)
    if not at_cruise.trimmable and cruise not in fl.speeds_kmh:
        warns.append(warning("not_trimmable", f"cruise speed: {at_cruise.reason}", cruise))
    warns += stance_warnings(result.stance, fl.track_travel_mm)
    pf, cv = result.performance, result.cavitation
    if cv is not None and cv.first_surface:
        for t in result.trim:
            if t.trimmable and t.speed_kmh > cv.first_kmh:
                warns.append(warning("cavitation", f"at {t.speed_kmh:g} km/h the set is past its first cavitation "
                                                   f"('{cv.first_surface}' at about {cv.first_kmh:.0f} km/h)",
                                     t.speed_kmh))
    if pf is not None:
        lo, hi = pf.envelope_kmh
        if math.isfinite(lo):
            lo_reason = ("the takeoff estimate"
                         if result.takeoff is not None and math.isfinite(result.takeoff.speed_kmh)
                         else "the lowest [flight] speed (no takeoff estimate)")
            hi_reason = (f"first cavitation ('{cv.first_surface}')" if cv is not None and cv.first_surface
                         else "the end of the speeds searched (no cavitation found)")

            def guard(tp):
                if not tp.trimmable:
                    return tp.reason
                return stabilizer_share(tp, weight, stab) or cp_shift(tp, cp_cruise, cruise)

            pf.envelope_kmh, reasons = envelope(trim_at, lo, hi, hi_reason, guard)
            reasons[0] = lo_reason if reasons[0] == "the takeoff estimate" else reasons[0]
            pf.envelope_reasons = reasons
    result.warnings = warns


def _stance(models, pitch_models, fl, flow, ctx, w, water_z, ns, nc, weight_x=None, cl_max=None, v_to=None):
    """Mast move under the rider and the stabilizer shim (see :mod:`geomgen.hydro.rider`)."""
    i_stab = next((i for i, m in enumerate(pitch_models) if m.role == "stabilizer"), None)
    stab = pitch_models[i_stab] if i_stab is not None else None
    cruise = fl.cruise()

    def trim_at(v):
        return trim_point(flow, ctx, v, fl.mass_kg, w, v_takeoff=v_to, cl_max=cl_max)

    def lift_of(d):
        assert stab is not None  # called only with a stabilizer
        if d == 0.0:
            return trim_at(cruise).lift_n.get(stab.name, math.nan)
        if not math.isfinite(d):
            return math.nan
        changed = [m.with_incidence(m.spec.incidence + d) if m is stab else m for m in pitch_models]
        lat = build_lattice(changed, ns, nc)
        lat.water_z = water_z
        c2 = _context(changed, models)
        return trim_point(Flow.solve(lat), c2, cruise, fl.mass_kg, w, cl_max=cl_max).lift_n.get(stab.name, math.nan)

    return stance(fl, trim_at, ctx.mast_x, stab, lift_of, weight_x)


def neutral_point(models, span_panels: int = DEFAULT_SPAN_PANELS, chord_panels: int = DEFAULT_CHORD_PANELS,
                  alpha_deg: float = 0.0) -> float:
    """Datum x of the neutral point of the wings and stabilizers of ``models``, mm.

    The same lattice and definition as :func:`analyse` (dCm/dα = 0), without the per-surface
    figures and trim: what the benchmark times.
    """
    lifting = pitch_surfaces(models)
    ctx = _context(lifting, models)
    flow = Flow.solve(build_lattice(lifting, span_panels, chord_panels))
    sl = flow.slopes(alpha_deg * DEG, ctx.ref)
    return float(ctx.ref[0] - sl["moment"][:, 1].sum() / sl["lift"].sum())


def analyse_spec(spec, **kwargs) -> HydroResult:
    """Build the surfaces of a validated spec and analyse them with its ``[flight]`` table.

    Parameters
    ----------
    spec : Spec
        From :func:`geomgen.spec.load_spec` or :func:`geomgen.spec.load_spec_text`.
    **kwargs
        Passed to :func:`analyse` (panel counts, ``alpha_deg``, ``cg_x_mm``, ...).
    """
    from ..geometry.model import build_models

    models = build_models(spec)
    try:
        return analyse(models, spec.flight, **kwargs)
    except SpecError as exc:
        src = getattr(spec, "_source", "<spec>")
        raise SpecError([f"{src}: {p}" for p in exc.problems]) from None


def balance_of(project, **kwargs) -> HydroResult:
    """The analysis of a :class:`~geomgen.project.Project` with its ``[flight]`` table, solved
    once per run and keyword set (``balance``, ``check``, ``report`` and ``parts`` share it).

    Raises SpecError naming the spec file when the set cannot be balanced."""
    def solve() -> HydroResult:
        models = project.models  # its own problems already name the file and field
        try:
            return analyse(models, project.spec.flight, **kwargs)
        except SpecError as exc:
            raise SpecError([f"{project.source}: {p}" for p in exc.problems]) from None

    return project.memo(("hydro.balance", tuple(sorted(kwargs.items()))), solve)
