"""Intended vs measured vs expected: structured records; formatting lives elsewhere."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

from .. import defaults

#: figure key -> (label, unit)
FIGURES = {
    "span_mm": ("span", "mm"),
    "projected_area_cm2": ("planform area (reference plane)", "cm²"),
    "aspect_ratio": ("aspect ratio", ""),
    "mac_mm": ("MAC", "mm"),
    "mac_y_mm": ("MAC span position", "mm"),
    "mac_le_x_mm": ("MAC leading edge x", "mm"),
    "mac_qc_x_mm": ("MAC quarter chord x", "mm"),
    "datum_area_cm2": ("area projected on the datum plane", "cm²"),
    "datum_mac_mm": ("MAC of the datum projection", "mm"),
    "root_chord_mm": ("root chord", "mm"),
    "tip_chord_mm": ("tip chord", "mm"),
    "taper_ratio": ("taper ratio", ""),
    "sweep_qc_deg": ("quarter-chord sweep", "deg"),
    "volume_cm3": ("volume", "cm³"),
    "wetted_area_cm2": ("wetted area", "cm²"),
    "centroid_x_mm": ("centroid x", "mm"),
    "centroid_y_mm": ("centroid y", "mm"),
    "centroid_z_mm": ("centroid z", "mm"),
}


@dataclass
class Record:
    """One figure of one part, with every value we know of it."""

    part: str
    figure: str
    label: str
    unit: str
    intended: float | None
    step: float | None = None
    stl: float | None = None
    tol_step: float | None = None
    tol_stl: float | None = None
    expected: float | None = None
    expected_tol: float | None = None
    fault: list = field(default_factory=list)  # which measurements depart from the intended value
    verdict: str = "-"  # "pass" / "FAIL" against the expectation, "-" without one

    @property
    def measured(self) -> float | None:
        return self.step if self.step is not None else self.stl

    def as_dict(self) -> dict:
        return asdict(self)


def outside(value: float, intended: float, tol: float) -> bool:
    """True when ``value`` is not within ``tol`` of ``intended``, a figure that is not a number
    included (a NaN compared with ``>`` would pass silently)."""
    return not abs(value - intended) <= tol


def build_tolerances(fig: str, intended: dict, stl_tol: float, span: float,
                     mirror: bool = False) -> tuple[float, float]:
    """(STEP, STL) tolerance of a figure: how far the measurement may sit from the intended.
    ``mirror``: the part is mirrored (its root is the middle of the span)."""
    L, R, V = defaults.CHECK_LENGTH_MM, defaults.CHECK_RELATIVE, defaults.CHECK_VOLUME_REL
    v = abs(intended.get(fig) or 0.0)
    stl_len = 2 * stl_tol + L
    area_mm2 = intended["projected_area_cm2"] * 100
    if fig == "mac_y_mm":
        # ȳ = ∫c t dt / ∫c dt from the root (t in [0, l]); a mesh whose every point is within
        # stl_tol of the surface has each projected chord within e = 2 stl_tol, which moves ȳ by
        # at most ∫|e||t − ȳ|dt / (A − e l) = stl_tol (ȳ² + (l − ȳ)²) / (A − 2 stl_tol l): on a
        # long part of small chords that exceeds the fixed allowance (0.19 mm on a 585 mm
        # stabilizer of 8-40 mm chords, found by the long CLI run)
        k = 2.0 if mirror else 1.0
        length, area = span / k, area_mm2 / k
        yb = min(max(v, 0.0), length)
        den = area - 2 * stl_tol * length
        chord_bound = stl_tol * (yb ** 2 + (length - yb) ** 2) / den if den > 0 else float("inf")
        return L, max(stl_len, L + chord_bound)
    if fig in ("projected_area_cm2", "datum_area_cm2"):
        return R * v, (R * v * 100 + 2 * stl_tol * span) / 100
    if fig == "aspect_ratio":
        return R * v, v * (R + 2 * stl_tol * span / area_mm2)
    if fig == "taper_ratio":
        tip = intended["tip_chord_mm"]
        return R * v + L / tip, v * (2 * stl_len / tip)
    if fig == "sweep_qc_deg":
        half = span / 2
        return defaults.CHECK_ANGLE_DEG, defaults.CHECK_ANGLE_DEG + math.degrees(2 * stl_tol / half)
    if fig == "volume_cm3":
        # every mesh point within stl_tol of the surface: volume within stl_tol x area
        return V * v, V * v + stl_tol * intended["wetted_area_cm2"] * 100 / 1000
    if fig == "wetted_area_cm2":
        # a polygon inscribed in a section with sagitta <= stl_tol falls short of its length by
        # about stl_tol/3 per radian turned (s θ²/24 with sagitta s θ²/8), 2π/3 stl_tol round a
        # convex section whatever its nose radius; three times that per mm of span covers
        # reflex camber and spanwise curvature (a fixed 0.2 % faulted a 40 mm chord part).
        # The two flat end caps: a boundary within stl_tol of the section's moves the cap's
        # area by at most stl_tol x its perimeter (under 2.5 chords for any section the schema
        # allows; two caps at most the larger end chord's each); on a 0.5 mm span of 40 and
        # 8 mm chords the caps are most of the area
        end_chord = max(abs(intended.get("root_chord_mm") or 0.0), abs(intended.get("tip_chord_mm") or 0.0))
        caps = stl_tol * 2.5 * 2 * end_chord
        return V * v, V * v + (2 * math.pi * stl_tol * span + caps) / 100
    if fig.startswith("centroid"):
        return L, 2 * stl_tol + 0.1
    return L, stl_len


def compare_part(part: str, intended: dict, step: dict | None, stl: dict | None, stl_tol: float,
                 expect: dict | None, mirror: bool = False) -> list[Record]:
    """Records for one part: every figure, intended vs STEP vs STL, and the expectation."""
    def split(d):
        if d is None:
            return None
        d = dict(d)
        c = d.pop("centroid_mm", None)
        if c is not None:
            d.update(centroid_x_mm=c[0], centroid_y_mm=c[1], centroid_z_mm=c[2])
        lever = d.pop("centroid_lever", None)
        if lever is not None:
            d.update(centroid_x_lever=lever[0], centroid_y_lever=lever[1], centroid_z_lever=lever[2])
        return d

    it, st, sl = split(intended), split(step), split(stl)
    out = []
    for fig, (label, unit) in FIGURES.items():
        rec = Record(part, fig, label, unit, it.get(fig))
        rec.tol_step, rec.tol_stl = build_tolerances(fig, it, stl_tol, it["span_mm"], mirror)
        if fig.startswith("centroid") and sl and sl.get(fig.replace("_mm", "_lever")) is not None:
            # the chordal bound of this mesh (see check.measure.measure_stl), never tighter than before
            rec.tol_stl = max(rec.tol_stl, defaults.CHECK_LENGTH_MM + stl_tol * sl[fig.replace("_mm", "_lever")])
        rec.step = st.get(fig) if st else None
        rec.stl = sl.get(fig) if sl else None
        for kind, val, tol in (("STEP", rec.step, rec.tol_step), ("STL", rec.stl, rec.tol_stl)):
            if val is not None and rec.intended is not None and outside(val, rec.intended, tol):
                rec.fault.append(kind)
        e = (expect or {}).get(fig)
        if e is not None:
            rec.expected = e.value
            rec.expected_tol = e.tolerance_for(e.value)
            m = rec.measured
            rec.verdict = "pass" if m is not None and abs(m - e.value) <= rec.expected_tol else "FAIL"
        out.append(rec)
    return out


def polyline_distance(points, line):
    """Distance (n,) from each point to an open polyline (m, 3): nearest vertex by k-d tree,
    then exact point-to-segment distance over the segments on either side of it."""
    import numpy as np
    from scipy.spatial import cKDTree

    _, i = cKDTree(line).query(points)
    best = np.full(len(points), np.inf)
    for a_idx in (i - 1, i):
        a_idx = np.clip(a_idx, 0, len(line) - 2)
        a, b = line[a_idx], line[a_idx + 1]
        ab = b - a
        t = np.clip(np.einsum("ij,ij->i", points - a, ab) / np.maximum(np.einsum("ij,ij->i", ab, ab), 1e-300), 0, 1)
        best = np.minimum(best, np.linalg.norm(points - (a + t[:, None] * ab), axis=1))
    return best


def station_records(part: str, model, measured_stations: list, check_at: list) -> list[Record]:
    """Chord and thickness at the stations and at the spec's ``check_at`` positions."""
    from ..geometry.figures import section_figures

    out = []
    wanted = {float(s.y): s for s in check_at}
    for ms in measured_stations:
        y = ms["y_mm"]
        it = section_figures(model, y)  # the same definitions as the measurement
        c = it["chord_mm"]
        ca = wanted.get(y)
        for fig, label, unit, intended, meas, tol, exp in (
                ("chord", f"chord at {y:g} mm", "mm", c, ms["chord_mm"], defaults.CHECK_LENGTH_MM,
                 ca.chord if ca else None),
                ("extent", "  outline's largest extent", "mm", it["extent_mm"], ms["extent_mm"],
                 defaults.CHECK_LENGTH_MM, None),
                ("thickness", f"max thickness at {y:g} mm", "mm", it["thickness_mm"], ms["thickness_mm"],
                 defaults.CHECK_THICKNESS_MM, ca.thickness if ca else None),
                ("thickness_pct", f"  as % chord (at {ms['at_pct']:.1f} % chord)", "%", it["thickness_pct"],
                 ms["thickness_pct"], 100 * defaults.CHECK_THICKNESS_MM / c, None)):
            rec = Record(part, f"{fig}@{y:g}", label, unit, intended, step=meas, tol_step=tol)
            if outside(meas, intended, tol):
                rec.fault.append("STEP")
            if exp is not None:
                rec.expected, rec.expected_tol = exp.value, exp.tolerance_for(exp.value)
                rec.verdict = "pass" if abs(meas - exp.value) <= rec.expected_tol else "FAIL"
            out.append(rec)
        if ca is not None and ca.profile_tol is not None:
            dev = float(polyline_distance(model.section_loop(y, 200), ms["points"]).max())
            rec = Record(part, f"profile@{y:g}", f"profile deviation at {y:g} mm", "mm", 0.0, step=dev,
                         tol_step=defaults.CHECK_LENGTH_MM, expected=0.0, expected_tol=ca.profile_tol)
            if outside(dev, 0.0, defaults.CHECK_LENGTH_MM):
                rec.fault.append("STEP")
            rec.verdict = "pass" if dev <= ca.profile_tol else "FAIL"
            out.append(rec)
    return out
