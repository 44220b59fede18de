"""The manifest: what geomgen wrote into an output folder (name, size, SHA-256, spec, command,
and the fingerprints of the inputs each file was made from, :mod:`.inputs`), and which of
those files are current."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

from .. import __version__
from .naming import MANIFEST


def sha256_of(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def spec_digest(path) -> str:
    """SHA-256 of a spec file's bytes (outputs are fresh only for the same spec)."""
    return sha256_of(Path(path))


def read_manifest(out_dir) -> dict:
    """name -> entry of what geomgen wrote into ``out_dir`` (empty if none or unreadable)."""
    try:
        data = json.loads((Path(out_dir) / MANIFEST).read_text())
        return {f["name"]: f for f in data.get("files", []) if isinstance(f, dict) and isinstance(f.get("name"), str)}
    except (OSError, ValueError, AttributeError, TypeError, KeyError):
        return {}


def file_matches(path: Path, entry: dict) -> bool:
    """True if the file's bytes are those geomgen recorded (size, then SHA-256)."""
    try:
        return path.stat().st_size == entry.get("size") and sha256_of(path) == entry.get("sha256")
    except OSError:
        return False




#: Keys of a commit's ``info`` that are not recorded as they are (see :func:`entry_info`).
_DIGESTS, _INPUTS_OF = "input_digests", "inputs_of"


def entry_info(info: dict, name: str) -> dict:
    """What the manifest records with file ``name`` of a commit: ``info`` as given, but of
    the inputs only those the file was made from (``inputs``: key -> fingerprint)."""
    rec = {k: v for k, v in info.items() if k not in (_DIGESTS, _INPUTS_OF)}
    digests = info.get(_DIGESTS)
    if digests is not None:
        keys = (info.get(_INPUTS_OF) or {}).get(name)
        keys = list(digests) if keys is None else keys
        from .inputs import current

        rec["inputs"] = {k: current(k, digests) or "absent" for k in keys}
    return rec


def changed_inputs(entry: dict, info: dict) -> list[str]:
    """The inputs of a recorded file that differ now (empty: the file is current).

    ``info`` holds the current ``input_digests`` (and ``spec_sha256``); ``geomgen`` in the
    answer means another geomgen version wrote the file, ``spec`` that it was recorded
    without fingerprints and the spec's bytes differ."""

    if entry.get("geomgen_version") != __version__:
        return ["geomgen"]
    recorded, digests = entry.get("inputs"), info.get(_DIGESTS)
    if not isinstance(recorded, dict) or digests is None:
        return [] if entry.get("spec_sha256") == info.get("spec_sha256") else ["spec"]
    from .inputs import current

    return [k for k, d in recorded.items() if current(k, digests) != d]


def stale_notes(removed: list[str], kept: list[str], why: dict[str, list[str]]) -> list[str]:
    """Messages of a commit about stale files, grouped by the input that changed."""
    from .inputs import describe

    out = []
    for names, what in ((removed, "removed {n} file(s) made from the earlier spec (run their command again "
                                  "to remake them)"),
                        (kept, "left {n} stale file(s) that were edited after geomgen wrote them (they do not "
                               "match the spec; move them away)")):
        groups: dict[str, list[str]] = {}
        for name in names:
            groups.setdefault(describe(why.get(name) or ["spec"]), []).append(name)
        for cause, files in groups.items():
            out.append(f"{cause} changed: " + what.format(n=len(files)) + ": " + ", ".join(files))
    return out


def file_states(out_dir, set_name: str, info: dict) -> list[dict]:
    """Every file of set ``set_name`` in ``out_dir``: name, command, ``current``, the inputs
    that ``changed`` since it was made (in words too) and whether it was ``edited`` since."""
    from .inputs import describe

    out = []
    for name, e in sorted(read_manifest(out_dir).items()):
        p = Path(out_dir) / name
        if e.get("set", _set_of(e)) != set_name or not p.is_file():
            continue
        changed = changed_inputs(e, info)
        out.append({"name": name, "command": e.get("command", "?"), "current": not changed,
                    "changed": changed, "changed_words": describe(changed) if changed else "",
                    "edited": not file_matches(p, e)})
    return out


def output_state(out_dir, names, info: dict, options: dict | None = None) -> tuple[bool, list[str]]:
    """(current, modified): ``current`` if every file in ``names`` exists, none of its inputs
    changed (``info``: current fingerprints) and it was made with the same ``options``;
    ``modified`` lists those whose bytes no longer match what geomgen wrote."""
    entries = read_manifest(out_dir)
    current, modified = True, []
    for name in names:
        e, p = entries.get(name), Path(out_dir) / name
        if e is None or not p.is_file() or changed_inputs(e, info) or \
                any(e.get(k) != v for k, v in (options or {}).items()):
            current = False
            continue
        if not file_matches(p, e):
            modified.append(name)
    return current, modified


def _set_of(entry: dict) -> str | None:
    """The set of an entry from a manifest without ``set`` (geomgen 0.1): its spec file's stem."""
    spec = entry.get("spec")
    return Path(spec).stem if spec else None
