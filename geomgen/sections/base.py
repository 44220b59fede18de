"""The unit-chord section and its operations.

A section is two smooth curves, ``upper(s)`` and ``lower(s)``, over the chord parameter
``s`` in [0, 1] (0 at the leading edge, 1 at the trailing edge). Each returns ``(x, y)``
arrays in chord fractions; the leading edge is at (0, 0), the chord line runs along +x
and +y is the upper (suction, for a wing) side. For the NACA families ``s`` is the
x-station of the mean line and the surfaces follow the perpendicular construction; for
fitted coordinate files ``s`` is x itself.

Every operation returns a new section; nothing is mutated.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from .. import defaults

Curve = Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]


def cosine_s(n: int) -> np.ndarray:
    """(n,) chord stations from 0 to 1 with cosine spacing (dense at both edges)."""
    phi = np.linspace(0.0, np.pi, n)
    return 0.5 * (1.0 - np.cos(phi))


def te_ramp(s: np.ndarray, start: float = defaults.TE_RAMP_START) -> np.ndarray:
    """Cubic ramp, 0 up to ``start`` and 1 at s = 1; C2 where it begins."""
    u = np.clip((np.asarray(s, float) - start) / (1.0 - start), 0.0, 1.0)
    return u**3


class Section:
    """A unit-chord airfoil section.

    Parameters
    ----------
    upper, lower : callable
        ``s (n,) -> (x (n,), y (n,))``, chord fractions.
    label : str
        Human-readable description (``"NACA 2412"``, ``"file foo.dat"``).
    fit_deviation : float, optional
        Largest distance (chord fractions) between a fitted curve and the file's points.
    """

    source_info: dict  # what a coordinate file held (set by the file reader only)

    def __init__(self, upper: Curve, lower: Curve, label: str, fit_deviation: float | None = None):
        self._upper = upper
        self._lower = lower
        self.label = label
        self.fit_deviation = fit_deviation

    # -- evaluation ---------------------------------------------------------------
    def upper(self, s) -> tuple[np.ndarray, np.ndarray]:
        x, y = self._upper(np.asarray(s, float))
        return np.asarray(x, float), np.asarray(y, float)

    def lower(self, s) -> tuple[np.ndarray, np.ndarray]:
        x, y = self._lower(np.asarray(s, float))
        return np.asarray(x, float), np.asarray(y, float)

    def loop(self, n: int = defaults.LOFT_POINTS_PER_SIDE) -> np.ndarray:
        """(2n+1, 2) points: upper trailing edge, over the leading edge, to lower trailing edge.

        The points sit at uniform steps of the angle phi, s = (1 - cos phi)/2, the
        parameter in which the section is smooth through the leading edge; the loft uses
        the same uniform parameter for every section so all sections correspond.
        """
        s = cosine_s(n + 1)  # 0 .. 1
        xu, yu = self.upper(s[::-1])  # TE -> LE
        xl, yl = self.lower(s[1:])  # LE (excluded, shared) -> TE
        return np.column_stack([np.concatenate([xu, xl]), np.concatenate([yu, yl])])

    @staticmethod
    def loop_parameter(n: int = defaults.LOFT_POINTS_PER_SIDE) -> np.ndarray:
        """(2n+1,) loft parameter of :meth:`loop` points, uniform from 0 to 1."""
        return np.linspace(0.0, 1.0, 2 * n + 1)

    # -- measures (chord fractions) -----------------------------------------------
    def te_thickness(self) -> float:
        """Trailing-edge gap, upper minus lower y at s = 1."""
        return float(self.upper(np.array([1.0]))[1][0] - self.lower(np.array([1.0]))[1][0])

    def area(self, n: int = 4000) -> float:
        """Enclosed area, chord² units (shoelace on a dense loop, closed across the TE)."""
        p = self.loop(n)
        x, y = p[:, 0], p[:, 1]
        return float(0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))))

    def surfaces_at(self, x, n: int = 1200) -> tuple[np.ndarray, np.ndarray]:
        """Upper and lower y at chord positions ``x`` (interpolated on a dense sampling)."""
        s = cosine_s(n)
        xu, yu = self.upper(s)
        xl, yl = self.lower(s)
        x = np.asarray(x, float)
        return np.interp(x, xu, yu), np.interp(x, xl, yl)

    def thickness_at(self, x) -> np.ndarray:
        """Thickness normal to the chord line (upper minus lower y) at chord positions x."""
        yu, yl = self.surfaces_at(x)
        return yu - yl

    def max_thickness(self) -> tuple[float, float]:
        """(t/c, x/c of the maximum), measured normal to the chord line."""
        x = np.linspace(0.0, 1.0, 20001)
        t = self.thickness_at(x)
        i = int(np.argmax(t))
        return float(t[i]), float(x[i])

    # -- operations -------------------------------------------------------------
    def _halves(self):
        up, lo = self._upper, self._lower

        def mid_half(s):
            xu, yu = up(s)
            xl, yl = lo(s)
            return (0.5 * (xu + xl), 0.5 * (yu + yl)), (0.5 * (xu - xl), 0.5 * (yu - yl))

        return mid_half

    def scaled_thickness(self, factor: float) -> "Section":
        """Thickness about the mean line multiplied by ``factor`` (camber unchanged)."""
        mid_half = self._halves()

        def up(s):
            (mx, my), (hx, hy) = mid_half(s)
            return mx + factor * hx, my + factor * hy

        def lo(s):
            (mx, my), (hx, hy) = mid_half(s)
            return mx - factor * hx, my - factor * hy

        return Section(up, lo, f"{self.label}, thickness scaled to {factor:.1%}", self.fit_deviation)

    def inverted(self) -> "Section":
        """Mirror about the chord line: the cambered side goes below (stabilizers)."""
        up, lo = self._upper, self._lower

        def new_up(s):
            x, y = lo(s)
            return x, -y

        def new_lo(s):
            x, y = up(s)
            return x, -y

        return Section(new_up, new_lo, f"{self.label} inverted", self.fit_deviation)

    def with_te_thickness(self, te: float, start: float = defaults.TE_RAMP_START) -> "Section":
        """Trailing edge brought to gap ``te`` (chord fraction) by a smooth cubic ramp.

        The thickness changes only aft of ``start``, by ``(te - te0) * ramp(s)`` split
        evenly between the two sides, so the section keeps its shape ahead of the ramp and
        ends in a flat edge of exactly ``te`` (never a chopped edge).
        """
        delta = te - self.te_thickness()
        up, lo = self._upper, self._lower
        # a sharp edge (te = 0) is one point: a cambered section laid perpendicular to its
        # mean line ends its two sides at different x (NACA open edge: 2 y_t(1) sin θ apart),
        # so the same ramp also brings them to their mean x
        one = np.array([1.0])
        dx = float(lo(one)[0][0] - up(one)[0][0]) if te == 0 else 0.0

        def new_up(s):
            x, y = up(s)
            r = te_ramp(s, start)
            return x + 0.5 * dx * r, y + 0.5 * delta * r

        def new_lo(s):
            x, y = lo(s)
            r = te_ramp(s, start)
            return x - 0.5 * dx * r, y - 0.5 * delta * r

        return Section(new_up, new_lo, self.label, self.fit_deviation)

    def blended(self, other: "Section", w: float) -> "Section":
        """Point-wise blend at equal s: (1 - w) * self + w * other."""
        if w == 0.0:
            return self
        if w == 1.0:
            return other
        a_up, a_lo, b_up, b_lo = self._upper, self._lower, other._upper, other._lower

        def mix(fa, fb):
            def f(s):
                xa, ya = fa(s)
                xb, yb = fb(s)
                return (1 - w) * xa + w * xb, (1 - w) * ya + w * yb

            return f

        dev = max(d for d in (self.fit_deviation, other.fit_deviation, 0.0) if d is not None)
        return Section(mix(a_up, b_up), mix(a_lo, b_lo), f"{self.label} blended {w:.0%} toward {other.label}",
                       dev or None)
