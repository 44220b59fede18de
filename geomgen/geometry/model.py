"""Spec -> one :class:`SurfaceModel` per surface, with the geometry checks a spec cannot
express alone (sections that exist, trailing edges the sections can carry)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .. import defaults
from ..errors import GeometryError, SpecError
from ..sections import Section, naca
from .planform import Planform, station_offsets
from .polygon import polygon_crosses_itself
from .surface import SurfaceModel


def resolve_section(name: str, sspec, base_dir: Path, allow_outside: bool = False) -> Section:
    """A named spec section as a unit-chord :class:`Section` (raises SpecError)."""
    field = f"sections {name}"
    if sspec.naca is not None:
        sec = naca(sspec.naca, closed_te=sspec.closed_te)
    else:
        from ..sections.coords import read_coordinates

        path = (base_dir / sspec.file).resolve()
        if not allow_outside and not path.is_relative_to(base_dir.resolve()):
            raise SpecError(f"file: '{sspec.file}' lies outside the spec's folder {base_dir.resolve()}; "
                            "move it next to the spec or allow it explicitly (--allow-outside-files)")
        sec = read_coordinates(path, field=f"{field} file")
    if sspec.thickness_pct is not None:
        t, _ = sec.max_thickness()
        sec = sec.scaled_thickness(sspec.thickness_pct / 100.0 / t)
    if sspec.invert:
        sec = sec.inverted()
    return sec


def _station_key(st) -> tuple:
    return (st.section, st.blend.section, st.blend.fraction) if st.blend else (st.section, None, 0.0)


def _check_trailing_edge(model: SurfaceModel, where) -> list[tuple[float, float, float]]:
    """Refuse a trailing edge thicker than half the section's thickness where the ramp starts."""
    te = model.te_thickness
    out: list[tuple[float, float, float]] = []
    if te == 0:
        return out
    for y in where:
        chord = float(model.chord(y))
        t_start = float(model.base_section(y).thickness_at([defaults.TE_RAMP_START])[0]) * chord
        limit = defaults.TE_MAX_FRACTION_OF_RAMP_THICKNESS * t_start
        if te * float(model.tip_factor(y)) > limit:
            out.append((y, limit, t_start))
    return out


def _bulges(model: SurfaceModel) -> list[str]:
    """A smooth curve through close or uneven stations can swing far outside its station
    values. Refuse a chord, offset or twist that leaves the band of its two neighbouring
    station values widened by half their difference plus 10 % of the largest chord (2° for
    twist): the part would not be what the table of stations says."""
    pf = model.planform
    ys = pf.y
    cref = max(float(v) for v in pf("chord", ys))
    for name, unit, slack in (("chord", "mm", 0.1 * cref), ("x", "mm", 0.1 * cref),
                              ("z", "mm", 0.1 * cref), ("twist", "deg", 2.0)):
        vals = pf(name, ys)
        for i in range(len(ys) - 1):
            q = np.linspace(ys[i], ys[i + 1], 60)
            v = pf(name, q)
            lo, hi = min(vals[i], vals[i + 1]), max(vals[i], vals[i + 1])
            m = 0.5 * (hi - lo) + slack
            worst = float(v[np.argmax(np.maximum(v - hi, lo - v))])
            if worst > hi + m or worst < lo - m:
                return [f'surface "{model.name}": smooth interpolation swings {name} to {worst:.1f} {unit} between '
                        f"station[{i}] (y={ys[i]:g}) and station[{i + 1}] (y={ys[i + 1]:g}), whose values are "
                        f"{vals[i]:.1f} and {vals[i + 1]:.1f} {unit}; add stations, space them more evenly, "
                        "or use linear interpolation"]
    return []


def chord_problems(model: SurfaceModel) -> list[str]:
    """A chord curve that drops to zero or below between stations (a smooth spline through
    uneven stations): the surface, the two stations around it, the low point, what passes."""
    ys = np.linspace(model.planform.y[0], model.planform.half_span, 1601)
    chords = model.planform("chord", ys)
    if not (chords <= 0).any():
        return []
    st = model.planform.y
    out = []
    bad = chords <= 0
    for i in range(len(st) - 1):  # one message per station interval where it happens
        m = bad & (ys >= st[i]) & (ys <= st[i + 1])
        if not m.any():
            continue
        k = int(np.argmin(np.where(m, chords, np.inf)))
        out.append(f'surface "{model.name}" chord: the smooth curve through the station chords drops below zero '
                   f"between station[{i}] (y={st[i]:g}) and station[{i + 1}] (y={st[i + 1]:g}), to "
                   f"{chords[k]:.1f} mm at y = {ys[k]:.1f} mm; what passes: interpolation = \"linear\", a station "
                   "near that point, or station chords that change more evenly")
    return out


def station_place(ys: list[float], y: float) -> str:
    """Where span position ``y`` lies among the stations, for messages: "station[j] (y=…)",
    "between station[i] (y=…) and station[i+1] (y=…)" or "in the round tip beyond station[k] (y=…)"."""
    for j, v in enumerate(ys):
        if abs(v - y) < 1e-9:
            return f"station[{j}] (y={v:g})"
    if y > ys[-1]:
        return f"in the round tip beyond station[{len(ys) - 1}] (y={ys[-1]:g})"
    i = max(0, min(len(ys) - 2, int(np.searchsorted(ys, y, side="right")) - 1))
    return f"between station[{i}] (y={ys[i]:g}) and station[{i + 1}] (y={ys[i + 1]:g})"


def check_geometry(model: SurfaceModel, where) -> list[str]:
    """Geometry that cannot be made: chord <= 0 between stations, a section that crosses itself.

    Sections lie in planes of constant span and the skin's span parameter is the span
    position itself, so the skin crosses itself exactly where a cross-section does.
    """
    out = chord_problems(model)
    if out:
        return out
    if model.spec.interpolation == "smooth":
        out += _bulges(model)
        if out:
            return out
    for y in where:
        loop = model.section(y).loop(48)
        if polygon_crosses_itself(loop):
            at = station_place([float(v) for v in model.planform.y], y)
            out.append(f'surface "{model.name}": the section at y = {y:.1f} mm ({at}) crosses itself (its upper '
                       "and lower surfaces meet); what passes: a thicker section or a thinner trailing edge there")
            break
    return out


def check_at_problems(model: SurfaceModel) -> list[str]:
    """``check_at`` positions off the part: measuring there would measure the tip and pass."""
    lo, hi = float(model.planform.y[0]), float(model.half_span)
    return [f"check_at[{j}] y: {c.y:g} mm is off the part (it runs from {lo:g} to {hi:.6g} mm), got {c.y:g}"
            for j, c in enumerate(model.spec.check_at) if not lo <= c.y <= hi + 1e-6]


def _uses(st) -> set:
    return {st.section} | ({st.blend.section} if st.blend else set())


def build_models(spec, source: str | Path = "<spec>") -> list[SurfaceModel]:
    """Build every surface of ``spec``; raise with every problem found in one run.

    Spec problems (a coordinate file that cannot be read, a trailing edge the sections cannot
    carry) raise :class:`SpecError` (with any geometry problems of the other surfaces listed
    too); geometry that cannot be made alone raises :class:`GeometryError`. A surface whose
    sections failed is not checked further (its geometry is unknown)."""
    src = Path(getattr(spec, "_source", source))
    base_dir = src.parent
    problems: list[str] = []
    sections: dict[str, Section] = {}
    for name, sspec in spec.sections.items():
        try:
            sections[name] = resolve_section(name, sspec, base_dir, getattr(spec, "_allow_outside_files", False))
        except SpecError as exc:
            problems += [f"{src}: sections {name}: {p}" if not p.startswith(str(src)) else p
                         for p in exc.problems]

    models, faults = [], []
    for i, sf in enumerate(spec.surface):
        st = sf.station
        if any(not _uses(s) <= set(sections) for s in st):
            continue  # its section problems are listed above
        xs, zs = station_offsets(st)
        keys = [_station_key(s) for s in st]
        blended = {}
        for key in dict.fromkeys(keys):
            own, other, frac = key
            blended[key] = sections[own].blended(sections[other], frac) if other else sections[own]
        pf = Planform([s.y for s in st], [s.chord for s in st], xs, zs, [s.twist for s in st],
                      keys, sf.interpolation, mirror=sf.mirror)
        model = SurfaceModel(sf, pf, blended)
        model.named_sections = sections
        chord = chord_problems(model)
        if chord:  # the real cause first; a trailing-edge limit at a negative chord means nothing
            faults += chord
            continue
        where = sorted({float(abs(v)) for seg in model.loft_y() for v in seg} | {s.y for s in st})
        bad = _check_trailing_edge(model, where)
        if bad:
            y, limit, t = min(bad, key=lambda b: b[1])
            at = station_place([s.y for s in st], y)
            at = at if at.startswith("station") else f"y={y:.1f} mm ({at})"
            problems.append(
                f'{src}: surface[{i}] "{sf.name}" te_thickness: {sf.te_thickness:g} mm is thicker than the '
                f"section allows at {at}: at most {limit:.2f} mm (half the {t:.2f} mm thickness at "
                f"{defaults.TE_RAMP_START:.0%} chord where the edge finishing starts); what passes: "
                f"te_thickness <= {limit:.2f}, a thicker section or a longer chord there")
            continue
        models.append(model)
    for i, sf in enumerate(spec.surface):
        found = next((m for m in models if m.spec is sf), None)
        if found is not None:
            problems += [f'{src}: surface[{i}] "{sf.name}" {p}' for p in check_at_problems(found)]
    for model in models:
        mids = [0.5 * (a + b) for seg in model.loft_y() for a, b in zip(seg[:-1], seg[1:])]
        where = sorted({float(abs(v)) for seg in model.loft_y() for v in seg} | {abs(v) for v in mids})
        faults += check_geometry(model, where)
    if problems:
        raise SpecError(problems + [f"{src}: {f}" for f in faults])
    if faults:
        raise GeometryError("; ".join(faults) + "; nothing was written")
    return models
