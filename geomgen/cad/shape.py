"""Lifting surfaces and shop bodies as the writers see them: a name, an OCP solid, a mesh.

:class:`SurfaceShape` lofts a surface model once (lazily) and meshes its skin at any chordal
tolerance; :func:`shapes_of` keeps one per surface on the project, so every command of a run
lofts each surface at most once. :class:`Body` wraps a solid (and a mesh made beforehand) of
a shop part for the same writers.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

from .. import defaults
from ..geometry.surface import SurfaceModel
from ..geometry.tessellate import surface_mesh
from . import export  # noqa: F401  (registers the step/stl/3mf writers in the one writer table)


@dataclass
class SurfaceShape:
    """One lifting surface on its way to files: model, and (lazily) solid and meshes."""

    model: SurfaceModel
    _meshes: dict = field(default_factory=dict, repr=False)

    @property
    def name(self) -> str:
        return self.model.name

    @property
    def skin(self):
        return self.model.skin

    @cached_property
    def solid(self):
        from .loft import loft_surface

        return loft_surface(self.model)

    def mesh(self, tol: float = defaults.STL_LINEAR_TOL_MM):
        """(vertices (n, 3) mm, faces (m, 3)) of the same skin, chordal deviation ``tol`` mm."""
        if tol not in self._meshes:
            self._meshes[tol] = surface_mesh(self.model, tol)
        return self._meshes[tol]


@dataclass
class Body:
    """A shop part's solid under a name, with its mesh if one was made (STL/3MF)."""

    name: str
    solid: object = None
    triangles: tuple | None = None

    def mesh(self, tol: float = defaults.STL_LINEAR_TOL_MM):
        if self.triangles is None:
            from .mesh import mesh

            self.triangles = mesh(self.solid, tol, self.name)
        return self.triangles


def shapes_of(project) -> list[SurfaceShape]:
    """One :class:`SurfaceShape` per surface of the project, made once per run."""
    return project.memo("cad.shapes", lambda: [SurfaceShape(m) for m in project.models])


def shape_of(project, name: str) -> SurfaceShape:
    return next(s for s in shapes_of(project) if s.name == name)
