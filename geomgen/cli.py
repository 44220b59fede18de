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
from pathlib import Path

# The dense solves here are small (vortex lattice, 2D panels): one BLAS thread runs them
# faster than two fighting over a shared 2-core machine (bench/bench_hydro.py: the demo
# balance 0.75 s against 2-6 s under load). Set before numpy loads; a user's setting wins.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import click  # noqa: E402

from . import CAUTION, __version__  # noqa: E402
from .errors import CheckFailed, ExportError, GeomgenError, GeometryError, SpecError

#: exit code and the word that starts each message, per kind of failure
KIND = {SpecError: "spec error", GeometryError: "geometry error", ExportError: "cannot write",
        CheckFailed: "check failed"}


def _fail(exc: GeomgenError):
    lines = exc.problems if isinstance(exc, SpecError) else [str(exc)]
    kind = next((w for cls, w in KIND.items() if isinstance(exc, cls)), "error")
    from .defaults import MAX_ERROR_LINES

    for line in lines[:MAX_ERROR_LINES]:
        click.echo(f"{kind}: {line}", err=True)
    if len(lines) > MAX_ERROR_LINES:
        click.echo(f"{kind}: … and {len(lines) - MAX_ERROR_LINES} more not shown", err=True)
    if isinstance(exc, SpecError) and len(lines) > 1:
        click.echo(f"{len(lines)} problems; nothing was written.", err=True)
    sys.exit(exc.exit_code)


class Commands(click.Group):
    """The group with the one error handler of every command."""

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except GeomgenError as exc:
            _fail(exc)
        except OSError as exc:  # a disk or permission failure outside a writer: not a geometry error
            where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
            click.echo(f"cannot read or write: {where}{exc.strerror or exc}", err=True)
            sys.exit(3)
        except KeyboardInterrupt:
            click.echo("interrupted; outputs are written whole or not at all", err=True)
            sys.exit(130)


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
def spec_argument(f):
    return click.argument("spec", type=click.Path(dir_okay=False))(f)


def out_option(f):
    return click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
                        help="output folder [default: out/<spec file name without .toml>]")(f)


def json_option(f):
    return click.option("--json", "as_json", is_flag=True, help="machine-readable output (JSON on stdout)")(f)


def outside_option(f):
    return click.option("--allow-outside-files", "allow_outside_files", is_flag=True, default=False,
                        help="let the spec read coordinate files outside its own folder")(f)


def overwrite_option(f):
    return click.option("--overwrite-edited", "overwrite_edited", is_flag=True, default=False,
                        help="replace outputs edited since geomgen wrote them (else refused)")(f)


def stl_tol_option(f):
    return click.option("--stl-tol", type=click.FloatRange(min=0.001, max=5.0), default=None,
                        help="STL chordal deviation from the B-spline surface, mm [default 0.05]")(f)


def _project(spec, out_dir=None, allow_outside_files=False, stl_tol=None):
    """The one project of this command (global ``--allow-outside-files`` counts too)."""
    from . import defaults
    from .project import Project

    root = click.get_current_context().find_root().obj or {}
    return Project(spec, out_dir, allow_outside_files=bool(allow_outside_files or root.get("allow_outside_files")),
                   stl_tol=stl_tol or defaults.STL_LINEAR_TOL_MM,
                   overwrite_edited=bool(root.get("overwrite_edited")))


@click.group(cls=Commands, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="geomgen")
@outside_option
@overwrite_option
@click.pass_context
def main(ctx, allow_outside_files, overwrite_edited):
    """geomgen: a lifting-surface spec (TOML) to STEP solids and STL meshes, measured back.

    Frame: x aft, y starboard, z up; mm and degrees. Outputs go to one folder per spec
    (default out/<spec name>): cad/, print/, drawings/, report/, with geomgen-index.md listing
    every file. Exit codes: 0 ok, 1 a check failed, 2 the spec or the command line is wrong,
    3 geometry could not be made or a file could not be written, 130 interrupted.
    One run writes into a folder at a time; outputs edited since geomgen wrote them are
    refused unless --overwrite-edited is given (before the command).
    """
    ctx.obj = {"allow_outside_files": allow_outside_files, "overwrite_edited": overwrite_edited}


@main.command()
@spec_argument
@out_option
@stl_tol_option
@click.option("--no-stl", is_flag=True, help="write STEP only")
@click.option("--3mf", "with_3mf", is_flag=True, help="also write a 3MF (mm) of each surface's mesh")
@outside_option
def build(spec, out_dir, stl_tol, no_stl, with_3mf, allow_outside_files):
    """Build every surface of SPEC: a STEP solid and a binary STL per surface, plus an
    assembly STEP with every surface named."""
    from .build import build as do_build, format_build_summary

    formats = ("step",) if no_stl else ("step", "stl")
    project = _project(spec, out_dir, allow_outside_files, stl_tol)
    res = do_build(project, formats=formats + (("3mf",) if with_3mf else ()), progress=_Progress())
    click.echo(format_build_summary(res))


@main.command()
@spec_argument
@out_option
@click.option("--rebuild", is_flag=True, help="build again even if the outputs are fresh")
@stl_tol_option
@json_option
@outside_option
def check(spec, out_dir, rebuild, stl_tol, as_json, allow_outside_files):
    """Measure the files a build of SPEC wrote and hold them against the intended figures and
    the spec's expect/check_at tables. Builds first when outputs are missing or stale.

    Exit 0 all agree and pass; 1 an expectation failed or a written file departs from the
    intended geometry (a geometry fault); 2 spec error; 3 geometry error.
    """
    import json

    from .check.run import check as do_check
    from .check.text import format_terminal

    res = do_check(_project(spec, out_dir, allow_outside_files, stl_tol), rebuild=rebuild, progress=_Progress())
    click.echo(json.dumps(res.as_dict(), indent=2, default=float) if as_json else format_terminal(res))
    sys.exit(0 if res.ok else 1)


@main.command()
@spec_argument
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="also write the summary (text and JSON) into this output folder's report/")
@click.option("--cg", "cg_x", type=float, default=None,
              help="datum x of the centre of gravity, mm (gives the static margin)")
@click.option("--sideslip", is_flag=True, help="also put masts and fins in the lattice (side force)")
@json_option
@outside_option
def balance(spec, out_dir, cg_x, sideslip, as_json, allow_outside_files):
    """Neutral point, lift split and trim of the foil set in SPEC (vortex-lattice method).

    Trims at the speeds of the spec's [flight] table: front wing and stabilizer lift, the
    net centre of pressure and where the weight must act, relative to the mast.
    """
    import json

    from .hydro import balance_of, format_hydro

    project = _project(spec, out_dir, allow_outside_files)
    res = balance_of(project, cg_x_mm=cg_x, include_vertical=sideslip or None)
    text = format_hydro(res)
    click.echo(json.dumps(res.as_dict(), indent=2) if as_json else text)
    if out_dir is not None:
        from .outputs import Output, output_name

        done = project.write("balance", [
            Output(output_name(project.name, "balance", suffix=".txt"), "text", text,
                   "what the balance command printed: neutral point, lift split, trim"),
            Output(output_name(project.name, "balance", suffix=".json"), "json", res.as_dict(),
                   "the balance as JSON")])
        for n in done.notes():
            click.echo(f"note: {n}", err=True)


@main.command()
@spec_argument
@click.option("--speed", "speed_kmh", type=click.FloatRange(0.1, 200.0), required=True,
              help="speed of the stated condition, km/h (no default: say which condition you mean)")
@click.option("--load-factor", type=click.FloatRange(0.1, 20.0), required=True,
              help="lift as a multiple of the [flight] weight (1 = steady flight; no default)")
@click.option("--material", type=str, default=None,
              help="a material of the example table (see the error for the list), or give --e-gpa and --g-gpa")
@click.option("--e-gpa", type=click.FloatRange(0.1, 1000.0), default=None, help="Young's modulus along the span, GPa")
@click.option("--g-gpa", type=click.FloatRange(0.05, 500.0), default=None, help="shear modulus, GPa")
@click.option("--density", "density", type=click.FloatRange(10.0, 30000.0), default=None,
              help="material density, kg/m³ (mast frequency)")
@click.option("--allowable", "allowable_mpa", type=click.FloatRange(0.1, 10000.0), default=None,
              help="your allowable bending stress, MPa: gives a margin (never a verdict)")
@click.option("--side-force", "side_force_n", type=click.FloatRange(1.0, 1e5), default=100.0, show_default=True,
              help="side force at the mast's end (the fuselage) for the mast figures, N")
@out_option
@json_option
@outside_option
def loads(spec, speed_kmh, load_factor, material, e_gpa, g_gpa, density, allowable_mpa, side_force_n, out_dir,
          as_json, allow_outside_files):
    """First estimates (for planning, not a structural analysis) of SPEC's loads and stiffness:
    shear, bending moment, stress, tip deflection and twist of wings and stabilizers at a
    stated speed and load factor; mast deflection, stress and torsional stiffness per side
    force. Writes the summary and JSON into the output folder's report/."""
    import json

    from .strength import format_loads, loads as do_loads, material_of, write_loads

    mat = material_of(material, e_gpa, g_gpa, density)
    project = _project(spec, out_dir, allow_outside_files)
    res = do_loads(project, speed_kmh, load_factor, mat, allowable_mpa, side_force_n)
    text = format_loads(res)
    click.echo(json.dumps(res, indent=2) if as_json else text)
    done = write_loads(project, res, text)
    for n in done.notes():
        click.echo(f"note: {n}", err=True)


@main.command()
@spec_argument
@out_option
@outside_option
def drawings(spec, out_dir, allow_outside_files):
    """Shaper's drawings of SPEC: 1:1 section templates (DXF and SVG with scale rulers),
    offset tables (CSV) and hot-wire profiles with matching point counts."""
    from .drawings import format_shop_summary, write_shop_drawings

    project = _project(spec, out_dir, allow_outside_files)
    click.echo(format_shop_summary(write_shop_drawings(project, progress=_Progress())))


@main.command()
@spec_argument
@out_option
@outside_option
def report(spec, out_dir, allow_outside_files):
    """One self-contained design report of SPEC (HTML with embedded plots, plus Markdown and
    JSON): views with MAC, neutral point and centres of pressure, sections, spanwise plots,
    the check table and the trim table. Builds and checks first when needed.

    Exit 1 when the check finds a fault or a failed expectation (the report is still written)."""
    from .report import write_report

    project = _project(spec, out_dir, allow_outside_files)
    files = write_report(project, progress=_Progress())
    click.echo(f"geomgen {__version__}: report of '{project.spec_path.name}' written:")
    click.echo("\n".join(f"  {p}" for p in files))
    click.echo(f"open {files[0]} in a browser (no network needed)")
    for n in files.notes:
        click.echo(f"note: {n}")
    if not files.ok:
        click.echo("the check found a geometry fault or a failed expectation: see the report's check table "
                   "(exit 1)", err=True)
    click.echo("CAUTION: " + CAUTION)
    sys.exit(0 if files.ok else 1)


@main.command()
@spec_argument
@out_option
@outside_option
def parts(spec, out_dir, allow_outside_files):
    """Shop parts of SPEC from its [surface.mount], [surface.printing] and [surface.laminate]
    tables: the surface with mounting pad and bolt holes, incidence shims, printable pieces
    with locators and spar channels (STL and 3MF), cores and two-half moulds. Every solid is
    checked before anything is written."""
    from .parts import format_parts_summary, write_shop_parts

    project = _project(spec, out_dir, allow_outside_files)
    click.echo(format_parts_summary(write_shop_parts(project, progress=_Progress())))


# -- design studies ----------------------------------------------------------------------------
def _executor_options(f):
    f = click.option("-j", "--jobs", type=click.IntRange(1, 256), default=1,
                     help="local worker processes [default 1]")(f)
    f = click.option("--scheduler", default=None, metavar="ADDRESS",
                     help="run on a Dask distributed scheduler (e.g. tcp://10.0.0.5:8786); workers need geomgen")(f)
    f = click.option("--cruise", "cruise_kmh", type=click.FloatRange(min=1.0, max=200.0), default=None,
                     help="speed the variants are compared at, km/h [default: the middle [flight] speed]")(f)
    return f


class _Bar:
    """A progress bar on the terminal (stderr), a line every 10 % otherwise."""

    def __init__(self):
        self.tty, self.last = sys.stderr.isatty(), -1

    def __call__(self, done: int, total: int):
        if total <= 0:
            return
        if self.tty:
            n = int(30 * done / total)
            click.echo(f"\r[{'#' * n}{'.' * (30 - n)}] {done}/{total}", err=True, nl=done == total)
        elif done * 10 // total != self.last:
            self.last = done * 10 // total
            click.echo(f"{done}/{total} variants", err=True)


def _study_done(project, table, out_dir, as_json, pairs=(), specs=None):
    import json

    from .studies import study_outputs, to_json, to_text

    click.echo(json.dumps(to_json(table), indent=1) if as_json else to_text(table))
    done = project.write(table.kind, study_outputs(project, table, pairs, specs))
    click.echo(f"written: {', '.join(str(p) for p in done.files)}", err=True)


@main.command()
@spec_argument
@click.option("--change", "changes", multiple=True, metavar="CHANGE",
              help="one variant: PATH=VALUE, area:NAME*FACTOR[:aspect|span|chord], move:NAME+MM, shim:NAME+DEG, "
                   "mast+MM; several in one variant joined by ';' (repeat --change for more variants)")
@click.option("--with", "others", multiple=True, type=click.Path(dir_okay=False, exists=True),
              help="another spec file to compare with the base")
@_executor_options
@json_option
@out_option
@outside_option
def compare(spec, changes, others, jobs, scheduler, cruise_kmh, as_json, out_dir, allow_outside_files):
    """What if: the base set and each change (or other spec) side by side: wing and stabilizer
    lift at trim, drag and lift/drag, neutral point, static margin, net centre of pressure
    from the mast and the mast move that restores it, takeoff speed."""
    from .studies import Executor, compare as do_compare, parse_change

    project = _project(spec, out_dir, allow_outside_files)
    sets = [[parse_change(c) for c in group.split(";") if c.strip()] for group in changes]
    if not sets and not others:
        raise SpecError(["compare: give at least one --change or --with"])
    table = do_compare(project, sets, others, executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh)
    _study_done(project, table, out_dir, as_json)


@main.command()
@spec_argument
@click.option("--surface", required=True, help="the surface to scale (its name in the spec)")
@click.option("--areas", required=True, help="target projected areas, cm²: a,b,c or start:stop:step")
@click.option("--keep", type=click.Choice(["aspect", "span", "chord"]), default="aspect", show_default=True,
              help="what stays while the area changes")
@click.option("--build", "do_build", is_flag=True, help="also build and check every size (slow)")
@_executor_options
@json_option
@out_option
@outside_option
def family(spec, surface, areas, keep, do_build, jobs, scheduler, cruise_kmh, as_json, out_dir,
           allow_outside_files):
    """A size family: one spec per target projected area of a surface, with a table of every
    size's area, span, MAC, volume, neutral point and takeoff speed."""
    from .studies import Executor, family as do_family, parse_values

    project = _project(spec, out_dir, allow_outside_files)
    table, specs = do_family(project, surface, parse_values(areas), keep,
                             executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh,
                             build_root=(project.out_dir / "family") if do_build else None)
    _study_done(project, table, out_dir, as_json, specs=specs)


@main.command()
@spec_argument
@click.option("--vary", "axes", multiple=True, required=True, metavar="PATH=VALUES",
              help="a spec value and its values: surface[stabilizer].incidence=-1:1:0.5 or flight.mass_kg=70,80,90")
@click.option("--grid", is_flag=True, help="every combination of the values (default: one value at a time)")
@click.option("--plot", "plot_pairs", multiple=True, metavar="OUTPUT:INPUT",
              help="plot a figure against a varied value (default: stabilizer lift, centre of pressure and "
                   "lift/drag against each)")
@click.option("--build", "do_build", is_flag=True, help="also build and check every variant (slow)")
@_executor_options
@json_option
@out_option
@outside_option
def sweep(spec, axes, grid, plot_pairs, do_build, jobs, scheduler, cruise_kmh, as_json, out_dir,
          allow_outside_files):
    """Vary spec values over lists or ranges, alone or as a grid; analyse every variant and
    write a table (CSV, Parquet, JSON) and plots of chosen outputs against chosen inputs."""
    from .studies import FIGURES, Executor, parse_values, sweep as do_sweep

    project = _project(spec, out_dir, allow_outside_files)
    parsed = {}
    for a in axes:
        path, eq, vals = a.partition("=")
        if not eq:
            raise SpecError([f"--vary '{a}': expected PATH=VALUES"])
        parsed[path.strip()] = parse_values(vals)
    pairs = []
    for p in plot_pairs:
        y, sep, x = p.partition(":")
        if not sep or y not in FIGURES or x not in parsed:
            raise SpecError([f"--plot '{p}': expected OUTPUT:INPUT with OUTPUT one of {', '.join(FIGURES)} and "
                             f"INPUT one of the varied values ({', '.join(parsed)})"])
        pairs.append((y, x))
    if not pairs:
        pairs = [(y, x) for x in parsed for y in ("stab_lift_pct_weight", "cp_from_mast_mm", "lift_to_drag")]
    table = do_sweep(project, parsed, grid=grid, executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh,
                     build_root=(project.out_dir / "variants") if do_build else None)
    _study_done(project, table, out_dir, as_json, pairs)


@main.command()
def schema():
    """Print the JSON Schema of the spec (for editors)."""
    import json

    from .spec.model import Spec

    click.echo(json.dumps(Spec.model_json_schema(), indent=2))


@main.command()
@click.argument("path", type=click.Path(dir_okay=False), default="foil.toml")
def new(path):
    """Write a commented starter spec to PATH (default foil.toml) that builds as written."""
    import os

    from .starter import STARTER

    p = Path(path)
    if p.exists() or p.is_symlink():
        raise SpecError([f"{p} exists; geomgen does not overwrite files it did not write"])
    if not p.parent.is_dir():
        raise SpecError([f"{p}: the folder {p.parent} does not exist"])
    try:  # O_EXCL: never through a link, never over a file that appeared meanwhile
        fd = os.open(p, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644)
    except FileExistsError:
        raise SpecError([f"{p} exists; geomgen does not overwrite files it did not write"]) from None
    except OSError as exc:
        raise ExportError(f"{p}: {exc.strerror or exc}") from None
    with os.fdopen(fd, "w") as f:
        f.write(STARTER)
    click.echo(f"wrote {p}; build it with: geomgen build {p}")


if __name__ == "__main__":  # pragma: no cover
    main()
