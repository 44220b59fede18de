"""What each output is made from: fingerprints of the parts of the spec it reads.

Every file geomgen writes records, in the manifest, the *inputs* it was made from as
``key -> fingerprint`` (a SHA-256 of the input's validated value; of a coordinate file's
bytes too). A file is stale only when one of its own inputs changed, so an edit of the
rider's mass leaves the solids and drawings current, and an edit of the stabilizer leaves
the front wing's files.

Keys, as they are named in messages:

* ``surface[<name>].<field>``: one field of a surface (``station``, ``position``, ``shop``, …);
* ``sections.<name>``: a named section and, for a coordinate file, the file's bytes;
* ``surfaces``: which surfaces the set has, in order (set-level files depend on it);
* ``flight.<field>`` (or ``flight`` when the spec has no ``[flight]``), ``datum.<field>``;
* ``file:<absolute path>``: another file an output was made from (``compare --with``),
  fingerprinted from its bytes whenever it is compared.

Which keys an output depends on is said by the function that makes it, with the helpers
below; a surface's *geometry* is every field of the surface except the tables other
commands read (:data:`SURFACE_TABLES`), so a new geometry field is counted without anyone
listing it. ``tests/test_inputs.py`` changes each spec field in turn and compares which
outputs change with which ones these keys call stale.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

#: Tables of a surface read by one command each, not by the geometry.
SURFACE_TABLES = ("expect", "check_at", "shop", "mount", "printing", "laminate")

#: Spec fields that are not inputs of a file: the set name names the files themselves.
_NOT_INPUTS = ("format", "name", "surface", "sections")


#: Reasons a file is stale that are not a part of the spec.
SPECIAL = {"geomgen": "the geomgen version",
           "spec": "the spec (the file was recorded without per-input fingerprints)"}


def _digest(value) -> str:
    text = json.dumps(value, sort_keys=True, ensure_ascii=False, default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:20]


def _dump(value):
    return value.model_dump(mode="json") if hasattr(value, "model_dump") else value


def _file_digest(path: Path) -> str:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()[:20]
    except OSError:
        return "unreadable"


def digests(spec) -> dict[str, str]:
    """key -> fingerprint of every input of ``spec`` (a validated Spec), worked out once."""
    cached = getattr(spec, "_input_digests", None)
    if cached is None:
        cached = _digests(spec)
        try:
            spec._input_digests = cached
        except (AttributeError, ValueError):
            pass
    return cached


def _digests(spec) -> dict[str, str]:
    base = Path(getattr(spec, "_source", "spec.toml")).parent
    out: dict[str, str] = {}
    for name, sec in spec.sections.items():
        value = _dump(sec)
        if sec.file is not None:
            value = {**value, "file_sha256": _file_digest(base / sec.file)}
        out[f"sections.{name}"] = _digest(value)
    out["surfaces"] = _digest([(s.name, s.role) for s in spec.surface])
    for sf in spec.surface:
        for field in type(sf).model_fields:
            if field != "name":
                out[f"surface[{sf.name}].{field}"] = _digest(_dump(getattr(sf, field)))
    for field in type(spec).model_fields:
        if field in _NOT_INPUTS:
            continue
        value = getattr(spec, field)
        if hasattr(value, "model_dump"):
            for sub in type(value).model_fields:
                out[f"{field}.{sub}"] = _digest(_dump(getattr(value, sub)))
        else:
            out[field] = _digest(_dump(value))
    return out


def current(key: str, digests: dict[str, str]) -> str | None:
    """The fingerprint of input ``key`` now: from ``digests``, or a named file's bytes."""
    if key.startswith("file:"):
        return _file_digest(Path(key[len("file:"):]))
    return digests.get(key)


def files(paths) -> list[str]:
    """Keys of other files an output was made from (their bytes are fingerprinted)."""
    return [f"file:{Path(p).resolve()}" for p in paths]


def _surface(spec, name: str):
    return next(s for s in spec.surface if s.name == name)


#: Geometry fields only the solid and the mesh read (the loft's sections per half span).
LOFT_ONLY = ("loft_sections",)

#: Geometry fields drawings do not read: they are drawn in the part's own frame, wherever it sits.
PLACEMENT = ("position",)


def geometry(spec, name: str, without=()) -> list[str]:
    """Inputs of one surface's solid and mesh: its geometry fields and the sections it uses
    (``without``: fields the caller's output does not read, e.g. :data:`LOFT_ONLY`)."""
    sf = _surface(spec, name)
    keys = [f"surface[{name}].{f}" for f in type(sf).model_fields
            if f != "name" and f not in SURFACE_TABLES and f not in without]
    used = dict.fromkeys(x for st in sf.station for x in (st.section, st.blend.section if st.blend else None) if x)
    return keys + [f"sections.{s}" for s in used]


def tables(spec, name: str, *which: str) -> list[str]:
    """Keys of the named tables of one surface (``shop``, ``mount``, …)."""
    return [f"surface[{name}].{t}" for t in which]


def table_of_all(spec, *which: str) -> list[str]:
    """Keys of the named tables of every surface."""
    return [k for sf in spec.surface for k in tables(spec, sf.name, *which)]


def set_geometry(spec, without=()) -> list[str]:
    """Inputs of a file about the whole set's geometry (assembly, build summary): every
    surface's geometry and every section (the build notes a fit of each coordinate file)."""
    keys = ["surfaces"] + [k for sf in spec.surface for k in geometry(spec, sf.name, without)]
    return list(dict.fromkeys(keys + [f"sections.{s}" for s in spec.sections]))


def flight(spec) -> list[str]:
    """The ``[flight]`` keys (mass, speeds, water, lattice…)."""
    return [k for k in digests(spec) if k == "flight" or k.startswith("flight.")]


def whole(spec) -> list[str]:
    """Every input: a file about all of the spec (the report, studies)."""
    return list(digests(spec))


def describe(keys) -> str:
    """Input keys in words, grouped by what they belong to:
    ``surface "stabilizer" station and position``, ``[flight] mass_kg``."""
    groups: dict[str, list[str]] = {}
    for k in keys:
        if k.startswith("surface["):
            owner, _, field = k[len("surface["):].partition("].")
            groups.setdefault(f'surface "{owner}"', []).append(field)
        elif k.startswith("sections."):
            groups.setdefault(f'section "{k[len("sections."):]}"', []).append("")
        elif k.startswith("file:"):
            groups.setdefault(f"the file {Path(k[len('file:'):]).name}", []).append("")
        elif k == "surfaces":
            groups.setdefault("the list of surfaces", []).append("")
        elif "." in k:
            table, _, field = k.partition(".")
            groups.setdefault(f"[{table}]", []).append(field)
        else:
            groups.setdefault(SPECIAL.get(k, f"[{k}]"), []).append("")
    parts = []
    for owner, fields in groups.items():
        fields = [f for f in fields if f]
        parts.append(owner + (" " + _and(fields) if fields else ""))
    return "; ".join(parts)


def _and(words: list[str]) -> str:
    return words[0] if len(words) == 1 else ", ".join(words[:-1]) + " and " + words[-1]
