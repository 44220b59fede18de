"""2D linear-strength vortex panel method on a unit-chord section: surface pressure, Cp,min.

The method of Katz & Plotkin, *Low-Speed Aerodynamics* (2nd ed., §11.4, linear-strength
vortex panels with the Kutta condition γ₁ + γ_{N+1} = 0), written here from the integrals
below (own derivation and sign convention, counter-clockwise circulation positive).

Nodes run clockwise round the section (lower trailing edge → leading edge → upper trailing
edge), the vortex strength varies linearly along each panel between its end nodes, the
normal velocity vanishes at each panel's midpoint, and the Kutta condition closes the
system (N + 1 unknowns). In a panel's own frame (x along it from its start, z its outward
normal, length L) a vortex sheet γ(ξ) = γa (1 − ξ/L) + γb ξ/L induces

    u = −(1/2π) ∫ γ(ξ) z / r² dξ,   w = (1/2π) ∫ γ(ξ) (x − ξ) / r² dξ,

and with θ₁, θ₂ the angles of the point seen from the panel's ends and r₁, r₂ its
distances to them:

    ∫ z/r² = θ₂ − θ₁ = Δθ,            ∫ (x − ξ)/r² = ln(r₁/r₂) = Λ,
    ∫ ξ z/r² = x Δθ − z Λ,             ∫ ξ (x − ξ)/r² = x Λ − L + z Δθ.

On its own panel, just outside (z → 0⁺), Δθ = π. The free stream is linear in (cos α,
sin α), so the section is solved once for the two unit streams; any lift coefficient
afterwards costs one dot product per panel.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Panels per side of the section (cosine spaced, dense at both edges). At 80 the NACA 0012
#: Cp,min at zero lift is −0.408, within 0.005 of the value at 320 a side (−0.412) and of
#: Abbott & von Doenhoff's −0.41 (tests/test_hydro_cavitation.py); about 10 ms a section.
PANELS_PER_SIDE = 80


def _influence(nodes: np.ndarray, pts: np.ndarray, self_panel: np.ndarray | None):
    """(n_pts, N+1) x- and z-velocity per unit node strength γ at ``pts``."""
    p0, p1 = nodes[:-1], nodes[1:]
    d = p1 - p0
    L = np.hypot(d[:, 0], d[:, 1])
    t = d / L[:, None]
    nrm = np.column_stack([-t[:, 1], t[:, 0]])
    rel = pts[:, None, :] - p0[None, :, :]                     # (n, N, 2)
    x = rel[..., 0] * t[None, :, 0] + rel[..., 1] * t[None, :, 1]
    z = rel[..., 0] * nrm[None, :, 0] + rel[..., 1] * nrm[None, :, 1]
    dth = np.arctan2(z, x - L[None, :]) - np.arctan2(z, x)
    r1 = np.hypot(x, z)
    r2 = np.hypot(x - L[None, :], z)
    lam = np.log(np.maximum(r1, 1e-300) / np.maximum(r2, 1e-300))
    if self_panel is not None:
        dth[self_panel[:, 0], self_panel[:, 1]] = math.pi
        lam[self_panel[:, 0], self_panel[:, 1]] = np.log(x[self_panel[:, 0], self_panel[:, 1]] /
                                                         (L[self_panel[:, 1]] - x[self_panel[:, 0], self_panel[:, 1]]))
    i1u = x * dth - z * lam
    i1w = x * lam - L[None, :] + z * dth
    k = 1.0 / (2.0 * math.pi)
    ua, ub = -k * (dth - i1u / L), -k * (i1u / L)              # local u per γa, γb
    wa, wb = k * (lam - i1w / L), k * (i1w / L)
    n, N = x.shape
    vx = np.zeros((n, N + 1))
    vz = np.zeros((n, N + 1))
    for (u, w), off in (((ua, wa), 0), ((ub, wb), 1)):
        gx = u * t[None, :, 0] + w * nrm[None, :, 0]
        gz = u * t[None, :, 1] + w * nrm[None, :, 1]
        vx[:, off:off + N] += gx
        vz[:, off:off + N] += gz
    return vx, vz


@dataclass
class SectionFlow:
    """A section solved for the two unit free streams.

    Attributes
    ----------
    x, z : (N,) panel midpoints, chord fractions
    upper : (N,) bool, midpoint on the upper side (after the leading-edge node)
    vt : (2, N) tangential surface velocity at the midpoints for the streams (1, 0) and (0, 1)
    cl_unit : (2,) lift coefficient of each unit stream (cl = cl_unit · (cos α, sin α))
    """

    x: np.ndarray
    z: np.ndarray
    upper: np.ndarray
    vt: np.ndarray
    cl_unit: np.ndarray

    def alpha_for(self, cl: float) -> float:
        """2D angle of attack (rad) giving ``cl``: the root of a cos α + b sin α = cl nearest 0."""
        a, b = self.cl_unit
        r, d = math.hypot(a, b), math.atan2(b, a)
        c = max(-1.0, min(1.0, cl / r))
        return min((d - math.acos(c), d + math.acos(c)), key=abs)

    def cp(self, cl: float) -> np.ndarray:
        """(N,) pressure coefficient 1 − (V/U)² at the midpoints at lift coefficient ``cl``."""
        al = self.alpha_for(cl)
        v = math.cos(al) * self.vt[0] + math.sin(al) * self.vt[1]
        return 1.0 - v * v

    def cp_min(self, cl: float) -> tuple[float, float, bool]:
        """(Cp,min, its chord position x/c, True if on the upper side) at ``cl``."""
        c = self.cp(cl)
        i = int(np.argmin(c))
        return float(c[i]), float(self.x[i]), bool(self.upper[i])

    def cp_min_many(self, cl: np.ndarray) -> np.ndarray:
        """(k,) Cp,min at each of the lift coefficients ``cl``."""
        return np.array([float(np.min(self.cp(float(c)))) for c in np.atleast_1d(cl)])


def _system(nodes: np.ndarray):
    """Matrix, right-hand sides and the tangential-velocity operator of one node set."""
    N = len(nodes) - 1
    mid = 0.5 * (nodes[:-1] + nodes[1:])
    d = nodes[1:] - nodes[:-1]
    t = d / np.hypot(d[:, 0], d[:, 1])[:, None]
    nrm = np.column_stack([-t[:, 1], t[:, 0]])
    diag = np.column_stack([np.arange(N), np.arange(N)])
    vx, vz = _influence(nodes, mid, diag)
    A = np.zeros((N + 1, N + 1))
    A[:N] = vx * nrm[:, 0:1] + vz * nrm[:, 1:2]
    A[N, 0] = A[N, N] = 1.0                                     # Kutta: γ₁ + γ_{N+1} = 0
    rhs = np.zeros((N + 1, 2))
    rhs[:N, 0] = -nrm[:, 0]
    rhs[:N, 1] = -nrm[:, 1]
    return A, rhs, vx * t[:, 0:1] + vz * t[:, 1:2], t, mid, np.hypot(d[:, 0], d[:, 1])


def _flow(nodes, g, at, t, mid, L) -> SectionFlow:
    vt = (at @ g).T + t.T                                       # (2, N): induced + free stream
    circ = ((g[:-1] + g[1:]) * 0.5 * L[:, None]).sum(axis=0)    # counter-clockwise Γ per unit stream
    chord = float(nodes[:, 0].max() - nodes[:, 0].min())
    le = int(np.argmin(nodes[:, 0]))
    return SectionFlow(x=mid[:, 0], z=mid[:, 1], upper=np.arange(len(mid)) >= le, vt=vt,
                       cl_unit=-2.0 * circ / chord)


def solve_nodes(nodes: np.ndarray) -> SectionFlow:
    """Solve the panel model on ``nodes`` ((N+1, 2), clockwise from the lower trailing edge)."""
    return solve_many([nodes])[0]


def solve_many(node_sets) -> list[SectionFlow]:
    """Solve several node sets; those of equal size share one batched LAPACK call (many small
    separate solves were slowed 10x by BLAS threads on a busy machine)."""
    node_sets = [np.asarray(n, float) for n in node_sets]
    systems = [_system(n) for n in node_sets]
    out: list = [None] * len(node_sets)
    sizes: dict[int, list[int]] = {}
    for i, n in enumerate(node_sets):
        sizes.setdefault(len(n), []).append(i)
    for idx in sizes.values():
        g = np.linalg.solve(np.stack([systems[i][0] for i in idx]), np.stack([systems[i][1] for i in idx]))
        for k, i in enumerate(idx):
            out[i] = _flow(node_sets[i], g[k], *systems[i][2:])
    return out


def section_nodes(section, n_per_side: int = PANELS_PER_SIDE) -> np.ndarray:
    """(2n+1, 2) nodes of a unit-chord :class:`~geomgen.sections.base.Section`, clockwise.

    A trailing-edge gap (the NACA thickness formula leaves 0.25 % of the chord at a 0012's
    edge) is closed first with the section's own edge finishing (``with_te_thickness(0)``,
    a cubic ramp over the last part of the chord): across an open gap the linear vortex
    sheet turns round the blunt corners and a spurious suction peak appears at the edge."""
    sec = section if abs(section.te_thickness()) < 1e-9 else section.with_te_thickness(0.0)
    nodes = np.array(sec.loop(n_per_side)[::-1], float)
    nodes[0] = nodes[-1] = 0.5 * (nodes[0] + nodes[-1])
    return nodes


def section_flow(section, n_per_side: int = PANELS_PER_SIDE) -> SectionFlow:
    """Solved panel model of a unit-chord section."""
    return solve_nodes(section_nodes(section, n_per_side))


def section_flows(sections, n_per_side: int = PANELS_PER_SIDE) -> list[SectionFlow]:
    """Solved panel models of several sections (one batched solve)."""
    return solve_many([section_nodes(s, n_per_side) for s in sections])
