"""Data exports of a tilt study, and every figure the feasibility sheet prints.

One module builds what leaves the program as data, so the command line, the
desktop app and the printed sheet give the same numbers:

- :func:`study_document` / :func:`study_json_text`: the study as JSON, the
  document of ``tiltyard study --json`` (``{"study": ...}`` plus the weather
  file's import findings when the sky basis is a weather file);
- :func:`options_table` / :func:`monthly_table` and their CSV texts: the
  options compared and their monthly and annual irradiation, built from the
  JSON document's own (rounded) values;
- :func:`hourly_poa_table` / :func:`hourly_csv_text`: the interval
  plane-of-array irradiance of chosen options
  (:func:`tiltyard.engine.tilt.schedule_poa`);
- :func:`sheet_figures`: the key figures, assumptions, cautions and the
  reproducibility hash of the sheet.

No Qt here: plain dictionaries, pandas frames and text.
"""

from __future__ import annotations

import hashlib
import io
import json
from collections.abc import Callable
from dataclasses import dataclass, fields

import numpy as np
import pandas as pd

from .horizon_loss import PlaneHorizonLoss, schedule_horizon_loss
from .jobs import model_references
from .site import CLIENT_KEYS, Site
from .site_file import site_to_dict
from .skyyear import SkyYear, sky_year
from .sunchart import SunChart, sun_chart
from .tilt import (
    KLEIN_METHOD,
    OPTION_KINDS,
    StudyOption,
    StudyOptions,
    TiltStudy,
    schedule_poa,
    tilt_study,
)
from .timegrid import MIDPOINT_CONVENTION
from .weather_site import weather_json_dict
from .words import (
    MONTH_ABBR,
    basis_words,
    degree_text,
    model_name,
    mounting_sentence,
    objective_words,
    plural,
    schedule_code,
)

#: What the sheet states besides the standing caution, in this order.
SHEET_CAUTIONS = (
    "This is a preliminary feasibility estimate. It is not a design and not a quotation.",
    "Structural, electrical and fire safety, roof access and the sizing of any installation "
    "belong to local codes and licensed installers.",
    "Weather varies from year to year: a single year, a typical year or a clear sky does "
    "not predict the energy of any particular year.",
    "Irradiation on the plane is the sunlight reaching the panel surface, not the electricity "
    "a system delivers.",
)

# -- the JSON document -------------------------------------------------------------------

def study_document(study: TiltStudy, result=None) -> dict:
    """The JSON document of ``tiltyard study --json`` for ``study``.

    ``{"study": study.to_json_dict()}``, plus ``"weather"`` (source, interval,
    labelling and every import finding, see
    :func:`tiltyard.engine.weather_site.weather_json_dict`) when the sky basis is a
    weather file; with the assessment ``result`` (an
    :class:`tiltyard.engine.assess.AssessmentResult`), also ``"assessment"``
    (:meth:`~tiltyard.engine.assess.AssessmentResult.header`: the basis used and
    why, the mounting, the settings) and ``"clear_sky_bound_kwh_m2"`` (each
    option's annual clear-sky irradiation, the upper bound; null on the clear
    basis).
    """
    doc = {}
    if result is not None:
        doc["assessment"] = result.header()
    doc["study"] = study.to_json_dict()
    if result is not None:
        bound = result.clear_sky_bound()
        doc["clear_sky_bound_kwh_m2"] = None if bound is None else {
            k: round(v, 3) for k, v in bound.items()}
    weather = study.options_used.irradiance.weather
    if weather is not None:
        doc["weather"] = weather_json_dict(weather)
    return doc


def study_json_text(study: TiltStudy, result=None) -> str:
    """:func:`study_document` as the exact text ``tiltyard study --json`` prints."""
    return document_json_text(study_document(study, result))


def document_json_text(doc: dict) -> str:
    """A JSON document as the command line prints it (the sheet's ``document`` included)."""
    return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"


# -- tables --------------------------------------------------------------------------------

def _unique(names) -> list[str]:
    """Names made unique by a ``[2]``, ``[3]`` suffix on repeats (two planes with one label)."""
    seen: dict[str, int] = {}
    out = []
    for n in names:
        seen[n] = seen.get(n, 0) + 1
        out.append(n if seen[n] == 1 else f"{n} [{seen[n]}]")
    return out


def options_table(study: TiltStudy) -> pd.DataFrame:
    """The options compared, one row each, with the JSON document's values.

    Columns: ``label``, ``kind``, ``recommended`` (bool), ``schedule``
    (``MM-DD..MM-DD tilt/azimuth`` per period, degrees), ``annual_kwh_m2``,
    ``objective_value_kwh_m2``, ``gain_vs_horizontal_pct``,
    ``gain_vs_fixed_optimal_pct``, ``share_of_tracking_pct``,
    ``adjustments_per_year``. Rows in the study's order.
    """
    d = study.to_json_dict()
    rows = []
    for r in d["options"]:
        rows.append({
            "label": r["label"], "kind": r["kind"], "recommended": r["label"] == d["recommended"],
            "schedule": schedule_code(r["schedule"]), "annual_kwh_m2": r["annual_kwh_m2"],
            "objective_value_kwh_m2": r["objective_value_kwh_m2"],
            "gain_vs_horizontal_pct": r["gain_vs_horizontal_pct"],
            "gain_vs_fixed_optimal_pct": r["gain_vs_fixed_optimal_pct"],
            "share_of_tracking_pct": r["share_of_tracking_pct"],
            "adjustments_per_year": r["adjustments_per_year"]})
    return pd.DataFrame(rows)


def monthly_table(study: TiltStudy) -> pd.DataFrame:
    """Monthly and annual irradiation on the plane of every option, kWh/m².

    Rows ``Jan`` .. ``Dec`` and ``Year`` (index ``month``); one column per
    option, named ``"<label> (kWh/m2)"`` (labels made unique), in the
    study's order. Values are the JSON document's (3 decimals); the ``Year``
    row is the option's annual total as the JSON document gives it.
    """
    d = study.to_json_dict()
    names = _unique(r["label"] for r in d["options"])
    data = {f"{n} (kWh/m2)": list(r["monthly_kwh_m2"]) + [r["annual_kwh_m2"]]
            for n, r in zip(names, d["options"], strict=True)}
    return pd.DataFrame(data, index=pd.Index(list(MONTH_ABBR) + ["Year"], name="month"))


def _csv(df: pd.DataFrame, index: bool = True, float_format: str = "%.3f") -> str:
    buf = io.StringIO()
    df.to_csv(buf, index=index, float_format=float_format, lineterminator="\n")
    return buf.getvalue()


def monthly_csv_text(study: TiltStudy) -> str:
    """:func:`monthly_table` as CSV text (UTF-8, comma-separated, 3 decimals)."""
    return _csv(monthly_table(study))


def options_csv_text(study: TiltStudy) -> str:
    """:func:`options_table` as CSV text."""
    return _csv(options_table(study), index=False)


def check_option_kinds(kinds) -> tuple:
    """The kinds, stripped, if each is an option kind or ``"recommended"``.

    Raises
    ------
    ValueError
        Naming the first unknown kind and the allowed ones.
    """
    out = []
    for k in kinds:
        k = str(k).strip()
        if k not in OPTION_KINDS and k != "recommended":
            raise ValueError(f"option kind {k!r}: must be one of "
                             f"{', '.join(OPTION_KINDS)} or recommended")
        out.append(k)
    return tuple(out)


def select_options(study: TiltStudy, kinds=None) -> tuple:
    """The study's options of the given kinds, in the study's order.

    Parameters
    ----------
    study : TiltStudy
    kinds : iterable of str, optional
        Option kinds (:data:`tiltyard.engine.tilt.OPTION_KINDS`) or
        ``"recommended"``; None or empty selects every option.

    Raises
    ------
    ValueError
        Naming an unknown kind and the allowed ones.
    """
    if not kinds:
        return tuple(study.options)
    wanted = set(check_option_kinds(kinds))
    rec = study.recommended
    return tuple(o for o in study.options
                 if o.kind in wanted or ("recommended" in wanted and o is rec))


def hourly_poa_table(sky: SkyYear, site: Site, options) -> pd.DataFrame:
    """Interval plane-of-array irradiance of several options, W/m².

    Parameters
    ----------
    sky : SkyYear
        The study's sky (``sky_year(site, study.options_used.irradiance)``).
    site : Site
        The site (horizon).
    options : sequence of StudyOption
        The options to export.

    Returns
    -------
    pandas.DataFrame
        Indexed by interval start (ISO 8601 text with the site zone's UTC
        offset, ``interval_start``); for each option the columns
        ``"<label>: poa_global (W/m2)"`` (interval mean, so that
        ``sum * step_h / 1000`` is the option's annual kWh/m²) and
        ``"<label>: surface_tilt (deg)"`` (the schedule's tilt in force; the
        sun's zenith angle for the two-axis ceiling while the sun is up).

    References
    ----------
    :func:`tiltyard.engine.tilt.schedule_poa` (pvlib transposition; Perez et
    al. 1990, Hay & Davies 1980, Liu & Jordan 1963).
    """
    names = _unique(o.label for o in options)
    cols = {}
    index = None
    for name, opt in zip(names, options, strict=True):
        poa = schedule_poa(sky, site, opt)
        index = poa.index
        cols[f"{name}: poa_global (W/m2)"] = poa["poa_global"].to_numpy()
        cols[f"{name}: surface_tilt (deg)"] = poa["surface_tilt"].to_numpy()
    if index is None:
        index = sky.grid.start_utc.tz_convert(site.timezone)
    df = pd.DataFrame(cols, index=pd.Index([t.isoformat() for t in index],
                                           name="interval_start"))
    return df


def hourly_csv_text(sky: SkyYear, site: Site, options) -> str:
    """:func:`hourly_poa_table` as CSV text (3 decimals)."""
    return _csv(hourly_poa_table(sky, site, options))


# -- horizon loss of a schedule ---------------------------------------------------------------

def option_horizon_loss(sky: SkyYear, site: Site, option: StudyOption) -> PlaneHorizonLoss:
    """What the site horizon costs an option's schedule over the year.

    The schedule's interval plane-of-array irradiance
    (:func:`tiltyard.engine.tilt.schedule_poa`) summed with the site's
    horizon and obstacles, and its open-horizon column (the sun counted as
    visible whenever it is up, each period's plane seeing the open-sky view
    factor ``(1 + cos tilt) / 2``) — the open-horizon terms of
    :func:`tiltyard.engine.plane.poa_components`, as
    :func:`tiltyard.engine.jobs.irradiance_year` reports them for one plane.

    Parameters
    ----------
    sky : SkyYear
        The study's sky for ``site``.
    site : Site
        The site with its horizon.
    option : StudyOption
        A study option (any kind).

    Returns
    -------
    tiltyard.engine.horizon_loss.PlaneHorizonLoss

    References
    ----------
    Liu, B. Y. H. & Jordan, R. C. (1963), Solar Energy 7(2), 53-74 (open-sky
    view factor); Perez, R. et al. (1990), Solar Energy 44(5), 271-289 and
    Hay, J. E. & Davies, J. A. (1980) for the transposition, through pvlib;
    the obstructed view factor as in Duffie, J. A. & Beckman, W. A. (2013),
    Solar Engineering of Thermal Processes, 4th ed., sec. 2.15.
    """
    if sky.site != site:
        raise ValueError("the sky given is of another site (or of an earlier version of it)")
    return schedule_horizon_loss(sky, option.label,
                                 None if option.kind == "two-axis" else option.schedule)


# -- reproducibility ---------------------------------------------------------------------------

def _plain(value):
    """A JSON-ready copy (tuples as lists, numpy scalars as Python numbers)."""
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, np.generic):
        return value.item()
    return value


def options_to_dict(opts: StudyOptions) -> dict:
    """The study options as plain data (the weather series as its source and a digest)."""
    out = {f.name: getattr(opts, f.name) for f in fields(opts) if f.name != "irradiance"}
    irr = opts.irradiance
    out["irradiance"] = {f.name: getattr(irr, f.name) for f in fields(irr)
                         if f.name != "weather"}
    w = irr.weather
    if w is not None:
        digest = hashlib.sha256(
            pd.util.hash_pandas_object(w.data, index=True).to_numpy().tobytes()).hexdigest()
        out["irradiance"]["weather"] = {"source": w.source, "step_min": int(w.step_min),
                                        "timestamp_label": w.timestamp_label,
                                        "timezone": w.timezone, "data_sha256": digest}
    else:
        out["irradiance"]["weather"] = None
    return _plain(out)


def input_digest(site: Site, opts: StudyOptions, basis: str | None = None,
                 mounting: str | None = None) -> str:
    """SHA-256 (hex) of the site file's JSON, the study options, the sky basis and the mounting,
    canonically serialised.

    Keys sorted, no whitespace, floats in Python's shortest round-trip form:
    the same site and options give the same digest on any machine. ``basis``
    (the sky basis used, default the options' own) and ``mounting`` (default
    the options' own) are hashed as their own keys, so two sheets on different
    bases or mountings never share a digest. Who the sheet is prepared for
    (the site's client, address and reference) decides no figure and is left
    out.
    """
    sd = site_to_dict(site)
    for key in CLIENT_KEYS:
        sd.pop(key, None)
    doc = {"site": sd, "study_options": options_to_dict(opts),
           "basis": basis if basis is not None else opts.irradiance.sky,
           "mounting": mounting if mounting is not None else opts.mounting}
    text = json.dumps(_plain(doc), sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def tool_version() -> str:
    from tiltyard import __version__

    return __version__


# -- the sheet's figures ------------------------------------------------------------------------

@dataclass(frozen=True)
class SheetFigures:
    """Every number and statement of the feasibility sheet.

    Attributes
    ----------
    study : TiltStudy
        The study (its JSON document is :attr:`document`).
    document : dict
        :func:`study_document` of the study (with the assessment's header and
        clear-sky bound when the sheet was made from an assessment).
    recommended : dict
        The recommended option's row of the JSON document.
    gains_over_planes : tuple of (str, float or None)
        The recommended option's gain over each existing site plane on the
        study's objective, percent (from the JSON document's objective values).
    horizon_loss : tiltyard.engine.horizon_loss.PlaneHorizonLoss
        The site horizon's cost to the recommended schedule.
    options : pandas.DataFrame
        :func:`options_table`.
    monthly : pandas.DataFrame
        :func:`monthly_table`.
    assumptions : tuple of (str, str)
        Heading and statement pairs.
    cautions : tuple of str
    notes : tuple of str
        The study's warnings (things a practitioner should look at).
    turbidity_source : str
    digest : str
        :func:`input_digest` (hex).
    version : str
        Tiltyard's version.
    basis_words : str
        The sky basis as a headline says it ("on the site's monthly
        irradiation values", "clear sky: upper bound only"...).
    clear_sky_bound_kwh_m2 : float or None
        The recommended schedule's annual irradiation under a clear sky (the
        upper bound), when the basis is not the clear sky.
    weather_warnings : tuple of str
        Site-fit warnings of a weather file the user accepted.
    weakest_month : (int, float) or None
        The month (1-12) with the least irradiation on the recommended schedule
        among the months with useful daylight, and its total, kWh/m².
    dark_months : tuple of int
        Months with little or no sun (the study's months without useful
        daylight, under 1 % of the best month on the horizontal).
    polar_night : (str, str) or None
        First and last day (``"MM-DD"``) of the days the sun does not rise at
        all, when there are such days.
    tilt_min_deg : float
        The lowest tilt an optimised option may take (self-cleaning and run-off).
    """

    study: TiltStudy
    document: dict
    recommended: dict
    gains_over_planes: tuple
    horizon_loss: PlaneHorizonLoss
    options: pd.DataFrame
    monthly: pd.DataFrame
    assumptions: tuple
    cautions: tuple
    notes: tuple
    turbidity_source: str
    digest: str
    version: str
    basis_words: str = ""
    clear_sky_bound_kwh_m2: float | None = None
    weather_warnings: tuple = ()
    weakest_month: tuple | None = None
    dark_months: tuple = ()
    polar_night: tuple | None = None
    tilt_min_deg: float = 0.0

    @property
    def short_digest(self) -> str:
        """The first 12 hex digits of :attr:`digest`."""
        return self.digest[:12]

    @property
    def reproducibility(self) -> str:
        return (f"Tiltyard {self.version}; inputs {self.short_digest} (the first 12 characters "
                "of a fingerprint of the site, the study settings, the sky basis and the "
                "mounting: the same inputs always give the same fingerprint)")


def _gain(a: float, b: float) -> float | None:
    return None if b <= 0 else round(100.0 * (a / b - 1.0), 3)


def _albedo_text(site: Site) -> str:
    if isinstance(site.albedo, tuple):
        vals = ", ".join(f"{v:g}" for v in site.albedo)
        return f"monthly, January first: {vals}"
    return f"{site.albedo:g} all year"


def _sky_text(opts: StudyOptions, study: TiltStudy) -> str:
    irr = opts.irradiance
    if irr.sky == "clear":
        return (f"clear sky every day ({model_name(irr.clearsky_model)} model): an upper "
                "bound, not an "
                "expected yield; real skies give less, and cloudier months favour flatter "
                "tilts")
    if irr.sky == "monthly":
        return ("the site's 12 monthly mean daily GHI values, made into a synthetic hourly "
                "year: " + study.sky_note)
    return f"measured or typical weather from {irr.weather.source}: {study.sky_note}"


def _weather_text(opts: StudyOptions) -> str:
    w = opts.irradiance.weather
    if w is None:
        return "none used (the sky basis above)"
    text = (f"{w.source}, {int(w.step_min)}-minute intervals, timestamps marking the interval "
            f"{w.timestamp_label}" + (f", zone {w.timezone}" if w.timezone else ""))
    if not w.findings:
        return text + "; the import found nothing to report"
    counts = {s: sum(f.severity == s for f in w.findings) for s in ("error", "warning", "info")}
    said = ", ".join(f"{n} {s}{'s' if n != 1 else ''}" for s, n in counts.items() if n)
    shown = [f"{f.severity}: {f.message}" + (f" (line {f.line})" if f.line else "")
             for f in sorted(w.findings, key=lambda f: ("error", "warning", "info")
                             .index(f.severity))[:4]]
    more = len(w.findings) - len(shown)
    return (text + f"; the import found {said}: " + "; ".join(shown)
            + (f"; and {more} more (see the JSON export)" if more > 0 else ""))


def _models_text(opts: StudyOptions, study: TiltStudy) -> list[tuple[str, str]]:
    refs = model_references()
    irr = opts.irradiance
    out = [("Solar position", "NREL SPA: " + refs["solar position"])]
    if irr.sky in ("clear", "monthly"):
        out.append(("Clear sky", f"{model_name(irr.clearsky_model)}: "
                    + refs[f"clear sky: {irr.clearsky_model}"]))
    if irr.sky in ("monthly", "file"):
        out.append(("Beam and diffuse", "Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982). "
                                        "Solar Energy 28(4), 293-302, where only GHI is given"))
    out.append(("Transposition", f"{model_name(irr.model)}: " + refs[f"transposition: {irr.model}"]
                + " Horizon: beam and circumsolar light only while the sun is above the site "
                  "horizon; sky diffuse scaled by each plane's sky-view factor; ground-reflected "
                  "light unobstructed."))
    if study.monthly_method is not None:
        out.append(("Cross-check", KLEIN_METHOD))
    return out


def polar_night(sky: SkyYear) -> tuple | None:
    """First and last day (``"MM-DD"``) of the run of days on which the sun never rises.

    A day counts when no interval of it has any part with the sun above the
    astronomical horizon (``sky.sun_up_fraction``); the run may span the new
    year. None when the sun rises every day; for several runs, the longest.
    """
    days = sky.n_days
    up = np.zeros(days)
    np.add.at(up, sky.day_index, sky.sun_up_fraction)
    dark = up <= 0.0
    if not dark.any() or dark.all():
        return None
    start = int(np.flatnonzero(~dark)[0])          # roll so that the year starts sunlit
    rolled = np.roll(dark, -start)
    best, run, first = (0, 0), 0, 0
    for i, d in enumerate(rolled):
        if d:
            first = i if run == 0 else first
            run += 1
            if run > best[1] - best[0]:
                best = (first, i + 1)
        else:
            run = 0
    dates = pd.Timestamp(f"{sky.options.year}-01-01") + pd.to_timedelta(
        [(best[0] + start) % days, (best[1] - 1 + start) % days], unit="D")
    return tuple(d.strftime("%m-%d") for d in dates)


def _active_months(study: TiltStudy) -> list:
    return [m for m in study.active_months if 1 <= m <= 12] or list(range(1, 13))


def weakest_month(study: TiltStudy, monthly_kwh_m2) -> tuple:
    """The month (1-12) with the least irradiation among the study's months with useful
    daylight, and its total, kWh/m² (``monthly_kwh_m2``: one option's twelve values, as the
    JSON document gives them). The sheet and the batch results say the same month."""
    monthly = np.asarray(monthly_kwh_m2, dtype=float)
    weakest = min(_active_months(study), key=lambda m: monthly[m - 1])
    return weakest, float(monthly[weakest - 1])


def dark_months(study: TiltStudy) -> tuple:
    """The months without useful daylight (not among the study's active months)."""
    active = _active_months(study)
    return tuple(m for m in range(1, 13) if m not in active)


def sheet_figures(study: TiltStudy, sky: SkyYear | None = None, result=None) -> SheetFigures:
    """Gather every figure and statement the feasibility sheet prints.

    Parameters
    ----------
    study : TiltStudy
        The tilt study of the site.
    sky : SkyYear, optional
        The study's sky (``sky_year(study.site, study.options_used.irradiance)``);
        computed when not given.
    result : tiltyard.engine.assess.AssessmentResult, optional
        The assessment: its basis, accepted weather warnings and clear-sky bound.

    Returns
    -------
    SheetFigures

    Notes
    -----
    Annual values and gains are the study's JSON document's; gains over the
    existing planes use the same formula as
    :meth:`tiltyard.engine.tilt.TiltStudy.gain_pct` on those values; the
    horizon loss is :func:`option_horizon_loss` of the recommended option.
    """
    site = study.site
    opts = study.options_used
    if sky is None:
        sky = study.sky if study.sky is not None else sky_year(site, opts.irradiance)
    doc = study_document(study, result)
    d = doc["study"]
    rec = next(r for r in d["options"] if r["label"] == d["recommended"])
    # on the study's objective, as every other gain (the annual total when that is it)
    planes = tuple((r["label"], _gain(rec["objective_value_kwh_m2"],
                                      r["objective_value_kwh_m2"]))
                   for r in d["options"] if r["kind"] == "plane")
    loss = option_horizon_loss(sky, site, study.recommended)
    irr = opts.irradiance
    az = "free (chosen by the study)" if opts.azimuth_deg is None else f"{opts.azimuth_deg:g}°"
    assumptions = [
        ("Sky basis", _sky_text(opts, study)),
        *_models_text(opts, study),
        ("Solar constant", f"{irr.solar_constant_w_m2:g} W/m² ("
                           + model_references()["solar constant"] + ")"),
        ("Turbidity", sky.turbidity_source),
        ("Albedo", _albedo_text(site) + "; ground-reflected light from the unobstructed GHI"),
        ("Time convention", f"year {irr.year}, {irr.step_min}-minute intervals: "
                            + MIDPOINT_CONVENTION),
        ("Horizon", f"{plural(len(site.horizon.azimuth_deg), 'measured horizon point')} and "
                    f"{plural(len(site.obstacles), 'obstacle')}; azimuths clockwise from true "
                    "north"),
        ("Weather data", _weather_text(opts)),
        ("Mounting", mounting_sentence(opts.mounting)
                     + (f", at most {opts.max_positions} tilt positions a year"
                        if opts.mounting == "adjustable" else "")),
        ("Study", f"objective: {objective_words(opts.objective, opts.months)}; tilts from "
                  f"{opts.tilt_min_deg:g}° to {opts.tilt_max_deg:g}° in steps of "
                  f"{opts.tilt_step_deg:g}°; azimuth {az}; periods of at least "
                  f"{opts.min_days_between} days; rule: "
                  + degree_text(study.recommendation_rule)),
    ]
    notes = tuple(w for w in study.warnings)
    weakest = weakest_month(study, rec["monthly_kwh_m2"])
    low = dark_months(study)
    basis, bound, fit = basis_words(irr.sky), None, ()
    if result is not None:
        basis = result.basis.words
        fit = tuple(result.weather_warnings)
        notes = fit + notes
        b = result.clear_sky_bound()
        bound = None if b is None else b.get(study.recommended.label)
        assumptions.insert(1, ("Why this basis", result.basis.reason))
    return SheetFigures(
        study=study, document=doc, recommended=rec, gains_over_planes=planes,
        horizon_loss=loss, options=options_table(study), monthly=monthly_table(study),
        assumptions=tuple(assumptions), cautions=SHEET_CAUTIONS,
        notes=notes, turbidity_source=sky.turbidity_source,
        digest=input_digest(site, opts, irr.sky, opts.mounting), version=tool_version(),
        basis_words=basis, clear_sky_bound_kwh_m2=bound, weather_warnings=fit,
        weakest_month=weakest, dark_months=low,
        polar_night=polar_night(sky), tilt_min_deg=float(opts.tilt_min_deg))


__all__ = ["SHEET_CAUTIONS", "check_option_kinds", "dark_months", "weakest_month",
           "SUN_STEP_MIN", "SheetData", "SheetFigures", "sheet_data",
           "hourly_csv_text", "hourly_poa_table", "input_digest",
           "monthly_csv_text", "monthly_table", "option_horizon_loss", "options_csv_text",
           "options_table", "options_to_dict", "select_options", "sheet_figures",
           "document_json_text", "study_document", "study_json_text", "tool_version"]


#: Sampling step of the sun-path chart's day paths on paper, minutes.
SUN_STEP_MIN = 10.0


@dataclass(frozen=True)
class SheetData:
    """The engine's part of one sheet: the study, its sky, the figures and the sun chart."""

    study: TiltStudy
    sky: SkyYear
    figures: SheetFigures
    sun: SunChart


def sheet_data(site: Site, study: TiltStudy | StudyOptions | None = None,
               time_basis: str = "clock", sun_step_min: float = SUN_STEP_MIN,
               progress: Callable[[float, str], None] | None = None,
               result=None) -> SheetData:
    """Compute everything a feasibility sheet prints, short of laying out the pages.

    Parameters
    ----------
    site : Site
    study : TiltStudy or StudyOptions, optional
        A finished study of ``site`` to use as it is, or the options to run one
        with (default options when None).
    time_basis : {"clock", "solar"}
        Hour lines of the sun chart (:func:`tiltyard.engine.sunchart.sun_chart`).
    sun_step_min : float
        Sampling step of the sun chart's day paths, minutes.
    progress : callable, optional
        ``progress(fraction, stage)``; may raise to cancel.
    result : tiltyard.engine.assess.AssessmentResult, optional
        The assessment the study belongs to: its basis, weather warnings and
        clear-sky bound go on the sheet.

    Returns
    -------
    SheetData

    Notes
    -----
    Composes :func:`tiltyard.engine.tilt.tilt_study`, :func:`sky_year`,
    :func:`sheet_figures` and :func:`tiltyard.engine.sunchart.sun_chart`, whose
    docstrings give the methods and their references; the sun chart is drawn for
    21 June of the study's reference year.
    """
    def report(fraction, stage):
        if progress is not None:
            progress(fraction, stage)

    if not isinstance(study, TiltStudy):
        opts = study if isinstance(study, StudyOptions) else StudyOptions()
        study = tilt_study(site, opts, progress=lambda f, st: report(0.75 * f, st))
    elif study.site != site:
        raise ValueError("the study given is of another site (or of an earlier version of it)")
    report(0.77, "sky for the hourly figures")
    sky = study.sky if study.sky is not None else sky_year(site, study.options_used.irradiance)
    report(0.86, "sheet figures")
    figures = sheet_figures(study, sky, result)
    report(0.93, "sun path")
    sun = sun_chart(site, f"{study.options_used.irradiance.year}-06-21", basis=time_basis,
                    step_min=sun_step_min)
    report(1.0, "done")
    return SheetData(study, sky, figures, sun)
