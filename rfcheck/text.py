"""Free text from input files: what is refused, and how text is shown on a terminal.

Every free-text field of a spec or policy (names, ids, reasons, references, notes) is checked
with :func:`text_problem` at the boundary. Refused: C0 and C1 control characters (tab is
allowed only where a field says so), DEL, the Unicode line and paragraph separators, the byte
order mark and other format characters of category Cf (bidi embeddings, overrides and
isolates, zero-width joiners) and unassigned or private-use code points, and text longer than
the field's limit. A refused field is an input error (exit 2) naming the key and the line.

:func:`for_terminal` escapes what is printed from input files on a terminal, so that escape
sequences in a file can never reach the terminal even where a field was not checked.
"""

from __future__ import annotations

import unicodedata

__all__ = ["DEFAULT_MAX_LENGTH", "text_problem", "for_terminal", "shorten"]

#: limit of a free-text field that does not state its own (characters)
DEFAULT_MAX_LENGTH = 2000

_REFUSED_CATEGORIES = {"Cc", "Cf", "Co", "Cn", "Cs", "Zl", "Zp"}


def _describe(ch: str) -> str:
    name = unicodedata.name(ch, "")
    return f"U+{ord(ch):04X}" + (f" ({name.lower()})" if name else "")


def text_problem(value: str, max_length: int = DEFAULT_MAX_LENGTH, *,
                 allow_newlines: bool = False) -> str | None:
    """Why `value` is not acceptable free text, or None when it is.

    `allow_newlines` admits line feeds (multi-line notes); tabs are never needed in a field
    and are refused with the other control characters.
    """
    if len(value) > max_length:
        return f"text is {len(value)} characters long; at most {max_length} are accepted here"
    for i, ch in enumerate(value):
        if ch == "\n" and allow_newlines:
            continue
        if unicodedata.category(ch) in _REFUSED_CATEGORIES:
            return (f"text contains the control or format character {_describe(ch)} at "
                    f"position {i + 1}; remove it (only printable text is accepted)")
    return None


def for_terminal(text: str) -> str:
    """`text` with every control or format character shown as an escape (\\x1b, \\u202e)."""
    out = []
    for ch in text:
        if ch == "\n" or unicodedata.category(ch) not in _REFUSED_CATEGORIES:
            out.append(ch)
        else:
            code = ord(ch)
            out.append(f"\\x{code:02x}" if code < 0x100 else
                       f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}")
    return "".join(out)


def shorten(text: str, limit: int = 60) -> str:
    """`text` cut to `limit` characters with an ellipsis, for echoing input in a message."""
    return text if len(text) <= limit else text[: limit - 1] + "…"
