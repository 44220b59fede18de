"""Pydantic models of the spec (``format = 1``). Units: mm and degrees.

Field descriptions end up in ``geomgen schema`` (JSON Schema for editors), so they are
written for the person editing a spec.
"""

from __future__ import annotations

import math
import re
from typing import Literal, Optional, Union

from pydantic import BaseModel, ConfigDict, Field, StrictBool, field_validator, model_validator

from .. import defaults
from ..sections.naca import parse_designation
from .drawings import ShopSpec
from .flight import FlightSpec
from .parts import LaminateSpec, MountSpec, PrintingSpec
from .types import MAX_CHECK_AT, MAX_DATUM_MM, MAX_SECTIONS, MAX_STATIONS, MAX_SURFACES, DatumMM, Int, Num


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, validate_default=True)


#: Largest expected figure in any unit (mm⁴ of a big mast root is about 1e8).
MAX_FIGURE = 1e15

_TOL = re.compile(r"^\s*([0-9]*\.?[0-9]+(?:[eE][-+]?\d+)?)\s*%\s*$")


class Expectation(_Strict):
    """A number from the calculation sheet with its tolerance."""

    value: Num = Field(ge=-MAX_FIGURE, le=MAX_FIGURE, description="expected value, in the figure's unit")
    tol: Union[Num, str] = Field(
        description="absolute tolerance in the figure's unit (e.g. 0.5) or a percentage ('0.5%'), "
                    "at most the value's size (a percentage below 100)")

    @field_validator("tol", mode="before")
    @classmethod
    def _tol(cls, v):
        if isinstance(v, str):
            m = _TOL.match(v)
            if not m:
                raise ValueError(f"tolerance must be a number or a percentage like '0.5%', got {v!r}")
            if not float(m.group(1)) < 100.0:
                raise ValueError(f"a percentage tolerance must be below 100% (it would pass anything), got {v!r}")
            return v
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise ValueError(f"tolerance must be a number or a percentage like '0.5%', got {v!r}")
        if not math.isfinite(v) or v < 0:
            raise ValueError(f"tolerance must be a finite number >= 0, got {v!r}")
        return float(v)

    @model_validator(mode="after")
    def _meaningful(self):
        if isinstance(self.tol, float) and self.tol > max(abs(self.value), 1.0):
            raise ValueError(f"tol {self.tol:g} is larger than the value {self.value:g} itself (it would pass "
                             "a part of zero size); give at most the value's size")
        return self

    def tolerance_for(self, value: float) -> float:
        """Absolute tolerance (figure units) around ``value``."""
        if isinstance(self.tol, str):
            m = _TOL.match(self.tol)
            assert m is not None  # the validator accepted it
            return abs(value) * float(m.group(1)) / 100.0
        return float(self.tol)


#: Figures a surface's ``expect`` table may name (definitions in DEVELOPERS.md).
EXPECTABLE = ("span_mm", "projected_area_cm2", "aspect_ratio", "mac_mm", "mac_y_mm",
              "mac_le_x_mm", "mac_qc_x_mm", "root_chord_mm", "tip_chord_mm", "taper_ratio",
              "sweep_qc_deg", "volume_cm3", "wetted_area_cm2", "datum_area_cm2", "datum_mac_mm", "root_area_mm2",
              "root_i_chord_mm4", "root_i_normal_mm4", "root_j_mm4")


class Expect(_Strict):
    """The calculation sheet's numbers for one surface."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)
    span_mm: Optional[Expectation] = None
    projected_area_cm2: Optional[Expectation] = None
    aspect_ratio: Optional[Expectation] = None
    mac_mm: Optional[Expectation] = None
    mac_y_mm: Optional[Expectation] = None
    mac_le_x_mm: Optional[Expectation] = None
    mac_qc_x_mm: Optional[Expectation] = None
    root_chord_mm: Optional[Expectation] = None
    tip_chord_mm: Optional[Expectation] = None
    taper_ratio: Optional[Expectation] = None
    sweep_qc_deg: Optional[Expectation] = None
    volume_cm3: Optional[Expectation] = None
    wetted_area_cm2: Optional[Expectation] = None
    datum_area_cm2: Optional[Expectation] = Field(
        None, description="area of the outline's shadow on the datum plane (x-y horizontal, x-z vertical), cm²")
    datum_mac_mm: Optional[Expectation] = Field(None, description="MAC of the outline's shadow on the datum plane, mm")
    root_area_mm2: Optional[Expectation] = Field(None, description="cross-section area at the root station, mm²")
    root_i_chord_mm4: Optional[Expectation] = Field(
        None, description="root section's second moment about its centroidal axis parallel to the chord, mm⁴")
    root_i_normal_mm4: Optional[Expectation] = Field(
        None, description="root section's second moment about its centroidal axis normal to the chord, mm⁴")
    root_j_mm4: Optional[Expectation] = Field(None, description="root section's torsion constant (solid), mm⁴")


class CheckAt(_Strict):
    """A shop or class-rule measurement at one span position of the written part."""

    y: Num = Field(ge=0.0, le=MAX_DATUM_MM,
                   description="span position from the root (centreline of a mirrored part), mm")
    chord: Optional[Expectation] = Field(None, description="expected chord, mm")
    thickness: Optional[Expectation] = Field(None, description="expected maximum thickness, mm")
    area_mm2: Optional[Expectation] = Field(None, description="expected cross-section area, mm²")
    i_chord_mm4: Optional[Expectation] = Field(
        None, description="expected second moment about the centroidal axis parallel to the chord, mm⁴")
    i_normal_mm4: Optional[Expectation] = Field(
        None, description="expected second moment about the centroidal axis normal to the chord, mm⁴")
    j_mm4: Optional[Expectation] = Field(None, description="expected torsion constant of the solid section, mm⁴")
    profile_tol: Optional[Num] = Field(
        None, gt=0.0, le=10.0, description="largest allowed distance of the written section from the intended one, mm")


class SectionSpec(_Strict):
    """A named section: a NACA designation or a coordinate file, with optional changes."""

    naca: Optional[str] = Field(None, description="NACA 4- or 5-digit designation, e.g. '2412', '23012'")
    file: Optional[str] = Field(None, description="coordinate file, relative to the spec file")
    closed_te: StrictBool = Field(False, description="NACA only: closed trailing-edge thickness coefficient")
    thickness_pct: Optional[Num] = Field(
        None, gt=0.5, le=40.0, description="rescale so the maximum thickness is this % of chord")
    invert: StrictBool = Field(False, description="mirror the camber (pressure side on top)")

    @field_validator("naca")
    @classmethod
    def _designation(cls, v):
        if v is not None:
            parse_designation(v)
        return v

    @model_validator(mode="after")
    def _one_source(self):
        if (self.naca is None) == (self.file is None):
            raise ValueError("give exactly one of 'naca' or 'file'")
        return self


class Blend(_Strict):
    """Blend this station's section toward another one."""

    section: str = Field(description="name of the section blended in")
    fraction: Num = Field(ge=0.0, le=1.0, description="0 = own section, 1 = the other one")


class StationSpec(_Strict):
    """One spanwise station. Offsets are of the reference point, in the surface's own frame."""

    y: Num = Field(ge=0.0, le=5000.0, description="spanwise distance from the root reference point, mm")
    chord: Num = Field(ge=0.1, le=5000.0, description="chord, mm (0.1 mm: an elliptic tip; less cannot be made)")
    x: Optional[Num] = Field(None, ge=-5000, le=5000,
                               description="aft offset of the reference point (sweep), mm; or give 'sweep'")
    sweep: Optional[Num] = Field(None, gt=-80.0, lt=80.0,
                                   description="panel sweep of the reference line from the previous station, deg")
    z: Optional[Num] = Field(None, ge=-5000, le=5000,
                               description="offset normal to the span toward the upper side (dihedral), mm; "
                                           "negative is anhedral; or give 'dihedral'")
    dihedral: Optional[Num] = Field(None, gt=-80.0, lt=80.0,
                                      description="panel dihedral from the previous station, deg (negative: anhedral)")
    twist: Num = Field(0.0, ge=-45.0, le=45.0, description="twist, deg, positive = leading edge up")
    section: str = Field(description="name of a section in [sections]")
    blend: Optional[Blend] = None

    @model_validator(mode="after")
    def _either(self):
        if self.x is not None and self.sweep is not None:
            raise ValueError("give 'x' or 'sweep', not both")
        if self.z is not None and self.dihedral is not None:
            raise ValueError("give 'z' or 'dihedral', not both")
        return self


class SurfaceSpec(_Strict):
    """One part: front wing, stabilizer, mast or fin."""

    name: str = Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$",
                      description="part name, used in file names (letters, digits, - _ .)")
    role: Literal["wing", "stabilizer", "mast", "fin"]
    orientation: Literal["horizontal", "vertical-up", "vertical-down"] = Field(
        "horizontal", description="horizontal: span along +y; vertical-up: span along +z (mast); "
                                  "vertical-down: span along -z (fin)")
    mirror: StrictBool = Field(False, description="stations describe one half; the part spans both sides")
    position: tuple[DatumMM, DatumMM, DatumMM] = Field(
        (0.0, 0.0, 0.0), description="datum position of the root reference point [x, y, z], mm")
    reference: Num = Field(0.25, ge=0.0, le=1.0,
                             description="chord fraction of the reference point (twist and incidence axis)")
    incidence: Num = Field(0.0, ge=-30.0, le=30.0, description="deg, positive = leading edge up")
    te_thickness: Num = Field(defaults.TE_THICKNESS_MM, ge=0.0, le=20.0,
                                description="finished trailing-edge thickness, mm (0 = sharp)")
    interpolation: Literal["linear", "smooth"] = Field(
        "linear", description="between stations: linear, or smooth (C2 cubic spline through the stations, "
                              "not-a-knot ends; it can swing past the station values between them; zero "
                              "slope at the mirror plane of a mirrored part)")
    loft_sections: Int = Field(defaults.LOFT_SECTIONS, ge=4, le=400,
                               description="loft sections per half span (more: closer to a curved planform)")
    tip: Literal["flat", "round"] = Field(
        "flat", description="flat: a flat cap at the last station; round: the planform closes beyond the last "
                            "station in a quarter ellipse (chord and thickness shrink, trailing edge thins) "
                            "to a small flat end")
    tip_length: Optional[Num] = Field(None, gt=0.0, le=2000.0,
                                        description="round tip: length beyond the last station, mm "
                                                    "(default half the last chord)")
    tip_end: Num = Field(defaults.ROUND_TIP_END_CHORD, ge=0.02, le=0.6,
                           description="round tip: chord of the small flat end, as a fraction of the last chord")
    station: list[StationSpec] = Field(min_length=2, max_length=MAX_STATIONS,
                                       description="spanwise stations, root first")
    expect: Optional[Expect] = None
    check_at: list[CheckAt] = Field(default_factory=list, max_length=MAX_CHECK_AT,
                                    description="measurements at named span positions (chord, thickness, profile)")
    shop: Optional[ShopSpec] = Field(None, description="section templates, offset tables, hot-wire profiles")
    mount: Optional[MountSpec] = Field(None, description="mounting pad and bolt holes")
    printing: Optional[PrintingSpec] = Field(None, description="printable pieces, locators, spar channels")
    laminate: Optional[LaminateSpec] = Field(None, description="cores and moulds")

    @field_validator("name")
    @classmethod
    def _plain_name(cls, v):
        return _file_name_part(v)

    @field_validator("te_thickness")
    @classmethod
    def _te_bound(cls, v):
        return _te_thickness(v)

    @model_validator(mode="after")
    def _one_sided(self):
        if self.mirror and self.role in ("mast", "fin"):
            raise ValueError(f"mirror: a {self.role} has one side only (mirror = true would carry it through "
                             "the fuselage to the other side); remove mirror")
        return self

    # station order and spacing are checked on the raw data in load.py, so they are
    # reported even when other fields of the same surface are wrong


def _file_name_part(v: str) -> str:
    """A name that becomes part of file names: besides the pattern, no '..' and no '.' at the
    end (``mast.`` would make ``set-mast..step``, which is refused as a file name)."""
    if ".." in v or v.endswith("."):
        raise ValueError("a name used in file names may not hold '..' or end with '.'")
    return v


def _te_thickness(v: float) -> float:
    """0 (sharp) or at least :data:`~geomgen.defaults.MIN_TE_THICKNESS_MM`: a thinner open edge
    cannot be made by the kernel (1e-7 mm failed) and by no shop."""
    if 0.0 < v < defaults.MIN_TE_THICKNESS_MM:
        raise ValueError(f"must be 0 (a sharp edge) or at least {defaults.MIN_TE_THICKNESS_MM:g} mm, got {v:g}")
    return v


class Datum(_Strict):
    origin: str = Field(description="where the datum origin is, in words")


class Spec(_Strict):
    """A foil set: named sections and the surfaces built from them."""

    format: Literal[1] = Field(description="spec format version")
    name: str = Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$", description="set name, used in file names")
    datum: Datum
    sections: dict[str, SectionSpec] = Field(min_length=1, max_length=MAX_SECTIONS)
    surface: list[SurfaceSpec] = Field(min_length=1, max_length=MAX_SURFACES)
    flight: Optional[FlightSpec] = Field(None, description="mass, speeds and fluid for the hydrodynamics")

    @field_validator("name")
    @classmethod
    def _plain_name(cls, v):
        return _file_name_part(v)
