"""Hypothesis strategies for specs: valid ones across the parameter space, and broken ones.

Used by tests/test_fuzz.py. Profiles: ``fast`` (default test run) and ``long``
(``GEOMGEN_FUZZ=long``, ≥ 10,000 cases; see DEVELOPERS.md).
"""

from __future__ import annotations

import os

from hypothesis import HealthCheck, settings
from hypothesis import strategies as st

settings.register_profile("fast", max_examples=25, deadline=None, derandomize=True,
                          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
settings.register_profile("long", max_examples=10_000, deadline=None,
                          suppress_health_check=list(HealthCheck))
PROFILE = os.environ.get("GEOMGEN_FUZZ", "fast")

FIVE = ["21012", "22012", "23012", "24012", "25012", "22112", "23112", "24112", "25112", "23015", "44018"]
#: the schema's edges: strong camber far forward or aft, very thin and very thick sections
EXTREME = ["9406", "9730", "6240", "0006", "0040", "2940", "8306", "25135"]


@st.composite
def naca_designation(draw):
    if draw(st.integers(0, 5)) == 0:
        return draw(st.sampled_from(EXTREME))
    if draw(st.booleans()):
        t = draw(st.integers(6, 21))
        if draw(st.booleans()):
            return f"00{t:02d}"
        return f"{draw(st.integers(1, 6))}{draw(st.integers(2, 6))}{t:02d}"
    return draw(st.sampled_from(FIVE))


@st.composite
def spec_params(draw, files: bool = False):
    """Plausible spec parameters. With ``files``, section ``a`` is sometimes a coordinate file
    (written by :func:`coordinate_files` beside the spec: the NACA formula's points, as a
    file of 5 or 6 decimals, 25 to 160 points a side, Selig loop or split layout)."""
    n = draw(st.integers(2, 5))
    # station gaps down to the smallest the schema allows (0.5 mm), weighted toward the edges:
    # close stations against the chord are where gull, anhedral and flared-tip wings kink
    gap = st.one_of(st.floats(5.0, 300.0), st.floats(5.0, 300.0), st.floats(0.5, 5.0))
    gaps = draw(st.lists(gap, min_size=n - 1, max_size=n - 1))
    # the first station off span 0 (measured from the fuselage side) now and then
    ys = [draw(st.sampled_from([0.0, 0.0, 0.0, round(draw(st.floats(0.5, 200.0)), 3)]))]
    for g in gaps:
        ys.append(ys[-1] + g)
    root = draw(st.one_of(st.floats(40.0, 400.0), st.floats(40.0, 400.0), st.floats(2.0, 40.0),
                          st.floats(400.0, 5000.0)))
    chords = [root] + [root * draw(st.floats(0.2, 1.2)) for _ in range(n - 1)]
    stations = []
    for i, (y, c) in enumerate(zip(ys, chords)):
        s = {"y": round(y, 3), "chord": round(c, 3)}
        if i:
            if draw(st.booleans()):
                s["sweep"] = draw(st.floats(-30.0, 45.0))
            else:
                s["x"] = draw(st.floats(-100.0, 200.0))
            if draw(st.booleans()):
                s["dihedral"] = draw(st.floats(-20.0, 20.0))
            else:
                s["z"] = draw(st.floats(-100.0, 100.0))
            s["twist"] = draw(st.floats(-10.0, 10.0))
        s["section"] = draw(st.sampled_from(["a", "b"]))
        stations.append(s)
    mirror = draw(st.booleans())
    if mirror and stations[0]["y"]:  # a mirrored part's halves meet at span 0
        y0 = stations[0]["y"]
        for s in stations:
            s["y"] = round(s["y"] - y0, 3)
    return {
        "a": draw(naca_designation()), "b": draw(naca_designation()),
        "invert_b": draw(st.booleans()),
        "thickness_b": draw(st.one_of(st.none(), st.floats(6.0, 20.0))),
        "mirror": mirror,
        "orientation": draw(st.sampled_from(["horizontal", "vertical-up", "vertical-down"])),
        "interpolation": draw(st.sampled_from(["linear", "smooth"])),
        "incidence": draw(st.floats(-10.0, 10.0)),
        "te": draw(st.sampled_from([0.0, 0.3, 0.6, 1.0, 1.5])),
        "tip": draw(st.sampled_from(["flat", "flat", "round"])),
        "reference": draw(st.sampled_from([0.0, 0.25, 0.5])),
        # parts off the datum planes (a mirrored stabilizer aft and below, a fin below the fuselage)
        "position": draw(st.sampled_from([(0.0, 0.0, 0.0), (0.0, 0.0, 0.0),
                                          (draw(st.floats(-500.0, 800.0)), draw(st.floats(-300.0, 300.0)),
                                           draw(st.floats(-900.0, 200.0)))])),
        "stations": stations,
        "file_a": (draw(st.sampled_from([None, None, (draw(st.integers(25, 160)), draw(st.sampled_from([5, 6])),
                                                      draw(st.sampled_from(["loop", "split"])))]))
                   if files else None),
    }


def coordinate_files(p: dict) -> dict:
    """{file name: text} of the coordinate files a spec of :func:`spec_text` reads."""
    if not p.get("file_a"):
        return {}
    import numpy as np

    from geomgen.sections import naca
    from geomgen.sections.base import cosine_s

    n, decimals, layout = p["file_a"]
    sec, s = naca(p["a"]), cosine_s(n)
    up, lo = np.column_stack(sec.upper(s)), np.column_stack(sec.lower(s))

    def fmt(pts):
        return "\n".join(f"{x:.{decimals}f} {y:.{decimals}f}" for x, y in pts)

    if layout == "loop":
        text = f"section a\n{fmt(np.vstack([up[::-1], lo[1:]]))}\n"
    else:
        text = f"section a\n{len(up)}. {len(lo)}.\n\n{fmt(up)}\n\n{fmt(lo)}\n"
    return {"a.dat": text}


def spec_text(p: dict) -> str:
    lines = ['format = 1', 'name = "fz"', '[datum]', 'origin = "fuzz origin"',
             '[sections.a]', 'file = "a.dat"' if p.get("file_a") else f'naca = "{p["a"]}"',
             '[sections.b]', f'naca = "{p["b"]}"', f'invert = {str(p["invert_b"]).lower()}']
    if p["thickness_b"] is not None:
        lines.append(f'thickness_pct = {p["thickness_b"]!r}')
    lines += ['[[surface]]', 'name = "part"', 'role = "wing"', f'mirror = {str(p["mirror"]).lower()}',
              f'orientation = "{p["orientation"]}"', f'interpolation = "{p["interpolation"]}"',
              f'incidence = {p["incidence"]!r}', f'te_thickness = {p["te"]!r}', f'tip = "{p["tip"]}"',
              f'reference = {p["reference"]!r}']
    if "position" in p:
        lines.append(f'position = [{", ".join(repr(float(v)) for v in p["position"])}]')
    for s in p["stations"]:
        lines.append("[[surface.station]]")
        for k, v in s.items():
            lines.append(f'{k} = "{v}"' if isinstance(v, str) else f"{k} = {v!r}")
    return "\n".join(lines) + "\n"


#: (TOML path, bad value) pairs: every field of the surface and station made wrong in turn.
BAD_VALUES = [
    ("format", "2"), ("name", '"has space"'), ("name", "3"),
    ("surface.role", '"wingg"'), ("surface.orientation", '"sideways"'), ("surface.mirror", '"yes"'),
    ("surface.position", "[1, 2]"), ("surface.reference", "1.5"), ("surface.incidence", "45"),
    ("surface.te_thickness", "-1"), ("surface.interpolation", '"cubic"'), ("surface.loft_sections", "2"),
    ("surface.tip", '"pointed"'), ("station.y", '"ten"'), ("station.chord", "0"), ("station.chord", "-5"),
    ("station.twist", "90"), ("station.sweep", "89"), ("station.section", '"nope"'), ("station.dihedral", "80"),
    ("sections.naca", '"2A12"'), ("sections.naca", '"26012"'), ("sections.naca", '"1"'),
    ("surface.unknown_key", "1"), ("station.unknown_key", "1"),
]


def run_cli_case(p: dict, folder) -> tuple[str, str, str]:
    """The command-line property for one generated spec, through the command line (``geomgen check``
    in-process): returns (outcome, first line or tail of the output, problem). The problem is
    empty when the spec was either refused before anything was written (exit 2 or 3, the part
    or the field named) or built and its written files checked clean (exit 0: these specs carry
    no expectations, so any fault is a false one)."""
    from pathlib import Path

    from click.testing import CliRunner

    from geomgen.cli import main

    d = Path(folder)
    spec = d / "fz.toml"
    spec.write_text(spec_text(p))
    for name, text in coordinate_files(p).items():
        (d / name).write_text(text)
    out = d / "out"
    r = CliRunner().invoke(main, ["check", str(spec), "-o", str(out)])
    text = r.output
    if "Traceback" in text or r.exception is not None and not isinstance(r.exception, SystemExit):
        return "traceback", text[-300:] or repr(r.exception), "a traceback or an uncaught exception"
    if r.exit_code in (2, 3):
        first = text.splitlines()[0] if text else ""
        if out.exists() and any(out.rglob("*.step")):
            return f"refused-{r.exit_code}", first, "refused after files were written"
        if not ('surface "part"' in text or "surface[0]" in text or "sections " in text):
            return f"refused-{r.exit_code}", first, "refusal names no surface, field or section"
        return f"refused-{r.exit_code}", first, ""
    if r.exit_code == 0:
        return "clean", "", ""
    return f"exit-{r.exit_code}", text[-600:], "a plausible spec without expectations did not check clean"
