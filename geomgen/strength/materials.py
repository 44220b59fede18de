"""A small table of EXAMPLE materials for first estimates of stiffness (E, G, density).

Every entry is an example of a typical value, not data of any product: real parts depend on
alloy and temper, fibre, lay-up, fibre fraction, print settings and moisture. Use the
supplier's data sheet or test coupons of your own laminate; give them with --e-gpa/--g-gpa.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

from ..errors import SpecError


@dataclass(frozen=True)
class Material:
    name: str
    e_gpa: float  # Young's modulus along the span
    g_gpa: float  # shear modulus for torsion
    density_kg_m3: float
    source: str
    example: bool = True

    def as_dict(self) -> dict:
        return asdict(self)


_HANDBOOK = "typical handbook value (ASM Handbook / MIL-HDBK-5 class data), from memory"

MATERIALS = {m.name: m for m in (
    Material("aluminium-6061-t6", 68.9, 26.0, 2700.0, _HANDBOOK),
    Material("aluminium-7075-t6", 71.7, 26.9, 2810.0, _HANDBOOK),
    Material("stainless-316", 193.0, 74.0, 8000.0, _HANDBOOK),
    Material("titanium-6al-4v", 113.8, 44.0, 4430.0, _HANDBOOK),
    Material("carbon-epoxy-ud", 135.0, 5.0, 1600.0,
             "unidirectional standard-modulus carbon/epoxy along the fibres, ~60 % fibre; typical textbook "
             "values (e.g. Daniel & Ishai, Engineering Mechanics of Composite Materials), from memory; "
             "G is the in-plane shear modulus: a spar of UD fibre is soft in torsion"),
    Material("carbon-epoxy-quasi-iso", 50.0, 19.0, 1550.0,
             "quasi-isotropic carbon/epoxy laminate, typical in-plane values (common practice, no source)"),
    Material("glass-epoxy-woven", 22.0, 4.0, 1900.0,
             "woven E-glass/epoxy, typical in-plane values (common practice, no source)"),
    Material("pla-printed", 3.0, 1.1, 1240.0,
             "3D-printed PLA, strongly dependent on print settings (common practice, no source); for test "
             "models only"),
)}


def material_of(name: str | None, e_gpa: float | None = None, g_gpa: float | None = None,
                density_kg_m3: float | None = None) -> Material:
    """The named example material, with any of E, G and density replaced by the user's values;
    or the user's own material when no name is given (E and G both needed)."""
    if name is None:
        if e_gpa is None or g_gpa is None:
            raise SpecError("name a material (--material, one of: " + ", ".join(MATERIALS) + ") or give both "
                            "--e-gpa and --g-gpa")
        return Material("user", e_gpa, g_gpa, density_kg_m3 or float("nan"), "given by the user", example=False)
    if name not in MATERIALS:
        raise SpecError(f"unknown material '{name}'; the example table has: " + ", ".join(MATERIALS)
                        + " (or give --e-gpa and --g-gpa)")
    m = MATERIALS[name]
    if e_gpa is None and g_gpa is None and density_kg_m3 is None:
        return m
    return Material(m.name + " (values changed by the user)", e_gpa or m.e_gpa, g_gpa or m.g_gpa,
                    density_kg_m3 or m.density_kg_m3, m.source + "; changed by the user", example=False)
