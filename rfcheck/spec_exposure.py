"""The [exposure] section of a spec: cross-checks and conversion to the frozen model.

Kept apart from :mod:`rfcheck.spec` (which holds the validation models) because it reads a
second file, the optional site reference-level table, with the same error discipline.

Leak models (DEVELOPERS.md, "Exposure"):

* ``model = "survey"``: one reading as ``power_density`` + ``at`` (+ ``feed``,
  ``forward_power``, ``size``) or several as ``readings = [...]``;
* ``model = "derived"``: ``paths = [...]``, each a seam (``attenuation`` in dB, ``size``) or
  an aperture (``shape``, ``diameter`` or ``width``/``height``, ``depth``, ``count``,
  ``size``).

Not declared, the model follows from the keys given (readings or paths).
"""

from __future__ import annotations

import math

from rfcheck import model as m

__all__ = ["exposure_model"]


def _db(ratio: float) -> float:
    return 10.0 * math.log10(ratio)


def _table(chk, spec, base: tuple) -> m.ReferenceTable | None:
    from rfcheck.levels import read_site_tables, shipped_tables, site_file_path
    from rfcheck.spec import InputError

    if spec.table_file is not None:
        path, why = site_file_path(chk.path, spec.table_file)
        if path is None:
            chk.fail(base + ("table_file",), why)
            return None
        try:
            tables = read_site_tables(path)
        except InputError as exc:
            chk.fail(base + ("table_file",), f"the site table {path.name} has "
                                             f"{len(exc.problems)} problem(s), listed below")
            chk.problems.extend(exc.problems)
            return None
        where = f"site table {path.name}"
    else:
        tables, where = shipped_tables(), "the shipped tables"
    if spec.table is None:
        if spec.table_file is not None and len(tables) == 1:
            return next(iter(tables.values()))
        chk.fail(base + (("table",) if spec.table_file is None else ("table_file",)),
                 "name the reference-level table with `table`; "
                 f"{where} hold: {', '.join(sorted(tables))}")
        return None
    if spec.table not in tables:
        chk.fail(base + ("table",), f"unknown reference-level table '{spec.table}'; "
                                    f"{where} hold: {', '.join(sorted(tables))}")
        return None
    return tables[spec.table]


def _feed_ref(chk, feed, feed_ids: set[str], loc: tuple) -> None:
    if feed is not None and feed not in feed_ids:
        chk.fail(loc, f"no feed '{feed}'; feeds are: {', '.join(sorted(feed_ids))}")


def _survey(chk, leak, feed_ids, loc) -> m.Leak | None:
    shorthand = leak.power_density is not None or leak.at is not None
    if shorthand and leak.readings:
        chk.fail(loc, "give one reading as power_density and at, or several as readings, "
                      "not both")
        return None
    if leak.paths:
        chk.fail(loc + ("paths",), "leak paths belong to model = \"derived\"; a survey gives "
                                   "readings")
    if shorthand:
        if leak.power_density is None or leak.at is None:
            chk.fail(loc, "a survey reading needs both power_density and at")
            return None
        _feed_ref(chk, leak.feed, feed_ids, loc + ("feed",))
        return m.Leak("survey", (m.SurveyReading(leak.power_density, leak.at, leak.feed,
                                                 leak.forward_power, leak.size),))
    for key in ("feed", "forward_power", "size"):
        if getattr(leak, key) is not None:
            chk.fail(loc + (key,), "belongs to a single reading (with power_density and at); "
                                   "give it inside each of readings")
    if not leak.readings:
        chk.fail(loc, "a survey needs a reading: power_density and at, or readings = [...]")
        return None
    for i, r in enumerate(leak.readings):
        _feed_ref(chk, r.feed, feed_ids, loc + ("readings", i, "feed"))
    return m.Leak("survey", tuple(m.SurveyReading(r.power_density, r.at, r.feed,
                                                  r.forward_power, r.size)
                                  for r in leak.readings))


def _path(chk, p, feed_ids, loc) -> m.LeakPath | None:
    for f in p.feeds:
        _feed_ref(chk, f, feed_ids, loc + ("feeds",))
    geometry = ("shape", "diameter", "width", "height", "depth")
    if p.kind == "seam":
        bad = [k for k in geometry if getattr(p, k) is not None] + (["count"] if p.count != 1 else [])
        for k in bad:
            chk.fail(loc + (k,), "a seam has a declared attenuation, not a geometry; use "
                                 "kind = \"aperture\" for tubes below cutoff")
        if p.attenuation is None:
            chk.fail(loc, 'a seam needs its attenuation below the forward power, e.g. '
                          'attenuation = "60 dB"')
            return None
        if not p.attenuation > 1.0:
            chk.fail(loc + ("attenuation",), "expected an attenuation above 0 dB (the leak "
                                             "level below the forward power, as a positive "
                                             "number of dB)")
            return None
        if p.size is None:
            chk.fail(loc, "a seam needs its size: the largest dimension of the leaking joint "
                          "(e.g. the flange opening or the seam length)")
            return None
        if bad:
            return None
        return m.LeakPath(p.id, "seam", p.size, tuple(p.feeds), attenuation_db=_db(p.attenuation))
    if p.attenuation is not None:
        chk.fail(loc + ("attenuation",), "an aperture's attenuation follows from its geometry; "
                                         "declare a measured attenuation as kind = \"seam\"")
    if p.shape is None or p.depth is None:
        chk.fail(loc, "an aperture needs shape (\"circular\" or \"rectangular\"), its cell "
                      "dimensions and depth")
        return None
    if p.shape == "circular":
        if p.diameter is None or p.width is not None or p.height is not None:
            chk.fail(loc + ("diameter",), "a circular cell needs diameter (and no width or height)")
            return None
        cell = p.diameter
    else:
        if p.width is None or p.height is None or p.diameter is not None:
            chk.fail(loc + ("width",), "a rectangular cell needs width and height (and no "
                                       "diameter)")
            return None
        cell = math.hypot(p.width, p.height)
    size = p.size
    if size is None:
        if p.count > 1:
            chk.fail(loc, f"{p.count} cells: give size, the largest dimension of the panel "
                          "(it sets the far-field distance)")
            return None
        size = cell
    elif size < cell:
        chk.fail(loc + ("size",), "size is smaller than one cell; give the largest dimension "
                                  "of the whole leaking area")
        return None
    width, height = p.width, p.height
    if width is not None and height is not None and height > width:
        width, height = height, width
    return m.LeakPath(p.id, "aperture", size, tuple(p.feeds), shape=p.shape,
                      diameter=p.diameter, width=width, height=height, depth=p.depth,
                      count=p.count)


def _derived(chk, leak, feed_ids, loc) -> m.Leak | None:
    for key in ("power_density", "at", "feed", "forward_power", "size"):
        if getattr(leak, key) is not None:
            chk.fail(loc + (key,), "a survey key; model = \"derived\" takes paths")
    if leak.readings:
        chk.fail(loc + ("readings",), "survey readings; model = \"derived\" takes paths")
    if not leak.paths:
        chk.fail(loc, "a derived leak needs paths = [...]: seams and apertures")
        return None
    chk.unique(leak.paths, loc + ("paths",), "leak path")
    paths = [_path(chk, p, feed_ids, loc + ("paths", i)) for i, p in enumerate(leak.paths)]
    if any(p is None for p in paths):
        return None
    return m.Leak("derived", paths=tuple(paths))


def exposure_model(chk, spec, feed_ids: set[str]) -> m.Exposure | None:
    """Check the [exposure] section (problems go to `chk`, the spec's cross-checker) and
    build its model; None when a problem was found."""
    base = ("exposure",)
    before = len(chk.problems)
    table = _table(chk, spec, base)
    leak = None
    if spec.leak is not None:
        lk, loc = spec.leak, base + ("leak",)
        kind = lk.model or ("derived" if lk.paths else "survey")
        leak = _derived(chk, lk, feed_ids, loc) if kind == "derived" else _survey(chk, lk, feed_ids, loc)
    area = None
    if spec.controlled_area is not None:
        ca = spec.controlled_area
        if ca.z.start >= ca.z.end:
            chk.fail(base + ("controlled_area", "z"), "start must be below end")
        area = m.ControlledArea(ca.z.start, ca.z.end, ca.radius)
    if len(chk.problems) > before or table is None:
        return None
    return m.Exposure(table, leak, spec.occupied_distance, area, spec.cryogenic_magnet)
