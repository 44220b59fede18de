"""Limits no real design needs, checked before any work starts, each message naming the field
and the limit (listed in README's limits table)."""

from __future__ import annotations

import time

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen import defaults
from geomgen.cli import main
from geomgen.spec import types


def refused_quickly(tmp_path, text, *words):
    p = tmp_path / "s.toml"
    p.write_text(text)
    t0 = time.perf_counter()
    r = CliRunner().invoke(main, ["balance", str(p), "-o", str(tmp_path / "out")])
    took = time.perf_counter() - t0
    assert r.exit_code == 2 and "Traceback" not in r.output, r.output
    for w in words:
        assert w in r.output, (w, r.output)
    assert not (tmp_path / "out").exists()
    return took, r.output


def test_stations_per_surface(tmp_path):
    n = types.MAX_STATIONS + 1
    stations = [dict(y=i, chord=200 - 0.1 * i) for i in range(n)]
    refused_quickly(tmp_path, wing_spec(stations=stations), 'surface[0] "w" station', f"at most {types.MAX_STATIONS}")


def test_surfaces_per_spec(tmp_path):
    text = wing_spec(name="s0")
    surf = text[text.index("[[surface]]"):]
    text += "".join(surf.replace('name = "s0"', f'name = "x{i}"', 1) for i in range(types.MAX_SURFACES))
    refused_quickly(tmp_path, text, "surface", f"at most {types.MAX_SURFACES}")


def test_template_positions_and_hotwire_cuts(tmp_path):
    ys = ", ".join(f"{0.01 * i:.2f}" for i in range(types.MAX_TEMPLATES + 1))
    refused_quickly(tmp_path, wing_spec(extra=f"[surface.shop]\ntemplates_at = [{ys}]\n"),
                    "shop templates_at", f"at most {types.MAX_TEMPLATES}")
    cuts = ", ".join(f"{i}" for i in range(types.MAX_HOTWIRE_CUTS + 1))
    refused_quickly(tmp_path, wing_spec(extra=f"[surface.shop]\nhotwire_cuts = [{cuts}]\n"),
                    "shop hotwire_cuts", f"at most {types.MAX_HOTWIRE_CUTS}")


def test_unknown_keys_are_counted_and_refused_fast(tmp_path):
    """Two million unknown keys once took 68 s and printed two million lines."""
    junk = "\n".join(f"k{i} = 1" for i in range(types.MAX_SPEC_VALUES + 10))
    took, out = refused_quickly(tmp_path, wing_spec() + "[surface.expect]\n" + junk + "\n",
                                f"more than {types.MAX_SPEC_VALUES}")
    assert took < 10 and len(out.splitlines()) < 5


def test_lattice_memory_is_budgeted_from_the_panel_count(tmp_path):
    """Twelve surfaces at the largest counts would ask for a 68.7 GiB matrix: refused before
    anything is allocated, naming the fields and the limit."""
    text = wing_spec().replace("[[surface]]", "[flight]\nmass_kg = 80\nspeeds_kmh = [20]\n"
                                              "span_panels = 100\nchord_panels = 40\n[[surface]]", 1)
    took, out = refused_quickly(tmp_path, text, "flight span_panels, chord_panels", "8000 lattice panels", "1 GiB")
    assert took < 10
    n = 8000
    assert types.lattice_bytes(n) == defaults.LATTICE_MATRICES * 8 * n * n  # one budget with the lattice


def test_the_lattice_refuses_before_allocating_when_called_with_more(tmp_path):
    from geomgen.errors import SpecError
    from geomgen.hydro.lattice import build_lattice
    from geomgen.project import Project

    p = tmp_path / "s.toml"
    p.write_text(wing_spec())
    models = Project(p, tmp_path / "o").models
    with pytest.raises(SpecError, match="GiB"):
        build_lattice(models * 4, 100, 40)


def test_a_full_spec_at_default_counts_is_well_inside_the_budget():
    assert types.lattice_bytes(4 * 2 * 16 * 6) < types.MAX_LATTICE_BYTES / 20
