"""Formatting of check results: terminal table, Markdown record. (JSON: CheckResult.as_dict.)"""

from __future__ import annotations

from .. import CAUTION


def _num(v, unit="") -> str:
    if v is None:
        return "-"
    a = abs(v)
    if unit == "%":
        return f"{v:.2f}"
    return f"{v:.4f}" if a < 10 else f"{v:.3f}" if a < 1000 else f"{v:.1f}"


def _rows(res):
    header = ["part", "figure", "unit", "intended", "STEP", "STL", "Δ", "build tol", "expected", "verdict"]
    rows = []
    for r in res.records:
        d = (r.measured - r.intended) if (r.measured is not None and r.intended is not None) else None
        exp = f"{_num(r.expected, r.unit)} ± {_num(r.expected_tol)}" if r.expected is not None else "-"
        verdict = r.verdict
        if r.fault:
            verdict = f"FAULT ({'+'.join(r.fault)})" + ("" if r.verdict == "-" else f", {r.verdict}")
        rows.append([r.part, r.label, r.unit, _num(r.intended, r.unit), _num(r.step, r.unit), _num(r.stl, r.unit),
                     "-" if d is None else f"{d:+.4f}", _num(r.tol_step), exp, verdict])
    return header, rows


def summary_lines(res) -> list[str]:
    lines = []
    for name in res.modified:
        lines.append(f"GEOMETRY FAULT: {name} changed since geomgen wrote it (size or SHA-256 differs from "
                     "the manifest); it was measured as it is now.")
    for r in res.faults:
        vals = ", ".join(f"{k} {getattr(r, k.lower()):.4f}" for k in r.fault)
        lines.append(f'GEOMETRY FAULT: surface "{r.part}" {r.label}: intended {r.intended:.4f} {r.unit}, '
                     f"measured {vals} {r.unit} (build tolerance {r.tol_step:.4f} STEP, "
                     f"{(r.tol_stl if r.tol_stl is not None else r.tol_step):.4f} STL). "
                     "The written file does not match the spec: do not machine or print it; rebuild and check again.")
    for r in res.failures:
        lines.append(f'EXPECTATION FAILED: surface "{r.part}" {r.label}: expected {r.expected:g} ± '
                     f"{r.expected_tol:.4g} {r.unit}, measured {r.measured:.4f} {r.unit}")
    for name, p in res.parts.items():
        if not p.get("watertight", True):
            lines.append(f'GEOMETRY FAULT: surface "{name}": {p["stl"]} is not watertight')
    if not lines:
        n_exp = sum(1 for r in res.records if r.verdict == "pass")
        lines.append(f"OK: every measured figure agrees with the intended one within the build tolerance; "
                     f"{n_exp} expectation{'s' if n_exp != 1 else ''} met.")
    why = {f["name"]: f for f in res.files}
    for name in res.stale:
        f = why.get(name, {})
        lines.append(f"STALE: {name}: {f.get('changed_words') or 'the spec'} changed since it was made; it does "
                     f"not match the spec: run `geomgen {f.get('command', '?')}` again.")
    return lines


def file_lines(res) -> list[str]:
    """Every file of the set in the folder: current, or which of its inputs changed."""
    if not res.files:
        return []
    out = [f"Files of '{res.spec_name}' in {res.out_dir} ({sum(f['current'] for f in res.files)} of "
           f"{len(res.files)} current: none of the inputs they were made from changed):"]
    for f in res.files:
        state = "current" if f["current"] else f"STALE ({f['changed_words']} changed)"
        if f.get("edited"):
            state += ", edited since geomgen wrote it"
        out.append(f"  {f['name']}  [{f['command']}]  {state}")
    return out


def balance_lines(res) -> list[str]:
    """Short balance summary from the vortex-lattice result (full table: geomgen balance)."""
    b = res.balance
    if not b:
        return []
    ref = b["reference"]
    d = b.get("neutral_point_from_mast_mm")
    if d is not None:
        where_np = (f"{abs(d):.1f} mm {'ahead of' if d < 0 else 'behind'} the mast "
                    f"({ref['mast_reference']})")
    else:  # no mast in the spec: positions from the datum origin
        x = b["neutral_point_x_mm"]
        where_np = f"{abs(x):.1f} mm {'ahead of' if x < 0 else 'behind'} the datum origin (no mast)"
    out = [f"Balance (vortex-lattice method; details: geomgen balance): neutral point x = "
           f"{b['neutral_point_x_mm']:.1f} mm, {where_np}, "
           f"{b['neutral_point_pct_mac']:.1f} % of the front wing's MAC"]
    if b.get("static_margin_pct") is not None:
        src = f" (from {b['cg_source']})" if b.get("cg_source") else ""
        out.append(f"static margin {b['static_margin_pct']:.1f} % MAC for the weight at x = {b['cg_x_mm']:.1f} mm{src}")
    w = b.get("water") or {}
    if w.get("surface"):
        out.append(f"water: free surface at z = {w['surface_z_mm']:.0f} mm ({w['surface']})" if w.get("free_surface")
                   else f"water: {w['surface']}")
    for t in b.get("trim") or []:
        if t.get("trimmable") is False:
            out.append(f"  {t['speed_kmh']:5.1f} km/h: {t['reason']}")
            continue
        lifts = ", ".join(f"{k} {v:+.0f} N ({b_kgf:+.1f} kgf)" for (k, v), b_kgf in
                          zip(t["lift_n"].items(), t["lift_kgf"].values()))
        cp, what = t.get("cp_from_mast_mm"), "the mast"
        if d is None:  # no mast: from the datum origin
            cp, what = t.get("cp_x_mm"), "the datum origin"
        where = "-" if cp is None else f"{abs(cp):.0f} mm {'ahead of' if cp < 0 else 'behind'} {what}"
        out.append(f"  {t['speed_kmh']:5.1f} km/h: {lifts}; weight must act {where}")
    out += [f"warning: {x['message']}" for x in b.get("warnings") or []]
    return out


def format_terminal(res) -> str:
    header, rows = _rows(res)
    widths = [max(len(str(x)) for x in col) for col in zip(header, *rows)]
    right = {3, 4, 5, 6, 7}
    def fmt(row):
        return "  ".join(str(c).rjust(w) if i in right else str(c).ljust(w)
                         for i, (c, w) in enumerate(zip(row, widths)))
    out = [f"geomgen check '{res.spec_name}': files in {res.out_dir} "
           f"({'built now' if res.built else 'fresh outputs reused'}); STEP measured through the kernel, "
           f"STL through trimesh (chordal tolerance {res.stl_tol:g} mm)", "", fmt(header),
           "  ".join("-" * w for w in widths)]
    last = None
    for row in rows:
        if last is not None and row[0] != last:
            out.append("")
        last = row[0]
        out.append(fmt(row))
    out += ["", "Δ = measured (STEP, else STL) − intended; build tol = STEP tolerance.", ""]
    out += summary_lines(res)
    if res.files:
        out += [""] + file_lines(res)
    if res.balance:
        out += [""] + balance_lines(res)
    if res.balance_skipped:
        out += ["", res.balance_skipped]
    out += [f"note: {n}" for n in res.notes]
    out += ["", "CAUTION: " + CAUTION]
    return "\n".join(out)


def format_markdown(res) -> str:
    header, rows = _rows(res)
    out = [f"# Check record: {res.spec_name}", "",
           f"Files in `{res.out_dir}` ({'built for this check' if res.built else 'fresh outputs reused'}). "
           f"STEP measured through the kernel (sliced skin sampled within "
           f"{max(p['skin_sampling_mm'] for p in res.parts.values()):.4f} mm), STL through trimesh "
           f"(chordal tolerance {res.stl_tol:g} mm).", "",
           "| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    out += ["| " + " | ".join(str(c) for c in row) + " |" for row in rows]
    out += ["", "## Verdict", ""] + [f"- {line}" for line in summary_lines(res)]
    if res.balance:
        out += ["", "## Balance", ""] + [f"- {line.strip()}" for line in balance_lines(res)]
    if res.balance_skipped:
        out += ["", "## Balance", "", f"- {res.balance_skipped}"]
    out += ["", "## Caution", "", CAUTION, ""]
    return "\n".join(out)
