"""Whole-or-nothing output of one command's files into an output set.

A command takes the folder's write lock (:mod:`.lock`), finishes or undoes what an
interrupted run left (:func:`.journal.recover`), writes into a hidden staging folder inside
the output folder, and only when every writer succeeded commits: the files are moved into
place and the new manifest switched in with one atomic rename (:mod:`.journal`). A failure or
Ctrl-C before the switch puts every previous output back; a kill at any instant leaves
either the previous set or the new one, whole, once the next run has recovered.

The manifest (``geomgen-manifest.json``) records, for every file geomgen wrote: name, size,
SHA-256, geomgen version, spec file, spec hash, output set, the command that made it and
the fingerprints of the inputs it was made from (:mod:`.inputs`). When a command commits,
files of the same set one of whose own inputs changed (or made by another geomgen version)
are *stale*: they no longer describe the spec, so they are removed (they are geomgen's own
and byte-identical to what it wrote) and the caller is told which input changed. A stale file
edited since geomgen wrote it is not geomgen's any more: it is left, and reported.
Refused, with nothing written: a file the manifest does not list, a manifest or index
geomgen did not write, a link or a linked folder where an output goes, and an output edited
since geomgen wrote it (unless ``overwrite_edited``).
"""

from __future__ import annotations

import json
import os
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

from .. import __version__
from ..errors import ExportError
from . import journal
from .formats import Output
from .lock import FolderLock
from .manifest import _set_of, changed_inputs, entry_info, file_matches, read_manifest, sha256_of, stale_notes
from .naming import FOLDERS, INDEX, MANIFEST, folder_of


@dataclass
class Committed:
    """What a commit did: ``files`` written (final paths), stale files removed or left,
    and what was found and mended first (``recovered``: interrupted runs, a dead lock owner)."""

    files: list[Path]
    removed_stale: list[str] = field(default_factory=list)
    kept_stale: list[str] = field(default_factory=list)  # stale but edited since written: left alone
    recovered: list[str] = field(default_factory=list)
    why: dict[str, list[str]] = field(default_factory=dict)  # stale file -> the inputs that changed

    def notes(self) -> list[str]:
        return list(self.recovered) + stale_notes(self.removed_stale, self.kept_stale, self.why)


def _own_manifest(out_dir: Path) -> dict:
    """The previous manifest, refusing one geomgen did not write (nothing is replaced)."""
    path = out_dir / MANIFEST
    if os.path.lexists(path):
        foreign = path.is_symlink() or not path.is_file()
        if not foreign:
            try:
                data = json.loads(path.read_text(encoding="utf-8"))
                foreign = not (isinstance(data, dict) and data.get("written_by") == "geomgen")
            except (OSError, ValueError):
                foreign = True
        if foreign:
            raise ExportError(f"{path} exists and was not written by geomgen (or is not readable as its "
                              "manifest); geomgen does not replace it: move it away or choose another "
                              "output folder (nothing was written)")
    index = out_dir / INDEX
    if os.path.lexists(index) and (index.is_symlink() or not index.is_file() or not os.path.lexists(path)):
        raise ExportError(f"{index} exists and was not written by geomgen; move it away or choose another "
                          "output folder (nothing was written)")
    return read_manifest(out_dir)


class Staging:
    """Context manager: ``path(name)`` gives a staging path; ``commit(info)`` moves all into place.

    ``overwrite_edited``: replace outputs edited since geomgen wrote them (else refused).
    The folder's write lock is held from entry to exit.
    """

    def __init__(self, out_dir, overwrite_edited: bool = False, lock_wait_s: float | None = None):
        self.out_dir = Path(out_dir)
        self.overwrite_edited = overwrite_edited
        self.names: list[str] = []
        self.purposes: dict[str, str] = {}
        self.dir: Path | None = None
        self.recovered: list[str] = []
        self._lock = FolderLock(self.out_dir, lock_wait_s)
        self._keep = False  # a rollback failed: leave the staging folder for the next run
        self._made: list[Path] = []  # folders this run made (taken back if left empty)

    def __enter__(self):
        self._made = _make_folder(self.out_dir)
        try:
            self._lock.__enter__()
        except BaseException:
            _remove_if_empty(self._made)
            raise
        try:
            self.recovered = self._lock.note() + journal.recover(self.out_dir, self._lock)
            self.dir = journal.new_stage(self.out_dir, self._lock)
            (self.dir / "new").mkdir()
        except OSError as exc:
            self._lock.__exit__(None, None, None)
            _remove_if_empty(self._made)
            raise ExportError(f"{self.out_dir}: cannot write here: {exc.strerror or exc}") from None
        except BaseException:
            self._lock.__exit__(None, None, None)
            _remove_if_empty(self._made)
            raise
        return self

    def path(self, name: str, purpose: str = "") -> Path:
        """Staging path of output ``name`` (relative, POSIX, may hold one folder)."""
        if name in self.names or name in (MANIFEST, INDEX):
            raise ExportError(f"two outputs want the same name '{name}'")
        self.names.append(name)
        self.purposes[name] = purpose
        assert self.dir is not None, "outputs are staged inside the with block"
        p = self.dir / "new" / name
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
        edited = []
        for name in self.names:
            target = journal.inside(self.out_dir, name)  # no link or file on the way
            if (target.exists() or target.is_symlink()) and name not in previous:
                raise ExportError(f"{target} exists and was not written by geomgen; "
                                  "move it away or choose another output folder (nothing was written)")
            if target.is_symlink() or (target.exists() and not target.is_file()):
                raise ExportError(f"{target} is a symbolic link or not a file; geomgen does not write "
                                  "through links (nothing was written)")
            if target.exists() and not file_matches(target, previous[name]):
                edited.append(name)
        if edited and not self.overwrite_edited:
            raise ExportError(f"{len(edited)} output(s) were edited after geomgen wrote them (their SHA-256 no "
                              f"longer matches the manifest): {', '.join(edited)}; move them away, or run again "
                              "with --overwrite-edited to replace them (nothing was written)")

    def commit(self, info: dict) -> Committed:
        """Move every staged file into place and update the manifest and the index.

        ``info`` is recorded with each file written now; it must hold ``set`` (the spec's
        name), ``spec_sha256`` and ``command``, and may hold ``input_digests`` (every input's
        fingerprint now) and ``inputs_of`` (file name -> the inputs it is made from, see
        :func:`.manifest.entry_info`). Files of the same set one of whose inputs changed (or
        from another geomgen version) are removed (or, if edited since, left and reported).
        """
        previous = _own_manifest(self.out_dir)
        self._check_foreign(previous)
        entries = {name: e for name, e in previous.items() if _is_file_inside(self.out_dir, name)}
        stale_remove, stale_keep, why = [], [], {}
        for name, e in list(entries.items()):
            if name in self.names or e.get("set", _set_of(e)) != info["set"]:
                continue
            changed = changed_inputs(e, info)
            if not changed and e.get("stale"):  # its inputs are back as they were: current again
                entries[name] = {k: v for k, v in e.items() if k not in ("stale", "stale_inputs")}
            if changed:
                why[name] = changed
                if file_matches(self.out_dir / name, e):
                    stale_remove.append(e)
                    del entries[name]
                else:
                    stale_keep.append(name)
                    entries[name] = {**e, "stale": True, "stale_inputs": changed}
        assert self.dir is not None, "outputs are staged inside the with block"
        new = self.dir / "new"
        for name in self.names:
            p = new / name
            entries[name] = {"name": name, "size": p.stat().st_size, "sha256": sha256_of(p),
                             "geomgen_version": __version__, "purpose": self.purposes.get(name, ""),
                             **entry_info(info, name)}
        manifest: dict = {"written_by": "geomgen", "files": [entries[n] for n in sorted(entries)]}
        try:
            (new / MANIFEST).write_text(json.dumps(manifest, indent=1) + "\n")
            (new / INDEX).write_text(format_index(manifest["files"]))
        except OSError as exc:
            raise ExportError(f"{self.out_dir}: cannot write the manifest: {exc.strerror or exc}") from None
        removed, interrupted = self._swap_in(self.names + [INDEX], stale_remove)
        _remove_empty_folders(self.out_dir)
        if interrupted:  # Ctrl-C came after the switch: the new set is whole; stop now
            raise KeyboardInterrupt
        return Committed([self.out_dir / n for n in self.names], removed, stale_keep, self.recovered, why)

    def _swap_in(self, names: list[str], stale: list[dict]) -> tuple[list[str], bool]:
        """Journal, place, switch (see :mod:`.journal`); on any failure or Ctrl-C before the
        switch put every earlier output back."""
        assert self.dir is not None, "outputs are staged inside the with block"
        had_old = {n: os.path.lexists(self.out_dir / n) for n in names}
        stale = [{"name": e["name"], "size": e.get("size"), "sha256": e.get("sha256")} for e in stale]
        plan = {"files": [{"name": n, "had_old": had_old[n]} for n in names], "stale": stale}
        with journal.held_sigint() as interrupted:
            try:
                journal.write_plan(self.dir, names, had_old, stale)
                for name in names:
                    if interrupted():
                        raise KeyboardInterrupt
                    journal.place(self.dir, self.out_dir, name)
                if interrupted():
                    raise KeyboardInterrupt
                journal.switch(self.dir, self.out_dir)
            except BaseException as exc:
                try:
                    journal.roll_back(self.dir, self.out_dir, plan)
                    (self.dir / journal.PLAN).unlink(missing_ok=True)
                except OSError as exc2:
                    self._keep = True
                    raise ExportError(f"{self.out_dir}: moving outputs into place failed and so did putting "
                                      f"the previous ones back ({exc2.strerror or exc2}); the next geomgen run "
                                      "in this folder finishes the rollback") from None
                if isinstance(exc, OSError):
                    raise ExportError(f"{self.out_dir}: moving outputs into place failed ({exc.strerror or exc}); "
                                      "the previous outputs were put back") from None
                raise
            removed = journal.roll_forward(self.dir, self.out_dir, plan)
            (self.dir / journal.PLAN).unlink(missing_ok=True)
            return removed, interrupted()

    def __exit__(self, *exc):
        interrupted = False
        try:
            if self.dir is not None and not self._keep:
                with journal.held_sigint() as hit:  # clean up whole, then let Ctrl-C go on
                    (self.dir / journal.PLAN).unlink(missing_ok=True)
                    journal.drop_stage(self.out_dir, self._lock, self.dir)
                    interrupted = hit()
            elif self.dir is not None:  # left for the next run, which finds it in the register
                journal._active.discard(os.path.realpath(self.dir))
        finally:
            self._lock.__exit__(*exc)
            _remove_if_empty(self._made)  # a refused run leaves no empty folder behind
        if interrupted and exc[0] is None:
            raise KeyboardInterrupt
        return False


def _make_folder(out_dir: Path) -> list[Path]:
    """Make ``out_dir`` and its missing parents; the folders made, innermost first."""
    made, p = [], Path(out_dir)
    while not os.path.lexists(p) and p != p.parent:
        made.append(p)
        p = p.parent
    try:
        Path(out_dir).mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        _remove_if_empty(made)
        raise ExportError(f"{out_dir}: cannot write here: {exc.strerror or exc}") from None
    return made


def _remove_if_empty(made: list[Path]) -> None:
    """Take back the folders a refused run made (only while they are empty)."""
    for p in made:
        try:
            p.rmdir()
        except OSError:
            return


@contextmanager
def holding(out_dir, lock_wait_s: float | None = None):
    """Hold the folder's write lock and first finish or undo what interrupted runs left;
    yields the notes of that. For every command that reads the folder (``check``,
    ``report``): what it measures cannot change under it, and no other run commits (and so
    removes files as stale) until it is done. Re-entrant with :class:`Staging`. A folder
    made here and left empty (the command was refused) is removed again."""
    made = _make_folder(Path(out_dir))
    lock = FolderLock(out_dir, lock_wait_s)
    try:
        lock.__enter__()
    except BaseException:
        _remove_if_empty(made)
        raise
    try:
        notes = lock.note() + journal.recover(Path(out_dir), lock)
        yield notes
    finally:
        lock.__exit__(None, None, None)
        _remove_if_empty(made)


def write_set(out_dir, outputs: list[Output], info: dict, say=None, overwrite_edited: bool = False) -> Committed:
    """Write ``outputs`` whole or not at all into ``out_dir`` (see :class:`Staging`)."""
    with Staging(out_dir, overwrite_edited) as stage:
        for out in outputs:
            stage.add(out, say)
        return stage.commit(info)


def _is_file_inside(out_dir: Path, name: str) -> bool:
    """A regular file at ``name`` reached without passing a link (a manifest's name through a
    linked folder is treated as absent: nothing is measured, kept or removed there)."""
    try:
        p = journal.inside(Path(out_dir), name)
    except ExportError:
        return False
    return not p.is_symlink() and p.is_file()


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
             "Written by geomgen; every file is listed in `geomgen-manifest.json` with its SHA-256 and the "
             "fingerprints of the inputs it was made from. 'state' is as of the last geomgen command in this "
             "folder: a file is current unless one of its own inputs changed; `geomgen check` tells it for "
             "the spec as it is now.", ""]
    by_folder: dict[str, list[dict]] = {}
    for e in entries:
        by_folder.setdefault(folder_of(e["name"]), []).append(e)
    for folder in list(FOLDERS) + sorted(set(by_folder) - set(FOLDERS)):
        rows = by_folder.get(folder)
        if not rows:
            continue
        lines += [f"## {folder or '(top)'}/: {FOLDERS.get(folder, '')}".rstrip(": "), "",
                  "| file | what it is for | made by | from spec | state |", "|---|---|---|---|---|"]
        for e in rows:
            state = "current"
            if e.get("stale"):
                from .inputs import describe

                state = (f"STALE: {describe(e.get('stale_inputs') or ['spec'])} changed since it was made "
                         "(edited by hand, so left)")
            lines.append(f"| `{e['name']}` | {e.get('purpose', '') or '-'} | `geomgen {e.get('command', '?')}` | "
                         f"{e.get('spec', '?')} ({str(e.get('spec_sha256', ''))[:12]}) | {state} |")
        lines.append("")
    return "\n".join(lines)
