"""Reading input files (spec, policy, measured field files, site tables) without surprises.

Every file rfcheck reads on the user's behalf goes through :func:`read_input`:

- it must be a regular file (after following symbolic links): a folder, FIFO, socket or device
  is refused before it is opened, and the file is opened non-blocking and checked again on the
  open descriptor, so a FIFO swapped in between can never block a run;
- it must be no larger than the limit of its kind (:data:`SIZE_LIMITS`); files whose size the
  system does not report (``/proc``) are read only up to the limit plus one byte;
- it must be UTF-8 text.

Messages name the file and what was expected, never the file's content: an input file may be
anything (a user's mistake, or a hostile path), and its bytes must not reach a terminal or a CI
log through an error message.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass
from pathlib import Path

__all__ = ["SIZE_LIMITS", "InputFileError", "InputFile", "read_input", "max_nesting", "file_kind"]

#: largest file accepted per kind, bytes, with the reason
SIZE_LIMITS: dict[str, tuple[int, str]] = {
    "specification": (1 << 20, "a hand-written source specification is a few kB"),
    "policy": (1 << 20, "a review policy is a few kB"),
    "site table": (1 << 20, "a table of reference levels is a few kB"),
    "measured field file": (32 << 20, "a field map of 500 x 500 nodes is about 15 MB"),
}

#: deepest nesting of tables and arrays accepted in a TOML input (a spec needs 5)
MAX_NESTING = 12


class InputFileError(ValueError):
    """An input file could not be accepted; `message` never contains the file's content."""

    def __init__(self, path: Path, message: str):
        self.path = path
        self.message = message
        super().__init__(f"{path}: {message}")


@dataclass(frozen=True)
class InputFile:
    path: Path
    data: bytes
    text: str


def file_kind(mode: int) -> str | None:
    """What a stat mode names, for messages ("a FIFO (named pipe)" …); None for a regular
    file. Shared by the input reader and the output targets (rfcheck.outputs)."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISLNK(mode):
        return "a symbolic link"
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_input(path: str | Path, what: str) -> InputFile:
    """The bytes and UTF-8 text of the input file `path` of kind `what` (a key of SIZE_LIMITS).

    Raises FileNotFoundError when nothing is there and :class:`InputFileError` for anything
    else that is refused.
    """
    path = Path(path)
    limit, reason = SIZE_LIMITS[what]
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise
    except OSError as exc:
        raise InputFileError(path, f"cannot read the {what} ({exc.strerror or type(exc).__name__})"
                             ) from None
    if not stat.S_ISREG(st.st_mode):
        raise InputFileError(path, f"the {what} path is {file_kind(st.st_mode)}; expected a "
                                   "regular file")
    if st.st_size > limit:
        raise InputFileError(path, f"the {what} is {st.st_size} bytes; at most {limit} are "
                                   f"accepted ({reason})")
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
    try:
        fd = os.open(path, flags)
    except OSError as exc:
        raise InputFileError(path, f"cannot read the {what} ({exc.strerror or type(exc).__name__})"
                             ) from None
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise InputFileError(path, f"the {what} path is {file_kind(st.st_mode)}; expected a "
                                       "regular file")
        chunks, size = [], 0
        while size <= limit:
            chunk = os.read(fd, min(1 << 20, limit + 1 - size))
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
    except OSError as exc:
        raise InputFileError(path, f"cannot read the {what} ({exc.strerror or type(exc).__name__})"
                             ) from None
    finally:
        os.close(fd)
    if size > limit:
        raise InputFileError(path, f"the {what} is larger than {limit} bytes, the most accepted "
                                   f"({reason})")
    data = b"".join(chunks)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputFileError(path, f"the {what} is not UTF-8 text (byte {exc.start + 1} cannot "
                                   "be decoded); expected a text file") from None
    if "\x00" in text:
        raise InputFileError(path, f"the {what} holds a NUL character at byte "
                                   f"{data.index(0) + 1}; expected a text file")
    return InputFile(path, data, text)


def max_nesting(value, limit: int = MAX_NESTING) -> tuple[int, tuple]:
    """Depth of nested tables/arrays in a parsed TOML value and the key path of the deepest
    point, walking iteratively (no recursion) and stopping once `limit` is passed."""
    deepest, where = 0, ()
    stack = [(value, 0, ())]
    while stack:
        node, depth, path = stack.pop()
        if depth > deepest:
            deepest, where = depth, path
            if deepest > limit:
                break
        if isinstance(node, dict):
            stack.extend((v, depth + 1, path + (k,)) for k, v in node.items())
        elif isinstance(node, list):
            stack.extend((v, depth + 1, path + (i,)) for i, v in enumerate(node))
    return deepest, where
