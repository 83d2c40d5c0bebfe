"""The command line's subcommands: each reads one AssessmentResult and writes its table,
JSON document or files (the sheet's outputs written together, or not at all)."""

from __future__ import annotations

import json
import os
import sys
from pathlib import Path

from tiltyard.engine.words import (
    MONTH_ABBR,
    day_length,
    model_name,
    mounting_words,
    number,
    schedule_words,
)

from .cli_args import (
    EXIT_OK,
    UserError,
    _assess,
    _assessment,
    _one_line,
    _signals_as_exceptions,
)


def _weather_report(result) -> None:
    """Import findings and accepted site-fit warnings of a weather file, one line each on
    stderr (the JSON document carries them instead)."""
    weather = result.weather
    if weather is None:
        return
    for f in weather.findings:
        where = f", line {f.line}" if f.line is not None else ""
        sys.stderr.write(f"tiltyard: {weather.source}{where}: {f.severity} ({f.kind}): "
                         f"{_one_line(f.message)}\n")
    for w in result.weather_warnings:
        sys.stderr.write(f"tiltyard: accepted weather warning: {_one_line(w)}\n")


def _print_basis(result) -> None:
    b = result.basis
    print(f"  Sky basis: {b.words} ({b.reason}); mounting: {mounting_words(result.mounting)}")
    for w in result.weather_warnings:
        print(f"  Warning (accepted): {w}")


def cmd_study(args) -> int:
    from tiltyard.engine.exports import study_json_text
    from tiltyard.engine.jobs import CAUTION

    result = _assess(_assessment(args), args.site)
    try:
        st = result.study()
    except ValueError as err:
        raise UserError(str(err)) from None
    if args.json:
        # one shared builder: the sheet's --json-out and the app's export write the same text
        sys.stdout.write(study_json_text(st, result))
        return EXIT_OK
    _weather_report(result)
    site, opts = result.site, st.options_used
    d = st.to_json_dict()
    print(f"Tilt study for {site.name}  ({site.latitude_deg:.4f}, {site.longitude_deg:.4f})")
    _print_basis(result)
    print(f"  model: {model_name(opts.irradiance.model)}, year {opts.irradiance.year}, "
          f"{opts.irradiance.step_min}-min intervals; objective: {opts.objective_label} "
          f"({d['objective_units']}); tilts {opts.tilt_min_deg:g}-{opts.tilt_max_deg:g} by "
          f"{opts.tilt_step_deg:g} deg; azimuth "
          f"{'free' if opts.azimuth_deg is None else f'{opts.azimuth_deg:g} deg'}")
    print()
    print(f"  {'option':52} {'objective':>9} {'vs hor':>7} {'vs best':>8} {'of track':>8} "
          f"{'annual':>8} {'adj/yr':>6}")
    print(f"  {'':52} {'kWh/m2':>9} {'%':>7} {'%':>8} {'%':>8} {'kWh/m2':>8} {'':>6}")

    def pct(v, sign="+"):
        return "-" if v is None else f"{v:{sign}.1f}"
    for row in d["options"]:
        print(f"  {row['label'][:52]:52} {number(row['objective_value_kwh_m2'], 1):>9} "
              f"{pct(row['gain_vs_horizontal_pct']):>7} "
              f"{pct(row['gain_vs_fixed_optimal_pct']):>8} "
              f"{pct(row['share_of_tracking_pct'], ''):>8} {number(row['annual_kwh_m2'], 1):>8} "
              f"{row['adjustments_per_year']:6d}")
    print(f"  (objective, gains and shares on the {opts.objective_label} objective; 'vs best': "
          "over the best fixed plane for the site)")
    print()
    print("  Schedules:")
    for opt in st.options:
        print(f"    {opt.label[:40]:40} {schedule_words(opt, opts.irradiance.year, plain=True)}")
    _print_recommendation(result, st, d)
    _print_rows_and_yield(st, d)
    for w in st.warnings:
        print(f"  Note: {w}")
    print(f"  {CAUTION}")
    return EXIT_OK


def _rec_words(st) -> str:
    return schedule_words(st.recommended, st.options_used.irradiance.year, plain=True)


def _print_recommendation(result, st, d) -> None:
    rec = st.recommended
    print()
    if st.mounting == "flush":
        loss = result.option_horizon_loss(rec)
        print(f"  This roof as it is: {rec.label} - {_rec_words(st)}: "
              f"{number(rec.annual_kwh_m2)} kWh/m2 a year, {st.share_pct(rec, 'fixed-optimal'):.0f} "
              f"% of the best plane for the site on the {st.options_used.objective_label} "
              f"objective, {loss.loss_pct:.1f} % lost to the horizon")
    else:
        print(f"  Recommended: {rec.label} - {_rec_words(st)}")
    print(f"  (rule: {st.recommendation_rule})")
    bound = result.clear_sky_bound()
    if bound is not None:
        print(f"  Clear-sky upper bound for it: {number(bound[rec.label])} kWh/m2 a year (not an "
              "expected value)")
    go = d["grid_optimum"]
    print(f"  Best plane on the tilt x azimuth grid: {go['tilt_deg']:g} deg, azimuth "
          f"{go['azimuth_deg']:g} deg, {number(go['objective_kwh_m2'], 1)} kWh/m2 "
          f"({d['objective_units']})")


def _print_rows_and_yield(st, d) -> None:
    rows, yld, mm = d["rows"], d["specific_yield"], d["monthly_method"]
    by_kind = {(y["label"], y["kind"]): y for y in yld["options"]}
    print()
    if st.mounting == "flush":      # panels follow the roof: no rows to lay out
        print("  Indicative specific yield:")
        for y in yld["options"]:
            print(f"    {y['label'][:40]:40} {number(y['annual_kwh_kwp']):>8} kWh/kWp")
        _print_yield_and_method(yld, mm)
        return
    print("  Rows on flat ground (beam shading-free in the design window):")
    ch = rows["chosen"]
    if ch is None:
        print(f"    not laid out: {rows['chosen_note']}")
    else:
        print(f"    {ch['tilt_deg']:g} deg rows facing {ch['azimuth_deg']:g} deg, "
              f"{ch['collector_length_m']:g} m slant length, design day {ch['design_date']} "
              f"{ch['window_start'][11:16]}-{ch['window_end'][11:16]}: pitch "
              f"{ch['pitch_m']:.2f} m, gap {ch['row_gap_m']:.2f} m, GCR {ch['gcr']:.3f}, "
              f"ground cover {ch['ground_cover_fraction']:.3f}")
    print(f"    {'option':40} {'pitch m':>8} {'GCR':>6} {'per m2 ground':>14} "
          f"{'yield kWh/kWp':>14}")
    for r in rows["options"]:
        lay = r["layout"]
        y = by_kind.get((r["label"], r["kind"]))
        pitch = "-" if lay is None else f"{lay['pitch_m']:.2f}"
        gcr = "-" if lay is None else f"{lay['gcr']:.3f}"
        ground = "-" if r["per_ground_kwh_m2"] is None else number(r['per_ground_kwh_m2'])
        yv = "-" if y is None else number(y['annual_kwh_kwp'])
        print(f"    {r['label'][:40]:40} {pitch:>8} {gcr:>6} {ground:>14} {yv:>14}")
    print(f"    GCR: {rows['definitions']}")
    print(f"    {rows['limitation']}")
    _print_yield_and_method(yld, mm)


def _print_yield_and_method(yld, mm) -> None:
    print(f"    Yield: {yld['label']}; loss {100 * yld['loss_fraction']:g} %, temperature "
          f"model {yld['temperature_model']}; " + "; ".join(yld["notes"]))
    if mm is not None:
        print()
        print(f"  Same monthly GHI values by the monthly-mean method: {mm['method']}")
        for c in mm["options"]:
            diff = c["difference_vs_hourly_pct"]
            print(f"    {c['label'][:40]:40} {number(c['annual_kwh_m2'], 1):>8} kWh/m2 "
                  f"(hourly year {'-' if diff is None else f'{diff:+.1f}'} %)")


def _load_site(arg: str):
    from tiltyard.engine.demo_sites import resolve_site
    return resolve_site(arg)


def _fmt_time(ts) -> str:
    return "-" if ts is None else ts.strftime("%H:%M:%S")


def cmd_sites(args) -> int:
    from tiltyard.engine.demo_sites import demo_site_names, load_demo

    rows = []
    for name in demo_site_names():
        s = load_demo(name)
        rows.append({"name": name, "title": s.name, "latitude_deg": s.latitude_deg,
                     "longitude_deg": s.longitude_deg, "elevation_m": s.elevation_m,
                     "timezone": s.timezone})
    if args.json:
        print(json.dumps({"sites": rows}, indent=2, ensure_ascii=False))
        return EXIT_OK
    print(f"{'name':20} {'lat deg':>8} {'lon deg':>8} {'elev m':>7}  {'time zone':20} title")
    for r in rows:
        print(f"{r['name']:20} {r['latitude_deg']:8.2f} {r['longitude_deg']:8.2f} "
              f"{r['elevation_m']:7.0f}  {r['timezone']:20} {r['title']}")
    return EXIT_OK


def cmd_sun(args) -> int:
    from tiltyard.engine.jobs import sun_day

    if not 0.5 <= args.step <= 120:
        raise UserError(f"--step = {args.step:g}: must be between 0.5 and 120 minutes")
    site = _load_site(args.site)
    day = sun_day(site, args.date, step_min=args.step)
    if args.json:
        print(json.dumps({"sun": day.to_json_dict()}, indent=2, ensure_ascii=False))
        return EXIT_OK
    print(f"Sun at {site.name}  ({site.latitude_deg:.4f}, {site.longitude_deg:.4f}, "
          f"{number(site.elevation_m)} m)")
    print(f"Date {args.date.isoformat()}, local clock time, zone {site.timezone}")
    if day.polar == "day":
        print("Polar day: the sun stays above the horizon all day.")
    elif day.polar == "night":
        print("Polar night: the sun stays below the horizon all day.")
    print(f"  sunrise           {_fmt_time(day.sunrise)}")
    print(f"  solar noon        {_fmt_time(day.solar_noon)}")
    print(f"  sunset            {_fmt_time(day.sunset)}")
    print(f"  day length        {day_length(day.day_length_h)}")
    print(f"  max elevation     {day.max_elevation_deg:.2f} deg")
    print("  (sunrise/sunset: sun centre at -0.8333 deg, NREL SPA)")
    if len(day.path):
        print()
        print(f"  {'time':8} {'azimuth deg':>11} {'elevation deg':>13}  site horizon")
        for t, a, e, v in zip(day.path["time"], day.path["azimuth_deg"],
                              day.path["elevation_deg"], day.path["visible"], strict=True):
            if t.minute == 0 or len(day.path) <= 30:
                print(f"  {t.strftime('%H:%M'):8} {a:11.1f} {e:13.1f}  "
                      f"{'sun visible' if v else 'behind horizon'}")
    return EXIT_OK


def cmd_irradiance(args) -> int:
    from tiltyard.engine.jobs import CAUTION

    if not 0 <= args.tilt <= 90:
        raise UserError(f"--tilt = {args.tilt:g}: must be between 0 and 90 deg")
    if not 0 <= args.azimuth <= 360:
        raise UserError(f"--azimuth = {args.azimuth:g}: must be between 0 and 360 deg "
                        "(clockwise from north)")
    a = _assessment(args, study=False)
    result = _assess(a, args.site)
    try:
        res = result.irradiance(args.tilt, args.azimuth)
    except ValueError as err:
        raise UserError(str(err)) from None
    site, opts = result.site, result.irradiance_options
    doc = {"assessment": result.header(), "irradiance": res.to_json_dict()}
    if args.json:
        if result.weather is not None:
            from tiltyard.engine.weather_site import weather_json_dict

            doc["weather"] = weather_json_dict(result.weather)
        print(json.dumps(doc, indent=2, ensure_ascii=False))
        return EXIT_OK
    _weather_report(result)
    print(f"Irradiation on a plane at {site.name}")
    _print_basis(result)
    print(f"  tilt {res.surface_tilt:g} deg, azimuth {res.surface_azimuth:g} deg "
          "(clockwise from north)")
    sky_text = f"clear ({model_name(opts.clearsky_model)})" if opts.sky == "clear" else opts.sky
    if opts.sky == "file":
        sky_text = f"weather file {result.weather.source}"
    print(f"  sky: {sky_text}, transposition: {model_name(opts.model)}, "
          f"solar constant {opts.solar_constant_w_m2:g} W/m2, year {opts.year}, "
          f"{opts.step_min}-min intervals")
    print(f"  Linke turbidity: {res.turbidity_source}")
    print(f"  sky-view factor with horizon {res.shading.sky_view_factor:.3f} "
          f"(open {res.shading.sky_view_factor_open:.3f})")
    print()
    cols = [("H0 hor", "extraterrestrial_horizontal_kwh_m2"), ("GHI", "ghi_kwh_m2"),
            ("POA", "poa_kwh_m2"), ("beam", "poa_beam_kwh_m2"),
            ("sky dif", "poa_sky_diffuse_kwh_m2"), ("ground", "poa_ground_kwh_m2"),
            ("hor loss", "horizon_loss_kwh_m2")]
    print("  month  " + " ".join(f"{c:>9}" for c, _ in cols) + "   (kWh/m2)")
    for m in range(1, 13):
        row = res.monthly.loc[m]
        print(f"  {MONTH_ABBR[m - 1]:5}  " + " ".join(f"{number(row[k], 1):>9}" for _, k in cols))
    print("  year   " + " ".join(f"{number(res.annual[k], 1):>9}" for _, k in cols))
    print()
    print(f"  Horizon loss {res.horizon_loss_pct:.1f} % of the open-horizon plane irradiation: "
          f"beam {res.annual['horizon_loss_beam_kwh_m2']:.1f}, circumsolar "
          f"{res.annual['horizon_loss_circumsolar_kwh_m2']:.1f}, isotropic sky "
          f"{res.annual['horizon_loss_isotropic_kwh_m2']:.1f}, horizon band "
          f"{res.annual['horizon_loss_horizon_band_kwh_m2']:.1f} kWh/m2")
    for note in res.notes:
        print(f"  Note: {note}.")
    print(f"  {CAUTION}")
    return EXIT_OK


# -- sheet --------------------------------------------------------------------------------

def _check_output(flag: str, path: str) -> Path:
    """Refuse an output path that cannot be written, before any work is done."""
    p = Path(path)
    if not path or p.name in ("", ".", ".."):
        raise UserError(f"{flag} {path!r}: not a file name")
    if p.is_dir():
        raise UserError(f"{flag} {path}: is a folder, not a file")
    folder = p.parent if str(p.parent) else Path(".")
    if not folder.exists():
        raise UserError(f"{flag} {path}: the folder {folder} does not exist")
    if not folder.is_dir():
        raise UserError(f"{flag} {path}: {folder} is not a folder")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise UserError(f"{flag} {path}: the folder {folder} is not writable")
    return p


def _refuse_outputs_over_inputs(wanted, site_arg: str, assessment,
                                site_words: str = "the site file") -> None:
    """Refuse, before any work, an output path that is one of the inputs (the site file, the
    weather file), compared as files (device and inode, links followed), not as text."""
    inputs = []
    if os.path.exists(site_arg):
        inputs.append((site_words, site_arg))
    if assessment.weather is not None:
        inputs.append(("the weather file", assessment.weather.path))
    for flag, path in wanted:
        for what, source in inputs:
            try:
                same = os.path.exists(path) and os.path.samefile(path, source)
            except OSError:
                same = False
            if same or os.path.realpath(path) == os.path.realpath(source):
                raise UserError(f"{flag} {path}: is {what} ({source}); writing there would "
                                "replace an input: choose another file name")


def _ensure_gui_app():
    """A Qt application for fonts and the PDF writer; Qt's offscreen platform when there is
    no display (so the sheet works on a server or in CI)."""
    if (sys.platform not in ("win32", "darwin") and not os.environ.get("QT_QPA_PLATFORM")
            and not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY")):
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
    # a QApplication (not only a QGuiApplication): widgets created later in the same
    # process, as in the test suite, need one, and there is only ever one instance
    from PySide6.QtWidgets import QApplication

    return QApplication.instance() or QApplication(["tiltyard"])


def _sheet_preferences():
    """The desktop app's saved preferences, or the defaults when they cannot be read."""
    try:
        from tiltyard.app.settings import load_preferences

        return load_preferences()
    except Exception:  # noqa: BLE001 - preferences are a convenience, never a failure
        from tiltyard.app.settings import Preferences

        return Preferences()


def cmd_sheet(args) -> int:
    import datetime

    from tiltyard.engine.atomic_files import write_files_atomically
    from tiltyard.engine.exports import (
        check_option_kinds,
        hourly_csv_text,
        monthly_csv_text,
        options_csv_text,
        select_options,
        study_json_text,
    )

    wanted = [("-o", args.output), ("--csv-monthly", args.csv_monthly),
              ("--csv-options", args.csv_options), ("--csv-hourly", args.csv_hourly),
              ("--json-out", args.json_out)]
    wanted = [(flag, path) for flag, path in wanted if path is not None]
    if not wanted:
        raise UserError("sheet: nothing to write; give -o FILE.pdf and/or --csv-monthly, "
                        "--csv-options, --csv-hourly, --json-out FILE")
    seen = {}
    for flag, path in wanted:
        key = os.path.abspath(path)
        if key in seen:
            raise UserError(f"{flag} {path}: the same file as {seen[key]}")
        seen[key] = flag
        _check_output(flag, path)
    if args.hourly_options is not None and args.csv_hourly is None:
        raise UserError(f"--hourly-options {args.hourly_options}: only with --csv-hourly FILE")
    kinds = None
    if args.hourly_options is not None:
        kinds = [k.strip() for k in args.hourly_options.split(",") if k.strip()]
        if not kinds:
            raise UserError(f"--hourly-options {args.hourly_options!r}: give option kinds")
        try:
            check_option_kinds(kinds)
        except ValueError as err:
            raise UserError(f"--hourly-options {args.hourly_options}: {err}") from None
    assessment = _assessment(args)
    _refuse_outputs_over_inputs(wanted, args.site, assessment)
    given = {k: getattr(args, k).strip() for k in ("client", "address", "reference")
             if getattr(args, k) is not None}
    if given:                   # who the sheet is for: no figure changes with it
        from tiltyard.engine.site import SiteError

        try:
            assessment = assessment.with_site(assessment.site.with_changes(**given))
        except SiteError as err:
            raise UserError(f"--{err.field.split('.')[-1]}: {err.reason}") from None
    prefs = None
    if None in (args.preparer, args.organisation, args.paper, args.times):
        with _signals_as_exceptions.deferred():     # the preferences are read with Qt
            prefs = _sheet_preferences()
    paper = args.paper or (prefs.paper if prefs is not None else "a4")
    basis = args.times or (prefs.time_basis if prefs is not None else "clock")
    with _signals_as_exceptions.deferred():
        _ensure_gui_app()
        from tiltyard.app.sheet import SheetMeta, lay_out, pdf_bytes

    meta = SheetMeta(
        preparer=args.preparer if args.preparer is not None else prefs.preparer,
        organisation=args.organisation if args.organisation is not None else prefs.organisation,
        prepared=args.prepared or datetime.date.today(), time_basis=basis)
    assessed = _assess(assessment, args.site)
    site = assessed.site
    try:
        with _signals_as_exceptions.deferred():
            result = lay_out(assessed.sheet_data(time_basis=basis), meta, paper)
        chosen = select_options(result.study, kinds)
    except ValueError as err:
        raise UserError(str(err)) from None
    _weather_report(assessed)
    # everything in memory first: a failure leaves no file behind and no file changed
    data = {}
    for flag, _path in wanted:
        if flag == "-o":
            with _signals_as_exceptions.deferred():
                data[flag] = pdf_bytes(result.document)
        elif flag == "--csv-monthly":
            data[flag] = monthly_csv_text(result.study).encode("utf-8")
        elif flag == "--csv-options":
            data[flag] = options_csv_text(result.study).encode("utf-8")
        elif flag == "--csv-hourly":
            data[flag] = hourly_csv_text(result.sky, site, chosen).encode("utf-8")
        else:
            data[flag] = study_json_text(result.study, assessed).encode("utf-8")
    # every file to a temporary file first, then all renamed: a failure while writing
    # (a full disk, a signal) leaves every output as it was
    try:
        write_files_atomically([(path, data[flag]) for flag, path in wanted])
    except OSError as err:
        target = getattr(err, "target", None)
        where = next((f"{flag} {path}" for flag, path in wanted if str(Path(path)) == target),
                     "the outputs")
        raise UserError(f"{where}: cannot write ({err.strerror or err}); no output was "
                        "changed") from None
    for flag, path in wanted:
        what = (f"feasibility sheet, {result.document.page_count} pages, "
                f"{'A4' if paper == 'a4' else 'US Letter'}" if flag == "-o" else flag[2:])
        print(f"wrote {path} ({what})")
    return EXIT_OK

