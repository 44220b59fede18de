"""Strict number types of the spec and the limits every spec stays within.

TOML has booleans, so a lax float would read ``chord = true`` as a 1 mm chord: every
number in the spec is strict (an integer is accepted where a float is meant; a boolean
or a string is not). Limits no real design needs keep hostile specs from asking for
hours of work or gigabytes of memory; each is checked before any work starts.
"""

from __future__ import annotations

from typing import Annotated

from pydantic import Field, Strict, StrictInt

from .. import defaults

#: A number: int or float, finite (the models set ``allow_inf_nan=False``), never a bool.
Num = Annotated[float, Strict()]

#: A whole number, never a bool.
Int = StrictInt

#: Largest distance of anything from the datum origin, mm. The largest hydrofoil set is
#: well under 3 m long; beyond this float round-off on a 1 mm feature would be visible
#: (1e20 mm positions divided by zero in the planform).
MAX_DATUM_MM = 10_000.0

#: A datum coordinate, mm.
DatumMM = Annotated[Num, Field(ge=-MAX_DATUM_MM, le=MAX_DATUM_MM)]

#: Stations per surface. A curved planform is described well by 10-20 stations; 1,000
#: stations once built for over 120 s and took 1.8 GB.
MAX_STATIONS = 100

#: Surfaces per spec (a foil set has 2-4; studies compare specs, not surfaces).
MAX_SURFACES = 12

#: Template span positions per surface (``shop.templates_at``); 100k positions once ran
#: past 120 s.
MAX_TEMPLATES = 200

#: Hot-wire cut positions per surface (``shop.hotwire_cuts``): a panel per pair.
MAX_HOTWIRE_CUTS = 100

#: Check positions per surface (``check_at``): each one slices the written solid.
MAX_CHECK_AT = 100

#: Split positions per printed surface (``printing.split_at``): one joint each.
MAX_SPLITS = 100

#: Bolt holes, shims and spar channels per surface (``mount.hole``, ``mount.shim``,
#: ``printing.spar``): a mount has 2-8 bolts; each hole is a boolean cut that costs about
#: 1.7 s (30 holes added 51 s to a build).
MAX_HOLES = 16
MAX_SHIMS = 8
MAX_SPARS = 8

#: Trim speeds of ``[flight] speeds_kmh``: each one is a trim of the whole lattice (15,000
#: speeds made check take 108 s); a takeoff-to-top-speed list has 4-10.
MAX_SPEEDS = 50

#: Chord positions of an offset table (``shop.offset_pct``): a shop table has 10-30 columns.
MAX_OFFSET_COLUMNS = 100

#: Named sections of a spec: at most one per station of every surface.
MAX_SECTIONS = MAX_SURFACES * MAX_STATIONS

#: Values of every kind in a spec (keys, numbers, strings, tables); a full spec has a few
#: hundred. Two million unknown keys once took 68 s and printed two million lines.
MAX_SPEC_VALUES = 20_000

#: Memory the vortex-lattice matrices may take, bytes, computed from the panel count before
#: anything is allocated. Solving holds about LATTICE_MATRICES float64 arrays of N x N for
#: N panels (normal influence, three velocity components at the force points, the Trefftz
#: wash, the solver's copy and its factorisation). A four-surface lattice at the largest
#: panel counts once reached 12.7 GB; twelve surfaces would have asked for 68.7 GiB.
MAX_LATTICE_BYTES = defaults.LATTICE_MEMORY_BUDGET_BYTES  # one budget: the lattice checks it again
LATTICE_MATRICES = defaults.LATTICE_MATRICES


def lattice_bytes(n_panels: int) -> int:
    """Memory the lattice solution of ``n_panels`` panels takes, bytes (see MAX_LATTICE_BYTES)."""
    return LATTICE_MATRICES * 8 * int(n_panels) ** 2


def lattice_panels(surfaces, span_panels: int, chord_panels: int, vertical: bool) -> int:
    """Panels of the largest lattice the hydrodynamics builds for these surface specs:
    horizontal wings and stabilizers, plus masts and fins when ``vertical``; a mirrored part
    gets ``span_panels`` strips per half."""
    n = 0
    for s in surfaces:
        lifting = s.role in ("wing", "stabilizer") and s.orientation == "horizontal"
        if lifting or vertical:
            n += (2 if s.mirror else 1) * span_panels * chord_panels
    return n
