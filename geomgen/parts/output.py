"""One shop-part file to write, through the one writer table of :mod:`geomgen.outputs`."""

from __future__ import annotations

from pathlib import Path

from ..outputs import Output, output_name

#: what the index says each kind of shop file is for
PURPOSE = {".step": "shop part solid (STEP, mm)", ".stl": "shop part mesh to print (STL, mm)",
           ".3mf": "shop part to print (3MF, unit mm)"}


def namer(set_name: str, surface: str):
    """The naming rule bound to one surface: ``name("mount", suffix=".step")``."""
    return lambda *words, suffix: output_name(set_name, surface, *words, suffix=suffix)


def shop_output(name: str, fmt: str, bodies=(), meshes=(), title: str = "", purpose: str = "") -> Output:
    """``fmt``: step | stl | 3mf. ``bodies``: (name, solid); ``meshes``: (name, vertices, faces)
    for stl and 3mf (made before anything is written, so a mesh failure writes nothing)."""
    from ..cad.shape import Body

    if fmt == "step":
        items = [Body(n, solid=s) for n, s in bodies]
    else:
        items = [Body(n, triangles=(v, f)) for n, v, f in meshes]
    options = {"assembly_name": title or Path(name).stem}
    return Output(name, fmt, (items, options), purpose or PURPOSE.get(Path(name).suffix, ""))
