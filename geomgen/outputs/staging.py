"""Whole-or-nothing output of one command's files into an output set.

A command writes into a hidden staging folder inside the output folder (same filesystem,
so the final moves are atomic renames). Only when every writer succeeded are the files
moved into place, each with ``os.replace``; a failure before that removes the staging
folder and leaves the previous outputs byte-identical.

The manifest (``geomgen-manifest.json``) records, for every file geomgen wrote: name, size,
SHA-256, geomgen version, spec file, spec hash, output set and the command that made it.
When a command commits, files of the same set made from another spec (or another geomgen
version) are *stale*: they no longer describe the spec, so they are removed (they are
geomgen's own and byte-identical to what it wrote) and the caller is told. A stale file
edited since geomgen wrote it is not geomgen's any more: it is left, and reported.
A file the manifest does not list is never overwritten or deleted.
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import ExportError
from .formats import Output
from .manifest import entry_is_current, file_matches, read_manifest, sha256_of
from .naming import FOLDERS, INDEX, MANIFEST, folder_of


@dataclass
class Committed:
    """What a commit did: ``files`` written (final paths), stale files removed or left."""

    files: list[Path]
    removed_stale: list[str] = field(default_factory=list)
    kept_stale: list[str] = field(default_factory=list)  # stale but edited since written: left alone

    def notes(self) -> list[str]:
        out = []
        if self.removed_stale:
            out.append(f"removed {len(self.removed_stale)} file(s) made from an earlier version of the spec "
                       f"(run their command again to remake them): " + ", ".join(self.removed_stale))
        if self.kept_stale:
            out.append(f"left {len(self.kept_stale)} stale file(s) that were edited after geomgen wrote them "
                       "(they do not match the spec; move them away): " + ", ".join(self.kept_stale))
        return out


class Staging:
    """Context manager: ``path(name)`` gives a staging path; ``commit(info)`` moves all into place."""

    def __init__(self, out_dir):
        self.out_dir = Path(out_dir)
        self.names: list[str] = []
        self.purposes: dict[str, str] = {}
        self.dir: Path | None = None

    def __enter__(self):
        try:
            self.out_dir.mkdir(parents=True, exist_ok=True)
            self.dir = Path(tempfile.mkdtemp(prefix=".geomgen-staging-", dir=self.out_dir))
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write here: {exc.strerror or exc}") from None
        return self

    def path(self, name: str, purpose: str = "") -> Path:
        """Staging path of output ``name`` (relative, POSIX, may hold one folder)."""
        if name in self.names or name in (MANIFEST, INDEX):
            raise ExportError(f"two outputs want the same name '{name}'")
        self.names.append(name)
        self.purposes[name] = purpose
        p = self.dir / name
        try:
            p.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write here: {exc.strerror or exc}") from None
        return p

    def add(self, out: Output, say=None) -> Path:
        """Write one :class:`Output` into the staging folder through the writer table."""
        if say:
            say(f"writing {out.name}")
        p = self.path(out.name, out.purpose)
        out.write(p)
        return p

    def _check_foreign(self, previous: dict) -> None:
        for name in self.names:
            target = self.out_dir / name
            if (target.exists() or target.is_symlink()) and name not in previous:
                raise ExportError(f"{target} exists and was not written by geomgen; "
                                  "move it away or choose another output folder (nothing was written)")
            if target.is_symlink():
                raise ExportError(f"{target} is a symbolic link; geomgen does not write through links "
                                  "(nothing was written)")

    def commit(self, info: dict) -> Committed:
        """Move every staged file into place and update the manifest and the index.

        ``info`` is recorded with each file written now; it must hold ``set`` (the spec's
        name), ``spec_sha256`` and ``command``. Files of the same set from another spec hash
        or geomgen version are removed (or, if edited since, left and reported).
        """
        from .. import __version__

        previous = read_manifest(self.out_dir)
        self._check_foreign(previous)
        entries = {name: e for name, e in previous.items() if (self.out_dir / name).is_file()}
        stale_remove, stale_keep = [], []
        for name, e in list(entries.items()):
            if name in self.names or e.get("set", _set_of(e)) != info["set"]:
                continue
            if e.get("spec_sha256") != info["spec_sha256"] or e.get("geomgen_version") != __version__:
                if file_matches(self.out_dir / name, e):
                    stale_remove.append(name)
                    del entries[name]
                else:
                    stale_keep.append(name)
                    entries[name] = {**e, "stale": True}
        for name in self.names:
            p = self.dir / name
            entries[name] = {"name": name, "size": p.stat().st_size, "sha256": sha256_of(p),
                             "geomgen_version": __version__, "purpose": self.purposes.get(name, ""), **info}
        manifest = {"written_by": "geomgen", "files": [entries[n] for n in sorted(entries)]}
        try:
            (self.dir / MANIFEST).write_text(json.dumps(manifest, indent=1) + "\n")
            (self.dir / INDEX).write_text(format_index(manifest["files"]))
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write the manifest: {exc.strerror or exc}") from None
        self._swap_in(self.names + [MANIFEST, INDEX])
        removed = []
        for name in stale_remove:
            try:
                os.remove(self.out_dir / name)
                removed.append(name)
            except OSError:
                pass
        _remove_empty_folders(self.out_dir)
        return Committed([self.out_dir / n for n in self.names], removed, stale_keep)

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
                target.parent.mkdir(parents=True, exist_ok=True)
                if target.exists():
                    (backup / name).parent.mkdir(parents=True, exist_ok=True)
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


def write_set(out_dir, outputs: list[Output], info: dict, say=None) -> Committed:
    """Write ``outputs`` whole or not at all into ``out_dir`` (see :class:`Staging`)."""
    with Staging(out_dir) as stage:
        for out in outputs:
            stage.add(out, say)
        return stage.commit(info)


def stale_outputs(out_dir, set_name: str, spec_sha256: str) -> list[str]:
    """Files of set ``set_name`` in ``out_dir`` made from another spec or geomgen version."""
    from .. import __version__

    return sorted(n for n, e in read_manifest(out_dir).items()
                  if e.get("set", _set_of(e)) == set_name and (Path(out_dir) / n).is_file()
                  and (e.get("spec_sha256") != spec_sha256 or e.get("geomgen_version") != __version__))


def output_state(out_dir, names, info: dict) -> tuple[bool, list[str]]:
    """(current, modified): ``current`` if every file in ``names`` exists and was written by
    this version of geomgen from the same spec and options (``info``); ``modified`` lists
    those whose bytes no longer match what geomgen wrote (edited or corrupted since)."""
    entries = read_manifest(out_dir)
    current, modified = True, []
    for name in names:
        e, p = entries.get(name), Path(out_dir) / name
        if e is None or not p.is_file() or not entry_is_current(e, info):
            current = False
            continue
        if not file_matches(p, e):
            modified.append(name)
    return current, modified


def _set_of(entry: dict) -> str | None:
    """The set of an entry from a manifest without ``set`` (geomgen 0.1): its spec file's stem."""
    spec = entry.get("spec")
    return Path(spec).stem if spec else None


def _remove_empty_folders(out_dir: Path) -> None:
    for folder in FOLDERS:
        d = out_dir / folder
        try:
            if d.is_dir() and not d.is_symlink() and not any(d.iterdir()):
                d.rmdir()
        except OSError:
            pass


def format_index(entries: list[dict]) -> str:
    """The index page: every file of the folder by kind, what it is for, which command made it."""
    lines = ["# Files in this folder", "",
             "Written by geomgen; every file is listed in `geomgen-manifest.json` with its SHA-256.", ""]
    by_folder: dict[str, list[dict]] = {}
    for e in entries:
        by_folder.setdefault(folder_of(e["name"]), []).append(e)
    for folder in list(FOLDERS) + sorted(set(by_folder) - set(FOLDERS)):
        rows = by_folder.get(folder)
        if not rows:
            continue
        lines += [f"## {folder or '(top)'}/: {FOLDERS.get(folder, '')}".rstrip(": "), "",
                  "| file | what it is for | made by | from spec |", "|---|---|---|---|"]
        for e in rows:
            stale = " (STALE: edited, does not match the spec)" if e.get("stale") else ""
            lines.append(f"| `{e['name']}` | {e.get('purpose', '') or '-'}{stale} | "
                         f"`geomgen {e.get('command', '?')}` | {e.get('spec', '?')} ({str(e.get('spec_sha256', ''))[:12]}) |")
        lines.append("")
    return "\n".join(lines)
