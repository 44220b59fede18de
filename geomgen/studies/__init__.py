"""Design studies: what-if comparisons, size families and sweeps, on one machine or many.

Variants are spec text made from the project's spec data (:mod:`.changes`), evaluated by the
vortex-lattice analysis in this process, on a local process pool or on a Dask cluster
(:mod:`.run`), into tables, plots and files (:mod:`.study`, :mod:`.tables`).
"""

from .changes import Change, apply, parse_change
from .figures import FIGURES, variant_figures
from .run import Executor, Task, evaluate
from .study import Table, compare, family, parse_values, sweep
from .tables import build_failures, study_outputs, to_csv, to_json, to_text

__all__ = ["build_failures", "Change", "apply", "parse_change", "FIGURES", "variant_figures", "Executor", "Task",
           "evaluate", "Table",
           "compare", "family", "parse_values", "sweep", "study_outputs", "to_csv", "to_json", "to_text"]
