"""Water properties and constants for the hydrodynamics.

Densities and kinematic viscosities are the tabulated values of ITTC Recommended
Procedure 7.5-02-01-03, *Fresh Water and Seawater Properties* (2011), at 15 °C and 20 °C
(seawater of salinity 35 g/kg). Only those two temperatures are offered: the values are
table entries, not a fit.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

#: Standard gravity, m/s² (ISO 80000-3; CGPM 1901).
G = 9.80665

#: (fluid, temperature °C) -> (density kg/m³, kinematic viscosity m²/s), ITTC 7.5-02-01-03 (2011).
ITTC_2011 = {
    ("freshwater", 15): (999.10, 1.1386e-6),
    ("freshwater", 20): (998.21, 1.0034e-6),
    ("seawater", 15): (1025.9, 1.189e-6),
    ("seawater", 20): (1024.8, 1.051e-6),
}


#: Standard atmospheric pressure at the surface, Pa (ISO 2533 standard atmosphere).
P_ATM = 101325.0

#: Saturated vapour pressure of water, Pa, by temperature °C: ITTC 7.5-02-01-03 (2011) fresh
#: water (from memory; the steam-table values 1.705 and 2.339 kPa). Seawater takes the same
#: values: salt lowers them about 2 %, so cavitation is predicted marginally early.
VAPOUR_PA = {15: 1705.0, 20: 2339.0}


@dataclass(frozen=True)
class Water:
    """Fluid properties used by the trim.

    Attributes
    ----------
    name : str
        "seawater", "freshwater" or "density given".
    density : float
        kg/m³.
    viscosity : float
        Kinematic viscosity, m²/s.
    temperature_c : float
        °C the table values are for.
    source : str
        Where the numbers come from, in words.
    vapour_pa : float
        Saturated vapour pressure, Pa (:data:`VAPOUR_PA`).
    """

    name: str
    density: float
    viscosity: float
    temperature_c: float
    source: str
    vapour_pa: float = VAPOUR_PA[15]

    def as_dict(self) -> dict:
        return asdict(self)


def water(fluid="seawater", temperature_c: int = 15, viscosity: float | None = None) -> Water:
    """Resolve the ``[flight]`` fluid to density and viscosity.

    Parameters
    ----------
    fluid : "seawater" | "freshwater" | float
        A named fluid (ITTC 2011 table) or a density in kg/m³.
    temperature_c : 15 | 20
        Table temperature, °C.
    viscosity : float, optional
        Kinematic viscosity, m²/s; overrides the table. With a numeric density and no
        viscosity, the table fluid of the nearer density at ``temperature_c`` lends its
        viscosity (stated in ``source``).

    Returns
    -------
    Water
    """
    t = int(temperature_c)
    if (("seawater", t)) not in ITTC_2011:
        raise ValueError(f"temperature_c must be 15 or 20 (ITTC 2011 table values), got {temperature_c}")
    src = "ITTC 7.5-02-01-03 (2011)"
    if isinstance(fluid, str):
        rho, nu = ITTC_2011[(fluid, t)]
        if viscosity is not None:
            nu, src = float(viscosity), f"density {src}, viscosity given"
        return Water(fluid, rho, nu, t, f"{src}, {t} °C", VAPOUR_PA[t])
    rho = float(fluid)
    if viscosity is not None:
        return Water("density given", rho, float(viscosity), t, "density and viscosity given", VAPOUR_PA[t])
    near = min(("seawater", "freshwater"), key=lambda k: abs(ITTC_2011[(k, t)][0] - rho))
    return Water("density given", rho, ITTC_2011[(near, t)][1], t,
                 f"density given; viscosity of {near} at {t} °C, {src}", VAPOUR_PA[t])
