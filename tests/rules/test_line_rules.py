"""line.breakdown and line.waveguide-band against closed forms and the P_max table.

Sources beside each check: reference-values.md §3 (EIA sizes, cutoffs) and §5 (TE10 power
capacity with E_bd = 3 MV/m, air at 1 atm, common practice); Pozar, Microwave Engineering,
4th ed., §2.3 (standing wave), §3.3 (TE10: E0 = √(4 Z P/(ab))), §3.4 (circular-guide Bessel
zeros p'11 = 1.841, p01 = 2.405, table 3.3/3.4), §3.5 (coaxial TE11 cutoff ≈ 2c/(π(d + D))).
"""

from __future__ import annotations

import dataclasses
import math
import re
from pathlib import Path

import pytest

from rfcheck.analysis.envelope import Envelope
from rfcheck.findings import Status
from rfcheck.model import Feed, Launch, Material, Window, WindowLayer
from rfcheck.physics.constants import C, ETA0
from rfcheck.rules.context import Context
from rfcheck.rules.registry import get_rule

DEMO = Path(__file__).resolve().parents[2] / "examples" / "bench-ecr-reactor.toml"
E_AIR = 3.0e6  # V/m, air at 1 atm (reference-values §5, common practice)
INCH = 25.4e-3  # m, exact


def make_feed(line, f, tol=0.0, power=1.5e3, cold_gamma=0.0):
    """A feed whose unlit cavity is declared matched (|Γ_cold| = 0 by default), so that the
    ignition state of line.breakdown sees the matched line of the closed forms."""
    return Feed("main", f, tol, power, 1.0, None, line, Launch(0.0, 1, "R", 0.0), "ecr",
                cold_cavity_gamma=cold_gamma)


def evaluate(base, rule_id, policy, feed, windows=(), materials=(), state=None, **overrides):
    """The findings of one rule; with `state` ("running"/"ignition") the one of that state."""
    model = dataclasses.replace(base, feeds=(feed,), windows=tuple(windows),
                                materials=tuple(materials))
    rule = get_rule(rule_id)
    opts = policy.option_values(rule) | overrides
    ctx = Context(model, Envelope.of(model)).for_rule(rule.id, rule.severity)
    out = list(rule.func(ctx, **opts))
    if state is not None:
        out = [f for f in out if f.subject.endswith(state)]
    return out


def context_of(base, feed, windows=(), materials=()):
    model = dataclasses.replace(base, feeds=(feed,), windows=tuple(windows),
                                materials=tuple(materials))
    return Context(model, Envelope.of(model))


# ----------------------------------------------------------------------------- line.breakdown

@pytest.mark.parametrize("line, f, a, b, p_max", [
    # reference-values §5 table (4 significant figures; WR-28 only 2)
    pytest.param("WR-340", 2.45e9, 3.400 * INCH, 1.700 * INCH, 15.72e6, id="WR-340 @ 2.45 GHz 15.72 MW"),
    pytest.param("WR-430", 2.45e9, 4.300 * INCH, 2.150 * INCH, 29.51e6, id="WR-430 @ 2.45 GHz 29.51 MW"),
    pytest.param("WR-284", 3.0e9, 2.840 * INCH, 1.340 * INCH, 10.58e6, id="WR-284 @ 3.0 GHz 10.58 MW"),
    pytest.param("WR-90", 10e9, 0.900 * INCH, 0.400 * INCH, 1.047e6, id="WR-90 @ 10 GHz 1.047 MW"),
    pytest.param("WR-62", 14.5e9, 0.622 * INCH, 0.311 * INCH, 0.564e6, id="WR-62 @ 14.5 GHz 0.564 MW"),
])
def test_peak_field_at_table_p_max_is_the_air_breakdown_field(base_model, policy, line, f, a, b,
                                                              p_max):
    # at P = P_max (matched, no window) the peak field equals E_bd: margin 0 with factor 1
    (fd,) = evaluate(base_model, "line.breakdown", policy, make_feed(line, f, power=p_max),
                     state="ignition", safety_factor=1.0)
    assert fd.measured.value == pytest.approx(E_AIR, rel=2e-3)  # table rounding
    assert fd.limit.value == pytest.approx(E_AIR)
    # the closed form E0 = √(4 Z P/(ab)) with Z = η0/√(1 − (c/2af)²) (Pozar §3.3)
    z = ETA0 / math.sqrt(1 - (C / (2 * a * f)) ** 2)
    assert fd.measured.value == pytest.approx(math.sqrt(4 * z * p_max / (a * b)), rel=1e-9)
    # the message quotes the theoretical P_max itself (table value, 3–4 significant figures)
    m = re.search(r"P_max of matched \S+ ([0-9.]+) ([kM])W", fd.message)
    assert m, fd.message
    quoted = float(m.group(1)) * {"k": 1e3, "M": 1e6}[m.group(2)]
    assert quoted == pytest.approx(p_max, rel=2e-3)


@pytest.mark.parametrize("power, status", [
    pytest.param(15.72e6 / 4 * 0.99, Status.PASS, id="just under P_max/s² (s = 2)"),
    pytest.param(15.72e6 / 4 * 1.01, Status.FAIL, id="just over P_max/s² (s = 2)"),
])
def test_default_safety_factor_two_quarters_the_power(base_model, policy, power, status):
    # default s = 2 in field (reference-values §5: practical factor 2–4, common practice)
    (fd,) = evaluate(base_model, "line.breakdown", policy, make_feed("WR-340", 2.45e9, power=power),
                     state="ignition")
    assert fd.limit.value == pytest.approx(E_AIR / 2)
    assert fd.status is status


def test_standing_wave_of_a_quarter_wave_window_raises_the_peak_field(base_model, policy):
    # quarter-wave lossless alumina (ε 9.8) in WR-340: VSWR = (β_d/β_0)² (Pozar §2.5, §3.3);
    # the peak field is (1 + |Γ|) E0 (Pozar §2.3)
    a, b, f, p = 3.4 * INCH, 1.7 * INCH, 2.45e9, 1.5e3
    fc = C / (2 * a)
    beta = [2 * math.pi / C * math.sqrt(e * f * f - fc * fc) for e in (1.0, 9.8)]
    s = (beta[1] / beta[0]) ** 2
    g = (s - 1) / (s + 1)
    d = math.pi / 2 / beta[1]
    mat = Material("alumina-lossless", 9.8, 0.0, source="test material", permittivity_range=(9.8, 9.8))
    win = Window("w", "main", 0.0, (WindowLayer("alumina-lossless", d),))
    feed = make_feed("WR-340", f, power=p)
    (fd,) = evaluate(base_model, "line.breakdown", policy, feed, windows=[win], materials=[mat],
                     state="running")
    e0 = math.sqrt(4 * ETA0 / math.sqrt(1 - (fc / f) ** 2) * p / (a * b))
    # running state: the window's |Γ| plus the plasma's returned amplitude (load.reflected-
    # power's bound, computed independently here from the window closed form)
    from rfcheck.analysis.load import running_gamma

    running = running_gamma(context_of(base_model, feed, [win], [mat]), feed)
    assert running.window == pytest.approx(g, rel=1e-9)
    bound = min(1.0, g + running.plasma)
    assert fd.measured.value == pytest.approx((1 + bound) * e0, rel=1e-9)
    assert fd.worst_case["gamma"].value == pytest.approx(bound, rel=1e-9)
    assert "vacuum" not in fd.message and "(w)" in fd.message and "upper bound" in fd.message


@pytest.mark.parametrize("cold, expected", [
    pytest.param(None, 2.0, id="undeclared cold cavity: full standing wave, 2 E0 (Pozar §2.3)"),
    pytest.param(0.5, 1.5, id="|Γ_cold| = 0.5: 1.5 E0 (Pozar §2.3)"),
])
def test_ignition_state_doubles_the_peak_field_at_full_reflection(base_model, policy, cold,
                                                                   expected):
    a, b, f, p = 3.4 * INCH, 1.7 * INCH, 2.45e9, 1.5e3
    fc = C / (2 * a)
    e0 = math.sqrt(4 * ETA0 / math.sqrt(1 - (fc / f) ** 2) * p / (a * b))  # Pozar §3.3
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("WR-340", f, power=p, cold_gamma=cold), state="ignition")
    assert fd.measured.value == pytest.approx(expected * e0, rel=1e-9)
    assert fd.details["state"] == "ignition"
    assert ("not declared" in fd.message) is (cold is None)


def test_breakdown_worst_point_is_the_lowest_frequency(base_model, policy):
    # Z_TE10 rises towards cutoff, so E0 is largest at f − tolerance (Pozar §3.3)
    for fd in evaluate(base_model, "line.breakdown", policy,
                       make_feed("WR-340", 2.45e9, tol=50e6, power=1e6)):
        assert fd.worst_case["frequency"].value == pytest.approx(2.40e9)


@pytest.mark.parametrize("line", ["free-space"])  # coaxial lines: tests/rules/test_line_coax.py
def test_breakdown_not_applicable_without_te10_formula(base_model, policy, line):
    (fd,) = evaluate(base_model, "line.breakdown", policy, make_feed(line, 2.45e9))
    assert fd.status is Status.NOT_APPLICABLE


def test_circular_guide_breakdown_from_the_te11_axis_field(base_model, policy):
    # matched TE11 in a 90 mm guide at 2.45 GHz: the axial field from Pozar's TE11 fields
    # and power flow (§3.4), E² = Z p'² P / (π a² (p'² − 1) J1(p')²); at P_max it is E_bd
    from scipy.special import jnp_zeros, jv

    d, f = 0.09, 2.45e9
    p1 = float(jnp_zeros(1, 1)[0])
    a = d / 2
    z = ETA0 / math.sqrt(1 - (p1 * C / (2 * math.pi * a * f)) ** 2)
    p_max = math.pi * a * a * E_AIR**2 * (p1**2 - 1) * jv(1, p1) ** 2 / (z * p1**2)
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("circular:90 mm", f, power=p_max), state="ignition",
                     safety_factor=1.0)
    assert fd.measured.value == pytest.approx(E_AIR, rel=1e-9)
    assert "circular 90 mm" in fd.message


# ----------------------------------------------------------------------------- line.waveguide-band

def _circular(d, p):
    return p * C / (math.pi * d)  # Pozar §3.4: f_c = p c/(2π r)


TM01_90 = _circular(0.09, 2.405)  # 2.551 GHz (p01 = 2.405, Pozar table 3.4)
TE11_90 = _circular(0.09, 1.841)  # 1.953 GHz (p'11 = 1.841, Pozar table 3.3)
TE11_COAX = 2 * C / (math.pi * (16.866e-3 + 38.786e-3))  # 3.430 GHz, EIA 1-5/8 (Pozar §3.5)


# the binding edge of the recommended band: the published EIA RS-261-B band edge of a standard
# guide (WR-340 2.20 GHz, WR-284 2.60 GHz; reference-values §3, H; was 1.25 f_c = 2.170 and
# 2.597 GHz before the bands were read from the table) or 0.95 of the next cutoff (common
# practice); None where only the verdict is checked
@pytest.mark.parametrize("line, f, status, edge", [
    pytest.param("WR-340", 2.45e9, Status.PASS, 2.20e9, id="WR-340 @ 2.45 GHz in band (EIA 2.20-3.30)"),
    pytest.param("WR-284", 2.45e9, Status.WARN, 2.60e9, id="WR-284 @ 2.45 GHz below band (EIA 2.60-3.95)"),
    pytest.param("WR-62", 12.2e9, Status.WARN, 12.4e9,
                 id="WR-62 @ 12.2 GHz below the EIA band 12.4-18.0 (above 1.25 f_c = 11.86)"),
    pytest.param("circular:90 mm", 2.3e9, Status.PASS, 0.95 * TM01_90, id="circular 90 mm @ 2.3 GHz"),
    pytest.param("circular:90 mm", 2.5e9, Status.WARN, 0.95 * TM01_90,
                 id="circular 90 mm @ 2.5 GHz above 0.95 f_TM01"),
    pytest.param("circular:90 mm", 2.6e9, Status.FAIL, 0.95 * TM01_90,
                 id="circular 90 mm @ 2.6 GHz above f_TM01"),
    pytest.param("circular:90 mm", 0.99 * TE11_90, Status.FAIL, None,
                 id="circular 90 mm below f_TE11"),
    pytest.param("EIA-1-5/8", 2.45e9, Status.PASS, 0.95 * TE11_COAX, id="coax 1-5/8 @ 2.45 GHz"),
    pytest.param("EIA-1-5/8", 1.01 * TE11_COAX, Status.FAIL, 0.95 * TE11_COAX,
                 id="coax 1-5/8 above TE11"),
])
def test_waveguide_band_for_every_line_kind(base_model, policy, line, f, status, edge):
    (fd,) = evaluate(base_model, "line.waveguide-band", policy, make_feed(line, f))
    assert fd.status is status, fd.message
    if edge is not None:
        # coax: the mean-circumference TE11 form (Pozar §3.5), about 2 % below the exact root
        assert fd.limit.value == pytest.approx(edge, rel=1e-3)


def test_waveguide_band_coax_requirement_names_the_higher_mode(base_model, policy):
    (fd,) = evaluate(base_model, "line.waveguide-band", policy, make_feed("EIA-1-5/8", 2.45e9))
    assert "TE11 cutoff" in fd.requirement and "()" not in fd.message
    (fw,) = evaluate(base_model, "line.waveguide-band", policy, make_feed("WR-62", 14.5e9))
    assert "12.4–18 GHz, EIA RS-261-B band" in fw.message and "EIA RS-261-B band" in fw.requirement
    (fs,) = evaluate(base_model, "line.waveguide-band", policy, make_feed("free-space", 28e9))
    assert fs.status is Status.NOT_APPLICABLE
