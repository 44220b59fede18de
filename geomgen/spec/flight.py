"""The ``[flight]`` table: what the hydrodynamics needs (mass, speeds, fluid, balance, lattice)."""

from __future__ import annotations

import math
from typing import Annotated, Literal, Optional, Union

from pydantic import BaseModel, ConfigDict, Field, StrictBool, field_validator, model_validator

from .types import MAX_SPEEDS, DatumMM, Int, Num

#: Default vortex-lattice strips per half span (cosine spaced). At these counts doubling
#: both counts moves the neutral point of the demo set by well under 0.2 % MAC
#: (tests/test_hydro.py).
DEFAULT_SPAN_PANELS = 16

#: Section maximum lift coefficient for the takeoff estimate when [flight] gives none:
#: a moderate value for cambered foil sections of 9-13 % thickness at Reynolds numbers of a
#: few 10⁵ (common practice, no source).
DEFAULT_CL_MAX = 1.1

#: Densities a ``fluid`` number may give, kg/m³: from warm fresh water (about 992 at 40 °C)
#: to hypersaline lakes (about 1,240); values from memory. Anything else is not water.
FLUID_DENSITY_RANGE = (950.0, 1250.0)

#: Default travel of the mast either way in its tracks, mm: tracks give a few cm (common
#: practice, no source).
DEFAULT_TRACK_TRAVEL_MM = 50.0

#: Default vortex-lattice panels along the chord (uniform).
DEFAULT_CHORD_PANELS = 6


class FlightSpec(BaseModel):
    """Rider and board as the foil sees them. Masses kg, speeds km/h, positions datum mm."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)

    mass_kg: Num = Field(gt=0.0, le=1000.0, description="total mass carried by the foil, kg")
    speeds_kmh: list[Annotated[Num, Field(gt=0.0, le=200.0)]] = Field(
        min_length=1, max_length=MAX_SPEEDS, description="speeds to trim at, km/h")
    fluid: Union[Literal["seawater", "freshwater"], Num] = Field(
        "seawater", description="seawater or freshwater (ITTC 2011, 15 °C), or a density in kg/m³")
    weight_x_mm: Optional[DatumMM] = Field(
        None, description="datum x where the weight acts, if known (or rider_from_mast_mm: the same point from the "
                          "mast reference); gives the static margin")
    temperature_c: Literal[15, 20] = Field(
        15, description="water temperature for the ITTC 2011 table values, °C (15 or 20)")
    viscosity_m2s: Optional[Num] = Field(
        None, gt=1e-7, lt=1e-4, description="kinematic viscosity, m²/s (default: ITTC 2011 table value)")
    cl_max: Optional[Num] = Field(
        None, gt=0.1, le=3.0, description="section lift coefficient where the front wing stalls; "
                                           "gives the estimated takeoff speed (default 1.1)")
    span_panels: Int = Field(DEFAULT_SPAN_PANELS, ge=4, le=100,
                             description="vortex-lattice strips per half span (cosine spaced)")
    chord_panels: Int = Field(DEFAULT_CHORD_PANELS, ge=1, le=40,
                              description="vortex-lattice panels along the chord")
    include_vertical: StrictBool = Field(
        False, description="put masts and fins in the lattice and report sideslip (side force)")
    vertical_in_pitch: StrictBool = Field(
        False, description="count masts and fins in the pitch balance as well (normally left out)")
    ride_height_mm: Optional[Num] = Field(
        None, ge=0.0, le=5000.0, description="height of the board's underside above the still water, mm; the "
                                             "board sits on the top of the mast (free surface from the mast)")
    depth_mm: Optional[Num] = Field(
        None, ge=0.0, le=1.0e6, description="depth of the datum origin below the still water, mm (free surface "
                                            "given directly; for a set without a mast)")
    cruise_kmh: Optional[Num] = Field(
        None, gt=0.0, le=200.0, description="cruise speed for where the rider stands and the stabilizer shim, "
                                            "km/h (default: the middle of speeds_kmh)")
    rider_from_mast_mm: Optional[Num] = Field(
        None, ge=-2000.0, le=2000.0, description="where the rider's weight acts, mm along datum x from the mast "
                                                 "reference (negative: ahead of the mast); the same point as "
                                                 "weight_x_mm: gives the static margin and the mast move")
    track_travel_mm: Num = Field(
        DEFAULT_TRACK_TRAVEL_MM, gt=0.0, le=1000.0,
        description="how far the mast can slide either way in its tracks, mm; a mast move beyond it is warned of "
                    f"(default {DEFAULT_TRACK_TRAVEL_MM:g}, common practice, no source)")
    stabilizer_lift_kgf: Optional[Num] = Field(
        None, ge=-500.0, le=500.0, description="stabilizer lift wanted at the cruise speed, kgf (negative: "
                                               "down-force); the balance solves the shim that gives it")

    @model_validator(mode="after")
    def _one_water_level(self):
        if self.ride_height_mm is not None and self.depth_mm is not None:
            raise ValueError("give ride_height_mm or depth_mm, not both (each sets the still-water level)")
        if self.weight_x_mm is not None and self.rider_from_mast_mm is not None:
            raise ValueError("give weight_x_mm or rider_from_mast_mm, not both (each says where the weight acts: "
                             "weight_x_mm in datum x, rider_from_mast_mm from the mast reference)")
        return self

    @field_validator("fluid", mode="before")
    @classmethod
    def _fluid(cls, v):
        lo, hi = FLUID_DENSITY_RANGE
        if isinstance(v, str):
            if v not in ("seawater", "freshwater"):
                raise ValueError(f"must be 'seawater', 'freshwater' or a density in kg/m³, got {v!r}")
            return v
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            raise ValueError(f"must be 'seawater', 'freshwater' or a density in kg/m³, got {v!r}")
        if not (math.isfinite(v) and lo <= v <= hi):
            raise ValueError(f"a density must be within {lo:g} .. {hi:g} kg/m³ (water), got {v!r}")
        return float(v)

    def cruise(self) -> float:
        """The cruise speed every command trims at: ``cruise_kmh``, else the middle of the
        sorted ``speeds_kmh`` (the speeds are listed from takeoff to top speed)."""
        if self.cruise_kmh is not None:
            return float(self.cruise_kmh)
        speeds = sorted(self.speeds_kmh)
        return float(speeds[len(speeds) // 2])
