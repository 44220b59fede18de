"""Each output remembers the inputs it was made from: a spec edit makes stale only the files
one of whose own inputs changed, and says which input. Slow tests build solids."""

from __future__ import annotations

import json
import re

import pytest
from click.testing import CliRunner

from geomgen.cli import main
from geomgen.outputs import file_states, read_manifest
from geomgen.project import Project

from conftest import DEMO

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


def test_edited_stale_file_named_with_its_input(tmp_path):
    spec, out = demo(tmp_path), tmp_path / "out"
    run("drawings", spec, "-o", out)
    csv = out / "drawings" / f"{SET}-stabilizer-offsets.csv"
    csv.write_text(csv.read_text() + "# my note\n")
    edit(spec, "incidence = 2.5", "incidence = 2.0")
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

    edit(spec, "chord = 42.0", "chord = 45.0")  # the stabilizer
    st = states(spec, out)
    stale = {n for n, f in st.items() if not f["current"]}
    assert stale == ({n for n in files(out) if "-stabilizer" in n}
                     | {f"cad/{SET}-assembly.step", f"report/{SET}-build.txt", f"report/{SET}-drawings.txt",
                        f"report/{SET}-balance.txt", f"report/{SET}-balance.json",
                        f"report/{SET}-check.md", f"report/{SET}-check.json"})
    others = {n for n in files(out) if n.startswith("drawings/") and "-stabilizer" not in n}
    text = CliRunner().invoke(main, ["check", str(spec), "-o", str(out)]).output
    # check rebuilds the solids (its own inputs changed); the rest of the stale files go, named
    assert 'surface "stabilizer" station changed' in text
    left = files(out)
    assert others and others <= left  # the front wing's and the mast's drawings stay
    assert not any(n.startswith(f"drawings/{SET}-stabilizer") for n in left)
    assert f"report/{SET}-balance.json" not in left
