"""Output files: refuse bad targets before any work, then commit a whole set together.

Stdlib only (imported at start-up). The life of a run's outputs:

1. :func:`plan` (before evaluating): every target must be a regular file or not exist yet
   (a symbolic link, FIFO, device, socket or folder is refused), no two targets may be the
   same file (same resolved path, or the same existing file through a hard link), and every
   target folder must be writable (a temporary file is created and deleted there).
2. :func:`commit` (after evaluating): every output is written to a hidden temporary
   ``.NAME.<random>.part`` in its target folder; then a lock is taken on a hidden lock file
   ``.NAME.lock`` beside each target (``fcntl.flock``, in sorted path order so that two runs
   cannot deadlock), and the temporaries are renamed over the targets while all the locks are
   held, so two concurrent runs never leave a mixed set. A rename is atomic: a run killed at
   any moment leaves each target either as it was or complete; what it can leave behind is a
   stale ``.NAME.*.part`` temporary (safe to delete by hand) and the lock file (kept; empty).

Test hook: when ``RFCHECK_TEST_PAUSE_BEFORE_COMMIT`` is set to a number of seconds, the writer
sleeps that long after the temporaries are written and the locks are taken, just before the
renames. It changes timing only, never content.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from rfcheck.inputfiles import file_kind

__all__ = ["UsageProblem", "check_destination", "plan", "commit", "write_atomic"]

PAUSE_ENV = "RFCHECK_TEST_PAUSE_BEFORE_COMMIT"


class UsageProblem(Exception):
    """A command-line problem that is the user's to fix (exit code 2)."""


def _label(option: str | None, path: Path) -> str:
    return f"{option} {path}" if option else str(path)


def check_destination(path: Path, option: str | None = None) -> Path:
    """Refuse a target that is not a regular file (or absent), or whose folder is missing.

    Returns the target's folder.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise UsageProblem(f"{_label(option, path)}: folder {folder} does not exist")
    try:
        mode = os.lstat(path).st_mode
    except FileNotFoundError:
        return folder
    except OSError as exc:
        raise UsageProblem(f"{_label(option, path)}: cannot inspect the target: "
                           f"{exc.strerror}") from None
    kind = file_kind(mode)
    if kind == "a folder":
        raise UsageProblem(f"{_label(option, path)} is a folder; give a file name")
    if kind:
        raise UsageProblem(f"{_label(option, path)} is {kind}; rfcheck writes only regular "
                           f"files (nothing was written); give the path of a regular file")
    return folder


def _check_writable(option: str | None, path: Path, folder: Path) -> None:
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=folder)
    except OSError as exc:
        raise UsageProblem(f"{_label(option, path)}: cannot write in folder {folder}: "
                           f"{exc.strerror} (nothing was written)") from None
    os.close(fd)
    os.unlink(tmp)


def plan(targets: list[tuple[str | None, Path]]) -> None:
    """All checks that can be made before evaluating; raises UsageProblem (nothing written)."""
    seen: dict[object, str] = {}
    for option, path in targets:
        path = Path(path)
        folder = check_destination(path, option)
        keys = [("path", os.path.join(os.path.realpath(folder), path.name))]
        try:
            st = os.stat(path)
            keys.append(("inode", st.st_dev, st.st_ino))
        except FileNotFoundError:
            pass
        for key in keys:
            if key in seen:
                raise UsageProblem(f"{_label(option, path)} is the same file as {seen[key]}; "
                                   f"give each output its own file (nothing was written)")
        for key in keys:
            seen[key] = _label(option, path)
        _check_writable(option, path, folder)


def _mode_for(path: Path) -> int:
    umask = os.umask(0)
    os.umask(umask)
    try:
        return os.stat(path).st_mode & 0o777
    except FileNotFoundError:
        return 0o666 & ~umask


def _unlink_quiet(tmp: str) -> None:
    try:
        os.unlink(tmp)
    except OSError:
        pass


def commit(items: list[tuple[str | None, Path, bytes]]) -> None:
    """Write every item to a temporary, then rename them all over their targets under locks.

    On failure raises UsageProblem saying which files were written and which were not.
    """
    import fcntl

    items = [(opt, Path(p), data) for opt, p, data in items]
    temps: list[str] = []
    try:
        for opt, path, data in items:
            folder = check_destination(path, opt)
            fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=folder)
            temps.append(tmp)
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
                fh.flush()
                os.fsync(fh.fileno())
            os.chmod(tmp, _mode_for(path))
    except OSError as exc:
        for tmp in temps:
            _unlink_quiet(tmp)
        where = _label(items[len(temps) - 1][0], items[len(temps) - 1][1]) if temps else "output"
        raise UsageProblem(f"{where}: cannot write: {exc.strerror}; nothing was written") from None
    except BaseException:
        for tmp in temps:
            _unlink_quiet(tmp)
        raise

    lock_paths = sorted({os.path.join(os.path.realpath(p.parent if str(p.parent) else "."),
                                      f".{p.name}.lock") for _, p, _ in items})
    lock_fds: list[int] = []
    written: list[str] = []
    try:
        for lp in lock_paths:
            try:
                fd = os.open(lp, os.O_RDWR | os.O_CREAT | getattr(os, "O_NOFOLLOW", 0), 0o666)
            except OSError as exc:
                raise UsageProblem(f"cannot open the lock file {lp}: {exc.strerror}; "
                                   f"nothing was written") from None
            lock_fds.append(fd)
            fcntl.flock(fd, fcntl.LOCK_EX)
        pause = os.environ.get(PAUSE_ENV)
        if pause:
            import time

            time.sleep(float(pause))
        for i, ((opt, path, _), tmp) in enumerate(zip(items, temps)):
            try:
                check_destination(path, opt)  # the target may have changed since the plan
                os.replace(tmp, path)
            except (OSError, UsageProblem) as exc:
                reason = exc.strerror if isinstance(exc, OSError) else str(exc)
                not_written = [str(p) for _, p, _ in items[i:]]
                done = ", ".join(written) if written else "none"
                raise UsageProblem(f"{_label(opt, path)}: cannot write: {reason}. "
                                   f"Written: {done}. Not written: {', '.join(not_written)}."
                                   ) from None
            written.append(str(path))
    finally:
        for fd in lock_fds:
            os.close(fd)  # closing releases the flock
        for tmp in temps:
            if os.path.lexists(tmp):
                _unlink_quiet(tmp)


def write_atomic(path: Path, data: bytes, option: str | None = None) -> None:
    """Write one file: checked like :func:`plan`, committed like :func:`commit`."""
    plan([(option, Path(path))])
    commit([(option, Path(path), data)])

