"""Tests of the annual horizon loss per plane (:mod:`tiltyard.engine.horizon_loss`).

References used below:

- Liu, B. Y. H. & Jordan, R. C. (1963). Solar Energy 7(2), 53-74: the
  isotropic sky and the open-horizon view factor ``(1 + cos tilt) / 2``.
- Duffie, J. A. & Beckman, W. A. (2013). Solar Engineering of Thermal
  Processes, 4th ed., sec. 2.15: the view factor as the cosine-weighted
  visible sky. For a horizontal plane under a horizon of uniform elevation h
  the integral ``(1/pi) * 2pi * int_h^(pi/2) sin e cos e de`` is ``cos^2 h``
  (derived here in closed form; the same result is quoted for terrain by
  Dozier, J. & Frew, J. (1990), IEEE Trans. Geosci. Remote Sens. 28(5),
  963-969 — from memory).
- :func:`tiltyard.engine.jobs.irradiance_year`, the one-plane job, itself
  tested against pvlib (Holmgren, Hansen & Mikofski 2018, JOSS 3(29), 884).
"""

from __future__ import annotations

import math

import pytest

from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.horizon_loss import horizon_loss
from tiltyard.engine.jobs import irradiance_year
from tiltyard.engine.site import HorizonProfile, Obstacle, Plane, Site
from tiltyard.engine.skyyear import IrradianceOptions

HOURLY = IrradianceOptions(step_min=60)
OPEN = Site("open field", 47.0, 8.0, 450.0, "Europe/Zurich",
            planes=(Plane("south 30", 30.0, 180.0), Plane("east 60", 60.0, 90.0),
                    Plane("south wall", 90.0, 180.0)))


def _uniform(site: Site, elevation_deg: float) -> Site:
    az = tuple(float(a) for a in range(0, 360, 10))
    return site.with_changes(horizon=HorizonProfile(az, (elevation_deg,) * len(az)),
                             obstacles=())


@pytest.fixture(scope="module")
def open_result():
    return horizon_loss(OPEN, HOURLY)


def test_flat_zero_horizon_loses_nothing(open_result):
    assert [p.label for p in open_result.planes] == ["horizontal", "south 30", "east 60",
                                                     "south wall"]
    for p in open_result.planes[:3]:
        # identity: a 0 deg horizon is the open horizon (Liu & Jordan 1963 view factor);
        # tolerance 1e-9 kWh/m2 a year
        assert abs(p.loss_kwh_m2) < 1e-9, p.label
        assert abs(p.beam_loss_kwh_m2) < 1e-9, p.label
        # Liu & Jordan (1963): open-horizon view factor (1 + cos tilt) / 2, to 1e-12
        assert p.sky_view_factor == pytest.approx((1 + math.cos(math.radians(p.surface_tilt)))
                                                  / 2, abs=1e-12)
    wall = open_result.planes[3]
    # a vertical plane: the engine's midpoint quadrature of the view factor
    # (horizon.sky_view_factor, 1440 azimuths) is 8e-7 off 1/2 (Liu & Jordan 1963), a
    # few 1e-5 kWh/m2 a year on the isotropic diffuse; tolerance 1e-3 kWh/m2
    assert abs(wall.loss_kwh_m2) < 1e-3
    assert abs(wall.beam_loss_kwh_m2) < 1e-9       # identity: the sun is never hidden


def test_loss_parts_add_up(open_result):
    site = load_demo("larkmoor-dairy")
    result = horizon_loss(site, HOURLY)
    for p in result.planes + open_result.planes:
        # identity: ground-reflected light is not obstructed, so total = beam + sky diffuse
        # (module docstring of engine/plane.py); tolerance 1e-9 kWh/m2
        assert p.loss_kwh_m2 == pytest.approx(p.beam_loss_kwh_m2 + p.sky_diffuse_loss_kwh_m2,
                                              abs=1e-9)
        assert p.loss_pct == pytest.approx(p.beam_loss_pct + p.sky_diffuse_loss_pct, abs=1e-9)


@pytest.mark.parametrize("demo", ["larkmoor-dairy", "high-pass-hut", "kelpie-creek-shed"])
def test_agrees_with_irradiance_year(demo):
    site = load_demo(demo)
    result = horizon_loss(site, HOURLY)
    assert len(result.planes) == 1 + len(site.planes)
    for p in result.planes:
        ref = irradiance_year(site, p.surface_tilt, p.surface_azimuth, HOURLY)
        a = ref.annual
        # cross-check with the one-plane job (pvlib-based, Holmgren et al. 2018);
        # relative tolerance 1e-6 (about 1e-3 kWh/m2 on an annual total)
        assert p.loss_kwh_m2 == pytest.approx(a["horizon_loss_kwh_m2"], rel=1e-6, abs=1e-9)
        assert p.beam_loss_kwh_m2 == pytest.approx(a["horizon_loss_beam_kwh_m2"], rel=1e-6,
                                                   abs=1e-9)
        sky_loss = (a["horizon_loss_circumsolar_kwh_m2"] + a["horizon_loss_isotropic_kwh_m2"]
                    + a["horizon_loss_horizon_band_kwh_m2"])
        assert p.sky_diffuse_loss_kwh_m2 == pytest.approx(sky_loss, rel=1e-6, abs=1e-9)
        assert p.open_kwh_m2 == pytest.approx(a["poa_open_kwh_m2"], rel=1e-6)
        assert p.site_kwh_m2 == pytest.approx(a["poa_kwh_m2"], rel=1e-6)
        assert p.loss_pct == pytest.approx(ref.horizon_loss_pct, rel=1e-6, abs=1e-9)
        assert p.sky_view_factor == pytest.approx(ref.shading.sky_view_factor, rel=1e-12)


def test_wall_due_south_costs_an_equator_facing_plane_beam():
    base = Site("valley farm", 52.0, 0.0, 50.0, "Europe/London",
                planes=(Plane("south 35", 35.0, 180.0),))
    south_wall = base.with_changes(obstacles=(Obstacle("barn wall", 180.0, 90.0, 8.0, 8.0),))
    north_wall = base.with_changes(obstacles=(Obstacle("barn wall", 0.0, 90.0, 8.0, 8.0),))
    plane = [horizon_loss(s, HOURLY).planes[1] for s in (base, south_wall, north_wall)]
    # physical sense: at 52 N the sun crosses the southern sky, so a 45 deg wall to the
    # south hides it for hours every day; to the north it hides it only on summer
    # mornings and evenings (common practice, no source)
    assert plane[1].beam_loss_kwh_m2 > plane[0].beam_loss_kwh_m2 + 100.0
    assert plane[2].beam_loss_kwh_m2 < 0.01 * plane[2].beam_open_kwh_m2
    assert plane[1].sky_view_factor < plane[0].sky_view_factor


def test_uniform_horizon_view_factor_and_diffuse_share():
    h = 20.0
    site = _uniform(OPEN, h).with_changes(planes=())
    result = horizon_loss(site, IrradianceOptions(model="isotropic", step_min=60))
    flat = result.horizontal
    # horizontal plane, uniform horizon h: F = cos^2 h (closed form of the Duffie &
    # Beckman 2013 sec. 2.15 integral); 0.883022 at 20 deg, tolerance 1e-9
    assert flat.sky_view_factor == pytest.approx(math.cos(math.radians(h)) ** 2, abs=1e-9)
    # isotropic sky (Liu & Jordan 1963): the sky diffuse lost is the hidden share
    # 1 - cos^2 h = sin^2 h of the open sky diffuse; relative tolerance 1e-9
    assert flat.sky_diffuse_loss_kwh_m2 / flat.sky_diffuse_open_kwh_m2 == pytest.approx(
        math.sin(math.radians(h)) ** 2, rel=1e-9)


def test_horizon_at_zenith_leaves_a_horizontal_plane_nothing():
    site = _uniform(OPEN, 90.0).with_changes(planes=())
    flat = horizon_loss(site, HOURLY).horizontal
    # identity: no sky is visible (view factor 0) and the sun is never above the horizon;
    # a horizontal plane sees no ground (Liu & Jordan 1963 ground factor (1 - cos 0)/2 = 0);
    # tolerance 1e-9 kWh/m2
    assert flat.sky_view_factor == pytest.approx(0.0, abs=1e-12)
    assert flat.site_kwh_m2 == pytest.approx(0.0, abs=1e-9)
    assert flat.loss_pct == pytest.approx(100.0, abs=1e-9)


def test_horizon_below_the_horizontal():
    site = _uniform(OPEN, -5.0)
    result = horizon_loss(site, HOURLY)
    flat, tilted = result.horizontal, result.planes[1]
    # a horizontal plane cannot see below the horizontal (Duffie & Beckman 2013 sec. 2.15:
    # cos(theta) < 0 there), so it loses nothing; the sun counts as up only above 0 deg
    # geometric elevation, so no beam is gained either; tolerance 1e-9 kWh/m2
    assert flat.sky_view_factor == pytest.approx(1.0, abs=1e-12)
    assert abs(flat.loss_kwh_m2) < 1e-9
    assert abs(tilted.beam_loss_kwh_m2) < 1e-9
    # a tilted plane sees the extra sky in front of it: a gain (negative loss);
    # physical sense, common practice, no source
    assert tilted.sky_view_factor > tilted.sky_view_factor_open
    assert tilted.sky_diffuse_loss_kwh_m2 < 0.0


def test_progress_is_reported_and_can_cancel():
    seen = []
    horizon_loss(OPEN, HOURLY, progress=lambda f, stage: seen.append(f))
    assert seen[0] == 0.0 and seen[-1] == 1.0 and len(seen) == 1 + (1 + len(OPEN.planes)) + 1

    class Stop(Exception):
        pass

    def stop(fraction, stage):
        if fraction > 0:
            raise Stop()

    with pytest.raises(Stop):
        horizon_loss(OPEN, HOURLY, progress=stop)


def test_json_and_default_options():
    result = horizon_loss(load_demo("coral-lane-clinic"))
    assert result.options.step_min == 60 and result.options.sky == "clear"
    doc = result.to_json_dict()
    assert [p["label"] for p in doc["planes"]] == ["horizontal", "flat roof, low-tilt frame"]
    # regression value: coconut palms (25 deg, east) and a water tower cost the
    # horizontal plane about 1 % of a clear-sky year (Perez, hourly)
    assert 0.5 < doc["planes"][0]["loss_pct"] < 1.5
