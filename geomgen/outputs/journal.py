"""The commit of an output set, safe against interruption at any instant.

A staging folder ``.geomgen-staging-<12 hex>`` inside the output folder (same filesystem, so
every move is an atomic rename) holds::

    token-<token>          an empty file named after a random token, also recorded in the
                           lock file's register
    new/<name>…            the new files, the new manifest and the new index
    old/<name>…            hard links to (or, where links fail, the moved) previous files
    plan.json              what the commit will do, written whole (temp file + rename)

**Only geomgen's own staging folders are acted on.** A run records the folder's name and a
fresh random token in the register of the folder's lock file (:mod:`.lock`) before it makes
the folder, and writes the token into it; recovery takes only folders that are in the
register, are real folders (not links) and hold that token. Anything else named like a
staging folder is the user's and is never removed or read. **Every name is resolved inside
the real output folder:** a name is plain (no absolute path, no ``..``, ``.`` or empty part)
and no folder on its way is a link or a file (checked with ``lstat`` part by part, and the
resolved parent must be the output folder's own subfolder), else the name is refused and
nothing is moved, removed or written.

The commit places each new file over its target (the previous one kept in ``old/`` first),
the index too, and then the manifest: **replacing the manifest is the one atomic switch.**
Before it, the folder's manifest still describes the previous set and every previous file
is in place or in ``old/``; after it, the new manifest describes the new set and every new
file is in place or still in ``new/``. So whichever instant a run is killed at, the next run
(holding the folder lock, so no live run owns any staging folder it sees) finds the plan
and either rolls back (``new/<manifest>`` still there) or rolls forward (it is gone); a
staging folder without a plan was still being written and is removed. The staged files and
the plan are flushed to disk (fsync) before the first move, so the old set is kept until
the new one is durable.

SIGINT (Ctrl-C) during the moves is held until the next step boundary: before the switch the
commit rolls back and the interrupt goes on (exit 130); after it the commit finishes first.
"""

from __future__ import annotations

import hmac
import json
import os
import secrets
import shutil
import signal
import stat
import threading
from contextlib import contextmanager
from pathlib import Path

from ..errors import ExportError
from .manifest import file_matches
from .naming import MANIFEST

STAGING_PREFIX = ".geomgen-staging-"
PLAN = "plan.json"
TOKEN = "token-"  # inside a staging folder: an empty file token-<the token the lock file's register holds>

#: staging folders open in this process (a run nested in another never recovers its parent's)
_active: set[str] = set()


def _step(what: str) -> None:
    """Called between any two filesystem steps of a commit (tests stop a process here)."""


def _fsync_path(path: Path, directory: bool = False) -> None:
    try:
        fd = os.open(path, os.O_RDONLY | (getattr(os, "O_DIRECTORY", 0) if directory else 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:  # some filesystems cannot fsync a folder; the rename order still holds
        pass
    finally:
        os.close(fd)


@contextmanager
def held_sigint():
    """Hold SIGINT while the body runs; yields a function telling whether one came."""
    hit = {"n": 0}
    if threading.current_thread() is not threading.main_thread():
        yield lambda: False
        return
    previous = signal.getsignal(signal.SIGINT)
    signal.signal(signal.SIGINT, lambda *_: hit.__setitem__("n", hit["n"] + 1))
    try:
        yield lambda: hit["n"] > 0
    finally:
        signal.signal(signal.SIGINT, previous)


def write_plan(stage: Path, names: list[str], had_old: dict[str, bool], stale: list[dict]) -> None:
    """Flush every staged file, then write the plan whole (temp + rename) and flush it.

    One ``sync`` flushes the staged files (per-file fsync cost about 4 ms a file here,
    8 s for a 2,000-file drawings run); where there is no ``sync``, each file is flushed."""
    if hasattr(os, "sync"):
        os.sync()
    else:  # pragma: no cover
        for name in names + [MANIFEST]:
            _fsync_path(stage / "new" / name)
    plan = {"written_by": "geomgen", "files": [{"name": n, "had_old": had_old[n]} for n in names],
            "stale": stale}
    tmp = stage / (PLAN + ".tmp")
    with open(tmp, "w") as f:
        json.dump(plan, f, indent=1)
        f.flush()
        os.fsync(f.fileno())
    _step("plan written")
    os.replace(tmp, stage / PLAN)
    _fsync_path(stage, directory=True)
    _step("plan in place")


def _parts(name) -> list[str] | None:
    """The parts of a plain relative POSIX name, or None."""
    if not isinstance(name, str) or not name or "\x00" in name or "\\" in name or name.startswith("/"):
        return None
    parts = name.split("/")
    return parts if all(p not in ("", ".", "..") for p in parts) else None


def inside(root: Path, name: str) -> Path:
    """``root/name``, refusing (ExportError) a name that is not plain or whose way from ``root``
    passes a link or a file: what is done to the result stays inside ``root``."""
    parts = _parts(name)
    if parts is None:
        raise ExportError(f"{root}: {name!r} is not a plain file name inside the folder; refused (nothing was "
                          "written)")
    real = os.path.realpath(root)
    cur = Path(root)
    for k, part in enumerate(parts[:-1]):
        cur = cur / part
        try:
            st = os.lstat(cur)
        except FileNotFoundError:
            break  # the rest does not exist yet: made by make_parents, folder by folder
        except OSError as exc:
            raise ExportError(f"{cur}: {exc.strerror or exc} (nothing was written)") from None
        if stat.S_ISLNK(st.st_mode) or not stat.S_ISDIR(st.st_mode):
            raise ExportError(f"{cur} is a link or not a folder; geomgen does not write, move or remove "
                              "through links (nothing was written)")
        if os.path.realpath(cur) != os.path.join(real, *parts[:k + 1]):
            raise ExportError(f"{cur} does not lie inside {root}; refused (nothing was written)")
    return Path(root) / name


def make_parents(root: Path, name: str) -> Path:
    """:func:`inside`, then make the missing folders on the way (never through a link)."""
    inside(root, name)  # refuses a name through a link before any folder is made
    cur = Path(root)
    for part in name.split("/")[:-1]:
        cur = cur / part
        try:
            os.mkdir(cur)
        except FileExistsError:
            pass
    return inside(root, name)


def new_stage(out_dir: Path, lock) -> Path:
    """Make a staging folder of geomgen's own in ``out_dir``: recorded in the lock's register
    first, then made, then given its token (a kill between leaves nothing recovery would take
    for someone else's)."""
    while True:
        name, token = STAGING_PREFIX + secrets.token_hex(6), secrets.token_hex(16)
        if not os.path.lexists(out_dir / name):
            break
    lock.register(name, token)
    _step("stage registered")
    stage = out_dir / name
    try:
        os.mkdir(stage, 0o700)
    except BaseException:
        lock.unregister(name)
        raise
    try:
        _active.add(os.path.realpath(stage))
        _step("stage made")
        os.close(os.open(stage / (TOKEN + token), os.O_WRONLY | os.O_CREAT | os.O_EXCL
                         | getattr(os, "O_NOFOLLOW", 0), 0o600))
        _step("stage token written")
    except BaseException:  # made by this run a moment ago (mkdir is exclusive): remove it whole
        shutil.rmtree(stage, ignore_errors=True)
        _active.discard(os.path.realpath(stage))
        if not os.path.lexists(stage):
            lock.unregister(name)
        raise
    return stage


def remove_stage(stage: Path, ignore_errors: bool = False) -> None:
    """Remove a staging folder of geomgen's with its token file last: a run killed halfway
    through leaves a folder that still holds its token, so the next run still knows it for
    geomgen's and finishes the removal (``shutil.rmtree`` alone took the token out first now
    and then, and the leftover was left alone as someone else's)."""
    try:
        names = os.listdir(stage)
    except OSError:
        if not ignore_errors:
            raise
        return
    for n in sorted(names, key=lambda n: n.startswith(TOKEN)):  # the token file last
        p = stage / n
        try:
            if stat.S_ISDIR(os.lstat(p).st_mode):
                shutil.rmtree(p)
            else:
                os.unlink(p)
        except OSError:
            if not ignore_errors:
                raise
    try:
        os.rmdir(stage)
    except OSError:
        if not ignore_errors:
            raise


def drop_stage(out_dir: Path, lock, stage: Path) -> None:
    """Remove a staging folder of this run, then its line in the register."""
    if _is_ours(stage, lock.staging().get(stage.name)) or _empty_folder(stage):
        remove_stage(stage, ignore_errors=True)
    _active.discard(os.path.realpath(stage))
    if not os.path.lexists(stage):
        lock.unregister(stage.name)


def _is_ours(stage: Path, token: str | None) -> bool:
    """A real folder (not a link) holding its token file (an empty file named after the
    token: it needs no data block, so a full disk can still make it)."""
    if not token:
        return False
    try:
        if not stat.S_ISDIR(os.lstat(stage).st_mode):
            return False
        held = [n[len(TOKEN):] for n in os.listdir(stage) if n.startswith(TOKEN)]
        return (len(held) == 1 and hmac.compare_digest(held[0], token)
                and stat.S_ISREG(os.lstat(stage / (TOKEN + token)).st_mode))
    except OSError:
        return False


def _empty_folder(stage: Path) -> bool:
    try:
        return stat.S_ISDIR(os.lstat(stage).st_mode) and not os.listdir(stage)
    except OSError:
        return False


def place(stage: Path, out_dir: Path, name: str) -> None:
    """Put ``new/<name>`` at its target, keeping the previous file in ``old/<name>``."""
    new = inside(stage / "new", name)
    target = make_parents(out_dir, name)
    if os.path.lexists(target):
        try:
            os.mkdir(stage / "old")
        except FileExistsError:
            pass
        old = make_parents(stage / "old", name)
        try:
            os.link(target, old, follow_symlinks=False)
        except OSError:  # no hard links here: move it aside (rollback puts it back)
            os.replace(target, old)
            _step(f"moved aside {name}")
        _step(f"kept {name}")
    os.replace(new, target)
    _step(f"placed {name}")


def switch(stage: Path, out_dir: Path) -> None:
    """The one atomic step: the new manifest replaces the previous one."""
    os.replace(stage / "new" / MANIFEST, out_dir / MANIFEST)
    _fsync_path(out_dir, directory=True)
    _step("switched")


def roll_back(stage: Path, out_dir: Path, plan: dict) -> None:
    """Undo the moves of an unfinished commit (before the switch): every previous file back."""
    for f in reversed(plan["files"]):
        name = f["name"]
        target, new, old = inside(out_dir, name), inside(stage / "new", name), inside(stage / "old", name)
        if os.path.lexists(old):
            os.replace(old, target)  # same inode (link not yet used): a no-op
        elif not f["had_old"] and not os.path.lexists(new) and os.path.lexists(target):
            os.remove(target)  # placed, and there was nothing before
        _step(f"restored {name}")


def roll_forward(stage: Path, out_dir: Path, plan: dict) -> list[str]:
    """Finish a commit after the switch: place what is left, remove the stale files.
    Returns the stale files removed (a stale name reached through a link is never removed)."""
    for f in plan["files"]:
        if os.path.lexists(inside(stage / "new", f["name"])):
            place(stage, out_dir, f["name"])
    removed = []
    for e in plan["stale"]:
        try:
            p = inside(out_dir, e["name"])
        except ExportError:
            continue
        if not p.is_symlink() and p.is_file() and file_matches(p, e):
            try:
                os.remove(p)
                removed.append(e["name"])
            except OSError:
                pass
        _step(f"removed stale {e['name']}")
    return removed


def read_plan(stage: Path) -> dict | None:
    try:
        fd = os.open(stage / PLAN, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0))
    except OSError:
        return None
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            return None
        with os.fdopen(fd, "rb", closefd=False) as f:
            plan = json.loads(f.read(64 << 20).decode("utf-8"))
    except (OSError, ValueError):
        return None
    finally:
        os.close(fd)
    ok = (isinstance(plan, dict) and plan.get("written_by") == "geomgen"
          and isinstance(plan.get("files"), list) and isinstance(plan.get("stale"), list)
          and all(isinstance(f, dict) and _parts(f.get("name")) is not None
                  for f in plan["files"] + plan["stale"])
          and all(isinstance(f.get("had_old"), bool) for f in plan["files"]))
    return plan if ok else None


def _size_mb(folder: Path) -> float:
    total = 0
    for root, _dirs, files in os.walk(folder):
        for f in files:
            try:
                total += os.lstat(os.path.join(root, f)).st_size
            except OSError:
                pass
    return total / 1e6


def leftovers(out_dir: Path) -> list[Path]:
    """geomgen's own staging folders left in ``out_dir``: in the register and holding its token."""
    from .lock import registered

    return sorted(Path(out_dir) / n for n, t in registered(out_dir).items() if _is_ours(Path(out_dir) / n, t))


def recover(out_dir: Path, lock) -> list[str]:
    """Finish or undo what interrupted runs left in ``out_dir``; one note per folder.

    Call only while holding the folder lock ``lock`` (then no live run of another process
    owns a staging folder; this process's own open ones are skipped). Acts only on folders in
    the lock's register that hold their token; checks every name of a plan before moving
    anything (refused whole, ExportError, if one passes a link)."""
    notes = []
    for name, token in sorted(lock.staging().items()):
        stage = Path(out_dir) / name
        if os.path.realpath(stage) in _active:
            continue
        if not os.path.lexists(stage):  # killed after recording it, before making it (or after removing it)
            lock.unregister(name)
            continue
        if not _is_ours(stage, token):
            if _empty_folder(stage):  # killed after making it, before its token was written
                os.rmdir(stage)
            else:
                notes.append(f"left {name} alone: geomgen recorded a staging folder of that name but this one "
                             "does not hold its token, so it is not geomgen's")
            lock.unregister(name)
            continue
        plan = read_plan(stage)
        try:
            if plan is None:
                what = (f"removed {stage.name}, left by an interrupted run before it committed "
                        f"({_size_mb(stage):.1f} MB)")
            else:
                for f in plan["files"]:  # every name checked before anything moves
                    inside(out_dir, f["name"]), inside(stage / "new", f["name"]), inside(stage / "old", f["name"])
                if os.path.lexists(stage / "new" / MANIFEST):
                    roll_back(stage, out_dir, plan)
                    what = (f"an earlier run was interrupted while moving its outputs into place; "
                            f"its {len(plan['files'])} file(s) were rolled back and the previous outputs restored")
                else:
                    removed = roll_forward(stage, out_dir, plan)
                    what = (f"an earlier run was interrupted just after its outputs were switched in; its commit "
                            f"was finished ({len(removed)} stale file(s) removed)")
            (stage / PLAN).unlink(missing_ok=True)
            remove_stage(stage)
        except ExportError as exc:
            raise ExportError(f"{stage}: cannot finish what an interrupted run left: {exc}") from None
        except OSError as exc:
            raise ExportError(f"{stage}: cannot recover what an interrupted run left "
                              f"({exc.strerror or exc}); nothing was written") from None
        lock.unregister(name)
        notes.append(what)
    return notes
