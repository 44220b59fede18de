"""Read an untrusted input file: regular files only, never more bytes than a cap.

A FIFO would block ``open`` and a read forever; ``/dev/zero`` reports size 0 and never ends.
So the file is opened non-blocking, refused unless it is a regular file, and read in blocks
up to ``max_bytes`` + 1 (the size the file states is not trusted).
"""

from __future__ import annotations

import os
import stat
import unicodedata

#: Format characters that reorder or hide text (bidirectional overrides and isolates).
_BIDI = set("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069\u200e\u200f")


def control_char(text: str) -> str | None:
    """The first character of ``text`` that must not reach an output (a C0/C1 control,
    DEL, a surrogate, a non-character or a bidirectional override), or None."""
    for c in text:
        if unicodedata.category(c) in ("Cc", "Cs") or c in _BIDI or c in "\ufffe\uffff":
            return c
    return None


def printable(text: str, max_len: int = 200) -> str:
    """``text`` with every such character removed and cut to ``max_len`` characters (labels
    taken from untrusted files: an SVG must stay well-formed XML, a report clean)."""
    out = "".join(c for c in text if control_char(c) is None)
    return out if len(out) <= max_len else out[: max_len - 1] + "…"


class NotReadable(ValueError):
    """The file is not a regular file, is too large, or cannot be read (message says which)."""


def read_capped(path, max_bytes: int) -> bytes:
    """The bytes of regular file ``path``; :class:`NotReadable` if it is not one or is too large.
    FileNotFoundError passes through (callers word it)."""
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0))
    except FileNotFoundError:
        raise
    except IsADirectoryError:
        raise NotReadable("is a directory, not a file") from None
    except OSError as exc:
        raise NotReadable(f"cannot read the file ({exc.strerror or exc})") from None
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            kind = "a directory" if stat.S_ISDIR(mode) else "a pipe" if stat.S_ISFIFO(mode) else \
                "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode) else "not a regular file"
            raise NotReadable(f"is {kind}, not a regular file; geomgen reads regular files only")
        chunks, total = [], 0
        while total <= max_bytes:
            block = os.read(fd, min(1 << 20, max_bytes + 1 - total))
            if not block:
                break
            chunks.append(block)
            total += len(block)
        if total > max_bytes:
            raise NotReadable(f"is larger than {max_bytes / 1e6:g} MB, the most geomgen reads")
        return b"".join(chunks)
    except OSError as exc:
        raise NotReadable(f"cannot read the file ({exc.strerror or exc})") from None
    finally:
        os.close(fd)
