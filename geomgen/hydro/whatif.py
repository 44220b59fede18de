"""What a change of the set does in trimmed flight (a second lattice solve of the changed set)."""

from __future__ import annotations

from ..errors import GeomgenError
from .analysis import analyse, balance_of


def shim_trim_change(project, surface: str, angle: float) -> tuple[str | None, str | None]:
    """What a shim of ``angle`` deg under ``surface`` does in trimmed flight (lift = weight at
    the middle speed of ``[flight]``): change of board attitude, of the front wing's angle to
    the water, and of where the weight must act.

    Returns ``(words, None)``, or ``(None, why)`` when it cannot be worked out (no ``[flight]``
    table, no trim, a set that cannot be balanced): the caller says why instead of staying
    silent."""
    spec = project.spec
    if spec.flight is None:
        return None, "no [flight] table: the shim's effect in trimmed flight is not worked out"
    from ..geometry import build_models

    surf = [s.model_copy(update={"incidence": s.incidence + angle}) if s.name == surface else s
            for s in spec.surface]
    try:
        a = balance_of(project)
        b = analyse(build_models(spec.model_copy(update={"surface": surf})), spec.flight)
    except GeomgenError as exc:
        return None, f"the shim's effect in trimmed flight could not be worked out: {exc}"
    if not a.trim or not b.trim:
        return None, "the set does not trim over the [flight] speeds: the shim's effect in flight is not given"
    k = len(a.trim) // 2
    ta, tb = a.trim[k], b.trim[k]
    if not (ta.trimmable and tb.trimmable):
        return None, f"the shim's effect in trimmed flight is not given: {(ta if not ta.trimmable else tb).reason}"
    d_att = tb.attitude_deg - ta.attitude_deg
    wing = next((s for s in spec.surface if s.role == "wing"), None)
    d_wing = d_att + (angle if wing is not None and wing.name == surface else 0.0)
    d_cp = tb.cp_x_mm - ta.cp_x_mm
    return (f"In trimmed flight at {ta.speed_kmh:g} km/h (this spec's hydrodynamics, lift = weight): the board "
            f"rides {abs(d_att):.2f}° more nose-{'up' if d_att > 0 else 'down'}, the front wing's angle of attack "
            f"changes by {d_wing:+.2f}°, and the rider's weight must act {abs(d_cp):.0f} mm further "
            f"{'aft' if d_cp > 0 else 'forward'} to balance."), None
