"""Hostile and meaningless input: exit 2 naming the file and field, never a traceback or a
hang."""

from __future__ import annotations

import os

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen.cli import main


def run(*args):
    r = CliRunner().invoke(main, [str(a) for a in args])
    assert "Traceback" not in r.output and not isinstance(r.exception, (KeyboardInterrupt, RecursionError))
    return r


def test_a_fifo_as_spec_is_refused_not_waited_on(tmp_path):
    fifo = tmp_path / "s.toml"
    os.mkfifo(fifo)
    r = run("balance", fifo)
    assert r.exit_code == 2 and "pipe" in r.output and "regular file" in r.output


def test_dev_zero_as_spec_is_refused(tmp_path):
    r = run("balance", "/dev/zero")
    assert r.exit_code == 2 and "device" in r.output


def test_a_huge_spec_is_refused_by_bytes_read(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text("# x\n" * 300_000)
    r = run("balance", p)
    assert r.exit_code == 2 and "larger than" in r.output


def test_fifo_and_dev_zero_as_coordinate_file(tmp_path):
    os.mkfifo(tmp_path / "c.dat")
    (tmp_path / "s.toml").write_text(wing_spec(section='file = "c.dat"'))
    r = run("balance", tmp_path / "s.toml")
    assert r.exit_code == 2 and "c.dat" in r.output and "pipe" in r.output
    (tmp_path / "t.toml").write_text(wing_spec(section='file = "/dev/zero"'))
    r = run("--allow-outside-files", "balance", tmp_path / "t.toml")
    assert r.exit_code == 2 and "/dev/zero" in r.output and "device" in r.output


def test_a_byte_order_mark_is_accepted(tmp_path):
    p = tmp_path / "s.toml"
    p.write_bytes(b"\xef\xbb\xbf" + wing_spec().encode())
    assert run("balance", p).exit_code == 0


def test_deep_nesting_is_refused_naming_where(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(wing_spec() + "\nextra = " + "[" * 1000 + "]" * 1000 + "\n")
    r = run("balance", p)
    assert r.exit_code == 2 and "nested" in r.output
    p.write_text(wing_spec() + "\nextra = " + "[" * 30 + "]" * 30 + "\n")
    r = run("balance", p)
    assert r.exit_code == 2 and "extra" in r.output and "nested deeper than" in r.output


@pytest.mark.parametrize("bad", ["inf", "nan", "-inf"])
def test_non_finite_numbers_are_refused_naming_the_field(tmp_path, bad):
    text = wing_spec()
    assert "chord = " in text
    p = tmp_path / "s.toml"
    p.write_text(text.replace("chord = ", f"chord = {bad} #", 1))
    r = run("balance", p)
    assert r.exit_code == 2 and "chord" in r.output and "finite" in r.output.lower()


def test_error_lines_are_capped_with_a_count_of_the_rest(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text("\n".join(f"junk{i} = 1" for i in range(500)) + "\n" + wing_spec())
    r = run("balance", p)
    lines = [ln for ln in r.output.splitlines() if ln.startswith("spec error:")]
    assert r.exit_code == 2 and len(lines) == 51 and "more not shown" in lines[-1]
    assert "500 problems" in r.output or "problems" in r.output


# -- compare --with OTHER: the other spec passes the same guards, named as itself ----------
def compare_with(other):
    from conftest import DEMO

    return run("compare", DEMO, "--with", other)


def test_compare_with_invalid_toml_names_the_other_file(tmp_path):
    p = tmp_path / "other.toml"
    p.write_text("name = = 1\n")
    r = compare_with(p)
    assert r.exit_code == 2 and f"{p}: not valid TOML" in r.output


def test_compare_with_a_fifo_or_a_device_is_refused_not_read(tmp_path):
    fifo = tmp_path / "other.toml"
    os.mkfifo(fifo)
    r = compare_with(fifo)
    assert r.exit_code == 2 and "pipe" in r.output and str(fifo) in r.output
    r = compare_with("/dev/zero")
    assert r.exit_code == 2 and "device" in r.output


def test_compare_with_deep_nesting_is_refused_and_blamed_on_the_other_file(tmp_path):
    from conftest import DEMO

    p = tmp_path / "other.toml"
    p.write_text(DEMO.read_text() + "\nextra = " + "[" * 50_000 + "]" * 50_000 + "\n")
    r = compare_with(p)
    assert r.exit_code == 2 and "nested" in r.output and str(p) in r.output
    p.write_text(DEMO.read_text() + "\nextra = " + "[" * 30 + "]" * 30 + "\n")
    r = compare_with(p)
    lines = [ln for ln in r.output.splitlines() if "nested deeper than" in ln]
    assert r.exit_code == 2 and lines and all(str(p) in ln and str(DEMO) not in ln for ln in lines)


def test_compare_with_a_huge_file_is_refused_by_bytes_read(tmp_path):
    p = tmp_path / "other.toml"
    p.write_text("# x\n" * 300_000)
    assert compare_with(p).exit_code == 2


def test_compare_with_a_valid_other_spec_still_compares(tmp_path):
    from conftest import DEMO

    p = tmp_path / "other.toml"
    p.write_text(DEMO.read_text().replace("mass_kg = 85.0", "mass_kg = 90.0"))
    r = CliRunner().invoke(main, ["compare", str(DEMO), "--with", str(p), "-o", str(tmp_path / "o")])
    assert r.exit_code == 0 and "other.toml" in r.output, r.output
