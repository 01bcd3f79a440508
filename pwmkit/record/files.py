"""Safe file handling for design records: bounded reads, atomic writes, contained output paths.

Every file pwmkit writes goes through :func:`atomic_write`: the text is written to a temporary
file in the destination folder, flushed and ``fsync``-ed, then moved over the destination with
:func:`os.replace` (atomic on POSIX and Windows). A write that fails midway leaves the old file
untouched and removes the temporary file.

Output names given on the command line go through :func:`contained_path`, so that neither a
user's typo nor a hostile design file can make pwmkit write outside the chosen output folder.
"""

from __future__ import annotations

import os
import re
import stat
import tempfile
from pathlib import Path

from ..errors import DesignError

__all__ = ["MAX_DESIGN_BYTES", "read_limited", "atomic_write", "contained_path", "slug"]

#: Largest design file pwmkit reads [bytes]; a design record is a few kilobytes.
MAX_DESIGN_BYTES = 1 << 20

_CHUNK = 1 << 16


def read_limited(path: str | os.PathLike[str], limit: int = MAX_DESIGN_BYTES, *, what: str = "file") -> bytes:
    """Read a whole file, refusing anything larger than ``limit`` bytes.

    Raises
    ------
    DesignError
        Missing file, a folder, a named pipe, socket or device (refused at once, without waiting
        for a writer), unreadable file, or a file over the limit (the message names the file and
        the limit).
    """
    p = Path(path)
    try:
        # O_NONBLOCK: opening a FIFO (named pipe) or a device must not wait for a writer; the file
        # kind is then checked on the open descriptor, so a swap after the check cannot slip through
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except FileNotFoundError:
        raise DesignError(f"{p}: no such {what}") from None
    except IsADirectoryError:
        raise DesignError(f"{p}: is a folder, not a {what}") from None
    except OSError as exc:
        raise DesignError(f"{p}: cannot read the {what} ({exc.strerror or exc})") from None
    try:
        mode = os.fstat(fd).st_mode
        if stat.S_ISDIR(mode):
            raise DesignError(f"{p}: is a folder, not a {what}")
        if not stat.S_ISREG(mode):
            kind = "a named pipe (FIFO)" if stat.S_ISFIFO(mode) else "a socket" if stat.S_ISSOCK(mode) else \
                "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode) else "not a regular file"
            raise DesignError(f"{p}: is {kind}, not a regular file; give the path of a {what} on disk")
        if hasattr(os, "set_blocking"):
            os.set_blocking(fd, True)
        with os.fdopen(fd, "rb") as fh:
            fd = -1
            data = fh.read(limit + 1)
    except OSError as exc:
        raise DesignError(f"{p}: cannot read the {what} ({exc.strerror or exc})") from None
    finally:
        if fd >= 0:
            os.close(fd)
    if len(data) > limit:
        raise DesignError(f"{p}: the {what} is larger than {limit // 1024} KiB; a pwmkit {what} is a few "
                          "kilobytes — is this the right file?")
    return data


def _write_all(fh: object, data: bytes) -> None:
    """Write ``data`` in chunks (a separate function so tests can interrupt a write midway)."""
    for start in range(0, len(data), _CHUNK):
        fh.write(data[start:start + _CHUNK])  # type: ignore[attr-defined]


def atomic_write(path: str | os.PathLike[str], data: str | bytes, *, force: bool = False) -> Path:
    """Write ``data`` to ``path`` atomically (temporary file in the same folder + ``os.replace``).

    Parameters
    ----------
    path : path-like
        Destination file. Its folder must exist.
    data : str or bytes
        Contents; text is encoded as UTF-8 with ``\\n`` line ends.
    force : bool
        Replace an existing file. Without it an existing destination raises :class:`DesignError`.

    Returns
    -------
    pathlib.Path
        The destination.

    Raises
    ------
    DesignError
        The destination exists and ``force`` is false, or it is a folder.
    OSError
        The write itself failed (disk full, permissions); the old file is then left intact.
    """
    p = Path(path)
    if p.is_dir():
        raise DesignError(f"{p}: is a folder; give a file name")
    if p.exists() and not force:
        raise DesignError(f"{p}: already exists; use --force (force=True) to replace it")
    if not p.parent.is_dir():
        raise DesignError(f"{p}: the folder {p.parent} does not exist")
    payload = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    try:
        fd, tmp_name = tempfile.mkstemp(dir=p.parent, prefix=f".{p.name}.", suffix=".tmp")
    except OSError as exc:  # the message names the destination, not the hidden temporary file
        raise DesignError(f"{p}: cannot write into the folder {p.parent} ({exc.strerror or exc})") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            _write_all(fh, payload)
            fh.flush()
            os.fsync(fh.fileno())
        if p.exists():  # keep the permissions of the file being replaced
            try:
                os.chmod(tmp_name, p.stat().st_mode & 0o7777)
            except OSError:  # pragma: no cover - best effort
                pass
        else:
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp_name, 0o666 & ~umask)
        if force:
            os.replace(tmp_name, p)
        else:
            _place_new(tmp_name, p)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
    _fsync_folder(p.parent)
    return p


def _place_new(tmp_name: str, p: Path) -> None:
    """Move the temporary file to ``p`` only if ``p`` still does not exist (no clobbering in a race)."""
    try:
        os.link(tmp_name, p)  # atomic and fails if p appeared meanwhile
    except FileExistsError:
        raise DesignError(f"{p}: already exists; use --force (force=True) to replace it") from None
    except OSError:  # pragma: no cover - file systems without hard links
        if p.exists():
            raise DesignError(f"{p}: already exists; use --force (force=True) to replace it") from None
        os.replace(tmp_name, p)
        return
    os.unlink(tmp_name)


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable (POSIX); silently skipped where folders cannot be opened."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:  # pragma: no cover - e.g. Windows
        return
    try:
        os.fsync(fd)
    except OSError:  # pragma: no cover - some file systems refuse
        pass
    finally:
        os.close(fd)


def contained_path(name: str | os.PathLike[str], out_dir: str | os.PathLike[str], *, what: str = "output") -> Path:
    """Resolve an output name inside ``out_dir``, refusing anything that would land outside it.

    Rules: no ``..`` component anywhere; an absolute name is allowed only if it already lies inside
    ``out_dir``; after resolving symbolic links the file must still be inside ``out_dir``. Missing
    sub-folders inside ``out_dir`` are created.

    Raises
    ------
    DesignError
        The name escapes the folder, is empty, or names the folder itself.
    """
    text = os.fspath(name)
    if not text or not text.strip():
        raise DesignError(f"{what}: an empty file name is not allowed")
    if "\x00" in text:
        raise DesignError(f"{what}: {text!r} contains a NUL character")
    raw = Path(text)
    if ".." in raw.parts or ".." in text.replace("\\", "/").split("/"):
        raise DesignError(f"{what}: {text!r} contains '..'; output files are written only inside the output "
                          f"folder {os.fspath(out_dir)!r}")
    base = Path(out_dir).resolve()
    target = raw if raw.is_absolute() else base / raw
    resolved = target.resolve()
    if resolved == base or not resolved.is_relative_to(base):
        raise DesignError(f"{what}: {text!r} lies outside the output folder {str(base)!r}; give a name inside "
                          "it (or choose another --out-dir)")
    resolved.parent.mkdir(parents=True, exist_ok=True)
    if not resolved.parent.resolve().is_relative_to(base):  # pragma: no cover - race with a symlink swap
        raise DesignError(f"{what}: {text!r} lies outside the output folder {str(base)!r}")
    return resolved


_SLUG_RE = re.compile(r"[^A-Za-z0-9._-]+")


def slug(text: str, default: str = "design") -> str:
    """A safe file-name stem from free text (letters, digits, ``.``, ``_``, ``-``; no leading dot)."""
    s = _SLUG_RE.sub("-", text).strip("-.")
    s = re.sub(r"\.{2,}", ".", s)[:80].strip("-.")
    return s or default
