"""Plane-of-array irradiance: beam, sky diffuse and ground-reflected, with the horizon.

The transposition models are pvlib's (isotropic, Hay-Davies, Perez 1990); this
module keeps their components apart and applies the site horizon to each:

- beam and circumsolar light reach the plane only while the sun is above the
  site horizon;
- the isotropic sky diffuse is scaled by the plane's own sky-view factor with
  the horizon, relative to the open-sky ``(1 + cos tilt) / 2``;
- the Perez horizon-brightening band is scaled by its visible share;
- ground-reflected light uses the unobstructed GHI and albedo (pvlib's
  ``get_ground_diffuse``), a simplification stated in outputs.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pvlib

from .choices import TRANSPOSITION_MODELS as TRANSPOSITION_MODELS
from .horizon import HorizonShading

TRANSPOSITION_REFERENCES = {
    "isotropic": "Liu, B. Y. H. & Jordan, R. C. (1963). Solar Energy 7(2), 53-74.",
    "haydavies": "Hay, J. E. & Davies, J. A. (1980). Calculation of the solar radiation incident "
                 "on an inclined surface. Proc. First Canadian Solar Radiation Data Workshop, "
                 "59-72.",
    "perez": "Perez, R., Ineichen, P., Seals, R., Michalsky, J. & Stewart, R. (1990). Modeling "
             "daylight availability and irradiance components from direct and global "
             "irradiance. Solar Energy 44(5), 271-289 (coefficients 'allsitescomposite1990').",
}

COMPONENT_COLUMNS = ("poa_global", "poa_direct", "poa_sky_diffuse", "poa_ground_diffuse",
                     "poa_isotropic", "poa_circumsolar", "poa_horizon")


def angle_of_incidence(surface_tilt, surface_azimuth, solar_zenith, solar_azimuth):
    """Angle between the sun's rays and the plane's normal, degrees.

    References
    ----------
    Duffie & Beckman (2013), eq. 1.6.3; implementation :func:`pvlib.irradiance.aoi`.
    """
    return pvlib.irradiance.aoi(surface_tilt, surface_azimuth, solar_zenith, solar_azimuth)


def poa_components(surface_tilt, surface_azimuth, solar_zenith, solar_azimuth, ghi, dni, dhi,
                   dni_extra, albedo, model: str = "perez", airmass=None,
                   sun_visible=None, shading: HorizonShading | None = None) -> pd.DataFrame:
    """Plane-of-array irradiance with its components kept apart, W/m².

    Parameters
    ----------
    surface_tilt : float
        Plane tilt from horizontal, degrees.
    surface_azimuth : float
        Plane azimuth, degrees clockwise from north.
    solar_zenith, solar_azimuth : array_like
        Sun position, degrees (apparent zenith for transposition, as pvlib does).
    ghi, dni, dhi : array_like
        Horizontal irradiance components, W/m².
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    albedo : float or array_like
        Ground reflectance.
    model : {"isotropic", "haydavies", "perez"}
        Sky diffuse model.
    airmass : array_like, optional
        Relative airmass for Perez (pvlib's Kasten-Young default otherwise).
    sun_visible : array_like of bool, optional
        Sun above the site horizon at each instant; None means an open horizon.
    shading : HorizonShading, optional
        The plane's sky-view factor and horizon-band share; None means open.

    Returns
    -------
    pandas.DataFrame
        Columns ``poa_global``, ``poa_direct``, ``poa_sky_diffuse``,
        ``poa_ground_diffuse``, ``poa_isotropic``, ``poa_circumsolar``,
        ``poa_horizon`` (after the horizon), and the same with suffix
        ``_open`` for an open horizon, plus ``aoi``.

    References
    ----------
    See :data:`TRANSPOSITION_REFERENCES`; pvlib.irradiance.get_total_irradiance
    for the open-horizon sum (this function equals it when the horizon is open).
    """
    index = solar_zenith.index if isinstance(solar_zenith, pd.Series) else None
    return pd.DataFrame(poa_arrays(surface_tilt, surface_azimuth, solar_zenith, solar_azimuth,
                                   ghi, dni, dhi, dni_extra, albedo, model, airmass,
                                   sun_visible, shading), index=index)


def poa_arrays(surface_tilt, surface_azimuth, solar_zenith, solar_azimuth, ghi, dni, dhi,
               dni_extra, albedo, model: str = "perez", airmass=None,
               sun_visible=None, shading: HorizonShading | None = None) -> dict:
    """The columns of :func:`poa_components` as a dict of arrays (no DataFrame), for
    callers that take a few of them over many calls; same parameters, same numbers.

    References
    ----------
    As :func:`poa_components`.
    """
    if model not in TRANSPOSITION_MODELS:
        raise ValueError(f"model = {model!r}: must be one of {', '.join(TRANSPOSITION_MODELS)}")
    ghi = np.asarray(ghi, dtype=float)
    dni = np.asarray(dni, dtype=float)
    dhi = np.asarray(dhi, dtype=float)
    zen = np.asarray(solar_zenith, dtype=float)
    saz = np.asarray(solar_azimuth, dtype=float)
    aoi = np.asarray(angle_of_incidence(surface_tilt, surface_azimuth, zen, saz), dtype=float)
    beam = np.maximum(dni * np.cos(np.radians(aoi)), 0.0)
    if model == "isotropic":
        iso = np.asarray(pvlib.irradiance.isotropic(surface_tilt, dhi), dtype=float)
        circ = np.zeros_like(iso)
        hor = np.zeros_like(iso)
    elif model == "haydavies":
        parts = pvlib.irradiance.haydavies(surface_tilt, surface_azimuth, dhi, dni, dni_extra,
                                           zen, saz, return_components=True)
        iso = np.asarray(parts["poa_isotropic"], dtype=float)
        circ = np.asarray(parts["poa_circumsolar"], dtype=float)
        hor = np.zeros_like(iso)
    else:
        if airmass is None:
            airmass = pvlib.atmosphere.get_relative_airmass(zen)
        parts = pvlib.irradiance.perez(surface_tilt, surface_azimuth, dhi, dni, dni_extra,
                                       zen, saz, airmass, return_components=True)
        iso = np.asarray(parts["poa_isotropic"], dtype=float)
        circ = np.asarray(parts["poa_circumsolar"], dtype=float)
        hor = np.asarray(parts["poa_horizon"], dtype=float)
    iso, circ, hor = (np.nan_to_num(x, nan=0.0) for x in (iso, circ, hor))
    ground = np.asarray(pvlib.irradiance.get_ground_diffuse(surface_tilt, ghi, albedo),
                        dtype=float) * np.ones_like(beam)
    vis = np.ones_like(beam) if sun_visible is None else np.asarray(sun_visible, dtype=float)
    iso_ratio = 1.0 if shading is None else shading.isotropic_ratio
    band = 1.0 if shading is None else shading.horizon_band_fraction
    out = {
        "poa_direct": beam * vis,
        "poa_isotropic": iso * iso_ratio,
        "poa_circumsolar": circ * vis,
        "poa_horizon": hor * band,
        "poa_ground_diffuse": ground,
    }
    out["poa_sky_diffuse"] = out["poa_isotropic"] + out["poa_circumsolar"] + out["poa_horizon"]
    out["poa_global"] = out["poa_direct"] + out["poa_sky_diffuse"] + out["poa_ground_diffuse"]
    out["poa_direct_open"] = beam
    out["poa_isotropic_open"] = iso
    out["poa_circumsolar_open"] = circ
    out["poa_horizon_open"] = hor
    out["poa_sky_diffuse_open"] = iso + circ + hor
    # summed in the same order as poa_global, so an open horizon loses exactly 0
    out["poa_global_open"] = beam + out["poa_sky_diffuse_open"] + ground
    out["aoi"] = aoi
    return out


def perez_f1_f2(dhi, dni, dni_extra, solar_zenith, airmass):
    """Perez 1990 circumsolar and horizon brightening coefficients F1, F2.

    Parameters
    ----------
    dhi, dni, dni_extra : array_like
        W/m².
    solar_zenith : array_like
        Apparent zenith, degrees.
    airmass : array_like
        Relative airmass.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        F1 (clipped at 0, as pvlib does) and F2.

    References
    ----------
    Perez, R., Ineichen, P., Seals, R., Michalsky, J. & Stewart, R. (1990).
    Solar Energy 44(5), 271-289, with the 'allsitescomposite1990' coefficients
    and the bins and kappa = 1.041 of pvlib.irradiance.perez.
    """
    dhi = np.asarray(dhi, dtype=float)
    dni = np.asarray(dni, dtype=float)
    kappa = 1.041
    z = np.radians(np.asarray(solar_zenith, dtype=float))
    delta = dhi * np.asarray(airmass, dtype=float) / np.asarray(dni_extra, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        eps = (np.divide(dhi + dni, dhi) + kappa * z**3) / (1 + kappa * z**3)
    ebin = np.digitize(eps, (0.0, 1.065, 1.23, 1.5, 1.95, 2.8, 4.5, 6.2))
    ebin = np.array(ebin)
    ebin[np.isnan(eps)] = 0
    ebin -= 1
    f1c, f2c = pvlib.irradiance._get_perez_coefficients("allsitescomposite1990")
    nans = np.array([np.nan, np.nan, np.nan])
    f1c = np.vstack((f1c, nans))
    f2c = np.vstack((f2c, nans))
    f1 = np.maximum(f1c[ebin, 0] + f1c[ebin, 1] * delta + f1c[ebin, 2] * z, 0)
    f2 = f2c[ebin, 0] + f2c[ebin, 1] * delta + f2c[ebin, 2] * z
    return f1, f2


def poa_interval_means(nodes, n_intervals: int, surface_tilt, surface_azimuth, model: str,
                       shading: HorizonShading | None = None, node_mask=None,
                       columns=COMPONENT_COLUMNS) -> dict:
    """Interval means of plane-of-array components from a sky's nodes, W/m².

    :func:`poa_components` at each node (those in ``node_mask``), times the
    node's weight, summed over each interval's nodes
    (:class:`tiltyard.engine.skynodes.SkyNodes`): the one way every total of
    irradiance on a plane is formed from a sky year.

    Parameters
    ----------
    nodes : SkyNodes
        The sky's nodes.
    n_intervals : int
        Intervals in the year (length of the results).
    surface_tilt, surface_azimuth : float or array_like
        The plane; arrays give one plane per node (a tracker).
    model : {"isotropic", "haydavies", "perez"}
        Sky diffuse model.
    shading : HorizonShading, optional
        The plane's horizon factors; None means open.
    node_mask : array_like of bool, optional
        Nodes to count (default all).
    columns : sequence of str
        Columns of :func:`poa_components` to give.

    Returns
    -------
    dict of numpy.ndarray
        Per column, ``n_intervals`` interval means (0 where no node counts).

    References
    ----------
    As :func:`poa_components`; the weighted sum is the quadrature of
    :mod:`tiltyard.engine.skynodes`.
    """
    m = np.ones(len(nodes), dtype=bool) if node_mask is None else np.asarray(node_mask)
    tilt, azim = (v[m] if np.ndim(v) else float(v) for v in (surface_tilt, surface_azimuth))
    poa = poa_arrays(tilt, azim, nodes.apparent_zenith[m], nodes.azimuth[m], nodes.ghi[m],
                            nodes.dni[m], nodes.dhi[m], nodes.dni_extra[m], nodes.albedo[m],
                            model, None, nodes.sun_visible[m], shading)
    w, iv = nodes.weight[m], nodes.interval[m]
    return {c: np.bincount(iv, weights=poa[c] * w, minlength=n_intervals) for c in columns}
