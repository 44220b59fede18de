"""One writer per output folder: a lock file holding the owner's process id.

The lock is an advisory ``flock`` on ``.geomgen-lock`` in the output folder. The kernel
releases it when its owner exits however it exits (SIGKILL too), so a dead owner's lock is
simply taken over; the pid inside only names the owner in messages. A second run waits
:data:`~geomgen.defaults.LOCK_WAIT_S` for the folder, then refuses naming the other process.
The lock is per process and re-entrant (``geomgen check`` builds, then writes its record).
"""

from __future__ import annotations

import os
import socket
import time
from pathlib import Path

from .. import defaults
from ..errors import ExportError

try:
    import fcntl
except ImportError:  # pragma: no cover  (not POSIX: no folder lock, said once)
    fcntl = None  # type: ignore[assignment]  # the stubs know only POSIX

LOCK = ".geomgen-lock"

_held: dict[Path, list] = {}  # folder -> [fd, depth]


def _owner_of(text: str) -> str:
    words = text.split()
    if not words:
        return "another process"
    host = f" on {words[1]}" if len(words) > 1 and words[1] != socket.gethostname() else ""
    return f"process {words[0]}{host}"


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
            _held[self._key][1] += 1
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
            before = os.pread(fd, 200, 0).decode("utf-8", "replace").split()
            if before and before[0] != str(os.getpid()):
                self.took_over = _owner_of(" ".join(before))
            try:
                os.ftruncate(fd, 0)
                os.pwrite(fd, f"{os.getpid()} {socket.gethostname()} {time.time():.0f}\n".encode(), 0)
            except OSError:  # a full disk: the pid only names the owner in messages; the flock is the lock
                pass
            _held[self._key] = [fd, 1]
            return self

    def __exit__(self, *exc):
        if fcntl is None or self._key not in _held:  # pragma: no cover
            return False
        _held[self._key][1] -= 1
        if _held[self._key][1] == 0:
            fd = _held.pop(self._key)[0]
            try:
                os.remove(self.out_dir / LOCK)  # before unlocking: a waiter re-checks the inode
            except OSError:
                pass
            os.close(fd)
        return False

    def note(self) -> list[str]:
        return ([f"took over the folder's write lock from {self.took_over}, which is no longer running"]
                if self.took_over else [])
