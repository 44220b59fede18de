"""3MF writer (the 3D Manufacturing Format core specification): a zip package with a content
types part, a relationship to the model part, and the model part holding one mesh object per
body, in millimetres. Written with zipfile; fixed time stamps, so the same meshes give the same
bytes."""

from __future__ import annotations

import io
import zipfile
from pathlib import Path
from xml.sax.saxutils import quoteattr

import numpy as np

from ..errors import ExportError

CORE_NS = "http://schemas.microsoft.com/3dmanufacturing/core/2015/02"
MODEL_PATH = "3D/3dmodel.model"

CONTENT_TYPES = (
    '<?xml version="1.0" encoding="UTF-8"?>\n'
    '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
    '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
    '<Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/>'
    "</Types>\n")

RELS = (
    '<?xml version="1.0" encoding="UTF-8"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
    f'<Relationship Target="/{MODEL_PATH}" Id="rel0" '
    'Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/>'
    "</Relationships>\n")


def model_xml(bodies, title: str = "") -> str:
    """The model part for ``bodies``: a list of (name, vertices (n, 3) mm, faces (m, 3))."""
    out = io.StringIO()
    out.write('<?xml version="1.0" encoding="UTF-8"?>\n')
    out.write(f'<model unit="millimeter" xml:lang="en-US" xmlns="{CORE_NS}">\n')
    if title:
        out.write(f'<metadata name="Title">{title}</metadata>\n')
    out.write('<metadata name="Application">geomgen</metadata>\n<resources>\n')
    for i, (name, v, f) in enumerate(bodies, 1):
        out.write(f'<object id="{i}" type="model" name={quoteattr(name)}><mesh><vertices>\n')
        out.write("".join(f'<vertex x="{x:.6f}" y="{y:.6f}" z="{z:.6f}"/>\n' for x, y, z in np.asarray(v, float)))
        out.write("</vertices><triangles>\n")
        out.write("".join(f'<triangle v1="{a}" v2="{b}" v3="{c}"/>\n' for a, b, c in np.asarray(f, int)))
        out.write("</triangles></mesh></object>\n")
    out.write("</resources>\n<build>\n")
    out.write("".join(f'<item objectid="{i}"/>\n' for i in range(1, len(bodies) + 1)))
    out.write("</build>\n</model>\n")
    return out.getvalue()


def write_3mf(bodies, path, title: str = "") -> None:
    """Write a 3MF package of ``bodies`` (name, vertices, faces) at ``path`` or raise ExportError."""
    def add(z, name, text):
        info = zipfile.ZipInfo(name, date_time=(1980, 1, 1, 0, 0, 0))
        info.compress_type = zipfile.ZIP_DEFLATED
        z.writestr(info, text.encode("utf-8"))

    try:
        with zipfile.ZipFile(Path(path), "w") as z:
            add(z, "[Content_Types].xml", CONTENT_TYPES)
            add(z, "_rels/.rels", RELS)
            add(z, MODEL_PATH, model_xml(bodies, title))
    except OSError as exc:
        raise ExportError(f"{path}: cannot write 3MF: {exc.strerror or exc}") from None
