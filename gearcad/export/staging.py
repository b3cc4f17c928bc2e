"""Build an output folder whole beside it, then put it in place in one step.

A build writes every file into a staging folder, a hidden sibling of the
output folder (``.<name>.gearcad-staging-<pid>-<random>``).  Only when the last
file is written is the staging folder put in place:

- no output folder yet: one ``rename``;
- an output folder already there: the two folders are exchanged in one step
  (Linux ``renameat2(RENAME_EXCHANGE)``), then the old one is removed.  Where
  the exchange is not available (another system, a file system that lacks it)
  the old folder is renamed aside and the new one renamed in, the old one
  restored if the second rename fails.

So an error or an interrupt at any point before that leaves the previous
folder exactly as it was and nothing new beside it (the staging folder is
removed on the way out; one left by a killed process is removed by the next
build of the same folder).

Entries of the old folder that no earlier build listed in the ownership record
(``.gearcad-output``), a user's own notes say, are carried into the new folder
as hard links (copies where links are not possible), so a rebuild keeps them;
files an earlier build listed and this one does not make are left behind with
the old folder, as before.

Two builds of one folder at the same time: each holds a lock on
``.<name>.gearcad-lock`` beside the folder (``flock``, released by the system
if the process dies) from the first check to the last rename; the later build
is refused with one line, so the folder always holds one whole result.

When the output folder is the working folder (or holds it), it cannot be
exchanged without pulling it from under the user's shell; its files are then
moved in one by one (each rename is whole, the set is not).
"""

from __future__ import annotations

import ctypes
import errno
import os
import secrets
import shutil
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from ..errors import ExportError

__all__ = ["MARKER", "Staging", "staged_folder", "folder_lock", "owned_files", "check_folder", "staging_prefix", "lock_path"]

MARKER = ".gearcad-output"
_RENAME_EXCHANGE = 2  # linux/fs.h


def lock_path(folder: Path) -> Path:
    """The lock file of ``folder``: a hidden sibling ``.<name>.gearcad-lock``."""
    return folder.parent / f".{folder.name}.gearcad-lock"


def staging_prefix(folder: Path) -> str:
    """The name prefix of the staging (and retired) folders of ``folder``."""
    return f".{folder.name}.gearcad-"


def owned_files(folder: Path) -> list[str]:
    """The files the last build listed in the ownership record (empty when there is none)."""
    marker = folder / MARKER
    try:
        text = marker.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return []
    return [line for line in text.splitlines() if line and "/" not in line and line not in (".", "..")]


def check_folder(folder: Path, force: bool) -> None:
    """Refuse a folder that is a file, or a non-empty folder gearcad did not make (unless ``force``)."""
    if folder.exists() and not folder.is_dir():
        raise ExportError(f"output folder {str(folder)!r} is a file; choose a folder with --out")
    if folder.is_dir() and not (folder / MARKER).exists() and not force:
        try:
            empty = not any(folder.iterdir())
        except OSError as exc:
            raise ExportError(f"cannot read output folder {str(folder)!r}: {exc.strerror or exc}") from None
        if not empty:
            raise ExportError(f"output folder {str(folder)!r} is not empty and was not made by gearcad; "
                              "choose another with --out or pass --force")


def _make_parents(folder: Path) -> list[Path]:
    """Create the folder holding ``folder`` and its missing ancestors; the folders created, deepest first."""
    made: list[Path] = []
    here = folder.parent
    while not here.exists():
        made.append(here)
        if here.parent == here:
            break
        here = here.parent
    if not here.is_dir():
        raise ExportError(f"cannot create output folder {str(folder)!r}: {str(here)!r} is a file")
    for p in reversed(made):
        try:
            p.mkdir()
        except FileExistsError:
            pass
        except OSError as exc:
            _remove_empty(made)
            raise ExportError(f"cannot create output folder {str(folder)!r}: {exc.strerror or exc}") from None
    return made


def _remove_empty(folders: list[Path]) -> None:
    for p in folders:  # deepest first
        try:
            p.rmdir()
        except OSError:
            return


@contextmanager
def folder_lock(folder: Path) -> Iterator[None]:
    """Hold the lock of ``folder`` for the duration; refuse at once if another build holds it.

    Raises
    ------
    ExportError
        Another build of the same folder is running, or the lock file cannot be made.
    """
    path = lock_path(folder)
    try:
        import fcntl
    except ImportError:  # no flock: an exclusive create, removed on the way out
        fcntl = None  # type: ignore[assignment]
    while True:
        try:
            flags = os.O_RDWR | os.O_CREAT | (os.O_EXCL if fcntl is None else 0)
            fd = os.open(path, flags, 0o644)
        except FileExistsError:
            raise _busy(folder, path) from None
        except OSError as exc:
            raise ExportError(f"cannot lock output folder {str(folder)!r}: {exc.strerror or exc}") from None
        if fcntl is None:
            break
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(fd)
            raise _busy(folder, path) from None
        try:  # the file may have been removed by the build that held it just before: lock the current one
            same = os.path.samestat(os.fstat(fd), os.stat(path))
        except FileNotFoundError:
            same = False
        if same:
            break
        os.close(fd)
    try:
        os.ftruncate(fd, 0)
        os.write(fd, f"{os.getpid()}\n".encode())
        yield
    finally:
        try:
            path.unlink(missing_ok=True)
        finally:
            os.close(fd)


def _busy(folder: Path, path: Path) -> ExportError:
    return ExportError(f"output folder {str(folder)!r} is being written by another gearcad build (lock {path.name}); "
                       "wait for it to finish or choose another --out")


def _remove_tree(path: Path) -> None:
    shutil.rmtree(path, ignore_errors=True)


def _remove_leftovers(folder: Path) -> None:
    """Staging and retired folders of ``folder`` left by a killed build (the lock is held: none is live)."""
    prefix = staging_prefix(folder)
    try:
        entries = list(folder.parent.iterdir())
    except OSError:
        return
    for entry in entries:
        if entry.name.startswith(prefix) and entry.name != lock_path(folder).name and entry.is_dir() \
                and not entry.is_symlink():
            _remove_tree(entry)


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths in one step; False when the system cannot."""
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd = -100
    renameat2.argtypes = (ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint)
    if renameat2(at_fdcwd, os.fsencode(a), at_fdcwd, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    code = ctypes.get_errno()
    if code in (errno.EINVAL, errno.ENOSYS, errno.ENOTSUP, errno.EOPNOTSUPP):
        return False
    raise OSError(code, os.strerror(code), str(b))


def _carry_foreign(old: Path, new: Path, owned: set[str]) -> None:
    """Hard-link (or copy) into ``new`` every entry of ``old`` that no build listed and ``new`` lacks."""
    for entry in old.iterdir():
        if entry.name in owned or entry.name == MARKER or (new / entry.name).exists():
            continue
        if entry.is_dir() and not entry.is_symlink():
            shutil.copytree(entry, new / entry.name, symlinks=True, copy_function=_link_or_copy)
        elif entry.is_symlink():
            os.symlink(os.readlink(entry), new / entry.name)
        else:
            _link_or_copy(str(entry), str(new / entry.name))


def _link_or_copy(src: str, dst: str) -> None:
    try:
        os.link(src, dst)
    except OSError:
        shutil.copy2(src, dst)


def _holds_working_folder(folder: Path) -> bool:
    try:
        cwd = Path.cwd().resolve()
    except OSError:
        return False
    return cwd == folder or folder in cwd.parents


def _move_files(staging: Path, folder: Path, old: list[str], written: set[str]) -> None:
    """The fallback: move each staged file into ``folder`` (each whole), drop stale listed files, marker last."""
    for entry in sorted(staging.iterdir(), key=lambda p: p.name == MARKER):
        os.replace(entry, folder / entry.name)
    for stale in set(old) - written:
        (folder / stale).unlink(missing_ok=True)


def _commit(staging: Path, folder: Path, old: list[str], written: set[str]) -> None:
    if not folder.exists():
        os.rename(staging, folder)
        return
    if folder.is_mount() or _holds_working_folder(folder):
        _move_files(staging, folder, old, written)
        return
    _carry_foreign(folder, staging, set(old))
    if _exchange(staging, folder):
        _remove_tree(staging)  # now the old folder
        return
    retired = folder.parent / f"{staging_prefix(folder)}old-{os.getpid()}-{secrets.token_hex(4)}"
    os.rename(folder, retired)
    try:
        os.rename(staging, folder)
    except BaseException:
        os.rename(retired, folder)
        raise
    _remove_tree(retired)


class Staging:
    """The staging folder of one build: where to write, and what the last build listed."""

    def __init__(self, path: Path, folder: Path, old: list[str]) -> None:
        self.path = path
        self.folder = folder
        self.old = old
        self.written: list[str] = []

    def file(self, name: str) -> Path:
        """The staged path of the output file ``name`` (recorded for the ownership record)."""
        if "/" in name or os.sep in name or name in ("", ".", "..", MARKER):
            raise ExportError(f"cannot write {name!r}: not a plain file name")
        if name not in self.written:
            self.written.append(name)
        return self.path / name


@contextmanager
def staged_folder(folder: str | os.PathLike[str], force: bool = False) -> Iterator[Staging]:
    """Yield a :class:`Staging` for ``folder``; on normal exit put it in place whole.

    The ownership record is written last into the staging folder, listing every
    file recorded with :meth:`Staging.file`.  On any exception (``KeyboardInterrupt``
    included) the staging folder is removed and ``folder`` is left as it was.

    Parameters
    ----------
    folder : str or os.PathLike
        The output folder.
    force : bool
        Write into a non-empty folder gearcad did not make (its entries are kept).

    Raises
    ------
    ExportError
        The folder is a file, is someone else's (without ``force``), is being
        written by another build, or cannot be written.
    """
    target = Path(folder).absolute()
    if target.exists():
        target = target.resolve()  # a symbolic link to a folder: build beside the real folder
    check_folder(target, force)
    made = _make_parents(target)
    ok = False
    try:
        with folder_lock(target):
            check_folder(target, force)  # again, now that no other build can change it
            _remove_leftovers(target)
            old = owned_files(target) if (target / MARKER).exists() else []
            path = target.parent / f"{staging_prefix(target)}staging-{os.getpid()}-{secrets.token_hex(4)}"
            try:
                path.mkdir()
            except OSError as exc:
                raise ExportError(f"cannot create a staging folder beside {str(target)!r}: {exc.strerror or exc}") from None
            try:
                stage = Staging(path, target, old)
                yield stage
                (path / MARKER).write_text("".join(f"{n}\n" for n in sorted(stage.written)), encoding="utf-8")
                try:
                    _commit(path, target, old, set(stage.written))
                except OSError as exc:
                    raise ExportError(f"cannot put the new files in place in {str(target)!r}: "
                                      f"{exc.strerror or exc}") from None
                ok = True
            finally:
                if path.exists():
                    _remove_tree(path)
    finally:
        if not ok:
            _remove_empty(made)
