"""Spec tables for 3D shop parts: mounting interface, printable pieces, cores and moulds.

``[surface.mount]``, ``[surface.printing]``, ``[surface.laminate]``; filled in by the
shop-parts work.
"""

from __future__ import annotations

from pydantic import BaseModel, ConfigDict


class MountSpec(BaseModel):
    """Flat mounting pad and bolt holes where the fuselage seats."""

    model_config = ConfigDict(extra="forbid")


class PrintingSpec(BaseModel):
    """Splitting into printable pieces, locators, spar channels, scale."""

    model_config = ConfigDict(extra="forbid")


class LaminateSpec(BaseModel):
    """Cores (inward offset by a laminate) and two-half moulds."""

    model_config = ConfigDict(extra="forbid")
