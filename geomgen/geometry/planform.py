"""Station values as functions of span: chord, reference-point offsets, twist, section weights.

``linear`` interpolates each quantity piecewise linearly between stations; ``smooth`` uses an
interpolating cubic spline (scipy ``CubicSpline``, not-a-knot ends; a parabola through three
stations, a line through two): C2, like a drawn batten, so a loft of cubic B-spline sections
follows it closely. It is not shape-preserving: between stations it can swing past their
values (twist between two 0° stations is not 0; the model refuses large swings). On a
mirrored part the spline runs through the stations mirrored to the other side too, so
every quantity has zero slope at the mirror plane (no point at the root in the top view).
Both modes are linear in the station values, so section blend weights always sum to one.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.interpolate import CubicSpline


class Planform:
    """Interpolated station data of one half span.

    Parameters
    ----------
    y : (n,) mm, strictly increasing
    chord, x, z, twist : (n,) mm, mm, mm, deg (x, z: reference-point offsets)
    keys : list of n hashable section keys (a station's section including its blend)
    mode : "linear" | "smooth"
    """

    def __init__(self, y, chord, x, z, twist, keys, mode: str, mirror: bool = False):
        self.y = np.asarray(y, float)
        self.mode = mode
        self.mirror = bool(mirror) and self.y[0] == 0.0
        self.keys = list(dict.fromkeys(keys))
        self._f = {name: self._interp(np.asarray(v, float)) for name, v in
                   (("chord", chord), ("x", x), ("z", z), ("twist", twist))}
        eye = np.array([[1.0 if k == key else 0.0 for key in keys] for k in self.keys])
        self._w = [self._interp(row) for row in eye]

    def _interp(self, values):
        if self.mode == "smooth" and (len(self.y) > 2 or self.mirror):
            if self.mirror:  # through the mirrored stations too: zero slope at y = 0
                return CubicSpline(np.concatenate([-self.y[:0:-1], self.y]), np.concatenate([values[:0:-1], values]))
            return CubicSpline(self.y, values)
        yy = self.y
        return lambda q: np.interp(q, yy, values)

    @property
    def half_span(self) -> float:
        return float(self.y[-1])

    def __call__(self, name: str, y) -> np.ndarray:
        """Quantity ``name`` ('chord', 'x', 'z', 'twist') at |y| (mm)."""
        q = np.clip(np.abs(np.asarray(y, float)), self.y[0], self.y[-1])
        return np.asarray(self._f[name](q), float)

    def weights(self, y: float) -> dict:
        """Section key -> blend weight at |y| (weights sum to 1; a spline may give small negative ones)."""
        q = float(np.clip(abs(y), self.y[0], self.y[-1]))
        w = [float(f(q)) for f in self._w]
        return {k: wi for k, wi in zip(self.keys, w) if abs(wi) > 1e-12}


def station_offsets(stations) -> tuple[list[float], list[float]]:
    """Reference-point offsets x, z per station from x/z or panel sweep/dihedral angles (mm)."""
    xs, zs = [], []
    for i, st in enumerate(stations):
        dy = st.y - stations[i - 1].y if i else 0.0
        if st.x is not None or i == 0:
            xs.append(st.x or 0.0)
        else:
            xs.append(xs[-1] + dy * math.tan(math.radians(st.sweep or 0.0)) if st.sweep is not None else xs[-1])
        if st.z is not None or i == 0:
            zs.append(st.z or 0.0)
        else:
            zs.append(zs[-1] + dy * math.tan(math.radians(st.dihedral)) if st.dihedral is not None else zs[-1])
    return xs, zs
