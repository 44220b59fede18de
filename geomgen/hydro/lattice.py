"""The vortex lattice: horseshoe vortices laid on the mean camber surfaces of the surfaces.

Vortex-lattice method as described in Katz & Plotkin, *Low-Speed Aerodynamics*, and
Bertin & Cummings, *Aerodynamics for Engineers*: each panel carries a horseshoe
vortex whose bound leg lies on the panel's quarter-chord line and whose trailing legs
follow the strip's edges over the camber surface to the trailing edge, then run to +x
infinity (the free-stream direction at zero attitude); the flow-tangency condition is met
at the panel's three-quarter-chord point, with the normal taken from the camber surface
there. (Legs along +x straight from the bound vortex left the surface of a wing set at an
incidence and passed over its rear panels: a flat wing at 4° incidence got 3 % more lift
than at 4° attitude; see DEVELOPERS.md.)

Points come from :meth:`SurfaceModel.camber_points`, the same geometry model the CAD uses,
so incidence, twist, sweep, dihedral/anhedral, curved planforms and mirrored halves are
represented as built. Spanwise spacing is cosine (strip edges at y(θ_j), θ_j = jπ/n, so
strips crowd at the tips and, on a mirrored part, the centreline is a strip edge) and each
strip's collocation station is at the angle midway, y(θ_j + π/2n), not at the arithmetic
midpoint: with this choice the lift slope of a rectangular wing is converged to 4 digits
with 10 strips per half span, where arithmetic midpoints converged only as 1/n (measured
here; the same pairing of vortex and control stations as Multhopp's lifting-line
quadrature). Chordwise spacing is uniform (the quarter/three-quarter rule is exact for a
flat or parabolic mean line on uniform panels).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from .. import defaults
from ..errors import SpecError

#: Chord-fraction step of the finite difference for the camber-surface tangent.
TANGENT_STEP = 1e-3


@dataclass
class Lattice:
    """Panels of one or more surfaces, flattened in order surface -> strip -> chordwise row.

    Lengths mm. ``N`` panels, ``S`` strips.

    Attributes
    ----------
    A, B : (N, 3)
        Ends of the bound vortex (quarter-chord line of the panel); trailing legs start here.
    colloc : (N, 3)
        Collocation points (three-quarter chord of the panel, mid-strip).
    normal : (N, 3)
        Unit normals of the camber surface at the collocation points (toward the upper side).
    surface : (N,) int
        Index of the surface (into ``models``) of each panel.
    strip : (N,) int
        Index of the strip (into the strip arrays) of each panel.
    width : (N,) float
        Width of the panel's strip projected on the y-z plane, mm.
    strip_y : (S,) float
        Signed span coordinate of each strip's collocation station, mm (the surface's own Y).
    strip_chord : (S,) float
        Local chord at the collocation station, mm.
    strip_surface : (S,) int
    models : list
        The :class:`SurfaceModel` objects, in surface-index order.
    chord_panels : list of int
        Panels along the chord, per surface.
    span_panels : list of int
        Strips across the whole part (both halves of a mirrored part), per surface.
    """

    A: np.ndarray
    B: np.ndarray
    colloc: np.ndarray
    normal: np.ndarray
    surface: np.ndarray
    strip: np.ndarray
    width: np.ndarray
    strip_y: np.ndarray
    strip_chord: np.ndarray
    strip_surface: np.ndarray
    models: list
    chord_panels: list
    span_panels: list

    t_mid: np.ndarray | None = None
    """(N,) fraction along A–B of the collocation station."""
    core: np.ndarray | None = None
    """(N,) core radius the panel's vortices show to other surfaces, mm (see ``vortex``)."""
    edge_from: np.ndarray | None = None
    edge_to: np.ndarray | None = None
    """(E, 3) pieces of the strip edges over the surface, edge line by edge line, row by row:
    from a row's bound-vortex end to the next row's (the trailing edge after the last row).
    The trailing legs follow the surface along them to the trailing edge."""
    edge_a: np.ndarray | None = None
    edge_b: np.ndarray | None = None
    """(N,) int, the edge piece at each panel's A end and B end (strips share their edges)."""
    edge_surface: np.ndarray | None = None
    """(E,) int, surface index of each edge piece."""
    edge_width: np.ndarray | None = None
    edge_core: np.ndarray | None = None
    """(E,) strip width and cross-surface core radius of each edge piece (the larger of the
    two strips that share it), mm."""
    A_te: np.ndarray | None = None
    B_te: np.ndarray | None = None
    """(N, 3) the strip edges' trailing-edge points, where the free legs start along +x."""
    water_z: float | None = None
    """Datum z of the still-water surface, mm; None: deep water (no images). See
    :func:`image_lattice`."""

    @property
    def n(self) -> int:
        """Number of panels."""
        return len(self.A)

    @property
    def mid(self) -> np.ndarray:
        """(N, 3) force points on the bound vortices at the collocation station, mm.

        The point of A–B at the strip's collocation station (θ midway), where forces act and
        where the Trefftz-plane wash is taken; with cosine spacing the arithmetic midpoint
        gave a span efficiency that crept down to 1 only as 1/n.
        """
        assert self.t_mid is not None  # set by build_lattice
        return self.A + self.t_mid[:, None] * (self.B - self.A)


def _cosine(model, n_half: int, theta_shift: float = 0.0) -> np.ndarray:
    """(n + 1,) span coordinates y(θ), θ = (j + theta_shift)π/n, j = 0..n, mm."""
    lo, hi = model.y_range
    n = 2 * n_half if model.mirror else n_half
    theta = (np.arange(n + 1) + theta_shift) * np.pi / n
    return lo + (hi - lo) * 0.5 * (1.0 - np.cos(theta))


def span_stations(model, n_half: int) -> np.ndarray:
    """Strip edges along the span with cosine spacing, mm.

    Parameters
    ----------
    model : SurfaceModel
    n_half : int
        Strips per half span (mirrored part) or over the whole part (single-sided).

    Returns
    -------
    (n + 1,) signed span coordinates, increasing; a mirrored part gets ``2 * n_half``
    strips with an edge on the centreline.
    """
    lo, hi = model.y_range
    y = _cosine(model, n_half)
    y[0], y[-1] = lo, hi
    if model.mirror:
        y[n_half] = 0.0
    return y


def surface_panels(model, n_span: int, n_chord: int) -> dict:
    """Panel geometry of one surface (see :class:`Lattice` for the fields), mm."""
    ye = span_stations(model, n_span)
    ym = _cosine(model, n_span, 0.5)[:-1]
    edges = np.linspace(0.0, 1.0, n_chord + 1)
    dx = edges[1] - edges[0]
    xb = edges[:-1] + 0.25 * dx
    xcol = edges[:-1] + 0.75 * dx
    h = min(TANGENT_STEP, 0.2 * dx)
    m = n_chord
    at_edges = np.array([model.camber_points(y, np.concatenate([xb, xcol, [1.0]])) for y in ye])  # (S+1, 2m+1, 3)
    at_mid = np.array([model.camber_points(y, np.concatenate([xcol, xcol - h, xcol + h])) for y in ym])
    bound, col_e, te = at_edges[:, :m], at_edges[:, m:2 * m], at_edges[:, 2 * m:]
    # next point down each strip edge: the next row's bound vortex, the trailing edge after the last
    nxt = np.concatenate([bound[:, 1:], te], axis=1)
    col, cm, cp = at_mid[:, :m], at_mid[:, m:2 * m], at_mid[:, 2 * m:]
    t_span = col_e[1:] - col_e[:-1]                 # (S, m, 3)
    t_chord = cp - cm
    nrm = np.cross(t_chord, t_span)
    nrm /= np.linalg.norm(nrm, axis=-1, keepdims=True)
    A, B = bound[:-1], bound[1:]
    s = len(ym)
    width = np.linalg.norm((B - A)[..., 1:], axis=-1).mean(axis=1)   # projected on the y-z plane
    return dict(A=A.reshape(-1, 3), B=B.reshape(-1, 3), colloc=col.reshape(-1, 3),
                edge_from=bound.reshape(-1, 3), edge_to=nxt.reshape(-1, 3),
                edge_a=np.arange(s * m), edge_b=np.arange(s * m) + m,
                A_te=np.repeat(te[:-1, 0], m, axis=0), B_te=np.repeat(te[1:, 0], m, axis=0),
                normal=nrm.reshape(-1, 3), strip=np.repeat(np.arange(s), m),
                width=np.repeat(width, m), strip_y=ym,
                t_mid=np.repeat((ym - ye[:-1]) / (ye[1:] - ye[:-1]), m),
                strip_chord=np.asarray(model.planform("chord", ym), float), n_strips=s)


def panel_count(models, span_panels: int, chord_panels: int) -> int:
    """Panels of the lattice :func:`build_lattice` would make (nothing is built)."""
    return sum((2 * span_panels if m.mirror else span_panels) * chord_panels for m in models)


def memory_needed(n_panels: int) -> int:
    """Bytes of the matrices of a lattice of ``n_panels`` (``defaults.LATTICE_MATRICES`` N² float64)."""
    return defaults.LATTICE_MATRICES * 8 * n_panels * n_panels


def check_memory(models, span_panels: int, chord_panels: int,
                 budget: int = defaults.LATTICE_MEMORY_BUDGET_BYTES) -> None:
    """Refuse (SpecError naming the [flight] panel counts) a lattice over the memory budget,
    before anything is allocated."""
    n = panel_count(models, span_panels, chord_panels)
    need = memory_needed(n)
    if need > budget:
        fit = int((budget / (defaults.LATTICE_MATRICES * 8)) ** 0.5)
        raise SpecError(
            f"flight.span_panels, flight.chord_panels: {span_panels} strips per half span x {chord_panels} along "
            f"the chord make {n} panels over {len(models)} surfaces, whose lattice matrices need "
            f"{need / 2**30:.1f} GiB, over the {budget / 2**30:.1f} GiB budget (at most {fit:,} panels); "
            f"lower the counts (the defaults converge the neutral point to 0.2 % MAC)")


def build_lattice(models, span_panels: int, chord_panels: int) -> Lattice:
    """Lattice of all ``models`` together.

    Parameters
    ----------
    models : list of SurfaceModel
    span_panels : int
        Strips per half span of a mirrored part; a single-sided part gets as many over its
        whole span.
    chord_panels : int
        Panels along the chord.

    Returns
    -------
    Lattice
    """
    if span_panels < 2 or chord_panels < 1:
        raise ValueError("need span_panels >= 2 and chord_panels >= 1")
    check_memory(models, span_panels, chord_panels)
    parts = [surface_panels(m, span_panels, chord_panels) for m in models]
    off = np.cumsum([0] + [p["n_strips"] for p in parts])
    cat = lambda k: np.concatenate([p[k] for p in parts])  # noqa: E731
    lat = Lattice(
        A=cat("A"), B=cat("B"), colloc=cat("colloc"), normal=cat("normal"),
        surface=np.concatenate([np.full(len(p["A"]), i) for i, p in enumerate(parts)]),
        strip=np.concatenate([p["strip"] + off[i] for i, p in enumerate(parts)]),
        width=cat("width"), strip_y=cat("strip_y"), strip_chord=cat("strip_chord"),
        strip_surface=np.concatenate([np.full(p["n_strips"], i) for i, p in enumerate(parts)]),
        models=list(models), chord_panels=[chord_panels] * len(models),
        span_panels=[p["n_strips"] for p in parts])
    from .vortex import cross_core, edge_cores

    lat.t_mid = cat("t_mid")
    lat.A_te, lat.B_te = cat("A_te"), cat("B_te")
    lat.edge_from, lat.edge_to = cat("edge_from"), cat("edge_to")
    e_off = np.cumsum([0] + [len(p["edge_from"]) for p in parts])
    lat.edge_a = np.concatenate([p["edge_a"] + e_off[i] for i, p in enumerate(parts)])
    lat.edge_b = np.concatenate([p["edge_b"] + e_off[i] for i, p in enumerate(parts)])
    lat.edge_surface = np.concatenate([np.full(len(p["edge_from"]), i) for i, p in enumerate(parts)])
    lat.core = cross_core(lat)
    lat.edge_width, lat.edge_core = edge_cores(lat)
    return lat


#: Offset added to the surface index of image panels: every real point sees an image through
#: the cross-surface core (never the same-surface kernel).
IMAGE_SURFACE = 1000


def image_lattice(lat: Lattice) -> Lattice:
    """The free surface's image of ``lat``: every vortex reflected in the plane z = ``water_z``.

    High-Froude-number limit of the linearised free-surface condition: the perturbation
    potential vanishes on the still surface (φ = 0, no wave making). The image that meets it
    is the reflected horseshoe with the *same* circulation along the reflected path, the
    opposite of the rigid-wall (ground-effect) image, which reflects with −Γ. Its vorticity is
    +Mω (M the reflection) where the wall's is −Mω, so in a 2D cut the image vortex turns the
    same way as the foil's: the free surface acts like a biplane partner and takes lift away,
    where a wall adds it.
    """
    assert lat.water_z is not None, "image_lattice needs a water surface"
    zw = float(lat.water_z)

    def refl(p):
        q = np.array(p, float, copy=True)
        q[..., 2] = 2.0 * zw - q[..., 2]
        return q

    assert lat.edge_surface is not None  # set by build_lattice
    return replace(lat, A=refl(lat.A), B=refl(lat.B), colloc=refl(lat.colloc), edge_from=refl(lat.edge_from),
                   edge_to=refl(lat.edge_to), A_te=refl(lat.A_te), B_te=refl(lat.B_te),
                   surface=lat.surface + IMAGE_SURFACE, edge_surface=lat.edge_surface + IMAGE_SURFACE,
                   water_z=None)
