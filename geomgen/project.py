"""The project: one spec, loaded and validated once per command, with everything worked out
from it shared by every pipeline that command runs.

A :class:`Project` holds the validated spec, its file and folder, the output folder, the
options (outside coordinate files allowed or not, STL tolerance), the geometry models, and
a memo of results computed once (the lattice solution, the solids, the check). Pipelines
take a project, never a path: ``geomgen report`` loads the spec once, builds the models
once and solves the lattice once, whatever it calls.

Results from higher layers (hydrodynamics, CAD, check) are stored with :meth:`Project.memo`
by the functions of those layers, so this module imports nothing above the geometry.
"""

from __future__ import annotations

import copy
from functools import cached_property
from pathlib import Path
from typing import Any, Callable

from . import defaults
from .outputs import spec_digest


def default_out_dir(spec_path) -> Path:
    """The one default output folder: ``out/<spec file stem>`` (``make demo`` follows it)."""
    return Path("out") / Path(spec_path).stem


class Project:
    """One spec and what is computed from it, once.

    Parameters
    ----------
    spec_path : path of the spec (TOML)
    out_dir : output folder; default :func:`default_out_dir`
    allow_outside_files : let the spec read coordinate files outside its own folder
    stl_tol : STL chordal deviation from the B-spline skin, mm
    overwrite_edited : replace outputs edited since geomgen wrote them (else refused)

    Raises
    ------
    SpecError
        Every problem of the spec at once (exit 2).
    """

    def __init__(self, spec_path, out_dir=None, *, allow_outside_files: bool = False,
                 stl_tol: float = defaults.STL_LINEAR_TOL_MM, overwrite_edited: bool = False):
        from .spec import load_spec

        self.spec_path = Path(spec_path)
        self.spec = load_spec(self.spec_path, allow_outside_files)
        self.spec_sha256 = spec_digest(self.spec_path)
        self.out_dir = Path(out_dir) if out_dir is not None else default_out_dir(spec_path)
        self.allow_outside_files = allow_outside_files
        self.stl_tol = float(stl_tol)
        self.overwrite_edited = bool(overwrite_edited)  # replace outputs edited since geomgen wrote them
        self._memo: dict[Any, Any] = {}

    @classmethod
    def of(cls, spec_or_project, out_dir=None, **options) -> "Project":
        """A project from a path, or a project itself (library callers may pass either).

        A project passed with another ``out_dir`` or other options (``stl_tol``,
        ``overwrite_edited``; ``allow_outside_files=True``) is not changed: the call gets a
        project of its own with those settings, sharing the loaded spec and the geometry
        models (they depend on the spec alone) but none of the results (they depend on the
        folder and the options). ``None`` and ``allow_outside_files=False`` ask for nothing."""
        if not isinstance(spec_or_project, Project):
            return cls(spec_or_project, out_dir, **{k: v for k, v in options.items() if v is not None})
        p = spec_or_project
        want = {k: v for k, v in options.items() if v is not None and getattr(p, k) != v
                and not (k == "allow_outside_files" and not v)}
        if (out_dir is None or Path(out_dir) == p.out_dir) and not want:
            return p
        if "allow_outside_files" in want:  # the spec must be read again under the wider rule
            return cls(p.spec_path, out_dir if out_dir is not None else p.out_dir,
                       **{"stl_tol": p.stl_tol, "overwrite_edited": p.overwrite_edited, **want})
        q = copy.copy(p)  # shares spec, digest and the cached models
        q.out_dir = Path(out_dir) if out_dir is not None else p.out_dir
        for k, v in want.items():
            setattr(q, k, float(v) if k == "stl_tol" else v)
        q._memo = {}
        return q

    @property
    def name(self) -> str:
        """The output set's name (the spec's ``name``)."""
        return self.spec.name

    @property
    def source(self) -> str:
        """The spec file as messages name it."""
        return str(self.spec_path)

    @cached_property
    def models(self) -> list:
        """Geometry models of every surface, in spec order (built once)."""
        from .geometry import build_models

        return build_models(self.spec)

    def model(self, name: str):
        return next(m for m in self.models if m.name == name)

    def memo(self, key, make: Callable[[], Any]):
        """The result stored under ``key``, computed by ``make()`` the first time."""
        if key not in self._memo:
            self._memo[key] = make()
        return self._memo[key]

    @property
    def input_digests(self) -> dict[str, str]:
        """key -> fingerprint of every input of the spec (see :mod:`geomgen.outputs.inputs`)."""
        from .outputs.inputs import digests

        return digests(self.spec)

    def output_info(self, command: str, **extra) -> dict:
        """What the manifest records with each file a command writes (and the fingerprints of
        the spec's inputs now, so a commit knows which earlier files are stale)."""
        return {"set": self.name, "spec": self.spec_path.name, "spec_sha256": self.spec_sha256,
                "command": command, "input_digests": self.input_digests, **extra}

    def write(self, command: str, outputs: list, say=None, **extra):
        """Write ``outputs`` of ``command`` into the output set, whole or not at all, with this
        project's options (see :func:`geomgen.outputs.write_set`). Each file records the
        fingerprints of its own ``Output.inputs`` (all of the spec where not given)."""
        from .outputs import write_set

        info = self.output_info(command, **extra)
        info["inputs_of"] = {o.name: o.inputs for o in outputs if o.inputs is not None}
        return write_set(self.out_dir, outputs, info, say, overwrite_edited=self.overwrite_edited)
