"""What every shop drawing of a surface shares: the span positions drawn and each section
there, in its own chord frame, mm (numpy only).

Chord frame of a section ("template frame"): x along the chord line from the leading edge
(x = 0) toward the trailing edge, z square to it toward the section's upper side (local
+Z of the surface), true size in mm. Twist and incidence are *not* applied: a template is
cut in this frame and its label gives the angles to set it up with.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from ..sections.base import Section
from ..spec.drawings import ShopSpec

#: Positions closer than this are the same position, mm.
SAME_Y_MM = 1e-6


def shop_of(model) -> ShopSpec:
    """The surface's ``[surface.shop]`` table, or the defaults when it has none."""
    return model.spec.shop or ShopSpec()


def upper_side(model) -> str:
    """Plain words for the section's upper side (local +Z) in the datum frame."""
    return {"horizontal": "upper side", "vertical-up": "port side",
            "vertical-down": "starboard side"}[model.orientation]


def fmt_y(y: float) -> str:
    """Span position for file names and labels: '150', '137.5' (no trailing zeros)."""
    return f"{round(y, 3):g}"


def span_limits(model) -> tuple[float, float]:
    """(lowest, highest) span position a drawing may ask for, mm (round tip included)."""
    return float(model.planform.y[0]), float(model.half_span)


def position_problems(model, where: str, values, key: str) -> list[str]:
    """Messages for span positions of ``key`` that lie off the part."""
    lo, hi = span_limits(model)
    out = []
    for j, y in enumerate(values):
        if y < lo - SAME_Y_MM or y > hi + SAME_Y_MM:
            out.append(f"{where} shop {key}[{j}]: {y:g} mm is off the part "
                       f"(span positions run from {lo:g} to {hi:g} mm), got {y:g}")
    return out


def point_segment_distance(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance of points ``p`` (k, 2) to segments a->b (k, 2) pairwise."""
    d = b - a
    L2 = np.einsum("ij,ij->i", d, d)
    t = np.clip(np.einsum("ij,ij->i", p - a, d) / np.where(L2 > 0, L2, 1.0), 0.0, 1.0)
    q = a + t[:, None] * d
    return np.hypot(*(p - q).T)


def distance_to_polyline(points: np.ndarray, poly: np.ndarray, closed: bool = True,
                         block: int = 512) -> np.ndarray:
    """Distance of each point (k, 2) to the polyline ``poly`` (m, 2) (closed: last joins first)."""
    a = poly
    b = np.roll(poly, -1, axis=0) if closed else poly[1:]
    a = a if closed else poly[:-1]
    d = b - a
    L2 = np.einsum("ij,ij->i", d, d)
    L2 = np.where(L2 > 0, L2, 1.0)
    out = np.empty(len(points))
    for i in range(0, len(points), block):
        p = points[i:i + block]
        w = p[:, None, :] - a[None, :, :]
        t = np.clip(np.einsum("kij,ij->ki", w, d) / L2, 0.0, 1.0)
        r = w - t[..., None] * d[None]
        out[i:i + block] = np.sqrt(np.einsum("kij,kij->ki", r, r).min(axis=1))
    return out


def distance_to_dense_polyline(points: np.ndarray, poly: np.ndarray) -> np.ndarray:
    """Distance of points to a closed polyline whose segments are short against its curvature
    and against the distances asked: nearest vertex (k-d tree), then its two segments."""
    from scipy.spatial import cKDTree

    _, k = cKDTree(poly).query(points)
    n = len(poly)
    best = np.full(len(points), np.inf)
    for j0, j1 in (((k - 1) % n, k), (k, (k + 1) % n)):
        best = np.minimum(best, point_segment_distance(points, poly[j0], poly[j1]))
    return best


def outline_mm(section: Section, chord: float, tol: float) -> np.ndarray:
    """Closed outline (upper TE -> LE -> lower TE), mm, dense enough that the polyline stays
    within ``tol`` of the true section.

    The loop is sampled uniformly in the section's angle parameter and doubled until the
    points halfway (in that parameter) between neighbours lie within ``tol`` of the chords
    between them; the finer loop of that pair is returned, so its own gap is about a
    quarter of the one measured. The closing segment is the flat trailing edge.
    """
    n = 64
    while True:
        fine = section.loop(2 * n) * chord
        coarse, mid = fine[::2], fine[1::2]
        dev = point_segment_distance(mid, coarse[:-1], coarse[1:]).max()
        if dev <= tol or n >= 8192:
            return fine
        n *= 2


@dataclass
class Cut:
    """One section of a surface at span ``y`` for the shop drawings (chord frame, mm)."""

    surface: str
    y: float
    chord: float
    twist: float  # deg, the planform's twist at y (positive: leading edge up)
    incidence: float  # deg, the surface's setting
    reference: float  # chord fraction of the twist axis
    section: Section  # finished unit-chord section
    is_station: bool
    mirrored: bool
    tol: float

    @property
    def pitch(self) -> float:
        """Angle of the chord line to the datum x axis, deg (twist + incidence; LE up +)."""
        return self.twist + self.incidence

    @cached_property
    def outline(self) -> np.ndarray:
        return outline_mm(self.section, self.chord, self.tol)

    @cached_property
    def front(self) -> tuple[float, float]:
        """(x, z) of the outline's foremost point in the chord frame, mm: x < 0 where a cambered
        nose passes ahead of the leading edge (NACA 4415: by 0.07 % of the chord)."""
        p = self.outline
        i = int(np.argmin(p[:, 0]))
        return float(p[i, 0]), float(p[i, 1])

    @cached_property
    def extent(self) -> float:
        """The outline's largest extent (a caliper's reading), mm; a little over the chord on a
        cambered section."""
        from ..geometry.chordline import section_diameter

        p = np.column_stack([self.outline[:, 0], np.zeros(len(self.outline)), self.outline[:, 1]])
        return section_diameter(p)[0]

    @cached_property
    def te_mm(self) -> float:
        return self.section.te_thickness() * self.chord

    @cached_property
    def thickness(self) -> tuple[float, float]:
        """(largest thickness mm, its position % chord), square to the chord line."""
        t, x = self.section.max_thickness()
        return t * self.chord, 100.0 * x

    @property
    def ref_x(self) -> float:
        return self.reference * self.chord

    def datum_direction(self) -> tuple[float, float]:
        """Unit vector of the datum x axis (aft) in the chord frame."""
        a = math.radians(self.pitch)
        return math.cos(a), math.sin(a)

    def label_lines(self, side: str, deg: str = "°") -> list[str]:
        t, xt = self.thickness
        where = "station" if self.is_station else "extra position"
        both = ", both sides" if self.mirrored else ""
        outline = f" (outline {self.extent:.2f} end to end)" if self.extent - self.chord > 0.005 else ""
        return [
            f"{self.surface}  y = {self.y:.1f} mm ({where}{both})",
            f"chord {self.chord:.2f} mm{outline}   twist {self.twist:+.2f}{deg}   "
            f"chord line {self.pitch:+.2f}{deg} to datum x (LE up +)",
            f"max thickness {t:.2f} mm ({t / self.chord:.1%}) at {xt:.1f} % chord   TE {self.te_mm:.2f} mm",
            f"{self.section.label}   reference point at {self.reference:.1%} chord   {side} up",
        ]


def template_positions(model) -> list[tuple[float, bool]]:
    """(y, is_station) for every station and every ``templates_at`` position, root first."""
    ys = {round(float(v), 9): True for v in model.planform.y}
    for v in shop_of(model).templates_at:
        key = round(float(v), 9)
        if not any(abs(key - k) <= SAME_Y_MM for k in ys):
            ys[key] = False
    return sorted(ys.items())


def cuts_of(model) -> list[Cut]:
    """The sections drawn for ``model``: stations and extra positions, root first."""
    shop = shop_of(model)
    out = []
    for y, is_station in template_positions(model):
        out.append(Cut(model.name, y, float(model.chord(y)), float(model.planform("twist", y)),
                       float(model.spec.incidence), float(model.spec.reference), model.section(y),
                       is_station, bool(model.mirror), shop.template_tol_mm))
    return out


def save_dxf(doc, path) -> None:
    """Save an ezdxf document with fixed time stamps and ids (ezdxf's fixed-metadata option), so
    the same spec gives the same bytes, as the STEP and the PDF do; OSError goes to the caller."""
    import ezdxf
    from ezdxf.document import CREATED_BY_EZDXF, ezdxf_marker_string

    before = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    # ezdxf adds a CLASS record per entity type in use in the order of a set, which follows
    # PYTHONHASHSEED (two orders of the CLASSES section seen): give it the types sorted
    db = doc.entitydb
    in_use = db.dxf_types_in_use
    db.dxf_types_in_use = lambda: sorted(in_use())
    try:
        doc.ezdxf_metadata()[CREATED_BY_EZDXF] = ezdxf_marker_string()  # stamped when the document was made
        doc.saveas(path)
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = before
        del db.dxf_types_in_use
