"""The design-study commands: compare, family, sweep."""

from __future__ import annotations

import json
import sys

import click

from ..errors import SpecError
from . import _project, json_option, main, out_option, outside_option, spec_argument


# -- design studies ----------------------------------------------------------------------------
def _option_value(parse, text: str, option: str):
    """``parse(text)`` of a command-line value; its refusal becomes a usage error naming the option."""
    try:
        return parse(text)
    except SpecError as exc:
        raise click.BadParameter("; ".join(exc.problems), param_hint=option) from None


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


def _study_done(project, table, out_dir, as_json, pairs=(), specs=None, others=(), built=False):
    """Print and write the table; with ``--build``, exit 3 if a variant could not be built or
    checked, 1 if a variant's check found a fault (the table is written either way)."""
    from ..outputs import inputs as made_from
    from ..studies import build_failures, study_outputs, to_json, to_text

    click.echo(json.dumps(to_json(table), indent=1) if as_json else to_text(table))
    outs = study_outputs(project, table, pairs, specs)
    if others:  # made from the whole spec and the other spec files too
        for o in outs:
            o.inputs = made_from.whole(project.spec) + made_from.files(others)
    done = project.write(table.kind, outs)
    click.echo(f"written: {', '.join(str(p) for p in done.files)}", err=True)
    if built:
        errors, faults = build_failures(table)
        if errors or faults:
            click.echo(f"{table.kind} --build: {errors} variant(s) could not be built or checked, {faults} "
                       f"failed their check (see the table; exit {3 if errors else 1})", err=True)
            sys.exit(3 if errors else 1)


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
def compare(spec, changes, others, jobs, scheduler, cruise_kmh, as_json, out_dir):
    """What if: the base set and each change (or other spec) side by side: wing and stabilizer
    lift at trim, drag and lift/drag, neutral point, static margin, net centre of pressure
    from the mast and the mast move that restores it, takeoff speed."""
    from ..studies import Executor, parse_change
    from ..studies import compare as do_compare

    project = _project(spec, out_dir)
    sets = [[_option_value(parse_change, c, "--change") for c in group.split(";") if c.strip()] for group in changes]
    if not sets and not others:
        raise click.UsageError("compare: give at least one --change or --with")
    table = do_compare(project, sets, others, executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh)
    _study_done(project, table, out_dir, as_json, others=others)


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
def family(spec, surface, areas, keep, do_build, jobs, scheduler, cruise_kmh, as_json, out_dir):
    """A size family: one spec per target projected area of a surface, with a table of every
    size's area, span, MAC, volume, neutral point and takeoff speed."""
    from ..studies import Executor, parse_values
    from ..studies import family as do_family

    project = _project(spec, out_dir)
    table, specs = do_family(project, surface, _option_value(parse_values, areas, "--areas"), keep,
                             executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh,
                             build_root=(project.out_dir / "family") if do_build else None)
    _study_done(project, table, out_dir, as_json, specs=specs, built=do_build)


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
def sweep(spec, axes, grid, plot_pairs, do_build, jobs, scheduler, cruise_kmh, as_json, out_dir):
    """Vary spec values over lists or ranges, alone or as a grid; analyse every variant and
    write a table (CSV, Parquet, JSON) and plots of chosen outputs against chosen inputs."""
    from ..studies import FIGURES, Executor, parse_values
    from ..studies import sweep as do_sweep

    project = _project(spec, out_dir)
    parsed = {}
    for a in axes:
        path, eq, vals = a.partition("=")
        if not eq:
            raise click.BadParameter(f"'{a}': expected PATH=VALUES", param_hint="--vary")
        parsed[path.strip()] = _option_value(parse_values, vals, "--vary")
    pairs = []
    for p in plot_pairs:
        y, sep, x = p.partition(":")
        if not sep or y not in FIGURES or x not in parsed:
            import difflib

            close = difflib.get_close_matches(y, list(FIGURES), n=1, cutoff=0.3) if y not in FIGURES else []
            raise click.BadParameter(f"'{p}': expected OUTPUT:INPUT with OUTPUT one of {', '.join(FIGURES)} and "
                                     f"INPUT one of the varied values ({', '.join(parsed)})"
                                     + (f"; closest output: '{close[0]}'" if close else ""), param_hint="--plot")
        pairs.append((y, x))
    if not pairs:
        pairs = [(y, x) for x in parsed for y in ("stab_lift_pct_weight", "cp_from_mast_mm", "lift_to_drag")]
    table = do_sweep(project, parsed, grid=grid, executor=Executor(jobs, scheduler, _Bar()), cruise_kmh=cruise_kmh,
                     build_root=(project.out_dir / "variants") if do_build else None)
    _study_done(project, table, out_dir, as_json, pairs, built=do_build)
