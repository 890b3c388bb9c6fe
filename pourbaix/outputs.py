"""Atomic file writing: an output file is either complete or absent."""

from __future__ import annotations

import contextlib
import contextvars
import os
import sys
import tempfile
import uuid
from pathlib import Path

from pourbaix.errors import ExportError

__all__ = [
    "atomic_write_text",
    "atomic_write_with",
    "all_or_nothing",
    "announce_written",
    "check_writable",
    "check_outputs",
    "discarded_outputs",
]

# Files written inside all_or_nothing(): (finished temporary file, destination), moved
# into place together when the block ends without an error.
_STAGED = contextvars.ContextVar("pourbaix_staged_outputs", default=None)
_TEMP_PREFIX = ".pourbaix-"
# "wrote FILE" lines of the block in progress: (path, to_stderr), printed after the files
# are in place, so that no line announces a file a failing command then discards.
_ANNOUNCED = contextvars.ContextVar("pourbaix_announced_outputs", default=None)
# Destinations whose finished files the last failing all_or_nothing() block discarded.
_LAST_DISCARDED = []


def discarded_outputs():
    """Files the last failing :func:`all_or_nothing` block had finished and then discarded.

    Returns
    -------
    list of str
        Their destinations (none of them was written or replaced).
    """
    return list(_LAST_DISCARDED)


def _name_max(folder):
    try:
        return os.pathconf(folder, "PC_NAME_MAX")
    except (OSError, ValueError, AttributeError):
        return 255  # the usual limit (POSIX file systems, NTFS)


def _shown(p):
    text = str(p)
    return text if len(text) <= 120 else f"{text[:60]}...{text[-40:]} ({len(text)} characters)"


def check_writable(path):
    """Raise ExportError if ``path`` cannot be created (missing folder, not writable, bad name).

    Parameters
    ----------
    path : str or Path
        Intended output file.

    Raises
    ------
    ExportError
        The folder is missing or not writable, the path is a folder, the name
        is empty, holds a NUL character or is longer than the file system
        allows; the message names the path (shortened when very long).
    """
    try:
        if "\x00" in str(path):
            raise ExportError(
                f"cannot write {_shown(repr(str(path)))}: the name holds a NUL (null) character"
            )
        p = Path(path)
        if not p.name or str(path).endswith(("/", os.sep)):
            raise ExportError(f"cannot write {_shown(path)}: no file name")
        folder = p.parent if str(p.parent) else Path(".")
        if not folder.is_dir():
            raise ExportError(f"cannot write {_shown(p)}: folder {_shown(folder)} does not exist")
        if not os.access(folder, os.W_OK):
            raise ExportError(f"cannot write {_shown(p)}: folder {_shown(folder)} is not writable")
        limit = _name_max(folder)
        if len(os.fsencode(p.name)) > limit:
            raise ExportError(
                f"cannot write {_shown(p)}: the file name is {len(os.fsencode(p.name))} bytes long, "
                f"more than the {limit} the file system allows"
            )
        if p.is_dir():
            raise ExportError(f"cannot write {_shown(p)}: it is a folder")
    except ExportError:
        raise
    except (OSError, ValueError, UnicodeError) as exc:  # NUL bytes, undecodable names, ...
        detail = getattr(exc, "strerror", None) or str(exc)
        raise ExportError(f"cannot write {_shown(path)}: {detail}") from None


def check_outputs(paths):
    """Check every output path of a command before any work is done.

    Parameters
    ----------
    paths : iterable of str or Path
        The files the command will write.

    Raises
    ------
    ExportError
        For the first path that cannot be written.
    """
    for p in paths:
        check_writable(p)


@contextlib.contextmanager
def all_or_nothing():
    """Write every file of a block, or none: files appear only when the whole block succeeded.

    Inside the block, :func:`atomic_write_with` and :func:`atomic_write_text`
    finish each file under a temporary name beside its destination; when the
    block ends without an error all of them are moved into place, and when it
    raises they are removed, so an existing file is never replaced by a
    failing command. Nested blocks join the outermost one.

    Raises
    ------
    ExportError
        If a finished file cannot be moved into place.
    """
    if _STAGED.get() is not None:
        yield
        return
    staged = []
    announced = []
    token = _STAGED.set(staged)
    said = _ANNOUNCED.set(announced)
    _LAST_DISCARDED[:] = []
    try:
        yield
    except BaseException:
        _STAGED.reset(token)
        _ANNOUNCED.reset(said)
        _LAST_DISCARDED[:] = [str(target) for _, target in staged]
        _discard(staged)
        raise
    _STAGED.reset(token)
    _ANNOUNCED.reset(said)
    _commit(staged)
    for path, to_stderr in announced:
        _announce_now(path, to_stderr=to_stderr)


def _announce_now(path, *, to_stderr=False):
    print(f"wrote {path}", file=sys.stderr if to_stderr else sys.stdout)


def announce_written(path, *, to_stderr=False, detail=""):
    """Say ``wrote PATH`` once the file is really in place.

    Inside :func:`all_or_nothing` the line is held back until every file of
    the block has been moved into place (and dropped when the block fails);
    outside, it is printed at once.

    Parameters
    ----------
    path : str or Path
        The file written.
    to_stderr : bool
        Print on standard error (e.g. when standard output carries JSON).
    detail : str
        Said after the path (e.g. ``": 90 maps"``).
    """
    pending = _ANNOUNCED.get()
    if pending is None:
        _announce_now(f"{path}{detail}", to_stderr=to_stderr)
    else:
        pending.append((f"{path}{detail}", to_stderr))


def _commit(staged):
    """Move finished files into place; if one move fails, put back what was there before."""
    backups = {}
    done = []
    try:
        for tmp, target in staged:
            if target not in backups:
                backups[target] = _backup(target)
            os.replace(tmp, target)
            done.append(target)
    except OSError as exc:
        _discard([(tmp, target) for tmp, target in staged if target not in done])
        for target in reversed(done):
            try:
                if backups.get(target):
                    os.replace(backups.pop(target), target)
                else:
                    os.unlink(target)
            except OSError:
                pass
        _discard([(b, None) for b in backups.values() if b])
        raise ExportError(
            f"cannot write {_shown(exc.filename or target)}: {exc.strerror or exc}"
        ) from None
    _discard([(b, None) for b in backups.values() if b])


def _backup(target):
    """A hard link to an existing file (so it can be put back), or None."""
    if not os.path.lexists(target):
        return None
    folder = os.path.dirname(os.fspath(target)) or "."
    name = os.path.join(folder, f"{_TEMP_PREFIX}{uuid.uuid4().hex[:12]}.bak")
    try:
        os.link(target, name)
    except OSError:
        return None  # no hard links here: the old file cannot be put back, but is replaced whole
    return name


def _discard(staged):
    for tmp, _ in staged:
        try:
            os.unlink(tmp)
        except OSError:
            pass


def atomic_write_with(path, writer):
    """Call ``writer(tmp_path)`` then move the finished file into place.

    Parameters
    ----------
    path : str or Path
        Destination.
    writer : callable
        Writes the complete file to the temporary path it is given (same folder
        and, for short suffixes, the same suffix as ``path``).

    Raises
    ------
    ExportError
        If the folder is missing or unwritable, or the writer fails; no partial
        file is left behind. Inside :func:`all_or_nothing` the file is moved
        into place only when the whole block succeeds.
    """
    p = Path(path)
    check_writable(p)
    suffix = p.suffix if len(p.suffix) <= 16 else ""
    try:
        fd, tmp = tempfile.mkstemp(
            prefix=_TEMP_PREFIX, suffix=suffix, dir=p.parent if str(p.parent) else "."
        )
    except OSError as exc:
        raise ExportError(f"cannot write {_shown(p)}: {exc.strerror or exc}") from None
    os.close(fd)
    try:
        writer(tmp)
        # mkstemp creates 0600; give the file the permissions a plain open() would (umask)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        staged = _STAGED.get()
        if staged is None:
            os.replace(tmp, p)
        else:
            staged.append((tmp, p))
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError) and not isinstance(exc, ExportError):
            raise ExportError(f"cannot write {_shown(p)}: {exc.strerror or exc}") from exc
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
