"""All-sky bases of the sky year: monthly GHI values, or a weather file.

Two ways to replace the clear sky of :func:`tiltyard.engine.skyyear.sky_year`
with an all-sky one:

``monthly``
    A synthetic year from the site's 12 monthly mean daily GHI values: the
    clear-sky GHI of the year is scaled, month by month, so that each month's
    mean daily irradiation equals the given value (GHI never above the
    extraterrestrial horizontal), then split into beam and diffuse by the
    Erbs et al. (1982) hourly correlation (:func:`monthly_sky`). It has the
    right monthly totals but no day-to-day weather variability.
``file``
    A measured or typical-year weather series
    (:class:`tiltyard.engine.weather.WeatherData`) mapped onto the year's
    intervals (:func:`map_weather_to_grid`, :func:`weather_sky`). Weather
    values are interval means; the sky year holds instantaneous values at the
    evaluation instant that are later multiplied by the sun-up fraction, so
    each mean is divided by that fraction.

The functions work on plain arrays; :mod:`tiltyard.engine.skyyear` calls them
and builds the :class:`~tiltyard.engine.skyyear.SkyYear`.

References
----------
Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the diffuse
radiation fraction for hourly, daily and monthly-average global radiation.
Solar Energy 28(4), 293-302, eq. 1 (hourly correlation).
"""

from __future__ import annotations

import calendar
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd
import pvlib

from .site import Site, SiteError
from .sky import extraterrestrial_on_plane
from .timegrid import STEPS_MIN, TimeGrid, standard_offset
from .weather import WeatherData, WeatherImportError, read_weather_file

#: Note attached to results of the ``monthly`` basis.
MONTHLY_NOTE = ("synthetic hourly year from monthly GHI: clear-sky shape scaled per month, "
                "Erbs split; no day-to-day weather variability")

#: What the Erbs split in this module does differently from pvlib.irradiance.erbs.
ERBS_NOTE = ("Erbs et al. (1982) hourly correlation, clearness index from this project's "
             "extraterrestrial irradiance")


@dataclass(frozen=True)
class AllSky:
    """Horizontal irradiance of an all-sky basis, one value per interval.

    Attributes
    ----------
    ghi, dni, dhi : numpy.ndarray
        Instantaneous irradiance at the evaluation instants, W/m², zero while
        the sun is down.
    note : str
        Provenance and caveats, for the result's notes.
    temp_air, wind_speed : numpy.ndarray or None
        Air temperature (°C) and wind speed (m/s) per interval, NaN where the
        data have none; None when the basis has none at all.
    """

    ghi: np.ndarray
    dni: np.ndarray
    dhi: np.ndarray
    note: str
    temp_air: np.ndarray | None = None
    wind_speed: np.ndarray | None = None


# -- Erbs split -------------------------------------------------------------------

def erbs_split(ghi, zenith, dni_extra, min_cos_zenith: float = 0.065,
               max_zenith: float = 87.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Split GHI into DNI and DHI with the Erbs et al. (1982) hourly correlation.

    The same steps as :func:`pvlib.irradiance.erbs`, but with the clearness
    index ``kt = GHI / (G_on max(cos z, min_cos_zenith))`` computed from the
    caller's extraterrestrial normal irradiance (:func:`pvlib.irradiance.clearness_index`,
    ``kt`` at most 1). ``pvlib.irradiance.erbs`` computes its own ``G_on``
    from the day of year with a solar constant of 1366.1 W/m²; using ours
    keeps ``kt`` consistent with the extraterrestrial irradiance, and with
    the cap on GHI, used everywhere else in the project.

    Parameters
    ----------
    ghi : array_like
        Global horizontal irradiance, W/m².
    zenith : array_like
        True (not refraction-corrected) solar zenith, degrees.
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    min_cos_zenith : float, default 0.065
        Lower bound of ``cos z`` in the clearness index (pvlib's default).
    max_zenith : float, default 87
        Above this zenith DNI is set to 0 and DHI to GHI (pvlib's default).

    Returns
    -------
    dni, dhi, kt : numpy.ndarray
        ``GHI = DHI + DNI cos z`` holds exactly.

    References
    ----------
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the
    diffuse radiation fraction for hourly, daily and monthly-average global
    radiation. Solar Energy 28(4), 293-302, eq. 1:
    ``DF = 1 - 0.09 kt`` (kt <= 0.22),
    ``0.9511 - 0.1604 kt + 4.388 kt^2 - 16.638 kt^3 + 12.336 kt^4`` (0.22 < kt <= 0.8),
    ``0.165`` (kt > 0.8). Implementation after pvlib.irradiance.erbs.
    """
    ghi = np.asarray(ghi, dtype=float)
    zenith = np.asarray(zenith, dtype=float)
    kt = np.asarray(pvlib.irradiance.clearness_index(
        ghi, zenith, np.asarray(dni_extra, dtype=float), min_cos_zenith=min_cos_zenith,
        max_clearness_index=1.0), dtype=float)
    df = np.where(kt <= 0.22, 1.0 - 0.09 * kt,
                  np.where(kt <= 0.8,
                           0.9511 - 0.1604 * kt + 4.388 * kt**2 - 16.638 * kt**3
                           + 12.336 * kt**4,
                           0.165))
    dhi = df * ghi
    cos_z = np.cos(np.radians(zenith))
    with np.errstate(divide="ignore", invalid="ignore"):
        dni = (ghi - dhi) / cos_z
    bad = (zenith > max_zenith) | (ghi < 0) | ~(dni >= 0)
    dni = np.where(bad, 0.0, dni)
    dhi = np.where(bad, ghi, dhi)
    return dni, dhi, kt


# -- monthly basis ----------------------------------------------------------------

def _days_in_month(year: int) -> np.ndarray:
    return np.array([calendar.monthrange(int(year), m)[1] for m in range(1, 13)], dtype=float)


def scale_to_monthly_ghi(ghi_shape, month, kwh_weight, monthly_ghi_kwh_m2_day, year: int,
                         cap_w_m2) -> np.ndarray:
    """Scale a GHI shape month by month to given monthly mean daily irradiation.

    In each local month the shape is multiplied by one factor so that
    ``sum(ghi * kwh_weight) / days_in_month`` equals the month's value; where
    the scaled value would exceed ``cap_w_m2`` it is held at the cap and the
    rest of the month is scaled further (repeated until no new value reaches
    the cap), so the monthly mean is still met exactly.

    Parameters
    ----------
    ghi_shape : array_like
        Instantaneous GHI of the shape (the clear sky), W/m².
    month : array_like of int
        Local month (1-12) of each interval.
    kwh_weight : array_like
        kWh/m² per W/m² of each interval (sun-up fraction x hours / 1000).
    monthly_ghi_kwh_m2_day : sequence of 12 float
        Target monthly mean daily GHI, kWh/m²/day, January first.
    year : int
        Calendar year (days per month).
    cap_w_m2 : array_like
        Upper bound per interval (extraterrestrial horizontal irradiance).

    Returns
    -------
    numpy.ndarray
        Scaled GHI, W/m².

    Raises
    ------
    ValueError
        A month asks for more than its extraterrestrial irradiation, or for
        irradiation in a month without daylight, naming
        ``monthly_ghi_kwh_m2_day``, the month, the value and the allowed range.

    References
    ----------
    Monthly scaling of a clear-sky profile: common practice, no source. The
    bound is energy conservation (Duffie & Beckman 2013, eq. 1.10.1).
    """
    shape = np.maximum(np.asarray(ghi_shape, dtype=float), 0.0)
    month = np.asarray(month)
    w = np.asarray(kwh_weight, dtype=float)
    cap = np.maximum(np.asarray(cap_w_m2, dtype=float), 0.0)
    shape = np.minimum(shape, cap)
    target = np.asarray(monthly_ghi_kwh_m2_day, dtype=float)
    days = _days_in_month(year)
    out = np.zeros_like(shape)
    for m in range(1, 13):
        sel = np.flatnonzero(month == m)
        want = target[m - 1] * days[m - 1]  # kWh/m2 in the month
        g, c, wm = shape[sel], cap[sel], w[sel]
        most = float((c * wm).sum())
        if want > most * (1.0 + 1e-12):
            raise ValueError(
                f"monthly_ghi_kwh_m2_day[{m - 1}] ({calendar.month_name[m]}) = "
                f"{target[m - 1]:g} kWh/m2/day: must be at most the month's extraterrestrial "
                f"horizontal irradiation, {most / days[m - 1]:.4g} kWh/m2/day here")
        if want == 0.0:
            continue
        if float((g * wm).sum()) <= 0.0:
            raise ValueError(
                f"monthly_ghi_kwh_m2_day[{m - 1}] ({calendar.month_name[m]}) = "
                f"{target[m - 1]:g} kWh/m2/day: the sun does not rise in this month here, "
                "so it must be 0")
        capped = np.zeros(sel.size, dtype=bool)
        res = g
        for _ in range(sel.size + 1):
            free = (g * wm)[~capped].sum()
            rest = want - (c * wm)[capped].sum()
            s = rest / free if free > 0 else 0.0
            res = np.where(capped, c, s * g)
            new = ~capped & (res > c)
            if not new.any():
                break
            capped |= new
        out[sel] = res
    return out


def monthly_sky(site: Site, ghi_clear, zenith, dni_extra, month, kwh_weight,
                year: int) -> AllSky:
    """Synthetic all-sky year from the site's monthly mean daily GHI.

    The clear-sky GHI is scaled per local month to
    ``site.monthly_ghi_kwh_m2_day`` (:func:`scale_to_monthly_ghi`, bounded by
    the extraterrestrial horizontal irradiance) and split into DNI and DHI by
    :func:`erbs_split`.

    Parameters
    ----------
    site : Site
        Needs ``monthly_ghi_kwh_m2_day``.
    ghi_clear : array_like
        Clear-sky GHI at the evaluation instants, W/m² (zero with the sun down).
    zenith : array_like
        True solar zenith at the evaluation instants, degrees.
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².
    month : array_like of int
        Local month of each interval.
    kwh_weight : array_like
        kWh/m² per W/m², per interval.
    year : int
        Calendar year.

    Returns
    -------
    AllSky

    Raises
    ------
    SiteError
        ``monthly_ghi_kwh_m2_day`` is not given.

    References
    ----------
    Erbs, Klein & Duffie (1982), Solar Energy 28(4), 293-302, eq. 1 (hourly
    diffuse fraction). Extraterrestrial bound: Duffie & Beckman (2013),
    eq. 1.10.1.
    """
    if site.monthly_ghi_kwh_m2_day is None:
        raise SiteError("monthly_ghi_kwh_m2_day", None,
                        "sky = 'monthly' needs 12 monthly mean daily GHI values in "
                        "kWh/m2/day (0 to 12), January first")
    zenith = np.asarray(zenith, dtype=float)
    cap = extraterrestrial_on_plane(dni_extra, zenith, zenith)
    ghi = scale_to_monthly_ghi(ghi_clear, month, kwh_weight, site.monthly_ghi_kwh_m2_day,
                               year, cap)
    dni, dhi, _ = erbs_split(ghi, zenith, dni_extra)
    return AllSky(ghi, dni, dhi, MONTHLY_NOTE)


# -- weather file basis -----------------------------------------------------------

def check_weather_step(weather: WeatherData, step_min: int) -> None:
    """Raise ValueError unless the weather data's interval is ``step_min`` minutes."""
    if int(weather.step_min) != int(step_min):
        hint = (f"set step_min = {weather.step_min}" if weather.step_min in STEPS_MIN else
                f"{weather.step_min}-minute data are not supported (step_min must be one of "
                f"{', '.join(map(str, STEPS_MIN))}); resample the file")
        raise ValueError(f"step_min = {step_min!r}: the weather data ({weather.source}) have "
                         f"{weather.step_min}-minute intervals; they must match: {hint}")


def map_weather_to_grid(weather: WeatherData, grid: TimeGrid) -> pd.DataFrame:
    """Place weather intervals on the intervals of ``grid``.

    Each interval start is taken to the site's local standard time (fixed
    offset, so no daylight-saving ambiguity), given the grid's year with the
    same month, day and time of day (29 February is dropped for a non-leap
    year), and matched to the grid interval with that start; starts outside
    the local year wrap around it (typical-year data whose first hours fall
    in the previous UTC year, say).

    Parameters
    ----------
    weather : WeatherData
        Interval means indexed by interval start (UTC).
    grid : TimeGrid
        The year's intervals; ``grid.timezone`` is the site's zone.

    Returns
    -------
    pandas.DataFrame
        Index ``grid.start_utc``; the weather columns, NaN where the data
        have no value for an interval.

    Raises
    ------
    ValueError
        Interval lengths differ (names ``step_min``), interval starts are not
        on the grid's, or the data span more than one year.

    References
    ----------
    Month/day/hour mapping of typical-year data onto one year: Wilcox &
    Marion (2008), Users Manual for TMY3 Data Sets, NREL/TP-581-43156 (each
    month from a different year); common practice, no source for the wrap.
    """
    check_weather_step(weather, grid.step_min)
    offset = pd.Timedelta(standard_offset(grid.timezone, grid.year))
    wall = pd.DatetimeIndex(weather.data.index).tz_convert("UTC").tz_localize(None) + offset
    keep = np.ones(len(wall), dtype=bool)
    if not calendar.isleap(grid.year):
        keep = ~np.asarray((wall.month == 2) & (wall.day == 29))
    wall = wall[keep]
    dates = pd.to_datetime(pd.DataFrame({"year": np.full(len(wall), grid.year),
                                         "month": wall.month, "day": wall.day}))
    mapped = pd.DatetimeIndex(dates) + (wall - wall.normalize()) - offset
    t0 = grid.start_utc[0].tz_convert("UTC").tz_localize(None)
    step_s = grid.step_min * 60
    delta_s = (mapped - t0).total_seconds().to_numpy()
    rem = np.mod(delta_s, step_s)
    if np.any(rem != 0):
        raise ValueError(
            f"weather data ({weather.source}): interval starts are {rem[rem != 0][0] / 60:g} min "
            f"off the year's intervals, which start at local midnight and every "
            f"{grid.step_min} min after (check the file's time zone and timestamp label)")
    n = len(grid)
    pos = np.mod(np.round(delta_s / step_s).astype(np.int64), n)
    if np.unique(pos).size != pos.size:
        raise ValueError(
            f"weather data ({weather.source}): {pos.size - np.unique(pos).size} intervals fall "
            f"on the same time of year as others: the data span more than one year; give one "
            "year (or a typical year) of data")
    out = pd.DataFrame(index=grid.start_utc)
    for col in weather.data.columns:
        vals = np.full(n, np.nan)
        vals[pos] = weather.data[col].to_numpy(dtype=float)[keep]
        out[col] = vals
    return out


def weather_sky(weather: WeatherData, grid: TimeGrid, sun_up_fraction, zenith,
                dni_extra) -> AllSky:
    """All-sky irradiance from a weather series, on the year's intervals.

    Interval means are mapped onto the grid (:func:`map_weather_to_grid`) and
    turned into instantaneous values at the evaluation instants by dividing
    by the sun-up fraction (zero where the sun is down; energy measured in
    such intervals is reported in the note). Missing components are derived
    row by row: GHI from ``DHI + DNI cos z``; DNI from ``(GHI - DHI) / cos z``;
    DHI from ``GHI - DNI cos z``; both DNI and DHI from GHI by
    :func:`erbs_split`. Values are bounded by the extraterrestrial irradiance
    (GHI and DHI by ``G_on cos z``, DNI by ``G_on``), reported in the note.

    Parameters
    ----------
    weather : WeatherData
        The weather series.
    grid : TimeGrid
        The year's intervals.
    sun_up_fraction : array_like
        Sun-up share of each interval.
    zenith : array_like
        True solar zenith at the evaluation instants, degrees.
    dni_extra : array_like
        Extraterrestrial normal irradiance, W/m².

    Returns
    -------
    AllSky

    Raises
    ------
    ValueError
        See :func:`map_weather_to_grid`; also when sun-up intervals have no
        GHI and no way to derive it (named with the first such interval).

    References
    ----------
    Closure ``GHI = DHI + DNI cos z``: Duffie & Beckman (2013), eq. 2.9.1
    (from memory). Erbs, Klein & Duffie (1982), Solar Energy 28(4), 293-302.
    """
    frac = np.asarray(sun_up_fraction, dtype=float)
    zenith = np.asarray(zenith, dtype=float)
    e0 = np.asarray(dni_extra, dtype=float)
    up = frac > 0
    mapped = map_weather_to_grid(weather, grid)
    nan = np.full(len(grid), np.nan)
    means = {c: (mapped[c].to_numpy(dtype=float) if c in mapped else nan.copy())
             for c in ("ghi", "dni", "dhi")}
    notes = [f"measured weather from {weather.source}, interval means divided by the sun-up "
             "fraction of each interval"]
    step_h = grid.step_min / 60.0
    total_kwh = float(np.nansum(means["ghi"]) * step_h / 1000.0)
    dark = ~up & (means["ghi"] > 0)
    if dark.any():
        lost = float(means["ghi"][dark].sum() * step_h / 1000.0)
        pct = 100.0 * lost / total_kwh if total_kwh > 0 else 0.0
        notes.append(f"{lost:.3g} kWh/m2 of measured GHI ({pct:.2g} %) in {int(dark.sum())} "
                     "intervals with the sun down, not used (check the timestamps)")
    inst = {}
    with np.errstate(divide="ignore", invalid="ignore"):
        for c, v in means.items():
            inst[c] = np.where(up, v / np.where(up, frac, 1.0), 0.0)
    ghi, dni, dhi = inst["ghi"], inst["dni"], inst["dhi"]
    cos_z = np.cos(np.radians(zenith))
    ok_z = up & (zenith <= 87.0)
    derived = []
    f = up & np.isnan(ghi) & ~np.isnan(dni) & ~np.isnan(dhi)
    if f.any():
        ghi = np.where(f, dhi + dni * np.maximum(cos_z, 0.0), ghi)
        derived.append(f"GHI = DHI + DNI cos z in {int(f.sum())} intervals")
    f = up & ~np.isnan(ghi) & np.isnan(dni) & ~np.isnan(dhi)
    if f.any():
        with np.errstate(divide="ignore", invalid="ignore"):
            d = np.where(ok_z, np.maximum(ghi - dhi, 0.0) / cos_z, 0.0)
        dni = np.where(f, d, dni)
        dhi = np.where(f & ~ok_z, ghi, dhi)
        derived.append(f"DNI = (GHI - DHI) / cos z in {int(f.sum())} intervals")
    f = up & ~np.isnan(ghi) & ~np.isnan(dni) & np.isnan(dhi)
    if f.any():
        dhi = np.where(f, np.maximum(ghi - dni * np.maximum(cos_z, 0.0), 0.0), dhi)
        derived.append(f"DHI = GHI - DNI cos z in {int(f.sum())} intervals")
    f = up & ~np.isnan(ghi) & np.isnan(dni) & np.isnan(dhi)
    if f.any():
        b, d, _ = erbs_split(np.where(f, ghi, 0.0), zenith, e0)
        dni = np.where(f, b, dni)
        dhi = np.where(f, d, dhi)
        what = ("DNI and DHI not in the data" if "dni" not in mapped and "dhi" not in mapped
                else "DNI and DHI missing")
        derived.append(f"{what}: split from GHI by the {ERBS_NOTE} in {int(f.sum())} intervals")
    if derived:
        notes.append("; ".join(derived))
    bad = up & (np.isnan(ghi) | np.isnan(dni) | np.isnan(dhi))
    if bad.any():
        first = grid.start_utc[np.flatnonzero(bad)[0]].tz_convert(grid.timezone)
        raise ValueError(
            f"weather data ({weather.source}): {int(bad.sum())} intervals with the sun up have "
            f"no usable GHI/DNI/DHI (first starting {first.isoformat()}); fill the gaps in the "
            "file or give a complete year")
    e0h = extraterrestrial_on_plane(e0, zenith, zenith)
    over = up & ((ghi > e0h) | (dhi > e0h) | (dni > e0))
    if over.any():
        w = frac * step_h / 1000.0
        cut = float(((ghi - np.minimum(ghi, e0h)) * w)[over].sum())
        ghi = np.minimum(ghi, e0h)
        dhi = np.minimum(dhi, e0h)
        dni = np.minimum(dni, e0)
        notes.append(f"{int(over.sum())} intervals above the extraterrestrial irradiance "
                     f"capped to it ({cut:.3g} kWh/m2 of GHI removed)")
    ghi, dni, dhi = (np.where(up, np.maximum(x, 0.0), 0.0) for x in (ghi, dni, dhi))
    extra = {c: (mapped[c].to_numpy(dtype=float) if c in mapped else None)
             for c in ("temp_air", "wind_speed")}
    return AllSky(ghi, dni, dhi, "; ".join(notes), extra["temp_air"], extra["wind_speed"])


def load_weather_for_site(path, site: Site) -> WeatherData:
    """Read a typical-year weather file (TMY3, TMY2, EPW) for ``site``.

    Calls :func:`tiltyard.engine.weather.read_weather_file` with the site's
    coordinates (for the labelling check and the header comparison).

    Parameters
    ----------
    path : str or path-like
        The file.
    site : Site
        The site.

    Returns
    -------
    WeatherData

    Raises
    ------
    WeatherImportError
        Unreadable file; when the format is not recognised the message says
        to read the file as a CSV with a column mapping
        (:func:`tiltyard.engine.weather.read_weather_csv` and
        :class:`~tiltyard.engine.weather.ColumnMap`).

    References
    ----------
    Wilcox & Marion (2008), NREL/TP-581-43156; Marion & Urban (1995);
    EnergyPlus Auxiliary Programs, EPW Data Dictionary.
    """
    p = Path(path)
    try:
        return read_weather_file(p, latitude_deg=site.latitude_deg,
                                 longitude_deg=site.longitude_deg)
    except WeatherImportError as exc:
        if "format not recognised" not in exc.reason:
            raise
        raise WeatherImportError(
            exc.file, None,
            "not a TMY3, TMY2 or EPW file; for any other file give a CSV column mapping "
            "(which columns hold the timestamp, ghi, dni, dhi, temp_air, wind_speed, what the "
            "timestamps label and their time zone) and read it with read_weather_csv") from exc


__all__ = ["AllSky", "ERBS_NOTE", "MONTHLY_NOTE", "check_weather_step", "erbs_split",
           "load_weather_for_site", "map_weather_to_grid", "monthly_sky",
           "scale_to_monthly_ghi", "weather_sky"]
