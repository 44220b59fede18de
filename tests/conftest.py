"""Shared fixtures: small specs written as text, and a built demo set (slow, once)."""

from __future__ import annotations

import textwrap
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "specs" / "demo-foilset.toml"


def wing_spec(*, name="w", mirror=True, interpolation="linear", te=0.0, incidence=0.0, stations=None,
              section="naca = \"0012\"", extra="", orientation="horizontal", reference=0.25) -> str:
    """A one-surface spec as TOML text. ``stations``: list of dicts (y, chord, x, z, twist)."""
    stations = stations or [dict(y=0, chord=200), dict(y=400, chord=100)]
    st = ""
    for s in stations:
        st += "[[surface.station]]\nsection = \"a\"\n" + "".join(f"{k} = {v}\n" for k, v in s.items())
    return textwrap.dedent(f"""\
        format = 1
        name = "t"
        [datum]
        origin = "test origin"
        [sections.a]
        {section}
        [[surface]]
        name = "{name}"
        role = "wing"
        mirror = {str(mirror).lower()}
        orientation = "{orientation}"
        interpolation = "{interpolation}"
        te_thickness = {te}
        incidence = {incidence}
        reference = {reference}
        {extra}
        """) + st


@pytest.fixture
def write_spec(tmp_path):
    """Write spec text to a file in tmp_path and return its path."""

    def _write(text: str, name: str = "spec.toml") -> Path:
        p = tmp_path / name
        p.write_text(text)
        return p

    return _write


@pytest.fixture(scope="session")
def demo_build(tmp_path_factory):
    """The demo spec built once per test session (STEP + STL)."""
    from geomgen.build import build

    out = tmp_path_factory.mktemp("demo")
    return build(DEMO, out)


def snapshot(folder) -> dict:
    """Relative POSIX path -> bytes of every file under ``folder`` (hidden staging folders too)."""
    folder = Path(folder)
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def files_in(folder) -> set:
    """Relative POSIX paths of every file under ``folder``."""
    return set(snapshot(folder))
