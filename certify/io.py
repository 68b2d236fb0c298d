"""Atomic file output: a file is either absent, the old version, or complete."""

from __future__ import annotations

import json
import os
import tempfile


def compact_json(obj) -> str:
    """``obj`` as one line of JSON (C encoder, no indentation) and a newline.

    Used where a batch writes thousands of large documents (result files,
    certificates); any JSON reader, ``certify verify`` and ``certify render``
    read them as they read the indented ones.
    """
    return json.dumps(obj, separators=(",", ":"), ensure_ascii=False) + "\n"


def write_atomic(path: str, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file and an atomic rename."""
    directory = os.path.dirname(os.path.abspath(path)) or "."
    os.makedirs(directory, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", dir=directory)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        # mkstemp creates the file 0600; give it the permissions a plain open() would
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def read_text_lines(path: str, display: str | None = None) -> list[str]:
    """The lines of a UTF-8 text file; BadInput (one line, naming ``display``) if unreadable."""
    from .errors import BadInput

    name = display or path
    try:
        with open(path, encoding="utf-8") as fh:
            return fh.read().splitlines()
    except OSError as exc:
        raise BadInput(f"{name}: cannot read ({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise BadInput(f"{name}: not a UTF-8 text file") from None
