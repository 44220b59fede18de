"""Offset tables: heights of the finished section above and below its chord line at fixed
chord positions, per template position, as CSV (mm).

A height is where a line square to the chord line at ``x`` cuts the outline: on each side
the cut farthest from the chord line (on a cambered nose the upper surface can pass the
line x = 0 twice, at the leading-edge point and again just above it). Away from the nose
this is exactly :meth:`Section.surfaces_at` on a dense sampling. Past the end of a side
(the trailing-edge corner can sit a hair ahead of 100 % chord) the corner's height is
given. Values are the finished section (trailing edge included) scaled by the local chord.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass

import numpy as np

from .. import CAUTION, __version__
from ..errors import ExportError
from ..sections.base import Section, cosine_s
from .common import Cut

#: Samples per side for the heights (cosine spaced: ~1e-8 chord linear-interpolation error).
DENSE = 20001
COLUMNS = ("y_mm", "chord_mm", "twist_deg", "x_pct", "x_mm", "upper_mm", "lower_mm", "thickness_mm")


def _side_heights(xs: np.ndarray, ys: np.ndarray, x: np.ndarray, outer) -> np.ndarray:
    out = np.empty(len(x))
    for k, xv in enumerate(x):
        a, b = xs[:-1] - xv, xs[1:] - xv
        idx = np.nonzero((a * b <= 0) & (xs[:-1] != xs[1:]))[0]
        if len(idx) == 0:  # outside the side's range: the nearer end point
            out[k] = ys[-1] if abs(xs[-1] - xv) < abs(xs[0] - xv) else ys[0]
            continue
        t = (xv - xs[idx]) / (xs[idx + 1] - xs[idx])
        out[k] = outer(ys[idx] + t * (ys[idx + 1] - ys[idx]))
    return out


def heights(section: Section, xc) -> tuple[np.ndarray, np.ndarray]:
    """(upper, lower) heights above the chord line at chord fractions ``xc`` (chord units)."""
    s = cosine_s(DENSE)
    xc = np.asarray(xc, float)
    xu, yu = section.upper(s)
    xl, yl = section.lower(s)
    return _side_heights(xu, yu, xc, np.max), _side_heights(xl, yl, xc, np.min)


@dataclass
class OffsetRows:
    cut: Cut
    x_pct: np.ndarray
    upper_mm: np.ndarray
    lower_mm: np.ndarray

    @property
    def x_mm(self) -> np.ndarray:
        return self.x_pct / 100.0 * self.cut.chord


def offset_rows(cut: Cut, pct) -> OffsetRows:
    """The offset table of one section at chord positions ``pct`` (% chord), starting at the
    outline's foremost point when a cambered nose passes ahead of the leading edge (x < 0:
    one row there, upper = lower = that point's height)."""
    pct = np.asarray(pct, float)
    up, lo = heights(cut.section, pct / 100.0)
    up, lo = up * cut.chord, lo * cut.chord
    xf, zf = cut.front
    if xf < -1e-4 and (not len(pct) or 100.0 * xf / cut.chord < pct.min()):
        pct = np.concatenate([[100.0 * xf / cut.chord], pct])
        up, lo = np.concatenate([[zf], up]), np.concatenate([[zf], lo])
    return OffsetRows(cut, pct, up, lo)


def write_offsets_csv(tables: list[OffsetRows], path, *, spec_name: str, model_name: str, side: str) -> None:
    """One CSV per surface: '#' comment header (what, frame, caution, a line per section), then
    one row per section and chord position (columns :data:`COLUMNS`)."""
    head = [
        f"geomgen {__version__} offset table: set '{spec_name}', surface '{model_name}'",
        f"CAUTION: {CAUTION}",
        "units mm and deg; x along the chord line from the leading edge (the section's own: NACA the "
        "mean line's start; chord = leading edge to trailing-edge midpoint, as typed); a first row at "
        "x < 0 is the outline's foremost point, where a cambered nose passes ahead of the leading edge; "
        "upper_mm/lower_mm = height "
        f"of the outline above (+) / below (-) the chord line, {side} positive",
        "each section in its own chord frame (twist and incidence not applied; the chord line makes "
        "twist + incidence with the datum x axis, leading edge up positive)",
        "a height is where a line square to the chord line at x cuts the outline (on each side the cut "
        "farthest from the chord line); finished trailing edge included; at 100 % the trailing-edge corners",
        "sections: y_mm, chord_mm, twist_deg, chord_to_datum_deg, max_thickness_mm, at_pct, te_mm, "
        "outline_extent_mm, section",
    ]
    for t in tables:
        c = t.cut
        th, at = c.thickness
        head.append(f"  {c.y:.3f}, {c.chord:.3f}, {c.twist:+.3f}, {c.pitch:+.3f}, {th:.3f}, {at:.2f}, "
                    f"{c.te_mm:.3f}, {c.extent:.3f}, {c.section.label}")
    try:
        with open(path, "w", newline="", encoding="utf-8") as f:
            for line in head:
                f.write(f"# {line}\n")
            w = csv.writer(f, lineterminator="\n")
            w.writerow(COLUMNS)
            for t in tables:
                c = t.cut
                for xp, xm, u, lo in zip(t.x_pct, t.x_mm, t.upper_mm, t.lower_mm):
                    w.writerow([f"{c.y:.3f}", f"{c.chord:.3f}", f"{c.twist:.3f}", f"{xp:g}", f"{xm:.4f}",
                                f"{u:.4f}", f"{lo:.4f}", f"{u - lo:.4f}"])
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None
