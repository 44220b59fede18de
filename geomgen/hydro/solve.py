"""Solve the lattice once for three unit free streams, then evaluate any attitude cheaply.

The tangency condition (V∞ + Σ Γ_q v_q)·n_p = 0 is linear in V∞, so the circulations for a
free stream u = (cos α cos β, −sin β, sin α cos β) are Γ(u) = G u with G (N, 3) solved once
(one LU factorisation, three right-hand sides). The induced velocities at the bound-vortex
midpoints and the Trefftz-plane wash are linear in Γ too, so every attitude afterwards costs
O(N). Forces come from the Kutta–Joukowski theorem on each bound segment,
F = ρ Γ (V∞ + v) × l; induced drag from the Trefftz plane.

Everything here is per unit density and unit speed: forces in mm² (multiply by ρV² and
1e-6 for newtons), circulations in mm.
"""

from __future__ import annotations

import math

import numpy as np

from .vortex import influence, trefftz_matrix

#: Attitude step of the central differences, rad (forces are quadratic in u, so this is exact
#: to rounding).
D_ALPHA = 1e-4


def free_stream(alpha: float, beta: float = 0.0) -> np.ndarray:
    """(3,) unit free stream relative to the set for attitude ``alpha`` and sideslip ``beta``, rad.

    Positive alpha: nose up (flow meets the set from below); positive beta: flow from starboard.
    """
    ca, sa, cb, sb = math.cos(alpha), math.sin(alpha), math.cos(beta), math.sin(beta)
    return np.array([ca * cb, -sb, sa * cb])


def lift_axis(alpha: float) -> np.ndarray:
    """(3,) unit lift direction: normal to the free stream in the x-z plane, upward."""
    return np.array([-math.sin(alpha), 0.0, math.cos(alpha)])


class Flow:
    """Solved lattice (or a subset of its surfaces solved alone).

    Parameters
    ----------
    lat : Lattice
    AIC : (N, N) normal-wash influence at collocation points, full lattice
    W : (3, N, N) velocity influence at bound midpoints, full lattice
    T : (N, N) Trefftz wash, full lattice; ds : (N,) Trefftz cut lengths
    idx : (n,) int, optional
        Panels kept (a surface alone); default all.
    """

    _mats: tuple  # (AIC, W, T, ds) of the full lattice, set by :meth:`solve`

    def __init__(self, lat, AIC, W, T, ds, idx=None):
        idx = np.arange(lat.n) if idx is None else np.asarray(idx)
        ix = np.ix_(idx, idx)
        self.lat, self.idx = lat, idx
        self.G = np.linalg.solve(AIC[ix], -lat.normal[idx])                    # (n, 3)
        self.Vb = np.stack([Wk[ix] @ self.G for Wk in W], axis=1)             # (n, 3, 3)
        self.Tw = T[ix] @ self.G                                              # (n, 3)
        self.ds = ds[idx]
        self.l = (lat.B - lat.A)[idx]
        self.mid = lat.mid[idx]
        self.surface = lat.surface[idx]
        self.strip = lat.strip[idx]

    @classmethod
    def solve(cls, lat) -> "Flow":
        """Build the influence matrices in one shot and solve the whole lattice."""
        AIC = influence(lat, lat.colloc, lat.surface, lat.normal)
        W = influence(lat, lat.mid, lat.surface)
        T, ds, _ = trefftz_matrix(lat)
        flow = cls(lat, AIC, W, T, ds)
        flow._mats = (AIC, W, T, ds)
        return flow

    def alone(self, surface: int) -> "Flow":
        """The same lattice's panels of one surface, solved without the others."""
        AIC, W, T, ds = self._mats
        return Flow(self.lat, AIC, W, T, ds, np.flatnonzero(self.lat.surface == surface))

    # -- one attitude ---------------------------------------------------------------
    def gamma(self, alpha: float, beta: float = 0.0) -> np.ndarray:
        """(n,) circulations, mm (unit speed)."""
        return self.G @ free_stream(alpha, beta)

    def forces(self, alpha: float, beta: float = 0.0) -> np.ndarray:
        """(n, 3) Kutta–Joukowski force on each bound segment, mm² (per unit ρ and V²)."""
        u = free_stream(alpha, beta)
        g = self.G @ u
        v = self.Vb @ u + u
        return g[:, None] * np.cross(v, self.l)

    def trefftz_drag(self, alpha: float, beta: float = 0.0) -> np.ndarray:
        """(n,) induced-drag share of each panel from the Trefftz plane, mm² (per unit ρ and V²)."""
        u = free_stream(alpha, beta)
        return -0.5 * (self.G @ u) * (self.Tw @ u) * self.ds

    def strip_gamma(self, alpha: float, beta: float = 0.0) -> np.ndarray:
        """(S,) circulation summed over each strip's chordwise panels, mm (all strips of the lattice)."""
        return np.bincount(self.strip, self.gamma(alpha, beta), minlength=len(self.lat.strip_y))

    def loads(self, alpha: float, ref, beta: float = 0.0) -> dict:
        """Totals per surface at one attitude.

        Parameters
        ----------
        alpha, beta : rad
        ref : (3,) moment reference point, mm

        Returns
        -------
        dict of (n_surfaces,) arrays (unit ρ and V): ``lift``, ``drag_near`` (along the free
        stream, from the segment forces), ``side`` (along +y), ``drag_i`` (Trefftz), mm²;
        ``moment`` (n_surfaces, 3) about ``ref`` about the datum axes (right-hand; the y
        component is pitch, positive nose up), mm³.
        """
        F = self.forces(alpha, beta)
        k = len(self.lat.models)
        u = free_stream(alpha, beta)
        M = np.cross(self.mid - np.asarray(ref, float), F)

        def per(vals):
            return np.bincount(self.surface, vals, minlength=k)

        return dict(lift=per(F @ lift_axis(alpha)), drag_near=per(F @ u), side=per(F[:, 1]),
                    drag_i=per(self.trefftz_drag(alpha, beta)),
                    moment=np.column_stack([per(M[:, j]) for j in range(3)]))

    def slopes(self, alpha: float, ref, beta: float = 0.0, wrt: str = "alpha") -> dict:
        """Central-difference derivatives of :meth:`loads` per radian of ``wrt`` ("alpha" | "beta")."""
        h = D_ALPHA
        if wrt == "alpha":
            hi, lo = self.loads(alpha + h, ref, beta), self.loads(alpha - h, ref, beta)
        else:
            hi, lo = self.loads(alpha, ref, beta + h), self.loads(alpha, ref, beta - h)
        return {key: (hi[key] - lo[key]) / (2 * h) for key in hi}


#: Attitudes (rad) the trim searches: about −28.6° to +34.4°, far past any section's stall.
ATTITUDE_RANGE = (-0.5, 0.6)


def solve_attitude(fun, target: float, lo: float = ATTITUDE_RANGE[0], hi: float = ATTITUDE_RANGE[1]) -> float:
    """Attitude (rad) where the nearly linear ``fun(alpha)`` equals ``target``; nan if not in [lo, hi]
    (or if ``target`` or ``fun`` there is not a number: never raises).

    Secant steps from 0 (the functions here are linear in sin and cos of alpha), then a
    bracketing solver if they stray.
    """
    from scipy.optimize import brentq

    if not math.isfinite(target):
        return math.nan
    f = lambda a: fun(a) - target  # noqa: E731
    a0, a1 = 0.0, 0.05
    f0, f1 = f(a0), f(a1)
    for _ in range(8):
        if f1 == f0 or not (math.isfinite(f0) and math.isfinite(f1)):
            break
        a0, a1, f0 = a1, a1 - f1 * (a1 - a0) / (f1 - f0), f1
        if not math.isfinite(a1) or abs(a1) > 10.0:
            break
        f1 = f(a1)
        if abs(a1 - a0) < 1e-12:
            return a1 if lo <= a1 <= hi and math.isfinite(f1) else math.nan
    flo, fhi = f(lo), f(hi)
    if not (math.isfinite(flo) and math.isfinite(fhi)) or flo * fhi > 0:
        return math.nan  # no root in the bracket, or a function that is not a number there
    return brentq(f, lo, hi, xtol=1e-12)
