"""Mould plan: the parting surface, the flange plate region and the machining pose (numpy only).

Parting surface ``stations``: a ruled B-spline through every loft section's chord line
(leading edge to the middle of the trailing edge), extended straight beyond both edges and
both ends so it crosses the whole part. ``root-chord``: the plane through the root chord line
and the span axis.

Machining pose: the root chord plane on the machine XY plane, the root leading edge at the
origin, the leading edge along machine X and the chord toward +Y, each half's outside up
(+Z): for the upper half X = chord x normal, Y = chord, Z = normal; the lower half is the
same turned over about the chord line (X and Z reversed), so the two lie like an open book.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..geometry.skin import Skin
from .gridskin import skin_through


@dataclass
class RootFrame:
    le: np.ndarray  # root leading edge, datum mm
    chord: np.ndarray  # unit, leading edge -> trailing edge
    span: np.ndarray  # unit span axis
    normal: np.ndarray  # unit, toward the upper side

    def pose(self, half: str = "upper") -> tuple[np.ndarray, np.ndarray]:
        """(B, t): machine = B @ datum + t for the ``upper`` or ``lower`` half (B a rotation)."""
        z = self.normal if half == "upper" else -self.normal
        y = self.chord
        x = np.cross(y, z)
        B = np.vstack([x, y, z])
        return B, -B @ self.le


def chord_points(skin: Skin, y: float) -> tuple[np.ndarray, np.ndarray]:
    """(leading edge, middle of the trailing edge) of the skin's section at span ``y``."""
    p = skin.evaluate(np.array([0.0, 0.5, 1.0]), [y])[:, 0]
    return p[1], 0.5 * (p[0] + p[2])


def root_frame(model, skin: Skin) -> RootFrame:
    y_root = 0.0 if model.mirror else model.y_range[0]
    le, te = chord_points(skin, y_root)
    e = np.asarray(model.span_axis, float)
    c = te - le
    c -= (c @ e) * e
    c /= np.linalg.norm(c)
    n = np.cross(c, e)
    return RootFrame(le, c, e, n / np.linalg.norm(n))


def parting_skin(model, skin: Skin, margin: float, reach: tuple[float, float] | None = None,
                 rf: "RootFrame | None" = None) -> Skin:
    """Ruled parting surface through the chord lines of the loft sections, extended ``margin``
    mm beyond both edges and both span ends (degree 1 chordwise, cubic spanwise).

    ``reach`` (with ``rf``): instead, extend each chord line just to the positions
    (fore, aft) along the root chord from the root leading edge, so the surface (and its
    control net) ends where the mould block does."""
    e = np.asarray(model.span_axis, float)
    segs = []

    def line(y, shift=0.0):
        le, te = chord_points(skin, float(np.clip(y, *skin.v_range)))
        c = te - le
        c /= np.linalg.norm(c)
        if reach is None:
            a, b = margin, margin
        else:
            assert rf is not None  # a reach is given with its root frame
            k = float(c @ rf.chord)
            a = ((le - rf.le) @ rf.chord - reach[0]) / k
            b = (reach[1] - (te - rf.le) @ rf.chord) / k
        return np.stack([le - a * c, te + b * c]) + shift * e

    y0, y1 = skin.v_range
    ext = np.linspace(0.0, margin, 4)
    segs.append((y0 - ext[::-1], np.stack([line(y0, -d) for d in ext[::-1]])))
    for seg in model.loft_y():
        segs.append((seg, np.stack([line(y) for y in seg])))
    segs.append((y1 + ext, np.stack([line(y1, d) for d in ext])))
    return skin_through(np.array([0.0, 1.0]), segs, du=1)
