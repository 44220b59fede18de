"""The commands that build, check, draw, make shop parts, balance, estimate loads and report."""

from __future__ import annotations

import json
import os
import sys
from pathlib import Path

import click

from .. import CAUTION, __version__
from ..errors import ExportError, SpecError
from . import _Progress, _project, json_option, main, out_option, outside_option, spec_argument, stl_tol_option


@main.command()
@spec_argument
@out_option
@stl_tol_option
@click.option("--no-stl", is_flag=True, help="write STEP only")
@click.option("--3mf", "with_3mf", is_flag=True, help="also write a 3MF (mm) of each surface's mesh")
@outside_option
def build(spec, out_dir, stl_tol, no_stl, with_3mf):
    """Build every surface of SPEC: a STEP solid and a binary STL per surface, plus an
    assembly STEP with every surface named."""
    from ..build import build as do_build
    from ..build import format_build_summary

    formats = ("step",) if no_stl else ("step", "stl")
    project = _project(spec, out_dir, stl_tol)
    res = do_build(project, formats=formats + (("3mf",) if with_3mf else ()), progress=_Progress())
    click.echo(format_build_summary(res))


@main.command()
@spec_argument
@out_option
@click.option("--rebuild", is_flag=True, help="build again even if the outputs are fresh")
@stl_tol_option
@json_option
@outside_option
def check(spec, out_dir, rebuild, stl_tol, as_json):
    """Measure the files a build of SPEC wrote and hold them against the intended figures and
    the spec's expect/check_at tables. Builds first when outputs are missing or stale.

    Exit 0 all agree and pass; 1 an expectation failed or a written file departs from the
    intended geometry (a geometry fault); 2 spec error; 3 geometry error.
    """
    from ..check.run import check as do_check
    from ..check.text import format_terminal

    res = do_check(_project(spec, out_dir, stl_tol), rebuild=rebuild, progress=_Progress())
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
def balance(spec, out_dir, cg_x, sideslip, as_json):
    """Neutral point, lift split and trim of the foil set in SPEC (vortex-lattice method).

    Trims at the speeds of the spec's [flight] table: front wing and stabilizer lift, the
    net centre of pressure and where the weight must act, relative to the mast.
    """
    from ..hydro import balance_of, format_hydro

    project = _project(spec, out_dir)
    res = balance_of(project, cg_x_mm=cg_x, include_vertical=sideslip or None)
    text = format_hydro(res)
    click.echo(json.dumps(res.as_dict(), indent=2) if as_json else text)
    if out_dir is not None:
        from ..outputs import Output, output_name
        from ..outputs import inputs as made_from

        made = made_from.set_geometry(project.spec, made_from.LOFT_ONLY) + made_from.flight(project.spec)
        done = project.write("balance", [
            Output(output_name(project.name, "balance", suffix=".txt"), "text", text,
                   "what the balance command printed: neutral point, lift split, trim", made),
            Output(output_name(project.name, "balance", suffix=".json"), "json", res.as_dict(),
                   "the balance as JSON", made)], options={"cg_x_mm": cg_x, "sideslip": bool(sideslip)})
        for n in done.notes():
            click.echo(f"note: {n}", err=True)


def _material_name(ctx, param, value):
    """--material: a name of the example table; else a usage error with the choices and the closest name."""
    if value is None:
        return None
    import difflib

    from ..strength.materials import MATERIALS

    if value in MATERIALS:
        return value
    close = difflib.get_close_matches(value, list(MATERIALS), n=1, cutoff=0.3)
    raise click.BadParameter(f"unknown material '{value}'" + (f" (closest: '{close[0]}')" if close else "")
                             + "; the example table has: " + ", ".join(MATERIALS) + " (or give --e-gpa and --g-gpa)",
                             ctx=ctx, param=param)


@main.command()
@spec_argument
@click.option("--speed", "speed_kmh", type=click.FloatRange(0.1, 200.0), required=True,
              help="speed of the stated condition, km/h (no default: say which condition you mean)")
@click.option("--load-factor", type=click.FloatRange(0.1, 20.0), required=True,
              help="lift as a multiple of the [flight] weight (1 = steady flight; no default)")
@click.option("--material", type=str, default=None, callback=_material_name,
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
          as_json):
    """First estimates (for planning, not a structural analysis) of SPEC's loads and stiffness:
    shear, bending moment, stress, tip deflection and twist of wings and stabilizers at a
    stated speed and load factor; mast deflection, stress and torsional stiffness per side
    force. Writes the summary and JSON into the output folder's report/."""
    from ..strength import format_loads, material_of, write_loads
    from ..strength import loads as do_loads

    if material is None and (e_gpa is None or g_gpa is None):
        from ..strength.materials import MATERIALS

        raise click.UsageError("name a material (--material, one of: " + ", ".join(MATERIALS) + ") or give both "
                               "--e-gpa and --g-gpa", ctx=click.get_current_context())
    mat = material_of(material, e_gpa, g_gpa, density)
    project = _project(spec, out_dir)
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
def drawings(spec, out_dir):
    """Shaper's drawings of SPEC: 1:1 section templates (DXF and SVG with scale rulers),
    offset tables (CSV) and hot-wire profiles with matching point counts."""
    from ..drawings import format_shop_summary, write_shop_drawings

    project = _project(spec, out_dir)
    click.echo(format_shop_summary(write_shop_drawings(project, progress=_Progress())))


@main.command()
@spec_argument
@out_option
@outside_option
def report(spec, out_dir):
    """One self-contained design report of SPEC (HTML with embedded plots, plus Markdown and
    JSON): views with MAC, neutral point and centres of pressure, sections, spanwise plots,
    the check table and the trim table. Builds and checks first when needed.

    Exit 1 when the check finds a fault or a failed expectation (the report is still written)."""
    from ..report import write_report

    project = _project(spec, out_dir)
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
def parts(spec, out_dir):
    """Shop parts of SPEC from its [surface.mount], [surface.printing] and [surface.laminate]
    tables: the surface with mounting pad and bolt holes, incidence shims, printable pieces
    with locators and spar channels (STL and 3MF), cores and two-half moulds. Every solid is
    checked before anything is written."""
    from ..parts import format_parts_summary, write_shop_parts

    project = _project(spec, out_dir)
    click.echo(format_parts_summary(write_shop_parts(project, progress=_Progress())))


@main.command()
def schema():
    """Print the JSON Schema of the spec (for editors)."""
    from ..spec.model import Spec

    click.echo(json.dumps(Spec.model_json_schema(), indent=2))


@main.command()
@click.argument("path", type=click.Path(dir_okay=False), default="foil.toml")
def new(path):
    """Write a commented starter spec to PATH (default foil.toml) that builds as written."""
    from ..starter import STARTER

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
    try:
        with os.fdopen(fd, "w") as f:
            f.write(STARTER)
            f.flush()
            os.fsync(f.fileno())
    except BaseException as exc:  # made by this command a moment ago (O_EXCL): no half spec left
        try:
            os.remove(p)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise ExportError(f"{p}: {exc.strerror or exc} (nothing was written)") from None
        raise
    click.echo(f"wrote {p}; build it with: geomgen build {p}")
