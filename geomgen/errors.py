"""One exception tree; the CLI maps each branch to an exit code."""

from __future__ import annotations


class GeomgenError(Exception):
    """Base of every error geomgen raises on purpose."""

    exit_code = 1


class SpecError(GeomgenError):
    """The spec (or the command line) is wrong. Carries every problem found at once.

    Parameters
    ----------
    problems : list of str
        One message per problem, each naming the file and the field path.
    """

    exit_code = 2

    def __init__(self, problems):
        if isinstance(problems, str):
            problems = [problems]
        self.problems = list(problems)
        super().__init__("\n".join(self.problems))


class GeometryError(GeomgenError):
    """Geometry could not be made (invalid loft, crossing sections); nothing is written."""

    exit_code = 3


class ExportError(GeomgenError):
    """An output file could not be written; earlier outputs are left as they were."""

    exit_code = 3


class CheckFailed(GeomgenError):
    """A check or an expectation failed."""

    exit_code = 1
