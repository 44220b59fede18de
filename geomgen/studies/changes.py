"""Changes a designer asks "what if" about, applied to the spec's data (the parsed TOML).

Paths name one spec value: ``surface[stabilizer].incidence``,
``surface[front-wing].station[2].chord``, ``surface[stabilizer].position[0]`` (a longer
fuselage), ``flight.mass_kg`` (a surface by its name, a station or a number of a list by its
index from 0). Changes are plain data (``Change``), applied to a deep copy of the spec dict;
the changed spec is written back as TOML text, which is what a worker gets.

Kinds of change (text form for the command line in brackets):

* ``set`` a value (``surface[stabilizer].incidence=-1.5``);
* ``area`` of a surface scaled by a factor, keeping its aspect ratio, its span or its
  chords (``area:stabilizer*1.2`` or ``area:stabilizer*1.2:span``);
* ``move`` a surface along x by mm: aft is +, so a longer fuselage moves the stabilizer +x
  (``move:stabilizer+40``);
* ``shim`` a surface's incidence by degrees, leading edge up + (``shim:stabilizer-0.5``);
* ``mast`` moved along x by mm in its tracks (``mast+15``).
"""

from __future__ import annotations

import copy
import math
import re
from dataclasses import dataclass
from typing import Any

from ..errors import SpecError

KEEP = ("aspect", "span", "chord")
_SEG = re.compile(r"^([A-Za-z_][A-Za-z0-9_]*)(?:\[([^\]]+)\])?$")


@dataclass(frozen=True)
class Change:
    kind: str  # set | area | move | shim | mast
    target: str  # a path (set) or a surface name
    value: float
    keep: str = "aspect"

    @property
    def label(self) -> str:
        if self.kind == "set":
            return f"{self.target} = {self.value:g}"
        if self.kind == "area":
            return f"{self.target} area ×{self.value:g} (keep {self.keep})"
        if self.kind == "move":
            return f"{self.target} moved {self.value:+g} mm in x"
        if self.kind == "shim":
            return f"{self.target} shim {self.value:+g}°"
        return f"mast moved {self.value:+g} mm in x"


def parse_change(text: str) -> Change:
    """One change from its command-line form (see the module doc); SpecError if malformed."""
    t = text.strip()
    try:
        if t.startswith("area:"):
            body, _, keep = t[5:].partition(":")
            name, _, f = body.rpartition("*")
            keep = keep or "aspect"
            if keep not in KEEP:
                raise ValueError(f"keep must be one of {', '.join(KEEP)}")
            return Change("area", name, _finite(float(f)), keep)
        for kind in ("move", "shim"):
            if t.startswith(kind + ":"):
                m = re.match(r"^(.+?)([+-][0-9.eE+-]+)$", t[len(kind) + 1:])
                if not m:
                    raise ValueError("expected NAME+VALUE or NAME-VALUE")
                return Change(kind, m.group(1), _finite(float(m.group(2))))
        if t.startswith("mast") and t[4:5] in "+-" and t[4:]:
            return Change("mast", "mast", _finite(float(t[4:])))
        if "=" in t:
            path, _, v = t.partition("=")
            parse_path(path.strip())
            return Change("set", path.strip(), _finite(float(v)))
    except ValueError as exc:
        raise SpecError([f"change '{text}': {exc}"]) from None
    raise SpecError([f"change '{text}': not understood; use PATH=VALUE, area:NAME*FACTOR[:aspect|span|chord], "
                     "move:NAME+MM, shim:NAME+DEG or mast+MM"])


def _finite(v: float) -> float:
    if not math.isfinite(v):
        raise ValueError("the value must be a finite number")
    return v


def parse_path(path: str) -> list[tuple[str, str | None]]:
    """``surface[stab].station[1].chord`` -> [("surface", "stab"), ("station", "1"), ("chord", None)]."""
    segs = []
    for part in path.split("."):
        m = _SEG.match(part)
        if not m:
            raise ValueError(f"path '{path}': '{part}' is not KEY or KEY[NAME]")
        segs.append((m.group(1), m.group(2)))
    return segs


def _surface(data: dict, name: str) -> dict:
    for s in data.get("surface", []):
        if s.get("name") == name:
            return s
    names = ", ".join(s.get("name", "?") for s in data.get("surface", []))
    raise SpecError([f"no surface named '{name}' (the spec has: {names})"])


def _resolve(data: dict, path: str):
    """(container, key) of the value at ``path``."""
    try:
        segs = parse_path(path)
    except ValueError as exc:
        raise SpecError([str(exc)]) from None
    node: Any = data
    for i, (key, sel) in enumerate(segs):
        last = i == len(segs) - 1
        if sel is None:
            if last:
                if not isinstance(node, dict) or key not in node:
                    raise SpecError([f"path '{path}': no value '{key}' there"])
                return node, key
            node = node.get(key) if isinstance(node, dict) else None
        elif key == "surface":
            node = _surface(data, sel)
        else:
            seq = node.get(key) if isinstance(node, dict) else None
            if not isinstance(seq, list) or not sel.isdigit() or int(sel) >= len(seq):
                raise SpecError([f"path '{path}': no {key}[{sel}] (there are {len(seq or [])})"])
            if last:
                if isinstance(seq[int(sel)], dict):
                    raise SpecError([f"path '{path}': names a whole {key}, not a number in it"])
                return seq, int(sel)  # a number in a list: position[0]
            node = seq[int(sel)]
        if node is None:
            raise SpecError([f"path '{path}': no '{key}' there"])
    raise SpecError([f"path '{path}': empty"])  # pragma: no cover


def get_value(data: dict, path: str):
    node, key = _resolve(data, path)
    return node[key]


def apply(data: dict, changes) -> dict:
    """A deep copy of the spec dict with ``changes`` applied in order."""
    out = copy.deepcopy(data)
    for ch in changes:
        if ch.kind == "set":
            node, key = _resolve(out, ch.target)
            old = node[key]
            if isinstance(old, bool) or not isinstance(old, (int, float)):
                raise SpecError([f"path '{ch.target}': holds {old!r}, not a number"])
            node[key] = type(old)(ch.value) if isinstance(old, int) and float(ch.value).is_integer() else ch.value
        elif ch.kind == "area":
            _scale_area(_surface(out, ch.target), ch.value, ch.keep)
        elif ch.kind == "move":
            s = _surface(out, ch.target)
            s["position"] = [s.get("position", [0.0, 0.0, 0.0])[0] + ch.value, *s.get("position", [0, 0, 0])[1:]]
        elif ch.kind == "shim":
            s = _surface(out, ch.target)
            s["incidence"] = s.get("incidence", 0.0) + ch.value
        elif ch.kind == "mast":
            masts = [s for s in out.get("surface", []) if s.get("role") == "mast"]
            if not masts:
                raise SpecError(["mast move: the spec has no surface with role \"mast\""])
            for s in masts:
                s["position"] = [s.get("position", [0.0, 0.0, 0.0])[0] + ch.value, *s.get("position", [0, 0, 0])[1:]]
    return out


#: (table, key) of a surface holding span positions, mm from the root (they scale with the span)
SPAN_POSITIONS = (("shop", "templates_at"), ("shop", "hotwire_cuts"), ("printing", "split_at"))


def _scale_area(s: dict, factor: float, keep: str) -> None:
    """Scale a surface's projected area by ``factor``: lengths along the span by a, chords by b,
    with a·b = factor (aspect: a = b = √factor; span: a = 1; chord: b = 1). Sweep and dihedral
    offsets scale with the span so the panel angles stay; tip lengths with the chord; span
    positions of the shop tables (:data:`SPAN_POSITIONS`) with the span. Chords are rounded
    to 0.001 mm (a spec a shop reads), far inside the check's tolerances."""
    if factor <= 0:
        raise SpecError([f"area factor must be > 0, got {factor:g}"])
    a, b = {"aspect": (math.sqrt(factor),) * 2, "span": (1.0, factor), "chord": (factor, 1.0)}[keep]
    for st in s.get("station", []):
        st["y"] = st.get("y", 0.0) * a
        st["chord"] = round(st["chord"] * b, 3)
        for k in ("x", "z"):
            if k in st:
                st[k] = st[k] * a
    if "tip_length" in s:
        s["tip_length"] = s["tip_length"] * b
    for table, key in SPAN_POSITIONS:
        t = s.get(table)
        if isinstance(t, dict) and isinstance(t.get(key), list):
            t[key] = [v * a for v in t[key]]  # as the stations: a cut at a station stays at it
    for c in s.get("check_at", []) or []:
        if isinstance(c, dict) and "y" in c:
            c["y"] = c["y"] * a
