"""Absorption estimates against reference-values.md §8 (worked cases) and closed forms."""

import numpy as np
import pytest

from rfcheck.physics.absorption import (attenuation_from_index, collisional_attenuation,
                                        collisional_attenuation_weak, collisional_regime,
                                        optical_depth_o1, optical_depth_o2, optical_depth_x2,
                                        optical_depth_xm)
from rfcheck.physics.frequencies import ecr_field

SRC = "reference-values §8.1, computed from the Bornatici et al. 1983 tenuous forms"


@pytest.mark.parametrize("func, args, tau, absorbed", [
    pytest.param(optical_depth_o1, (170e9, 1e20, 10e3, 6.2), 160.85, 1.0, id="O1 170 GHz 10 keV; " + SRC),
    pytest.param(optical_depth_o1, (140e9, 5e19, 3e3, 5.5), 27.28, 1.0, id="O1 140 GHz 3 keV; " + SRC),
    pytest.param(optical_depth_x2, (82.7e9, 1e19, 1e3, 0.88), 2.211, 0.890, id="X2 82.7 GHz; " + SRC),
    pytest.param(optical_depth_x2, (140e9, 5e19, 3e3, 5.5), 122.4, 1.0, id="X2 140 GHz; " + SRC),
    pytest.param(optical_depth_x2, (279.9e9, 1e20, 1e3, 1.0), 7.422, 0.9994, id="X2 5 T; " + SRC),
    pytest.param(optical_depth_o2, (140e9, 5e19, 3e3, 5.5), 0.7187, 0.513, id="O2 140 GHz; " + SRC),
    pytest.param(optical_depth_x2, (2.45e9, 1e16, 10.0, 0.1), 8.48e-5, 8.48e-5, id="X2 2.45 GHz small device; " + SRC),
    pytest.param(lambda *a: optical_depth_xm(3, *a), (124e9, 1e19, 1e3, 0.88), 0.0219, 0.022, id="X3 124 GHz; " + SRC),
])
def test_optical_depth_worked_cases(func, args, tau, absorbed):
    out = func(*args)
    # the table quotes 3-4 significant figures
    assert float(out.tau) == pytest.approx(tau, rel=2e-3)
    assert float(out.absorbed_fraction) == pytest.approx(absorbed, rel=1e-2, abs=5e-4)
    assert bool(out.valid) and str(out.reason) == ""


def test_o1_edge_case_against_practical_form():
    # reference-values §8.1 practical form: tau_O1 = 1.8554e-22 n T_e L_B / B_res sqrt(1 - X)
    # and the tabulated absorbed fraction 0.170 for 170 GHz, 1e19 m^-3, 100 eV, 6.2 m.
    # (The table's tau column reads 0.190, which is the value without the sqrt(1 - X)
    # factor and is inconsistent with its own absorbed fraction 0.170 = 1 - exp(-0.1868).)
    out = optical_depth_o1(170e9, 1e19, 100.0, 6.2)
    practical = 1.8554e-22 * 1e19 * 100.0 * 6.2 / ecr_field(170e9) * np.sqrt(1 - 0.027895)
    assert float(out.tau) == pytest.approx(practical, rel=2e-4)
    assert float(out.absorbed_fraction) == pytest.approx(0.170, abs=1e-3)
    assert float(out.density_ratio) == pytest.approx(0.0279, abs=1e-4)


def test_x2_practical_coefficient():
    # reference-values §8.1: tau_X2 = 3.7108e-22 n T_e L_B / B_res (B_res at 2 f_ce = f)
    out = optical_depth_x2(82.7e9, 1e19, 1e3, 0.88)
    assert float(out.tau) == pytest.approx(3.7108e-22 * 1e19 * 1e3 * 0.88 / ecr_field(82.7e9, 2), rel=2e-4)


def test_optical_depth_validity_flags():
    # X2 cutoff from the low-field side at X = 1 - Y = 0.5 (reference-values §2.3, §8.1)
    out = optical_depth_x2(2.45e9, [1e16, 3e16, 5e16], 10.0, 0.1)
    assert out.valid.tolist() == [True, False, False]
    assert "finite-density" in out.reason[1] and "cannot reach" in out.reason[2]
    assert np.isnan(out.tau[2])
    hot = optical_depth_o1(170e9, 1e19, 30e3, 6.2)  # beyond the weakly relativistic limit
    assert not bool(hot.valid) and "20 keV" in str(hot.reason)
    over = optical_depth_o1(2.45e9, 1e17, 10.0, 0.1)  # X > 1: O cutoff
    assert not bool(over.valid) and np.isnan(over.tau)
    with pytest.raises(ValueError):
        optical_depth_xm(1, 28e9, 1e18, 1e3, 0.1)  # X1 not given (reference-values §8.1)


@pytest.mark.parametrize("n, nu, exact, weak, weak_valid", [
    pytest.param(3e16, 1e8, 0.1739, 0.1739, True, id="2.45 GHz X=0.403 nu=1e8; reference-values §8.2"),
    pytest.param(3e16, 1e9, 1.729, 1.739, True, id="2.45 GHz X=0.403 nu=1e9; reference-values §8.2"),
    pytest.param(7e16, 1e9, 11.33, 12.82, False, id="2.45 GHz X=0.94 near cutoff; reference-values §8.2"),
])
def test_collisional_attenuation_worked_values(n, nu, exact, weak, weak_valid):
    ex = collisional_attenuation(2.45e9, n, nu)
    wk = collisional_attenuation_weak(2.45e9, n, nu)
    assert float(ex.value) == pytest.approx(exact, rel=1e-3)
    assert float(wk.value) == pytest.approx(weak, rel=1e-3)
    assert bool(ex.valid)
    assert bool(wk.valid) is weak_valid


def test_collisional_attenuation_rf_skin_case():
    # 13.56 MHz, 1e17 m^-3, nu = 1e8: eps = -18439 + 21643i, alpha = 87.0 m^-1
    # (reference-values §8.2); X >> 1 carries the evanescent caution but stays valid
    out = collisional_attenuation(13.56e6, 1e17, 1e8)
    assert float(out.value) == pytest.approx(87.0, rel=1e-3)
    assert bool(out.valid) and "evanescent" in str(out.reason)
    # the same number from a complex n^2 (Drude eps with omega -> omega + i nu)
    assert float(attenuation_from_index(13.56e6, -18439 + 21643j).value) == pytest.approx(87.0, rel=1e-3)


def test_collisional_regime_labels():
    # nu = 2.80e7 s^-1 (Ar, 1 Pa, 3 eV): nu/omega = 1.8e-3 at 2.45 GHz, 0.33 at 13.56 MHz
    # (reference-values §8.2); thresholds 0.1 and 1 are common practice
    out = collisional_regime([2.45e9, 13.56e6, 1e6], 2.80e7)
    assert out.nu_over_omega[:2] == pytest.approx([1.8e-3, 0.33], rel=2e-2)
    assert out.regime.tolist() == ["weakly collisional", "transitional", "collisional"]
