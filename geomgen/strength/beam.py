"""Beam figures of a part clamped at its root: shear, bending moment, deflection, twist.

Euler–Bernoulli bending and Saint-Venant torsion of a straight beam along the span (any
strength-of-materials text, e.g. Roark, *Formulas for Stress and Strain*, beams and
torsion chapters). Loads are point forces at the vortex-lattice strips; stiffness varies
along the span. Units: mm, N, N·mm, MPa (N/mm²).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike


def _cumtrapz(f: np.ndarray, x: np.ndarray) -> np.ndarray:
    out = np.zeros_like(f, dtype=float)
    out[1:] = np.cumsum(0.5 * (f[1:] + f[:-1]) * np.diff(x))
    return out


def shear_and_moment(s: ArrayLike, at: ArrayLike, force: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """(shear N, bending moment N·mm) at distances ``s`` from the root of a cantilever carrying
    point forces ``force`` at distances ``at`` (everything outboard of s counts)."""
    s, at, force = (np.asarray(v, float) for v in (s, at, force))
    out = at[None, :] > s[:, None]
    return (out * force).sum(axis=1), (out * force * (at[None, :] - s[:, None])).sum(axis=1)


def torque(s: np.ndarray, at: np.ndarray, moment: np.ndarray) -> np.ndarray:
    """Torque (N·mm) at ``s`` from point torques ``moment`` at ``at`` (outboard ones count)."""
    s, at, moment = (np.asarray(v, float) for v in (s, at, moment))
    return ((at[None, :] > s[:, None]) * moment).sum(axis=1)


def deflection(s: np.ndarray, moment: np.ndarray, ei: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(slope rad, deflection mm) along ``s`` of a cantilever clamped at s[0]: curvature M/EI
    integrated twice (trapezoidal rule; use a fine grid)."""
    slope = _cumtrapz(np.asarray(moment, float) / np.asarray(ei, float), s)
    return slope, _cumtrapz(slope, s)


def twist(s: np.ndarray, t: np.ndarray, gj: np.ndarray) -> np.ndarray:
    """Twist (rad) along ``s`` of a shaft clamped at s[0]: ∫ T / GJ ds."""
    return _cumtrapz(np.asarray(t, float) / np.asarray(gj, float), s)


def torsional_stiffness(s: np.ndarray, gj: np.ndarray) -> float:
    """End-torque stiffness (N·mm/rad) of a shaft clamped at s[0]: 1 / ∫ ds / GJ."""
    return 1.0 / float(_cumtrapz(1.0 / np.asarray(gj, float), s)[-1])


def distributed_shear_and_moment(s: np.ndarray, w: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(shear N, moment N·mm) along ``s`` of a cantilever (root at s[0]) under a running load
    ``w`` (N/mm): V(s) = ∫ₛᴸ w, M(s) = ∫ₛᴸ V."""
    cw = _cumtrapz(np.asarray(w, float), s)
    shear = cw[-1] - cw
    cv = _cumtrapz(shear, s)
    return shear, cv[-1] - cv


def first_bending_frequency(s: np.ndarray, ei: np.ndarray, mass_per_mm: np.ndarray) -> float:
    """First bending frequency (Hz) of a cantilever clamped at s[0], by Rayleigh's quotient
    with its static deflection under its own weight as the mode shape:
    ω² = g ∫ m δ ds / ∫ m δ² ds (Rayleigh's method; on a uniform cantilever within about
    0.5 % above the exact 1.8751² √(EI/(m L⁴)), Roark / any vibration text).
    ``ei`` N·mm², ``mass_per_mm`` kg/mm."""
    m = np.asarray(mass_per_mm, float)
    w = m * 9.81  # N/mm
    _, moment = distributed_shear_and_moment(s, w)
    _, d = deflection(s, moment, ei)  # mm
    num = float(_cumtrapz(w * d, s)[-1])  # N·mm = 1e3 kg·mm²/s²
    den = float(_cumtrapz(m * d * d, s)[-1])  # kg·mm²
    return float(np.sqrt(num * 1e3 / den) / (2 * np.pi))
