"""A study's table as text (side by side), CSV, JSON, Parquet (where pyarrow is installed) and
plots of chosen outputs against chosen inputs; and the outputs of the set that hold them."""

from __future__ import annotations

import csv
import io
import math
import re

from .. import CAUTION
from .figures import FIGURES, condition_words
from .study import Table

CAUTION_STUDY = ("Figures from the vortex-lattice analysis (first estimates: no viscous stall, "
                 "no free surface unless the spec asks for it). " + CAUTION)


def _fmt(v) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        if not math.isfinite(v):
            return "-"
        return f"{v:.1f}" if abs(v) >= 100 else f"{v:.2f}" if abs(v) >= 1 else f"{v:.3f}"
    return str(v)


def to_text(t: Table) -> str:
    """Figures down, variants across (compare, family), or variants down (sweep)."""
    lines = [t.title]
    if t.condition:
        lines.append(f"at {condition_words(t.condition)}")
    lines.append("")
    if t.kind in ("compare", "family"):
        keys = [k for k in t.inputs + list(FIGURES) + list(_CONDITION) + ["check"]
                if any(r.get(k) is not None for r in t.rows)]
        heads = [f"{FIGURES[k][0]}{', ' + FIGURES[k][1] if k in FIGURES and FIGURES[k][1] else ''}"
                 if k in FIGURES else _CONDITION.get(k, k) for k in keys]
        extra = sorted({k for r in t.rows for k in r if ":" in k})
        keys += extra
        heads += extra
        w0 = max(len(h) for h in heads + ["variant"])
        cols = [[_fmt(r.get(k)) for k in keys] for r in t.rows]
        ws = [max(len(lab), *(len(c) for c in col)) for lab, col in zip(t.labels, cols)]
        lines.append("  ".join(["variant".ljust(w0)] + [lab.rjust(w) for lab, w in zip(t.labels, ws)]))
        for i, h in enumerate(heads):
            lines.append("  ".join([h.ljust(w0)] + [col[i].rjust(w) for col, w in zip(cols, ws)]))
    else:
        keys = t.inputs + ["stab_lift_pct_weight", "cp_from_mast_mm", "mast_move_mm", "lift_to_drag",
                           "neutral_point_x_mm", "takeoff_kmh"] + \
            (["check"] if any("check" in r for r in t.rows) else [])
        lines.append("  ".join(f"{k:>16}" for k in keys))
        for r in t.rows:
            lines.append("  ".join(f"{_fmt(r.get(k)):>16}" for k in keys))
    errs = [(lab, r["error"]) for lab, r in zip(t.labels, t.rows) if r.get("error")]
    if errs:
        lines += ["", f"{len(errs)} variant(s) could not be analysed:"] + [f"  {lab}: {e}" for lab, e in errs]
    checked = [(lab, r) for lab, r in zip(t.labels, t.rows) if "check" in r]
    if checked:
        bad = [(lab, r) for lab, r in checked if r["check"] != "ok"]
        lines += ["", f"built and checked: {len(checked) - len(bad)} of {len(checked)} variant(s) ok"
                  + (f"; {len(bad)} not:" if bad else "")]
        lines += [f"  {lab}: {r['check']}: {r.get('check_error', '')}" for lab, r in bad]
    lines += [""] + [f"note: {n}" for n in t.notes]
    lines += ["mast move: how far the mast must move in its tracks (aft +) to keep the net centre of pressure "
              "under the rider where the base set has it.", "", "CAUTION: " + CAUTION_STUDY]
    return "\n".join(lines)


#: row keys of the condition a variant was analysed at -> heading
_CONDITION = {"cruise_kmh": "speed, km/h", "mass_kg": "mass, kg", "water": "water"}


def _cell(v):
    """A CSV cell: plain numbers (``42.669498355839046``, never a numpy repr), text as it is."""
    if v is None:
        return ""
    if isinstance(v, bool):
        return str(v)
    if isinstance(v, float):  # numpy's float64 is one too; its repr is not a number
        return repr(float(v))
    if isinstance(v, int):
        return str(int(v))
    return v


def to_csv(t: Table) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    cols = t.columns
    w.writerow(cols)
    for r in t.rows:
        w.writerow([_cell(r.get(c)) for c in cols])
    return buf.getvalue()


def to_json(t: Table) -> dict:
    def clean(v):
        return None if isinstance(v, float) and not math.isfinite(v) else v
    return {"kind": t.kind, "title": t.title, "condition": t.condition, "inputs": t.inputs, "labels": t.labels,
            "notes": t.notes,
            "figures": {k: {"label": h, "unit": u} for k, (h, u) in FIGURES.items()},
            "rows": [{k: clean(v) for k, v in r.items()} for r in t.rows], "caution": CAUTION_STUDY}


def to_parquet(t: Table) -> bytes | None:
    """Parquet bytes of the table, or None without pyarrow (CSV is always written)."""
    try:
        import pyarrow as pa
        import pyarrow.parquet as pq
    except ImportError:
        return None
    cols = t.columns
    arrays = {}
    for c in cols:
        vals = [r.get(c) for r in t.rows]
        if all(v is None or isinstance(v, (int, float)) and not isinstance(v, bool) for v in vals):
            arrays[c] = pa.array([None if v is None else float(v) for v in vals], pa.float64())
        else:
            arrays[c] = pa.array([None if v is None else str(v) for v in vals], pa.string())
    buf = io.BytesIO()
    pq.write_table(pa.table(arrays), buf)
    return buf.getvalue()


def plots(t: Table, pairs: list[tuple[str, str]]) -> dict[str, bytes]:
    """PNG bytes per (output, input) pair: the output against the input, one line per other
    input value combination (grid) or one line (one at a time)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    out = {}
    for y_key, x_key in pairs:
        fig, ax = plt.subplots(figsize=(7.0, 4.5))
        others = [k for k in t.inputs if k != x_key]
        groups: dict = {}
        for r in t.rows:
            if r.get(x_key) is None or r.get(y_key) is None:
                continue
            groups.setdefault(tuple(r.get(k) for k in others), []).append((r[x_key], r[y_key]))
        for key, pts in groups.items():
            pts.sort()
            lab = ", ".join(f"{k}={v:g}" for k, v in zip(others, key)) if others else None
            ax.plot([p[0] for p in pts], [p[1] for p in pts], marker="o", ms=3, lw=1.2, label=lab)
        head, unit = FIGURES.get(y_key, (y_key, ""))
        ax.set_xlabel(x_key)
        ax.set_ylabel(f"{head}{', ' + unit if unit else ''}")
        ax.grid(True, color="#e4e4e4", lw=0.5)
        if others and len(groups) <= 12:
            ax.legend(fontsize=7)
        ax.set_title(f"{head} against {x_key}", fontsize=10)
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=110, bbox_inches="tight", metadata={"Software": None})
        plt.close(fig)
        out[f"{y_key}-vs-{x_key}"] = buf.getvalue()
    return out


def study_outputs(project, t: Table, pairs=(), specs: dict | None = None) -> list:
    """The set's outputs of a study: text, CSV, JSON, Parquet (if available), plots, specs."""
    from ..outputs import Output, output_name

    def name(*w, suffix):
        return output_name(project.name, t.kind, *w, suffix=suffix, folder="studies")
    outs = [Output(name(suffix=".txt"), "text", to_text(t), f"the {t.kind} table as text"),
            Output(name(suffix=".csv"), "text", to_csv(t), f"the {t.kind} table, one row per variant (CSV)"),
            Output(name(suffix=".json"), "json", to_json(t), f"the {t.kind} table as JSON")]
    pq = to_parquet(t)
    if pq is not None:
        outs.append(Output(name(suffix=".parquet"), "bytes", pq, f"the {t.kind} table (Parquet)"))
    for key, png in plots(t, list(pairs)).items():
        slug = re.sub(r"[^A-Za-z0-9_.+-]+", "-", key).strip("-")
        outs.append(Output(name(slug, suffix=".png"), "bytes", png, f"plot: {key}"))
    for member, text in (specs or {}).items():
        outs.append(Output(output_name(member, suffix=".toml", folder="studies"), "text", text,
                           "a spec of the size family (build it with geomgen build)"))
    return outs


def build_failures(t: Table) -> tuple[int, int]:
    """(variants that could not be built or checked, variants whose check found a fault or a
    failed expectation) of a study run with ``--build``."""
    return (sum(1 for r in t.rows if r.get("check") == "error" or ("check" not in r and r.get("error"))),
            sum(1 for r in t.rows if r.get("check") == "FAULT"))
