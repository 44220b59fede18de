"""The report's drawings, from the report dict only (matplotlib, Agg backend, PNG bytes).

One palette (:data:`STYLE`) for every drawing: a thing keeps its colour, line style and
marker throughout, and the styles differ without colour (solid, dashed, dash-dot; circle,
square, triangle...) so a black-and-white print still tells them apart.
"""

from __future__ import annotations

import io

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from .content import format_value  # noqa: E402

#: colour, line style, marker of each thing drawn (roles of parts, and balance points).
STYLE: dict[str, dict] = {
    "wing": dict(color="#1f5aa6", ls="-", marker="o", label="front wing"),
    "stabilizer": dict(color="#c85a00", ls="--", marker="s", label="stabilizer"),
    "mast": dict(color="#555555", ls="-.", marker="D", label="mast"),
    "fin": dict(color="#7b3fa0", ls=":", marker="v", label="fin"),
    "mac": dict(color="#000000", ls="-", marker="|", label="MAC"),
    "quarter_chord": dict(color="#6b6b6b", ls=":", marker=None, label="quarter-chord line"),
    "mean_line": dict(color="#6b6b6b", ls=":", marker=None, label="mean line"),
    "chord_line": dict(color="#3a3a3a", ls="-", marker=None, label="chord line"),
    "datum": dict(color="#9a9a9a", ls=(0, (6, 3)), marker=None, label="parallel to datum x"),
    "neutral_point": dict(color="#1b7a2e", ls="none", marker="^", label="neutral point"),
    "cg": dict(color="#b3141c", ls="none", marker="P", label="centre of gravity"),
    "cp": dict(color="#7a1fa2", ls="none", marker="X", label="centre of pressure (trim)"),
    "mast_reference": dict(color="#555555", ls="-.", marker=None, label="mast reference x"),
}

DPI = 130


def _st(role: str) -> dict:
    return STYLE.get(role, STYLE["wing"])


def _png(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, bbox_inches="tight", metadata={"Software": None})
    plt.close(fig)
    return buf.getvalue()


def _line(ax, x, y, key, *, lw=1.4, label=None, **kw):
    s = STYLE[key] if key in STYLE else _st(key)
    return ax.plot(x, y, color=s["color"], ls=s["ls"], lw=lw, label=label, **kw)


def _point(ax, x, y, key, *, label=None, size=9):
    s = STYLE[key]
    return ax.plot([x], [y], ls="none", marker=s["marker"], ms=size, color=s["color"], mec="black", mew=0.7,
                   label=label, zorder=6)


def _fit_equal(ax, xs, ys, pad: float = 0.05) -> None:
    """Limits that hold every point with equal axes in the axes' box (widened, never clipped)."""
    xs, ys = np.concatenate([np.ravel(v) for v in xs]), np.concatenate([np.ravel(v) for v in ys])
    (x0, x1), (y0, y1) = (xs.min(), xs.max()), (ys.min(), ys.max())
    dx, dy = max(x1 - x0, 1.0) * (1 + 2 * pad), max(y1 - y0, 1.0) * (1 + 2 * pad)
    box = ax.get_position()
    w, h = box.width * ax.figure.get_figwidth(), box.height * ax.figure.get_figheight()
    if dx / w > dy / h:
        dy = dx * h / w
    else:
        dx = dy * w / h
    cx, cy = 0.5 * (x0 + x1), 0.5 * (y0 + y1)
    ax.set_xlim(cx - dx / 2, cx + dx / 2)
    ax.set_ylim(cy - dy / 2, cy + dy / 2)
    ax.set_aspect("equal", adjustable="datalim")


def _balance_points(data) -> list:
    """(row label, key, x) of the balance points, in the order of the strip under the top view."""
    b = data["balance"]
    if b is None:
        return []
    pts = [("neutral point", "neutral_point", b["neutral_point_x_mm"])]
    if b["cg_x_mm"] is not None:
        pts.append(("centre of gravity", "cg", b["cg_x_mm"]))
    for t in b["trim"]:
        if t["cp_x_mm"] is not None:
            pts.append((f"cp at {format_value(t['speed_kmh'], 'g')} km/h", "cp", t["cp_x_mm"]))
    return pts


def top_view(data) -> bytes:
    b = data["balance"]
    pts = _balance_points(data)
    rows = ([("mast reference", "mast_reference", b["mast_x_mm"])] if b and b["mast_x_mm"] is not None else []) + pts
    ext_x = [r[2] for r in rows]
    ext_y = [0.0]
    for s in data["surfaces"]:
        if s["orientation"] == "horizontal":
            ext_x += s["outline"]["le_x_mm"] + s["outline"]["te_x_mm"]
            ext_y += s["outline"]["span_mm"]
        else:
            ext_x += s["top_section"]["x_mm"]
            ext_y += s["top_section"]["y_mm"]
    view_h = float(np.clip(7.5 * np.ptp(ext_y) / max(np.ptp(ext_x), 1.0), 2.5, 8.0))  # inches, for a 7.5 in wide box
    strip_h = 0.6 + 0.3 * len(rows)
    if rows:  # a strip under the view lists the balance points by row, on the same x scale
        fig, (ax, strip) = plt.subplots(2, 1, figsize=(9.0, view_h + strip_h + 1.2), sharex=True,
                                        gridspec_kw=dict(height_ratios=[view_h, strip_h], hspace=0.08))
    else:
        fig, ax = plt.subplots(figsize=(9.0, view_h + 1.0))
        ax.set_xlabel("datum x, mm (aft →)")
    seen = set()
    for s in data["surfaces"]:
        st, role = _st(s["role"]), s["role"]
        lab = st["label"] if role not in seen else None
        seen.add(role)
        if s["orientation"] == "horizontal":
            o = s["outline"]
            xs = np.concatenate([o["le_x_mm"], o["te_x_mm"][::-1], o["le_x_mm"][:1]])
            ys = np.concatenate([o["span_mm"], o["span_mm"][::-1], o["span_mm"][:1]])
            ax.fill(xs, ys, color=st["color"], alpha=0.13, lw=0)
            _line(ax, xs, ys, role, label=f"{lab}: {s['name']}" if lab else s["name"])
            _line(ax, o["quarter_chord_x_mm"], o["span_mm"], "quarter_chord", lw=1.1,
                  label=STYLE["quarter_chord"]["label"] if "qc" not in seen else None)
            seen.add("qc")
            m = s["mac"]
            for yv in m["span_datum_mm"]:
                ax.plot([m["le_x_mm"], m["le_x_mm"] + m["length_mm"]], [yv, yv], color=STYLE["mac"]["color"],
                        lw=2.6, marker="|", ms=12, mew=2, label="MAC" if "mac" not in seen else None, zorder=5)
                seen.add("mac")
        else:
            t = s["top_section"]
            ax.fill(t["x_mm"], t["y_mm"], color=st["color"], alpha=0.3, lw=0)
            _line(ax, t["x_mm"], t["y_mm"], role, label=f"{lab}: {s['name']} (root section)" if lab else s["name"])
    for lab, key, x in pts:
        _point(ax, x, 0.0, key, label=STYLE[key]["label"] if key not in seen else None)
        seen.add(key)
    ax.axhline(0.0, color="#bbbbbb", lw=0.6, zorder=0)
    _fit_equal(ax, [ext_x], [ext_y])
    ax.set_ylabel("datum y, mm (starboard up)")
    ax.set_title("Top view (datum x–y)")
    ax.grid(True, color="#e4e4e4", lw=0.5)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, framealpha=0.92)
    if not rows:
        return _png(fig)
    for i, (lab, key, x) in enumerate(rows):
        if key == "mast_reference":
            strip.axvline(x, color=STYLE[key]["color"], ls=STYLE[key]["ls"], lw=1.2)
        else:
            _point(strip, x, i, key, size=8)
            strip.hlines(i, min(r[2] for r in rows), x, color="#d0d0d0", lw=0.6, zorder=0)
    strip.set_yticks(range(len(rows)), [r[0] for r in rows], fontsize=8)
    strip.set_ylim(len(rows) - 0.5, -0.5)
    strip.set_xlabel("datum x, mm (aft →)")
    strip.grid(True, axis="x", color="#e4e4e4", lw=0.5)
    return _png(fig)


def side_view(data) -> bytes:
    horiz = [s for s in data["surfaces"] if s["orientation"] == "horizontal"]
    n = max(1, len(horiz))
    fig = plt.figure(figsize=(9.0, 10.5))
    gs = fig.add_gridspec(2, n, height_ratios=[3.2, 1.0], hspace=0.25)
    ax = fig.add_subplot(gs[0, :])
    seen = set()
    for s in data["surfaces"]:
        st, role = _st(s["role"]), s["role"]
        lab = f"{st['label']}: {s['name']}" if role not in seen else s["name"]
        seen.add(role)
        if s["orientation"] == "horizontal":
            sd = s["side"]
            ax.fill(sd["root_x_mm"], sd["root_z_mm"], color=st["color"], alpha=0.35, lw=0)
            _line(ax, sd["root_x_mm"], sd["root_z_mm"], role, label=lab + " (root section)")
            _line(ax, sd["tip_x_mm"], sd["tip_z_mm"], role, lw=0.8, alpha=0.8)
            rc = sd["root_chord"]
            ax.annotate(f"incidence {format_value(s['incidence_deg'], '+.2f')}°", (rc["le_x_mm"], rc["le_z_mm"]),
                        xytext=(0, 16), textcoords="offset points", fontsize=8, ha="left")
        else:
            o = s["outline"]
            xs = np.concatenate([o["le_x_mm"], o["te_x_mm"][::-1], o["le_x_mm"][:1]])
            zs = np.concatenate([o["span_mm"], o["span_mm"][::-1], o["span_mm"][:1]])
            ax.fill(xs, zs, color=st["color"], alpha=0.15, lw=0)
            _line(ax, xs, zs, role, label=lab)
            m = s["mac"]
            for zv in m["span_datum_mm"]:
                ax.plot([m["le_x_mm"], m["le_x_mm"] + m["length_mm"]], [zv, zv], color=STYLE["mac"]["color"],
                        lw=2.6, marker="|", ms=12, mew=2, label="MAC" if "mac" not in seen else None)
                seen.add("mac")
    ax.axhline(0.0, color="#bbbbbb", lw=0.6, zorder=0)
    ax.set_aspect("equal", adjustable="datalim")
    ax.set_xlabel("datum x, mm (aft →)")
    ax.set_ylabel("datum z, mm (up)")
    ax.set_title("Side view (datum x–z)")
    ax.grid(True, color="#e4e4e4", lw=0.5)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, framealpha=0.92)

    for k, s in enumerate(horiz):
        a = fig.add_subplot(gs[1, k])
        sd, rc = s["side"], s["side"]["root_chord"]
        st = _st(s["role"])
        a.fill(sd["root_x_mm"], sd["root_z_mm"], color=st["color"], alpha=0.3, lw=0)
        _line(a, sd["root_x_mm"], sd["root_z_mm"], s["role"])
        chord = rc["te_x_mm"] - rc["le_x_mm"]
        _line(a, [rc["le_x_mm"], rc["te_x_mm"]], [rc["le_z_mm"], rc["te_z_mm"]], "chord_line", lw=1.0,
              label=STYLE["chord_line"]["label"])
        _line(a, [rc["le_x_mm"] - 0.05 * chord, rc["te_x_mm"] + 0.1 * chord], [rc["le_z_mm"]] * 2, "datum", lw=1.0,
              label=STYLE["datum"]["label"])
        a.set_aspect("equal", adjustable="datalim")
        a.set_title(f"{s['name']} root: chord at {format_value(rc['angle_deg'], '+.2f')}° to datum x\n"
                    f"(incidence {format_value(s['incidence_deg'], '+.2f')}°, positive: leading edge up)", fontsize=8)
        a.set_xlabel("datum x, mm")
        a.set_ylabel("datum z, mm")
        a.grid(True, color="#e4e4e4", lw=0.5)
        a.tick_params(labelsize=7)
        a.legend(loc="lower left", fontsize=7)
    return _png(fig)


def sections(data, surface: dict) -> bytes:
    """One axes per station, all at one scale with equal axes (placed in inches, so nothing is clipped)."""
    st = surface["stations"]
    x0 = -0.03 * max(x["chord_mm"] for x in st)
    x1 = 1.03 * max(x["chord_mm"] for x in st)
    ax_w, left, right, title_h, gap_h, bottom_h = 6.6, 0.75, 0.25, 0.45, 0.12, 0.55
    scale = ax_w / (x1 - x0)  # inches per mm, both axes
    rows = []
    for x in st:
        z = np.asarray(x["shape"]["z_mm"], float)
        lo, hi = z.min() - 0.12 * np.ptp(z) - 1.0, z.max() + 0.12 * np.ptp(z) + 1.0
        grow = max(0.0, 0.6 / scale - (hi - lo)) / 2  # at least 0.6 in tall, still equal axes
        rows.append((lo - grow, hi + grow))
    heights = [(hi - lo) * scale for lo, hi in rows]
    fig_w = left + ax_w + right
    fig_h = 0.5 + sum(h + title_h + gap_h for h in heights) + bottom_h
    fig = plt.figure(figsize=(fig_w, fig_h))
    top = fig_h - 0.5
    f = format_value
    for k, (x, (lo, hi), h) in enumerate(zip(st, rows, heights)):
        top -= title_h
        a = fig.add_axes((left / fig_w, (top - h) / fig_h, ax_w / fig_w, h / fig_h))
        top -= h + gap_h
        sh = x["shape"]
        a.fill(sh["x_mm"], sh["z_mm"], color=_st(surface["role"])["color"], alpha=0.18, lw=0)
        _line(a, sh["x_mm"], sh["z_mm"], surface["role"], lw=1.3)
        _line(a, [0.0, x["chord_mm"]], [0.0, 0.0], "chord_line", lw=0.6)
        _line(a, sh["mean_x_mm"], sh["mean_z_mm"], "mean_line", lw=1.0)
        a.set_xlim(x0, x1)
        a.set_ylim(lo, hi)
        a.set_aspect("equal", adjustable="box")
        a.set_title(f"span {f(x['y_mm'], '.1f')} mm · chord {f(x['chord_mm'], '.1f')} mm · {x['section']} · "
                    f"thickness {f(x['thickness_pct'], '.2f')} % at {f(x['thickness_at_pct'], '.1f')} % · "
                    f"camber {f(x['camber_pct'], '+.2f')} % at {f(x['camber_at_pct'], '.1f')} %", fontsize=7.5)
        a.set_ylabel("mm", fontsize=8)
        a.tick_params(labelsize=7, labelbottom=(k == len(st) - 1))
        a.grid(True, color="#ececec", lw=0.5)
    a.set_xlabel("from the leading edge along the chord, mm", fontsize=9)
    fig.suptitle(f"Sections of {surface['name']} (true shape, equal axes)", fontsize=10, y=1 - 0.15 / fig_h)
    return _png(fig)


def spanwise(data) -> bytes:
    fig, (a1, a2, a3) = plt.subplots(3, 1, figsize=(8.0, 9.0), sharex=True)
    for s in data["surfaces"]:
        st, role = _st(s["role"]), s["role"]
        sp = s["spanwise"]
        ys = [x["y_mm"] for x in s["stations"]]
        for a, key in ((a1, "chord_mm"), (a2, "twist_deg")):
            _line(a, sp["y_mm"], sp[key], role, label=s["name"])
            a.plot(ys, [x[key] for x in s["stations"]], ls="none", marker=st["marker"],
                   color=st["color"], mec="black", mew=0.5, ms=5)
        ld = s.get("loading")
        if ld:
            y, ccl = np.asarray(ld["y_mm"], float), np.asarray(ld["c_cl_mm"], float)
            keep = y >= 0
            order = np.argsort(y[keep])
            _line(a3, y[keep][order], ccl[keep][order], role, label=s["name"], marker=st["marker"], ms=3.5,
                  mec="black", mew=0.4)
    a1.set_ylabel("chord, mm")
    a2.set_ylabel("twist, deg (+ leading edge up)")
    a3.set_ylabel("c·cl, mm")
    a3.axhline(0.0, color="#bbbbbb", lw=0.6)
    a3.set_xlabel("span position from the root, mm")
    a1.set_title("Chord, twist and lift loading along the span")
    alpha = data["balance"]["alpha_ref_deg"] if data["balance"] else None
    a3.set_title(f"lift loading at attitude {format_value(alpha, '.1f')}° (vortex lattice)", fontsize=9)
    for a in (a1, a2, a3):
        a.grid(True, color="#e4e4e4", lw=0.5)
        if a.get_legend_handles_labels()[0]:
            a.legend(fontsize=8)
    return _png(fig)


def stiffness(data) -> bytes:
    """Second moments and torsion constants along the span (log scale), and each part's root
    section with its centroid and principal axes."""
    surfs = data["surfaces"]
    fig = plt.figure(figsize=(8.0, 4.2 + 1.6 * len(surfs)), layout="constrained")
    gs = fig.add_gridspec(1 + len(surfs), 1, height_ratios=[3.0] + [1.4] * len(surfs))
    a = fig.add_subplot(gs[0])
    for s in surfs:
        sp, role = s["section_props"], s["role"]
        _line(a, sp["span"]["y_mm"], sp["span"]["i_chord_mm4"], role, label=f"{s['name']}: I about chord axis")
        a.plot(sp["span"]["y_mm"], sp["span"]["i_normal_mm4"], color=_st(role)["color"], lw=0.8, ls=":")
        a.plot(sp["stations"]["y_mm"], sp["stations"]["j_mm4"], ls="none", marker=_st(role)["marker"],
               color=_st(role)["color"], mec="black", mew=0.5, ms=5, label=f"{s['name']}: J (solid) at stations")
    a.set_yscale("log")
    a.set_xlabel("span position from the root, mm")
    a.set_ylabel("mm⁴")
    a.set_title("Section stiffness along the span (dotted: I about the chord-normal axis)", fontsize=10)
    a.grid(True, which="both", color="#e4e4e4", lw=0.5)
    a.legend(fontsize=7)
    for k, s in enumerate(surfs):
        sp = s["section_props"]
        r, sh = sp["root"], sp["root_shape"]
        b = fig.add_subplot(gs[k + 1])
        b.fill(sh["x_mm"], sh["z_mm"], color=_st(s["role"])["color"], alpha=0.18, lw=0)
        _line(b, sh["x_mm"], sh["z_mm"], s["role"], lw=1.1)
        cx, cz, c = r["centroid_x_mm"], r["centroid_z_mm"], r["chord_mm"]
        th = np.radians(r["principal_deg"])
        for ang, ln in ((th, 0.45 * c), (th + np.pi / 2, 0.12 * c)):
            b.plot([cx - ln * np.cos(ang), cx + ln * np.cos(ang)], [cz - ln * np.sin(ang), cz + ln * np.sin(ang)],
                   color="black", lw=0.7, ls="--")
        b.plot([cx], [cz], marker="+", color="black", ms=9)
        b.set_aspect("equal", adjustable="datalim")
        b.set_title(f"{s['name']} root section: centroid + at {format_value(cx, '.1f')} mm, principal axes "
                    f"dashed ({format_value(r['principal_deg'], '+.2f')}° from the chord line)", fontsize=8)
        b.tick_params(labelsize=7)
    return _png(fig)


def envelope(data) -> bytes:
    """Lift of each surface and total drag against speed, the usable envelope shaded."""
    b = data["balance"]
    pf = b["performance"]
    roles = {s["name"]: s["role"] for s in data["surfaces"]}
    sw = pf["sweep"]
    v = [p["speed_kmh"] for p in sw]
    fig, (a1, a2) = plt.subplots(2, 1, figsize=(8.0, 6.5), sharex=True)
    for name in sw[0]["lift_n"] if sw else []:
        _line(a1, v, [p["lift_n"][name] for p in sw], roles.get(name, "wing"), label=f"{name} lift")
    a1.axhline(0.0, color="#bbbbbb", lw=0.6)
    a1.set_ylabel("lift, N (negative: down)")
    _line(a2, v, [p["total_n"] for p in sw], "wing", label="total drag")
    _line(a2, v, [p["drag_n"].get("induced") for p in sw], "quarter_chord", label="induced drag")
    a2.set_ylabel("drag, N")
    a2.set_xlabel("speed, km/h")
    lo, hi = pf["envelope_kmh"]
    for a in (a1, a2):
        if lo is not None and hi is not None:
            a.axvspan(lo, hi, color="#e8f3e8", zorder=0)
        a.grid(True, color="#e4e4e4", lw=0.5)
        a.legend(fontsize=8)
    a1.set_title(f"Trimmed, takeoff {format_value(lo, '.1f')} km/h to first cavitation {format_value(hi, '.1f')} km/h "
                 "(first estimates)", fontsize=9)
    return _png(fig)


def render_all(data, progress=None) -> dict:
    """Image key -> PNG bytes, for every figure the report's blocks name."""
    say = progress or (lambda m: None)
    say("drawing the views")
    out = {"top": top_view(data), "side": side_view(data)}
    for s in data["surfaces"]:
        out[f"sections-{s['name']}"] = sections(data, s)
    out["spanwise"] = spanwise(data)
    out["stiffness"] = stiffness(data)
    if data["balance"] is not None and data["balance"].get("performance") and data["balance"]["performance"]["sweep"]:
        out["envelope"] = envelope(data)
    return out
