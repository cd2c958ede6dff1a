"""Writing files so that a failed write never loses the previous file: one routine for every save.

Plans, printed documents, exported profiles and pictures are all written through
:func:`atomic_write`: to a temporary file beside the target, flushed to disk, then renamed over it
(an atomic replace on POSIX and Windows), and the folder flushed too. What the target is is kept: a
symbolic link is written through to the file it names, an existing file keeps its permission bits,
and a read-only file or a folder is refused rather than replaced. A new file gets the permissions a
plain ``open(path, "w")`` gives it (0o666 less the umask, or what the folder's default ACL says): the
temporary is created with mode 0o666 and the system applies the umask as it does to any new file, so
the umask is never read by setting it (``os.umask`` changes it for every thread while it is asked). A file with other hard links is replaced under this name only (atomicity is kept over the links).

A save killed part-way leaves the old file or the new one, and as little else as the system allows: where
Linux offers unnamed temporary files (``O_TMPFILE``), text is written into one, which vanishes with the
process, and is given its name only for the instant before the rename. A named temporary carries the
writer's process number (``.NAME.<pid>.<random>.tmp…``), so the next save or open of that file removes
the leftovers of writers that are gone (and any older than :data:`STALE_AFTER`).
"""

from __future__ import annotations

import os
import secrets
import stat
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


def _temporary_name(target: Path) -> Path:
    """A fresh hidden name beside ``target`` that says whose it is: ``.NAME.<pid>.<random>.tmp<suffix>``."""
    return target.with_name(f".{target.name}.{os.getpid()}.{secrets.token_hex(4)}.tmp{target.suffix}")


def _writer_gone(pid: str) -> bool:
    """Whether the process that named a temporary file has ended (POSIX: signal 0 asks without touching it;
    elsewhere unknown, so only the age of the file counts — on Windows ``os.kill`` would end the process)."""
    if os.name != "posix":
        return False
    try:
        os.kill(int(pid), 0)
    except (ValueError, OverflowError):
        return True
    except ProcessLookupError:
        return True
    except OSError:  # alive, but another user's (PermissionError), or not to be asked on this system
        return False
    return False


def remove_stale_temporaries(path: str | os.PathLike) -> None:
    """Remove what killed saves of ``path`` left beside it: temporaries whose writing process is gone, and any
    older than :data:`STALE_AFTER` (a save running now in another process is younger and is left alone)."""
    path = Path(path)
    now = time.time()
    prefix = f".{path.name}."
    try:
        for leftover in path.parent.glob(f"{glob_escape(prefix)}*.tmp*"):
            pid = leftover.name[len(prefix):].split(".", 1)[0]
            if now - leftover.stat().st_mtime >= STALE_AFTER or (pid != str(os.getpid()) and _writer_gone(pid)):
                leftover.unlink()
    except OSError:
        pass  # tidying up must never stop a save or an open


def glob_escape(text: str) -> str:
    """``text`` with the characters glob gives a meaning ([, *, ?) taken literally."""
    return "".join(f"[{c}]" if c in "[*?" else c for c in text)


def _target(path: Path) -> Path:
    """The file a save really writes: the end of a chain of links, refused if it is a folder or read-only."""
    target = Path(os.path.realpath(path))
    if target.is_dir():
        raise FileWriteError(path, "it is a folder")
    if not target.parent.is_dir():
        raise FileWriteError(path, f"there is no folder {target.parent}")
    if target.exists() and (not os.access(target, os.W_OK) or not target.stat().st_mode & 0o222):
        raise FileWriteError(path, "the file is read-only")  # refused even where the user could override it
    return target


def writable(path: str | os.PathLike) -> Path:
    """The file a save of ``path`` would write (the end of its links), or :class:`FileWriteError` saying why it
    cannot be written: a folder, no such folder, a read-only file, a name too long. Lets a command refuse an
    output before it does the work."""
    try:
        return _target(Path(path))
    except FileWriteError:
        raise
    except OSError as error:  # a name too long, a folder we may not look into, …
        raise FileWriteError(path, error.strerror or str(error)) from None


#: the mode a new file is created with before the umask (what ``open(path, "w")`` asks for)
NEW_FILE_MODE = 0o666
#: the mode of a temporary while it is written over an existing file, whose own mode it gets at the end
PRIVATE_MODE = 0o600


def _write_unnamed(folder: Path, temporary: Path, data: bytes, mode: int | None) -> None:
    """Write ``data`` to ``temporary`` so that it exists under that name only once it is whole and on disk: into
    an unnamed file of ``folder`` where the system has them (gone with the process if it is killed), named at
    the end; elsewhere into the named file directly. ``mode`` is the existing file's, set before the file is
    named; None for a new file, which keeps the mode the system gave it (0o666 less the umask)."""
    asked = NEW_FILE_MODE if mode is None else PRIVATE_MODE
    handle, anonymous = None, hasattr(os, "O_TMPFILE") and os.path.isdir("/proc/self/fd")
    if anonymous:
        try:
            handle = os.open(folder, os.O_TMPFILE | os.O_WRONLY, asked)  # the umask applies as with O_CREAT
        except OSError:  # a file system without them: a named file
            anonymous = False
    if not anonymous:
        handle = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL, asked)
    try:
        view = memoryview(data)
        while view:
            view = view[os.write(handle, view):]
        os.fsync(handle)
        if mode is not None:
            os.fchmod(handle, mode) if hasattr(os, "fchmod") else os.chmod(temporary, mode)
        if anonymous:  # linkat(…, AT_SYMLINK_FOLLOW) through /proc, as open(2) describes for O_TMPFILE
            descriptors = os.open("/proc/self/fd", os.O_RDONLY)
            try:
                os.link(str(handle), temporary, src_dir_fd=descriptors, follow_symlinks=True)
            finally:
                os.close(descriptors)
    finally:
        os.close(handle)


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
    target = writable(path)
    try:
        mode = stat.S_IMODE(target.stat().st_mode) if target.exists() else None
    except OSError as error:
        raise FileWriteError(path, error.strerror or str(error)) from None
    remove_stale_temporaries(target)
    temporary = _temporary_name(target)
    try:
        if callable(content):  # the writer wants a file name (and may judge the format by its extension)
            handle = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL,
                             NEW_FILE_MODE if mode is None else PRIVATE_MODE)
            try:
                if mode is None:  # the mode the system gives a new file here; the writer may need to reopen it
                    mode = stat.S_IMODE(os.fstat(handle).st_mode)
                    if mode & PRIVATE_MODE != PRIVATE_MODE:
                        os.chmod(temporary, mode | PRIVATE_MODE)
            finally:
                os.close(handle)
            content(str(temporary))
            with open(temporary, "rb+") as stream:
                os.fsync(stream.fileno())
            os.chmod(temporary, mode)
        else:
            data = content.encode(encoding) if isinstance(content, str) else content
            _write_unnamed(target.parent, temporary, data, mode)
        os.replace(temporary, target)
    except BaseException as error:
        if os.path.lexists(temporary):
            os.unlink(temporary)
        if isinstance(error, (KeyboardInterrupt, SystemExit, CasedepthError)):
            raise
        if isinstance(error, Exception):  # a full disk shows as OSError, or as an error of the writer (zlib)
            reason = getattr(error, "strerror", None) or f"{type(error).__name__}: {error}"
            raise FileWriteError(path, reason.strip().splitlines()[0] if reason.strip() else type(error).__name__) from None
        raise
    _sync_folder(target.parent)
    return path


def resource_path(*parts: str) -> Path:
    """A file shipped in ``casedepth.resources`` (the repository's ``resources/``: the steel library, the example
    plans, the icon), from an installed package or from a source tree that was not installed."""
    try:
        from importlib.resources import files

        return Path(str(files("casedepth.resources").joinpath(*parts)))
    except ModuleNotFoundError:  # running from a source tree that was not installed
        return Path(__file__).resolve().parents[1].joinpath("resources", *parts)
