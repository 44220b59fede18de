"""The design report: one JSON dict, rendered as self-contained HTML and as Markdown.

Slow tests build the demo once (the check pass makes the solids); fast tests feed the report
a check result whose "measurements" are the intended figures, so no kernel is needed.
"""

from __future__ import annotations

import json
import math
import re
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import pytest
from conftest import DEMO

from geomgen import CAUTION
from geomgen.check.run import memo_key
from geomgen.outputs import MANIFEST, read_manifest
from geomgen.project import Project
from geomgen.report import render_files, report_data, write_report

CHROMIUM = Path("/usr/bin/chromium")


# -- helpers -----------------------------------------------------------------------------
class PageText(HTMLParser):
    """Values (``data-path`` spans), the text outside them, and every src/href/url reference."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.values: list[tuple[str, str]] = []
        self.outside: list[str] = []
        self.refs: list[str] = []
        self.tags: list[str] = []
        self.rows: list[tuple[str, str]] = []  # (tr class, row text)
        self._path = None
        self._buf = ""
        self._skip = 0
        self._row = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append(tag)
        for k in ("src", "href", "srcset", "poster", "data", "action", "formaction"):
            if k in a and a[k] is not None:
                self.refs.append(a[k])
        if tag in ("style", "title", "script"):
            self._skip += 1
        if tag == "span" and "data-path" in a:
            self._path, self._buf = a["data-path"], ""
        if tag == "tr":
            self._row = [a.get("class") or "", ""]

    def handle_endtag(self, tag):
        if tag in ("style", "title", "script"):
            self._skip -= 1
        if tag == "span" and self._path is not None:
            self.values.append((self._path, self._buf))
            self._path = None
        if tag == "tr" and self._row is not None:
            self.rows.append(tuple(self._row))
            self._row = None

    def handle_data(self, d):
        if self._skip:
            return
        if self._row is not None:
            self._row[1] += d + " "
        if self._path is not None:
            self._buf += d
        else:
            self.outside.append(d)


def parse(html: str) -> PageText:
    p = PageText()
    p.feed(html)
    p.close()
    return p


def resolve(data, path: str):
    for key in path.split("/"):
        data = data[int(key)] if isinstance(data, list) else data[key]
    return data


def assert_shown_equals_json(shown: str, value, path: str):
    """The text on the page is the JSON value, to the precision shown."""
    if value is None:
        assert shown == "—", (path, shown)
        return
    if isinstance(value, bool):
        assert shown == ("yes" if value else "no"), (path, shown, value)
        return
    if isinstance(value, str):
        assert shown == value, (path, shown, value)
        return
    num = float(shown)
    decimals = len(shown.split(".")[1]) if "." in shown else 0
    assert math.isfinite(num)
    assert abs(num - value) <= 0.5 * 10 ** -decimals * (1 + 1e-9) + 1e-12, (path, shown, value)


def fake_check(spec_path, out_dir, nudge: dict | None = None):
    """A CheckResult whose STEP "measurements" are the intended figures (no kernel), with
    ``nudge`` = {(part, figure): offset} added to make a fault."""
    from geomgen.check.compare import compare_part
    from geomgen.check.run import CheckResult
    from geomgen.geometry import build_models
    from geomgen.geometry.figures import intended_figures
    from geomgen.spec import load_spec

    spec = load_spec(spec_path)
    records, parts = [], {}
    for m, s in zip(build_models(spec), spec.surface):
        it = intended_figures(m).as_dict()
        expect = {k: getattr(s.expect, k) for k in type(s.expect).model_fields} if s.expect else {}
        records += compare_part(m.name, it, dict(it), None, 0.05, {k: v for k, v in expect.items() if v is not None})
        parts[m.name] = {"role": m.role, "step": f"{m.name}.step", "stl": f"{m.name}.stl", "skin_sampling_mm": 0.0,
                         "stl_triangles": 0, "watertight": True}
    for r in records:
        off = (nudge or {}).get((r.part, r.figure))
        if off is not None:
            r.step += off
            if abs(r.step - r.intended) > r.tol_step:
                r.fault.append("STEP")
            if r.expected is not None:
                r.verdict = "pass" if abs(r.step - r.expected) <= r.expected_tol else "FAIL"
    return CheckResult(spec.name, Path(out_dir), False, records, parts)


def spec_with_cg(tmp_path, cg_x=-250.0) -> Path:
    """The demo spec with the weight position given in datum x instead of from the mast (its
    [flight] table is last; the two say the same point, so only one is given)."""
    p = tmp_path / "demo-cg.toml"
    text = "\n".join(line for line in DEMO.read_text().splitlines() if not line.startswith("rider_from_mast_mm"))
    p.write_text(text + f"\nweight_x_mm = {cg_x}\n")
    return p


# -- the demo, built once ------------------------------------------------------------------
@pytest.fixture(scope="module")
def demo_report(tmp_path_factory):
    out = tmp_path_factory.mktemp("report")
    paths = write_report(DEMO, out)
    data = json.loads((out / "report/lakeside-cruiser-report.json").read_text())
    html = (out / "report/lakeside-cruiser-report.html").read_text()
    md = (out / "report/lakeside-cruiser-report.md").read_text()
    return {"out": out, "paths": paths, "data": data, "html": html, "md": md}


@pytest.mark.slow
def test_files_written_whole_with_the_manifest(demo_report):
    out, paths = demo_report["out"], demo_report["paths"]
    names = [p.relative_to(out / "report").as_posix() for p in paths]
    assert names[0] == "lakeside-cruiser-report.html"
    for n in ("lakeside-cruiser-report.md", "lakeside-cruiser-report.json", "lakeside-cruiser-report-top.png",
              "lakeside-cruiser-report-side.png", "lakeside-cruiser-report-spanwise.png",
              "lakeside-cruiser-report-sections-front-wing.png"):
        assert n in names
    man = read_manifest(out)
    for p in paths:
        assert p.is_file() and p.stat().st_size == man[p.relative_to(out).as_posix()]["size"]
    assert not list(out.glob(".geomgen-staging-*"))  # nothing left behind
    assert (out / MANIFEST).is_file()
    # the Markdown's pictures are files beside it, written with it
    for ref in re.findall(r"!\[[^\]]*\]\(([^)]+)\)", demo_report["md"]):
        assert ref in names and (out / "report" / ref).stat().st_size > 5000


@pytest.mark.slow
def test_every_number_in_the_html_is_the_json_value(demo_report):
    data, page = demo_report["data"], parse(demo_report["html"])
    assert len(page.values) > 300
    for path, shown in page.values:
        assert_shown_equals_json(shown, resolve(data, path), path)
    # no number reaches the page except through a JSON path
    stray = [t for t in page.outside if re.search(r"[0-9]", t)]
    assert not stray, stray[:5]
    paths = {p for p, _ in page.values}
    # the check table: every record, intended / STEP / STL / expected / result
    for i, r in enumerate(data["check"]["rows"]):
        for k in ("intended", "step", "stl", "expected", "status"):
            assert f"check/rows/{i}/{k}" in paths
    # the trim table: attitude, lift of front wing and stabilizer in N and kgf, cp, static margin
    assert len(data["balance"]["trim"]) == 4
    for i in range(4):
        for k in ("attitude_deg", "lift_n/front-wing", "lift_kgf/stabilizer", "cp_from_mast_mm",
                  "static_margin_pct"):
            assert f"balance/trim/{i}/{k}" in paths
    assert "balance/neutral_point_x_mm" in paths


@pytest.mark.slow
def test_json_holds_the_check_and_the_balance(demo_report):
    """The JSON is the check pass and the hydro result as they came (no second computation)."""
    d = demo_report["data"]
    assert d["caution"] == CAUTION and d["check"]["ok"] is True
    rows = {(r["part"], r["figure"]): r for r in d["check"]["rows"]}
    s = {x["name"]: x for x in d["surfaces"]}
    for name in ("front-wing", "stabilizer", "mast"):
        for k in ("mac_mm", "mac_y_mm", "mac_le_x_mm", "projected_area_cm2"):
            assert s[name]["figures"][k] == rows[(name, k)]["intended"]
        assert s[name]["mac"]["length_mm"] == rows[(name, "mac_mm")]["intended"]
    # against a separate analysis of the spec (its own load, models and lattice), not the same dict
    from geomgen.hydro import analyse_spec
    from geomgen.spec import load_spec

    alone = analyse_spec(load_spec(DEMO))
    assert d["balance"]["neutral_point_x_mm"] == pytest.approx(alone.neutral_point_x_mm, abs=1e-9)
    assert len(d["balance"]["trim"]) == len(alone.trim)
    for t, h in zip(d["balance"]["trim"], alone.trim):
        assert t["attitude_deg"] == pytest.approx(h.attitude_deg, abs=1e-9)
        assert t["lift_n"] == pytest.approx(h.lift_n, abs=1e-9)
    # lift = weight at every trim speed (85 kg, g = 9.80665 m/s²)
    for t in d["balance"]["trim"]:
        assert sum(t["lift_kgf"].values()) == pytest.approx(85.0, rel=1e-6)
    # the mirrored wing's MAC is drawn on both sides at ±ȳ
    m = s["front-wing"]["mac"]
    assert sorted(m["span_datum_mm"]) == pytest.approx([-m["y_mm"], m["y_mm"]])


@pytest.mark.slow
def test_caution_is_prominent_in_every_page(demo_report):
    html, md = demo_report["html"], demo_report["md"]
    first_h2 = html.index("<h2")
    assert html.index('class="caution"') < first_h2 and CAUTION in html[:first_h2]
    assert md.index(CAUTION) < md.index("\n## ") and md.count(CAUTION) == 2


@pytest.mark.slow
def test_no_network_or_external_references(demo_report):
    html = demo_report["html"]
    page = parse(html)
    assert page.refs and all(r.startswith("data:image/png;base64,") or r.startswith("#") for r in page.refs)
    assert not re.search(r"""(src|href|srcset|action)\s*=\s*["']?\s*(https?:|//|file:)""", html, re.I)
    assert not re.search(r"url\(\s*['\"]?(?!data:)", html) and "@import" not in html
    for tag in ("script", "link", "iframe", "object", "embed", "base"):
        assert tag not in page.tags
    assert "http:" not in demo_report["md"] and "https:" not in demo_report["md"]


@pytest.mark.slow
def test_markdown_shows_the_same_values(demo_report):
    d, md = demo_report["data"], demo_report["md"]
    for t in d["balance"]["trim"]:
        assert format(t["attitude_deg"], "+.2f") in md and format(t["lift_n"]["front-wing"], ".1f") in md
    assert md.count("\n| front-wing |") >= 1
    n_check = sum(1 for line in md.splitlines() if line.startswith("| ") and ("✓" in line or "✗" in line))
    assert n_check == len(d["check"]["rows"])


@pytest.mark.slow
@pytest.mark.skipif(not CHROMIUM.exists(), reason="/usr/bin/chromium is not installed (CI installs it); "
                                                   "the static no-external-reference test still runs")
def test_page_renders_in_headless_chromium(demo_report, tmp_path):
    from PIL import Image

    html_path = demo_report["out"] / "report/lakeside-cruiser-report.html"

    def run(page: Path, shot: Path, profile: str):
        cmd = [str(CHROMIUM), "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
               "--disable-background-networking", "--disable-component-update", "--disable-sync",
               f"--user-data-dir={tmp_path / profile}", f"--screenshot={shot}", "--window-size=1280,4000",
               "--enable-logging=stderr", "--v=0", page.resolve().as_uri()]
        r = subprocess.run(cmd, capture_output=True, text=True, errors="replace", timeout=90)
        assert r.returncode == 0, r.stderr[-2000:]
        return r.stderr

    # One run, on a copy holding a probe that lists failed loads and broken images (the report
    # itself has no scripts), alone in a folder so that any relative reference would fail.
    probe = ("<script>window.addEventListener('error',function(e){var t=e.target||{};"
             "console.log('REPORT-PROBE failed '+(t.src||t.href||e.message));},true);"
             "window.addEventListener('load',function(){var i=Array.prototype.slice.call(document.images);"
             "var b=i.filter(function(x){return !(x.complete&&x.naturalWidth>0);}).length;"
             "var r=performance.getEntriesByType('resource').length;"
             "console.log('REPORT-PROBE images='+i.length+' broken='+b+' fetched='+r);});</script>")
    copy = tmp_path / "alone" / html_path.name
    copy.parent.mkdir()
    copy.write_text(demo_report["html"].replace("<head>", "<head>" + probe, 1))
    shot = tmp_path / "report.png"
    log = run(copy, shot, "profile")
    n_fig = len(re.findall(r"<img ", demo_report["html"]))
    assert f"REPORT-PROBE images={n_fig} broken=0 fetched=0" in log, [x for x in log.splitlines() if "PROBE" in x]
    assert "REPORT-PROBE failed" not in log and "Failed to load" not in log and "net::ERR_" not in log
    assert shot.is_file() and shot.stat().st_size > 50_000
    with Image.open(shot) as im:
        assert im.size == (1280, 4000)
        colours = im.convert("RGB").resize((160, 500)).getcolors(maxcolors=1 << 16)
        assert colours is None or len(colours) > 50  # text, tables and drawings, not a blank page


# -- fast: the report from a kernel-free check result --------------------------------------
@pytest.fixture(scope="module")
def cg_data(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("cg")
    spec = spec_with_cg(tmp)
    res = fake_check(spec, tmp / "out", nudge={("front-wing", "span_mm"): 3.0, ("stabilizer", "mac_mm"): 0.5})
    project = Project(spec, tmp / "out")
    project.memo(memo_key(), lambda: res)  # the project's check, as if measured in this run
    return report_data(project)


@pytest.fixture(scope="module")
def cg_files(cg_data):
    return render_files(cg_data)


def test_centre_of_gravity_and_static_margin_shown(cg_data, cg_files):
    b = cg_data["balance"]
    assert b["cg_x_mm"] == -250.0
    assert b["static_margin_pct"] == pytest.approx((b["neutral_point_x_mm"] + 250.0) / b["mac_mm"] * 100)
    page = parse(cg_files["report/lakeside-cruiser-report.html"].decode())
    shown = dict(page.values)
    assert shown["balance/cg_x_mm"] == "-250.0"
    for i in range(len(b["trim"])):
        assert shown[f"balance/trim/{i}/static_margin_pct"] == format(b["static_margin_pct"], "+.1f")
    for path, text in page.values:
        assert_shown_equals_json(text, resolve(cg_data, path), path)


def test_failures_marked_by_word_and_not_only_by_colour(cg_data, cg_files):
    files = cg_files
    html = files["report/lakeside-cruiser-report.html"].decode()
    md = files["report/lakeside-cruiser-report.md"].decode()
    bad = [r for r in cg_data["check"]["rows"] if r["bad"]]
    assert {(r["part"], r["figure"]) for r in bad} == {("front-wing", "span_mm"), ("stabilizer", "mac_mm")}
    # the wing's span is off its build tolerance and its expected 800 ± 1 mm: fault and failure
    assert {r["status"] for r in bad} == {"✗ FAULT STEP and FAIL", "✗ FAULT STEP"}
    rows = parse(html).rows
    flagged = [t for cls, t in rows if cls == "bad"]
    assert len(flagged) == 2 and all("✗" in t and "FAULT" in t for t in flagged)
    assert all("✗" not in t for cls, t in rows if cls != "bad")
    md_bad = [line for line in md.splitlines() if line.startswith("| ") and "✗" in line]
    assert len(md_bad) == 2 and all(line.count("**") >= 8 for line in md_bad)  # bold, not only colour
    assert not cg_data["check"]["ok"] and "GEOMETRY FAULT" in " ".join(cg_data["check"]["summary"])


def test_json_is_strict_and_pages_come_from_it_alone(cg_data, cg_files):
    """The JSON written is the dict; the pages are a function of that dict (and its drawings)."""
    from geomgen.report.render import to_html, to_markdown

    text = cg_files["report/lakeside-cruiser-report.json"].decode()
    assert json.loads(text) == cg_data and "NaN" not in text
    images = {k: cg_files[f"report/lakeside-cruiser-report-{k}.png"] for k in
              ("top", "side", "spanwise", "stiffness", "sections-front-wing", "sections-stabilizer", "sections-mast",
               "envelope")}
    assert to_html(json.loads(text), images).encode() == cg_files["report/lakeside-cruiser-report.html"]
    names = {k: f"lakeside-cruiser-report-{k}.png" for k in images}
    assert to_markdown(json.loads(text), names).encode() == cg_files["report/lakeside-cruiser-report.md"]


def test_palette_tells_things_apart_without_colour():
    from geomgen.report.plots import STYLE

    roles = [STYLE[k] for k in ("wing", "stabilizer", "mast", "fin")]
    assert len({str(s["ls"]) for s in roles}) == 4 and len({s["marker"] for s in roles}) == 4
    points = [STYLE[k]["marker"] for k in ("neutral_point", "cg", "cp")]
    assert len(set(points) | {s["marker"] for s in roles}) == 7
    assert len({STYLE[k]["color"] for k in ("wing", "stabilizer", "neutral_point", "cg", "cp")}) == 5


def test_balance_without_a_mast_shows_the_centre_of_pressure_from_the_datum_origin(tmp_path):
    """No mast in the spec: the trim table gives the centre of pressure as datum x
    from the origin instead of empty mast columns."""
    text = DEMO.read_text()
    text = text[:text.index("# Mast: vertical")] + text[text.index("[flight]"):]
    # without a mast the ride height has nothing to stand on: give the water level directly
    text = text.replace("ride_height_mm = 150.0", "depth_mm = 600.0")
    spec = tmp_path / "no-mast.toml"
    spec.write_text(text)
    project = Project(spec, tmp_path / "out")
    project.memo(memo_key(), lambda: fake_check(spec, tmp_path / "out"))
    data = report_data(project)
    b = data["balance"]
    assert b["mast_x_mm"] is None
    files = render_files(data)
    md = files["report/lakeside-cruiser-report.md"].decode()
    assert "centre of pressure datum x from the origin mm" in md and "from mast" not in md
    page = parse(files["report/lakeside-cruiser-report.html"].decode())
    shown = dict(page.values)
    for i, t in enumerate(b["trim"]):
        assert shown[f"balance/trim/{i}/cp_x_mm"] == format(t["cp_x_mm"], "+.1f")
