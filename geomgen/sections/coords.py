"""Airfoil coordinate files: read, normalise to unit chord, fit smooth surfaces.

Two plain-text layouts are read; which one a file uses is detected:

* loop: a name line, then x y pairs from the trailing edge over one surface to the
  leading edge and back along the other surface to the trailing edge;
* split: a name line, optionally a line with the two point counts (``35. 35.``), then
  the upper surface from leading to trailing edge, a blank line, and the lower surface
  from leading to trailing edge.

Numbers are separated by whitespace or commas; blank lines and lines starting with ``#``
are skipped. Coordinates may be in any length unit, at any position and angle; the
section returned is in chord fractions, its leading edge the file point farthest from
the trailing-edge midpoint. A cambered file sampled so densely at the nose that a point
lies farther out than its own (0, 0) gets its chord line through that point (about
0.1-0.2 deg for a 2412 at 100-200 points a side); ``source_info["rotation_deg"]`` shows it.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
from scipy.interpolate import BSpline, make_smoothing_spline

from .. import defaults
from ..errors import SpecError
from .base import Section
from .readfile import NotReadable, printable, read_capped

MAX_BYTES = 10_000_000  #: larger files are refused (public files are a few kB)
MAX_LINES = 100_000  #: more lines are refused
MIN_POINTS = 10  #: fewer points cannot describe two surfaces
MIN_SIDE_POINTS = 5  #: points per surface, leading edge included (the spline needs 5)
_SEP = re.compile(r"[,\s]+")


class _Where:
    """Names the file (and the spec field, if any) in every message."""

    def __init__(self, source: str, field: str | None):
        self.source, self.field = source, field

    def err(self, msg: str, line: int | None = None) -> SpecError:
        where = f"{self.source} line {line}" if line else self.source
        return SpecError(f"{self.field}: {where}: {msg}" if self.field else f"{where}: {msg}")


def _short(s: str, n: int = 60) -> str:
    return repr(s if len(s) <= n else s[:n] + "...")


def _tokens(ctx: _Where, text: str):
    """Name line and blocks of (x, y, line number) separated by blank lines."""
    if text.count("\n") >= MAX_LINES:
        raise ctx.err(f"more than {MAX_LINES} lines; refused as too long for a coordinate file")
    name: str | None = None
    started = False
    blocks: list[list[tuple[float, float, int]]] = []
    cur: list[tuple[float, float, int]] = []
    for ln, raw in enumerate(text.splitlines(), 1):
        s = raw.strip()
        if not s:
            if cur:
                blocks.append(cur)
                cur = []
            continue
        if s.startswith("#"):
            continue
        try:
            vals = [float(t) for t in _SEP.split(s) if t]
        except ValueError:
            vals = None
        first, started = not started, True
        if vals is None or len(vals) != 2:
            if first:  # the name line (a label in drawings: control characters removed)
                name = printable(s, 80).strip() or None
                continue
            raise ctx.err(f"expected two numbers, got {_short(s)}", ln)
        if not np.all(np.isfinite(vals)):
            raise ctx.err(f"value is not finite (NaN or infinity): {_short(s)}", ln)
        cur.append((vals[0], vals[1], ln))
    if cur:
        blocks.append(cur)
    if not started:
        raise ctx.err("empty file: no name line and no coordinates")
    if not blocks:
        raise ctx.err("no coordinate points after the name line")
    return name, blocks


def _as_loop(ctx: _Where, blocks):
    """Rows (n, 3) of x, y, line number in loop order, and the layout found."""
    pts = [p for b in blocks for p in b]
    a, b, ln = pts[0]
    # a counts line: two whole numbers far outside a unit chord, alone or matching the rest
    if a == int(a) and b == int(b) and a >= 0 and b >= 0 and a + b >= 4:
        rest = pts[1:]
        if a + b == len(rest) or len(blocks[0]) == 1:
            if a + b != len(rest):
                raise ctx.err(f"the counts line gives {a:g} + {b:g} points but {len(rest)} follow",
                              ln)
            if a == 0 or b == 0:
                raise ctx.err("only one surface: the counts line gives no points for the other", ln)
            up, lo = rest[: int(a)], rest[int(a):]
            return np.array(up[::-1] + lo), "split"
    if len(blocks) == 2:
        p0, p1, q0 = (np.array(v[:2]) for v in (blocks[0][0], blocks[0][-1], blocks[1][0]))
        # both runs start at the leading edge: the second starts where the first started
        if np.hypot(*(q0 - p0)) < np.hypot(*(q0 - p1)):
            return np.array(blocks[0][::-1] + blocks[1]), "split"
    return np.array(pts), "loop"


def _normalise(ctx: _Where, arr: np.ndarray):
    """Unit-chord loop (n, 2), upper surface first, its line numbers, and source facts."""
    keep = np.ones(len(arr), bool)
    keep[1:] = np.any(np.diff(arr[:, :2], axis=0) != 0.0, axis=1)  # exact repeats dropped
    arr = arr[keep]
    p, lines = arr[:, :2], arr[:, 2].astype(int)
    if len(p) < MIN_POINTS:
        raise ctx.err(f"only {len(p)} distinct points; a section needs at least {MIN_POINTS}")
    te = 0.5 * (p[0] + p[-1])
    # Leading edge = the point farthest from the trailing-edge midpoint, not min x: it does
    # not depend on how the file is rotated, and it puts every point within one chord of
    # the trailing edge, so no point lies ahead of the leading edge (x >= 0 everywhere
    # after normalising), which the y(sqrt x) fit needs.
    d = np.hypot(*(p - te).T)
    i = int(np.argmax(d))
    chord = float(d[i])
    if i == 0 or i == len(p) - 1:
        raise ctx.err("only one surface: the points do not turn round at a leading edge "
                      "(expected trailing edge -> leading edge -> trailing edge)")
    ang = np.arctan2(te[1] - p[i, 1], te[0] - p[i, 0])
    c, s = np.cos(ang), np.sin(ang)
    dx, dy = (p - p[i]).T
    q = np.column_stack([(dx * c + dy * s) / chord, (-dx * s + dy * c) / chord])
    q[i] = 0.0
    area = 0.5 * np.sum(q[:, 0] * np.roll(q[:, 1], -1) - np.roll(q[:, 0], -1) * q[:, 1])
    info = {"chord": chord, "rotation_deg": float(-np.degrees(ang)),
            "leading_edge": (float(p[i, 0]), float(p[i, 1])), "reversed": bool(area < 0)}
    if area < 0:  # the loop runs over the lower surface first
        q, lines, i = q[::-1], lines[::-1], len(q) - 1 - i
    return q, lines, i, info


def _surface(ctx: _Where, q, lines, side: str, noise: float):
    """x (m,), y (m,) of one surface from the leading edge, x strictly increasing."""
    x, y = q[:, 0], q[:, 1]
    if len(x) < MIN_SIDE_POINTS:
        raise ctx.err(f"only {len(x)} points on the {side} surface; "
                      f"at least {MIN_SIDE_POINTS} needed")
    back = np.nonzero(np.diff(x) < -8 * noise)[0]  # ~6 sigma of a difference of noisy x
    if back.size:
        j = back[0] + 1
        raise ctx.err(f"the points are not a single loop: x turns back on the {side} surface "
                      f"(x/c {x[j]:.5f} after {x[j - 1]:.5f})", int(lines[j]))
    order = np.argsort(x, kind="stable")  # backsteps within noise: sort, merge equal x
    xs, inv = np.unique(x[order], return_inverse=True)
    ys = np.bincount(inv, y[order]) / np.bincount(inv)
    if len(xs) < MIN_SIDE_POINTS:
        raise ctx.err(f"only {len(xs)} distinct x positions on the {side} surface")
    return xs, ys


def _fit(x: np.ndarray, y: np.ndarray, noise: float):
    """Smooth y(t), t = sqrt(x), through (0, 0); and its largest distance to the points.

    A least-squares polynomial in t (powers 1..6, so through (0, 0)) carries the shape,
    and a cubic smoothing spline of what it leaves takes up the rest; the spline's own
    end conditions (zero curvature) then bias nothing. Each point is weighted by its
    noise measured normal to the surface (an error in x moves a point along the steep
    nose as much as an error in y), and the smoothing is the largest that keeps the
    weighted residuals at the assumed noise (chi-square = n).

    Returns ``f(t) -> y`` (chord fractions), the largest normal distance, chord, and the
    polynomial part alone (``p(t) -> y``, a fair curve to measure waviness against).
    """
    t = np.sqrt(x)
    w = 1.0 / (1.0 + np.minimum(np.gradient(y, x) ** 2, 1e8))
    w[0] = 1e8  # pins the leading edge (0, 0)
    w[-1] = 1e8  # and the trailing-edge end point (a cusp: both sides meet there)
    basis = t[:, None] ** np.arange(1, 7)
    coef = np.linalg.lstsq(basis * np.sqrt(w)[:, None], y * np.sqrt(w), rcond=None)[0]
    poly = np.polynomial.Polynomial(np.r_[0.0, coef])
    r = (y - poly(t)) / noise  # in units of the noise: weights near 1
    target = len(x) - 1.0

    def chi2(loglam):
        f = make_smoothing_spline(t, r, w=w, lam=10.0**loglam)
        return float(np.sum(w[1:] * (r[1:] - f(t[1:])) ** 2)), f

    lo, hi = -14.0, 6.0
    if chi2(lo)[0] > target:
        hi = lo
    elif chi2(hi)[0] < target:
        lo = hi
    while hi - lo > 1e-3:
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if chi2(mid)[0] < target else (lo, mid)
    f = chi2(lo)[1]
    spl = BSpline(f.t, f.c * noise, f.k)
    dspl, dpoly = spl.derivative(), poly.deriv()

    def curve(tt):
        return poly(tt) + spl(tt)

    dydx = (dpoly(t[1:]) + dspl(t[1:])) / (2.0 * t[1:])
    dev = np.abs(curve(t[1:]) - y[1:]) / np.sqrt(1.0 + dydx**2)
    return curve, float(dev.max()), poly


#: Changes of curvature sign a fitted surface may have between 3 % and 97 % of the chord. A
#: section has at most a few (reflexed camber, an S-shaped pressure side: 2 on the NACA
#: 25112 lower side; files with 4-6 decimals or 5e-5 chord of noise gave at most 5);
#: a point spiked by 0.3 chord gave 19 and a ±0.2 % chord point-to-point zigzag 58, which
#: the loft cannot follow between its samples (the check then read the thickness 2.2 mm low).
MAX_CURVATURE_CHANGES = 10


def _curvature_changes(f) -> int:
    """Sign changes of the second difference of y(x) on a fine grid, 3-97 % chord."""
    x = np.linspace(0.03, 0.97, 3000)
    d2 = np.diff(f(np.sqrt(x)), 2)
    sg = np.sign(d2[np.abs(d2) > 1e-13])
    return int(np.sum(np.diff(sg) != 0))


def _fair_or_refuse(ctx: "_Where", f, poly, xs, ys, q, lines, side: str) -> None:
    """Refuse a surface whose fit waves (a narrow feature, a zigzag), naming the file point
    farthest from a fair curve through the others."""
    n = _curvature_changes(f)
    if n <= MAX_CURVATURE_CHANGES:
        return
    r = np.abs(ys - poly(np.sqrt(xs)))
    k = int(np.argmax(r))
    j = int(np.argmin(np.hypot(q[:, 0] - xs[k], q[:, 1] - ys[k])))
    raise ctx.err(f"the {side} surface is not fair: the smooth fit through its points changes curvature "
                  f"{n} times (a section has a few at most), a narrow feature or a zigzag the loft cannot "
                  f"follow; the point farthest from a fair curve is at x/c {xs[k]:.4f}, "
                  f"{r[k]:.2g} chord off it; smooth the file there", int(lines[j]))


def _curve(f):
    def curve(s):
        s = np.asarray(s, float)
        return s, f(np.sqrt(np.clip(s, 0.0, None)))

    return curve


def _build(ctx: _Where, text: str, noise: float) -> Section:
    _check_size(ctx, len(text))
    if "\x00" in text:
        raise ctx.err("binary file (contains NUL bytes); expected plain-text x y coordinates")
    name, blocks = _tokens(ctx, text)
    arr, layout = _as_loop(ctx, blocks)
    q, lines, i, info = _normalise(ctx, arr)
    xu, yu = _surface(ctx, q[i::-1], lines[i::-1], "upper", noise)
    xl, yl = _surface(ctx, q[i:], lines[i:], "lower", noise)
    su, du, pu = _fit(xu, yu, noise)
    sl, dl, pl = _fit(xl, yl, noise)
    _fair_or_refuse(ctx, su, pu, xu, yu, q, lines, "upper")
    _fair_or_refuse(ctx, sl, pl, xl, yl, q, lines, "lower")
    xs = np.linspace(0.0, 1.0, 2001)
    gap = su(np.sqrt(xs)) - sl(np.sqrt(xs))
    bad = gap < -3 * noise
    if bad.any():
        a, b = xs[bad][0], xs[bad][-1]
        raise ctx.err(f"self-crossing outline: the upper surface passes below the lower between "
                      f"x/c {a:.3f} and {b:.3f} (by up to {-gap.min():.2g} chord)")
    info.update(name=name, layout=layout, points=len(q), noise=noise)
    label = f"file {Path(ctx.source).name}" + (f" ({name})" if name else "")
    sec = Section(_curve(su), _curve(sl), label, fit_deviation=max(du, dl))
    sec.source_info = info
    return sec


def parse_coordinates(text: str | bytes, *, source: str = "<text>", field: str | None = None,
                      noise: float = defaults.COORD_NOISE) -> Section:
    """Section from the text of a coordinate file (loop or split layout, detected).

    Parameters
    ----------
    text : str or bytes
        File contents; bytes must be UTF-8.
    source : str
        File name used in messages and the label.
    field : str, optional
        Spec field that named the file (``"sections.root.file"``), prefixed to messages.
    noise : float
        Assumed noise of each coordinate, chord fractions; sets the smoothing.

    Returns
    -------
    Section
        Unit chord, leading edge at (0, 0), chord along +x; ``upper(s)`` and ``lower(s)``
        return ``(s, y(s))`` for s (n,) in [0, 1]. ``fit_deviation`` is the largest normal
        distance (chord fractions) from the fit to the file's points; ``source_info``
        holds ``name``, ``layout``, ``points``, ``chord`` (file units), ``rotation_deg``
        (counter-clockwise rotation applied to bring the chord onto +x), ``leading_edge``
        (file units), ``reversed`` (lower surface came first) and ``noise``.

    Raises
    ------
    SpecError
        Naming the file, the line where one applies, and what is wrong.
    """
    ctx = _Where(source, field)
    if isinstance(text, (bytes, bytearray)):
        text = _decode(ctx, bytes(text))
    return _build(ctx, text, noise)


def _check_size(ctx: _Where, size: int) -> None:
    if size > MAX_BYTES:
        raise ctx.err(f"{size / 1e6:.1f} MB; coordinate files over {MAX_BYTES / 1e6:.0f} MB are refused")


def _decode(ctx: _Where, data: bytes) -> str:
    _check_size(ctx, len(data))
    if b"\x00" in data:
        raise ctx.err("binary file (contains NUL bytes); expected plain-text x y coordinates")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise ctx.err(f"not UTF-8 text (byte 0x{data[exc.start]:02x} at offset {exc.start}); "
                      "expected plain-text x y coordinates") from None


def read_coordinates(path, *, field: str | None = None,
                     noise: float = defaults.COORD_NOISE) -> Section:
    """Section from a coordinate file; see :func:`parse_coordinates`.

    Parameters
    ----------
    path : str or Path
        The file; its name appears in every message.
    field : str, optional
        Spec field that named the file (``"sections.root.file"``), prefixed to messages.
    """
    p = Path(path)
    ctx = _Where(str(path), field)
    try:
        data = read_capped(p, MAX_BYTES)  # regular files only; the bytes read are capped
    except FileNotFoundError:
        raise ctx.err("file not found") from None
    except NotReadable as exc:
        raise ctx.err(str(exc)) from None
    return _build(ctx, _decode(ctx, data), noise)
