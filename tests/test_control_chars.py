"""Control characters never reach an output: stripped from coordinate-file name lines (the
SVG stays well-formed XML), refused in spec text naming the field."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest
from click.testing import CliRunner
from conftest import wing_spec

from geomgen.cli import main
from geomgen.sections import naca


def coord_file(path, name_line: str):
    pts = naca("0012").loop(40)
    path.write_text(name_line + "\n" + "\n".join(f"{x:.6f} {y:.6f}" for x, y in pts) + "\n")


def test_name_line_control_characters_do_not_break_the_svg(tmp_path):
    coord_file(tmp_path / "c.dat", "bad\x01name\x1b[31m\x7f\u202e end")
    (tmp_path / "s.toml").write_text(wing_spec(section='file = "c.dat"'))
    out = tmp_path / "out"
    r = CliRunner().invoke(main, ["drawings", str(tmp_path / "s.toml"), "-o", str(out)])
    assert r.exit_code == 0, r.output
    svgs = list(out.rglob("*.svg"))
    assert svgs
    for svg in svgs:
        raw = svg.read_bytes()
        ET.fromstring(raw)  # well-formed XML (raised before: "not well-formed (invalid token)")
        assert not any(b < 32 and b not in (9, 10, 13) for b in raw) and b"\x7f" not in raw
        assert "\u202e" not in raw.decode()
    assert any("badname" in s.read_text() for s in svgs)  # the readable rest stays


@pytest.mark.parametrize("where,text", [
    ("datum origin",
     lambda: wing_spec().replace('origin = "test origin"', 'origin = "near\\u0007 the \\u001b[2J mast"')),
    ("sections", lambda: wing_spec().replace("[sections.a]", '[sections."a\\u0000"]')),
    ("sections a file", lambda: wing_spec(section='file = "c\\u0085.dat"')),
    ("datum origin", lambda: wing_spec().replace('origin = "test origin"', 'origin = "left\\u202eright"')),
])
def test_control_characters_in_spec_text_are_refused_naming_the_field(tmp_path, where, text):
    p = tmp_path / "s.toml"
    p.write_text(text())
    out = tmp_path / "out"
    r = CliRunner().invoke(main, ["balance", str(p), "-o", str(out)])
    assert r.exit_code == 2 and "Traceback" not in r.output, r.output
    assert str(p) in r.output and where in r.output and "control character" in r.output
    assert not any(ord(c) < 32 and c != "\n" for c in r.output)  # the message itself is clean
    assert not out.exists()



def test_report_text_values_carry_no_control_characters():
    """Defence in depth: a value with control bytes that reached the report data by another
    road than the spec is written without them, in HTML and in Markdown."""
    from geomgen.report.content import V
    from geomgen.report.render import _h, _m

    data = {"spec": {"datum_origin": "at the\x07 mast\x1b[2J \u202eend"}}
    for out in (_h(data, ["Datum origin: ", V(("spec", "datum_origin"), "str")]),
                _m(data, ["Datum origin: ", V(("spec", "datum_origin"), "str")])):
        assert "at the mast" in out and "end" in out
        assert all(c.isprintable() for c in out)
