"""The dispersion figure of the report (rfcheck/report/figure_dispersion.py): drawn for every
example, its caption naming only the branches and levels drawn; the whistler (R wave far below
f_ce) of the helicon example at the k of the closed form n² = 1 + f_pe²/(f (f_ce − f))
(T. H. Stix, Waves in Plasmas, AIP 1992, ch. 1-2; R = 1 − Σ X/(1 − Y) for electrons)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import EXAMPLES
from rfcheck.report.figure_dispersion import _launcher_field, dispersion_figure
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

SPECS = sorted(p for p in EXAMPLES.glob("*.toml") if "[source]" in p.read_text("utf-8")
               and "oblique" not in p.name)  # the oblique beam's 1-D launch is min-B's


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_caption_names_only_what_is_drawn(path):
    result = run(load_spec(path), load_policy(None))
    fig = dispersion_figure(result)
    assert fig is not None and "<svg" in fig["svg"]
    magnetised = any(_launcher_field(result, f) > 0 for f in result.model.feeds[:4])
    assert ("R wave (solid) and L wave (dashed)" in fig["caption"]) == magnetised
    assert ("f_ce" in fig["caption"]) == magnetised
    assert ("logarithmic" in fig["caption"]) == any(
        f.frequency < 0.2 * 8.979 * math.sqrt(result.model.plasma.density.max)
        for f in result.model.feeds[:4])  # f_pe = 8.98 sqrt(n_e) Hz (NRL Formulary p. 28)


def test_whistler_of_the_helicon_example_at_its_closed_form():
    from rfcheck.physics.coldplasma import n2_r_wave

    result = run(load_spec(EXAMPLES / "helicon-source.toml"), load_policy(None))
    feed = result.model.feeds[0]
    b = _launcher_field(result, feed)
    n_e = result.model.plasma.density.max
    f_pe = 8.979 * math.sqrt(n_e)          # NRL Plasma Formulary (2019), p. 28
    f_ce = 2.799e10 * b                    # 28.0 GHz/T, NRL Plasma Formulary p. 28
    f = feed.frequency
    n2_closed = 1 + f_pe**2 / (f * (f_ce - f))
    k_closed = 2 * math.pi * f * math.sqrt(n2_closed) / 2.998e8
    n2 = float(np.real(n2_r_wave(f, b, n_e, ())))
    k = 2 * math.pi * f * math.sqrt(n2) / 2.998e8
    assert k == pytest.approx(k_closed, rel=2e-3)  # electrons only; ions shift it ~1e-4
    assert 20 < k < 80  # rad/m: the whistler of a 13.56 MHz helicon, tens of rad/m
