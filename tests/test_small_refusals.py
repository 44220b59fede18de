"""Small inputs that once gave a traceback or a leftover: names that are no file names, a
trailing edge too thin to make, Ctrl-C while the kernel loads, control characters in
messages, names equal under Unicode normalisation, DXF bytes that followed the hash seed."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen.cli import main

ROOT = Path(__file__).resolve().parents[1]


def balance(path):
    r = CliRunner().invoke(main, ["balance", str(path)])
    assert "Traceback" not in r.output and not isinstance(r.exception, (ValueError, KeyError)), r.output
    return r


@pytest.mark.parametrize("where,text", [
    ("name", lambda: wing_spec(name="mast.")),
    ("name", lambda: wing_spec(name="mast..tip")),
    ("name", lambda: wing_spec().replace('name = "t"', 'name = "lake..side"')),
    ("name", lambda: wing_spec().replace('name = "t"', 'name = "lake."')),
])
def test_names_that_make_no_file_name_are_refused_where_they_are_read(tmp_path, where, text):
    p = tmp_path / "s.toml"
    p.write_text(text())
    r = balance(p)
    assert r.exit_code == 2 and str(p) in r.output and where in r.output and "'..'" in r.output, r.output


@pytest.mark.parametrize("te", ["1e-7", "1e-300", "5e-324", "0.0009"])
def test_a_trailing_edge_thinner_than_the_bound_is_refused_with_the_bound(tmp_path, te):
    p = tmp_path / "s.toml"
    p.write_text(wing_spec().replace("te_thickness = 0.0", f"te_thickness = {te}"))
    r = balance(p)
    assert r.exit_code == 2 and "te_thickness" in r.output and "at least 0.001 mm" in r.output, r.output


@pytest.mark.parametrize("te", ["0.0", "0.001"])
def test_sharp_and_the_bound_itself_are_accepted(tmp_path, te):
    p = tmp_path / "s.toml"
    p.write_text(wing_spec().replace("te_thickness = 0.0", f"te_thickness = {te}"))
    from geomgen.spec import load_spec

    assert load_spec(p).surface[0].te_thickness == float(te)


def test_ctrl_c_while_the_kernel_initialises_exits_130(tmp_path, monkeypatch):
    """pybind11 turns a KeyboardInterrupt during a module's initialisation into
    ImportError('initialization failed') with the interrupt as its cause."""
    import geomgen.build

    def import_interrupted(*a, **k):
        try:
            raise KeyboardInterrupt
        except KeyboardInterrupt as ki:
            raise ImportError("initialization failed") from ki
    monkeypatch.setattr(geomgen.build, "build", import_interrupted)
    p = tmp_path / "s.toml"
    p.write_text(wing_spec())
    r = CliRunner().invoke(main, ["build", str(p), "-o", str(tmp_path / "o")])
    assert r.exit_code == 130 and "interrupted" in r.output and "Traceback" not in r.output


def test_an_import_error_of_another_cause_is_not_called_an_interrupt(tmp_path, monkeypatch):
    import geomgen.build

    def broken(*a, **k):
        raise ImportError("no module named OCP")
    monkeypatch.setattr(geomgen.build, "build", broken)
    p = tmp_path / "s.toml"
    p.write_text(wing_spec())
    r = CliRunner().invoke(main, ["build", str(p), "-o", str(tmp_path / "o")])
    assert r.exit_code != 130 and isinstance(r.exception, ImportError)


def test_control_characters_from_a_name_reach_the_terminal_escaped(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(wing_spec(name="\\u001b]0;TITLE\\u0007"))
    r = balance(p)
    assert r.exit_code == 2
    assert "\x1b" not in r.output and "\x07" not in r.output and all(c.isprintable() or c == "\n" for c in r.output)
    assert "\\x1b]0;TITLE" in r.output  # still readable, escaped


def test_section_names_equal_under_unicode_normalisation_are_refused(tmp_path):
    p = tmp_path / "s.toml"
    text = wing_spec().replace('[sections.a]\nnaca = "0012"',
                               '[sections.a]\nnaca = "0012"\n[sections."\u00e9"]\nnaca = "0012"\n'
                               '[sections."e\u0301"]\nnaca = "0010"')
    assert text.count("[sections.") == 3
    p.write_text(text)
    r = balance(p)
    assert r.exit_code == 2 and "Unicode normalisation" in r.output, r.output


DXF = """
import hashlib, sys, tempfile
sys.path.insert(0, {root!r})
import ezdxf
from geomgen.drawings.common import save_dxf
doc = ezdxf.new("R2010", setup=["linetypes"], units=4)
msp = doc.modelspace()
msp.add_lwpolyline([(0, 0), (10, 0), (10, 5)])
msp.add_text("t")
msp.add_line((0, 0), (1, 1))
path = tempfile.mktemp(suffix=".dxf")
save_dxf(doc, path)
print(hashlib.sha256(open(path, "rb").read()).hexdigest())
"""


def test_dxf_bytes_do_not_depend_on_the_hash_seed():
    digests = set()
    for seed in range(6):
        r = subprocess.run([sys.executable, "-c", DXF.format(root=str(ROOT))], capture_output=True, text=True,
                           env={"PYTHONHASHSEED": str(seed), "PATH": "/usr/bin:/bin"}, cwd=ROOT, timeout=120)
        assert r.returncode == 0, r.stderr
        digests.add(r.stdout.strip())
    assert len(digests) == 1, digests


def test_a_spec_opened_through_a_link_finds_its_files_beside_the_link(tmp_path):
    """The stated rule: coordinate files are relative to the folder of the spec path as given."""
    from geomgen.project import Project
    from geomgen.sections import naca

    here, there = tmp_path / "here", tmp_path / "there"
    here.mkdir()
    there.mkdir()
    (there / "s.toml").write_text(wing_spec(section='file = "c.dat"'))
    pts = naca("0012").loop(40)
    (here / "c.dat").write_text("beside the link\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts) + "\n")
    (here / "s.toml").symlink_to(there / "s.toml")
    assert Project(here / "s.toml").models  # found beside the link
    r = balance(there / "s.toml")  # opened directly: its own folder has no c.dat
    assert r.exit_code == 2 and "c.dat" in r.output
