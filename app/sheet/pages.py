"""The two pages of the feasibility sheet, laid out as display lists.

Page 1: who, where and when; the key figures of the recommended option; the
sun-path chart with the horizon; the monthly chart of the compared options.
Page 2: the options table, the monthly table, the study's notes, the
assumptions with the reproducibility line, and the cautions.

Each page is laid out at a font scale of 1 and, if anything would not fit
(a very long site name, many planes, many weather findings), again at
smaller scales; text that still does not fit at the smallest scale is
shrunk and elided inside its own box by :func:`.layout.fit_text`.
"""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtCore import QRectF

from tiltyard.engine.words import (
    MONTH_ABBR,
    clear_sky_advice,
    client_text,
    degree_text,
    key_heading,
    min_tilt_sentence,
    objective_words,
    option_name,
    prepared_for_words,
    schedule_sentence,
    time_basis_words,
    weakest_month_sentence,
)

from .. import theme
from .charts import Series, monthly_chart, sun_path_chart
from .content import (
    PAPERS,
    SCOPE,
    SheetMeta,
    kwh,
    location_line,
    pct,
    prepared_line,
)
from .layout import (
    EPS,
    MUTED,
    TEXT,
    Column,
    Font,
    Measure,
    Page,
    fit_text,
    hrule,
    natural_height,
    pen,
    rect_path,
    shape,
)
from .sun_above import sun_above_chart

#: Page margins, points (left, top, right, bottom).
MARGINS = (42.0, 38.0, 42.0, 34.0)
#: Font scales tried, largest first.
SCALES = (1.0, 0.95, 0.9, 0.85, 0.8, 0.75, 0.7)
#: Smallest chart height on page 1 at scale 1, points.
MIN_CHART_H = 150.0

#: Smallest body and table text, points; smallest footer text (print-safe sizes, common
#: practice, no source).
BODY_MIN_PT = 8.0
FOOTER_PT = 6.5

PANEL = "#f1f2ef"
CAUTION = "#7a4f00"
CAUTION_FILL = "#fbf6ea"
TILE_EDGE = "#b8c9d4"
RULE = "#c9cdc6"


@dataclass
class SheetDocument:
    """A laid-out sheet: pages of ops in points, ready for any paint device."""

    paper: str
    width: float
    height: float
    pages: list
    title: str
    figures: object
    meta: SheetMeta
    scales: tuple

    @property
    def page_count(self) -> int:
        return len(self.pages)


class _Ctx:
    """What both pages need: the figures, the sun chart, the metadata, the paper."""

    def __init__(self, figures, sun, meta: SheetMeta, paper: str):
        self.f = figures
        self.sun = sun
        self.meta = meta
        self.paper = paper
        self.name, self.w, self.h = PAPERS[paper]
        study = figures.study
        self.study = study
        self.site = study.site
        self.year = study.options_used.irradiance.year
        self.rec = study.recommended
        self.doc = figures.document["study"]

    def content(self) -> QRectF:
        left, top, right, bottom = MARGINS
        return QRectF(left, top, self.w - left - right, self.h - top - bottom)


def build_sheet(figures, sun, meta: SheetMeta | None = None, paper: str = "a4") -> SheetDocument:
    """Lay the sheet out.

    Parameters
    ----------
    figures : tiltyard.engine.exports.SheetFigures
        Every number on the sheet.
    sun : tiltyard.engine.sunchart.SunChart
        The sun-path data (its hour lines in ``meta.time_basis``).
    meta : SheetMeta, optional
        Preparer, organisation, date prepared, time basis.
    paper : {"a4", "letter"}
    """
    if paper not in PAPERS:
        raise ValueError(f"paper = {paper!r}: must be one of {', '.join(PAPERS)}")
    meta = meta or SheetMeta()
    ctx = _Ctx(figures, sun, meta, paper)
    m = Measure()
    for s in SCALES:
        page, ok = _page1(m, ctx, s)
        if ok:
            break
    details = _detail_pages(m, ctx)
    pages = [page] + details
    scales = [s] + [1.0] * len(details)
    for i, page in enumerate(pages):
        _footer(m, ctx, page, i + 1, len(pages))
    return SheetDocument(paper, ctx.w, ctx.h, pages,
                         f"Feasibility sheet: {ctx.site.name}", figures, meta, tuple(scales))


def _pt(size: float, s: float) -> float:
    """A body text size at font scale ``s``, never below :data:`BODY_MIN_PT`."""
    return max(BODY_MIN_PT, size * s)


# -- shared pieces --------------------------------------------------------------------------------

def _footer_height(m: Measure) -> float:
    return 2 * m.line_height(Font(FOOTER_PT), 1.12) + 5.0


def _body(m: Measure, ctx: _Ctx) -> QRectF:
    c = ctx.content()
    return QRectF(c.left(), c.top(), c.width(), c.height() - _footer_height(m) - 6.0)


def _footer(m: Measure, ctx: _Ctx, page: Page, number: int, total: int) -> None:
    c = page.content
    fh = _footer_height(m)
    top = c.bottom() - fh
    frame = QRectF(c.left(), top, c.width(), fh)
    page.frames["footer"] = frame
    page.add(hrule(frame, top, RULE, 0.5))
    f = Font(FOOTER_PT)
    right = (f"Tiltyard {ctx.f.version} · inputs {ctx.f.short_digest} · page {number} of "
             f"{total}")
    rw = min(m.width(right, f) + 2.0, c.width() * 0.5)
    box_r = QRectF(c.right() - rw, top + 4.0, rw, fh - 4.0)
    box_l = QRectF(c.left(), top + 4.0, c.width() - rw - 10.0, fh - 4.0)
    page.add(fit_text(m, right, box_r, f, min_size=FOOTER_PT, align="right", color=MUTED,
                      role="footer.right").ops)
    page.add(fit_text(m, "Preliminary feasibility estimate, not a design. Safety and sizing "
                         "belong to local codes and licensed installers.", box_l, f,
                      min_size=FOOTER_PT, max_lines=2, color=MUTED, role="footer.left").ops)


def _heading(col: Column, text: str, s: float, role: str, gap_before: float = 7.0) -> list:
    col.gap(gap_before * s)
    return col.text(text, Font(max(BODY_MIN_PT, 9.5 * s), bold=True), min_size=BODY_MIN_PT,
                    max_lines=2,
                    gap_after=2.5 * s, role=role, color=theme.ACCENT)


# -- page 1 --------------------------------------------------------------------------------------

def _page1(m: Measure, ctx: _Ctx, s: float):
    page = Page(ctx.w, ctx.h, ctx.content())
    body = _body(m, ctx)
    col = Column(m, body)
    page.add(hrule(body, body.top(), theme.ACCENT, 2.0))
    col.gap(6.0)
    page.add(col.text("SOLAR SITE FEASIBILITY SHEET · PRELIMINARY ESTIMATE",
                      Font(_pt(8.0, s), bold=True), min_size=BODY_MIN_PT, max_lines=1,
                      color=theme.ACCENT, gap_after=3.0 * s, role="kicker"))
    page.add(col.text(ctx.site.name, Font(17.0 * s, bold=True), min_size=9.0 * s, max_lines=3,
                      gap_after=3.0 * s, role="site-name"))
    page.add(col.text(location_line(ctx.site), Font(_pt(8.5, s)), min_size=BODY_MIN_PT,
                      max_lines=2, gap_after=1.5 * s, role="location"))
    site = ctx.site
    who = prepared_for_words(site.client, site.address, site.reference)
    if who:                     # blank fields leave no label behind
        page.add(col.text(f"Prepared for {who}", Font(_pt(8.5, s)), min_size=BODY_MIN_PT,
                          max_lines=3, gap_after=1.5 * s, role="prepared-for"))
    page.add(col.text(prepared_line(ctx.meta), Font(_pt(8.5, s)), min_size=BODY_MIN_PT,
                      max_lines=2, gap_after=3.0 * s, role="prepared"))
    page.add(col.text(SCOPE, Font(_pt(8.0, s), italic=True), min_size=BODY_MIN_PT, max_lines=3,
                      color=MUTED, gap_after=8.0 * s, role="scope"))
    header = QRectF(body.left(), body.top(), body.width(), col.y - body.top())
    page.frames["header"] = header

    key_top = col.y
    key_ops, key_h, key_over = _key_figures(m, ctx, QRectF(body.left(), key_top, body.width(),
                                                           col.remaining), s)
    key_box = col.take(key_h)
    page.frames["key"] = key_box
    page.add(shape(rect_path(key_box.adjusted(0.5, 0.5, -0.5, -0.5)), key_box,
                   pen(theme.ACCENT, 1.0), theme.ACCENT_SOFT, role="key-box"))
    page.add(key_ops)
    col.gap(10.0 * s)

    avail = col.remaining
    need = 2 * MIN_CHART_H * s + 12.0
    ok = not col.overflow and not key_over and avail >= need
    # the sun chart's key has more rows (up to nine) than the monthly chart's (six); a
    # round chart from above needs more height still
    sun_h = max(0.0, (avail - 12.0) * (0.6 if ctx.sun.lead == "above" else 0.54))
    sun_box = col.take(sun_h)
    col.gap(12.0)
    mon_box = col.take(col.remaining)
    page.frames["sunpath"] = sun_box
    page.frames["monthly"] = mon_box
    if sun_box.height() > 40 and mon_box.height() > 40:
        # the chart the app leads with: from above where a flat one would cut a path
        sun = sun_above_chart if ctx.sun.lead == "above" else sun_path_chart
        page.add(sun(m, sun_box, ctx.sun, time_basis_words(ctx.meta.time_basis), s))
        page.add(monthly_chart(m, mon_box, _chart_series(ctx), s))
    else:
        ok = False
    return page, ok


def _tiles(ctx: _Ctx) -> list[tuple[str, str, str]]:
    f = ctx.f
    rec = f.recommended
    d = ctx.doc
    flush = ctx.study.mounting == "flush"
    what = "this roof as it is" if flush else "the recommended option"
    tiles = [(f"{kwh(rec['annual_kwh_m2'])} kWh/m²",
              f"a year on the plane of {what}, {f.basis_words}", "key.annual")]
    if f.clear_sky_bound_kwh_m2 is not None:
        tiles.append((f"{kwh(f.clear_sky_bound_kwh_m2)} kWh/m²",
                      "under a clear sky every day: the upper bound, not an expected value",
                      "key.clear_bound"))
    opts = ctx.study.options_used
    # gains and shares are on the study's objective: say so when it is not the year
    on = ("" if opts.objective == "annual"
          else f", in {objective_words(opts.objective, opts.months)}")
    tiles.append((f"{pct(rec['gain_vs_horizontal_pct'])} %", f"over a horizontal plane{on}",
                  "key.gain_horizontal"))
    if not flush:
        for i, (label, g) in enumerate(f.gains_over_planes):
            tiles.append((f"{pct(g)} %", f"over the existing plane “{label}”{on}",
                          f"key.gain_plane.{i}"))
    fixed = ctx.study.option("fixed-optimal")
    fp = fixed.schedule[0]
    if flush:
        tiles.append((f"{pct(rec['share_of_best_plane_pct'], signed=False)} %",
                      f"of the best plane for the site ({fp.tilt_deg:g}° facing "
                      f"{fp.azimuth_deg:g}°){on}", "key.share_best"))
    elif ctx.rec is fixed:
        two = next((r for r in d["options"] if r["kind"] == "two-season"), None)
        cap = (f"over the fixed optimum: this is the fixed optimum; a two-season schedule "
               f"would add {pct(two['gain_vs_fixed_optimal_pct'])} %" if two is not None
               else "over the fixed optimum: this is it (a fixed mounting)")
        tiles.append((f"{pct(rec['gain_vs_fixed_optimal_pct'])} %", cap, "key.gain_fixed"))
    else:
        cap = (f"over the best fixed plane ({fp.tilt_deg:g}° facing {fp.azimuth_deg:g}°, "
               "no adjustments)")
        tiles.append((f"{pct(rec['gain_vs_fixed_optimal_pct'])} %", cap, "key.gain_fixed"))
    loss = f.horizon_loss
    if loss.loss_kwh_m2 >= 0:
        cap = (f"lost to the horizon: {kwh(loss.loss_kwh_m2)} kWh/m² a year (open horizon: "
               f"{kwh(loss.open_kwh_m2)})")
    else:
        cap = (f"gained below the horizontal: {kwh(-loss.loss_kwh_m2)} kWh/m² a year (open "
               f"horizon: {kwh(loss.open_kwh_m2)})")
    tiles.append((f"{pct(loss.loss_pct, signed=False)} %", cap, "key.horizon_loss"))
    if opts.objective != "annual":
        tiles.append((f"{kwh(rec['objective_value_kwh_m2'])} kWh/m²",
                      f"objective value: {objective_words(opts.objective, opts.months)}", "key.objective"))
    return tiles


def _key_figures(m: Measure, ctx: _Ctx, frame: QRectF, s: float) -> tuple[list, float, bool]:
    """The key-figures box content laid out from the top of ``frame``; (ops, height,
    overflow)."""
    pad = 8.0 * s
    inner = QRectF(frame.left() + pad, frame.top() + pad, frame.width() - 2 * pad,
                   max(0.0, frame.height() - 2 * pad))
    col = Column(m, inner)
    ops = []
    opts = ctx.study.options_used
    small = Font(BODY_MIN_PT)
    heading = key_heading(ctx.study.mounting, opts.objective, opts.months, ctx.f.basis_words)
    ops += col.text(f"Key figures · {heading}", Font(_pt(9.0, s), bold=True),
                    min_size=BODY_MIN_PT, max_lines=2, color=theme.ACCENT,
                    gap_after=2.0 * s, role="key.heading")
    ops += col.text(degree_text(ctx.rec.label), Font(_pt(12.5, s), bold=True),
                    min_size=BODY_MIN_PT, max_lines=2, gap_after=1.5 * s, role="key.option")
    ops += col.text(schedule_sentence(ctx.rec, ctx.year), Font(_pt(9.5, s)),
                    min_size=BODY_MIN_PT, max_lines=3, gap_after=6.0 * s, role="key.schedule")
    tiles = _tiles(ctx)
    # rows of at most four (five when that makes one row), every row filling the width, so
    # a figure left out leaves no hole
    per_row = len(tiles) if len(tiles) <= 5 else 4
    rows = [tiles[i:i + per_row] for i in range(0, len(tiles), per_row)]
    if len(rows) > 1 and len(rows[-1]) == 1:          # no lone tile: balance the rows
        per_row = -(-len(tiles) // len(rows))
        rows = [tiles[i:i + per_row] for i in range(0, len(tiles), per_row)]
    gap = 6.0 * s
    vf = Font(_pt(14.0, s), bold=True)
    cf = small
    vh = m.line_height(vf)
    ch = 4 * m.line_height(cf, 1.12)
    th = 4.0 + vh + 2.0 + ch + 4.0
    grid = col.take(len(rows) * th + (len(rows) - 1) * gap)
    for r, row in enumerate(rows):
        tw = (inner.width() - (len(row) - 1) * gap) / len(row)
        for c, (value, caption, role) in enumerate(row):
            box = QRectF(grid.left() + c * (tw + gap), grid.top() + r * (th + gap), tw, th)
            box = box.intersected(grid)
            if box.height() < th - 0.01:
                col.overflow = True
                continue
            # the headline figure stands out by its heavier frame, which survives grey print
            lead = role == "key.annual"
            edge = pen(theme.ACCENT, 1.8) if lead else pen(TILE_EDGE, 0.5)
            inset = 0.9 if lead else 0.25
            ops.append(shape(rect_path(box.adjusted(inset, inset, -inset, -inset)), box,
                             edge, "#ffffff", role="tile"))
            vb = QRectF(box.left() + 5.0, box.top() + 4.0, box.width() - 10.0, vh)
            ops += fit_text(m, value, vb, vf, min_size=BODY_MIN_PT, color=TEXT, role=role).ops
            cb = QRectF(box.left() + 5.0, vb.bottom() + 2.0, box.width() - 10.0, ch)
            fitted = fit_text(m, caption, cb, cf, min_size=BODY_MIN_PT, max_lines=4,
                              color=MUTED, role=role + ".caption")
            col.overflow = col.overflow or fitted.elided
            ops += fitted.ops
    col.gap(5.0 * s)
    lines = []
    if opts.irradiance.sky == "clear":
        lines.append((clear_sky_advice(), True, "key.clear_sky"))
    lines.append((min_tilt_sentence(ctx.f.tilt_min_deg, ctx.study.mounting), False,
                  "key.min_tilt"))
    if ctx.f.weakest_month is not None:
        month, value = ctx.f.weakest_month
        lines.append((weakest_month_sentence(month, value, ctx.f.dark_months,
                                             ctx.f.polar_night, ctx.year), False,
                      "key.weakest_month"))
    rule = degree_text(ctx.study.recommendation_rule)
    rule = rule[0].upper() + rule[1:]
    lines.append((f"Rule: {rule}. The two-axis tracker is a ceiling to judge the others by, "
                  "not a recommendation.", False, "key.rule"))
    for i, warning in enumerate(ctx.f.weather_warnings):    # accepted, so shown on page 1
        lines.append((f"Weather data warning, accepted by the preparer: {client_text(warning)}",
                      True, f"key.weather_warning.{i}"))
    for text, bold, role in lines:
        ops += col.text(text, Font(BODY_MIN_PT, bold=bold), min_size=BODY_MIN_PT,
                        max_lines=4, color=TEXT, gap_after=2.0 * s, role=role)
    height = col.y - frame.top() + pad
    return ops, min(height, frame.height()), col.overflow or height > frame.height()


def _chart_series(ctx: _Ctx) -> list:
    """Horizontal, the site planes, the fixed optimum, the two-season schedule, the
    recommendation and the two-axis ceiling, with the JSON document's monthly values."""
    rows = ctx.doc["options"]
    rec_label = ctx.doc["recommended"]
    chosen = []
    for r in rows:
        keep = r["kind"] in ("horizontal", "plane", "fixed-optimal", "two-season", "two-axis")
        if keep or r["label"] == rec_label:
            chosen.append(r)
    series = []
    style = 0
    by_label = {o.label: o for o in ctx.study.options}
    for r in chosen:
        opt = by_label[r["label"]]
        name = option_name(opt)
        emphasis = r["label"] == rec_label
        if emphasis:
            name = f"{name} (recommended)"
        name += f": {kwh(r['annual_kwh_m2'])} kWh/m² a year"
        series.append(Series(name, tuple(r["monthly_kwh_m2"]), style, emphasis,
                             r["kind"] == "two-axis"))
        if not emphasis and r["kind"] != "two-axis":
            style += 1
    return series


# -- page 2 and on ---------------------------------------------------------------------------

#: Assumption rows laid on the same page as the cautions.
KEEP_WITH_CAUTIONS = 2


class _Flow:
    """Pages of details, filled from the top; a block that does not fit starts a new page."""

    def __init__(self, m: Measure, ctx: _Ctx):
        self.m, self.ctx = m, ctx
        self.pages: list[Page] = []
        self._new_page()

    def _new_page(self) -> None:
        m, ctx = self.m, self.ctx
        page = Page(ctx.w, ctx.h, ctx.content())
        body = _body(m, ctx)
        hf = Font(9.0, bold=True)
        hh = m.line_height(hf)
        right_text = "Feasibility sheet · details" + (" (continued)" if self.pages else "")
        rf = Font(BODY_MIN_PT)
        rw = m.width(right_text, rf) + 2.0
        page.add(fit_text(m, ctx.site.name, QRectF(body.left(), body.top(),
                                                    body.width() - rw - 12, hh), hf,
                          min_size=BODY_MIN_PT, max_lines=1, role="head.site").ops)
        page.add(fit_text(m, right_text, QRectF(body.right() - rw, body.top(), rw, hh), rf,
                          align="right", valign="bottom", color=MUTED, role="head.right").ops)
        y = body.top() + hh + 3.0
        page.add(hrule(body, y, RULE, 0.6))
        self.col = Column(m, QRectF(body.left(), y + 2.0, body.width(), body.bottom() - y - 2.0))
        self.page = page
        self.pages.append(page)

    def place(self, build) -> None:
        """``build(column) -> ops``, laid whole on this page, else on a new one."""
        col = self.col
        trial = Column(self.m, QRectF(col.rect.left(), col.y, col.rect.width(), 1e5))
        build(trial)
        need = trial.y - col.y
        if need > col.remaining + EPS and col.y > col.rect.top() + 1.0:
            self._new_page()
        self.page.add(build(self.col))


def _detail_pages(m: Measure, ctx: _Ctx) -> list[Page]:
    """The options and monthly tables, the study's notes, the assumptions and the cautions,
    flowing over as many pages as they need (nothing is cut or shrunk)."""
    flow = _Flow(m, ctx)
    flow.place(lambda col: _heading(col, "Options compared", 1.0, "section.options",
                                    gap_before=4.0) + _options_table(m, ctx, col, 1.0))
    flow.place(lambda col: _heading(col, "Monthly irradiation on the plane (kWh/m²)", 1.0,
                                    "section.monthly") + _monthly_table(m, ctx, col, 1.0))
    # the clear-sky caveat is stated in the key figures and the assumptions already
    notes = [n for n in ctx.f.notes if not n.startswith("Clear-sky basis")
             and n not in ctx.f.weather_warnings]                # those are on page 1

    def note(text, heading=None):
        def build(col):
            ops = _heading(col, heading, 1.0, "section.notes") if heading else []
            return ops + col.text("• " + client_text(text), Font(BODY_MIN_PT),
                                  min_size=BODY_MIN_PT, gap_after=1.5, role="note")
        return build

    for i, text in enumerate(notes):
        flow.place(note(text, "Notes from the study" if i == 0 else None))
    rows = list(ctx.f.assumptions) + [("Reproducibility", ctx.f.reproducibility)]

    def pair(row, heading=None):
        def build(col):
            ops = _heading(col, heading, 1.0, "section.assumptions") if heading else []
            return ops + _pairs(m, col, [row], 1.0)
        return build

    # the last assumption rows go with the cautions, so the cautions never stand alone
    # on a page of their own
    head, tail = rows[:-KEEP_WITH_CAUTIONS], rows[-KEEP_WITH_CAUTIONS:]
    for i, row in enumerate(head):
        flow.place(pair(row, "Assumptions" if i == 0 else None))

    def cautions(col):
        col.gap(10.0)
        _, ch = _cautions(m, ctx, QRectF(col.rect.left(), col.y, col.rect.width(), 1e4), 1.0)
        box = col.take(ch)
        ops, _ = _cautions(m, ctx, box, 1.0)
        flow.page.frames["cautions"] = box
        return [shape(rect_path(box.adjusted(0.4, 0.4, -0.4, -0.4)), box,
                      pen(CAUTION, 0.8), CAUTION_FILL, role="cautions-box")] + ops

    def closing(col):
        ops = []
        for j, row in enumerate(tail):
            ops += pair(row, "Assumptions" if not head and j == 0 else None)(col)
        return ops + cautions(col)

    flow.place(closing)
    return flow.pages


def _cautions(m: Measure, ctx: _Ctx, frame: QRectF, s: float) -> tuple[list, float]:
    pad = 6.0 * s
    inner = QRectF(frame.left() + pad, frame.top() + pad, frame.width() - 2 * pad, 1e4)
    col = Column(m, inner)
    ops = col.text("Cautions", Font(_pt(9.5, s), bold=True), max_lines=1, color=CAUTION,
                   gap_after=2.0 * s, role="section.cautions")
    for i, text in enumerate(ctx.f.cautions):
        ops += col.text("• " + text, Font(BODY_MIN_PT, bold=(i == 0)), gap_after=1.5 * s,
                        role=f"caution.{i}")
    return ops, col.y - frame.top() + pad


def _table(m: Measure, col: Column, columns, rows, s: float, role: str) -> list:
    """A table flowing down ``col``.

    ``columns``: (title, width fraction, align, max lines); ``rows``: dicts with
    ``cells`` (texts), optional ``bold``, ``italic``, ``fill``, ``color``.
    """
    ops = []
    width = col.rect.width()
    xs = [col.rect.left()]
    for _t, frac, _a, _n in columns:
        xs.append(xs[-1] + frac * width)
    xs[-1] = col.rect.right()
    hpad, vpad = 2.5 * s, 1.6 * s
    head_font = Font(BODY_MIN_PT, bold=True, condensed=True)
    body_font = Font(BODY_MIN_PT, condensed=True)

    def row_height(texts, font, limits):
        h = 0.0
        for i, t in enumerate(texts):
            w = xs[i + 1] - xs[i] - 2 * hpad
            h = max(h, natural_height(m, t, w, font, limits[i]))
        return h + 2 * vpad

    head = [c[0] for c in columns]
    hh = row_height(head, head_font, [4] * len(columns))
    hbox = col.take(hh)
    ops.append(shape(rect_path(hbox), hbox, None, PANEL, role=f"{role}.head-bg"))
    for i, t in enumerate(head):
        cell = QRectF(xs[i] + hpad, hbox.top() + vpad, xs[i + 1] - xs[i] - 2 * hpad,
                      max(0.0, hbox.height() - 2 * vpad))
        align = columns[i][2]
        ops += fit_text(m, t, cell, head_font, min_size=BODY_MIN_PT, max_lines=4, align=align,
                        valign="bottom", role=f"{role}.head").ops
    ops.append(hrule(hbox, hbox.bottom(), AXIS_GREY, 0.6))
    limits = [c[3] for c in columns]
    for r in rows:
        font = Font(body_font.size, bold=r.get("bold", False), italic=r.get("italic", False),
                    condensed=True)
        h = row_height(r["cells"], font, limits)
        box = col.take(h)
        if box.height() <= 0.5:
            col.overflow = True
            break
        if r.get("fill"):
            ops.append(shape(rect_path(box), box, None, r["fill"], role=f"{role}.fill"))
        for i, t in enumerate(r["cells"]):
            cell = QRectF(xs[i] + hpad, box.top() + vpad, xs[i + 1] - xs[i] - 2 * hpad,
                          max(0.0, box.height() - 2 * vpad))
            ops += fit_text(m, t, cell, font, min_size=BODY_MIN_PT, max_lines=limits[i],
                            align=columns[i][2], color=r.get("color", TEXT),
                            role=f"{role}.cell.{i}").ops
        ops.append(hrule(box, box.bottom(), RULE, 0.35))
    return ops


AXIS_GREY = "#5b6570"


def _row_style(ctx: _Ctx, opt) -> dict:
    if opt is ctx.rec:
        return {"bold": True, "fill": theme.ACCENT_SOFT, "color": TEXT}
    if opt.kind == "two-axis":
        return {"italic": True, "color": MUTED}
    return {}


def _options_table(m: Measure, ctx: _Ctx, col: Column, s: float) -> list:
    columns = [("Option", 0.20, "left", 2), ("Schedule: tilt, dates, facing", 0.33, "left", 3),
               ("Annual (kWh/m²)", 0.09, "right", 1), ("Gain vs horizontal (%)", 0.09, "right", 1),
               ("Gain vs fixed optimum (%)", 0.09, "right", 1),
               ("Share of two-axis (%)", 0.09, "right", 1),
               ("Adjustments per year", 0.11, "right", 1)]
    rows = []
    table = ctx.f.options
    for opt, (_i, r) in zip(ctx.study.options, table.iterrows(), strict=True):
        name = option_name(opt)
        if opt.kind == "rule-of-thumb":
            name = "Rule of thumb (tilt equal to latitude)"
        if opt is ctx.rec:
            name = "★ " + name
        adjust = "continuous" if opt.kind == "two-axis" else str(int(r["adjustments_per_year"]))
        rows.append({"cells": [name, schedule_sentence(opt, ctx.year), kwh(r["annual_kwh_m2"]),
                               pct(r["gain_vs_horizontal_pct"]),
                               pct(r["gain_vs_fixed_optimal_pct"]),
                               pct(r["share_of_tracking_pct"], signed=False), adjust],
                     **_row_style(ctx, opt)})
    return _table(m, col, columns, rows, s, "options")


def _monthly_table(m: Measure, ctx: _Ctx, col: Column, s: float) -> list:
    columns = [("Option", 0.19, "left", 2)] + [(mo, 0.062, "right", 1) for mo in MONTH_ABBR] \
        + [("Year", 0.066, "right", 1)]
    rows = []
    mt = ctx.f.monthly
    for opt, name_col in zip(ctx.study.options, mt.columns, strict=True):
        vals = mt[name_col].to_list()
        name = option_name(opt)
        if opt.kind == "rule-of-thumb":
            name = "Rule of thumb"
        if opt is ctx.rec:
            name = "★ " + name
        rows.append({"cells": [name] + [kwh(v) for v in vals], **_row_style(ctx, opt)})
    return _table(m, col, columns, rows, s, "monthly")


def _pairs(m: Measure, col: Column, rows, s: float) -> list:
    """Label and text rows (assumptions), each as long as its text needs."""
    ops = []
    lw = 0.17 * col.rect.width()
    lf = Font(BODY_MIN_PT, bold=True)
    tf = Font(BODY_MIN_PT)
    for label, text in rows:
        text = client_text(text)
        tw = col.rect.width() - lw - 6.0
        h = max(natural_height(m, text, tw, tf), natural_height(m, label, lw, lf))
        box = col.take(h)
        ops += fit_text(m, label, QRectF(box.left(), box.top(), lw, box.height()), lf,
                        min_size=BODY_MIN_PT, role=f"assumption.label.{label}").ops
        fitted = fit_text(m, text, QRectF(box.left() + lw + 6.0, box.top(), tw, box.height()),
                          tf, min_size=BODY_MIN_PT, role=f"assumption.{label}")
        if fitted.elided:
            col.overflow = True
        ops += fitted.ops
        col.gap(2.0 * s)
    return ops


__all__ = ["MARGINS", "SheetDocument", "build_sheet"]
