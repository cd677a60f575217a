"""Domain exceptions. The command line turns each into one line and exit code 2."""

from __future__ import annotations

from contextlib import contextmanager


class AerialError(Exception):
    """Base class for every error aerial reports to a user without a traceback."""


class SiteError(AerialError):
    """A site file that cannot be used as written.

    Parameters
    ----------
    file : str
        Path of the site file (or ``"<built-in example>"``).
    key : str
        Dotted key path inside the file, e.g. ``"spans[2].sag"``.
    value : object
        The offending value as the user wrote it.
    expected : str
        What would be accepted, in plain words.
    line : int, optional
        Line number in the file when it is known.
    """

    def __init__(self, file, key, value, expected, line=None):
        self.file = str(file)
        self.key = key
        self.value = value
        self.expected = expected
        self.line = line
        super().__init__(self.message)

    @property
    def message(self) -> str:
        where = self.file if self.line is None else f"{self.file}:{self.line}"
        if self.key:
            return f"{where}: {self.key} = {_show(self.value)}: {self.expected}"
        if self.value is None or self.value == "":
            return f"{where}: {self.expected}"
        return f"{where}: {_show(self.value)}: {self.expected}"


class SafetyRefusal(AerialError):
    """A layout aerial will not analyse because it breaks a safety rule (e.g. power-line clearance)."""


class ResourceLimit(AerialError):
    """A computation that would exceed the stated memory or time budget."""


class ModelInputError(AerialError, ValueError):
    """An argument to a physics function that lies outside what the function accepts."""


@contextmanager
def naming_the_file(site):
    """Put the site file's name before a model's complaint about the site's wires (every message names it).

    Used where a site is computed (:func:`aerial.estimate.assemble.analyse`,
    :func:`aerial.planner.search.plan_layouts`, the check's geometry), so that a
    notebook and the command line read the same message.

    Parameters
    ----------
    site : Site or str
        The site (its ``path``), or the file's name as shown.

    Examples
    --------
    >>> try:
    ...     with naming_the_file("flat.toml"):
    ...         raise ModelInputError("two wire pieces lie on top of each other")
    ... except ModelInputError as err:
    ...     print(err)
    flat.toml: two wire pieces lie on top of each other
    """
    path = getattr(site, "path", site)
    try:
        yield
    except ModelInputError as err:
        text = str(err)
        if text.startswith(f"{path}:"):
            raise
        raise ModelInputError(f"{path}: {text}") from None


def os_error_words(err: OSError) -> str:
    """Plain words for an operating-system fault on a path (a full disk, a read-only folder, a name too long).

    >>> import errno
    >>> os_error_words(OSError(errno.ENOSPC, "No space left on device"))
    'no space left on the device'
    """
    import errno

    return {
        errno.ENOENT: "no such file or folder",
        errno.ENAMETOOLONG: "the name is too long for the file system",
        errno.EACCES: "permission denied",
        errno.EPERM: "permission denied",
        errno.EROFS: "the folder is on a read-only file system",
        errno.ENOSPC: "no space left on the device",
        errno.ENOTDIR: "a part of the path is a file, not a folder",
        errno.EISDIR: "is a folder",
        errno.ELOOP: "the path is a loop of symbolic links",
        errno.EDQUOT: "the disk quota is used up",
        errno.EFBIG: "the file would be too large for the file system",
    }.get(err.errno, (err.strerror or str(err)).lower())


def _show(value) -> str:
    if isinstance(value, bool):  # as the site file spells it
        return "true" if value else "false"
    if isinstance(value, str):
        text = value if len(value) <= 60 else value[:57] + "..."
        text = "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)
        return f'"{text}"'
    text = _toml_text(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _toml_text(value, depth: int = 0) -> str:
    """A value as a site file would write it (TOML), not as Python shows it; deep nesting and
    long tables are cut short (the message shows 60 characters at most).

    >>> _toml_text({"length": "8 ft", "at": [0, -1.5], "bonded": True})
    '{length = "8 ft", at = [0, -1.5], bonded = true}'
    """
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return '"' + "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in value[:80]) + '"'
    if isinstance(value, (dict, list, tuple)):
        if depth >= 4:
            return "..."
        pairs = value.items() if isinstance(value, dict) else ((None, v) for v in value)
        parts, width = [], 0
        for key, item in pairs:
            if width > 60:
                parts.append("...")
                break
            parts.append(_toml_text(item, depth + 1) if key is None else f"{key} = {_toml_text(item, depth + 1)}")
            width += len(parts[-1]) + 2
        inside = ", ".join(parts)
        return "{" + inside + "}" if isinstance(value, dict) else "[" + inside + "]"
    return repr(value)
