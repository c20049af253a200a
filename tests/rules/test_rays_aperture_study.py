"""The ray study of an aperture launch (a WR-340 mouth on the bench reactor, added here, not as
an example): the rays.* findings are evaluated, the power is accounted for, the two
orientations of an undeclared E agree where the reactor is axisymmetric, and the boresight
ray is the on-axis ray of the 1-D check."""

import re
from pathlib import Path

import numpy as np
import pytest

from rfcheck.analysis.rays import compute_ray_study, ray_study
from rfcheck.findings import Status
from rfcheck.physics.aperture_pattern import aperture_rays
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

DEMO = Path(__file__).resolve().parents[2] / "examples" / "bench-ecr-reactor.toml"
# WR-340 inner size 86.36 × 43.18 mm (EIA RS-261 / IEC 60153 R26, common practice)
WR340 = 'aperture = { shape = "rectangular", width = "86.36 mm", height = "43.18 mm" }'
EVALUATED = ("rays.reaches-resonance", "rays.first-pass-absorption", "rays.wall-load")


@pytest.fixture(scope="module")
def aperture_run(tmp_path_factory):
    text = DEMO.read_text(encoding="utf-8")
    line = re.search(r"^launch = .*$", text, re.M).group(0)
    assert line.endswith(" }")
    path = tmp_path_factory.mktemp("aperture") / "spec.toml"
    path.write_text(text.replace(line, line[:-2] + ", " + WR340 + " }"), encoding="utf-8")
    return run(load_spec(path), load_policy(None))


def test_an_aperture_launch_gets_evaluated_ray_findings(aperture_run):
    by_rule = {f.rule: f for f in aperture_run.findings if f.rule.startswith("rays.")}
    for rule in EVALUATED:
        f = by_rule[rule]
        assert f.status not in (Status.NOT_APPLICABLE, Status.ERROR), (rule, f.message)
        assert f.measured is not None
        assert "a TE10 aperture 86.4 × 43.2 mm" in f.message
        assert "sampled by 65 rays from its centre over its main lobe" in f.message
        assert "E along the launcher's radial direction and E across it" in f.message
    # no target declared: the deposition rule has nothing to judge
    assert by_rule["rays.deposition-region"].status == Status.NOT_APPLICABLE


def test_the_study_accounts_for_every_share_of_the_pattern(aperture_run):
    feed = aperture_run.model.feeds[0]
    study = ray_study(aperture_run.context, feed)
    # 2 orientations of E × (peak density min/max × current scale min/max)
    assert len(study.corners) == 8
    # WR-340 at 2.45 GHz: the main lobe fills the forward hemisphere (first nulls outside
    # the visible region, test_rays_aperture), so nothing is left untraced
    _, _, shares = aperture_rays(feed.frequency, [0, 0, 0], [0, 0, 1], "rectangular",
                                 width=0.08636, height=0.04318)
    for c in study.corners:
        assert c.weights.sum() == pytest.approx(shares.sum(), rel=1e-12)
        assert sum(c.shares.values()) == pytest.approx(1.0, abs=1e-9)
        assert 0.0 < c.reach < 1.0  # the wide rays go to the side wall first
        assert c.shares["side wall"] > 0.0


def test_the_two_orientations_agree_on_the_axis_of_an_axisymmetric_reactor(aperture_run):
    # the bench reactor's coils are axisymmetric and the launcher sits on the axis: turning
    # the aperture by 90° about the axis turns every ray with it, so the power split of
    # the two orientations must agree (to the integration tolerance, rtol 1e-5)
    study = ray_study(aperture_run.context, aperture_run.model.feeds[0])
    first, second = study.corners[:4], study.corners[4:]
    for a, b in zip(first, second):
        assert (a.density, a.scale) == (b.density, b.scale)
        assert a.reach == pytest.approx(b.reach, abs=2e-4)
        assert a.absorbed == pytest.approx(b.absorbed, abs=2e-4)
        assert a.shares["side wall"] == pytest.approx(b.shares["side wall"], abs=2e-4)


def test_the_boresight_ray_is_the_on_axis_ray(aperture_run):
    # the central cap's ray leaves along the axis (its cell is symmetric about it), so it
    # ends where the on-axis single ray ends; that one reproduces the 1-D access result of
    # the bench reactor (test_rays_rules)
    feed = aperture_run.model.feeds[0]
    study = ray_study(aperture_run.context, feed)
    plain = run(load_spec(DEMO), load_policy(None))
    single = compute_ray_study(plain.context, plain.model.feeds[0])
    for c, s in zip(study.corners[:4], single.corners):
        (ray,) = s.rays
        assert c.ends[0] == s.ends[0] == "layer"
        assert np.allclose(c.rays[0].end, ray.end, atol=1e-6)


def _launch(**kw):
    from rfcheck.model import Launch, LaunchAperture

    base = dict(z=0.0, direction=1, mode="X", angle_to_field=0.3, polarisation="linear",
                tilt=0.3, aperture=LaunchAperture("rectangular", 0.08636, 0.04318))
    base.update(kw)
    return Launch(**base)


def _uniform_b(points):
    return np.tile([0.0, 0.0, 0.0875], (len(points), 1))


@pytest.mark.parametrize("angle, count", [(0.0, 1), (np.pi / 2, 1), (np.radians(30), 2)])
def test_a_declared_e_angle_orients_the_aperture_from_the_projection_of_b(angle, count):
    from rfcheck.analysis.rays import aperture_launch

    # k tilted 0.3 rad from B = B ẑ: the projection of B on the aperture plane is
    # ẑ − (ẑ·k̂) k̂; E at `angle` from it (both senses of a turn that is not 0 or 90°)
    launch = _launch(e_angle_to_field=angle)
    d = launch.wave_direction
    b_perp = np.array([0.0, 0.0, 1.0]) - d[2] * d
    b_perp /= np.linalg.norm(b_perp)
    starts, dirs, shares, orientations, (_, how), _names = aperture_launch(
        launch, 2.45e9, launch.origin, d, _uniform_b)
    assert orientations == count
    assert f"aperture E at {np.degrees(angle):.3g}°" in how
    k = len(shares) // count
    for o in range(count):
        sense = 1.0 if o == 0 else -1.0
        e_dir = np.cos(angle) * b_perp + sense * np.sin(angle) * np.cross(d, b_perp)
        _, expect, _ = aperture_rays(2.45e9, launch.origin, d, "rectangular", width=0.08636,
                                     height=0.04318, e_direction=e_dir)
        assert np.allclose(dirs[o * k:(o + 1) * k], expect, atol=1e-12)


def test_an_e_angle_without_a_projection_of_b_takes_both_orientations():
    from rfcheck.analysis.rays import aperture_launch

    # k along B: the projection of B on the aperture vanishes, the angle fixes no direction
    launch = _launch(e_angle_to_field=0.2, tilt=0.0, angle_to_field=0.0)
    *_, orientations, (_, how), _ = aperture_launch(launch, 2.45e9, launch.origin,
                                                    launch.wave_direction, _uniform_b)
    assert orientations == 2
    assert "fixes no direction" in how and "each rule takes the worse" in how


def test_the_ray_figures_name_each_orientation_of_an_open_e_apart(aperture_run):
    # two E orientations × four envelope corners: every corner labelled once in the legends
    from rfcheck.report.figure_rays import ray_figures

    study = ray_study(aperture_run.context, aperture_run.model.feeds[0])
    labels = [c.orientation for c in study.corners]
    assert labels == ["E radial"] * 4 + ["E across"] * 4
    figs = {f["id"].rsplit("-", 1)[0]: f for f in ray_figures(aperture_run)}
    profile = figs["rays-deposition"]["svg"]
    for c in study.corners:
        text = (f"n_peak {c.density:.3g} m^-3, current ×{c.scale:.4g}, {c.orientation}")
        assert profile.count(text) == 1, text
