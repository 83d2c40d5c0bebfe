"""An indicative specific yield (kWh per kWp) from a plane-of-array irradiance series.

Three steps, each stated in the result:

1. cell temperature by the Faiman (2008) model, ``T_cell = T_air + E / (U0 + U1 v)``,
   through :func:`pvlib.temperature.faiman`, when the air temperature is known
   (wind speed 1 m/s where it is not given); without air temperature there is
   no temperature correction;
2. DC power per kWp ``E / 1000 * (1 + gamma_pdc (T_cell - 25))``: 1 kWp is the
   power at 1000 W/m² and 25 °C cell temperature (standard test conditions);
3. a single system loss fraction applied to the DC energy.

This is a first look for a feasibility sheet, not a system design: callers
must show :data:`LABEL` with the figure.
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass

import numpy as np
import pandas as pd
import pvlib

#: Text to show with every figure from :func:`specific_yield`.
LABEL = "indicative specific yield, not a system design"

#: Irradiance of standard test conditions, W/m² (1 kWp delivers 1 kW there).
STC_IRRADIANCE_W_M2 = 1000.0

#: Cell temperature of standard test conditions, °C.
STC_TEMPERATURE_C = 25.0

#: Wind speed assumed when only the air temperature is given, m/s (pvlib's
#: default for the Faiman model: the module-height wind of the NOCT test).
DEFAULT_WIND_SPEED_M_S = 1.0

#: Allowed ranges of the series, for the error messages.
_POA_RANGE = (0.0, 2000.0)          # W/m2, interval means
_TEMP_AIR_RANGE = (-90.0, 70.0)     # deg C, beyond the recorded extremes
_WIND_RANGE = (0.0, 75.0)           # m/s
_INTERVAL_RANGE = (0.0, 24.0)       # h, sub-daily interval means


@dataclass(frozen=True)
class SpecificYield:
    """An indicative specific yield and how it was obtained.

    Attributes
    ----------
    annual_kwh_kwp : float
        Sum over the whole series, kWh/kWp (the annual value for a year of
        data).
    monthly_kwh_kwp : tuple of float
        12 values, January first, by the calendar month of the series' index
        in its own time zone; months without data are 0.
    temperature_loss_pct : float
        Relative DC energy lost to cell temperatures above 25 °C,
        irradiance-weighted: ``100 (1 - sum(E f dt) / sum(E dt))`` with ``f``
        the temperature factor. Negative when cold cells gain. 0 when
        ``temperature_model`` is ``"none"`` (no correction applied).
    loss_fraction : float
        System loss fraction applied after the temperature correction.
    gamma_pdc : float
        Power temperature coefficient, 1/K.
    temperature_model : str
        ``"faiman"`` or ``"none"``.
    u0, u1 : float
        Faiman heat loss factors used (W/m²/K and W/m²/K per m/s).
    series : pandas.DataFrame
        Per interval: ``poa_global`` (W/m²), ``temp_cell`` (°C, NaN without a
        temperature model), ``dc_kw_kwp`` (DC power per kWp before the system
        loss) and ``yield_kwh_kwp``.
    notes : tuple of str
        Statements to show with the figure.
    label : str
        :data:`LABEL`; callers must show it.
    """

    annual_kwh_kwp: float
    monthly_kwh_kwp: tuple
    temperature_loss_pct: float
    loss_fraction: float
    gamma_pdc: float
    temperature_model: str
    u0: float
    u1: float
    series: pd.DataFrame
    notes: tuple = ()
    label: str = LABEL


def _scalar(name: str, value, lo: float, hi: float, unit: str = "",
            lo_open: bool = False) -> float:
    u = f" {unit}" if unit else ""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise ValueError(f"{name} = {value!r}: must be a number")
    v = float(value)
    low_bad = v <= lo if lo_open else v < lo
    if not math.isfinite(v) or low_bad or v > hi:
        rng = (f"greater than {lo:g} and at most {hi:g}{u}" if lo_open
               else f"between {lo:g} and {hi:g}{u}")
        raise ValueError(f"{name} = {value!r}: must be {rng}")
    return v


def _series(name: str, value, index: pd.DatetimeIndex, lo: float, hi: float, unit: str,
            lo_open: bool = False) -> np.ndarray:
    """A scalar or a sequence matching ``index``, checked value by value."""
    n = len(index)
    if isinstance(value, pd.Series) and not value.index.equals(index):
        raise ValueError(f"{name}: its index differs from poa_global's index (same "
                         f"timestamps required, {n} values)")
    if np.ndim(value) == 0:
        return np.full(n, _scalar(name, value, lo, hi, unit, lo_open))
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name}: must be numbers") from None
    if arr.ndim != 1 or len(arr) != n:
        raise ValueError(f"{name}: has {arr.size} values, must have {n} (one per value of "
                         "poa_global)")
    low_bad = arr <= lo if lo_open else arr < lo
    bad = ~np.isfinite(arr) | low_bad | (arr > hi)
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        rng = (f"greater than {lo:g} and at most {hi:g} {unit}" if lo_open
               else f"between {lo:g} and {hi:g} {unit}")
        raise ValueError(f"{name}[{i}] ({index[i].isoformat()}) = {float(arr[i])!r}: "
                         f"must be {rng}")
    return arr


def specific_yield(poa_global: pd.Series, interval_h, temp_air=None, wind_speed=None,
                   loss_fraction: float = 0.14, gamma_pdc: float = -0.004, u0: float = 25.0,
                   u1: float = 6.84, month=None) -> SpecificYield:
    """Indicative specific yield, kWh per kWp, from plane-of-array irradiance.

    ``yield = sum(E / 1000 * (1 + gamma_pdc (T_cell - 25)) * (1 - loss_fraction) * dt)``
    with ``T_cell = T_air + E / (u0 + u1 v)`` (Faiman 2008) when ``temp_air``
    is given; without it the temperature factor is 1.

    Parameters
    ----------
    poa_global : pandas.Series
        Plane-of-array global irradiance, W/m², interval means (0 to 2000),
        on a timezone-aware DatetimeIndex.
    interval_h : float or array_like
        Interval length(s), hours (greater than 0, at most 24), one value or
        one per interval.
    temp_air : float or array_like, optional
        Air temperature, °C (-90 to 70), one value or one per interval (a
        Series must share ``poa_global``'s index). Without it, no temperature
        correction.
    wind_speed : float or array_like, optional
        Wind speed at module height, m/s (0 to 75); 1 m/s when not given
        (stated in the notes). Used only with ``temp_air``.
    loss_fraction : float, default 0.14
        System losses after the temperature correction (0 to 0.9). The
        default 14 % is common practice, no source.
    gamma_pdc : float, default -0.004
        Power temperature coefficient, 1/K (-0.01 to 0). The default,
        -0.4 %/K for crystalline silicon, is common practice, no source.
    u0 : float, default 25.0
        Faiman constant heat loss factor, W/m²/K (greater than 0, at most 100).
    u1 : float, default 6.84
        Faiman wind heat loss factor, W/m²/K per m/s (0 to 50).
    month : array_like of int, optional
        Each value's calendar month (1-12) in the index's own time zone, when the
        caller has it already (a sky year's ``month``); by default from the index.

    Returns
    -------
    SpecificYield

    Notes
    -----
    1 kWh/m² of plane irradiation is 1 kWh/kWp before temperature and losses,
    by the definition of the kWp at 1000 W/m² (standard test conditions;
    common practice, no source). The temperature factor is clipped at 0 (a
    module does not consume power in extreme heat). Spectral, angle-of-
    incidence and low-irradiance effects are not modelled separately: they
    belong to the single loss fraction.

    References
    ----------
    Faiman, D. (2008). Assessing the outdoor operating temperature of
    photovoltaic modules. Progress in Photovoltaics 16(4), 307-315 (the heat
    loss model ``T = T_air + E / (U0 + U1 v)``; U0 = 25.0, U1 = 6.84 are his
    values for seven silicon modules on an open rack), implemented by
    :func:`pvlib.temperature.faiman` (pvlib 0.16). The linear power
    temperature coefficient and the single loss fraction are common practice,
    no source.
    """
    if not isinstance(poa_global, pd.Series):
        raise ValueError(f"poa_global = {type(poa_global).__name__}: must be a pandas Series "
                         "of W/m2 on a timezone-aware DatetimeIndex")
    index = poa_global.index
    if not isinstance(index, pd.DatetimeIndex) or index.tz is None:
        raise ValueError("poa_global: its index must be a timezone-aware DatetimeIndex")
    if len(index) == 0:
        raise ValueError("poa_global: is empty, must have at least one value")
    e = _series("poa_global", poa_global.to_numpy(dtype=float), index, *_POA_RANGE, "W/m2")
    dt = _series("interval_h", interval_h, index, *_INTERVAL_RANGE, "h", lo_open=True)
    loss = _scalar("loss_fraction", loss_fraction, 0.0, 0.9)
    gamma = _scalar("gamma_pdc", gamma_pdc, -0.01, 0.0, "1/K")
    u0_f = _scalar("u0", u0, 0.0, 100.0, "W/m2/K", lo_open=True)
    u1_f = _scalar("u1", u1, 0.0, 50.0, "W/m2/K per m/s")

    notes = [f"system loss fraction {loss:g} applied to the DC energy",
             "1 kWp = 1 kW at 1000 W/m2 and 25 C cell temperature (standard test conditions)"]
    if temp_air is None:
        model = "none"
        temp_cell = np.full(len(e), np.nan)
        factor = np.ones(len(e))
        notes.append("no temperature correction: air temperature not given")
        if wind_speed is not None:
            notes.append("wind speed ignored: it is used only with the air temperature")
    else:
        model = "faiman"
        ta = _series("temp_air", temp_air, index, *_TEMP_AIR_RANGE, "C")
        if wind_speed is None:
            ws = np.full(len(e), DEFAULT_WIND_SPEED_M_S)
            notes.append(f"wind speed not given: {DEFAULT_WIND_SPEED_M_S:g} m/s assumed")
        else:
            ws = _series("wind_speed", wind_speed, index, *_WIND_RANGE, "m/s")
        temp_cell = np.asarray(pvlib.temperature.faiman(e, ta, ws, u0=u0_f, u1=u1_f),
                               dtype=float)
        factor = np.maximum(1.0 + gamma * (temp_cell - STC_TEMPERATURE_C), 0.0)
        notes.append(f"cell temperature by Faiman (2008), U0 = {u0_f:g}, U1 = {u1_f:g}; "
                     f"power temperature coefficient {gamma:g} /K")
    dc = e / STC_IRRADIANCE_W_M2 * factor
    y = dc * (1.0 - loss) * dt
    h = float(np.sum(e * dt))
    temp_loss = 0.0 if h <= 0.0 else 100.0 * (1.0 - float(np.sum(e * factor * dt)) / h)
    if month is None:
        month = index.month.to_numpy()
    month = np.asarray(month)
    if month.shape != (len(e),) or month.min() < 1 or month.max() > 12:
        raise ValueError(f"month: must hold {len(e)} months, 1-12 (one per value of "
                         "poa_global)")
    monthly = np.bincount(month.astype(np.intp) - 1, weights=y, minlength=12)
    series = pd.DataFrame({"poa_global": e, "temp_cell": temp_cell, "dc_kw_kwp": dc,
                           "yield_kwh_kwp": y}, index=index)
    return SpecificYield(
        annual_kwh_kwp=float(np.sum(y)), monthly_kwh_kwp=tuple(float(v) for v in monthly),
        temperature_loss_pct=temp_loss, loss_fraction=loss, gamma_pdc=gamma,
        temperature_model=model, u0=u0_f, u1=u1_f, series=series, notes=tuple(notes))


__all__ = ["DEFAULT_WIND_SPEED_M_S", "LABEL", "STC_IRRADIANCE_W_M2", "STC_TEMPERATURE_C",
           "SpecificYield", "specific_yield"]
