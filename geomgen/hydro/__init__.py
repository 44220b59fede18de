"""Hydrodynamics of a foil set: vortex-lattice method, neutral point and trim; the free surface,
cavitation (2D panel method), drag and power, where the rider stands.

Pure numpy/scipy (no CAD kernel). Entry points: :func:`analyse` and :func:`format_hydro`.
"""

from .analysis import analyse, analyse_spec, balance_of, neutral_point
from .results import (
                      Cavitation,
                      FreeSurface,
                      HydroResult,
                      Lateral,
                      Loading,
                      Performance,
                      Stance,
                      SurfaceHydro,
                      Takeoff,
                      TrimPoint,
)
from .text import format_hydro
from .water import ITTC_2011, G, Water, water
from .whatif import shim_trim_change

__all__ = ["shim_trim_change", "analyse", "balance_of", "analyse_spec", "neutral_point", "format_hydro", "HydroResult",
           "SurfaceHydro", "TrimPoint", "Takeoff", "Lateral", "Loading", "Water", "water", "G", "ITTC_2011",
           "FreeSurface", "Cavitation", "Performance", "Stance"]
