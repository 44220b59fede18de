"""One surface placed in the datum frame: the only place that turns a station into 3D points.

Frames (see DEVELOPERS.md for the table):

* local frame of the surface: X aft along the chord line at zero twist, Y along the span
  from the root reference point, Z toward the section's upper side. Sections lie in planes
  Y = const (streamwise cuts); sweep and dihedral are offsets of the reference point.
* twist at a station, then the surface's incidence, rotate about an axis parallel to Y
  through the reference point (station) and the root reference point (incidence);
  positive raises the leading edge.
* orientation maps local to datum axes: horizontal (X, Y, Z) -> (x, y, z); vertical-up
  (span along +z) -> (x, -Z, Y); vertical-down (span along -z) -> (x, Z, -Y). Then the
  root reference point is moved to ``position``.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from .. import defaults
from ..sections.base import Section
from .planform import Planform

#: local -> datum rotation (columns: datum images of local X, Y, Z).
ORIENTATION = {
    "horizontal": np.eye(3),
    "vertical-up": np.array([[1.0, 0, 0], [0, 0, -1.0], [0, 1.0, 0]]),
    "vertical-down": np.array([[1.0, 0, 0], [0, 0, 1.0], [0, -1.0, 0]]),
}


def rot_y(deg: float) -> np.ndarray:
    """Rotation about +Y by ``deg``; positive raises a point ahead of the axis (leading edge up)."""
    a = math.radians(deg)
    c, s = math.cos(a), math.sin(a)
    return np.array([[c, 0.0, s], [0.0, 1.0, 0.0], [-s, 0.0, c]])


class SurfaceModel:
    """Geometry of one surface. Lengths mm, angles deg.

    Parameters
    ----------
    spec : SurfaceSpec
    planform : Planform
    sections : dict
        Planform section key -> unit-chord :class:`Section` (before trailing-edge finishing).
    """

    named_sections: dict  # the spec's sections by name (set by build_models)

    def __init__(self, spec, planform: Planform, sections: dict):
        self.spec = spec
        self.name = spec.name
        self.role = spec.role
        self.mirror = spec.mirror
        self.orientation = spec.orientation
        self.planform = planform
        self._sections = sections
        self.R = ORIENTATION[spec.orientation] @ rot_y(spec.incidence)
        self.position = np.asarray(spec.position, float)
        self._section_at = lru_cache(maxsize=512)(self._section_uncached)
        last = planform.half_span
        self.tip_length = 0.0
        if spec.tip == "round":
            self.tip_length = spec.tip_length or defaults.ROUND_TIP_LENGTH_OF_CHORD * float(planform("chord", last))
        self._theta_max = math.acos(spec.tip_end)

    # -- derived facts (read these, not the spec fields) ------------------------------
    @property
    def te_thickness(self) -> float:
        """Finished trailing-edge thickness at the root, mm (0 = sharp, closed edge)."""
        return float(self.spec.te_thickness)

    @property
    def te_open(self) -> bool:
        """True if the trailing edge is a finite flat (a ruled strip closes the skin)."""
        return self.te_thickness > 0.0

    def with_te_thickness(self, te_mm: float) -> "SurfaceModel":
        """The same surface with another finished trailing edge (e.g. thickened to print).

        Shares the planform and base sections; refusals of the new edge are the caller's
        (:func:`geomgen.geometry.model.trailing_edge_problems`)."""
        return SurfaceModel(self.spec.model_copy(update={"te_thickness": float(te_mm)}), self.planform,
                            self._sections)

    def with_incidence(self, incidence_deg: float) -> "SurfaceModel":
        """The same surface set at another incidence (a shim under it), deg; shares the
        planform and sections."""
        return SurfaceModel(self.spec.model_copy(update={"incidence": float(incidence_deg)}), self.planform,
                            self._sections)

    def te_too_thick(self, where) -> list[tuple[float, float, float]]:
        """(y, limit mm, thickness at the ramp start mm) where the finished edge is too thick."""
        from .model import _check_trailing_edge

        return _check_trailing_edge(self, where)

    @property
    def skin(self):
        """The B-spline skin of this surface (built once; see :mod:`geomgen.geometry.skin`)."""
        if getattr(self, "_skin", None) is None:
            from .skin import build_skin

            self._skin = build_skin(self)
        return self._skin

    # -- rounded tip ----------------------------------------------------------------
    def tip_factor(self, y) -> np.ndarray:
        """Chord factor of the rounded tip: a quarter ellipse beyond the last station (1 inside)."""
        q = np.abs(np.asarray(y, float)) - self.planform.half_span
        if self.tip_length == 0.0:
            return np.ones_like(q)
        t = np.clip(q / self.tip_length, 0.0, 1.0)
        return np.sqrt(1.0 - t**2)

    def chord(self, y) -> np.ndarray:
        """Chord at span ``y`` (mm), the rounded tip included."""
        return self.planform("chord", y) * self.tip_factor(y)

    @property
    def station_breaks(self) -> list[float]:
        """Half-span positions where the planform may change slope: stations and tip start."""
        ys = [float(v) for v in self.planform.y]
        return ys + ([self.half_span] if self.tip_length else [])

    # -- span ---------------------------------------------------------------------
    @property
    def half_span(self) -> float:
        """Root-to-tip length of the part's half, mm (the rounded tip included)."""
        return self.planform.half_span + self.tip_length * math.sin(self._theta_max) if self.tip_length else \
            self.planform.half_span

    @property
    def y_range(self) -> tuple[float, float]:
        """Span coordinate range of the whole part (mirrored: -b/2 .. b/2), mm."""
        lo = -self.half_span if self.mirror else float(self.planform.y[0])
        return lo, self.half_span

    @property
    def span_axis(self) -> np.ndarray:
        """(3,) datum direction of local Y (unchanged by incidence)."""
        return ORIENTATION[self.orientation][:, 1]

    def span_frame(self) -> dict:
        """Where the part lies along its span, for measuring its files: datum ``axis`` index
        (1 = y, 2 = z), ``sign`` of the root-to-tip direction along it, datum coordinate
        ``root`` of the root plane (the centre plane of a mirrored part, else the first
        station), ``mirrored``, datum coordinate ``origin`` of span 0 (station positions count
        from it), the reference plane (``chord_dir``: datum direction of the root chord line
        at zero twist, i.e. datum x turned by the incidence; ``ref_point``: the root reference
        point), ``le_at`` (where the design puts the leading edge at datum span coordinates)
        and ``te_at`` (its trailing-edge corners). Sections lie in planes of constant local
        Y, which incidence and twist leave alone."""
        d = self.span_axis
        axis = int(np.argmax(np.abs(d)))
        sign = float(np.sign(d[axis]))
        y0 = 0.0 if self.mirror else float(self.planform.y[0])
        return {"axis": axis, "sign": sign, "root": float(self.position[axis]) + sign * y0, "mirrored": self.mirror,
                "origin": float(self.position[axis]), "chord_dir": tuple(float(v) for v in self.R[:, 0]),
                "ref_point": tuple(float(v) for v in self.position), "le_at": self.leading_edges_at,
                "te_at": self.trailing_edge_corners_at}

    def leading_edge(self, y: float) -> np.ndarray:
        """(3,) datum point of the section family's leading edge at span ``y`` (the unit-chord
        section's (0, 0): NACA the mean line's start, a coordinate file its point farthest
        from the trailing edge)."""
        return self.place(float(y), np.zeros((1, 2)))[0]

    def trailing_edge_corners_at(self, s) -> np.ndarray:
        """(n, 2, 3) the finished section's trailing-edge corners (upper end, lower end) at
        datum span coordinates ``s`` (n,): one point twice on a sharp edge."""
        y = self._span_of(s)
        one = np.array([1.0])
        out = []
        for v in y:
            sec = self.section(float(v))
            (xu,), (yu,) = sec.upper(one)
            (xl,), (yl,) = sec.lower(one)
            out.append(self.place(float(v), np.array([[xu, yu], [xl, yl]])))
        return np.array(out).reshape(-1, 2, 3)

    def leading_edges_at(self, s) -> np.ndarray:
        """(n, 3) leading edges (:meth:`leading_edge`) at datum span coordinates ``s`` (n,)."""
        return np.array([self.leading_edge(v) for v in self._span_of(s)]).reshape(-1, 3)

    def _span_of(self, s) -> np.ndarray:
        """Span positions y (n,) of datum span coordinates ``s`` (n,)."""
        axis = int(np.argmax(np.abs(self.span_axis)))
        return (np.atleast_1d(np.asarray(s, float)) - self.position[axis]) * float(np.sign(self.span_axis[axis]))

    @property
    def lift_axis(self) -> np.ndarray:
        """(3,) datum normal of the projection plane (z for horizontal, y for vertical)."""
        return np.abs(ORIENTATION[self.orientation][:, 2])

    # -- sections -------------------------------------------------------------------
    def base_section(self, y: float) -> Section:
        """Unit-chord section at span ``y`` before trailing-edge finishing (blend of stations)."""
        w = self.planform.weights(y)
        items = sorted(w.items(), key=lambda kv: -kv[1])
        sec, acc = self._sections[items[0][0]], items[0][1]
        for key, wi in items[1:]:
            acc += wi
            sec = sec.blended(self._sections[key], wi / acc)
        return sec

    def _section_uncached(self, y: float) -> Section:
        chord = float(self.chord(y))
        te = self.te_thickness * float(self.tip_factor(y))  # the edge thins into a rounded tip
        return self.base_section(y).with_te_thickness(te / chord)

    def section(self, y: float) -> Section:
        """Finished unit-chord section at span ``y`` (trailing edge of te_thickness mm)."""
        return self._section_at(round(abs(float(y)), 9))

    # -- placement ------------------------------------------------------------------
    def place(self, y: float, pts2d: np.ndarray) -> np.ndarray:
        """Unit-chord section points (n, 2) at span ``y`` -> (n, 3) datum points, mm."""
        pf = self.planform
        xr, zr, tw = (float(pf(k, y)) for k in ("x", "z", "twist"))
        c = float(self.chord(y))
        ref = self.spec.reference
        d = np.column_stack([(pts2d[:, 0] - ref) * c, np.zeros(len(pts2d)), pts2d[:, 1] * c])
        local = d @ rot_y(tw).T + np.array([xr, y, zr])
        return local @ self.R.T + self.position

    @property
    def loft_points_per_side(self) -> int:
        """Points a side of the loop each loft section is sampled at (the skin's chordwise
        resolution): ``LOFT_POINTS_PER_SIDE``, and more (a quarter more a round) until the
        chordwise cubic through them stays within ``LOFT_CHORDWISE_TOL_MM`` of every station's
        section at its largest chord, midway between samples. A mean line with a curvature
        jump (NACA 9730: camber 9 % at 70 %) strayed 0.02 mm at 200 mm of chord and 0.56 mm
        at 4,716 mm with the fixed 80."""
        if getattr(self, "_n_side", None) is None:
            from scipy.interpolate import make_interp_spline

            from ..sections.base import Section

            c_max = max(float(self.planform("chord", v)) for v in self.planform.y)
            secs = [self.section(float(v)) for v in self.planform.y]
            n = defaults.LOFT_POINTS_PER_SIDE
            while n < defaults.LOFT_POINTS_PER_SIDE_MAX:
                u = Section.loop_parameter(n)
                um = 0.5 * (u[1:] + u[:-1])
                err = max(float(np.linalg.norm(make_interp_spline(u, sec.loop(n), k=3)(um) - sec.loop(2 * n)[1::2],
                                               axis=1).max()) for sec in secs) * c_max
                if err <= defaults.LOFT_CHORDWISE_TOL_MM:
                    break
                n = min(int(math.ceil(1.25 * n)), defaults.LOFT_POINTS_PER_SIDE_MAX)
            self._n_side = n
        return self._n_side

    def section_loop(self, y: float, n: int = defaults.LOFT_POINTS_PER_SIDE) -> np.ndarray:
        """(2n+1, 3) datum points of the finished section at span ``y``, TE upper -> LE -> TE lower."""
        return self.place(y, self.section(y).loop(n))

    def camber_points(self, y: float, xc) -> np.ndarray:
        """(k, 3) datum points of the mean line at chord fractions ``xc`` (for the vortex lattice)."""
        sec = self.base_section(y)
        xc = np.asarray(xc, float)
        xu, yu = sec.upper(xc)
        xl, yl = sec.lower(xc)
        return self.place(y, np.column_stack([0.5 * (xu + xl), 0.5 * (yu + yl)]))

    # -- loft layout ------------------------------------------------------------------
    def loft_breaks(self) -> list[float]:
        """Span positions where the skin may have a crease (C0): the centreline of a
        mirrored part and, for linear interpolation, every station."""
        ys = self.station_breaks
        inner = [float(v) for v in self.planform.y[1:-1]] if self.spec.interpolation == "linear" else []
        half = [ys[0]] + inner + ([float(self.planform.y[-1])] if self.tip_length else []) + [self.half_span]
        if self.mirror:
            return [-v for v in half[::-1] if v > 0] + half
        return half

    def loft_y(self) -> list[np.ndarray]:
        """Loft section positions, one array per crease-free segment (mm), worked out once."""
        if getattr(self, "_loft_y", None) is None:
            self._loft_y = self._loft_positions()
        return [seg.copy() for seg in self._loft_y]

    def _loft_positions(self) -> list[np.ndarray]:
        """Loft section positions, one array per crease-free segment (mm).

        Sections are spread by arc of a quarter circle over each half span, so they crowd
        toward the tip where curved planforms change fastest; every segment gets at least
        ``LOFT_SECTIONS_PER_INTERVAL_MIN``.
        """
        b = self.half_span
        n_half = self.spec.loft_sections
        breaks = self.loft_breaks()
        segs = []
        last = float(self.planform.y[-1])
        for a, c in zip(breaks[:-1], breaks[1:]):
            if self.tip_length and min(abs(a), abs(c)) >= last - 1e-9:  # rounded tip: even in the ellipse angle
                y = self._tip_sections(max(defaults.LOFT_SECTIONS_PER_INTERVAL_MIN + 3, n_half // 3))
                segs.append(y if c > 0 else -y[::-1])
                continue
            # map |y| through theta = asin(|y|/b) so spacing is uniform in theta
            ta, tc = (math.asin(np.clip(v / b, -1, 1)) for v in (a, c))
            n = max(defaults.LOFT_SECTIONS_PER_INTERVAL_MIN,
                    int(math.ceil(abs(tc - ta) / (math.pi / 2) * n_half)) + 1)
            th = np.linspace(ta, tc, n)
            y = b * np.sin(th)
            y[0], y[-1] = a, c
            segs.append(self._with_stations(y, a, c))
        return [self._followed(seg) for seg in segs]

    def _followed(self, seg: np.ndarray) -> np.ndarray:
        """``seg`` with a loft section added midway in every interval where the skin's spanwise
        cubic through the sections strays more than ``LOFT_FOLLOW_TOL_MM`` from the model's
        section there, until none does (a 4,716 mm chord falling to 943 mm over 70 mm of a
        smooth planform strayed enough to move the solid's centroid 0.07 mm)."""
        from scipy.interpolate import make_interp_spline

        seg = np.asarray(seg, float)
        n = defaults.LOFT_FOLLOW_POINTS_PER_SIDE
        loops = {float(v): self.section_loop(float(v), n) for v in seg}
        while len(seg) < defaults.LOFT_SECTIONS_MAX_PER_SEGMENT:
            order = np.argsort(seg)
            ys = seg[order]
            k = min(3, len(ys) - 1)
            cubic = make_interp_spline(ys, np.stack([loops[float(v)] for v in ys]), k=k, axis=0)
            mids = 0.5 * (ys[1:] + ys[:-1])
            wide = np.diff(ys) > 2 * defaults.LOFT_FOLLOW_MIN_GAP_MM
            err = np.array([np.linalg.norm(cubic(m) - self.section_loop(float(m), n), axis=1).max() if w else 0.0
                            for m, w in zip(mids, wide)])
            bad = mids[err > defaults.LOFT_FOLLOW_TOL_MM]
            if not len(bad):
                break
            bad = bad[:defaults.LOFT_SECTIONS_MAX_PER_SEGMENT - len(seg)]
            for v in bad:
                loops[float(v)] = self.section_loop(float(v), n)
            seg = np.concatenate([seg, bad])
            seg = np.sort(seg) if seg[-1] >= seg[0] else -np.sort(-seg)
        return seg

    def _tip_sections(self, n: int) -> np.ndarray:
        """``n`` loft positions over the rounded tip, even in the ellipse angle (dense toward the
        end, where the chord changes ever faster); :meth:`_followed` adds what the skin needs."""
        th = np.linspace(0.0, self._theta_max, n)
        y = float(self.planform.y[-1]) + self.tip_length * np.sin(th)
        y[-1] = self.half_span
        return y

    def _with_stations(self, y: np.ndarray, a: float, c: float) -> np.ndarray:
        """Smooth interpolation crosses stations inside a segment: put a loft section on each
        and at least two between neighbours, so the skin follows the spline's pieces."""
        st = [float(v) for v in self.planform.y]
        inner = [v for v in st + [-v for v in st] if min(a, c) + 1e-9 < v < max(a, c) - 1e-9]
        if not inner:
            return y
        knots = sorted({a, c, *inner}, reverse=c < a)
        extra = []
        for p, q in zip(knots[:-1], knots[1:]):
            extra += list(np.linspace(p, q, 4)[1:-1])
        # no near-duplicate sections (0.05 mm), but the segment's ends and its stations are
        # always kept: a spread section 0.04 mm inside the tip once replaced the tip station,
        # and the skin stopped short of the span (found by the long CLI property run)
        kept = list(knots)
        for v in sorted(set(np.round(np.concatenate([y[1:-1], extra]), 9))):
            if min(abs(v - k) for k in kept) > 0.05:
                kept.append(float(v))
        return np.array(sorted(kept, reverse=c < a))
