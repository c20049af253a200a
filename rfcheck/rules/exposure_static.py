"""exposure.static-field-line: where the static fringe field falls to the implant-warning and
projectile levels (the analysis :func:`rfcheck.analysis.exposure.fringe_lines`), against the
controlled-area boundary."""

from __future__ import annotations

from collections.abc import Iterator

from rfcheck.analysis.exposure import fringe_lines
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import UniformField

from .context import Context
from .registry import Option, Range, rule

__all__ = ["static_field_line", "LEVEL_NAMES"]

#: subject words of the two lines
LEVEL_NAMES = {"implant_level": "implant-warning line", "projectile_level": "projectile line"}


def _place(c, axis: str) -> str:
    if c.status == "inside":
        return f"within {c.start:.3g} m of the {axis}"
    if c.status == "beyond-range":
        return f"beyond {c.distance:.3g} m"
    if c.status == "beyond-data":
        return f"beyond the end of the field data ({c.distance:.3g} m)"
    return f"{c.distance:.3g} m"


def _z(c, zc: float, sign: int) -> str:
    if c.status == "inside":
        return f"{zc + sign * c.start:.3g} m or closer"
    if c.status == "beyond-range":
        return f"beyond {zc + sign * c.distance:.3g} m"
    return f"{zc + sign * c.distance:.3g} m"


@rule("exposure.static-field-line", severity=Severity.ERROR,
      summary="The static field falls to the implant-warning and projectile levels inside the "
              "declared controlled area.",
      options={"implant_level": Option("magnetic_field", "|B| of the implant-warning line",
          valid=Range(0.0, 5e-4,
                      "a site may draw the implant line lower, not above the 0.5 mT action level "
                      "for active implanted devices (Directive 2013/35/EU, Annex II)", "mT", low_open=True)),
               "projectile_level": Option("magnetic_field", "|B| of the projectile line",
          valid=Range(0.0, 3e-3,
                      "a site may draw the projectile line lower, not above the 3 mT action level"
                      " (Directive 2013/35/EU, Annex II)", "mT", low_open=True))},
      applies="every source with a magnet of finite extent (not a uniform field)")
def static_field_line(ctx: Context, *, implant_level: float,
                      projectile_level: float) -> Iterator[Finding]:
    """What it checks
    From the magnet model, the distances along the axis (both ways from the magnet centre)
    and radially from the axis outside the magnet at which |B| falls to the implant-warning
    level and to the projectile level, at the worst current scale of the envelope; each line
    must lie inside the controlled-area boundary ([exposure] controlled_area: z range and
    radius). Not declared, the boundary is taken as the magnet's outer surface (the worst
    case: people may stand next to it), which every line outside the magnet exceeds.

    Why it matters
    Static fields above about 0.5 mT can upset active implanted medical devices; above a
    few mT near strong magnets, ferromagnetic tools and parts become projectiles. The lines
    are marked on the floor and the area controlled, under the site's rules.

    Equation
    |B| from the field model (coils, permanent magnets, measured data), no iron; the
    crossing is bracketed on a geometric grid and placed by log-log interpolation.

    Options
    implant_level: default 0.5 mT; projectile_level: default 3 mT (policy, with sources).

    References
    Directive 2013/35/EU, Annex II, action levels for static fields (from memory); ICNIRP,
    Guidelines on limits of exposure to static magnetic fields, Health Phys. 96(4) (2009)
    (from memory). The model has no iron: confirm the lines with a gaussmeter survey.
    """
    model = ctx.model
    if any(isinstance(s, UniformField) for s in model.magnet.sources):
        yield ctx.not_applicable("magnet", "static-field lines inside the controlled area",
                                 "the magnet includes a uniform field, which has no fringe in "
                                 "the model: give the coils or a measured map to place the lines")
        return
    levels = {"implant_level": implant_level, "projectile_level": projectile_level}
    lines = fringe_lines(ctx, levels)
    from rfcheck.magnet.fringe import magnet_extent

    z_lo, z_hi, r_out = magnet_extent(model.magnet, model.chamber)
    area = model.exposure.controlled_area if model.exposure is not None else None
    if area is None:
        bound = (z_lo, z_hi, r_out)
        bound_text = ("no controlled area declared: taken as the magnet's outer surface "
                      f"(z {z_lo:.3g}–{z_hi:.3g} m, r {r_out:.3g} m), the worst case")
    else:
        bound = (area.z_start, area.z_end, area.radius)
        bound_text = (f"controlled area z {area.z_start:.3g}–{area.z_end:.3g} m, "
                      f"r ≤ {area.radius:.3g} m")
    for name, level in levels.items():
        ext = lines[name]
        subject = f"magnet, {LEVEL_NAMES[name]}"
        requirement = f"|B| ≤ {level * 1e3:.3g} mT outside the controlled area"
        zc = ext.centre_z
        checks = [  # (direction, line's distance from its origin, boundary's, crossing)
            ("−z", ext.axial_low.distance, zc - bound[0], ext.axial_low),
            ("+z", ext.axial_high.distance, bound[1] - zc, ext.axial_high),
            ("radial", ext.radial.distance, bound[2], ext.radial),
        ]
        margins = []
        for direction, dist, limit, c in checks:
            inside = c.status == "inside"
            margins.append((limit - (min(dist, c.start) if inside else dist), direction, dist,
                            limit, c))
        margin, direction, dist, limit, worst = min(margins, key=lambda m: m[0])
        unknown = [d for _, d, _, _, c in margins if c.status in ("beyond-data", "beyond-range")]
        text = (f"|B| falls to {level * 1e3:.3g} mT on the axis at z = {_z(ext.axial_low, zc, -1)} "
                f"and z = {_z(ext.axial_high, zc, 1)} ({_place(ext.axial_low, 'centre')} and "
                f"{_place(ext.axial_high, 'centre')} from the magnet centre z = {zc:.3g} m), "
                f"radially at r = {_place(ext.radial, 'axis')} (at z = {ext.radial_z:.3g} m); "
                f"{bound_text}; worst current scale of the envelope, no iron modelled")
        details = {"level": level, "z_low": ext.z_low, "z_high": ext.z_high,
                   "radius": ext.radial.distance, "radial_z": ext.radial_z,
                   "status": {"-z": ext.axial_low.status, "+z": ext.axial_high.status,
                              "radial": ext.radial.status},
                   "controlled_area_declared": area is not None,
                   "field_evaluations": ext.points}
        common = dict(measured=Quantity(dist, "m"), limit=Quantity(limit, "m"),
                      margin=Quantity(margin, "m"), details=details,
                      worst_case={"direction_" + direction.replace("−", "minus-").replace("+", "plus-"):
                                  Quantity(dist, "m")})
        if margin < 0:
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"{text}: the line lies {-margin:.3g} m outside the "
                                      f"boundary ({direction}). Mark and control the area under "
                                      "the site's rules.", **common)
        elif unknown:
            yield ctx.finding(subject, requirement, passed=True, warn=True,
                              message=f"{text}: the line cannot be placed along "
                                      f"{', '.join(unknown)} (the field data end or the search "
                                      "ends first); survey with a gaussmeter.", **common)
        else:
            yield ctx.finding(subject, requirement, passed=True,
                              message=f"{text}: inside the boundary by {margin:.3g} m "
                                      f"({direction}). Confirm with a gaussmeter survey.",
                              **common)
