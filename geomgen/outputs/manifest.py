"""The manifest: what geomgen wrote into an output folder (name, size, SHA-256, spec, command)."""

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


def entry_is_current(entry: dict, info: dict) -> bool:
    """Made by this geomgen version with the same ``info`` (spec hash, options)?"""
    return entry.get("geomgen_version") == __version__ and all(entry.get(k) == v for k, v in info.items())
