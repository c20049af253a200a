"""Find the file line of a key path in a TOML text, for error messages.

`tomllib` gives values but no positions. This scanner walks the text once and records the
line of every table header, key, inline-table key and element of a multi-line array of
inline tables, keyed by the same path tuples a validator reports, e.g.
``("feed", 0, "launch", "mode")``. It covers the TOML people write by hand for rfcheck
specs and policies; for anything it cannot place it falls back to the nearest enclosing
entry, so a message always points somewhere sensible.
"""

from __future__ import annotations

import re

_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"^\s*((?:[A-Za-z0-9_\-]+|\"[^\"]*\")(?:\s*\.\s*(?:[A-Za-z0-9_\-]+|\"[^\"]*\"))*)\s*=")
_INLINE_KEY = re.compile(r"([A-Za-z0-9_\-]+)\s*=")


def _split_key(key: str) -> tuple[str, ...]:
    """Split a dotted TOML key, keeping dots inside quoted parts."""
    parts = re.findall(r'\s*("(?:[^"\\]|\\.)*"|[^."]+)\s*(?:\.|$)', key)
    return tuple(p.strip().strip('"') for p in parts)


def _strip_strings(line: str) -> str:
    """Blank out string contents and comments so brackets inside them are not counted."""
    out = re.sub(r'"(?:[^"\\]|\\.)*"', lambda m: '"' + " " * (len(m.group(0)) - 2) + '"', line)
    out = re.sub(r"'[^']*'", lambda m: "'" + " " * (len(m.group(0)) - 2) + "'", out)
    hash_at = out.find("#")
    return out if hash_at < 0 else out[:hash_at]


class LineIndex:
    """Path → 1-based line number for one TOML text."""

    def __init__(self, text: str):
        self.lines: dict[tuple, int] = {}
        self._scan(text)

    def _put(self, path: tuple, line: int) -> None:
        self.lines.setdefault(path, line)

    def _scan(self, text: str) -> None:
        prefix: tuple = ()
        array_counts: dict[tuple, int] = {}
        open_array: tuple | None = None  # path of a multi-line array value being read
        depth = 0  # bracket depth inside that array
        element = -1
        # TOML ends lines at LF (CRLF) only; str.splitlines would also split at U+2028, VT, FF…
        for lineno, raw in enumerate(text.split("\n"), start=1):
            raw = raw.removesuffix("\r")
            line = _strip_strings(raw)
            if open_array is not None:
                # inside a multi-line array: count inline-table elements
                for ch_index, ch in enumerate(line):
                    if ch in "[{":
                        if depth == 1:
                            element += 1
                            self._put(open_array + (element,), lineno)
                            self._record_inline(open_array + (element,), line[ch_index:], lineno)
                        depth += 1
                    elif ch in "]}":
                        depth -= 1
                        if depth == 0:
                            open_array = None
                            break
                continue
            m = _HEADER.match(raw)
            if m and not _KEY.match(raw):
                path = _split_key(m.group(2))
                if m.group(1) == "[[":
                    idx = array_counts.get(path, -1) + 1
                    array_counts[path] = idx
                    prefix = path + (idx,)
                    self._put(path, lineno)
                else:
                    prefix = self._resolve(path, array_counts)
                for i in range(1, len(prefix) + 1):
                    self._put(prefix[:i], lineno)
                continue
            m = _KEY.match(raw)
            if not m:
                continue
            path = prefix + _split_key(m.group(1))
            self._put(path, lineno)
            rest = line[m.end():]
            self._record_inline(path, rest, lineno)
            # a multi-line array starts here if its brackets do not close on this line
            balance = rest.count("[") + rest.count("{") - rest.count("]") - rest.count("}")
            if balance > 0 and rest.strip().startswith("["):
                open_array, depth, element = path, 0, -1
                for ch_index, ch in enumerate(rest):
                    if ch in "[{":
                        if depth == 1:
                            element += 1
                            self._put(path + (element,), lineno)
                            self._record_inline(path + (element,), rest[ch_index:], lineno)
                        depth += 1
                    elif ch in "]}":
                        depth -= 1

    def _resolve(self, path: tuple, array_counts: dict) -> tuple:
        """Map a dotted header onto the current element of any array-of-tables it extends."""
        out: tuple = ()
        for part in path:
            out = out + (part,)
            if out in array_counts:
                out = out + (array_counts[out],)
        return out

    def _record_inline(self, path: tuple, rest: str, lineno: int) -> None:
        """Record keys of inline tables written on this line (one level of nesting deep)."""
        depth = 0
        index = -1
        in_array_of_tables = rest.strip().startswith("[")
        pos = 0
        while pos < len(rest):
            ch = rest[pos]
            if ch == "{":
                depth += 1
                if in_array_of_tables and depth == 1:
                    index += 1
            elif ch == "}":
                depth -= 1
            elif depth == 1:
                m = _INLINE_KEY.match(rest, pos)
                if m:
                    base = path + ((index,) if in_array_of_tables and index >= 0 else ())
                    self._put(base + (m.group(1),), lineno)
                    pos = m.end()
                    continue
            pos += 1

    def line_of(self, path: tuple) -> int | None:
        """The line of `path`, or of its nearest recorded ancestor."""
        path = tuple(path)
        while path:
            if path in self.lines:
                return self.lines[path]
            path = path[:-1]
        return None
