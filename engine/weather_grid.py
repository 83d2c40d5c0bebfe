"""The ``file`` sky basis: a weather series on the year's intervals.

A measured or typical-year weather series
(:class:`tiltyard.engine.weather.WeatherData`, read by
:func:`tiltyard.engine.weather_site.load_weather_for_site`) is mapped onto the
year's intervals (:func:`map_weather_to_grid`, :func:`weather_sky`). Weather
values are interval means; the sky year holds instantaneous values at the
evaluation instant that are later multiplied by the sun-up fraction, so each
mean is divided by that fraction. Missing components are derived, GHI alone
split by the Erbs et al. (1982) hourly correlation
(:func:`tiltyard.engine.allsky.erbs_split`).

References
----------
Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). Estimation of the diffuse
radiation fraction for hourly, daily and monthly-average global radiation.
Solar Energy 28(4), 293-302, eq. 1.
"""

from __future__ import annotations

import calendar

import numpy as np
import pandas as pd

from .allsky import ERBS_NOTE, AllSky, erbs_split
from .sky import extraterrestrial_on_plane
from .timegrid import GRID_STEPS_MIN, TimeGrid, standard_offset
from .weather import WeatherData


def check_weather_step(weather: WeatherData, step_min: int) -> None:
    """Raise ValueError unless the weather data's interval is ``step_min`` minutes."""
    if int(weather.step_min) != int(step_min):
        hint = (f"set step_min = {weather.step_min}" if weather.step_min in GRID_STEPS_MIN
                else f"{weather.step_min}-minute data are not supported (the interval must "
                f"divide an hour: {', '.join(map(str, GRID_STEPS_MIN))}); resample the file")
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
    sun_down_share = 0.0
    if dark.any():
        lost = float(means["ghi"][dark].sum() * step_h / 1000.0)
        pct = 100.0 * lost / total_kwh if total_kwh > 0 else 0.0
        sun_down_share = pct / 100.0
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
    return AllSky(ghi, dni, dhi, "; ".join(notes), extra["temp_air"], extra["wind_speed"],
                  sun_down_share)


__all__ = ["check_weather_step", "map_weather_to_grid", "weather_sky"]
