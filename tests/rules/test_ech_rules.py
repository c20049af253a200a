"""ech.* rules, window.disc-temperature and line.transmission-loss on variants of the bundled
examples, against closed forms: cutoff densities n_c = ε0 m_e ω²/e² (NRL Plasma Formulary)
and n_c/2 for the X mode at the second-harmonic layer (R cutoff X = 1 − Y at Y = 1/2; Stix,
Waves in Plasmas 1992, ch. 1); τ_X2 = 4π² (L_B/λ) μ X (reference values §8.1, the
tenuous-plasma limit of Bornatici et al., Nucl. Fusion 23 (1983) 1153); powers of waves in
one band add in amplitude at worst phase, (√P1 + √P2)² (Pozar, Microwave Engineering, ch. 2)."""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

from rfcheck.physics.constants import C, E_CHARGE, EPS0, M_E, M_E_C2_EV, TWO_PI

ROOT = Path(__file__).resolve().parents[2]
ECH = (ROOT / "examples" / "ech-launcher-140ghz.toml").read_text(encoding="utf-8")
DUAL = (ROOT / "examples" / "dual-frequency-min-b.toml").read_text(encoding="utf-8")
BENCH = (ROOT / "examples" / "bench-ecr-reactor.toml").read_text(encoding="utf-8")


def _run(write_spec, text):
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    return run(load_spec(write_spec(text)), load_policy(None))


def _one(r, rule, subject=None):
    (f,) = [f for f in r.findings if f.rule == rule and (subject is None or f.subject == subject)]
    return f


def _x2(text: str) -> str:
    text = text.replace('mode = "O", angle_to_field = "70 deg"', 'mode = "X", angle_to_field = "90 deg"')
    text = text.replace('absorption = "ecr"', 'absorption = "ecr-harmonic-2"')
    return text.replace('current = "380 A"', 'current = "190 A"')  # half the field: 2.5 T layer


def test_x2_cutoff_is_half_the_critical_density(write_spec):
    r = _run(write_spec, _x2(ECH))
    f = _one(r, "ech.cutoff-density")
    n_c = EPS0 * M_E * (TWO_PI * (140e9 - 50e6)) ** 2 / E_CHARGE ** 2
    assert f.limit.value == pytest.approx(0.9 * n_c / 2, rel=1e-9)
    assert "n_c/2" in f.message and f.status.value == "pass"  # 8e19 < 1.094e20


def test_x2_cutoff_fails_above_it(write_spec):
    text = _x2(ECH).replace('max = "8e19 m^-3"', 'max = "1.2e20 m^-3"')
    f = _one(_run(write_spec, text), "ech.cutoff-density")
    assert f.status.value == "fail"
    assert f.margin.value < 0


def test_x2_optical_depth_against_the_closed_form(write_spec):
    f = _one(_run(write_spec, _x2(ECH)), "ech.optical-depth")
    m = re.search(r"L_B = ([0-9.]+) mm, X = ([0-9.e-]+), T_e = ([0-9.]+) eV", f.message)
    l_b, x, t_e = float(m.group(1)) * 1e-3, float(m.group(2)), float(m.group(3))
    f_hz = float(re.search(r"B = ([0-9.]+) T", f.message).group(1)) * 2 * E_CHARGE / (TWO_PI * M_E)
    tau = 4 * math.pi ** 2 * (l_b * f_hz / C) * (t_e / M_E_C2_EV) * x
    assert f.measured.value == pytest.approx(tau, rel=2e-2)  # printed to 3-4 digits
    assert f.message.startswith("X2 τ")
    assert "X2 and O2 forms taken to X ≤ 0.3" in f.message
    # perpendicular launch: N∥ = 0 is within the forms' stated validity
    assert "N∥ = 0 (perpendicular launch)" in f.message and "Doppler" not in f.message


def test_shared_circulator_in_one_band_adds_amplitudes(write_spec):
    text = DUAL.replace('frequency = "18 GHz"', 'frequency = "14.5 GHz"')
    r = _run(write_spec, text)
    p1 = _one(r, "load.reflected-power", "feed klystron, running").measured.value
    p2 = _one(r, "load.reflected-power", "feed twt, running").measured.value
    f = _one(r, "ech.shared-circulator")
    assert f.measured.value == pytest.approx((math.sqrt(p1) + math.sqrt(p2)) ** 2, rel=1e-9)
    assert "amplitudes added" in f.message
    # the two resonance fields coincide: the separation rule says so
    assert _one(r, "ech.resonance-separation").status.value == "warn"


def test_no_ech_finding_for_a_source_without_a_heating_scheme(write_spec):
    r = _run(write_spec, BENCH)
    assert not [f for f in r.findings if f.rule.startswith("ech.")]
    assert not [f for f in r.findings if f.rule in ("window.disc-temperature",
                                                    "line.transmission-loss")]


def test_declared_loss_on_a_rectangular_line(write_spec):
    text = BENCH.replace('line = "circular:85 mm"', 'line = "circular:85 mm"\n'
                         'transmission = { length = "4 m", mitre_bends = 2, loss_db_per_m = 0.01, '
                         'bend_loss_db = 0.05 }')
    f = _one(_run(write_spec, text), "line.transmission-loss")
    assert f.measured.value == pytest.approx(1 - 10 ** (-(4 * 0.01 + 2 * 0.05) / 10), rel=1e-9)
    undeclared = BENCH.replace('line = "circular:85 mm"', 'line = "circular:85 mm"\n'
                               'transmission = { length = "4 m" }')
    f = _one(_run(write_spec, undeclared), "line.transmission-loss")
    assert f.status.value == "not-applicable"


def test_temperature_rise_in_celsius_is_refused_with_key_and_line(write_spec):
    from rfcheck.spec import InputError, load_spec

    text = ECH.replace('max_temperature_rise = "60 K"', 'max_temperature_rise = "60 degC"')
    with pytest.raises(InputError) as exc:
        load_spec(write_spec(text))
    msg = str(exc.value)
    line = next(i for i, s in enumerate(text.splitlines(), 1) if "max_temperature_rise" in s)
    assert f":{line}:" in msg and "max_temperature_rise" in msg and "in K" in msg


def test_disc_rise_fails_above_the_declared_limit(write_spec):
    text = ECH.replace('max_temperature_rise = "60 K"', 'max_temperature_rise = "0.2 K"')
    f = _one(_run(write_spec, text), "window.disc-temperature")
    assert f.status.value == "fail" and f.limit.value == pytest.approx(0.2)


def test_no_layer_on_the_path_fails_the_optical_depth(write_spec):
    # a third of the current: |B| stays below B_ce = 5.00 T (2π f m_e/e) everywhere
    text = ECH.replace('current = "380 A"', 'current = "120 A"')
    f = _one(_run(write_spec, text), "ech.optical-depth")
    assert f.status.value == "warn" and f.measured.value is None
    assert "no resonance layer" in f.message and "Bornatici" in f.message


def test_a_frequency_below_the_receiving_line_cutoff_is_not_counted(write_spec):
    # the klystron moved to 8 GHz: below the TE10 cutoff of WR-51, c/(2 × 12.954 mm) = 11.57 GHz
    # (Pozar §3.3), so none of it can enter the TWT's line
    text = DUAL.replace('frequency = "14.5 GHz"', 'frequency = "8 GHz"')
    f = _one(_run(write_spec, text), "ech.cross-coupling", "feed twt, ignition")
    assert f.measured.value == 0.0 and "cannot enter" in f.message
    assert f.status.value == "pass"


@pytest.mark.parametrize("old, new, key", [
    ('mitre_bends = 6', 'mitre_bends = -1', "transmission.mitre_bends"),
    ('length = "30 m", mitre_bends', 'length = "30 kHz", mitre_bends', "transmission.length"),
])
def test_bad_line_run_is_refused_with_key_and_line(write_spec, old, new, key):
    from rfcheck.spec import InputError, load_spec

    text = ECH.replace(old, new)
    with pytest.raises(InputError) as exc:
        load_spec(write_spec(text))
    line = next(i for i, s in enumerate(text.splitlines(), 1) if "transmission =" in s)
    assert f":{line}:" in str(exc.value) and key in str(exc.value)
