"""Hand-built sources for the access, load and absorption rule tests (shared helpers).

Fields are given as an on-axis table that is linear in z (the cubic spline of linear data is
the line itself), so the field scale length L_B = B/|dB/dz| at a resonance is known exactly;
or as a uniform field.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from rfcheck.analysis.envelope import Envelope
from rfcheck.model import (AxisTable, Chamber, DensityProfile, Feed, IonShare, Launch, Magnet,
                           NeutralGas, Plasma, SourceInfo, SourceModel, Span, UniformField)
from rfcheck.physics.constants import C, TWO_PI
from rfcheck.rules.context import Context
from rfcheck.rules.policy import load_policy
from rfcheck.rules.registry import get_rule
from rfcheck.spec import load_spec

DEMO = Path(__file__).resolve().parents[2] / "examples" / "bench-ecr-reactor.toml"
POLICY = load_policy(None)
F0 = 2.45e9


def k0(f: float) -> float:
    return TWO_PI * f / C


def demo_model():
    return load_spec(DEMO).model


def linear_field(b_res: float, z_res: float, l_b: float, length: float) -> Magnet:
    """B_z(z) = b_res (1 + (z − z_res)/l_b) on the axis over the chamber (and a little beyond)."""
    z = np.linspace(-0.05 * length, 1.05 * length, 5)
    b = b_res * (1.0 + (z - z_res) / l_b)
    return Magnet((AxisTable("table", "table.csv", tuple(z), tuple(b)),))


def uniform_field(b: float) -> Magnet:
    return Magnet((UniformField("uniform", b),))


def model(magnet: Magnet, *, length: float, density: tuple[float, float],
          mode: str = "R", angle: float = 0.0, launch_z: float = 0.0, direction: int = 1,
          t_e: tuple[float, float] = (10.0, 10.0), profile: DensityProfile | None = None,
          neutral: NeutralGas | None = None, absorption: str = "ecr", f: float = F0,
          power: float = 1e3, max_reflected_power: float | None = None,
          windows: tuple = (), polarisation: str | None = "as-mode",
          e_angle: float | None = None, far_end: str | None = "open") -> SourceModel:
    """A single-feed source. By default the feed launches all its power in `mode`
    (polarisation "as-mode") and the far end is open (the wave leaves): the single wave of
    the closed-form references. Give polarisation=None / far_end=None for the undeclared
    (worst-case) behaviour."""
    plasma = Plasma(Span(*density), Span(*t_e), (IonShare("Ar+", 1.0),), neutral,
                    profile or DensityProfile())
    feed = Feed("main", f, 0.0, power, 1.0, max_reflected_power, "free-space",
                Launch(launch_z, direction, mode, angle, polarisation, e_angle), absorption)
    walls = (None, far_end) if direction > 0 else (far_end, None)
    return SourceModel(SourceInfo("test source"), plasma, Chamber(0.05, 0.0, length, (), *walls),
                       magnet, (feed,), windows)


def context(m: SourceModel) -> Context:
    """A run's context under the default policy (every rule selected, as in rfcheck.run)."""
    from rfcheck.rules.registry import all_rules

    ctx = Context(m, Envelope.of(m))
    ctx.selected_options.update({r.id: POLICY.option_values(r) for r in all_rules()})
    return ctx


def evaluate(ctx: Context, rule_id: str, **overrides):
    rule = get_rule(rule_id)
    opts = POLICY.option_values(rule) | overrides
    return list(rule.func(ctx.for_rule(rule.id, rule.severity), **opts))


def one(ctx: Context, rule_id: str, **overrides):
    (finding,) = evaluate(ctx, rule_id, **overrides)
    return finding


def step_reflection(n2: float) -> float:
    """|r| of a vacuum–medium step at normal incidence, (1 − n)/(1 + n) (Fresnel)."""
    n = math.sqrt(n2)
    return abs((1.0 - n) / (1.0 + n))
