"""3D shop parts, the numpy side: plans for the mounting interface, printable pieces,
cores and moulds (positions, sizes, wall checks, poses), the 3MF writer and the summary.

Nothing here imports the CAD kernel; :mod:`geomgen.cad.shop` turns the plans into solids.
"""
