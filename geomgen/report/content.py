"""What the report says, once, as a list of blocks; the HTML and Markdown writers only serialise it.

A block holds static words and :class:`V` references into the report dict. Static words
carry no digits: every number on the page is a ``V`` (a path into the dict and a format),
so the page cannot show a number the JSON does not hold.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field


@dataclass(frozen=True)
class V:
    """A value of the report dict: ``path`` of keys/indices, ``fmt`` a format spec, ``sig`` or ``str``."""

    path: tuple
    fmt: str = "sig"

    @property
    def key(self) -> str:
        return "/".join(str(p) for p in self.path)


def lookup(data, path):
    for p in path:
        data = data[p]
    return data


def format_value(value, fmt: str) -> str:
    """Text of one value: ``—`` for none; ``sig`` about five significant digits, at most four decimals."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if fmt == "str" or isinstance(value, str):
        return str(value)
    if fmt == "sig":
        a = abs(value)
        d = 4 if a < 1 else max(0, min(4, 4 - int(math.floor(math.log10(a)))))
        fmt = f".{d}f"
    text = format(value, fmt)
    if text.lstrip("+-").strip("0.") == "":  # no negative (or signed) zero
        text = text.lstrip("+-")
    return text


def text(data, v: V) -> str:
    return format_value(lookup(data, v.path), v.fmt)


@dataclass
class Heading:
    level: int
    parts: list
    anchor: str = ""


@dataclass
class Para:
    parts: list
    kind: str = "text"  # text | caution | ok | bad | note


@dataclass
class Bullets:
    items: list  # of part lists
    kind: str = "text"


@dataclass
class Table:
    header: list  # of part lists
    rows: list  # of lists of part lists
    numeric: set = field(default_factory=set)  # column indices aligned right
    bad: list = field(default_factory=list)  # per row: highlight as a failure
    caption: list = field(default_factory=list)


@dataclass
class Figure:
    key: str  # image key (see plots.FIGURES)
    alt: str
    caption: list


def _main_figures(data) -> list:
    cols = [("span_mm", "span mm", ".1f"), ("projected_area_cm2", "area cm²", ".1f"), ("aspect_ratio", "AR", ".2f"),
            ("mac_mm", "MAC mm", ".1f"), ("mac_y_mm", "MAC ȳ mm", ".1f"),
            ("mac_le_x_mm", "MAC leading edge x mm", ".1f"), ("mac_qc_x_mm", "MAC quarter chord x mm", ".1f"),
            ("volume_cm3", "volume cm³", ".1f")]
    rows = []
    for i, s in enumerate(data["surfaces"]):
        row = [[V(("surfaces", i, "name"), "str")], [V(("surfaces", i, "role"), "str")],
               [V(("surfaces", i, "incidence_deg"), "+.2f")]]
        row += [[V(("surfaces", i, "figures", k), f)] for k, _, f in cols]
        rows.append(row)
    header = [["part"], ["role"], ["incidence °"]] + [[h] for _, h, _ in cols]
    return [Heading(2, ["Main figures"], "figures"),
            Table(header, rows, numeric=set(range(2, len(header))),
                  caption=["Intended figures, integrated from the spec. The check table below holds each "
                           "one measured from the written STEP and STL files. ȳ: span position of the MAC "
                           "from the root; x: datum x (aft)."])]


def _balance(data) -> list:
    b = data["balance"]
    out: list = [Heading(2, ["Balance"], "balance")]
    if b is None:
        return out + [Para(["No wing or stabilizer: no balance analysis."], "note")]
    B = lambda k, f=".1f": V(("balance", k), f)  # noqa: E731
    np_parts = ["Neutral point at datum x ", B("neutral_point_x_mm"), " mm, ", B("neutral_point_pct_mac"),
                " % of the MAC of ", B("reference_wing", "str"), " from its leading edge"]
    if b["mast_x_mm"] is not None:
        np_parts += ["; ", B("neutral_point_from_mast_mm", "+.1f"), " mm (",
                     B("neutral_point_from_mast_pct_mac", "+.1f"), " % MAC) from the mast reference (",
                     B("mast", "str"), ", ", B("mast_reference", "str"),
                     ", x ", B("mast_x_mm"), " mm; positive aft)."]
    else:
        np_parts += ["."]
    out.append(Para(np_parts))
    out += _warnings(b)
    if b["cg_x_mm"] is not None:
        cg = ["Centre of gravity (where the weight acts) at datum x ", B("cg_x_mm"), " mm"]
        if b["cg_from_mast_mm"] is not None:
            cg += [" (", B("cg_from_mast_mm", "+.1f"), " mm from the mast reference)"]
        if b.get("cg_source"):
            cg += [", from ", B("cg_source", "str")]
        cg += ["; static margin ", B("static_margin_pct", "+.1f"), " % MAC (positive: neutral point aft of the "
               "centre of gravity, stable in pitch)."]
        out.append(Para(cg, "ok" if (b["static_margin_pct"] or 0) > 0 else "bad"))
    else:
        out.append(Para(["No centre of gravity given (flight.weight_x_mm, flight.rider_from_mast_mm or --cg: "
                         "one point, where the weight acts): no static margin."], "note"))
    if b["trim"]:
        names = b["pitch_surfaces"]
        header = [["speed km/h"], ["speed m/s"], ["attitude °"]]
        for n in names:
            header += [[n, " lift N"], [n, " lift kgf"]]
        mast = b["mast_x_mm"] is not None
        cp_key, cp_name = ("cp_from_mast", "from mast") if mast else ("cp_x", "datum x from the origin")
        header += [[f"centre of pressure {cp_name} mm"], [f"centre of pressure {cp_name} % MAC"],
                   ["static margin % MAC"]]
        if b["takeoff"]:
            header += [["below the takeoff estimate"]]
        header += [["not trimmable because"]]
        rows = []
        for i, t in enumerate(b["trim"]):
            T = lambda *k, f=".1f": V(("balance", "trim", i) + k, f)  # noqa: E731
            row = [[T("speed_kmh")], [T("speed_ms", f=".2f")], [T("attitude_deg", f="+.2f")]]
            for n in names:
                row += [[T("lift_n", n)], [T("lift_kgf", n, f=".2f")]]
            row += [[T(f"{cp_key}_mm", f="+.1f")], [T(f"{cp_key}_pct_mac", f="+.1f")],
                    [T("static_margin_pct", f="+.1f")]]
            if b["takeoff"]:
                row += [[T("below_takeoff_speed", f="str")]]
            row += [[T("reason", f="str")]]
            rows.append(row)
        out.append(Table(header, rows, numeric=set(range(len(header))), caption=[
            "Trim (lift equal to weight) for ", B("mass_kg", "g"), " kg in ", B("water", "str"), " (density ",
            B("density_kg_m3", "g"), " kg/m³). Attitude: free stream to the datum x axis, positive nose up. "
            "Negative lift pushes down. Centre of pressure: net, of the lifting surfaces, positive aft of the "
            + ("mast reference" if mast else "datum origin (no mast in the spec)")
            + ". Vortex lattice of ", B("panels", "d"), " panels. Water: ", B("water_surface", "str"), "."]))
    if b["takeoff"]:
        out.append(Para(["Estimated takeoff: ", V(("balance", "takeoff", "speed_kmh"), ".1f"),
                         " km/h (", V(("balance", "takeoff", "speed_ms"), ".2f"), " m/s) at attitude ",
                         V(("balance", "takeoff", "attitude_deg"), "+.2f"), " °, where the front wing's most loaded "
                         "strip reaches a section lift coefficient of ", V(("balance", "takeoff", "cl_max"), ".2f"),
                         "."]))
    out += _water(b)
    out.append(Bullets([[V(("balance", "notes", i), "str")] for i in range(len(b["notes"]))], "note"))
    return out


def _warnings(b) -> list:
    """The plausibility warnings (never silent): where the set leaves what a rider can ride."""
    ws = b.get("warnings") or []
    head = Heading(3, ["Plausibility warnings"], "warnings")
    if not ws:
        return [head, Para(["None: every trim speed trims, and the stabilizer's share, the travel of the centre "
                            "of pressure, the mast move and the shim are within the stated limits."], "ok")]
    return [head, Bullets([[V(("balance", "warnings", i, "message"), "str")] for i in range(len(ws))], "bad"),
            Para(["Warnings, not refusals: every figure of the page is still given. The limits are common "
                  "practice, no source (see the developer guide)."], "note")]


def _water(b) -> list:
    """Free surface, cavitation, drag and envelope, and where the rider stands."""
    out: list = []
    fs, cv, pf, st = b.get("free_surface"), b.get("cavitation"), b.get("performance"), b.get("stance")
    if fs:
        F = lambda *k, f=".1f": V(("balance", "free_surface") + k, f)  # noqa: E731
        out.append(Heading(3, ["Free surface"], "free-surface"))
        out.append(Para(["Still water at datum z ", F("water_z_mm", f=".0f"), " mm (", F("how", f="str"),
                         "). Against deep water the neutral point moves ", F("neutral_point_shift_mm", f="+.1f"),
                         " mm (", F("neutral_point_shift_pct_mac", f="+.2f"), " % MAC, positive aft)."]))
        out.append(Bullets([[F("surfaces", i, "name", f="str"), ": root depth ",
                             F("surfaces", i, "depth_root_mm", f=".0f"), " mm, lift slope ",
                             F("surfaces", i, "lift_slope_change_pct", f="+.2f"),
                             " % against deep water"] for i in range(len(fs["surfaces"]))]))
        out.append(Para(["Limits: ", F("limits", f="str"), "."], "note"))
    if cv:
        C = lambda *k, f=".1f": V(("balance", "cavitation") + k, f)  # noqa: E731
        out.append(Heading(3, ["Cavitation"], "cavitation"))
        rows = [[[C("surfaces", i, "name", f="str")], [C("surfaces", i, "onset_kmh")],
                 [C("surfaces", i, "y_mm", f=".0f")], [C("surfaces", i, "x_over_c", f=".3f")],
                 [C("surfaces", i, "side", f="str")],
                 [C("surfaces", i, "cp_min", f=".3f")], [C("surfaces", i, "depth_mm", f=".0f")]]
                for i in range(len(cv["surfaces"]))]
        out.append(Table([["surface"], ["onset km/h"], ["span y mm"], ["chord x/c"], ["side"], ["Cp,min"],
                          ["depth mm"]], rows, numeric={1, 2, 3, 5, 6}, caption=[
            "Speed at which each surface first cavitates, trimmed (first estimate: tip vortices, roughness and "
            "nuclei can bring it earlier). ", C("notes", 0, f="str"), "; ", C("notes", 1, f="str"), "."]))
    if pf:
        P = lambda *k, f=".1f": V(("balance", "performance") + k, f)  # noqa: E731
        out.append(Heading(3, ["Drag, power and the usable envelope"], "drag"))
        rows = [[[P("points", i, "speed_kmh")], [P("points", i, "total_n")], [P("points", i, "total_kgf", f=".2f")],
                 [P("points", i, "power_w", f=".0f")], [P("points", i, "l_over_d")]] for i in range(len(pf["points"]))]
        out.append(Table([["speed km/h"], ["drag N"], ["drag kgf"], ["power W"], ["lift/drag"]], rows,
                         numeric={0, 1, 2, 3, 4}, caption=["Total drag of the trimmed set (first estimates). "]))
        if len(pf.get("envelope_reasons") or []) == 2:
            out.append(Para(["Usable envelope: from ", P("envelope_kmh", 0), " km/h (",
                             P("envelope_reasons", 0, f="str"),
                             ") to ", P("envelope_kmh", 1), " km/h (", P("envelope_reasons", 1, f="str"),
                             "). These are estimates: test before relying on either end."], "caution"))
        else:
            out.append(Para(["Usable envelope: from the takeoff estimate at ", P("envelope_kmh", 0), " km/h to first "
                             "cavitation at ", P("envelope_kmh", 1), " km/h. These are estimates: test before relying "
                             "on either end."], "caution"))
        out.append(Figure("envelope", "lift split, drag and envelope against speed",
                          ["Lift of each surface and total drag against speed, trimmed, from takeoff to first "
                           "cavitation (shaded: the usable envelope)."]))
        out.append(Bullets([[P("sources", i, f="str")] for i in range(len(pf["sources"]))]
                           + [[P("notes", i, f="str")] for i in range(len(pf["notes"]))], "note"))
    if st:
        S = lambda *k, f=".1f": V(("balance", "stance") + k, f)  # noqa: E731
        out.append(Heading(3, ["Where the rider stands"], "stance"))
        if st.get("mast_move_mm") is not None:
            out.append(Para(["At the cruise speed of ", S("cruise_kmh", f="g"), " km/h, with the rider's weight at ",
                             S("rider_from_mast_mm", f="+.0f"), " mm from the mast reference, slide the mast ",
                             S("mast_move_mm", f="+.0f"), " mm (positive aft) to put the centre of pressure under "
                             "the rider."]))
        if st.get("shim_deg") is not None:
            out.append(Para(["Stabilizer shim for ", S("stabilizer_target_kgf", f="+.2f"), " kgf at cruise: ",
                             S("shim_deg", f="+.2f"), " ° (incidence ", S("new_incidence_deg", f=".2f"),
                             " °; now ", S("stabilizer_lift_now_kgf", f="+.2f"), " kgf)."]))
    return out


def _views(data) -> list:
    b = data["balance"]
    cap = ["Top view, looking down (datum x aft to the right, y to starboard up the page), true scale. "
           "Each surface's outline is the projected leading and trailing edge; the thick bar is the MAC "
           "at its span position and leading-edge x; the dotted line the quarter-chord line. Vertical parts "
           "show their root section."]
    if b is not None:
        cap += [" Neutral point, centre of gravity (if given) and the net centre of pressure at each trim "
                "speed sit on the centreline; the strip below lists them by row."]
    side = ["Side view (datum x aft to the right, z up), true scale: root sections drawn true (tip sections "
            "thin), vertical parts by their outline. Close-ups below show each root chord line against a "
            "line parallel to the datum x axis, with the incidence."]
    return [Heading(2, ["Views"], "views"), Figure("top", "top view of the set", cap),
            Figure("side", "side view of the set", side)]


def _sections(data) -> list:
    out: list = [Heading(2, ["Sections at the stations"], "sections")]
    for i, s in enumerate(data["surfaces"]):
        out.append(Heading(3, [V(("surfaces", i, "name"), "str")]))
        rows = []
        for j in range(len(s["stations"])):
            S = lambda k, f=".1f": V(("surfaces", i, "stations", j, k), f)  # noqa: E731
            rows.append([[S("y_mm")], [S("chord_mm")], [S("twist_deg", "+.2f")], [S("section", "str")],
                         [S("thickness_pct", ".2f")], [S("thickness_at_pct")], [S("thickness_mm", ".2f")],
                         [S("camber_pct", "+.2f")], [S("camber_at_pct")]])
        header = [["span position mm"], ["chord mm"], ["twist °"], ["section"], ["thickness % chord"],
                  ["at % chord"], ["thickness mm"], ["camber % chord"], ["at % chord"]]
        out.append(Table(header, rows, numeric={0, 1, 2, 4, 5, 6, 7, 8}, caption=[
            "Finished sections (trailing edge ", V(("surfaces", i, "te_thickness_mm"), ".2f"), " mm). Camber: "
            "largest height of the mean line above the chord line; negative: toward the lower side."]))
        out.append(Figure(f"sections-{s['name']}", f"sections of {s['name']}",
                          ["Sections of ", V(("surfaces", i, "name"), "str"), " in their own frame, true shape "
                           "(equal axes), chord line thin, mean line dotted."]))
    return out


def _spanwise(data) -> list:
    cap: list = ["Chord, twist and lift loading along the span, from the root (one half of a mirrored part). "
           "Loading: section lift coefficient times local chord from the vortex lattice"]
    if data["balance"] is not None:
        cap += [" at the reference attitude of ", V(("balance", "alpha_ref_deg"), ".1f"), " °"]
    return [Heading(2, ["Spanwise distributions"], "spanwise"),
            Figure("spanwise", "spanwise distributions", cap + ["."])]


def _section_properties(data) -> list:
    rows = []
    for i, _ in enumerate(data["surfaces"]):
        R = lambda k, f="sig": V(("surfaces", i, "section_props", "root", k), f)  # noqa: E731
        rows.append([[V(("surfaces", i, "name"), "str")], [R("area_mm2", ".1f")], [R("centroid_x_mm", ".1f")],
                     [R("centroid_z_mm", "+.2f")], [R("i_chord_mm4", ".0f")], [R("i_normal_mm4", ".0f")],
                     [R("principal_deg", "+.2f")], [R("w_chord_mm3", ".0f")], [R("j_solid_mm4", ".0f")],
                     [R("j_shell_mm4", ".0f")]])
    header = [["part"], ["area mm²"], ["centroid from leading edge mm"], ["centroid above chord mm"],
              ["I chord axis mm⁴"], ["I normal axis mm⁴"], ["principal axis °"], ["W extreme fibre mm³"],
              ["J solid mm⁴"], ["J laminate shell mm⁴"]]
    return [Heading(2, ["Section properties"], "section-properties"),
            Para(["FIRST ESTIMATES FOR PLANNING, NOT A STRUCTURAL ANALYSIS. Geometric properties of the intended "
                  "sections (the check table holds them measured from the written STEP at every station). "
                  "Second moments about centroidal axes parallel and normal to the chord line; J of the solid by "
                  "a warping-function solution, of a laminate shell by Bredt–Batho. For loads, stresses and "
                  "deflections at a condition you state, run the loads command. A part must be proven by test "
                  "and by qualified engineering before anyone rides it."], "caution"),
            Table(header, rows, numeric=set(range(1, len(header))), caption=["Root sections."]),
            Figure("stiffness", "section stiffness along the span",
                   ["Second moments along the span and J at the stations (log scale); below, each root "
                    "section with its centroid and principal axes."])]


def _check(data) -> list:
    c = data["check"]
    rows, bad = [], []
    for i, r in enumerate(c["rows"]):
        R = lambda k, f="sig": V(("check", "rows", i, k), f)  # noqa: E731
        rows.append([[R("part", "str")], [R("label", "str")], [R("unit", "str")], [R("intended")], [R("step")],
                     [R("stl")], [R("tol_step")], [R("expected")], [R("expected_tol")], [R("status", "str")]])
        bad.append(bool(r["bad"]))
    header = [["part"], ["figure"], ["unit"], ["intended"], ["measured STEP"], ["measured STL"], ["build tolerance"],
              ["expected"], ["± expected"], ["result"]]
    out: list = [Heading(2, ["Check of the written files"], "check"),
           Para(["Each figure intended (from the spec), measured from the written STEP (through the CAD kernel, "
                 "skin sampled within ", V(("check", "skin_sampling_mm"), ".4f"), " mm) and STL (chordal tolerance ",
                 V(("check", "stl_tol_mm"), "g"), " mm), against the build tolerance and the calculation sheet's "
                 "expected value. A measurement beyond the build tolerance is a geometry fault; a miss of the "
                 "expected value a failure. Both are marked ✗ and shaded."]),
           Table(header, rows, numeric={3, 4, 5, 6, 7, 8}, bad=bad),
           Bullets([[V(("check", "summary", i), "str")] for i in range(len(c["summary"]))], "ok" if c["ok"] else "bad")]
    return out


def _comparison(data) -> list:
    """The set's what-if comparison (made by ``geomgen compare`` from this spec), if any."""
    c = data.get("comparison")
    if not c or not c["rows"]:
        return []
    header = [["figure"]] + [[V(("comparison", "labels", j), "str")] for j in range(len(c["labels"]))]
    rows = [[[V(("comparison", "headings", k), "str")]]
            + [[V(("comparison", "rows", j, k), "sig")] for j in range(len(c["rows"]))] for k in c["figures"]]
    return [Heading(2, ["What if: compared variants"], "comparison"),
            Table(header, rows, numeric=set(range(1, len(header))), caption=[
                "From ", V(("comparison", "file"), "str"), " (geomgen compare, this spec). At trim at ",
                V(("comparison", "condition"), "str"), ": lift = weight; mast move: how far the mast goes in its "
                "tracks (aft +) to keep the net centre of pressure under the rider where the base set has it. "
                "First estimates."])] + [Para(["Note: ", V(("comparison", "notes", i), "str")])
                                         for i in range(len(c.get("notes", [])))]


def page(data) -> list:
    """The report as blocks, in reading order."""
    caution = Para(["CAUTION: ", V(("caution",), "str")], "caution")
    head = [Heading(1, ["Design report: ", V(("spec", "name"), "str")], "top"), caution,
            Para(["Spec ", V(("spec", "file"), "str"), ". Datum origin: ", V(("spec", "datum_origin"), "str"),
                  ". Frame: x aft, y to starboard, z up; lengths mm, angles degrees (positive: leading edge up), "
                  "areas cm², volumes cm³, forces N and kgf. Written by geomgen ", V(("geomgen_version",), "str"),
                  "."]),
            Heading(2, ["Verdict"], "verdict"),
            Bullets([[V(("check", "summary", i), "str")] for i in range(len(data["check"]["summary"]))],
                    "ok" if data["check"]["ok"] else "bad")]
    return (head + _main_figures(data) + _balance(data) + _views(data) + _sections(data) + _spanwise(data)
            + _section_properties(data) + _comparison(data) + _check(data)
            + [Heading(2, ["Caution"], "caution"), caution])
