"""Print-ready PDF templates: page sizes, one template a page when it fits, tiles that overlap
with alignment crosses on both pages they join, and a 100 mm ruler on every page (read back
from the uncompressed PDF's content streams)."""

from __future__ import annotations

import re

import pytest

from geomgen.drawings.common import cuts_of
from geomgen.drawings.pdf import PAPER, _extent, write_templates_pdf
from geomgen.geometry import build_models
from geomgen.spec.load import load_spec_text

SPEC = """\
format = 1
name = "pdf"
[datum]
origin = "test origin"
[sections.a]
naca = "2412"
[[surface]]
name = "big"
role = "wing"
position = [0.0, 0.0, 0.0]
[[surface.station]]
y = 0
chord = {root}
section = "a"
[[surface.station]]
y = 300
chord = 120
section = "a"
"""

PT = 72.0 / 25.4


def _pages(path):
    data = path.read_bytes()
    n = len(re.findall(rb"/Type /Page\b", data))
    boxes = [tuple(map(float, b.split())) for b in re.findall(rb"/MediaBox \[([^\]]*)\]", data)]
    boxes = boxes * n if len(boxes) == 1 else boxes  # one box on the page tree stands for every page
    streams = re.findall(rb"stream\r?\n(.*?)endstream", data, re.S)
    return boxes, [s.decode("latin-1") for s in streams]


def _segments(stream):
    return [tuple(map(float, m)) for m in re.findall(r"([\d.]+) ([\d.]+) m ([\d.]+) ([\d.]+) l S", stream)]


@pytest.mark.parametrize("paper", ["A4", "Letter", "A3"])
def test_templates_that_fit_get_a_page_each_with_a_ruler(tmp_path, paper):
    (m,) = build_models(load_spec_text(SPEC.format(root=150)))
    cuts = cuts_of(m)
    pages = write_templates_pdf(cuts, tmp_path / "t.pdf", spec_name="pdf", model_name="big", side="upper",
                                height=3.0, paper=paper)
    assert len(pages) == len(cuts) and all(p.tiles == (1, 1) for p in pages)
    boxes, streams = _pages(tmp_path / "t.pdf")
    w, h = PAPER[paper]
    assert len(boxes) == len(pages)
    for b, p in zip(boxes, pages):
        size = sorted((b[2] / PT, b[3] / PT))
        assert size == pytest.approx(sorted((w, h)), abs=0.01)
    rulers = [s for s in streams
              if any(abs(abs(x2 - x1) - 100.0 * PT) < 0.02 and y1 == y2 for x1, y1, x2, y2 in _segments(s))]
    assert len(rulers) == len(pages)


def test_a_large_template_is_tiled_with_overlap_and_crosses_on_both_pages(tmp_path):
    (m,) = build_models(load_spec_text(SPEC.format(root=520)))
    cuts = cuts_of(m)
    pages = write_templates_pdf(cuts, tmp_path / "t.pdf", spec_name="pdf", model_name="big", side="upper",
                                height=3.0, paper="A4", overlap=15.0)
    root = [p for p in pages if p.y == 0.0]
    ny, nx = root[0].tiles
    assert nx * ny == len(root) > 1
    x0, x1, zb, zt, _ = _extent([c for c in cuts if c.y == 0.0][0], "upper", 3.0)
    wins = [p.window for p in root]
    # the tiles cover the template, and each tile fits the printable area of its page
    assert min(w[0] for w in wins) == pytest.approx(x0) and max(w[0] + w[2] for w in wins) == pytest.approx(x1)
    assert max(w[1] for w in wins) == pytest.approx(zt) and min(w[1] - w[3] for w in wins) == pytest.approx(zb)
    for p in root:
        W, H = PAPER["A4"] if p.orientation == "P" else PAPER["A4"][::-1]
        assert p.window[2] <= W - 20 + 1e-9 and p.window[3] <= H - 20 - 36 + 1e-9
    # neighbours in a row overlap by 15 mm; every cross lies inside two tiles
    rows = {}
    for p in root:
        rows.setdefault(p.tile[0], []).append(p.window)
    for r in rows.values():
        r.sort()
        for a, b in zip(r, r[1:]):
            assert a[0] + a[2] - b[0] == pytest.approx(15.0)
    for k, x, z in root[0].crosses:
        inside = [w for w in wins if w[0] + 4 <= x <= w[0] + w[2] - 4 and w[1] - w[3] + 4 <= z <= w[1] - 4]
        assert len(inside) >= 2, (k, x, z)
    boxes, streams = _pages(tmp_path / "t.pdf")
    assert len(boxes) == len(pages)


def test_section_labels_say_in_words_what_was_done_to_the_section():
    from geomgen.sections.naca import naca

    a, b = naca("2412"), naca("0009")
    assert a.scaled_thickness(0.874526).label == "NACA 2412, thickness scaled to 87.5%"
    assert a.blended(b, 0.5).label == "NACA 2412 blended 50% toward NACA 0009"


@pytest.mark.skipif(__import__("shutil").which("pdftoppm") is None,
                    reason="poppler-utils (pdfinfo, pdftoppm) not installed; .ci/run installs it")
def test_a_pdf_reader_opens_every_page_at_paper_size(tmp_path):
    """Opened by a PDF reader's renderer (poppler, Debian poppler-utils): the page count and
    paper size it reports, and page 1 rendered at 72 dpi has the paper's size in pixels."""
    import subprocess

    from conftest import DEMO

    from geomgen.drawings import write_shop_drawings

    write_shop_drawings(DEMO, tmp_path / "o")
    pdf = tmp_path / "o" / "drawings" / "lakeside-cruiser-front-wing-templates.pdf"
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
    pages = int(re.search(r"Pages:\s+(\d+)", info).group(1))
    w, h = (float(v) for v in re.search(r"Page size:\s+([\d.]+) x ([\d.]+) pts", info).groups())
    assert pages >= 4  # one template a station of the demo wing
    assert sorted((w, h)) == pytest.approx(sorted(v * PT for v in PAPER["A4"]), abs=0.5)
    subprocess.run(["pdftoppm", "-r", "72", "-png", "-f", "1", "-l", "1", str(pdf), str(tmp_path / "p")], check=True)
    from PIL import Image

    png = next(tmp_path.glob("p*.png"))
    assert sorted(Image.open(png).size) == pytest.approx(sorted((w, h)), abs=1.5)
