"""The shop-parts summary as text, from the report that :func:`geomgen.parts.write_shop_parts`
returns and writes as ``report/<set>-parts.json``."""

from __future__ import annotations

import json
from pathlib import Path

from .. import CAUTION


def _cm3(v: float) -> str:
    return f"{v / 1000.0:.1f} cm³"


def _mount(m: dict) -> list[str]:
    p = m["pad"]
    far = "lower" if p["side"] == "upper" else "upper"
    auto = p.get("auto")
    out = [f"  mount: pad at datum z = {p['z']:.2f} mm on the {p['side']} skin"
           + (f" (auto: {100 * auto['contact_target']:.0f} % contact)" if auto else "")
           + f", x {p['x'][0]:g} .. {p['x'][1]:g}, y {p['y'][0]:g} .. {p['y'][1]:g} mm",
           f"    flat over {100 * p['flat_fraction']:.0f} % of the footprint (deepest cut {p['max_cut_mm']:.2f} mm"
           + (f", gaps to the skin {p['min_gap_mm']:.2f} .. {p['max_gap_mm']:.2f} mm" if p.get("min_gap_mm") is not None
              else "")
           + (f"; skin at z = {p['skin_z_range'][0]:.2f} .. {p['skin_z_range'][1]:.2f} mm" if p.get("skin_z_range")
              else "")
           + ")"]
    out += [f"    WARNING: {n}" for n in p.get("notes", [])]
    if "wall_mm" in p:
        out.append(f"    least wall under the pad {p['wall_mm']:.2f} mm to the {far} skin at "
                   f"x = {p['wall_at'][0]:.1f}, y = {p['wall_at'][1]:.1f} (min_wall {m['min_wall_mm']:g})")
    for h in m["holes"]:
        kind = h["kind"]
        desc = {"through": f"Ø{h['diameter']:g} through",
                "blind": f"Ø{h['diameter']:g} x {h.get('depth', 0):g} deep",
                "insert": f"insert pocket Ø{h.get('insert_diameter', 0):g} x {h.get('insert_depth', 0):g}, "
                          f"hole Ø{h['diameter']:g} to {h.get('depth', 0):g}",
                "counterbore": f"Ø{h['diameter']:g} through, counterbore Ø{h.get('counterbore_diameter', 0):g} x "
                               f"{h.get('counterbore_depth', 0):g}",
                "countersink": f"Ø{h['diameter']:g} through, countersink Ø{h.get('countersink_diameter', 0):g} "
                               f"{h.get('countersink_angle', 0):g}°"}[kind]
        out.append(f"    hole {h['index'] + 1} at x = {h['x']:g}, y = {h['y']:g} (axis along datum z): {desc}; "
                   f"{h['wall_mm']:.2f} mm {h['wall_what']}")
    out.append(f"    part with pad and holes: {m['file']} ({_cm3(m['volume_mm3'])}, features {_cm3(m['removed_mm3'])})")
    for s in m.get("shims", []):
        out.append(f"    shim {s['label']}: {s['length']:g} x {s['width']:g} mm, {s['t_fore']:.2f} mm forward, "
                   f"{s['t_aft']:.2f} mm aft; {', '.join(s['files'])}")
        out += [f"      {w}" for w in s["words"]]
    return out


def _printing(p: dict) -> list[str]:
    bv = p.get("build_volume")
    out = [f"  printing: scale {p['scale']:g}, trailing edge {p['te_printed_mm']:.2f} printed mm; {p['split']}"
           + (f" for a {' x '.join(f'{v:g}' for v in bv)} mm build volume less {p.get('bed_margin', 0):g} mm "
              "each side" if bv else "")]
    for pc in p["pieces"]:
        fit = "" if pc["fits"] is None else ("  fits" if pc["fits"] else "  DOES NOT FIT")
        out.append(f"    piece {pc['index']}: span {pc['span'][0]:.1f} .. {pc['span'][1]:.1f} mm, {pc['pose']}, "
                   f"{' x '.join(f'{v:.1f}' for v in pc['size_printed_mm'])} mm, {_cm3(pc['volume_printed_mm3'])}{fit}")
    for j in p["joints"]:
        out.append(f"    joint at span {j['y']:.1f} mm: Ø{j['hole_diameter']:.2f} holes {j['depth_each_side']:.1f} mm "
                   f"deep each side; round at {100 * j['round']['chord_fraction']:.0f} % chord (wall "
                   f"{j['round']['wall_printed_mm']:.2f}), slot {j['slot_length']:.2f} long at "
                   f"{100 * j['slot']['chord_fraction']:.0f} % chord (wall {j['slot']['wall_printed_mm']:.2f})")
    for s in p["spars"]:
        out.append(f"    spar Ø{s['diameter']:g} (channel Ø{s['channel_diameter']:g}) span {s['span'][0]:g} .. "
                   f"{s['span'][1]:g} mm at {100 * s['chord'][0]:.0f} .. {100 * s['chord'][1]:.0f} % chord: least wall "
                   f"{s['wall_printed_mm']:.2f} printed mm at span {s['wall_at_y']:.1f}")
    if "volume_bare_mesh_mm3" in p:
        out.append(f"    check: pieces {_cm3(p['volume_pieces_mm3'])} + removed features "
                   f"{_cm3(p['volume_removed_mm3'])} = meshed part {_cm3(p['volume_bare_mesh_mm3'])}; "
                   f"exact part {_cm3(p['volume_whole_mm3'])} (mesh "
                   f"{100 * p['balance_error_rel']:.2f} % off, within its {p['mesh_tol']:g} mm tolerance), design size")
    for pc in p["pieces"]:
        if "overhang_mm2" in pc and not pc["needs_support"] and pc["overhang_mm2"] > 0:
            out.append(f"    piece {pc['index']}: {pc['overhang_mm2']:.0f} mm² overhangs more than 45° "
                       "(hole roofs and ledges the slicer bridges)")
    out += [f"    note: {n}" for n in p.get("notes", [])]
    if "joint_test" in p:
        out.append(f"    joint test slice at span {p['joint_test']['y']:.1f} mm: {', '.join(p['joint_test']['files'])}")
    return out


def _laminate(lam: dict) -> list[str]:
    out = [f"  laminate {lam['thickness']:g} mm, files in the {lam['pose']} pose"]
    c = lam.get("core")
    if c:
        out.append(f"    core: span {c['span'][0]:.1f} .. {c['span'][1]:.1f} mm, from {100 * c['chord_from'][1]:.1f} % "
                   f"chord to {100 * c['chord_to'][0]:.0f} .. {100 * c['chord_to'][1]:.0f} % chord (edge "
                   f"{c['min_thickness']:g} mm), least laminate at its points {c['laminate_min_mm']:.3f} mm, "
                   f"{_cm3(c['volume_mm3'])}; {', '.join(c['files'])}")
    m = lam.get("mould")
    if m:
        hv = {h["half"]: h for h in m["halves"]}
        fl = m.get("flange")
        out.append(f"    two-part mould ({m['parting']} parting): part halves "
                   f"{_cm3(hv['upper']['volume_mm3'])} upper + {_cm3(hv['lower']['volume_mm3'])} lower "
                   f"= part {_cm3(m['volume_part_mm3'])}"
                   + (f"; flange {fl['width']:g} mm, {fl['thickness']:g} mm behind the cavity" if fl else ""))
        for h in m["halves"]:
            if "stock_size_mm" in h:
                out.append(f"      {h['half']} mould: stock {' x '.join(f'{v:.1f}' for v in h['stock_size_mm'])} mm, "
                           f"cavity {_cm3(h['cavity_mm3'])}, solid as written {_cm3(h['volume_written_mm3'])}; "
                           f"{h['file']}")
            else:
                out.append(f"      {h['half']}: {h['file']}")
        holes = m.get("holes") or []
        if holes:
            dw = [h for h in holes if h["kind"] == "dowel"]
            bo = [h for h in holes if h["kind"] == "bolt"]
            out.append(f"      {len(dw)} dowel holes Ø{dw[0]['diameter']:g} and {len(bo)} bolt holes "
                       f"Ø{bo[0]['diameter']:g} through both halves (positions in the report)")
        out += [f"      WARNING: {w}" for w in m.get("notes", [])]
    return out


def format_parts_summary(res, for_file: bool = False) -> str:
    """Text summary of a shop-parts run: ``res`` is what ``write_shop_parts`` returned, its report
    dict, or the path of the JSON report."""
    files = list(res) if isinstance(res, list) else []
    rep = getattr(res, "report", None) or (json.loads(Path(res).read_text()) if isinstance(res, (str, Path)) else res)
    where = f" into {res.out_dir}" if hasattr(res, "out_dir") and not for_file else ""
    took = "" if for_file else f" in {getattr(res, 'seconds', rep.get('seconds', 0)):.1f} s"
    lines = [f"{rep['written_by']}: shop parts of '{rep['spec']}'{where}{took}",
             f"frame: {rep['frame']}", ""]
    for s in rep["surfaces"]:
        lines.append(f"{s['name']} ({s['role']})")
        if "mount" in s:
            lines += _mount(s["mount"])
        if "printing" in s:
            lines += _printing(s["printing"])
        if "laminate" in s:
            lines += _laminate(s["laminate"])
        lines.append("")
    if files:
        def rel(p):
            return Path(p).relative_to(res.out_dir) if for_file and hasattr(res, "out_dir") else p
        lines += ["written:"] + [f"  {rel(p)}" for p in files] + [""]
    notes = list(rep.get("notes", [])) + list(getattr(res, "notes", []))
    if notes:
        lines += [f"note: {n}" for n in notes] + [""]
    lines.append("CAUTION: " + CAUTION)
    return "\n".join(lines)
