"""geomgen: lifting-surface spec to CNC- and print-ready CAD, measured back.

The geometry core (``geomgen.sections``, ``geomgen.geometry``, ``geomgen.spec``) is pure
numpy/scipy and never imports the CAD kernel; only ``geomgen.cad`` does.
"""

__version__ = "0.1.0"

CAUTION = (
    "Geometry and first estimates only: no structural check, no fatigue, no certification. "
    "A wing or mast that breaks at speed, and a sharp trailing edge, can injure. Verify "
    "strength and behaviour by test and by qualified engineering; follow local rules."
)
