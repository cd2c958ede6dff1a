"""Writing files so that a failed write never loses the previous file: one routine for every save.

Plans, printed documents, exported profiles and pictures are all written through
:func:`atomic_write`: to a temporary file beside the target, flushed to disk, then renamed over
it (an atomic replace on POSIX and Windows). An existing file keeps its permission bits; a new
one gets the usual permissions the user's umask allows, not the private ones of a temporary file.
"""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path
from typing import Callable


def _new_file_mode() -> int:
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def atomic_write(path: str | os.PathLike, content: str | bytes | Callable[[str], None],
                 encoding: str = "utf-8") -> Path:
    """Write ``content`` to ``path`` atomically; returns the path.

    ``content`` is text, bytes, or a function that writes the file whose name it is given (for
    writers that want a file name, such as matplotlib's ``savefig``). Raises ``OSError`` as the
    system does; the previous file, if any, is then untouched and no temporary file is left.
    """
    path = Path(path)
    mode = stat.S_IMODE(path.stat().st_mode) if path.exists() else _new_file_mode()
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp" + path.suffix, dir=path.parent)
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
        os.replace(temporary, path)
    except BaseException:
        if os.path.exists(temporary):
            os.unlink(temporary)
        raise
    return path
