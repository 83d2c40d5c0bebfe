"""Tilt study view: objective and limits, the compared options, and four charts.

The study itself is :func:`tiltyard.engine.tilt.tilt_study` on the open
assessment (:func:`tiltyard.engine.assess.assessment_part`), run through the
task runner; this view only edits its options and draws its result. The last
good result stays on screen while a field holds a value the engine refuses.
"""

from __future__ import annotations

import math
import re
from datetime import date

from PySide6.QtCore import Qt
from PySide6.QtGui import QFontMetrics, QGuiApplication
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QScrollArea,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.assess import AssessmentError, assessment_part, choose_basis
from tiltyard.engine.assessment import Mounting, StudySettings
from tiltyard.engine.tilt import StudyOptions
from tiltyard.engine.timegrid import REFERENCE_YEAR
from tiltyard.engine.words import (
    MIN_TILT_DEFAULT_DEG,
    MONTH_ABBR,
    MOUNTING_WORDS,
    degree_text,
    degrees,
    model_name,
    mounting_words,
    number,
    schedule_words,
)

from .. import plots, theme
from ..engine_process import EngineCall
from ..study_model import (
    COL_OBJECTIVE,
    StudySortProxy,
    StudyTableModel,
)
from ..widgets import CopyableTable, ValidatedField, View, WholeLabel, wrapping
from .study_charts import CHARTS, StudyChartDrawing

OBJECTIVES = (("annual total", "annual"), ("worst month", "worst-month"),
              ("chosen months", "months"))

#: Tilt positions a year an adjustable rack may take.
POSITION_CHOICES = (("2 a year", 2), ("4 a year", 4), ("12 a year", 12))

#: Which editor fields an engine message is about (by the message's first words).
_MESSAGE_FIELDS = (("tilt range", ("tilt_min_deg", "tilt_max_deg")),
                   ("tilt_step_deg", ("tilt_step_deg",)),
                   ("azimuth_deg", ("azimuth_deg",)),
                   ("min_days_between", ("min_days_between",)),
                   ("switch", ("switch_a", "switch_b")),
                   ("months", ("months",)))

#: The editor's label of each engine option a message may name.
_LABELS = {"tilt_min_deg": "Tilt from", "tilt_max_deg": "Tilt to",
           "tilt_step_deg": "Tilt step", "azimuth_deg": "Azimuth",
           "min_days_between": "Min. period", "switch_dates": "Switch on", "months": "Months"}


def _form_words(message: str, kw: dict) -> str:
    """An engine message about the study options, in the editor's own words: what is
    wrong and what to do, by the fields' labels."""
    if message.startswith("tilt range"):
        lo, hi = kw["tilt_min_deg"], kw["tilt_max_deg"]
        for label, which, v in ((_LABELS["tilt_min_deg"], "lowest", lo),
                                (_LABELS["tilt_max_deg"], "highest", hi)):
            if not 0.0 <= v <= 90.0:
                return (f"{label}: the {which} tilt ({degrees(v)}) must be between 0° (flat) "
                        "and 90° (vertical).")
        return (f"Tilt range: the lowest tilt ({degrees(lo)}) must be between 0° and the "
                f"highest tilt ({degrees(hi)}).")
    m = re.match(r"(\w+) = .*?: (.*)$", message)
    if m is None or m.group(1) not in _LABELS:
        return message
    reason = degree_text(m.group(2)).replace("(min_days_between)", "(Min. period)")
    label = _LABELS[m.group(1)]
    return f"{label} {reason}." if reason.startswith("must") else f"{label}: {reason}."


def _float(text: str, what: str) -> float:
    if not text.strip():
        raise ValueError(f"{what}: type a number of degrees")
    try:
        value = float(text.strip().replace(",", ".").rstrip("°").strip())
    except ValueError:
        raise ValueError(f"{what}: “{text.strip()}” is not a number") from None
    if not math.isfinite(value):
        raise ValueError(f"{what}: “{text.strip()}” is not a finite number")
    return value


def _int(text: str, what: str) -> int:
    if not text.strip():
        raise ValueError(f"{what}: type a whole number of days")
    try:
        return int(text.strip())
    except ValueError:
        raise ValueError(f"{what}: “{text.strip()}” is not a whole number of days") from None


def _mmdd(text: str, year: int) -> str:
    t = text.strip()
    if not t:
        raise ValueError("Switch on: type a date as MM-DD, e.g. 10-01 for 1 October")
    m = re.fullmatch(r"(\d{1,2})-(\d{1,2})", t)
    if m is None:
        raise ValueError(f"Switch on: “{t}” is not a date; type it as MM-DD, e.g. 10-01 for "
                         "1 October")
    try:
        date(year, int(m.group(1)), int(m.group(2)))
    except ValueError:
        raise ValueError(f"Switch on: “{t}” is no day of {year}; type it as MM-DD, month "
                         "01 to 12") from None
    return f"{int(m.group(1)):02d}-{int(m.group(2)):02d}"


class StudyView(StudyChartDrawing, View):
    title = "Tilt study"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self.study = None            # the result on screen
        # last accepted value of each field (stands in for a field being edited)
        self._good = {"tilt_min_deg": MIN_TILT_DEFAULT_DEG, "tilt_max_deg": 90.0, "tilt_step_deg": 1.0,
                      "azimuth_deg": None, "min_days_between": 30, "switch_a": None,
                      "switch_b": None}
        self._year = REFERENCE_YEAR
        self._map_overlay = []
        self._map_label_items = []       # the map's labels and leaders, placed per size
        self._map_watched = self._curve_watched = False
        self._curve_overlay = []
        self._curve_best = self._curve_line = None
        self._timeline_items = []
        self._timeline_labels = None
        self._month_lines = []
        self._month_lines_year = 0
        self.timeline_bars = []

        outer = QVBoxLayout(self)
        outer.setContentsMargins(14, 10, 14, 6)
        outer.setSpacing(6)
        top = QHBoxLayout()
        self.heading = QLabel("Tilt study")
        self.heading.setProperty("role", "heading")
        top.addWidget(self.heading)
        top.addSpacing(12)
        self.basis = WholeLabel()
        self.basis.setProperty("role", "muted")
        self.basis.setToolTip("The sky basis and diffuse model are the ones chosen for "
                              "Irradiance; changing them there re-runs the study.")
        top.addWidget(self.basis, 2)      # the basis is the longer text: it wraps less
        self.status = WholeLabel()
        self.status.setProperty("role", "muted")
        top.addWidget(self.status, 1)
        outer.addLayout(top)

        upper = QHBoxLayout()
        upper.setSpacing(10)
        upper.addWidget(self._build_editor())
        upper.addWidget(self._build_table(), 1)
        # a tall window shares its height: the editor shows whole, the charts grow
        outer.addLayout(upper, 1)
        outer.addWidget(self._build_charts(), 1)

        self._loading = False
        ctx.document.replaced.connect(self._load_settings)
        ctx.document.settings_changed.connect(self._settings_changed)
        self._load_settings(ctx.assessment)

    # -- construction ---------------------------------------------------------
    def _build_editor(self) -> QWidget:
        box = QGroupBox("Objective and limits")
        form = QFormLayout(box)
        form.setContentsMargins(8, 8, 8, 8)
        form.setVerticalSpacing(5)
        form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        self.objective = QComboBox()
        for text, key in OBJECTIVES:
            self.objective.addItem(text, key)
        self.objective.setToolTip("Annual total: most energy over the year. Worst month: "
                                  "the weakest month as strong as it can be (off-grid, "
                                  "winter loads). Chosen months: most energy in the ticked "
                                  "months.")
        self.objective.currentIndexChanged.connect(lambda _i: self._changed())
        self.mounting = QComboBox()
        for key, text in MOUNTING_WORDS.items():
            self.mounting.addItem(text, key)
        self.mounting.setToolTip("How the panels will be held. Flush on the roof: the roof's "
                                 "own tilt and direction, the roof as it is. Fixed rack: one "
                                 "tilt all year. Adjustable rack: re-tilted with the seasons. "
                                 "Ground or flat-roof rows: fixed racks in rows, with their "
                                 "spacing.")
        self.mounting.currentIndexChanged.connect(lambda _i: self._changed())
        form.addRow("Mounting", self.mounting)
        self.positions = QComboBox()
        for text, n in POSITION_CHOICES:
            self.positions.addItem(text, n)
        self.positions.setCurrentIndex(len(POSITION_CHOICES) - 1)
        self.positions.setToolTip("Most tilt positions a year the adjustable rack takes "
                                  "(2: two seasons, 4: four seasons, 12: every month)")
        self.positions.currentIndexChanged.connect(lambda _i: self._changed())
        form.addRow("Positions", self.positions)
        form.addRow("Maximise", self.objective)

        months = QWidget()
        mg = QGridLayout(months)
        mg.setContentsMargins(0, 0, 0, 0)
        mg.setHorizontalSpacing(4)
        mg.setVerticalSpacing(0)
        self.month_boxes = []
        for i, name in enumerate(MONTH_ABBR):
            cb = QCheckBox(name)
            cb.toggled.connect(lambda _c: self._changed())
            mg.addWidget(cb, i // 4, i % 4)
            self.month_boxes.append(cb)
        self.months_error = QLabel()
        self.months_error.setProperty("role", "fieldError")
        self.months_error.setWordWrap(True)
        self.months_error.hide()
        mg.addWidget(self.months_error, 3, 0, 1, 4)
        self.months_widget = months
        form.addRow(months)

        self.fields = {}
        self.tilt_min = self._field("tilt_min_deg", "0 flat to 90 vertical", "°")
        self.tilt_max = self._field("tilt_max_deg", "0 flat to 90 vertical", "°")
        self.tilt_step = self._field("tilt_step_deg", "rack notches, e.g. 5", "°")
        form.addRow("Tilt from", self.tilt_min)
        form.addRow("Tilt to", self.tilt_max)
        form.addRow("Tilt step", self.tilt_step)

        az_row = QWidget()
        al = QHBoxLayout(az_row)
        al.setContentsMargins(0, 0, 0, 0)
        self.azimuth_mode = QComboBox()
        self.azimuth_mode.addItem("free", "free")
        self.azimuth_mode.addItem("fixed", "fixed")
        self.azimuth_mode.setToolTip("Free: the study chooses the direction. Fixed: the plane "
                                     "faces a given direction (clockwise from north, "
                                     "south = 180°).")
        self.azimuth_mode.currentIndexChanged.connect(self._azimuth_mode_changed)
        self.azimuth = self._field("azimuth_deg", "0–360", "°")
        al.addWidget(self.azimuth_mode, 0, Qt.AlignmentFlag.AlignTop)
        al.addWidget(self.azimuth, 1)
        form.addRow("Azimuth", az_row)
        self.min_days = self._field("min_days_between", "1–120", "days")
        self.min_days.setToolTip("Shortest time a schedule keeps one tilt (days between two "
                                 "adjustments)")
        self.tilt_step.setToolTip("Tilts the rack can be set to: from the lowest tilt in "
                                  "steps of this size")
        form.addRow("Min. period", self.min_days)

        sw_row = QWidget()
        sl = QGridLayout(sw_row)
        sl.setContentsMargins(0, 0, 0, 0)
        sl.setHorizontalSpacing(4)
        self.switch_mode = QComboBox()
        self.switch_mode.addItem("optimised", "optimised")
        self.switch_mode.addItem("fixed", "fixed")
        self.switch_mode.setToolTip("Dates of the two-season schedule's adjustments: found by "
                                    "the study, or fixed by you (MM-DD).")
        self.switch_mode.currentIndexChanged.connect(self._switch_mode_changed)
        self.switch_a = self._field("switch_a", "MM-DD")
        self.switch_b = self._field("switch_b", "MM-DD")
        sl.addWidget(self.switch_mode, 0, 0, 1, 2)
        sl.addWidget(self.switch_a, 1, 0, Qt.AlignmentFlag.AlignTop)
        sl.addWidget(self.switch_b, 1, 1, Qt.AlignmentFlag.AlignTop)
        form.addRow("Switch on", sw_row)

        for name, text in (("tilt_min_deg", f"{MIN_TILT_DEFAULT_DEG:g}"), ("tilt_max_deg", "90"),
                           ("tilt_step_deg", "1"), ("min_days_between", "30")):
            self.fields[name].edit.setText(text)

        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QScrollArea.Shape.NoFrame)
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        scroll.setWidget(box)
        scroll.setFixedWidth(272)
        return scroll

    def _field(self, name: str, placeholder: str, unit: str = "") -> ValidatedField:
        f = ValidatedField(lambda text, n=name: self._check_field(n, text), placeholder, unit)
        f.accepted.connect(lambda _v: self._changed())
        self.fields[name] = f
        return f

    def _build_table(self) -> QWidget:
        w = QWidget()
        lay = QVBoxLayout(w)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(4)
        row = QHBoxLayout()
        sub = QLabel("Options compared")
        sub.setStyleSheet("font-weight: 600;")
        row.addWidget(sub)
        hint = QLabel("click a header to sort · Ctrl+C copies the selected rows")
        hint.setProperty("role", "muted")
        wrapping(hint)
        row.addWidget(hint, 1)
        self.copy_button = QPushButton("Copy table")
        self.copy_button.setToolTip("Copy the whole table as tab-separated text (for a "
                                    "spreadsheet)")
        self.copy_button.clicked.connect(self.copy_table)
        row.addWidget(self.copy_button)
        lay.addLayout(row)

        self.model = StudyTableModel(self)
        self.proxy = StudySortProxy(self)
        self.proxy.setSourceModel(self.model)
        self.table = CopyableTable()
        self.table.setModel(self.proxy)
        self.table.setWordWrap(False)
        self.table.setTextElideMode(Qt.TextElideMode.ElideRight)
        self.table.sortByColumn(0, Qt.SortOrder.AscendingOrder)
        hh = self.table.horizontalHeader()
        hh.setDefaultAlignment(Qt.AlignmentFlag.AlignCenter | Qt.TextFlag.TextWordWrap)
        hh.setMinimumHeight(40)
        hh.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        hh.setSectionResizeMode(1, QHeaderView.ResizeMode.Stretch)
        self.table.setColumnWidth(0, 136)
        self._fit_headers()
        hh.setFixedHeight(56)
        self.table.verticalHeader().setDefaultSectionSize(22)
        self.table.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self._fit_table(8)
        lay.addWidget(self.table, 1)

        self.recommendation = WholeLabel("Computing the study…")
        self.recommendation.setTextFormat(Qt.TextFormat.RichText)
        lay.addWidget(self.recommendation)
        self.bound = WholeLabel()
        self.bound.setProperty("role", "muted")
        self.bound.hide()
        lay.addWidget(self.bound)
        self.warnings = WholeLabel()
        self.warnings.setStyleSheet(f"color: {theme.WARNING};")
        self.warnings.hide()
        lay.addWidget(self.warnings)
        lay.addStretch(1)               # room to spare goes under the texts, not between
        return w

    def _build_charts(self) -> QWidget:
        charts = plots.take(CHARTS)
        for name in ("curve_plot", "curve", "curve_opt", "map_plot", "map_image", "map_bar",
                     "timeline_plot"):
            setattr(self, name, getattr(charts, name))
        return charts

    def _fit_table(self, rows: int) -> None:
        """Make the table exactly as tall as its rows (the charts get the rest)."""
        h = (self.table.horizontalHeader().height()
             + rows * self.table.verticalHeader().defaultSectionSize()
             + 2 * self.table.frameWidth() + 2)
        self.table.setFixedHeight(h)

    def _fit_headers(self) -> None:
        """Numeric columns as wide as the longest word of their header (headers wrap)."""
        font = self.table.horizontalHeader().font()
        font.setBold(True)
        fm = QFontMetrics(font)
        for c in range(2, self.proxy.columnCount()):
            words = str(self.proxy.headerData(c, Qt.Orientation.Horizontal)).split()
            self.table.setColumnWidth(c, max(60, max(fm.horizontalAdvance(w) for w in words)
                                             + 12))

    # -- reading the editor ---------------------------------------------------
    def _basic(self, name: str, text: str):
        """The value typed in one field (format only; the engine judges ranges)."""
        if name in ("tilt_min_deg", "tilt_max_deg", "tilt_step_deg", "azimuth_deg"):
            return _float(text, _LABELS[name])
        if name == "min_days_between":
            return _int(text, _LABELS[name])
        return _mmdd(text, self._year)

    def _value(self, name: str, override: dict):
        if name in override:
            return override[name]
        try:
            return self._basic(name, self.fields[name].edit.text())
        except ValueError:
            return self._good[name]

    def _kwargs(self, override: dict | None = None) -> dict:
        o = override or {}
        kw = {"objective": self.objective.currentData(),
              "months": tuple(i + 1 for i, cb in enumerate(self.month_boxes) if cb.isChecked()),
              "tilt_min_deg": self._value("tilt_min_deg", o),
              "tilt_max_deg": self._value("tilt_max_deg", o),
              "tilt_step_deg": self._value("tilt_step_deg", o),
              "azimuth_deg": (self._value("azimuth_deg", o)
                              if self.azimuth_mode.currentData() == "fixed" else None),
              "min_days_between": self._value("min_days_between", o),
              "switch_dates": None}
        if self.switch_mode.currentData() == "fixed":
            kw["switch_dates"] = (self._value("switch_a", o), self._value("switch_b", o))
        return kw

    @staticmethod
    def _fields_of(message: str) -> tuple:
        for prefix, names in _MESSAGE_FIELDS:
            if message.startswith(prefix):
                return names
        return ()

    @staticmethod
    def _validate(kw: dict) -> StudyOptions:
        sw = kw.get("switch_dates")
        if sw is not None:
            if None in sw:
                raise ValueError("switch dates: give both dates as MM-DD")
            if sw[0] == sw[1]:
                raise ValueError(f"switch dates: the two dates ({sw[0]} and {sw[1]}) must "
                                 "differ")
        return StudyOptions(**kw)

    def _check_field(self, name: str, text: str):
        """Parse one field and let the engine judge it with the other fields as they are."""
        value = self._basic(name, text)
        kw = self._kwargs({name: value})
        try:
            self._validate(kw)
        except ValueError as exc:
            if name in self._fields_of(str(exc)):
                raise ValueError(self._words(str(exc), kw)) from None
        return value

    @staticmethod
    def _words(message: str, kw: dict) -> str:
        if message.startswith("switch dates: "):      # the editor's own check
            return "Switch on: " + message.removeprefix("switch dates: ") + "."
        return _form_words(message, kw)

    def _collect(self) -> StudyOptions | None:
        """Options from the editor, or None (with the messages shown) if refused."""
        for name, f in self.fields.items():
            if not f.isEnabled():
                f.set_error("")
                continue
            try:
                self._basic(name, f.edit.text())
            except ValueError as exc:
                f.set_error(str(exc))
                return None
        kw = self._kwargs()
        self.months_error.hide()
        try:
            opts = self._validate(kw)
        except ValueError as exc:
            names = self._fields_of(str(exc))
            said = self._words(str(exc), kw)
            for name, f in self.fields.items():
                f.set_error(said if name in names else "")
            if "months" in names:
                self.months_error.setText("Tick the months to optimise for." if not kw["months"]
                                          else said)
                self.months_error.show()
            return None
        for f in self.fields.values():
            f.set_error("")
        for name in self._good:
            if self.fields[name].isEnabled():
                self._good[name] = self._basic(name, self.fields[name].edit.text())
        return opts

    def _changed(self) -> None:
        if self._loading:
            return
        self._sync_enabled()
        opts = self._collect()
        if opts is None:
            self.status.setText("showing the last good result")
            return
        self._options = opts
        kw = self._kwargs()
        mounting = Mounting(self.mounting.currentData(), int(self.positions.currentData()))
        self.ctx.set_settings(study=StudySettings(**kw), mounting=mounting)

    def _settings_changed(self, assessment) -> None:
        """Settings changed elsewhere (an undo, a redo): show them unless they are the
        editor's own."""
        try:
            shown = (StudySettings(**self._kwargs()),
                     Mounting(self.mounting.currentData(), int(self.positions.currentData())))
        except ValueError:
            shown = None
        if shown != (assessment.study, assessment.mounting):
            self._load_settings(assessment)

    def _load_settings(self, assessment) -> None:
        """Show a newly opened site's own study settings and mounting in the editor."""
        st, a = assessment.study, assessment
        self._loading = True
        try:
            self.objective.setCurrentIndex(max(0, self.objective.findData(st.objective)))
            for i, cb in enumerate(self.month_boxes):
                cb.setChecked(i + 1 in st.months)
            self.mounting.setCurrentIndex(max(0, self.mounting.findData(a.mounting_kind)))
            pos = self.positions.findData(int(a.mounting.max_positions))
            self.positions.setCurrentIndex(pos if pos >= 0 else len(POSITION_CHOICES) - 1)
            for name, value in (("tilt_min_deg", st.tilt_min_deg),
                                ("tilt_max_deg", st.tilt_max_deg),
                                ("tilt_step_deg", st.tilt_step_deg),
                                ("min_days_between", st.min_days_between)):
                self.fields[name].edit.setText(f"{value:g}")
                self._good[name] = value
            fixed_az = st.azimuth_deg is not None
            self.azimuth_mode.setCurrentIndex(1 if fixed_az else 0)
            self.azimuth.edit.setText(f"{st.azimuth_deg:g}" if fixed_az else "")
            sw = st.switch_dates
            self.switch_mode.setCurrentIndex(1 if sw else 0)
            for f, text in zip((self.switch_a, self.switch_b), sw or ("", ""), strict=True):
                f.edit.setText(text)
            self._year = a.year
        finally:
            self._loading = False
        self._sync_enabled()
        self._options = self._collect()

    def _sync_enabled(self) -> None:
        has_planes = bool(self.ctx.site.planes)
        flush = self.mounting.model().item(0)
        flush.setEnabled(has_planes)
        flush.setToolTip("" if has_planes else "Add the roof plane on the Site view first")
        adjustable = self.mounting.currentData() == "adjustable"
        self.positions.setEnabled(adjustable)
        self.min_days.setEnabled(adjustable)         # only a seasonal schedule has periods
        self.switch_mode.setEnabled(adjustable)
        self.months_widget.setEnabled(self.objective.currentData() == "months")
        for cb in self.month_boxes:
            cb.setEnabled(self.objective.currentData() == "months")
        self.azimuth.setEnabled(self.azimuth_mode.currentData() == "fixed")
        fixed = adjustable and self.switch_mode.currentData() == "fixed"
        self.switch_a.setEnabled(fixed)
        self.switch_b.setEnabled(fixed)

    def _azimuth_mode_changed(self, _i) -> None:
        if self.azimuth_mode.currentData() == "fixed" and not self.azimuth.edit.text().strip():
            az = (self.study.curve_azimuth_deg if self.study is not None
                  else self.ctx.site.equator_azimuth_deg)
            self.azimuth.edit.setText(f"{az:g}")
        self._changed()

    def _switch_mode_changed(self, _i) -> None:
        if self.switch_mode.currentData() == "fixed":
            starts = ("04-01", "10-01")
            if self.study is not None and self.study.has_option("two-season"):
                starts = tuple(p.start for p in self.study.option("two-season").schedule)
            for f, s in zip((self.switch_a, self.switch_b), starts, strict=True):
                if not f.edit.text().strip():
                    f.edit.setText(s)
        self._changed()

    # -- computing ------------------------------------------------------------
    @property
    def options(self) -> StudyOptions | None:
        """The options the next study will use (None while the editor is refused)."""
        return self._options

    def refresh(self) -> None:
        super().refresh()
        a = self.ctx.assessment
        self.heading.setText(f"Tilt study · {a.site.name}")
        self._sync_enabled()
        if self._options is None:
            self._options = self._collect()
            if self._options is None:
                return
        self._year = a.year
        self.status.setText("computing…")
        self.ctx.runner.submit_call(self.channel("study"),
                                    EngineCall(assessment_part, (a, "study")),
                                    self._show_study, label="Tilt study")

    def _show_study(self, study) -> None:
        self.study = study
        self.bound.hide()
        a = self.ctx.assessment
        self.ctx.runner.submit_call(self.channel("bound"),
                                    EngineCall(assessment_part, (a, "clear_sky_bound")),
                                    lambda b, st=study: self._show_bound(st, b),
                                    label="Tilt study: clear-sky bound")
        self.draw_in_stages(self.channel("draw"), (
            lambda: self._show_table(study),
            lambda: self._draw_curve(study),
            lambda: self._draw_map(study),
            lambda: self._draw_timeline(study),
            lambda: self.ctx.publish_study(study)))

    def _show_bound(self, study, bound) -> None:
        """The clear-sky upper bound beside a monthly or weather-file basis."""
        rec = study.recommended
        if bound is None or study is not self.study or rec.label not in bound:
            self.bound.hide()
            return
        self.bound.setText(f"Under a clear sky every day the same plane would get "
                           f"{number(bound[rec.label])} kWh/m² a year: the upper bound, not an "
                           "expected value.")
        self.bound.show()

    def _show_table(self, study) -> None:
        self.status.setText("")
        irr = study.options_used.irradiance
        try:
            basis = choose_basis(self.ctx.assessment)
            words = f"{basis.words} ({basis.reason})"
        except AssessmentError as exc:
            words = str(exc)
        self.basis.setText(f"Sky basis: {words} · mounting: {mounting_words(study.mounting)} · "
                           f"sky diffuse: {model_name(irr.model)} · year {irr.year}, {irr.step_min} min steps")
        self.basis.setToolTip(study.sky_note)
        self.model.set_study(study)
        self._fit_table(len(study.options))
        self._fit_headers()
        self.table.setColumnHidden(COL_OBJECTIVE, study.options_used.objective == "annual")
        self._show_recommendation(study)

    def _show_recommendation(self, study) -> None:
        rec = study.recommended
        year = study.options_used.irradiance.year
        fixed = study.option("fixed-optimal")
        objective = study.options_used.objective_label
        gain = ""
        if rec is not fixed and study.score(fixed) > 0:
            up = 100.0 * (study.score(rec) / study.score(fixed) - 1.0)
            gain = f" It raises the {objective} objective by {up:.1f} % over the fixed optimum."
        accent = theme.ACCENT
        head = "Recommended"
        if study.mounting == "flush":
            head = "This roof as it is"
            share = study.share_pct(rec, "fixed-optimal")
            gain = ("" if share is None else
                    f" It gives {share:.0f} % of the best plane for the site on the "
                    f"{objective} objective.")
        self.recommendation.setText(
            f"<span style='color:{accent}; font-weight:600'>{head}: "
            f"{degree_text(rec.label)}</span>: {schedule_words(rec, year)}.{gain}<br>"
            f"<span style='color:{theme.MUTED}'>Rule: {degree_text(study.recommendation_rule)}"
            ". The two-axis row is a ceiling to judge the others by, not a recommendation."
            "</span>")
        if study.warnings:
            self.warnings.setText("\n".join("• " + degree_text(w) for w in study.warnings))
            self.warnings.show()
        else:
            self.warnings.hide()

    # -- copying --------------------------------------------------------------
    def copy_table(self) -> str:
        """Put the whole options table on the clipboard as tab-separated text."""
        text = self.table.as_tsv(selected_only=False)
        QGuiApplication.clipboard().setText(text)
        return text

    def table_rows(self) -> list[list[str]]:
        """What the table shows, row by row, in its current (sorted) order."""
        m = self.proxy
        cols = [c for c in range(m.columnCount()) if not self.table.isColumnHidden(c)]
        return [[str(m.index(r, c).data()) for c in cols] for r in range(m.rowCount())]

    def recommended_row(self) -> int | None:
        """The table row (as shown) of the recommended option."""
        for r in range(self.proxy.rowCount()):
            src = self.proxy.mapToSource(self.proxy.index(r, 0))
            if self.model.is_recommended(src.row()):
                return r
        return None


__all__ = ["StudyView"]
