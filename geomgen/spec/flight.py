"""The ``[flight]`` table: what the hydrodynamics needs (mass, speeds, fluid, balance)."""

from __future__ import annotations

from typing import Literal, Optional, Union

from pydantic import BaseModel, ConfigDict, Field


class FlightSpec(BaseModel):
    """Rider and board as the foil sees them. Masses kg, speeds km/h, positions datum mm."""

    model_config = ConfigDict(extra="forbid")

    mass_kg: float = Field(gt=0.0, le=1000.0, description="total mass carried by the foil, kg")
    speeds_kmh: list[float] = Field(min_length=1, description="speeds to trim at, km/h")
    fluid: Union[Literal["seawater", "freshwater"], float] = Field(
        "seawater", description="seawater or freshwater (ITTC 2011, 15 °C), or a density in kg/m³")
    weight_x_mm: Optional[float] = Field(None, description="datum x where the weight acts, if known")
