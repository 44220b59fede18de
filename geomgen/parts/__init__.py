"""``geomgen parts``: 3D shop parts of the lifting surfaces.

Plans in numpy (``frame``, ``mount``, ``printing``, ``core``, ``mould``: positions, sizes,
wall checks, poses), solids through the CAD edge (``mount_solids``, ``pieces``,
``laminate`` call :mod:`geomgen.cad.ops` and :mod:`geomgen.cad.mesh`; nothing here imports
the kernel itself), and the pipeline :func:`write_shop_parts` with its summary.
"""

from .run import ShopParts, format_parts_summary, write_shop_parts

__all__ = ["ShopParts", "write_shop_parts", "format_parts_summary"]
