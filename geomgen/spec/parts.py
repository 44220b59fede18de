"""Spec tables for 3D shop parts: mounting interface, printable pieces, cores and moulds.

``[surface.mount]`` (flat pad, bolt holes, incidence shims), ``[surface.printing]``
(scale, pieces, locators, rod spar channels) and ``[surface.laminate]`` (cores offset
inward by a laminate, two-half moulds). Lengths mm, angles deg. Positions of features on
the part (pad, holes, spar ends, split positions) are in the full-size design frame (the
datum frame, or span positions from the root reference point); sizes of bought hardware
and printer limits (rod and pin diameters, clearances, walls, build volume) are in
printed mm and do not scale with ``printing.scale``.
"""

from __future__ import annotations

from typing import Annotated, Literal, Optional, Union

from pydantic import BaseModel, ConfigDict, Field, StrictBool, field_validator, model_validator

from .types import MAX_HOLES, MAX_SHIMS, MAX_SPARS, MAX_SPLITS, DatumMM, Num


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, validate_default=True)


# -- mounting interface ---------------------------------------------------------------
class Counterbore(_Strict):
    """Flat-bottomed recess for a bolt head on the side away from the pad."""

    diameter: Num = Field(gt=0.5, le=100.0, description="recess diameter, mm (larger than the hole)")
    depth: Num = Field(gt=0.0, le=100.0,
                         description="recess depth along the hole axis from where the axis leaves the skin, mm")


class Countersink(_Strict):
    """Conical recess for a flat-head bolt on the side away from the pad."""

    angle: Num = Field(90.0, ge=60.0, le=130.0, description="included cone angle, deg (90 for ISO flat heads)")
    diameter: Num = Field(gt=0.5, le=100.0,
                            description="cone diameter where the hole axis leaves the skin, mm (larger than the hole)")


class Insert(_Strict):
    """Blind pocket, entered from the pad, for a threaded insert (glued or pressed in)."""

    diameter: Num = Field(gt=0.5, le=100.0, description="pocket diameter, mm")
    depth: Num = Field(gt=0.0, le=200.0, description="pocket depth from the pad along the hole axis, mm")


class HoleSpec(_Strict):
    """One bolt hole. Its axis is parallel to the datum z axis (normal to the pad), not to the
    chord's normal, so a bolt pulls the part straight onto the fuselage."""

    x: Num = Field(ge=-10000.0, le=10000.0, description="datum x of the hole axis, mm")
    y: Num = Field(0.0, ge=-10000.0, le=10000.0, description="datum y of the hole axis, mm")
    diameter: Num = Field(gt=0.5, le=100.0, description="hole (bolt clearance) diameter, mm")
    depth: Optional[Num] = Field(
        None, gt=0.0, le=500.0,
        description="blind hole depth from the pad along the axis, mm; omit for a hole through the part")
    counterbore: Optional[Counterbore] = Field(None, description="bolt-head recess on the far side (through holes)")
    countersink: Optional[Countersink] = Field(None, description="flat-head cone on the far side (through holes)")
    insert: Optional[Insert] = Field(None, description="threaded-insert pocket entered from the pad (blind)")

    @model_validator(mode="after")
    def _kinds(self):
        given = [k for k in ("counterbore", "countersink", "insert") if getattr(self, k) is not None]
        if len(given) > 1:
            raise ValueError(f"give at most one of counterbore, countersink, insert; got {', '.join(given)}")
        if (self.counterbore or self.countersink) and self.depth is not None:
            raise ValueError("a counterbore or countersink sits on the far side of a hole through the part; "
                             "remove 'depth'")
        for k in ("counterbore", "countersink", "insert"):
            sub = getattr(self, k)
            if sub is not None and sub.diameter <= self.diameter:
                raise ValueError(f"{k} diameter ({sub.diameter:g} mm) must be larger than the hole "
                                 f"({self.diameter:g} mm)")
        if self.insert is not None and self.depth is not None and self.depth < self.insert.depth:
            raise ValueError(f"depth ({self.depth:g} mm) must be at least the insert pocket depth "
                             f"({self.insert.depth:g} mm), or omitted")
        return self


class ShimSpec(_Strict):
    """A printable wedge between the pad and the fuselage that changes this surface's incidence."""

    angle: Num = Field(ge=-6.0, le=6.0,
                         description="change of this surface's incidence, deg; positive = leading edge up "
                                     "(relative to the fuselage). Not 0")
    length: Optional[Num] = Field(None, gt=2.0, le=1000.0,
                                    description="footprint along x, mm [default: the pad's length]")
    width: Optional[Num] = Field(None, gt=2.0, le=1000.0,
                                   description="footprint along y, mm [default: the pad's width]")
    min_thickness: Num = Field(1.0, ge=0.3, le=20.0, description="thickness at the thin end, mm")
    hole_clearance: Num = Field(0.3, ge=0.0, le=3.0,
                                  description="added to each mount hole's diameter for the shim's holes, mm")

    @model_validator(mode="after")
    def _nonzero(self):
        if abs(self.angle) < 0.01:
            raise ValueError(f"angle must differ from 0 by at least 0.01 deg, got {self.angle:g}")
        return self


class MountSpec(_Strict):
    """Flat mounting pad and bolt holes where the fuselage seats (horizontal surfaces).

    The pad is the plane z = ``pad_z`` of the datum frame: the part's material beyond it on
    ``side`` is removed over the footprint (``pad_x`` by ``pad_width``), so the part seats on
    a fuselage face parallel to the datum at exactly its incidence.
    """

    side: Literal["upper", "lower"] = Field(
        "upper", description="which skin the fuselage sits on: upper (part below the fuselage) or lower")
    pad_z: Union[Annotated[Num, Field(ge=-5000.0, le=5000.0)], Literal["auto"]] = Field(
        description='datum z of the pad plane, mm; or "auto": the height at which the pad touches '
                    "pad_contact of its footprint")
    pad_contact: Num = Field(0.6, ge=0.05, le=1.0,
                               description='share of the footprint made flat when pad_z = "auto"')
    pad_x: tuple[DatumMM, DatumMM] = Field(description="datum x range of the pad footprint [fore, aft], mm")
    pad_width: Num = Field(gt=1.0, le=2000.0, description="pad footprint width along y, mm")
    pad_y: Num = Field(0.0, ge=-5000.0, le=5000.0, description="datum y of the footprint centre, mm")
    min_wall: Num = Field(2.0, ge=0.3, le=50.0,
                            description="least material left under the pad and below/above every hole, mm")
    hole: list[HoleSpec] = Field(default_factory=list, max_length=MAX_HOLES,
                                 description="bolt holes, axes parallel to datum z")
    shim: list[ShimSpec] = Field(default_factory=list, max_length=MAX_SHIMS, description="printable incidence shims")

    @field_validator("pad_x")
    @classmethod
    def _order(cls, v):
        if v[1] <= v[0]:
            raise ValueError(f"must be [fore, aft] with fore < aft, got {list(v)}")
        return v


# -- 3D printing ----------------------------------------------------------------------
class LocatorSpec(_Strict):
    """Alignment pins across each joint: a round hole and a slotted hole in each face."""

    enabled: StrictBool = Field(True, description="cut locator holes at every joint")
    pin_diameter: Num = Field(3.0, ge=0.5, le=20.0, description="pin (dowel or rod) diameter, printed mm")
    pin_length: Num = Field(12.0, ge=2.0, le=100.0, description="pin length across the joint, printed mm")
    clearance: Num = Field(0.2, ge=0.0, le=2.0, description="added to the pin diameter for its holes, printed mm")
    slot_extra: Num = Field(1.5, ge=0.0, le=20.0,
                              description="extra length of the slotted hole along the line between pins, printed mm")


class SparSpec(_Strict):
    """A straight channel for a round rod (e.g. carbon), running spanwise inside the part."""

    diameter: Num = Field(gt=0.3, le=50.0, description="rod diameter, printed mm")
    clearance: Num = Field(0.2, ge=0.0, le=2.0, description="added to the rod diameter for the channel, printed mm")
    span: tuple[DatumMM, DatumMM] = Field(
        description="span positions of the rod's two ends, mm from the root reference point "
                    "(negative: port half of a mirrored part)")
    chord: Union[Num, tuple[Num, Num]] = Field(
        description="chord fraction of the rod axis (0 leading edge, 1 trailing edge) at both ends, or "
                    "[at the first end, at the second end]")
    height: Num = Field(0.5, ge=0.05, le=0.95,
                          description="position between the lower (0) and upper (1) skin at the ends")
    mirror: StrictBool = Field(True, description="on a mirrored part, also a rod mirrored to the other half "
                                           "(when the rod does not cross the centreline)")

    @field_validator("span")
    @classmethod
    def _ends(cls, v):
        if v[1] <= v[0]:
            raise ValueError(f"must be [from, to] with from < to, got {list(v)}")
        return v

    @field_validator("chord")
    @classmethod
    def _fractions(cls, v):
        fr = v if isinstance(v, tuple) else (v, v)
        if not all(0.02 <= f <= 0.95 for f in fr):
            raise ValueError(f"chord fractions must be within 0.02 .. 0.95, got {v}")
        return v

    @property
    def chord_ends(self) -> tuple[Num, Num]:
        return self.chord if isinstance(self.chord, tuple) else (self.chord, self.chord)


class PrintingSpec(_Strict):
    """Printable pieces: scale, splitting, locators, rod spar channels, meshes."""

    scale: Num = Field(1.0, ge=0.02, le=10.0, description="scale factor of the printed part (test models)")
    min_te: Optional[Num] = Field(
        None, gt=0.0, le=10.0, description="thicken the trailing edge to at least this, printed mm")
    split_at: list[DatumMM] = Field(
        default_factory=list, max_length=MAX_SPLITS,
        description="span positions of the joints, mm from the root reference point "
                    "(negative: port half of a mirrored part)")
    build_volume: Optional[tuple[DatumMM, DatumMM, DatumMM]] = Field(
        None, description="printer build volume [x, y, z], mm; without split_at the part is split "
                          "automatically so every piece fits (in an axis-aligned pose)")
    bed_margin: Num = Field(8.0, ge=0.0, le=100.0,
                              description="clear band kept inside the build volume's x and y on every side "
                                          "(skirt, brim, bed clips), printed mm")
    nozzle: Num = Field(0.4, ge=0.1, le=2.0,
                          description="nozzle diameter, printed mm; features too small for it are warned about")
    odd_count: StrictBool = Field(False, description="automatic split: an odd number of pieces, the centre piece "
                                               "carrying the mount")
    min_wall: Num = Field(1.2, ge=0.2, le=20.0,
                            description="least wall around locator holes and spar channels, printed mm")
    locators: LocatorSpec = Field(default_factory=LocatorSpec, description="alignment pins across joints")
    spar: list[SparSpec] = Field(default_factory=list, max_length=MAX_SPARS, description="straight rod spar channels")
    mount: StrictBool = Field(True, description="cut the [surface.mount] pad and holes into the printed part")
    mesh_tol: Num = Field(0.05, ge=0.005, le=2.0,
                            description="STL/3MF chordal deviation from the exact surface, printed mm")
    joint_test: StrictBool = Field(True, description="also write a short slice across one joint with its locators")

    @field_validator("build_volume")
    @classmethod
    def _volume(cls, v):
        if v is not None and min(v) <= 5.0:
            raise ValueError(f"must be > 5 mm on every axis, got {list(v)}")
        return v

    @model_validator(mode="after")
    def _margin(self):
        if self.build_volume is not None and min(self.build_volume[:2]) <= 2 * self.bed_margin + 5.0:
            raise ValueError(f"bed_margin ({self.bed_margin:g} mm each side) leaves less than 5 mm of the build "
                             f"volume's x or y ({self.build_volume[0]:g} x {self.build_volume[1]:g} mm)")
        return self

    @property
    def usable_volume(self) -> tuple[float, float, float] | None:
        """The build volume less ``bed_margin`` on each side in x and y, printed mm."""
        if self.build_volume is None:
            return None
        x, y, z = self.build_volume
        return (x - 2 * self.bed_margin, y - 2 * self.bed_margin, z)

    @property
    def line_width(self) -> float:
        """Extrusion width taken as 1.125 x the nozzle (common practice, no source), printed mm."""
        return 1.125 * self.nozzle

    @field_validator("split_at")
    @classmethod
    def _split(cls, v):
        if sorted(set(v)) != list(v):
            raise ValueError(f"must be strictly increasing, got {v}")
        return v


# -- cores and moulds -----------------------------------------------------------------
class LaminateSpec(_Strict):
    """A core (the part offset inward by a laminate) and a two-half mould of the bare part."""

    thickness: Num = Field(gt=0.05, le=20.0, description="laminate thickness over the core, mm")
    core: StrictBool = Field(True, description="write the core (sections offset inward by the laminate, re-lofted)")
    core_min_thickness: Num = Field(
        1.0, ge=0.1, le=20.0,
        description="the core ends toward the trailing edge where its thickness falls to this, mm "
                    "(there the part is about 2 x laminate + this thick)")
    mould: StrictBool = Field(True, description="write a two-part female mould: a stock block per half less the part")
    parting: Literal["stations", "root-chord"] = Field(
        "stations", description="parting surface: through every section's chord line (stations), or the "
                                "plane through the root chord line (root-chord)")
    flange: Num = Field(25.0, ge=0.0, le=500.0,
                          description="width of the mould block beyond the part's outline on the parting "
                                      "surface (the flange carrying the pins and bolts), mm")
    flange_thickness: Num = Field(15.0, gt=0.0, le=200.0,
                                    description="least mould material behind the cavity (block depth beyond the "
                                                "part's highest point), mm")
    pin_diameter: Num = Field(6.0, ge=1.0, le=30.0,
                                description="registration dowel holes through both halves near the four corners, "
                                            "mm (0 flange: none)")
    bolt_diameter: Num = Field(6.6, ge=1.0, le=30.0,
                                 description="bolt clearance holes through both halves' flange, mm (6.6: M6)")
    bolt_spacing: Num = Field(100.0, ge=20.0, le=1000.0,
                                description="largest distance between bolt holes along each long side, mm")
    pose: Literal["machine", "datum"] = Field(
        "machine", description="machine: root chord plane on the machine XY plane, leading edge along X, root "
                               "leading edge at the origin, each mould half's outside up; datum: as built")
