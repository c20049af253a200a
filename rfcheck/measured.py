"""Readers for measured magnet field files (CSV), with the same error discipline as the spec.

Two formats, both plain CSV with one header line whose cells carry the unit in brackets or
parentheses (``z [mm]``, ``B (G)``); lines starting with ``#`` and blank lines are skipped;
the delimiter is a comma (a semicolon or a tab is accepted when the header uses it).

* On-axis table: columns ``z`` and ``B`` (also spelled ``Bz``/``B_z``), any order. z must
  be strictly monotonic; a descending table is reversed. Returns z ascending, in m and T.
* 2-D axisymmetric map, long format: columns ``r``, ``z``, ``Br`` and ``Bz`` (``B_r``,
  ``B_z`` also accepted), one row per grid node in any order. The nodes must form a full
  rectilinear grid (every r with every z exactly once; the spacing need not be uniform).
  Returns r and z ascending and br, bz shaped (len(r), len(z)).

Every problem raises :class:`MeasuredDataError` with the file path, the 1-based line of the
file (or None when no single line is at fault) and a message that says what was found and
what was expected. :func:`check_coverage` says whether a table or map covers the chamber.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from rfcheck.limits import range_for
from rfcheck.units import UnitError, scale_to_si

__all__ = [
    "MeasuredDataError",
    "Coverage",
    "read_axis_table",
    "read_field_map",
    "check_coverage",
    "MIN_POINTS",
    "MAX_ROWS",
]

#: fewest distinct values along each axis (cubic interpolation needs four)
MIN_POINTS = 4

_HEADER_CELL = re.compile(r"^\s*([A-Za-z][A-Za-z_ ]*?)\s*[\[(]\s*([^\])]*?)\s*[\])]\s*$")
_BARE_NAME = re.compile(r"^\s*([A-Za-z][A-Za-z_ ]*?)\s*$")

# accepted column spellings (lower case, spaces removed) -> canonical name
_TABLE_COLUMNS = {"z": "z", "b": "B", "bz": "B", "b_z": "B"}
_MAP_COLUMNS = {"r": "r", "z": "z", "br": "Br", "b_r": "Br", "bz": "Bz", "b_z": "Bz"}
_DIMENSION = {"r": "length", "z": "length", "B": "magnetic_field", "Br": "magnetic_field",
              "Bz": "magnetic_field"}
_EXAMPLE_UNIT = {"length": "mm", "magnetic_field": "G"}


class MeasuredDataError(ValueError):
    """A measured field file could not be read; `line` is 1-based (None: whole file)."""

    def __init__(self, path: str | Path, line: int | None, message: str):
        self.path = str(path)
        self.line = line
        self.message = message
        where = f"{self.path}:{line}" if line is not None else self.path
        super().__init__(f"{where}: {message}")


@dataclass(frozen=True)
class Coverage:
    """Whether measured data cover the chamber; `problems` says what is missing (SI in text)."""

    covers: bool
    problems: tuple[str, ...] = ()


# --------------------------------------------------------------------------- parsing


#: most data rows accepted in a measured file (a 500 x 500 map), so work stays bounded
MAX_ROWS = 250_000


def read_text(path: str | Path) -> tuple[str, bytes]:
    """The text and bytes of a measured file, through the guards of rfcheck.inputfiles."""
    from rfcheck.inputfiles import InputFileError, read_input

    try:
        got = read_input(path, "measured field file")
    except InputFileError as exc:
        raise MeasuredDataError(path, None, exc.message) from None
    return got.text, got.data


def _data_lines(path: Path, text: str | None = None):
    """Yield (line number, text) of non-blank, non-comment lines (of `text` if given, else of
    the file read through :func:`read_text`)."""
    if text is None:
        text, _ = read_text(path)
    if text.startswith("\ufeff"):
        text = text[1:]
    # only \n (and \r\n) end a line: the line numbers of messages match what editors show
    for number, line in enumerate(text.split("\n"), start=1):
        stripped = line.strip()
        if stripped and not stripped.startswith("#"):
            yield number, stripped


def _delimiter(header: str) -> str:
    for d in (",", ";", "\t"):
        if d in header:
            return d
    return ","


def _parse_header(path: Path, line: int, cells: list[str], accepted: dict[str, str],
                  required: tuple[str, ...]) -> tuple[list[str], list[float]]:
    """Column names (canonical) and SI scale factors from the header cells."""
    expected = ", ".join(f"{n} [{_EXAMPLE_UNIT[_DIMENSION[n]]}]" for n in required)
    names: list[str] = []
    scales: list[float] = []
    for position, cell in enumerate(cells, start=1):
        m = _HEADER_CELL.match(cell)
        if not m:
            bare = _BARE_NAME.match(cell)
            if bare and bare.group(1).replace(" ", "").lower() in accepted:
                raise MeasuredDataError(
                    path, line, f"header column {position} ({accepted[bare.group(1).replace(' ', '').lower()]}) "
                    f"has no unit; expected a header such as '{expected}' (unit in brackets)")
            raise MeasuredDataError(
                path, line, f"header column {position} is not a name with a unit in brackets; "
                f"expected a header such as '{expected}'")
        key = m.group(1).replace(" ", "").lower()
        unit = m.group(2)
        if key not in accepted:
            raise MeasuredDataError(
                path, line, f"header column {position} names no known column; expected the "
                f"columns {expected}")
        name = accepted[key]
        if name in names:
            raise MeasuredDataError(path, line, f"column '{name}' appears twice in the header")
        if not unit:
            raise MeasuredDataError(
                path, line, f"column '{name}' has an empty unit; expected e.g. "
                f"'{name} [{_EXAMPLE_UNIT[_DIMENSION[name]]}]'")
        try:
            scales.append(scale_to_si(unit, _DIMENSION[name]))
        except UnitError as exc:
            what = ("is an unknown unit" if "unknown unit" in str(exc) else
                    f"is not a {_DIMENSION[name].replace('_', ' ')} unit")
            raise MeasuredDataError(
                path, line, f"column '{name}': the unit in brackets {what}; expected e.g. "
                f"'{name} [{_EXAMPLE_UNIT[_DIMENSION[name]]}]'") from None
        names.append(name)
    missing = [n for n in required if n not in names]
    if missing:
        raise MeasuredDataError(
            path, line, f"the header lacks the column(s) {', '.join(missing)}; expected the "
            f"columns {expected}")
    return names, scales


def _read_columns(path: str | Path, accepted: dict[str, str], required: tuple[str, ...],
                  text: str | None = None):
    """Read the CSV into SI columns; returns ({name: array}, line numbers array)."""
    path = Path(path)
    lines = _data_lines(path, text)
    try:
        header_line, header = next(lines)
    except StopIteration:
        raise MeasuredDataError(path, None, "the file has no header and no data; expected a "
                                "header line such as '" + ", ".join(required) + "' with units")
    delim = _delimiter(header)
    names, scales = _parse_header(path, header_line, header.split(delim), accepted, required)
    rows: list[list[float]] = []
    numbers: list[int] = []
    for number, text in lines:
        cells = text.split(delim)
        if len(cells) != len(names):
            raise MeasuredDataError(
                path, number, f"row has {len(cells)} cells; the header has {len(names)} "
                f"({', '.join(names)})")
        row = []
        for name, cell in zip(names, cells):
            cell = cell.strip()
            try:
                value = float(cell) if len(cell) <= 64 else math.nan
            except ValueError:
                raise MeasuredDataError(
                    path, number, f"column '{name}' does not hold a number; expected a "
                    "number such as 12.5 or -3e-2") from None
            if not math.isfinite(value):
                raise MeasuredDataError(
                    path, number, f"column '{name}' does not hold a finite number; expected a "
                    "number such as 12.5 or -3e-2")
            row.append(value)
        rows.append(row)
        numbers.append(number)
        if len(rows) > MAX_ROWS:
            raise MeasuredDataError(
                path, number, f"more than {MAX_ROWS} data rows; the most accepted (a map of "
                "500 x 500 nodes)")
    data = np.array(rows, dtype=float).reshape(len(rows), len(names))
    columns = {name: data[:, i] * scales[i] for i, name in enumerate(names)}
    for name, values in columns.items():
        rng = range_for(_DIMENSION[name])
        outside = np.nonzero(~(np.abs(values) <= rng.high))[0]
        if outside.size:
            raise MeasuredDataError(
                path, int(numbers[int(outside[0])]),
                f"column '{name}' holds a value outside {rng.shown} ({rng.reason}); expected "
                f"a {_DIMENSION[name].replace('_', ' ')} a real source can have (a unit slip?)")
    return path, columns, np.array(numbers, dtype=int)


# --------------------------------------------------------------------------- readers


def read_axis_table(path: str | Path, text: str | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Read a measured on-axis field table; returns (z in m ascending, B_z in T).

    The table must hold at least :data:`MIN_POINTS` rows and z must be strictly monotonic
    (a descending file is reversed). Raises :class:`MeasuredDataError`.
    """
    path, cols, lines = _read_columns(path, _TABLE_COLUMNS, ("z", "B"), text)
    z, b = cols["z"], cols["B"]
    if len(z) < MIN_POINTS:
        raise MeasuredDataError(
            path, None, f"the table has {len(z)} data row(s); expected at least {MIN_POINTS}")
    dz = np.diff(z)
    sign = 1.0 if dz[0] > 0 else -1.0
    bad = np.nonzero(~(dz * sign > 0))[0]
    if bad.size:
        i = int(bad[0]) + 1
        what = "repeats" if dz[i - 1] == 0 else "breaks the monotonic order of"
        raise MeasuredDataError(
            path, int(lines[i]), f"z = {z[i]:.6g} m {what} the axis (previous row z = "
            f"{z[i - 1]:.6g} m); expected z strictly increasing or strictly decreasing")
    if sign < 0:
        z, b = z[::-1], b[::-1]
    return z.copy(), b.copy()


def read_field_map(path: str | Path, text: str | None = None
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Read a measured 2-D axisymmetric map (long format); returns (r, z, br, bz) in m and T.

    r and z ascending; br and bz shaped (len(r), len(z)). The rows must form a full
    rectilinear grid with at least :data:`MIN_POINTS` distinct values of r and of z, and no
    negative r. Raises :class:`MeasuredDataError`.
    """
    path, cols, lines = _read_columns(path, _MAP_COLUMNS, ("r", "z", "Br", "Bz"), text)
    r_all, z_all = cols["r"], cols["z"]
    if len(r_all) == 0:
        raise MeasuredDataError(path, None, "the map has no data rows")
    negative = np.nonzero(r_all < 0)[0]
    if negative.size:
        i = int(negative[0])
        raise MeasuredDataError(path, int(lines[i]), f"r = {r_all[i]:.6g} m is negative; "
                                "expected the radius r >= 0 of an axisymmetric map")
    r = np.unique(r_all)
    z = np.unique(z_all)
    for name, axis in (("r", r), ("z", z)):
        if len(axis) < MIN_POINTS:
            raise MeasuredDataError(
                path, None, f"the map has {len(axis)} distinct value(s) of {name}; expected at "
                f"least {MIN_POINTS}")
    ir = np.searchsorted(r, r_all)
    iz = np.searchsorted(z, z_all)
    flat = ir * len(z) + iz
    seen = np.full(len(r) * len(z), -1, dtype=int)
    for row, k in enumerate(flat):
        if seen[k] >= 0:
            raise MeasuredDataError(
                path, int(lines[row]), f"the node (r = {r_all[row]:.6g} m, z = {z_all[row]:.6g} m)"
                f" appears again (first on line {int(lines[seen[k]])}); expected each grid node "
                "once")
        seen[k] = row
    if np.any(seen < 0):
        k = int(np.nonzero(seen < 0)[0][0])
        raise MeasuredDataError(
            path, None, f"the map is not a regular grid: {len(r_all)} rows for {len(r)} values "
            f"of r x {len(z)} values of z; the node (r = {r[k // len(z)]:.6g} m, "
            f"z = {z[k % len(z)]:.6g} m) is missing")
    br = np.empty(len(r) * len(z))
    bz = np.empty(len(r) * len(z))
    br[flat] = cols["Br"]
    bz[flat] = cols["Bz"]
    return r, z, br.reshape(len(r), len(z)), bz.reshape(len(r), len(z))


# --------------------------------------------------------------------------- coverage


def check_coverage(z, chamber, r=None, *, tolerance: float = 1e-9) -> Coverage:
    """Whether measured data cover the chamber.

    A table covers the chamber when its z range contains [z_start, z_end]; a map must in
    addition reach from the axis to the chamber radius in r. A map whose first radius is
    above zero covers the axis only if that radius is no larger than its first r step (the
    field is then interpolated across the axis using the symmetry of B_r and B_z).

    Parameters
    ----------
    z : array_like
        Axial positions of the data, m (ascending).
    chamber : rfcheck.model.Chamber
        The plasma chamber (radius, z_start, z_end in m).
    r : array_like, optional
        Radial positions of a map, m (ascending); None for an on-axis table.
    tolerance : float
        Slack in m for rounding in unit conversion.
    """
    z = np.asarray(z, dtype=float)
    problems = []
    if z.size == 0:
        return Coverage(False, ("the data hold no points",))
    if z[0] > chamber.z_start + tolerance or z[-1] < chamber.z_end - tolerance:
        problems.append(
            f"the data span z = {z[0]:.6g}..{z[-1]:.6g} m; the chamber spans "
            f"z = {chamber.z_start:.6g}..{chamber.z_end:.6g} m")
    if r is not None:
        r = np.asarray(r, dtype=float)
        if r[-1] < chamber.radius - tolerance:
            problems.append(
                f"the map reaches r = {r[-1]:.6g} m; the chamber radius is {chamber.radius:.6g} m")
        first_step = r[1] - r[0] if r.size > 1 else np.inf
        if r[0] > tolerance and r[0] > first_step + tolerance:
            problems.append(
                f"the map starts at r = {r[0]:.6g} m, more than one r step ({first_step:.6g} m) "
                "from the axis")
    return Coverage(not problems, tuple(problems))
