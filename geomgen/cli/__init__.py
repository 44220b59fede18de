"""Command line: thin wrappers over the library. Heavy imports live inside the commands so
``geomgen --help`` never loads the CAD kernel.

Shared options are defined once (:func:`spec_argument`, :func:`out_option`, :func:`json_option`,
:func:`outside_option`); every command makes one :class:`~geomgen.project.Project` and hands
it to the pipeline; one error handler (:class:`Commands`) turns geomgen's errors, disk and
permission failures and Ctrl-C into one line each and an exit code.
"""

from __future__ import annotations

import os
import sys
import time

# The dense solves here are small (vortex lattice, 2D panels): one BLAS thread runs them
# faster than two fighting over a shared 2-core machine (bench/bench_hydro.py: the demo
# balance 0.75 s against 2-6 s under load). Set before numpy loads; a user's setting wins.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import click  # noqa: E402

from .. import __version__  # noqa: E402
from ..errors import CheckFailed, ExportError, GeometryError, GeomgenError, SpecError

#: exit code and the word that starts each message, per kind of failure
KIND = {SpecError: "spec error", GeometryError: "geometry error", ExportError: "cannot write",
        CheckFailed: "check failed"}


def escaped(text: str) -> str:
    """``text`` with every control or text-reordering character written as an escape
    (``\\x1b``): a message echoing a name from a spec or a file name never drives the terminal."""
    import unicodedata

    def one(c: str) -> str:
        if unicodedata.category(c) in ("Cc", "Cf", "Cs") and c not in "\u200d":
            return f"\\x{ord(c):02x}" if ord(c) < 0x100 else f"\\u{ord(c):04x}"
        return c
    return "".join(one(c) for c in str(text))


def _fail(exc: GeomgenError, spec: str | None = None):
    lines = exc.problems if isinstance(exc, SpecError) else [str(exc)]
    lines = [escaped(line) for line in lines]
    if isinstance(exc, GeometryError) and spec and not lines[0].startswith(str(spec)):
        # the refusal comes from what the spec asks for: name the file, as spec errors do
        lines = [f"{escaped(spec)}: {lines[0]}"] + lines[1:]
    kind = next((w for cls, w in KIND.items() if isinstance(exc, cls)), "error")
    from ..defaults import MAX_ERROR_LINES

    for line in lines[:MAX_ERROR_LINES]:
        click.echo(f"{kind}: {line}", err=True)
    if len(lines) > MAX_ERROR_LINES:
        click.echo(f"{kind}: … and {len(lines) - MAX_ERROR_LINES} more not shown", err=True)
    if isinstance(exc, SpecError) and len(lines) > 1:
        click.echo(f"{len(lines)} problems; nothing was written.", err=True)
    sys.exit(exc.exit_code)


#: click's "no arguments: show the help" (a UsageError in click ≥ 8.2): shown as click shows it
_HELP = getattr(click.exceptions, "NoArgsIsHelpError", ())


def _usage(exc: click.UsageError):
    """A command-line mistake: the usage, then one 'usage error:' line; exit 2."""
    if isinstance(exc, _HELP):
        raise exc
    if exc.ctx is not None:
        click.echo(exc.ctx.get_usage(), err=True)
        click.echo(f"Try '{exc.ctx.command_path} -h' for help.", err=True)
    click.echo(f"usage error: {exc.format_message()}", err=True)
    sys.exit(2)


class Commands(click.Group):
    """The group with the one error handler of every command."""

    def make_context(self, info_name, args, parent=None, **extra):
        try:  # the group's own options (before the command name)
            return super().make_context(info_name, args, parent, **extra)
        except click.UsageError as exc:
            _usage(exc)

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except click.UsageError as exc:  # a command's options or arguments, or a BadParameter
            _usage(exc)
        except GeomgenError as exc:
            _fail(exc, ctx.meta.get("geomgen.spec"))
        except OSError as exc:  # a disk or permission failure outside a writer: not a geometry error
            where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
            click.echo(escaped(f"cannot read or write: {where}{exc.strerror or exc}"), err=True)
            sys.exit(3)
        except KeyboardInterrupt:
            _interrupted()
        except ImportError as exc:
            # Ctrl-C while an extension module (the CAD kernel) initialises comes out as
            # "ImportError: initialization failed" with the KeyboardInterrupt as its cause
            if _caused_by_interrupt(exc):
                _interrupted()
            raise


def _interrupted():
    click.echo("interrupted; outputs are written whole or not at all", err=True)
    sys.exit(130)


def _caused_by_interrupt(exc: BaseException) -> bool:
    seen = set()
    cur: BaseException | None = exc
    while cur is not None and id(cur) not in seen:
        if isinstance(cur, KeyboardInterrupt):
            return True
        seen.add(id(cur))
        cur = cur.__cause__ or cur.__context__
    return False


class _Progress:
    """Prints progress to stderr once a command has run a couple of seconds (or on a tty)."""

    def __init__(self, after: float = 2.0):
        self.t0 = time.perf_counter()
        self.after = 0.0 if sys.stderr.isatty() else after

    def __call__(self, msg: str):
        dt = time.perf_counter() - self.t0
        if dt >= self.after:
            click.echo(f"[{dt:5.1f} s] {msg}", err=True)


# -- shared options, defined once ------------------------------------------------------
def _remember_spec(ctx, param, value):
    ctx.meta["geomgen.spec"] = value  # meta is shared by every context of the run
    return value


def spec_argument(f):
    return click.argument("spec", type=click.Path(dir_okay=False), callback=_remember_spec)(f)


def out_option(f):
    return click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
                        help="output folder [default: out/<spec file name without .toml>]")(f)


def json_option(f):
    return click.option("--json", "as_json", is_flag=True, help="machine-readable output (JSON on stdout)")(f)


def _to_root(ctx, param, value):
    """Store a global flag on the root context, whichever command line place gave it."""
    if value:
        root = ctx.find_root()
        root.ensure_object(dict)[param.name] = True
    return value


def outside_option(f):
    """The global options, accepted before or after the command name."""
    f = click.option("--allow-outside-files", "allow_outside_files", is_flag=True, expose_value=False,
                     callback=_to_root, help="let the spec read coordinate files outside its own folder")(f)
    return click.option("--overwrite-edited", "overwrite_edited", is_flag=True, expose_value=False,
                        callback=_to_root, help="replace outputs edited since geomgen wrote them (else refused)")(f)


def stl_tol_option(f):
    return click.option("--stl-tol", type=click.FloatRange(min=0.001, max=5.0), default=None,
                        help="STL chordal deviation from the B-spline surface, mm [default 0.05]")(f)


def _project(spec, out_dir=None, stl_tol=None):
    """The one project of this command, with the global options wherever they were given."""
    from .. import defaults
    from ..project import Project

    root = click.get_current_context().find_root().obj or {}
    return Project(spec, out_dir, allow_outside_files=bool(root.get("allow_outside_files")),
                   stl_tol=stl_tol or defaults.STL_LINEAR_TOL_MM,
                   overwrite_edited=bool(root.get("overwrite_edited")))


@click.group(cls=Commands, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="geomgen")
@outside_option
@click.pass_context
def main(ctx):
    """geomgen: a lifting-surface spec (TOML) to STEP solids and STL meshes, measured back.

    Frame: x aft, y starboard, z up; mm and degrees. Outputs go to one folder per spec
    (default out/<spec name>): cad/, print/, drawings/, report/, with geomgen-index.md listing
    every file. Exit codes: 0 ok, 1 a check failed, 2 the spec or the command line is wrong,
    3 geometry could not be made or a file could not be written, 130 interrupted.
    One run writes into a folder at a time; outputs edited since geomgen wrote them are
    refused unless --overwrite-edited is given (before the command).
    """
    ctx.ensure_object(dict)


from . import commands, studies  # noqa: E402,F401  (register the commands on main)
