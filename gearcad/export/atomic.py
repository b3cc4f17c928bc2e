"""Write a file all at once or not at all.

Every writer in :mod:`gearcad.export` writes to a temporary name in the
target's folder (``.<name>.tmp-<pid>``) and renames it into place only when the
writer returned normally.  On any exception, ``KeyboardInterrupt`` included,
the temporary file is removed, so a failed or interrupted export leaves
neither a half-written file nor a stray temporary one, and an existing file of
the same name stays as it was.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path

from ..errors import ExportError

__all__ = ["atomic_path", "atomic_write", "temporary_name"]


def temporary_name(path: Path) -> Path:
    """The temporary file name used while ``path`` is being written.

    Parameters
    ----------
    path : pathlib.Path
        The final file name.

    Returns
    -------
    pathlib.Path
        ``.<name>.tmp-<pid>`` in the same folder, so the final rename never
        crosses a file system.
    """
    return path.with_name(f".{path.name}.tmp-{os.getpid()}")


def _export_error(path: Path, exc: OSError) -> ExportError:
    reason = exc.strerror or str(exc) or type(exc).__name__
    return ExportError(f"cannot write {path}: {reason}")


def _check_folder(path: Path) -> None:
    folder = path.parent
    if not folder.is_dir():
        raise ExportError(f"cannot write {path}: folder {folder} does not exist")
    if path.is_dir():
        raise ExportError(f"cannot write {path}: it is a folder")


def _discard(tmp: Path) -> None:
    try:
        tmp.unlink(missing_ok=True)
    except OSError:
        pass  # nothing more can be done; the original error is the one to report


def _flush_to_disk(tmp: Path) -> None:
    fd = os.open(tmp, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


@contextmanager
def atomic_path(path: str | os.PathLike[str]) -> Iterator[Path]:
    """Context manager yielding a temporary path that replaces ``path`` on success.

    Parameters
    ----------
    path : str or os.PathLike
        The file to create or replace.

    Yields
    ------
    pathlib.Path
        Where the caller writes the complete file.

    Raises
    ------
    ExportError
        The folder is missing, the target is a folder, the writer raised an
        ``OSError``, or the file could not be moved into place.  The message
        is one line naming ``path`` and the reason.
    """
    target = Path(path)
    _check_folder(target)
    tmp = temporary_name(target)
    try:
        yield tmp
        if not tmp.is_file():
            raise ExportError(f"cannot write {target}: the writer produced no file")
        _flush_to_disk(tmp)
        os.replace(tmp, target)
    except ExportError:
        _discard(tmp)
        raise
    except OSError as exc:
        _discard(tmp)
        raise _export_error(target, exc) from exc
    except BaseException:
        _discard(tmp)
        raise


def atomic_write(path: str | os.PathLike[str], writer: Callable[[Path], object]) -> Path:
    """Call ``writer(temporary_path)`` and move the result to ``path`` if it succeeds.

    Parameters
    ----------
    path : str or os.PathLike
        The file to create or replace.
    writer : callable
        Writes the complete file to the path it is given.

    Returns
    -------
    pathlib.Path
        ``path``.

    Raises
    ------
    ExportError
        See :func:`atomic_path`.
    """
    with atomic_path(path) as tmp:
        writer(tmp)
    return Path(path)
