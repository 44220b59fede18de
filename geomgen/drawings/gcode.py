"""Four-axis hot-wire G-code of a foam panel (numpy only).

The cutter has two towers a ``machine_width_mm`` apart: the X/Y tower at machine Y = 0 (its
carriage: horizontal X, vertical Y) and the U/V tower at the far end (horizontal U, vertical
V). The block lies between them, its first face ``block_from_left_mm`` from the X/Y tower.
Row i of the two end paths of a panel (same chord parameter, kerf already offset) is one
straight wire position; the wire line through the block-face points is extended to the
tower planes, so the towers run different (projected) paths and the wire passes through
both faces' points at once. Lead-in and lead-out run straight from a point ``lead_mm``
behind the upper trailing edge. Horizontal machine axes point aft along the section, the
vertical ones toward the section's upper side; the origin sits ``MARGIN_MM`` before and
below the foremost and lowest tower position.
"""

from __future__ import annotations

import re

import numpy as np

from .. import CAUTION, __version__
from ..errors import ExportError, GeometryError
from .common import fmt_y

MARGIN_MM = 5.0


def tower_paths(a: np.ndarray, b: np.ndarray, length: float, width: float, first_face: float):
    """(xy, uv): the wire's points in the two tower planes for face paths ``a`` (at the first
    face) and ``b`` (``length`` further), both (n, 2) in the same frame."""
    d = (b - a) / length
    return a - first_face * d, a + (width - first_face) * d


def panel_gcode(p, shop, *, spec_name: str, side: str) -> tuple[str, dict]:
    """G-code text of one panel and its machine figures."""
    length = p.y_b - p.y_a
    width = shop.machine_width_mm
    first = shop.block_from_left_mm if shop.block_from_left_mm is not None else 0.5 * (width - length)
    if first + length > width:
        raise GeometryError(f'surface "{p.surface}" hot-wire panel y = {p.y_a:g} .. {p.y_b:g} mm: the block '
                            f"({length:.1f} mm long, {first:g} mm from the X/Y tower) does not fit between towers "
                            f"{width:g} mm apart; nothing was written")
    lead = np.array([shop.lead_mm, 0.0])
    a = np.vstack([p.a[:1] + lead, p.a, p.a[:1], p.a[:1] + lead])  # lead-in, loop, back to the start, lead-out
    b = np.vstack([p.b[:1] + lead, p.b, p.b[:1], p.b[:1] + lead])
    xy, uv = tower_paths(a, b, length, width, first)
    both = np.vstack([xy, uv])
    shift = -both.min(axis=0) + MARGIN_MM
    xy, uv = xy + shift, uv + shift
    info = {"first_face_mm": first, "second_face_mm": first + length, "shift_mm": shift.tolist(),
            "tower_travel_mm": np.ptp(both, axis=0).tolist(), "flagged": p.mid_deviation > shop.cut_tol_mm}
    lines = [f"( geomgen {__version__} four-axis hot-wire cut: set {spec_name}, surface {p.surface}, "
             f"panel y = {fmt_y(p.y_a)} .. {fmt_y(p.y_b)} mm )",
             f"( CAUTION: {CAUTION.split('.')[0]}. A hot wire and foam fumes can hurt: ventilate, never leave it )",
             f"( towers {width:g} mm apart; block faces {first:g} and {first + length:g} mm from the X/Y tower )",
             f"( X/Y: tower at the panel end y = {fmt_y(p.y_a)}; U/V: at y = {fmt_y(p.y_b)}; "
             f"horizontal aft, vertical toward the {side} )",
             f"( kerf {p.kerf:g} mm compensated in the path; feed {shop.feed_mm_min:g} mm/min )",
             f"( the wire at a block face, machine units = surface-frame point + [{shift[0]:.3f}, {shift[1]:.3f}] )",
             f"( straight cut vs the surface halfway: {p.mid_deviation:.3f} mm, tolerance {shop.cut_tol_mm:g} mm )"]
    if info["flagged"]:
        lines.append(f"( WARNING: this panel's straight cut strays {p.mid_deviation:.2f} mm from the surface, "
                     f"more than {shop.cut_tol_mm:g} mm: add a cut position at y = {0.5 * (p.y_a + p.y_b):g} "
                     "in hotwire_cuts )")
    lines = [ln if ln.count("(") == 1 else "( " + ln[2:-2].replace("(", "[").replace(")", "]") + " )" for ln in lines]
    lines += ["G21 (mm)", "G90 (absolute)", f"G0 X{xy[0, 0]:.3f} Y{xy[0, 1]:.3f} U{uv[0, 0]:.3f} V{uv[0, 1]:.3f}",
              f"G1 F{shop.feed_mm_min:g}"]
    lines += [f"G1 X{x[0]:.3f} Y{x[1]:.3f} U{u[0]:.3f} V{u[1]:.3f}" for x, u in zip(xy[1:], uv[1:])]
    lines += ["M2"]
    return "\n".join(lines) + "\n", info


def write_panel_gcode(p, path, *, shop, spec_name: str, side: str) -> None:
    text, _ = panel_gcode(p, shop, spec_name=spec_name, side=side)
    try:
        with open(path, "w", encoding="ascii", errors="replace", newline="\n") as f:
            f.write(text)
    except OSError as exc:
        raise ExportError(f"{path}: cannot write: {exc.strerror or exc}") from None


def read_moves(text: str) -> np.ndarray:
    """(n, 4) X Y U V of every G0/G1 move with coordinates (a reader for tests)."""
    out = []
    for line in text.splitlines():
        if line.startswith(("G0 ", "G1 ")) and "X" in line:
            w = dict(re.findall(r"([XYUV])(-?[\d.]+)", line))
            out.append([float(w[k]) for k in "XYUV"])
    return np.array(out)
