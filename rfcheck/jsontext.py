"""JSON text of the results: indented where a reader looks, compact inside.

``json.dumps(obj, indent=2)`` runs the pure-Python encoder (the C encoder serves only
``indent=None``) and costs ~40 ms on the minimum-B example's results, a tenth of its whole
run. Here the outer levels (top-level keys, list items such as one finding, the tables of
characteristics) are laid out one per line and indented, and everything below
``DEPTH`` levels, or shorter than ``WIDTH`` characters, is written on one line by the C
encoder. The text is ordinary JSON (any parser reads it; ``NaN`` and ``Infinity`` are
refused as before) and stays readable and line-diffable: one finding per line.
"""

from __future__ import annotations

import json

#: containers nested deeper than this are written on one line
DEPTH = 3
#: a container whose one-line form is at most this long stays on one line
WIDTH = 100

_compact = json.JSONEncoder(ensure_ascii=True, allow_nan=False, separators=(", ", ": ")).encode


def _lines(obj, depth: int, pad: str) -> str:
    if depth >= DEPTH or not isinstance(obj, (dict, list)) or not obj:
        return _compact(obj)
    inner = pad + "  "
    if isinstance(obj, dict):
        parts = [f"{_compact(str(k))}: {_lines(v, depth + 1, inner)}" for k, v in obj.items()]
        open_, close = "{", "}"
    else:
        parts = [_lines(v, depth + 1, inner) for v in obj]
        open_, close = "[", "]"
    if all("\n" not in p for p in parts):
        one = open_ + ", ".join(parts) + close
        if len(one) <= WIDTH:
            return one
    return open_ + "\n" + ",\n".join(inner + p for p in parts) + "\n" + pad + close


def dumps(obj) -> str:
    """JSON text of ``obj`` (dicts, lists, str, numbers, bool, None), ending in a newline."""
    return _lines(obj, 0, "") + "\n"


def compact(obj) -> str:
    """One-line JSON text of ``obj`` (the C encoder; no trailing newline)."""
    return _compact(obj)
