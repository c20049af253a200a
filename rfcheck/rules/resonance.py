"""Where the intended resonance of each feed lies in the magnet's field."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import ecr_field

from .context import Context
from .registry import Option, rule

#: harmonic number of the electron-cyclotron resonance each absorption mechanism relies on
ECR_HARMONIC = {"ecr": 1, "ecr-harmonic-2": 2}


@rule("resonance.ecr-in-chamber", severity=Severity.ERROR,
      summary="The ECR field of each ECR-heated feed is crossed on the axis inside the chamber.",
      options={"min_field_margin": Option(
          "ratio", "how far inside the on-axis field range B_res must lie, relative to B_res")},
      applies="feeds with absorption = ecr or ecr-harmonic-2")
def ecr_in_chamber(ctx: Context, *, min_field_margin: float) -> Iterator[Finding]:
    """What it checks
    For every current scale of the envelope (1 ± current tolerance) and every frequency of
    the feed's tolerance band, the on-axis |B|(z) between the chamber's end planes must take
    the resonance value B_res = h · 2π f m_e / e (h = 1 for ecr, 2 for ecr-harmonic-2 at half
    the field): min |B| ≤ B_res ≤ max |B|. The measured value is the smaller of
    (max |B| − B_res) and (B_res − min |B|), relative to B_res, at the worst envelope point;
    negative means the resonance is missing.

    Why it matters
    Without a resonance surface inside the plasma the wave has no collisionless absorption
    layer: power goes to the walls and windows or back to the generator, and the discharge is
    weak or unstable. A resonance that only just exists at nominal current disappears with a
    small magnet drift.

    Equation
    B_ECR = 2π f m_e / (h e) (non-relativistic; 87.5235 mT at 2.45 GHz, h = 1).

    Options
    min_field_margin: required relative margin (default 0 %: the envelope already spans the
    current and frequency tolerances).

    References
    NRL Plasma Formulary (2019), p. 28; R. Geller, Electron Cyclotron Resonance Ion Sources
    and ECR Plasmas (IOP 1996), ch. 1.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        h = ECR_HARMONIC.get(feed.absorption)
        requirement = f"min |B| ≤ B_res ≤ max |B| on axis, margin ≥ {min_field_margin:.0%}"
        if h is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' does not rely on an "
                                     "electron-cyclotron resonance")
            continue
        grid = ctx.envelope.grid(feed)
        b = ctx.axis_field()  # (ns, nz)
        b_lo = b.min(axis=1)[None, :, None]
        b_hi = b.max(axis=1)[None, :, None]
        b_res = ecr_field(grid.frequency, harmonic=h)
        rel = np.minimum(b_hi - b_res, b_res - b_lo) / b_res
        worst, where = grid.worst(rel, "min")
        margin = worst - min_field_margin
        passed = margin >= 0
        s_idx = 0
        if "current_scale" in where:
            s_idx = int(np.argmin(np.abs(ctx.envelope.current_scale - where["current_scale"].value)))
        f_w = where["frequency"].value if "frequency" in where else feed.frequency
        b_res_w = float(ecr_field(f_w, harmonic=h))
        lo, hi = float(b[s_idx].min()), float(b[s_idx].max())
        label = "ECR" if h == 1 else f"ECR harmonic {h}"
        if passed:
            msg = (f"{label} field {b_res_w * 1e3:.2f} mT lies within the on-axis range "
                   f"{lo * 1e3:.2f}–{hi * 1e3:.2f} mT (margin {worst:.1%})")
        elif worst < 0:
            side = "above the highest" if b_res_w > hi else "below the lowest"
            msg = (f"{label} field {b_res_w * 1e3:.2f} mT is {side} on-axis field in the chamber "
                   f"({lo * 1e3:.2f}–{hi * 1e3:.2f} mT): no resonance on axis")
        else:
            msg = (f"{label} field {b_res_w * 1e3:.2f} mT is inside {lo * 1e3:.2f}–{hi * 1e3:.2f} mT "
                   f"by only {worst:.1%} (required {min_field_margin:.0%})")
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(min_field_margin, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)
