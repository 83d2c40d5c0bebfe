"""Writing files whole or not at all, one file or several together.

Each file is written to a temporary file in its own folder, flushed and
fsynced, then moved over the target with :func:`os.replace` (atomic on POSIX
and on Windows within one volume), so a reader sees the old file or the new
one, never a part.

Our temporary files are named ``.<target>.tiltyard-<pid>-<random>.tmp``. One
left behind by a process that was killed (SIGKILL, a power cut) is removed by
the next write of the same target, once its process is gone; a temporary file
of any other program, or of a run still going, is never touched.

Several files (:func:`write_files_atomically`) are all written to temporary
files first and renamed only when every one is complete: a failure while
writing (a full disk, a signal) changes none of the targets. The renames
themselves take microseconds each; a kill between two of them leaves each
target either old or complete and new.
"""

from __future__ import annotations

import contextlib
import os
import re
import stat
import tempfile
from pathlib import Path

_TAG = "tiltyard"


def _folder(path: Path) -> Path:
    return path.parent if str(path.parent) else Path(".")


def _temp_pattern(path: Path) -> re.Pattern:
    return re.compile(rf"^\.{re.escape(path.name)}\.{_TAG}-(\d+)-[A-Za-z0-9_]+\.tmp$")


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OSError):
        return True                 # someone else's process, or unknown: leave its file
    return True


def remove_stale_temps(path: str | os.PathLike) -> list[Path]:
    """Remove our temporary files for ``path`` left by processes that no longer run.

    Returns
    -------
    list of Path
        The files removed.
    """
    path = Path(path)
    return _sweep(_folder(path), _temp_pattern(path))


def _sweep(folder: Path, pattern: re.Pattern) -> list[Path]:
    """Remove the files of ``folder`` that match ``pattern`` (group 1: the writer's pid)
    and whose writer no longer runs; the files removed."""
    removed = []
    try:
        names = os.listdir(folder)
    except OSError:
        return removed
    for name in names:
        m = pattern.match(name)
        if m and not _alive(int(m.group(1))):
            try:
                os.unlink(folder / name)
                removed.append(folder / name)
            except OSError:
                pass
    return removed


_ANY_TEMP = re.compile(rf"^\..+\.{_TAG}-(\d+)-[A-Za-z0-9_]+\.tmp$")


def remove_stale_temps_in(folder: str | os.PathLike) -> list[Path]:
    """Remove our temporary files of any target in ``folder`` left by processes that no
    longer run (a folder of many outputs, such as a batch's chunks, whose names change).

    Returns
    -------
    list of Path
        The files removed.
    """
    return _sweep(Path(folder), _ANY_TEMP)


@contextlib.contextmanager
def atomic_file(path: str | os.PathLike, mode: str = "wb", **open_args):
    """A file to write ``path`` through, whole or not at all: the caller writes to a
    temporary file beside it, which replaces ``path`` when the block ends without an
    exception (flushed, fsynced, renamed) and is removed otherwise. For outputs written
    piece by piece (a batch's results, merged chunk by chunk)."""
    path = Path(path)
    remove_stale_temps(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.{_TAG}-{os.getpid()}-", suffix=".tmp",
                               dir=_folder(path))
    try:
        os.chmod(tmp, _target_mode(path))
        with os.fdopen(fd, mode, **open_args) as fh:
            yield fh
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, path)
    except BaseException:
        _unlink(tmp)
        raise
    _fsync_folder(_folder(path))


def _write_temp(path: Path, data: bytes) -> str:
    """Write ``data`` to a new temporary file beside ``path``; return its name."""
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.{_TAG}-{os.getpid()}-", suffix=".tmp",
                               dir=_folder(path))
    try:
        with os.fdopen(fd, "wb") as fh:
            # mkstemp makes an owner-only file; give the new file the old file's
            # permissions, or the usual ones (0666 less the umask) for a new file
            os.chmod(tmp, _target_mode(path))
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        _unlink(tmp)
        raise
    return tmp


def _unlink(tmp: str) -> None:
    try:
        os.unlink(tmp)
    except FileNotFoundError:
        pass


def write_files_atomically(items) -> None:
    """Write several files, each whole or not at all, all new or all old on a failure
    while writing.

    Parameters
    ----------
    items : sequence of (path, bytes)
        Targets and their new contents.

    Raises
    ------
    OSError
        From writing a temporary file (no target changed; ``target`` names the
        file it was for) or from a rename.
    """
    items = [(Path(p), data) for p, data in items]
    for path, _data in items:
        remove_stale_temps(path)
    temps = []
    try:
        for path, data in items:
            try:
                temps.append((_write_temp(path, data), path))
            except OSError as exc:
                exc.target = str(path)       # which output could not be written
                raise
        while temps:
            tmp, path = temps[0]
            os.replace(tmp, path)
            temps.pop(0)
    except BaseException:
        for tmp, _path in temps:
            _unlink(tmp)
        raise
    for folder in {_folder(p) for p, _ in items}:
        _fsync_folder(folder)


def write_bytes_atomically(path: str | os.PathLike, data: bytes) -> None:
    """Write ``data`` to ``path`` atomically (temp file, fsync, rename)."""
    write_files_atomically([(path, data)])


def _fsync_folder(folder: Path) -> None:
    """Make the renames durable where the platform allows it."""
    try:
        dir_fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(dir_fd)
    except OSError:
        pass
    finally:
        os.close(dir_fd)


def _target_mode(path: Path) -> int:
    """Permission bits a file written at ``path`` should get."""
    try:
        return stat.S_IMODE(os.stat(path).st_mode)
    except OSError:
        pass
    mask = os.umask(0o022)  # reading the umask means setting it; put it straight back
    os.umask(mask)
    return 0o666 & ~mask
