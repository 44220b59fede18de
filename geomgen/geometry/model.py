"""Spec -> one :class:`SurfaceModel` per surface, with the geometry checks a spec cannot
express alone (sections that exist, trailing edges the sections can carry)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .. import defaults
from ..errors import SpecError
from ..sections import Section, naca
from .planform import Planform, station_offsets
from .surface import SurfaceModel


def resolve_section(name: str, sspec, base_dir: Path) -> Section:
    """A named spec section as a unit-chord :class:`Section` (raises SpecError)."""
    field = f"sections {name}"
    if sspec.naca is not None:
        sec = naca(sspec.naca, closed_te=sspec.closed_te)
    else:
        from ..sections.coords import read_coordinates

        sec = read_coordinates(base_dir / sspec.file, field=f"{field} file")
    if sspec.thickness_pct is not None:
        t, _ = sec.max_thickness()
        sec = sec.scaled_thickness(sspec.thickness_pct / 100.0 / t)
    if sspec.invert:
        sec = sec.inverted()
    return sec


def _station_key(st) -> tuple:
    return (st.section, st.blend.section, st.blend.fraction) if st.blend else (st.section, None, 0.0)


def _check_trailing_edge(model: SurfaceModel, where) -> list[str]:
    """Refuse a trailing edge thicker than half the section's thickness where the ramp starts."""
    te = model.spec.te_thickness
    out = []
    if te == 0:
        return out
    for y in where:
        chord = float(model.planform("chord", y))
        t_start = float(model.base_section(y).thickness_at([defaults.TE_RAMP_START])[0]) * chord
        limit = defaults.TE_MAX_FRACTION_OF_RAMP_THICKNESS * t_start
        if te > limit:
            out.append((y, limit, t_start))
    return out


def build_models(spec, source: str | Path = "<spec>") -> list[SurfaceModel]:
    """Build every surface of ``spec``; raise :class:`SpecError` with all problems found."""
    src = Path(getattr(spec, "_source", source))
    base_dir = src.parent
    problems: list[str] = []
    sections: dict[str, Section] = {}
    for name, sspec in spec.sections.items():
        try:
            sections[name] = resolve_section(name, sspec, base_dir)
        except SpecError as exc:
            problems += [f"{src}: sections {name}: {p}" if not p.startswith(str(src)) else p
                         for p in exc.problems]
    if problems:
        raise SpecError(problems)

    models = []
    for i, sf in enumerate(spec.surface):
        st = sf.station
        xs, zs = station_offsets(st)
        keys = [_station_key(s) for s in st]
        blended = {}
        for key in dict.fromkeys(keys):
            own, other, frac = key
            blended[key] = sections[own].blended(sections[other], frac) if other else sections[own]
        pf = Planform([s.y for s in st], [s.chord for s in st], xs, zs, [s.twist for s in st],
                      keys, sf.interpolation)
        model = SurfaceModel(sf, pf, blended)
        where = sorted({float(abs(v)) for seg in model.loft_y() for v in seg} | {s.y for s in st})
        bad = _check_trailing_edge(model, where)
        if bad:
            y, limit, t = min(bad, key=lambda b: b[1])
            at = next((f"station[{j}] (y={s.y:g})" for j, s in enumerate(st) if abs(s.y - y) < 1e-9), f"y={y:.1f} mm")
            problems.append(
                f'{src}: surface[{i}] "{sf.name}" te_thickness: {sf.te_thickness:g} mm is thicker than the '
                f"section allows at {at}: at most {limit:.2f} mm (half the {t:.2f} mm thickness at "
                f"{defaults.TE_RAMP_START:.0%} chord where the edge finishing starts)")
        models.append(model)
    if problems:
        raise SpecError(problems)
    return models
