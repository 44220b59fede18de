"""Spec table for the shaper's 2D outputs: section templates, offset tables, hot-wire profiles.

``[surface.shop]`` (optional; every surface gets the drawings with these defaults when
the table is absent). Lengths mm, chord positions in % of the local chord. Span
positions are measured like station ``y`` (from the root reference point; a mirrored
part's drawings serve both sides). Whether a span position lies on the part is checked
when the drawings are made, because only the geometry knows the tip.
"""

from __future__ import annotations

from typing import Annotated, Literal, Optional

from pydantic import BaseModel, ConfigDict, Field, StrictBool, field_validator

from ..defaults import MIN_STATION_GAP_MM
from .types import MAX_HOTWIRE_CUTS, MAX_OFFSET_COLUMNS, MAX_TEMPLATES, Int, Num

#: Default chord positions of the offset table, % chord: the classic table spacing, dense
#: at the nose where the shape changes fastest (common practice, no source).
OFFSET_PCT_DEFAULT = (0.0, 1.25, 2.5, 5.0, 7.5, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0,
                      60.0, 70.0, 80.0, 90.0, 95.0, 100.0)

SpanPos = Annotated[Num, Field(ge=0.0, le=5000.0)]
ChordPct = Annotated[Num, Field(ge=0.0, le=100.0)]


def _strictly_increasing(values, what: str):
    for a, b in zip(values[:-1], values[1:]):
        if b <= a:
            raise ValueError(f"{what} must be strictly increasing, got {b:g} after {a:g}")
    return values


class ShopSpec(BaseModel):
    """Section templates (DXF + printable SVG), offset tables (CSV) and hot-wire profiles."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, validate_default=True)

    # -- templates ----------------------------------------------------------------
    templates_at: list[SpanPos] = Field(
        default_factory=list, max_length=MAX_TEMPLATES,
        description="extra span positions for section templates and offset rows, mm from the root "
                    "(every station is always included)")
    template_spacing_mm: Num = Field(
        12.0, gt=0.0, le=200.0, description="gap between templates stacked on a sheet, mm")
    template_margin_mm: Num = Field(10.0, ge=0.0, le=100.0, description="margin around the sheet, mm")
    template_tol_mm: Num = Field(
        0.002, ge=0.0005, le=0.1,
        description="largest gap between a drawn template outline (polyline) and the true section, mm")
    label_height_mm: Num = Field(3.0, ge=1.0, le=20.0, description="text height of template labels, mm")
    paper: Literal["A4", "Letter", "A3"] = Field(
        "A4", description="paper of the print-ready PDF templates (one template a page, tiled when larger)")
    tile_overlap_mm: Num = Field(15.0, ge=5.0, le=60.0,
                                   description="overlap of neighbouring tiles of a PDF template, mm")

    # -- offset tables ------------------------------------------------------------
    offset_pct: list[ChordPct] = Field(
        default_factory=lambda: list(OFFSET_PCT_DEFAULT), min_length=2, max_length=MAX_OFFSET_COLUMNS,
        description="chord positions of the offset table, % of the local chord from the leading edge")

    # -- hot-wire profiles ----------------------------------------------------------
    hotwire: StrictBool = Field(True, description="write hot-wire profiles for foam-core panels")
    hotwire_cuts: Optional[list[SpanPos]] = Field(
        None, min_length=2, max_length=MAX_HOTWIRE_CUTS,
        description="span positions where the half span is cut into foam panels, mm from the root, "
                    "increasing; each neighbouring pair is one panel (default: the stations)")
    hotwire_points: Int = Field(
        100, ge=10, le=1000,
        description="points per side (upper and lower) of each hot-wire profile; both ends of a "
                    "panel get the same count at the same chord parameter")
    kerf_mm: Num = Field(
        0.0, ge=0.0, le=5.0,
        description="hot-wire kerf, mm: the wire path is offset outward by half of it so the core "
                    "comes out at size (0 = no compensation)")
    hotwire_corner_points: Int = Field(
        7, ge=2, le=64,
        description="points on the rounded wire path around each trailing-edge corner when kerf_mm > 0")
    machine_width_mm: Num = Field(
        1000.0, gt=50.0, le=5000.0, description="four-axis foam cutter: distance between its two towers, mm")
    block_from_left_mm: Optional[Num] = Field(
        None, ge=0.0, le=5000.0,
        description="distance from the X/Y tower to the panel's first block face, mm (default: centred)")
    feed_mm_min: Num = Field(150.0, gt=1.0, le=5000.0, description="cutting feed rate, mm/min")
    lead_mm: Num = Field(10.0, ge=1.0, le=200.0,
                           description="straight lead-in and lead-out of the wire behind the trailing edge, mm")
    cut_tol_mm: Num = Field(0.5, gt=0.0, le=20.0,
                              description="a panel whose straight cut strays further than this from the surface "
                                          "halfway along it is flagged, mm")

    @field_validator("templates_at")
    @classmethod
    def _unique(cls, v):
        if len(set(v)) != len(v):
            raise ValueError("span positions must not repeat")
        return v

    @field_validator("offset_pct")
    @classmethod
    def _offsets(cls, v):
        return _strictly_increasing(v, "chord positions")

    @field_validator("hotwire_cuts")
    @classmethod
    def _cuts(cls, v):
        if v is None:
            return v
        _strictly_increasing(v, "cut positions")
        for a, b in zip(v[:-1], v[1:]):  # panel file names carry the ends to 0.01 mm
            if b - a < MIN_STATION_GAP_MM:
                raise ValueError(f"cut positions must be at least {MIN_STATION_GAP_MM:g} mm apart (panel file "
                                 f"names would clash and no foam panel is that thin), got {b:g} after {a:g}")
        return v
