"""family --build and sweep --build: each variant's spec is written through the commit into
its own output folder (a user's file or a link there is refused, nothing outside is
touched), its coordinate files resolve, and a variant that does not build or check is in
the table and the exit code."""

from __future__ import annotations

import numpy as np
import pytest
from click.testing import CliRunner
from conftest import DEMO, snapshot

from geomgen.cli import main
from geomgen.errors import ExportError
from geomgen.project import Project
from geomgen.sections import naca
from geomgen.sections.base import cosine_s
from geomgen.studies import family

MEMBER = "lakeside-cruiser-stabilizer-200cm2"


def family_cli(out, *extra, spec=DEMO):
    return CliRunner().invoke(main, ["family", str(spec), "--surface", "stabilizer", "--areas", "200", "--build",
                                     "-o", str(out), *extra])


def test_a_users_file_where_a_variant_spec_goes_is_refused_and_kept(tmp_path):
    out = tmp_path / "o"
    mine = out / "family" / MEMBER / "variant.toml"
    mine.parent.mkdir(parents=True)
    mine.write_text("my own notes\n")
    r = family_cli(out)
    assert mine.read_text() == "my own notes\n"
    assert r.exit_code == 3, r.output
    assert "could not be built or checked" in r.output and "was not written by geomgen" in r.output
    assert "Traceback" not in r.output


def test_a_linked_variant_folder_is_refused_before_anything_is_written(tmp_path):
    out, outside = tmp_path / "o", tmp_path / "elsewhere"
    outside.mkdir()
    (out / "family").mkdir(parents=True)
    (out / "family" / MEMBER).symlink_to(outside)
    r = family_cli(out)
    assert r.exit_code == 3 and "link" in r.output and "Traceback" not in r.output, r.output
    assert snapshot(outside) == {} and not (out / "studies").exists()


def test_a_dangling_link_of_a_later_member_stops_the_study_before_the_first_is_written(tmp_path):
    out = tmp_path / "o"
    (out / "family").mkdir(parents=True)
    (out / "family" / "lakeside-cruiser-stabilizer-240cm2").symlink_to(tmp_path / "gone")
    project = Project(DEMO, out)
    with pytest.raises(ExportError, match="link"):
        family(project, "stabilizer", [200.0, 240.0], build_root=out / "family")
    assert not (out / "family" / MEMBER).exists() and not (tmp_path / "gone").exists()


def test_variant_specs_name_their_coordinate_files_by_full_path(tmp_path):
    from geomgen.studies.study import _task

    spec = tmp_path / "s.toml"
    spec.write_text(DEMO.read_text().replace('[sections.mast]\nnaca = "0013"', '[sections.mast]\nfile = "f/m.dat"'))
    (tmp_path / "f").mkdir()
    write_dat(tmp_path / "f" / "m.dat")
    project = Project(spec)
    import tomllib

    task = _task(project, tomllib.loads(spec.read_text()), None, tmp_path / "build")
    assert tomllib.loads(task.text)["sections"]["mast"]["file"] == str(tmp_path / "f" / "m.dat")
    plain = _task(project, tomllib.loads(spec.read_text()), None)  # analysed from the base's own folder
    assert tomllib.loads(plain.text)["sections"]["mast"]["file"] == "f/m.dat"


def write_dat(path):
    sec, s = naca("0013"), cosine_s(61)
    up, lo = np.column_stack(sec.upper(s)), np.column_stack(sec.lower(s))
    pts = np.vstack([up[::-1], lo[1:]])
    path.write_text("mast section\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts) + "\n")


@pytest.mark.slow
def test_a_family_with_a_coordinate_file_builds_each_size_in_its_own_folder(tmp_path):
    spec = tmp_path / "s.toml"
    spec.write_text(DEMO.read_text().replace('[sections.mast]\nnaca = "0013"', '[sections.mast]\nfile = "f/m.dat"'))
    (tmp_path / "f").mkdir()
    write_dat(tmp_path / "f" / "m.dat")
    out = tmp_path / "o"
    r = family_cli(out, spec=spec)
    assert r.exit_code == 0, r.output
    assert "built and checked: 1 of 1 variant(s) ok" in r.output
    folder = out / "family" / MEMBER
    assert (folder / "cad" / f"{MEMBER}-mast.step").is_file()
    import json

    listed = {e["name"] for e in json.loads((folder / "geomgen-manifest.json").read_text())["files"]}
    assert "variant.toml" in listed and f"report/{MEMBER}-check.json" in listed
    again = family_cli(out, spec=spec)  # its own files are replaced, not refused
    assert again.exit_code == 0, again.output
