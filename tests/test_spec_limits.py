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


def test_the_lattice_limit_is_one_number_in_readme_and_messages(tmp_path):
    from conftest import ROOT

    from geomgen.errors import SpecError
    from geomgen.hydro.lattice import build_lattice
    from geomgen.project import Project

    stated = f"{defaults.LATTICE_MAX_PANELS:,} panels"
    assert defaults.LATTICE_MAX_PANELS == 4096
    readme = (ROOT / "README.md").read_text()
    assert stated in readme and "4,380" not in readme
    text = wing_spec().replace("[[surface]]", "[flight]\nmass_kg = 80\nspeeds_kmh = [20]\n"
                                              "span_panels = 100\nchord_panels = 40\n[[surface]]", 1)
    refused_quickly(tmp_path, text, stated)
    p = tmp_path / "w.toml"
    p.write_text(wing_spec())
    with pytest.raises(SpecError, match=stated):
        build_lattice(Project(p, tmp_path / "o").models * 4, 100, 40)


def test_every_list_and_table_of_names_in_the_schema_has_a_count_limit():
    from geomgen.spec.model import Spec

    schema = Spec.model_json_schema()
    unbounded = []

    def walk(node, where):
        if isinstance(node, dict):
            if node.get("type") == "array" and "maxItems" not in node and "prefixItems" not in node:
                unbounded.append(where)
            if node.get("type") == "object" and "additionalProperties" in node and "maxProperties" not in node \
                    and isinstance(node["additionalProperties"], dict):
                unbounded.append(where)
            for k, v in node.items():
                walk(v, f"{where}.{k}")
        elif isinstance(node, list):
            for i, v in enumerate(node):
                walk(v, f"{where}[{i}]")
    walk(schema, "spec")
    assert unbounded == [], unbounded


@pytest.mark.parametrize("extra,words", [
    ("[surface.mount]\npad_x = [20, 120]\npad_width = 40\npad_z = 0\n"
     + "[[surface.mount.hole]]\nx = 50\ny = 0\ndiameter = 5\n" * 17,
     ("hole", "16")),
])
def test_count_limits_of_holes_are_refused_naming_the_list(tmp_path, extra, words):
    refused_quickly(tmp_path, wing_spec(extra=extra), *words)


def test_too_many_trim_speeds_are_refused_naming_the_list(tmp_path):
    speeds = ", ".join(str(10 + i * 0.1) for i in range(types.MAX_SPEEDS + 1))
    text = wing_spec().replace("[[surface]]", f"[flight]\nmass_kg = 80\nspeeds_kmh = [{speeds}]\n[[surface]]", 1)
    refused_quickly(tmp_path, text, "speeds_kmh", str(types.MAX_SPEEDS))
