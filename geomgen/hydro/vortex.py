"""Biot–Savart influence of horseshoe vortices (3D) and of trailing vortices in the
Trefftz plane (2D), vectorised with numpy.

Straight vortex segment from A to B, circulation Γ, at point P (Biot–Savart law for a
straight segment, as in Katz & Plotkin, *Low-Speed Aerodynamics*), with r1 = P − A,
r2 = P − B, r0 = B − A::

    v = Γ/(4π) · (r1 × r2) / |r1 × r2|² · r0 · (r1/|r1| − r2/|r2|)

and its limit for B → ∞ along the unit vector d (a semi-infinite trailing leg)::

    v = Γ/(4π) · (d × r1) / |d × r1|² · (1 + d · r1/|r1|)

A horseshoe is the leg from +∞ to A, the bound segment A → B and the leg B → +∞. Each leg
follows its strip edge over the surface (straight pieces through the bound-vortex ends of
the rows behind) to the trailing edge and runs from there along d = +x.

Cores. A point on or near a vortex line of *another* surface (a stabilizer in the plane of
the wing's wake) would see an unbounded velocity from the discrete legs, and the in-plane
wash of a wing with a kinked root load is log-singular even for a continuous sheet. There
each vortex gets a Gaussian (Lamb–Oseen) core, the exact field of the vorticity smeared
over a radius rc = max(``WAKE_CORE`` × local chord of the shedding strip, ``RIPPLE_CORE`` ×
its width). The chord term is a physical size (the wake's thickness and its displacement
from the stabilizer at cruise attitude), so the answer converges as the lattice is refined;
a core tied to the strip width alone made the neutral point creep by 1-3 % MAC per doubling.
The width term keeps coarse lattices free of ripple. Panels of the same surface use the
exact kernel (a tiny core only guards 0/0 on a bound line).
"""

from __future__ import annotations

import numpy as np

#: Core radius on other surfaces, in local chords of the source strip (a physical size,
#: so the answer converges as the lattice is refined).
WAKE_CORE = 0.2

#: ... and at least this many source strip widths (no ripple from the discrete legs).
RIPPLE_CORE = 0.7

#: Core radius on the same surface, in source strip widths: only guards the 0/0 of a point
#: on a bound line (its own force point, a collinear neighbour) against rounding. Rounding
#: leaves |r1 × r2| ~ 1e-16 w² there, which the core turns into a velocity ~ 1e-16 w / rc²:
#: at 1e-6 w that was a 2e-4 relative error (an asymmetry of 1e-7 in a symmetric set), at
#: 1e-3 w it is 1e-10; no genuine field point of the same surface comes within 0.25 w of a
#: vortex line (force and collocation points sit between the legs).
SELF_CORE = 1e-3

#: Pair-array elements built at once: small enough that the block's temporaries stay in
#: cache (measured 3x faster than one large block), large enough to amortise Python.
BLOCK = 25_000

FOUR_PI = 4.0 * np.pi


def cross_core(lat) -> np.ndarray:
    """(N,) core radius a panel's vortices show to other surfaces, mm."""
    return np.maximum(WAKE_CORE * lat.strip_chord[lat.strip], RIPPLE_CORE * lat.width)


def edge_cores(lat) -> tuple[np.ndarray, np.ndarray]:
    """(E,) width and core radius of each strip-edge piece: the larger of the two strips
    that share it, mm."""
    out = []
    for vals in (lat.width, lat.core):
        e = np.zeros(len(lat.edge_from))
        np.maximum.at(e, lat.edge_a, vals)
        np.maximum.at(e, lat.edge_b, vals)
        out.append(e)
    return out[0], out[1]


def _core2(surf_p, surf_q, width_q, core_q) -> np.ndarray:
    """(n, m) squared core radius, mm², for points on surfaces ``surf_p`` and panels ``surf_q``."""
    same = surf_p[:, None] == surf_q[None, :]
    return np.where(same, SELF_CORE * width_q[None, :], core_q[None, :]) ** 2


def _smooth(d2, rc2):
    """1/d² with a Gaussian (Lamb–Oseen) core: (1 − exp(−d²/rc²)) / d², → 1/rc² at d = 0.

    The exact field of vorticity smeared as a Gaussian of radius rc; a point exactly on the
    line gets 0 from the zero numerator that always multiplies this factor.
    """
    return -np.expm1(-d2 / rc2) / np.maximum(d2, 1e-300)


def _segments(px, py, pz, a, b, core2, tiny=1e-12):
    """Velocity at points (n, 1 columns) of unit straight segments a -> b ((N, 3) each), (n, N) arrays.

    Biot–Savart for a straight segment (module docstring), Gaussian core ``core2`` (n, N).
    """
    ax, ay, az = (a[None, :, k] for k in range(3))
    bx, by, bz = (b[None, :, k] for k in range(3))
    r1x, r1y, r1z = px - ax, py - ay, pz - az
    r2x, r2y, r2z = px - bx, py - by, pz - bz
    n1 = np.sqrt(r1x * r1x + r1y * r1y + r1z * r1z) + tiny
    n2 = np.sqrt(r2x * r2x + r2y * r2y + r2z * r2z) + tiny
    r0x, r0y, r0z = bx - ax, by - ay, bz - az
    cx = r1y * r2z - r1z * r2y
    cy = r1z * r2x - r1x * r2z
    cz = r1x * r2y - r1y * r2x
    den = cx * cx + cy * cy + cz * cz                       # (h |r0|)², h = distance to the line
    f = (r0x * (r1x / n1 - r2x / n2) + r0y * (r1y / n1 - r2y / n2) + r0z * (r1z / n1 - r2z / n2))
    f *= _smooth(den, core2 * (r0x * r0x + r0y * r0y + r0z * r0z)) / FOUR_PI
    return cx * f, cy * f, cz * f


def _free_legs(px, py, pz, a, b, core2, tiny=1e-12):
    """Velocity of the pair of semi-infinite legs along +x: a -> +inf (-1) and b -> +inf (+1)."""
    r1x, r1y, r1z = px - a[None, :, 0], py - a[None, :, 1], pz - a[None, :, 2]
    r2x, r2y, r2z = px - b[None, :, 0], py - b[None, :, 1], pz - b[None, :, 2]
    n1 = np.sqrt(r1x * r1x + r1y * r1y + r1z * r1z) + tiny
    n2 = np.sqrt(r2x * r2x + r2y * r2y + r2z * r2z) + tiny
    h2b, h2a = r2y * r2y + r2z * r2z, r1y * r1y + r1z * r1z
    fb = (1.0 + r2x / n2) * _smooth(h2b, core2) / FOUR_PI
    fa = (1.0 + r1x / n1) * _smooth(h2a, core2) / FOUR_PI
    # d x r = (0, -rz, ry) for d = +x
    return r1z * fa - r2z * fb, r2y * fb - r1y * fa


def horseshoe_block(P, surf_p, lat) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Velocity at points ``P`` induced by every unit-strength horseshoe of ``lat``.

    A horseshoe is its bound segment A -> B, two legs that follow the strip's edges over the
    surface (through the bound-vortex ends of the rows behind, to the trailing edge) and two
    free legs from the trailing edge along +x. The legs over the surface are sums of the
    edge pieces of the rows behind (a reversed cumulative sum along each strip), and the free
    legs are shared by the strip's panels: three finite segments a pair in all.

    Written component by component on (n, N) arrays (no (n, N, 3) temporaries: several
    times faster than stacked cross products).

    Parameters
    ----------
    P : (n, 3) field points, mm
    surf_p : (n,) int, surface index of each point (selects the kernel core)
    lat : Lattice

    Returns
    -------
    vx, vy, vz : (n, N) velocity components per unit circulation (1/mm per mm of Γ).
    """
    m = lat.chord_panels[0]
    if any(k != m for k in lat.chord_panels):
        raise ValueError("every surface of a lattice needs the same number of chordwise panels")
    core2 = _core2(surf_p, lat.surface, lat.width, lat.core)
    px, py, pz = (P[:, k:k + 1] for k in range(3))
    vx, vy, vz = _segments(px, py, pz, lat.A, lat.B, core2)
    # legs over the surface: the edge pieces of this row and every row behind, + at B, - at A;
    # each edge line is computed once for the two strips that share it
    e2 = _core2(surf_p, lat.edge_surface, lat.edge_width, lat.edge_core)
    n, E = len(P), len(lat.edge_from)
    for v, e in zip((vx, vy, vz), _segments(px, py, pz, lat.edge_from, lat.edge_to, e2)):
        e = e.reshape(n, E // m, m)[:, :, ::-1].cumsum(axis=2)[:, :, ::-1].reshape(n, E)
        v += e[:, lat.edge_b] - e[:, lat.edge_a]
    # free legs from the trailing edge, once per strip
    fy, fz = _free_legs(px, py, pz, lat.A_te[::m], lat.B_te[::m], core2[:, ::m])
    vy += np.repeat(fy, m, axis=1)
    vz += np.repeat(fz, m, axis=1)
    return vx, vy, vz


def influence(lat, P, surf_p, normals=None) -> np.ndarray:
    """Influence of all horseshoes at points ``P``, built block by block.

    Parameters
    ----------
    lat : Lattice
    P : (n, 3) points, mm
    surf_p : (n,) int surface index of each point
    normals : (n, 3), optional
        If given, return the normal component only.

    Returns
    -------
    (n, N) normal velocities, or (3, n, N) velocity components, per unit circulation.
    """
    n, m = len(P), lat.n
    rows = max(1, BLOCK // max(m, 1))
    out = np.empty((n, m) if normals is not None else (3, n, m))
    image = None
    if lat.water_z is not None:  # free surface: each horseshoe with its reflected image
        from .lattice import image_lattice

        image = image_lattice(lat)
    for i in range(0, n, rows):
        sl = slice(i, i + rows)
        vx, vy, vz = horseshoe_block(P[sl], surf_p[sl], lat)
        if image is not None:
            ix, iy, iz = horseshoe_block(P[sl], surf_p[sl], image)
            vx += ix
            vy += iy
            vz += iz
        if normals is not None:
            nn = normals[sl]
            out[sl] = vx * nn[:, 0:1] + vy * nn[:, 1:2] + vz * nn[:, 2:3]
        else:
            out[0, sl], out[1, sl], out[2, sl] = vx, vy, vz
    return out


def trefftz_matrix(lat) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Normal wash in the Trefftz plane at each horseshoe's cut (at the force point's span fraction).

    In the plane far behind the set, normal to x, every horseshoe leaves two point vortices
    (+Γ at B_te, −Γ at A_te: its free legs leave from the trailing edge, rotation about +x) and
    a cut of potential jump Γ between them. The
    induced drag is D_i = −(ρ/2) Σ Γ_p w_p Δs_p with w_p the wash normal to the cut at its
    force point (Trefftz-plane analysis: the far-wake kinetic energy per unit length).

    Returns
    -------
    T : (N, N) wash normal to cut p per unit Γ_q (1/mm)
    ds : (N,) cut lengths, mm
    n2 : (N, 2) cut normals (y, z), x̂ × cut direction
    """
    a, b = lat.A_te[:, 1:], lat.B_te[:, 1:]             # the free legs leave from the trailing edge
    seg = b - a
    ds = np.linalg.norm(seg, axis=1)
    t = seg / np.maximum(ds, 1e-12)[:, None]
    n2 = np.column_stack([-t[:, 1], t[:, 0]])         # x̂ × (0, ty, tz) = (0, -tz, ty)
    mid = a + lat.t_mid[:, None] * seg
    n = lat.n
    T = np.empty((n, n))
    rows = max(1, BLOCK // max(n, 1))
    for i in range(0, n, rows):
        sl = slice(i, i + rows)
        core2 = _core2(lat.surface[sl], lat.surface, lat.width, lat.core)
        my, mz = mid[sl, 0:1], mid[sl, 1:2]
        ny, nz = n2[sl, 0:1], n2[sl, 1:2]
        w = np.zeros((len(my), n))
        for src, sign in ((b, 1.0), (a, -1.0)):
            dy, dz = my - src[None, :, 0], mz - src[None, :, 1]
            w += sign * (dy * nz - dz * ny) * _smooth(dy * dy + dz * dz, core2)
        if lat.water_z is not None:  # free-surface images: same sign, reflected in z = water_z
            icore2 = (lat.core[None, :] ** 2) * np.ones((len(my), 1))
            for src, sign in ((b, 1.0), (a, -1.0)):
                dy, dz = my - src[None, :, 0], mz - (2.0 * lat.water_z - src[None, :, 1])
                w += sign * (dy * nz - dz * ny) * _smooth(dy * dy + dz * dz, icore2)
        T[sl] = w / (2.0 * np.pi)
    return T, ds, n2
