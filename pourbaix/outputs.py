"""Atomic file writing: an output file is either complete or absent."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from pourbaix.errors import ExportError

__all__ = ["atomic_write_text", "atomic_write_with", "check_writable"]


def check_writable(path):
    """Raise ExportError if ``path`` cannot be created (missing folder, not writable).

    Parameters
    ----------
    path : str or Path
        Intended output file.
    """
    p = Path(path)
    folder = p.parent if str(p.parent) else Path(".")
    if not folder.is_dir():
        raise ExportError(f"cannot write {p}: folder {folder} does not exist")
    if not os.access(folder, os.W_OK):
        raise ExportError(f"cannot write {p}: folder {folder} is not writable")
    if p.is_dir():
        raise ExportError(f"cannot write {p}: it is a folder")


def atomic_write_with(path, writer):
    """Call ``writer(tmp_path)`` then move the finished file into place.

    Parameters
    ----------
    path : str or Path
        Destination.
    writer : callable
        Writes the complete file to the temporary path it is given (same folder
        and suffix as ``path``, so format detection by extension still works).

    Raises
    ------
    ExportError
        If the folder is missing or unwritable, or the writer fails; no partial
        file is left behind.
    """
    p = Path(path)
    check_writable(p)
    fd, tmp = tempfile.mkstemp(
        prefix=f".{p.stem}.", suffix=p.suffix, dir=p.parent if str(p.parent) else "."
    )
    os.close(fd)
    try:
        writer(tmp)
        # mkstemp creates 0600; give the file the permissions a plain open() would (umask)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, p)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise ExportError(f"cannot write {p}: {exc.strerror or exc}") from exc
        raise


def atomic_write_text(path, text, encoding="utf-8"):
    """Write text atomically.

    Parameters
    ----------
    path : str or Path
        Destination.
    text : str
        Complete contents.
    encoding : str
        Text encoding.
    """

    def _w(tmp):
        with open(tmp, "w", encoding=encoding, newline="") as fh:
            fh.write(text)

    atomic_write_with(path, _w)
