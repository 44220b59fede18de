"""Spec tables for the shaper's 2D outputs (templates, offset tables, hot-wire profiles).

``[surface.shop]``; filled in by the shop-drawing work.
"""

from __future__ import annotations

from pydantic import BaseModel, ConfigDict


class ShopSpec(BaseModel):
    """Section templates, offset tables and hot-wire profiles of one surface."""

    model_config = ConfigDict(extra="forbid")
