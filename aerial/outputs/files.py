"""Safe writes: a temporary file in the same folder, then an atomic rename.

An existing file is never replaced unless the caller passes ``force``; a
failure or an interruption leaves no partial file behind.
"""

from __future__ import annotations

import errno
import os
import tempfile
from pathlib import Path

from aerial.core.errors import AerialError, os_error_words


def check_writable(path, force: bool = False, protected=()) -> Path:
    """Raise :class:`AerialError` unless ``path`` may be written."""
    p = Path(path)
    for other in protected:
        try:
            if other and Path(other).exists() and p.exists() and p.resolve() == Path(other).resolve():
                raise AerialError(f"{path}: refusing to write over an input file")
        except OSError:
            pass
    if p.exists() and p.is_dir():
        raise AerialError(f"{path}: is a folder; expected a file name to write")
    if p.exists() and not force:
        raise AerialError(f"{path}: already exists; choose another name or add --force to replace it")
    parent = p.parent if str(p.parent) else Path(".")
    try:
        os.stat(parent)
    except OSError as err:
        if err.errno == errno.ENOENT:
            raise AerialError(f"{path}: the folder {parent} does not exist") from None
        raise AerialError(f"{path}: {os_error_words(err)}") from None
    if not parent.is_dir():
        raise AerialError(f"{path}: {parent} is a file, not a folder")
    return p


def write_atomic(path, data: bytes | str, force: bool = False, protected=()) -> Path:
    """Write ``data`` to ``path`` through a temporary file and a rename.

    The data is flushed to disk before the rename, so ``path`` holds either
    its old content or all of the new, never part. Without ``force`` the last
    step is a hard link, which fails if a file of that name appeared
    meanwhile, so nothing is ever replaced.
    """
    p = check_writable(path, force, protected)
    if isinstance(data, str):
        data = data.encode("utf-8")
    try:
        return _write_through_temporary(p, data, force)
    except OSError as err:  # a read-only folder, a full disk, a name too long: nothing is left behind
        raise AerialError(f"{path}: cannot write ({os_error_words(err)})") from None


def _write_through_temporary(p: Path, data: bytes, force: bool) -> Path:
    path = p
    fd, tmp = tempfile.mkstemp(prefix=f".{p.name[:32]}.", suffix=".part", dir=p.parent if str(p.parent) else ".")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes 0600; give the file the usual permissions
        if force:
            os.replace(tmp, p)
        else:
            try:
                os.link(tmp, p)  # fails if the name exists: never replaces a file that appeared meanwhile
            except FileExistsError:
                raise AerialError(f"{path}: already exists; choose another name or add --force to replace it") from None
            except OSError:  # a file system without hard links
                if p.exists():
                    raise AerialError(f"{path}: already exists; choose another name or add --force to replace it") from None
                os.replace(tmp, p)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    try:
        os.unlink(tmp)  # the temporary name of a hard-linked file (already gone after a rename)
    except OSError:
        pass
    return p
