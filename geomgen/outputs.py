"""Whole-or-nothing output: stage every file, then move all into place.

A build writes into a hidden staging folder inside the output folder (same filesystem, so
the final moves are atomic renames). Only when every writer succeeded are the files moved
into place, each with ``os.replace``; a failure before that removes the staging folder and
leaves the previous outputs byte-identical. A manifest (name, size, sha256) records what
geomgen wrote; a file in the output folder that geomgen did not write is never overwritten
or deleted.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import tempfile
from pathlib import Path

from .errors import ExportError

MANIFEST = "geomgen-manifest.json"


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def read_manifest(out_dir: Path) -> dict:
    """name -> {size, sha256} of what geomgen wrote last into ``out_dir`` (empty if none)."""
    try:
        data = json.loads((Path(out_dir) / MANIFEST).read_text())
        return {f["name"]: f for f in data.get("files", [])}
    except (OSError, ValueError, AttributeError, TypeError, KeyError):
        return {}


class Staging:
    """Context manager: ``path(name)`` gives a staging path; ``commit()`` moves all into place."""

    def __init__(self, out_dir):
        self.out_dir = Path(out_dir)
        self.names: list[str] = []
        self.dir: Path | None = None

    def __enter__(self):
        try:
            self.out_dir.mkdir(parents=True, exist_ok=True)
            self.dir = Path(tempfile.mkdtemp(prefix=".geomgen-staging-", dir=self.out_dir))
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write here: {exc.strerror or exc}") from None
        return self

    def path(self, name: str) -> Path:
        if name in self.names:
            raise ExportError(f"two outputs want the same name '{name}'")
        self.names.append(name)
        return self.dir / name

    def _check_foreign(self, previous: dict) -> None:
        for name in self.names + [MANIFEST]:
            target = self.out_dir / name
            if target.exists() and name != MANIFEST and name not in previous:
                raise ExportError(f"{target} exists and was not written by geomgen; "
                                  "move it away or choose another output folder (nothing was written)")

    def commit(self, info: dict | None = None) -> list[Path]:
        """Move every staged file into place and update the manifest; return final paths.

        ``info`` (e.g. the spec's hash) is recorded with each file written now; entries of
        earlier runs stay in the manifest while their files are still there.
        """
        previous = read_manifest(self.out_dir)
        self._check_foreign(previous)
        from . import __version__

        entries = {name: e for name, e in previous.items() if (self.out_dir / name).is_file()}
        for name in self.names:
            p = self.dir / name
            entries[name] = {"name": name, "size": p.stat().st_size, "sha256": _sha256(p),
                             "geomgen_version": __version__, **(info or {})}
        manifest = {"written_by": "geomgen", "files": [entries[n] for n in sorted(entries)]}
        try:
            (self.dir / MANIFEST).write_text(json.dumps(manifest, indent=2) + "\n")
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write the manifest: {exc.strerror or exc}") from None
        self._swap_in(self.names + [MANIFEST])
        return [self.out_dir / n for n in self.names]

    def _swap_in(self, names: list[str]) -> None:
        """Move staged files into place; on any failure put every earlier output back.

        Each existing output is first moved aside into the staging folder (a rename on the
        same filesystem), so a failure half-way can be undone exactly.
        """
        backup = self.dir / ".previous"
        backup.mkdir()
        moved_aside, placed = [], []
        try:
            for name in names:
                target = self.out_dir / name
                if target.exists():
                    os.replace(target, backup / name)
                    moved_aside.append(name)
                os.replace(self.dir / name, target)
                placed.append(name)
        except OSError as exc:
            for name in placed:
                try:
                    os.remove(self.out_dir / name)
                except OSError:
                    pass
            for name in moved_aside:
                try:
                    os.replace(backup / name, self.out_dir / name)
                except OSError:
                    pass
            raise ExportError(f"{self.out_dir}: moving outputs into place failed ({exc.strerror or exc}); "
                              "the previous outputs were put back") from None

    def __exit__(self, *exc):
        if self.dir is not None:
            shutil.rmtree(self.dir, ignore_errors=True)
        return False


def output_state(out_dir, names, info: dict) -> tuple[bool, list[str]]:
    """(current, modified): ``current`` if every file in ``names`` exists and was written by
    this version of geomgen from the same spec and options (``info``); ``modified`` lists
    those whose bytes no longer match what geomgen wrote (edited or corrupted since)."""
    from . import __version__

    entries = read_manifest(out_dir)
    current, modified = True, []
    for name in names:
        e, p = entries.get(name), Path(out_dir) / name
        if e is None or not p.is_file() or e.get("geomgen_version") != __version__ \
                or any(e.get(k) != v for k, v in info.items()):
            current = False
            continue
        if p.stat().st_size != e.get("size") or _sha256(p) != e.get("sha256"):
            modified.append(name)
    return current, modified


def spec_digest(path) -> str:
    """SHA-256 of a spec file's bytes (outputs are fresh only for the same spec)."""
    return _sha256(Path(path))

