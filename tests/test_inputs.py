"""Each output remembers the inputs it was made from: a spec edit makes stale only the files
one of whose own inputs changed, and says which input. Slow tests build solids."""

from __future__ import annotations

import json
import re

import pytest
from click.testing import CliRunner
from conftest import DEMO

from geomgen.cli import main
from geomgen.outputs import file_states, read_manifest
from geomgen.project import Project

SET = "lakeside-cruiser"
SHOP = '\n[surface.shop]\ntemplates_at = [90.0]\nkerf_mm = 0.9\n'


def run(*args):
    res = CliRunner().invoke(main, [str(a) for a in args])
    assert res.exit_code == 0, res.output
    return res


def demo(tmp_path, text=None):
    p = tmp_path / "demo.toml"
    p.write_text(text if text is not None else DEMO.read_text())
    return p


def edit(spec, old, new, count=1):
    text = spec.read_text()
    assert text.count(old) >= count, old
    spec.write_text(text.replace(old, new, count))


def with_stab_shop(text: str) -> str:
    """The demo with a [surface.shop] table on the stabilizer (before the mast's [[surface]])."""
    head, sep, tail = text.partition("# Mast:")
    return head + SHOP + "\n" + sep + tail


def files(out):
    return {p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file()}


def states(spec, out):
    project = Project(spec, out)
    return {f["name"]: f for f in file_states(out, project.name, project.output_info("check"))}


# -- without the CAD kernel: drawings and balance -------------------------------------------------
def test_mass_change_keeps_drawings(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    run("drawings", spec, "-o", out)
    run("balance", spec, "-o", out)
    drawings = {n for n in files(out) if n.startswith("drawings/")}
    assert len(drawings) > 10
    edit(spec, "mass_kg = 85.0", "mass_kg = 90.0")
    res = run("balance", spec, "-o", out)
    assert drawings <= files(out)
    assert "removed" not in res.output
    st = states(spec, out)
    assert all(st[n]["current"] for n in drawings)
    assert all(f["current"] for f in st.values()), [f for f in st.values() if not f["current"]]


def test_adding_shop_keeps_balance(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    run("balance", spec, "-o", out)
    balance = {f"report/{SET}-balance.txt", f"report/{SET}-balance.json"}
    assert balance <= files(out)
    spec.write_text(with_stab_shop(spec.read_text()))
    res = run("drawings", spec, "-o", out)
    assert balance <= files(out), res.output
    st = states(spec, out)
    assert all(st[n]["current"] for n in balance)
    # the drawings of the stabilizer carry its shop table; the other surfaces' do not depend on it
    entry = read_manifest(out)[f"drawings/{SET}-stabilizer-templates.dxf"]
    assert "surface[stabilizer].shop" in entry["inputs"]
    assert not any(k.startswith("surface[front-wing]") for k in entry["inputs"])
    assert "flight.mass_kg" not in entry["inputs"]


def test_stabilizer_edit_leaves_the_other_surfaces_drawings(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    run("drawings", spec, "-o", out)
    run("balance", spec, "-o", out)
    before = files(out)
    edit(spec, "chord = 42.0", "chord = 45.0")  # the stabilizer's tip chord
    st = states(spec, out)
    stale = {n for n, f in st.items() if not f["current"]}
    assert stale == {n for n in before if "-stabilizer-" in n} | {
        f"report/{SET}-drawings.txt", f"report/{SET}-balance.txt", f"report/{SET}-balance.json"}
    assert all(st[n]["changed"] == ["surface[stabilizer].station"] for n in stale if "-stabilizer-" in n)
    res = run("balance", spec, "-o", out)
    after = files(out)
    assert {n for n in before if "-front-wing-" in n or "-mast-" in n} <= after
    assert not {n for n in after if "-stabilizer-" in n}
    assert 'surface "stabilizer" station changed: removed' in res.output
    index = (out / "geomgen-index.md").read_text()
    assert "| current |" in index and "STALE" not in index


def _edited_offsets_then_stabilizer_incidence(tmp_path):
    """The stabilizer's offset table edited by hand, then its incidence changed in the spec."""
    spec, out = demo(tmp_path), tmp_path / "out"
    run("drawings", spec, "-o", out)
    csv = out / "drawings" / f"{SET}-stabilizer-offsets.csv"
    csv.write_text(csv.read_text() + "# my note\n")
    edit(spec, "incidence = 2.5", "incidence = 2.0")
    return spec, out, csv


def test_edited_stale_file_named_with_its_input(tmp_path):
    spec, out, csv = _edited_offsets_then_stabilizer_incidence(tmp_path)
    res = run("balance", spec, "-o", out)
    assert csv.exists()
    assert re.search(r'surface "stabilizer" incidence changed: left 1 stale file', res.output)
    index = (out / "geomgen-index.md").read_text()
    line = next(ln for ln in index.splitlines() if "stabilizer-offsets.csv" in ln)
    assert 'STALE: surface "stabilizer" incidence changed' in line


def test_section_file_bytes_are_an_input(tmp_path):
    from geomgen.sections import naca

    pts = naca("0012").loop(40)
    dat = tmp_path / "sec.dat"
    dat.write_text("x\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts))
    text = DEMO.read_text().replace('[sections.mast]\nnaca = "0013"', '[sections.mast]\nfile = "sec.dat"')
    spec, out = demo(tmp_path, text), tmp_path / "out"
    run("drawings", spec, "-o", out)
    pts = naca("0013").loop(40)
    dat.write_text("x\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts))
    st = states(spec, out)
    stale = {n for n, f in st.items() if not f["current"]}
    assert stale and all("-mast-" in n or n.endswith("-drawings.txt") for n in stale)
    assert st[f"drawings/{SET}-mast-offsets.csv"]["changed"] == ["sections.mast"]


# -- with solids --------------------------------------------------------------------------------
@pytest.mark.slow
def test_mass_change_keeps_solids_and_stabilizer_edit_only_its_files(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    run("build", spec, "-o", out)
    run("drawings", spec, "-o", out)
    run("balance", spec, "-o", out)
    solids = {n for n in files(out) if n.startswith(("cad/", "print/"))}
    assert len(solids) == 7
    edit(spec, "mass_kg = 85.0", "mass_kg = 90.0")
    res = run("balance", spec, "-o", out)
    assert "removed" not in res.output
    assert solids <= files(out)
    res = CliRunner().invoke(main, ["check", str(spec), "-o", str(out), "--json"])
    data = json.loads(res.stdout)
    assert data["built"] is False  # the solids are current: measured as they are
    assert data["stale_outputs"] == []
    by_name = {f["name"]: f for f in data["files"]}
    assert solids <= set(by_name) and all(by_name[n]["current"] for n in solids)
    text = CliRunner().invoke(main, ["check", str(spec), "-o", str(out)]).output
    assert f"cad/{SET}-stabilizer.step  [build]  current" in text
    assert f"report/{SET}-balance.json  [balance]  current" in text

    edit(spec, "chord = 42.0", "chord = 45.0")  # the stabilizer
    st = states(spec, out)
    stale = {n for n, f in st.items() if not f["current"]}
    assert stale == ({n for n in files(out) if "-stabilizer" in n}
                     | {f"cad/{SET}-assembly.step", f"report/{SET}-build.txt", f"report/{SET}-drawings.txt",
                        f"report/{SET}-balance.txt", f"report/{SET}-balance.json",
                        f"report/{SET}-check.md", f"report/{SET}-check.json"})  # as the spec is now
    others = {n for n in files(out) if n.startswith("drawings/") and "-stabilizer" not in n}
    text = CliRunner().invoke(main, ["check", str(spec), "-o", str(out)]).output
    # check rebuilds the solids (its own inputs changed); the rest of the stale files go, named
    assert 'surface "stabilizer" station changed' in text
    left = files(out)
    assert others and others <= left  # the front wing's and the mast's drawings stay
    assert not any(n.startswith(f"drawings/{SET}-stabilizer") for n in left)
    assert f"report/{SET}-balance.json" not in left


# -- every spec field in turn: what goes stale against what changes -------------------------------
RICH_SHOP = {"front-wing": {"templates_at": [200.0], "hotwire_cuts": [100.0, 300.0], "kerf_mm": 0.8},
             "stabilizer": {"templates_at": [90.0], "offset_pct": [0.0, 10.0, 30.0, 60.0, 100.0]}}

#: values to try for fields a number cannot stand for
CHOICES = {"interpolation": ["linear", "smooth"], "tip": ["flat", "round"], "fluid": ["seawater", "freshwater"],
           "paper": ["A4", "Letter"], "naca": ["2412", "0012"], "section": ["wing-tip", "stab", "wing-root"]}
#: fields left alone: names (they name the files), the spec format, orientation (a mast is vertical)
FIXED = {"name", "format", "orientation", "role"}


def _leaves(d, path=()):
    if isinstance(d, dict):
        for k, v in d.items():
            yield from _leaves(v, path + (k,))
    elif isinstance(d, list) and d and isinstance(d[0], dict):
        for i, v in enumerate(d):
            yield from _leaves(v, path + (i,))
    else:
        yield path, d


def _changed(v, key):
    if isinstance(v, bool):
        return not v
    if isinstance(v, (int, float)):
        return v + 1 if isinstance(v, int) else round(v * 1.04 + 0.3, 3)
    if isinstance(v, list) and v and isinstance(v[0], (int, float)):
        return [_changed(v[0], key)] + v[1:]
    if isinstance(v, str):
        options = [c for c in CHOICES.get(key, []) if c != v]
        return options[0] if options else v + " (moved)"
    return None


def _set(d, path, value):
    for k in path[:-1]:
        d = d[k]
    d[path[-1]] = value


def _truth(spec_path, tmp):
    """What each output would hold, made from ``spec_path`` by the code that makes it: the
    skin and mesh behind a surface's STEP and STL, the drawing files, the balance."""
    import hashlib

    import numpy as np

    from geomgen.build import fit_notes
    from geomgen.drawings import write_shop_drawings
    from geomgen.geometry.figures import intended_figures
    from geomgen.geometry.tessellate import surface_mesh
    from geomgen.hydro import balance_of, format_hydro

    def h(*parts):
        return hashlib.sha256(b"".join(p if isinstance(p, bytes) else repr(p).encode() for p in parts)).hexdigest()
    project = Project(spec_path, tmp)
    out = {}
    for m in project.models:
        sk = m.skin
        v, f = surface_mesh(m, 0.05)
        geo = h(sk.tu.tobytes(), sk.tv.tobytes(), np.round(sk.poles, 9).tobytes(), m.te_open, m.te_thickness,
                np.round(v, 9).tobytes(), f.tobytes())
        out[f"cad/{SET}-{m.name}.step"] = out[f"print/{SET}-{m.name}.stl"] = geo
    out[f"cad/{SET}-assembly.step"] = h(*[out[f"cad/{SET}-{m.name}.step"] + m.name for m in project.models])
    out[f"report/{SET}-build.txt"] = h([intended_figures(m).as_dict() for m in project.models], fit_notes(project),
                                       [(m.name, m.role) for m in project.models])
    drawn = tmp / "drawn"
    write_shop_drawings(project, drawn)
    for p in drawn.rglob("*"):
        if p.is_file() and p.parent != drawn:
            text = p.read_bytes() if p.suffix != ".txt" or "report" not in p.parts else \
                re.sub(rb"\(\d+ files, [\d.]+ s\)", b"", p.read_bytes())
            out[p.relative_to(drawn).as_posix()] = h(text)
    res = balance_of(project)
    out[f"report/{SET}-balance.txt"] = out[f"report/{SET}-balance.json"] = h(format_hydro(res), res.as_dict())
    return out


@pytest.mark.slow
def test_each_field_stales_exactly_the_outputs_that_read_it(tmp_path):
    """Change every field of a rich spec in turn. A file whose content changes must be stale
    (nothing is kept that is wrong); a file called stale must be one whose content the
    change reaches, but for fields the code reads and that happen not to matter in this
    spec (listed below, each with why)."""
    import tomllib

    import tomli_w

    base = tomllib.loads(DEMO.read_text())
    for sf in base["surface"]:
        if sf["name"] in RICH_SHOP:
            sf["shop"] = dict(RICH_SHOP[sf["name"]])
    spec = tmp_path / "rich.toml"
    spec.write_text(tomli_w.dumps(base))
    out = tmp_path / "out"
    for cmd in ("build", "drawings", "balance"):
        run(cmd, spec, "-o", out)
    truth0 = _truth(spec, tmp_path / "t0")
    written = {n for n in files(out) if n in truth0}
    assert len(written) == len(truth0) > 30

    tried, unsafe, extra = 0, [], {}
    for path, value in _leaves(base):
        key = path[-1]
        if key in FIXED or (len(path) > 1 and path[0] == "datum"):
            continue
        if "station" in path and path[path.index("station") + 1] > 1:
            continue  # the station table is one input: two stations of each surface stand for all
        new = _changed(value, key)
        if new is None or new == value:
            continue
        variant = json.loads(json.dumps(base))
        _set(variant, path, new)
        vpath = tmp_path / "v.toml"
        vpath.write_text(tomli_w.dumps(variant))
        try:
            truth = _truth(vpath, tmp_path / f"t{tried + 1}")
        except Exception as exc:  # a change the spec refuses (a range, a section's edge): not a case
            if type(exc).__name__ in ("SpecError", "GeometryError"):
                continue
            raise
        tried += 1
        project = Project(vpath, out)
        st = {f["name"]: f for f in file_states(out, project.name, project.output_info("check"))}
        where = ".".join(map(str, path))
        for name in written:
            moved = truth.get(name) != truth0[name]
            if moved and st[name]["current"]:
                unsafe.append(f"{where}: {name} changes but is called current")
            if not moved and not st[name]["current"]:
                extra.setdefault(where, set()).add(name)
    assert tried > 30
    assert unsafe == []
    # stale although the bytes stay: each (field, file) pair here is read by the code that makes
    # the file, as one part of a larger input, and happens to change nothing in this spec
    allowed = [
        # the station table is one input: sweep and dihedral offsets do not reach templates and
        # offset tables, drawn in each section's chord frame
        (r"surface\.\d\.station\.\d\.[xz]", r"drawings/.*-(templates\.\w+|offsets\.csv)"),
        # [surface.shop] is one input: a cut position does not move a template, a kerf an offset
        (r"surface\.\d\.shop\..*", r"drawings/.*"),
        # the drawings summary counts templates, rows and panels: most geometry edits keep the counts
        (r".*", rf"report/{SET}-drawings\.txt"),
        # placement read by some of a surface's drawings (the datum line of a template, the sides of
        # a hot-wire path), not by every one
        (r"surface\.\d\.(incidence|reference|mirror)", r"drawings/.*"),
        # the balance reads each surface's finished section, but its figures take the chord line
        # to the trailing edge's midpoint (which a finished edge does not move) and the lattice
        # the mean line; masts are out of the lattice unless asked (--sideslip)
        (r"surface\.\d\.te_thickness", rf"report/{SET}-balance\.\w+"),
    ]
    unexplained = {w: sorted(n for n in names if not any(re.fullmatch(f, w) and re.fullmatch(g, n)
                                                          for f, g in allowed))
                   for w, names in extra.items()}
    assert {w: n for w, n in unexplained.items() if n} == {}


@pytest.mark.slow
def test_adding_shop_part_tables_keeps_the_solids_and_the_check_record(tmp_path):
    """Add [surface.mount] and [surface.printing] to a built and checked set and run parts:
    the part's STEP and STL and the check record stay current."""
    from conftest import ROOT

    full = (ROOT / "specs" / "demo-stabilizer-shop.toml").read_text()
    bare = full[:full.index("[surface.mount]")]
    tables = full[full.index("[surface.mount]"):full.index("[surface.laminate]")]
    spec, out = tmp_path / "shop.toml", tmp_path / "out"
    spec.write_text(bare)
    run("build", spec, "-o", out)
    run("check", spec, "-o", out)
    before = files(out)
    kept = {n for n in before if n.startswith(("cad/", "print/")) or "-check." in n}
    assert len(kept) >= 4
    spec.write_text(bare + tables)
    res = run("parts", spec, "-o", out)
    assert "made from the earlier spec" not in res.output, res.output
    assert kept <= files(out)
    st = states(spec, out)
    assert all(st[n]["current"] for n in kept)


def test_changed_inputs_of_old_and_other_version_entries():
    from geomgen import __version__
    from geomgen.outputs.inputs import describe
    from geomgen.outputs.manifest import changed_inputs

    info = {"spec_sha256": "a", "input_digests": {"surface[w].station": "1", "flight.mass_kg": "2"}}
    old = {"geomgen_version": __version__, "spec_sha256": "b"}  # recorded without fingerprints
    assert changed_inputs(old, info) == ["spec"]
    assert changed_inputs({**old, "spec_sha256": "a"}, info) == []
    assert changed_inputs({**old, "geomgen_version": "0.0.1", "inputs": {}}, info) == ["geomgen"]
    entry = {"geomgen_version": __version__, "inputs": {"surface[w].station": "1", "surface[x].position": "9"}}
    assert changed_inputs(entry, info) == ["surface[x].position"]  # a surface that is gone
    assert describe(["surface[w].station", "surface[w].position", "flight.mass_kg", "sections.a"]) == \
        'surface "w" station and position; [flight] mass_kg; section "a"'


def test_an_edited_stale_file_is_current_again_when_its_input_comes_back(tmp_path):
    spec, out, csv = _edited_offsets_then_stabilizer_incidence(tmp_path)
    run("balance", spec, "-o", out)
    edit(spec, "incidence = 2.0", "incidence = 2.5")
    run("balance", spec, "-o", out)
    line = next(ln for ln in (out / "geomgen-index.md").read_text().splitlines() if "stabilizer-offsets.csv" in ln)
    assert "STALE" not in line and line.endswith("| current |")


def test_a_comparison_with_another_spec_goes_stale_when_that_file_changes(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    other = tmp_path / "other.toml"
    other.write_text(DEMO.read_text().replace("mass_kg = 85.0", "mass_kg = 90.0"))
    run("compare", spec, "--with", other, "-o", out)
    name = f"studies/{SET}-compare.csv"
    assert states(spec, out)[name]["current"]
    other.write_text(other.read_text().replace("mass_kg = 90.0", "mass_kg = 95.0"))
    st = states(spec, out)[name]
    assert not st["current"] and st["changed_words"] == "the file other.toml"
    res = run("balance", spec, "-o", out)
    assert "the file other.toml changed: removed" in res.output
