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

    def commit(self, extra: dict | None = None) -> list[Path]:
        """Move every staged file into place and write the manifest; return final paths."""
        previous = read_manifest(self.out_dir)
        self._check_foreign(previous)
        files = []
        for name in self.names:
            p = self.dir / name
            files.append({"name": name, "size": p.stat().st_size, "sha256": _sha256(p)})
        manifest = {"written_by": "geomgen", **(extra or {}), "files": files}
        (self.dir / MANIFEST).write_text(json.dumps(manifest, indent=2) + "\n")
        try:
            for name in self.names + [MANIFEST]:
                os.replace(self.dir / name, self.out_dir / name)
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: moving outputs into place failed: {exc.strerror or exc}") from None
        return [self.out_dir / n for n in self.names]

    def __exit__(self, *exc):
        if self.dir is not None:
            shutil.rmtree(self.dir, ignore_errors=True)
        return False
