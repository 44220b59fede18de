"""One writer per output folder: a lock file holding the owner's process id, and the names
of the staging folders geomgen made there.

The lock is an advisory ``flock`` on ``.geomgen-lock`` in the output folder. The kernel
releases it when its owner exits however it exits (SIGKILL too), so a dead owner's lock is
simply taken over; the pid on the first line only names the owner in messages. A second run
waits :data:`~geomgen.defaults.LOCK_WAIT_S` for the folder, then refuses naming the other
process. The lock is per process and re-entrant (``geomgen check`` builds, then writes its
record).

The lines after the first are the *staging register*: ``staging <folder> <token>`` for every
staging folder a run made here and has not removed yet (see :mod:`.journal`). A run records
its folder here before making it and drops the line after removing it, so a run killed in
between leaves the line, and the next owner of the lock (which reads the lines before
anything else) knows which folders are geomgen's own. A folder of that name that is not in
the register, or whose token file does not hold the token, is not geomgen's and is never
touched. The lock file stays while the register holds a line; otherwise it is removed when
the lock is let go.
"""

from __future__ import annotations

import os
import re
import socket
import time
from pathlib import Path

from .. import defaults
from ..errors import ExportError

try:
    import fcntl
except ImportError:  # pragma: no cover  (not POSIX: no folder lock and no register, said once)
    fcntl = None  # type: ignore[assignment]  # the stubs know only POSIX

LOCK = ".geomgen-lock"

#: the largest lock file read (a register of a few hundred folders; the rest is not geomgen's)
_MAX_LOCK_BYTES = 1 << 16
_LINE = re.compile(r"^staging (\.geomgen-staging-[0-9a-f]{12}) ([0-9a-f]{32})$")


class _Hold:
    def __init__(self, fd: int, header: str, staging: dict[str, str]):
        self.fd, self.depth, self.header, self.staging = fd, 1, header, staging

    def text(self) -> str:
        return self.header + "".join(f"staging {n} {t}\n" for n, t in self.staging.items())


_held: dict[Path, _Hold] = {}  # folder -> what this process holds


def _owner_of(text: str) -> str:
    words = text.split("\n", 1)[0].split()
    if not words:
        return "another process"
    host = f" on {words[1]}" if len(words) > 1 and words[1] != socket.gethostname() else ""
    return f"process {words[0]}{host}"


def _parse(text: str) -> dict[str, str]:
    """The staging register of a lock file's text (lines not in its form are ignored)."""
    out = {}
    for line in text.split("\n")[1:]:
        m = _LINE.match(line)
        if m:
            out[m.group(1)] = m.group(2)
    return out


def registered(out_dir) -> dict[str, str]:
    """The staging register of ``out_dir`` as its lock file holds it now (read without the lock)."""
    try:
        fd = os.open(Path(out_dir) / LOCK, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | os.O_CLOEXEC)
    except OSError:
        return {}
    try:
        return _parse(os.pread(fd, _MAX_LOCK_BYTES, 0).decode("utf-8", "replace"))
    finally:
        os.close(fd)


class FolderLock:
    """Context manager: hold the write lock of ``out_dir`` (which must exist).

    ``took_over`` names a previous owner that died holding the lock file (else None).
    """

    def __init__(self, out_dir, wait_s: float | None = None):
        self.out_dir = Path(out_dir)
        self.wait_s = defaults.LOCK_WAIT_S if wait_s is None else wait_s
        self.took_over: str | None = None
        self._key = Path(os.path.realpath(self.out_dir))

    def __enter__(self):
        if fcntl is None:  # pragma: no cover
            return self
        if self._key in _held:
            _held[self._key].depth += 1
            return self
        path = self.out_dir / LOCK
        deadline = time.monotonic() + self.wait_s
        while True:
            try:
                fd = os.open(path, os.O_RDWR | os.O_CREAT | getattr(os, "O_NOFOLLOW", 0) | os.O_CLOEXEC, 0o644)
            except OSError as exc:
                raise ExportError(f"{path}: cannot take the folder's write lock: {exc.strerror or exc} "
                                  "(nothing was written)") from None
            try:
                fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            except BlockingIOError:
                owner = _owner_of(os.pread(fd, 200, 0).decode("utf-8", "replace"))
                os.close(fd)
                if time.monotonic() >= deadline:
                    raise ExportError(f"{self.out_dir} is being written by another geomgen run ({owner}, "
                                      f"lock file {LOCK}); waited {self.wait_s:g} s. Run again when it has "
                                      "finished, or choose another output folder (nothing was written)") from None
                time.sleep(0.1)
                continue
            # the owner before us may have removed the file after we opened it: lock the live one
            try:
                same = os.path.samestat(os.fstat(fd), os.stat(path, follow_symlinks=False))
            except OSError:
                same = False
            if not same:
                os.close(fd)
                continue
            text = os.pread(fd, _MAX_LOCK_BYTES, 0).decode("utf-8", "replace")
            before = text.split("\n", 1)[0].split()
            if before and before[0] != str(os.getpid()):
                self.took_over = _owner_of(text)
            hold = _Hold(fd, f"{os.getpid()} {socket.gethostname()} {time.time():.0f}\n", _parse(text))
            _held[self._key] = hold
            try:
                _write(hold)
            except OSError:  # a full disk: the pid only names the owner in messages; the flock is the lock
                pass
            return self

    def __exit__(self, *exc):
        if fcntl is None or self._key not in _held:  # pragma: no cover
            return False
        hold = _held[self._key]
        hold.depth -= 1
        if hold.depth == 0:
            del _held[self._key]
            if not hold.staging:
                try:
                    os.remove(self.out_dir / LOCK)  # before unlocking: a waiter re-checks the inode
                except OSError:
                    pass
            os.close(hold.fd)
        return False

    def note(self) -> list[str]:
        return ([f"took over the folder's write lock from {self.took_over}, which is no longer running"]
                if self.took_over else [])

    # -- the staging register (only while held) ---------------------------------------------
    def staging(self) -> dict[str, str]:
        """Staging folder name -> token of every folder in the register."""
        hold = _held.get(self._key)
        return dict(hold.staging) if hold else {}

    def register(self, name: str, token: str) -> None:
        """Record a staging folder before it is made (flushed to disk).

        Where the lock file cannot grow (a full disk) the line is kept by this run only: it
        still removes its folder on any error or Ctrl-C, but a folder left by a kill then is
        never taken for geomgen's (left alone rather than trusted)."""
        hold = _held.get(self._key)
        if hold is None:  # pragma: no cover  (no flock here: nothing to record in)
            return
        if not _LINE.match(f"staging {name} {token}"):
            raise ValueError(f"not a staging folder name and token: {name!r}")
        hold.staging[name] = token
        try:
            _write(hold)
            os.fsync(hold.fd)
        except OSError:
            pass

    def unregister(self, name: str) -> None:
        """Drop a staging folder from the register once it is gone."""
        hold = _held.get(self._key)
        if hold is not None and hold.staging.pop(name, None) is not None:
            try:
                _write(hold)
            except OSError:  # the line stays; the next run finds no folder and drops it
                pass


def _write(hold: _Hold) -> None:
    """Rewrite the lock file in place: write first, then cut the rest (a kill between the two
    leaves a piece of the previous register after the new one; only whole lines count, and
    those only name folders that were geomgen's)."""
    data = hold.text().encode()
    os.pwrite(hold.fd, data, 0)
    os.ftruncate(hold.fd, len(data))
