"""First estimates of strength and stiffness: beam figures of wings, stabilizers and masts
from the intended section properties and the lattice's spanwise loading.

Layer: above ``hydro`` (it uses the lattice loading) and beside ``build`` (it needs no CAD).
"""

from .materials import MATERIALS, Material, material_of
from .run import FIRST_ESTIMATE, format_loads, loads, write_loads

__all__ = ["MATERIALS", "Material", "material_of", "FIRST_ESTIMATE", "format_loads", "loads", "write_loads"]
