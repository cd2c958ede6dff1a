"""Writing files so that a failed write never loses the previous file: one routine for every save.

Plans, printed documents, exported profiles and pictures are all written through
:func:`atomic_write`: to a temporary file beside the target, flushed to disk, then renamed over it
(an atomic replace on POSIX and Windows), and the folder flushed too. What the target is is kept: a
symbolic link is written through to the file it names, an existing file keeps its permission bits
(a new one gets what the user's umask allows), and a read-only file or a folder is refused rather
than replaced. A temporary file a killed save left behind is removed by the next save of that file.
A file with other hard links is replaced under this name only (atomicity is kept over the links).
"""

from __future__ import annotations

import os
import stat
import tempfile
import time
from pathlib import Path
from typing import Callable

from .errors import CasedepthError

#: a temporary file of this age or older beside its target is what a killed save left (a running one is younger)
STALE_AFTER = 60.0  # s


class FileWriteError(CasedepthError, OSError):
    """A file that cannot be written: the path and the reason, in words."""

    def __init__(self, path: str | os.PathLike, reason: str):
        super().__init__(f"cannot write {path}: {reason}")
        self.path, self.reason = Path(path), reason


def _new_file_mode() -> int:
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _temporary_prefix(path: Path) -> str:
    return f".{path.name}."


def remove_stale_temporaries(path: str | os.PathLike) -> None:
    """Remove what killed saves of ``path`` left beside it (temporary files older than :data:`STALE_AFTER`)."""
    path = Path(path)
    now = time.time()
    try:
        for leftover in path.parent.glob(f"{_temporary_prefix(path)}*.tmp*"):
            if now - leftover.stat().st_mtime >= STALE_AFTER:
                leftover.unlink()
    except OSError:
        pass  # tidying up must never stop a save


def _target(path: Path) -> Path:
    """The file a save really writes: the end of a chain of links, refused if it is a folder or read-only."""
    target = Path(os.path.realpath(path))
    if target.is_dir():
        raise FileWriteError(path, "it is a folder")
    if not target.parent.is_dir():
        raise FileWriteError(path, f"there is no folder {target.parent}")
    if target.exists() and not os.access(target, os.W_OK):
        raise FileWriteError(path, "the file is read-only")
    return target


def _sync_folder(folder: Path) -> None:
    try:
        handle = os.open(folder, os.O_RDONLY)
    except OSError:
        return  # not possible on every system (Windows): the rename is durable enough there
    try:
        os.fsync(handle)
    except OSError:
        pass
    finally:
        os.close(handle)


def atomic_write(path: str | os.PathLike, content: str | bytes | Callable[[str], None],
                 encoding: str = "utf-8") -> Path:
    """Write ``content`` to ``path`` atomically; returns the path.

    ``content`` is text, bytes, or a function that writes the file whose name it is given (for writers that
    want a file name, such as matplotlib's ``savefig``). Raises :class:`FileWriteError` naming the path and
    the reason; the previous file, if any, is then untouched and no temporary file is left.
    """
    path = Path(path)
    target = _target(path)
    remove_stale_temporaries(target)
    mode = stat.S_IMODE(target.stat().st_mode) if target.exists() else _new_file_mode()
    try:
        handle, temporary = tempfile.mkstemp(prefix=_temporary_prefix(target), suffix=".tmp" + target.suffix,
                                             dir=target.parent)
    except OSError as error:
        raise FileWriteError(path, error.strerror or str(error)) from None
    try:
        if callable(content):
            os.close(handle)
            content(temporary)
            with open(temporary, "rb+") as stream:
                os.fsync(stream.fileno())
        else:
            data = content.encode(encoding) if isinstance(content, str) else content
            with os.fdopen(handle, "wb") as stream:
                stream.write(data)
                stream.flush()
                os.fsync(stream.fileno())
        os.chmod(temporary, mode)
        os.replace(temporary, target)
    except BaseException as error:
        if os.path.exists(temporary):
            os.unlink(temporary)
        if isinstance(error, (KeyboardInterrupt, SystemExit, CasedepthError)):
            raise
        if isinstance(error, Exception):  # a full disk shows as OSError, or as an error of the writer (zlib)
            raise FileWriteError(path, getattr(error, "strerror", None) or f"{type(error).__name__}: {error}") from None
        raise
    _sync_folder(target.parent)
    return path
