"""The check pass: measure the written files, compare with the intended figures and the
calculation sheet (``expect``), report. Kernel access goes through ``geomgen.cad.measure``."""
