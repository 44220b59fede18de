"""Command line: thin wrappers over the library. Heavy imports live inside the commands so
``geomgen --help`` never loads the CAD kernel."""

from __future__ import annotations

import sys
import time
from pathlib import Path

import click

from . import CAUTION, __version__
from .errors import GeomgenError, SpecError


def _fail(exc: GeomgenError):
    lines = exc.problems if isinstance(exc, SpecError) else [str(exc)]
    kind = {2: "spec error", 3: "geometry error"}.get(exc.exit_code, "error")
    for line in lines:
        click.echo(f"{kind}: {line}", err=True)
    if isinstance(exc, SpecError) and len(lines) > 1:
        click.echo(f"{len(lines)} problems; nothing was written.", err=True)
    sys.exit(exc.exit_code)


def _run(fn, *args, **kwargs):
    try:
        return fn(*args, **kwargs)
    except GeomgenError as exc:
        _fail(exc)


class _Progress:
    """Prints progress to stderr once a command has run a couple of seconds (or on a tty)."""

    def __init__(self, after: float = 2.0):
        self.t0 = time.perf_counter()
        self.after = 0.0 if sys.stderr.isatty() else after
        self.pending: list[str] = []

    def __call__(self, msg: str):
        dt = time.perf_counter() - self.t0
        if dt >= self.after:
            click.echo(f"[{dt:5.1f} s] {msg}", err=True)


def _outside() -> bool:
    ctx = click.get_current_context()
    return bool((ctx.find_root().obj or {}).get("allow_outside_files"))


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="geomgen")
@click.option("--allow-outside-files", is_flag=True,
              help="let a spec read coordinate files outside its own folder")
@click.pass_context
def main(ctx, allow_outside_files):
    """geomgen: a lifting-surface spec (TOML) to STEP solids and STL meshes, measured back.

    Frame: x aft, y starboard, z up; mm and degrees. Exit codes: 0 ok, 1 a check failed,
    2 the spec or the command line is wrong, 3 geometry could not be made or written.
    """
    ctx.obj = {"allow_outside_files": allow_outside_files}


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="output folder [default: out/<spec name>]")
@click.option("--stl-tol", type=click.FloatRange(min=0.001, max=5.0), default=None,
              help="STL chordal deviation from the B-spline surface, mm [default 0.05]")
@click.option("--no-stl", is_flag=True, help="write STEP only")
@click.option("--3mf", "with_3mf", is_flag=True, help="also write a 3MF (mm) of each part's mesh")
def build(spec, out_dir, stl_tol, no_stl, with_3mf):
    """Build every surface of SPEC: a STEP solid and a binary STL per part, plus an
    assembly STEP with every part named."""
    from . import defaults
    from .build import build as do_build

    out = Path(out_dir) if out_dir else Path("out") / Path(spec).stem
    formats = ("step",) if no_stl else ("step", "stl")
    res = _run(do_build, spec, out, formats=formats + (("3mf",) if with_3mf else ()),
               stl_tol=stl_tol or defaults.STL_LINEAR_TOL_MM, progress=_Progress(),
               allow_outside_files=_outside())
    click.echo(format_build_summary(res))


def format_build_summary(res) -> str:
    """Files written and the intended figures per part, as aligned text."""
    lines = [f"geomgen {__version__}: built '{res.spec_name}' into {res.out_dir} in {res.seconds:.1f} s", ""]
    lines.append(f"{'part':<16} {'role':<10} {'span mm':>9} {'area cm²':>10} {'AR':>6} {'MAC mm':>8} "
                 f"{'volume cm³':>11}")
    for p in res.parts:
        f = p.figures
        lines.append(f"{p.name:<16} {p.role:<10} {f.span_mm:9.1f} {f.projected_area_cm2:10.1f} "
                     f"{f.aspect_ratio:6.2f} {f.mac_mm:8.2f} {f.volume_cm3:11.1f}")
    lines += ["", "intended figures (from the spec); 'geomgen check' measures the files."]
    if res.notes:
        lines += [""] + [f"note: {n}" for n in res.notes]
    lines += ["", "written:"]
    lines += [f"  {p}" for p in res.files]
    lines += ["", "CAUTION: " + CAUTION]
    return "\n".join(lines)


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="output folder of the build [default: out/<spec name>]")
@click.option("--rebuild", is_flag=True, help="build again even if the outputs are fresh")
@click.option("--stl-tol", type=click.FloatRange(min=0.001, max=5.0), default=None,
              help="STL chordal deviation of the build being checked, mm [default 0.05]")
@click.option("--json", "as_json", is_flag=True, help="machine-readable output")
def check(spec, out_dir, rebuild, stl_tol, as_json):
    """Measure the files a build of SPEC wrote and hold them against the intended figures and
    the spec's expect/check_at tables. Builds first when outputs are missing or stale.

    Exit 0 all agree and pass; 1 an expectation failed or a written file departs from the
    intended geometry (a geometry fault); 2 spec error; 3 geometry error.
    """
    import json

    from .check.text import format_terminal
    from .check.run import check as do_check

    from . import defaults

    res = _run(do_check, spec, out_dir, rebuild=rebuild, stl_tol=stl_tol or defaults.STL_LINEAR_TOL_MM,
               progress=_Progress(), allow_outside_files=_outside())
    click.echo(json.dumps(res.as_dict(), indent=2, default=float) if as_json else format_terminal(res))
    sys.exit(0 if res.ok else 1)


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--cg", "cg_x", type=float, default=None,
              help="datum x of the centre of gravity, mm (gives the static margin)")
@click.option("--sideslip", is_flag=True, help="also put masts and fins in the lattice (side force)")
@click.option("--json", "as_json", is_flag=True, help="machine-readable output")
def balance(spec, cg_x, sideslip, as_json):
    """Neutral point, lift split and trim of the foil set in SPEC (vortex-lattice method).

    Trims at the speeds of the spec's [flight] table: front wing and stabilizer lift, the
    net centre of pressure and where the weight must act, relative to the mast.
    """
    import json

    from .hydro import analyse_spec, format_hydro
    from .spec import load_spec

    res = _run(lambda: analyse_spec(load_spec(spec, _outside()), cg_x_mm=cg_x, include_vertical=sideslip or None))
    click.echo(json.dumps(res.as_dict(), indent=2) if as_json else format_hydro(res))


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="output folder [default: out/<spec name>]")
def drawings(spec, out_dir):
    """Shaper's drawings of SPEC: 1:1 section templates (DXF and SVG with scale rulers),
    offset tables (CSV) and hot-wire profiles with matching point counts."""
    from .drawings import format_shop_summary, write_shop_drawings

    out = Path(out_dir) if out_dir else Path("out") / Path(spec).stem
    click.echo(format_shop_summary(_run(write_shop_drawings, spec, out, progress=_Progress())))


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="output folder [default: out/<spec name>]")
def report(spec, out_dir):
    """One self-contained design report of SPEC (HTML with embedded plots, plus Markdown and
    JSON): views with MAC, neutral point and centres of pressure, sections, spanwise plots,
    the check table and the trim table. Builds and checks first when needed."""
    from .report import write_report

    out = Path(out_dir) if out_dir else Path("out") / Path(spec).stem
    files = _run(write_report, spec, out, progress=_Progress())
    click.echo(f"geomgen {__version__}: report of '{Path(spec).name}' written:")
    click.echo("\n".join(f"  {p}" for p in files))
    click.echo(f"open {files[0]} in a browser (no network needed)")
    click.echo("CAUTION: " + CAUTION)


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="output folder [default: out/<spec name>]")
def parts(spec, out_dir):
    """Shop parts of SPEC from its [surface.mount], [surface.printing] and [surface.laminate]
    tables: the part with mounting pad and bolt holes, incidence shims, printable pieces with
    locators and spar channels (STL and 3MF), cores and two-half moulds. Every solid is
    checked before anything is written."""
    from .parts import format_parts_summary, write_shop_parts

    out = Path(out_dir) if out_dir else Path("out") / Path(spec).stem
    click.echo(format_parts_summary(_run(write_shop_parts, spec, out, progress=_Progress())))


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
    from .starter import STARTER

    p = Path(path)
    if p.exists():
        _fail(SpecError([f"{p} exists; geomgen does not overwrite files it did not write"]))
    p.write_text(STARTER)
    click.echo(f"wrote {p}; build it with: geomgen build {p}")


if __name__ == "__main__":  # pragma: no cover
    main()
