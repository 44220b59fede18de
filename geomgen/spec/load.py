"""Read a spec file: TOML -> :class:`Spec`, every problem reported at once.

Messages have the form ``<file>: <field path>: <what is wrong>, got <value>``; unknown keys
come with the closest valid name. Nothing here raises anything but :class:`SpecError`.
"""

from __future__ import annotations

import difflib
import tomllib
import typing
import unicodedata
from pathlib import Path

from pydantic import BaseModel, ValidationError

from ..defaults import MAX_ERROR_LINES, MAX_SPEC_BYTES, MAX_SPEC_DEPTH, MIN_STATION_GAP_MM
from ..errors import SpecError
from ..sections.readfile import NotReadable, control_char, printable, read_capped
from .flight import DEFAULT_CHORD_PANELS, DEFAULT_SPAN_PANELS
from .model import Spec
from .types import LATTICE_MATRICES, MAX_LATTICE_BYTES, MAX_SPEC_VALUES, lattice_bytes, lattice_panels


def _model_at(loc: tuple) -> type[BaseModel] | None:
    """The pydantic model class that owns the last element of ``loc`` (for suggestions)."""
    tp: typing.Any = Spec
    for part in loc[:-1]:
        tp = _unwrap(tp)
        if isinstance(part, int) or (isinstance(tp, type) and not issubclass(tp, BaseModel)):
            args = typing.get_args(tp)
            tp = args[-1] if args else None
            continue
        if isinstance(tp, type) and issubclass(tp, BaseModel):
            field = tp.model_fields.get(part)
            if field is None:
                return None
            tp = field.annotation
        else:
            args = typing.get_args(tp)  # dict[str, X] key
            tp = args[-1] if args else None
    tp = _unwrap(tp)
    return tp if isinstance(tp, type) and issubclass(tp, BaseModel) else None


def _unwrap(tp):
    """Optional[X] / Union[X, None] -> X; list[X] and dict[K, X] stay as they are."""
    while typing.get_origin(tp) is typing.Union:
        args = [a for a in typing.get_args(tp) if a is not type(None)]
        models = [a for a in args if isinstance(a, type) and issubclass(a, BaseModel)]
        tp = models[0] if models else args[0]
    if typing.get_origin(tp) in (list, dict, tuple):
        return tp if typing.get_origin(tp) is not tuple else tuple
    return tp


def _path(loc: tuple, data) -> str:
    """('surface', 0, 'station', 1, 'chord') -> 'surface[0] "front-wing" station[1] chord'."""
    out: list[str] = []
    node = data
    for part in loc:
        if isinstance(part, int):
            out[-1] += f"[{part}]"
            try:
                node = node[part]
                if isinstance(node, dict) and isinstance(node.get("name"), str):
                    out[-1] += f' "{node["name"]}"'
            except (IndexError, KeyError, TypeError):
                node = None
        else:
            out.append(str(part))
            node = node.get(part) if isinstance(node, dict) else None
    return " ".join(out) if out else "(top level)"


def _describe(err: typing.Mapping, data) -> str:
    loc = tuple(p for p in err["loc"] if not (isinstance(p, str) and p.startswith(("function-", "tagged-"))))
    kind = err["type"]
    if kind == "extra_forbidden":
        model = _model_at(loc)
        names = list(model.model_fields) if model else []
        close = difflib.get_close_matches(str(loc[-1]), names, n=1, cutoff=0.5)
        hint = f"; did you mean '{close[0]}'?" if close else (f"; valid keys: {', '.join(names)}" if names else "")
        return f"{_path(loc[:-1], data)}: unknown key '{loc[-1]}'{hint}"
    if kind == "missing":
        return f"{_path(loc, data)}: required field missing"
    msg = err["msg"].removeprefix("Value error, ")
    if ("input" in err and kind not in ("value_error", "model_type", "dict_type")
            and not isinstance(err["input"], (dict, list))):
        msg += f", got {err['input']!r}"
    return f"{_path(loc, data)}: {msg}"


def _cross_checks(data: dict) -> list[str]:
    """Problems pydantic cannot see alone: section names used by stations and blends."""
    problems = []
    sections = s if isinstance(s := data.get("sections"), dict) else {}
    names = list(sections)
    surfaces = s if isinstance(s := data.get("surface"), list) else []
    by_form: dict[str, str] = {}
    for nm in names:  # 'é' written as one character or as 'e' and an accent: one name to a reader
        form = unicodedata.normalize("NFKC", nm)
        if form in by_form:
            problems.append(f"sections: '{printable(nm, 40)}' and '{printable(by_form[form], 40)}' differ only in "
                            "how their characters are encoded (Unicode normalisation); give them different names")
        by_form.setdefault(form, nm)
    seen: dict[str, int] = {}
    for i, surf in enumerate(surfaces):
        if not isinstance(surf, dict):
            continue
        nm = surf.get("name")
        if isinstance(nm, str):
            key = unicodedata.normalize("NFKC", nm).casefold()  # Wing and wing: one file on some disks
            if key in seen:
                problems.append(f"{_path(('surface', i, 'name'), data)}: name '{nm}' is already used by "
                                f"surface[{seen[key]}] (file names would clash)")
            seen.setdefault(key, i)
            if key in RESERVED_NAMES:
                problems.append(f"{_path(('surface', i, 'name'), data)}: '{nm}' is the name of another output "
                                f"of the set (its file would clash); choose another name")
        stations = s if isinstance(s := surf.get("station"), list) else []
        problems += _station_order(data, i, stations, surf.get("mirror") is True)
        for j, st in enumerate(stations):
            if not isinstance(st, dict):
                continue
            refs = [("section", st.get("section"))]
            if isinstance(st.get("blend"), dict):
                refs.append(("blend section", st["blend"].get("section")))
            for what, ref in refs:
                if isinstance(ref, str) and ref not in sections:
                    close = difflib.get_close_matches(ref, names, n=1, cutoff=0.5)
                    hint = f"; did you mean '{close[0]}'?" if close else f"; defined: {', '.join(names) or 'none'}"
                    loc = ("surface", i, "station", j, "section" if what == "section" else "blend")
                    problems.append(f"{_path(loc, data)}: unknown {what} '{ref}'{hint}")
    problems += _prefix_clashes(data, seen)
    return problems


#: Words a surface may not be called: the set's own outputs named like a surface's files.
RESERVED_NAMES = ("assembly",)


def _prefix_clashes(data, seen: dict) -> list[str]:
    """A surface's files are ``<set>-<name>-<what>``; a surface named ``<other>-<...>`` could
    therefore write a file another surface writes (``wing-mount`` vs ``wing``'s mount)."""
    out = []
    for key, i in seen.items():
        for other, j in seen.items():
            if j != i and key.startswith(other + "-"):
                out.append(f"{_path(('surface', i, 'name'), data)}: starts with the name of surface[{j}] "
                           f"and '-', so their file names could clash; choose a name that does not")
    return out


def _station_order(data, i, stations, mirror) -> list[str]:
    """Stations strictly increasing in span, not nearly coincident, root at 0 when mirrored."""
    out = []
    ys: list = [st.get("y") if isinstance(st, dict) else None for st in stations]
    def at(j, key):
        return _path(("surface", i, "station", j, key), data)
    for j in range(1, len(ys)):
        a, b = ys[j - 1], ys[j]
        if not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in (a, b)):
            continue
        if b <= a:
            out.append(f"{at(j, 'y')}: must be greater than station[{j - 1}].y = {a:g} "
                       f"(stations strictly increasing in span), got {b:g}")
        elif b - a < MIN_STATION_GAP_MM:
            out.append(f"{at(j, 'y')}: within {MIN_STATION_GAP_MM:g} mm of station[{j - 1}] "
                       f"(nearly coincident sections make sliver solids), got {b:g}")
    if mirror and ys and isinstance(ys[0], (int, float)) and ys[0] != 0:
        out.append(f"{at(0, 'y')}: must be 0 for a mirrored surface (the halves meet there), got {ys[0]:g}")
    if stations and isinstance(stations[0], dict):
        for key, alt in (("sweep", "x"), ("dihedral", "z")):
            if key in stations[0]:
                out.append(f"{at(0, key)}: the first station has no previous one to angle from; give '{alt}'")
    return out


def _lattice_budget(spec) -> list[str]:
    """The lattice's memory from its panel count, before anything is built."""
    fl = spec.flight
    ns = fl.span_panels if fl else DEFAULT_SPAN_PANELS
    nc = fl.chord_panels if fl else DEFAULT_CHORD_PANELS
    vertical = bool(fl and (fl.include_vertical or fl.vertical_in_pitch))
    n = lattice_panels(spec.surface, ns, nc, vertical)
    need = lattice_bytes(n)
    if need <= MAX_LATTICE_BYTES:
        return []
    return [f"flight span_panels, chord_panels: {ns} x {nc} panels on these surfaces make {n} lattice panels, "
            f"about {need / 2**30:.1f} GiB of matrices; the limit is {MAX_LATTICE_BYTES / 2**30:g} GiB "
            f"(at most {int((MAX_LATTICE_BYTES / (8 * LATTICE_MATRICES)) ** 0.5):,} panels): fewer panels"]


def _raw_problems(data, source: str) -> list[str]:
    """Before validation, on the raw TOML (iterative: no recursion): nesting deeper than
    MAX_SPEC_DEPTH, more than MAX_SPEC_VALUES values, control characters in keys or text."""
    todo: list[tuple[typing.Any, tuple, int]] = [(data, (), 0)]
    count = 0
    bad: list[str] = []
    while todo:
        node, loc, depth = todo.pop()
        if depth > MAX_SPEC_DEPTH:
            return [f"{source}: {_path(loc, data)}: nested deeper than {MAX_SPEC_DEPTH} levels; "
                    "no spec needs that many"]
        items = node.items() if isinstance(node, dict) else enumerate(node) if isinstance(node, list) else ()
        for k, v in items:
            count += 1
            if count > MAX_SPEC_VALUES:
                return [f"{source}: more than {MAX_SPEC_VALUES} keys and values; refused as no spec needs "
                        "that many (limit MAX_SPEC_VALUES)"]
            for text, what in ((k, "key"), (v, "text")):
                c = control_char(text) if isinstance(text, str) else None
                if c is not None and len(bad) < MAX_ERROR_LINES:
                    at = _path(loc + (k,), data) if what == "text" else (_path(loc, data) if loc else "(top level)")
                    bad.append(f"{source}: {at}: {what} {printable(str(text), 60)!r} holds a control character "
                               f"(U+{ord(c):04X}); only printable text may reach the outputs")
            if isinstance(v, (dict, list)):
                todo.append((v, loc + (k,), depth + 1))
    return bad


def load_spec_text(text: str, source: str = "<spec>") -> Spec:
    """Validate spec text; raise :class:`SpecError` listing every problem, each prefixed by ``source``."""
    try:
        data = tomllib.loads(text.removeprefix("\ufeff"))
    except tomllib.TOMLDecodeError as exc:
        raise SpecError([f"{source}: not valid TOML: {exc}"]) from None
    except RecursionError:
        raise SpecError([f"{source}: not valid TOML: nested deeper than Python can read"]) from None
    raw = _raw_problems(data, source)
    if raw:
        raise SpecError(raw)
    problems = []
    spec = None
    try:
        spec = Spec.model_validate(data)
    except ValidationError as exc:
        problems += [_describe(e, data) for e in exc.errors()]
    problems += _cross_checks(data)
    if spec is not None and not problems:
        problems += _lattice_budget(spec)
    if problems:
        raise SpecError([f"{source}: {p}" for p in problems])
    assert spec is not None  # validated without problems
    spec._source = Path(source)  # type: ignore[attr-defined]  # messages and relative files; pydantic: set, not a field
    return spec


def load_spec(path, allow_outside_files: bool = False) -> Spec:
    """Read and validate a spec file. The spec keeps its folder for relative file paths.

    Coordinate files must lie inside the spec's folder (a shared spec cannot read arbitrary
    files) unless ``allow_outside_files`` is given.
    """
    path = Path(path)
    text = read_spec_text(path)
    spec = load_spec_text(text, str(path))
    spec._source = path  # type: ignore[attr-defined]
    spec._allow_outside_files = allow_outside_files  # type: ignore[attr-defined]
    spec._text = text  # type: ignore[attr-defined]  # the bytes validated: studies start from them
    return spec


def read_spec_text(path) -> str:
    """The text of a spec file through the input guards every spec file passes: regular
    files only (a FIFO or ``/dev/zero`` is refused, not waited on), at most
    ``MAX_SPEC_BYTES`` read, UTF-8 (a byte-order mark is dropped). SpecError names the file."""
    path = Path(path)
    try:
        raw = read_capped(path, MAX_SPEC_BYTES)  # regular files only (a FIFO or /dev/zero would hang)
    except FileNotFoundError:
        raise SpecError([f"{path}: cannot read the spec: file not found"]) from None
    except NotReadable as exc:
        raise SpecError([f"{path}: cannot read the spec: {exc}"]) from None
    try:
        return raw.decode("utf-8-sig")  # a byte-order mark some editors write is accepted
    except UnicodeDecodeError:
        raise SpecError([f"{path}: not a text file (not UTF-8)"]) from None
