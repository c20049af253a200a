"""Reference-level tables (RF exposure): the shipped ones and a site file, read with the
same error discipline as the spec (every problem at once, each with its key path and file
line; exit code 2 through :class:`rfcheck.spec.InputError`).

A table file holds one or more tables keyed by id, each with title, standard, edition,
population, scope ("whole-body" or "local"), averaging_time, confidence and a list of
segments ``{ f_min, f_max, quantity, coefficient, exponent[, frequency_unit] }`` meaning
value = coefficient · (f / frequency_unit)^exponent on (f_min, f_max] Hz, frequency_unit
"MHz" unless given. The shipped file is ``rfcheck/data/exposure.toml``.

A site file must be a regular file (not a link, device or folder) in the same folder as
the spec, named by its bare file name, at most :data:`MAX_SITE_FILE_BYTES` long. Its content
is never echoed in messages: they name the key and the line, and what was expected.
"""

from __future__ import annotations

import functools
import hashlib
import math
import os
import stat
import tomllib
from importlib import resources
from pathlib import Path

from rfcheck.model import LevelSegment, ReferenceTable
from rfcheck.tomlines import LineIndex

__all__ = ["MAX_SITE_FILE_BYTES", "shipped_tables", "shipped_table", "parse_tables",
           "read_site_tables", "site_file_path"]

#: largest site table file read (a table is a few kB)
MAX_SITE_FILE_BYTES = 256 * 1024

_TEXT_KEYS = ("title", "standard", "edition", "population", "scope", "averaging_time",
              "confidence")
_SEGMENT_KEYS = {"f_min", "f_max", "quantity", "coefficient", "exponent", "frequency_unit"}
_FREQUENCY_UNITS = {"Hz": 1.0, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9}
_SCOPES = ("whole-body", "local")


def _problem(file: str, lines: LineIndex, loc: tuple, message: str):
    from rfcheck.spec import Problem

    path = ""
    for part in loc:
        path += f"[{part}]" if isinstance(part, int) else (("." if path else "") + str(part))
    return Problem(file, path, lines.line_of(loc), message)


def _number(value) -> float | None:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    v = float(value)
    return v if math.isfinite(v) else None


def parse_tables(raw: dict, text: str, file: str, origin: str, sha256: str = ""
                 ) -> dict[str, ReferenceTable]:
    """Validate parsed TOML `raw` (from `text`) as reference-level tables.

    Raises :class:`rfcheck.spec.InputError` listing every problem (`file` names the file in
    messages). Values are never echoed: messages say what was expected."""
    from rfcheck.spec import InputError

    lines = LineIndex(text)
    problems = []

    def fail(loc, msg):
        problems.append(_problem(file, lines, loc, msg))

    tables: dict[str, ReferenceTable] = {}
    if not raw:
        fail((), "no reference-level table in the file; expected at least one [\"table-id\"] table")
    for tid, t in raw.items():
        if not isinstance(t, dict):
            fail((tid,), "expected a table with title, standard, edition, population, scope, "
                         "averaging_time, confidence and segments")
            continue
        for key in sorted(set(t) - set(_TEXT_KEYS) - {"segments"}):
            fail((tid, key), "unknown key; expected one of: " + ", ".join(_TEXT_KEYS + ("segments",)))
        for key in _TEXT_KEYS:
            if key not in t:
                fail((tid,), f"required key '{key}' is missing")
            elif not (isinstance(t[key], str) and t[key].strip()):
                fail((tid, key), "expected a non-empty string")
        if isinstance(t.get("scope"), str) and t["scope"] not in _SCOPES:
            fail((tid, "scope"), "expected \"whole-body\" or \"local\"")
        segs = t.get("segments")
        if not (isinstance(segs, list) and segs):
            fail((tid, "segments") if "segments" in t else (tid,),
                 "expected a non-empty list of segments { f_min, f_max, quantity, coefficient, "
                 "exponent }")
            continue
        out: list[LevelSegment] = []
        for i, seg in enumerate(segs):
            loc = (tid, "segments", i)
            if not isinstance(seg, dict):
                fail(loc, "expected an inline table { f_min, f_max, quantity, coefficient, exponent }")
                continue
            for key in sorted(set(seg) - _SEGMENT_KEYS):
                fail(loc + (key,), "unknown key; expected f_min, f_max, quantity, coefficient, "
                                   "exponent, frequency_unit")
            bad = False
            vals = {}
            for key in ("f_min", "f_max", "coefficient", "exponent"):
                if key not in seg:
                    fail(loc, f"required key '{key}' is missing")
                    bad = True
                    continue
                v = _number(seg[key])
                if v is None:
                    fail(loc + (key,), "expected a finite number" + (" in Hz" if key.startswith("f_") else ""))
                    bad = True
                vals[key] = v
            quantity = seg.get("quantity")
            if quantity not in ("S", "E", "H"):
                fail(loc + ("quantity",) if "quantity" in seg else loc,
                     "expected quantity \"S\" (W/m^2), \"E\" (V/m) or \"H\" (A/m)")
                bad = True
            unit = seg.get("frequency_unit", "MHz")
            if unit not in _FREQUENCY_UNITS:
                fail(loc + ("frequency_unit",), "expected \"Hz\", \"kHz\", \"MHz\" or \"GHz\"")
                bad = True
            if bad:
                continue
            if vals["f_min"] < 0:
                fail(loc + ("f_min",), "expected a frequency ≥ 0 Hz")
                continue
            if not vals["f_max"] > vals["f_min"]:
                fail(loc + ("f_max",), "expected f_max above f_min")
                continue
            if not vals["coefficient"] > 0:
                fail(loc + ("coefficient",), "expected a positive coefficient")
                continue
            for j, other in enumerate(out):
                if (other.quantity == quantity and vals["f_min"] < other.f_max
                        and other.f_min < vals["f_max"]):
                    fail(loc, f"overlaps segment {j} of the same quantity {quantity}")
            out.append(LevelSegment(vals["f_min"], vals["f_max"], quantity, vals["coefficient"],
                                    vals["exponent"], _FREQUENCY_UNITS[unit]))
        if any(isinstance(t.get(k), str) and t[k].strip() for k in _TEXT_KEYS) and out:
            tables[tid] = ReferenceTable(
                tid, *(str(t.get(k, "")) for k in _TEXT_KEYS), segments=tuple(out),
                origin=origin, sha256=sha256)
    if problems:
        raise InputError(problems)
    return tables


@functools.lru_cache(maxsize=1)
def shipped_tables() -> dict[str, ReferenceTable]:
    """The tables shipped in rfcheck/data/exposure.toml (validated like a site file)."""
    text = resources.files("rfcheck.data").joinpath("exposure.toml").read_text(encoding="utf-8")
    return parse_tables(tomllib.loads(text), text, "rfcheck/data/exposure.toml", "shipped")


def shipped_table(table_id: str) -> ReferenceTable:
    tables = shipped_tables()
    if table_id not in tables:
        raise ValueError(f"unknown reference-level table '{table_id}'; known: "
                         f"{', '.join(sorted(tables))}")
    return tables[table_id]


def site_file_path(spec_path: Path, name: str) -> tuple[Path | None, str]:
    """The site table file `name` next to the spec, or (None, why it is refused)."""
    if not name or name != Path(name).name or name in (".", "..") or "\\" in name:
        return None, ("give the bare name of a file in the same folder as the spec "
                      "(no folders, no '..')")
    folder = spec_path.resolve().parent
    path = folder / name
    try:
        st = os.lstat(path)
    except FileNotFoundError:
        return None, f"file not found next to the spec ({folder})"
    except OSError as exc:
        return None, f"cannot read the file ({exc.strerror or exc})"
    if stat.S_ISLNK(st.st_mode):
        return None, "the file is a symbolic link; give a regular file next to the spec"
    if not stat.S_ISREG(st.st_mode):
        return None, "not a regular file; give a TOML file next to the spec"
    if st.st_size > MAX_SITE_FILE_BYTES:
        return None, (f"the file is larger than {MAX_SITE_FILE_BYTES // 1024} kB; a reference-level "
                      "table is a few kB")
    return path, ""


def read_site_tables(path: Path) -> dict[str, ReferenceTable]:
    """Read a site table file already accepted by :func:`site_file_path` (through the guards of
    :mod:`rfcheck.inputfiles`: regular file, size limit, UTF-8, bounded nesting)."""
    from rfcheck.spec import _read_toml

    raw, text = _read_toml(path, "site table")
    data = text.encode("utf-8")
    return parse_tables(raw, text, str(path), path.name, hashlib.sha256(data).hexdigest())
