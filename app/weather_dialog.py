"""The weather-file dialog: pick a file, name a CSV file's columns, see what the import found.

TMY3, TMY2 and EPW files say what their columns, timestamps and time zone are,
so they are read as they are. Any other CSV file needs a column mapping: which
column holds the timestamp and which the irradiance, temperature and wind
values, what the timestamps mark in each interval and which time zone they are
in. Reading happens in the worker; the dialog shows the importer's findings
(or its message, with the line number) and only "Use this weather" changes the
app's sky basis. A file that fails leaves the sky choice and the site as they
were.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass, field
from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QVBoxLayout,
)

from tiltyard.engine.allsky import WeatherOptionError, load_weather_for_site
from tiltyard.engine.site import Site
from tiltyard.engine.skyyear import IrradianceOptions, sky_year
from tiltyard.engine.timegrid import STEPS_MIN
from tiltyard.engine.weather import WeatherData, WeatherImportError

from . import theme

FILE_FILTER = ("Weather files (*.csv *.CSV *.epw *.EPW *.tm2 *.TM2 *.txt);;"
               "All files (*)")

#: Our column names with the words shown for them, in the order of the form.
MAPPED_COLUMNS = (("timestamp", "Timestamp"), ("ghi", "GHI (global horizontal)"),
                  ("dni", "DNI (direct normal)"), ("dhi", "DHI (diffuse horizontal)"),
                  ("temp_air", "Air temperature (°C)"), ("wind_speed", "Wind speed (m/s)"))

#: What a CSV file's timestamps may mark in their interval.
LABELS = (("start", "the start of each interval"), ("end", "the end of each interval"),
          ("centre", "the centre of each interval"))

NONE_TEXT = "(not in the file)"
OWN_OFFSET_TEXT = "(each timestamp carries its UTC offset)"

#: Header words that suggest a column, by our name (a first guess the user checks).
_HINTS = {
    "timestamp": ("timestamp", "datetime", "date_time", "time", "date"),
    "ghi": ("ghi", "global"),
    "dni": ("dni", "direct", "beam"),
    "dhi": ("dhi", "diffuse"),
    "temp_air": ("temp_air", "tamb", "t_air", "temperature", "temp", "dry"),
    "wind_speed": ("wind_speed", "windspeed", "wind", "ws"),
}


# -- worker side (no Qt) ------------------------------------------------------------

@dataclass(frozen=True)
class CsvHeader:
    """A CSV file that needs a column mapping: its header and a first guess."""

    path: Path
    columns: tuple
    guess: dict = field(default_factory=dict)


@dataclass(frozen=True)
class LoadFailure:
    """A file that could not be used: the importer's message and line (1-based) if known."""

    message: str
    line: int | None = None


@dataclass(frozen=True)
class Loaded:
    """A weather series read and checked against the site's year."""

    path: Path
    weather: WeatherData


def guess_columns(header) -> dict:
    """Our column names to header names, by common words in the header (a guess to check)."""
    low = {c: c.strip().lower() for c in header}
    out = {}
    for key, words in _HINTS.items():
        for word in words:
            hit = next((c for c, lc in low.items() if c not in out.values()
                        and (lc == word or lc.startswith(word + " ") or lc.startswith(word + "_")
                             or lc.startswith(word + "(") or word in lc.split())), None)
            if hit is None and len(word) > 3:
                hit = next((c for c, lc in low.items() if c not in out.values() and word in lc),
                           None)
            if hit is not None:
                out[key] = hit
                break
    return out


def read_header(path: Path) -> tuple:
    """The column names on the first line of a CSV file."""
    try:
        with open(path, newline="", encoding="utf-8-sig") as handle:
            row = next(csv.reader(handle), [])
    except (OSError, UnicodeDecodeError) as exc:
        raise WeatherImportError(path.name, None, f"cannot read: {exc}") from exc
    names = tuple(c.strip() for c in row if c.strip())
    if not names:
        raise WeatherImportError(path.name, 1, "the first line holds no column names")
    return names


def read_weather_for_site(path, site: Site, columns: dict | None = None,
                          timestamp_label: str | None = None, timezone: str | None = None):
    """Read a weather file for ``site`` and check it can serve as the year's sky.

    Returns :class:`Loaded`, :class:`CsvHeader` (a CSV file read without a
    column mapping) or :class:`LoadFailure`; nothing is raised for a bad
    file, so the dialog can show the message where the user is looking.
    """
    p = Path(path)
    try:
        weather = load_weather_for_site(p, site, columns=columns,
                                        timestamp_label=timestamp_label, timezone=timezone)
    except WeatherImportError as exc:
        if columns is None and "not a TMY3, TMY2 or EPW file" in exc.reason:
            try:
                header = read_header(p)
            except WeatherImportError as inner:
                return LoadFailure(str(inner), inner.line)
            return CsvHeader(p, header, guess_columns(header))
        return LoadFailure(str(exc), exc.line)
    except WeatherOptionError as exc:
        return LoadFailure(f"{p.name}: {exc}")
    except (OSError, ValueError) as exc:
        return LoadFailure(f"{p.name}: {exc}")
    if weather.step_min not in STEPS_MIN:
        return LoadFailure(f"{weather.source}: {weather.step_min}-minute intervals; the year "
                           f"is computed on intervals of {', '.join(map(str, STEPS_MIN))} "
                           "minutes: resample the file")
    try:  # the checks that come with placing the data on the year's intervals
        sky_year(site, IrradianceOptions(sky="file", weather=weather,
                                         step_min=weather.step_min))
    except ValueError as exc:
        return LoadFailure(f"read, but it cannot serve as this site's year: {exc}")
    return Loaded(p, weather)


def finding_text(f) -> str:
    where = f"line {f.line}: " if f.line is not None else ""
    return f"{f.severity}: {where}{f.message}"


def summary_text(weather: WeatherData) -> str:
    """One line on a loaded weather series: source, interval, labelling, zone, findings."""
    n = len(weather.findings)
    warn = sum(1 for f in weather.findings if f.severity != "info")
    found = (f"{n} finding{'s' if n != 1 else ''}" + (f", {warn} to look at" if warn else "")
             if n else "no findings")
    return (f"{weather.source}: {len(weather.data)} intervals of {weather.step_min} min, "
            f"timestamps at the interval {weather.timestamp_label}, "
            f"time zone {weather.timezone or 'from the file'}; {found}")


# -- the dialog -----------------------------------------------------------------------

class WeatherDialog(QDialog):
    """Choose a weather file for the sky basis.

    ``ctx.set_sky(sky="file", weather_path=..., weather=...)`` happens only on
    "Use this weather" after a successful read.
    """

    CHANNEL = "weather import"

    def __init__(self, ctx, parent=None, path: str | None = None):
        super().__init__(parent)
        self.ctx = ctx
        self.setWindowTitle("Weather file")
        self.setMinimumWidth(620)
        self.resize(700, 620)
        self._loaded: Loaded | None = None
        self._header: CsvHeader | None = None
        self._busy = False
        lay = QVBoxLayout(self)

        head = QLabel("Weather file for the sky basis")
        head.setProperty("role", "heading")
        lay.addWidget(head)
        hint = QLabel("TMY3, TMY2 and EPW files are read as they are. Any other CSV file needs "
                      "its columns named: one timestamp column and at least the GHI. One year "
                      "of data (or a typical year) is placed on the site's year.")
        hint.setProperty("role", "muted")
        hint.setWordWrap(True)
        lay.addWidget(hint)

        row = QHBoxLayout()
        self.path_edit = QLineEdit(path or "")
        self.path_edit.setPlaceholderText("path of a .csv, .epw or .tm2 file")
        self.path_edit.textEdited.connect(self._path_edited)
        browse = QPushButton("Browse…")
        browse.clicked.connect(self._browse)
        self.read_button = QPushButton("Read file")
        self.read_button.setDefault(True)
        self.read_button.clicked.connect(self.read)
        row.addWidget(self.path_edit, 1)
        row.addWidget(browse)
        row.addWidget(self.read_button)
        lay.addLayout(row)

        # -- the column mapping of a generic CSV file ----------------------------------
        self.mapping = QGroupBox("Columns of this CSV file")
        form = QFormLayout(self.mapping)
        self.column_combos: dict[str, QComboBox] = {}
        for key, text in MAPPED_COLUMNS:
            box = QComboBox()
            self.column_combos[key] = box
            form.addRow(text, box)
        self.label_combo = QComboBox()
        self.label_combo.addItem("— choose —", None)
        for key, text in LABELS:
            self.label_combo.addItem(text, key)
        form.addRow("Each timestamp marks", self.label_combo)
        self.timezone_combo = QComboBox()
        self.timezone_combo.setEditable(True)
        self.timezone_combo.setToolTip("An IANA zone such as Europe/London (with its daylight "
                                       "saving) or a fixed offset such as +01:00")
        form.addRow("Time zone of the timestamps", self.timezone_combo)
        self.mapping.hide()
        lay.addWidget(self.mapping)

        # -- what happened -----------------------------------------------------------
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.status.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        lay.addWidget(self.status)
        self.findings = QListWidget()
        self.findings.setWordWrap(True)
        self.findings.setMinimumHeight(140)
        self.findings.hide()
        lay.addWidget(self.findings, 1)

        self.buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Cancel)
        self.use_button = self.buttons.addButton("Use this weather",
                                                 QDialogButtonBox.ButtonRole.AcceptRole)
        self.use_button.setEnabled(False)
        self.buttons.accepted.connect(self.use)
        self.buttons.rejected.connect(self.reject)
        lay.addWidget(self.buttons)
        ctx.runner.error.connect(self._runner_error)

    # -- state ------------------------------------------------------------------
    @property
    def loaded(self) -> Loaded | None:
        return self._loaded

    @property
    def message(self) -> str:
        return self.status.text()

    def _set_status(self, text: str, error: bool = False) -> None:
        self.status.setText(text)
        self.status.setStyleSheet(f"color: {theme.ERROR};" if error else "")

    def _path_edited(self, _text: str) -> None:
        self._loaded = None
        self._header = None
        self.use_button.setEnabled(False)
        self.mapping.hide()
        self.findings.hide()
        self._set_status("")

    def _browse(self) -> None:
        start = self.path_edit.text() or str(Path.home())
        path, _ = QFileDialog.getOpenFileName(self, "Weather file", start, FILE_FILTER)
        if path:
            self.path_edit.setText(path)
            self._path_edited(path)
            self.read()

    # -- mapping -----------------------------------------------------------------
    def _show_mapping(self, header: CsvHeader) -> None:
        self._header = header
        for key, box in self.column_combos.items():
            box.clear()
            if key != "timestamp":
                box.addItem(NONE_TEXT, None)
            for name in header.columns:
                box.addItem(name, name)
            guess = header.guess.get(key)
            if guess is not None:
                box.setCurrentIndex(box.findData(guess))
        self.timezone_combo.clear()
        self.timezone_combo.addItem(OWN_OFFSET_TEXT, None)
        site_tz = self.ctx.site.timezone
        for zone in dict.fromkeys((site_tz, "UTC")):
            self.timezone_combo.addItem(zone, zone)
        self.mapping.show()
        self._set_status(f"{header.path.name} is not a TMY3, TMY2 or EPW file: name its columns, "
                         "say what its timestamps mark and their time zone, then Read file.")

    def column_mapping(self) -> dict:
        """The mapping chosen in the form (our name -> the file's column)."""
        out = {}
        for key, box in self.column_combos.items():
            name = box.currentData()
            if name:
                out[key] = name
        return out

    def _timezone(self):
        text = self.timezone_combo.currentText().strip()
        if not text or text == OWN_OFFSET_TEXT:
            return None
        return text

    # -- reading -----------------------------------------------------------------
    def read(self) -> None:
        """Read the file in the worker (with the mapping when the form is shown)."""
        text = self.path_edit.text().strip()
        if not text:
            self._set_status("Choose a file first.", error=True)
            return
        path = Path(text).expanduser()
        if not path.is_file():
            self._set_status(f"{path}: no such file.", error=True)
            return
        site = self.ctx.site
        columns = label = timezone = None
        if self._header is not None and self._header.path == path:
            columns = self.column_mapping()
            label = self.label_combo.currentData()
            if label is None:
                self._set_status("Say what the timestamps mark: the start, end or centre of "
                                 "each interval (the file cannot tell).", error=True)
                return
            timezone = self._timezone()
        self._loaded = None
        self.use_button.setEnabled(False)
        self.findings.hide()
        self._busy = True
        self.read_button.setEnabled(False)
        self._set_status(f"Reading {path.name}…")
        self.ctx.runner.submit(
            self.CHANNEL,
            lambda progress: read_weather_for_site(path, site, columns, label, timezone),
            self._show_result, label="Weather file", debounce_ms=0)

    def _runner_error(self, label: str, message: str, _tb: str) -> None:
        if label == "Weather file" and self._busy:
            self._busy = False
            self.read_button.setEnabled(True)
            self._set_status(f"Could not read the file: {message}", error=True)

    def _show_result(self, result) -> None:
        self._busy = False
        self.read_button.setEnabled(True)
        if isinstance(result, CsvHeader):
            self._show_mapping(result)
            return
        if isinstance(result, LoadFailure):
            self._set_status(f"Could not use the file: {result.message}", error=True)
            return
        self._loaded = result
        weather = result.weather
        self._set_status(summary_text(weather) + ". Check the findings, then use it.")
        self.findings.clear()
        for f in weather.findings:
            item = QListWidgetItem(finding_text(f))
            if f.severity != "info":
                item.setForeground(theme.series_color(1) if f.severity == "warning"
                                   else theme.series_color(6))
            self.findings.addItem(item)
        if not weather.findings:
            self.findings.addItem("The importer noticed nothing to report.")
        self.findings.show()
        self.use_button.setEnabled(True)

    def use(self) -> None:
        """Make the loaded series the app's sky basis and close."""
        if self._loaded is None:
            self._set_status("Read a file first.", error=True)
            return
        self.ctx.set_sky(sky="file", weather_path=self._loaded.path,
                         weather=self._loaded.weather)
        self.accept()

    def done(self, result: int) -> None:  # Qt override: stop listening, drop pending work
        try:
            self.ctx.runner.error.disconnect(self._runner_error)
        except (RuntimeError, TypeError):
            pass
        self.ctx.runner.cancel(self.CHANNEL)
        super().done(result)


__all__ = ["CsvHeader", "LoadFailure", "Loaded", "WeatherDialog", "finding_text",
           "guess_columns", "read_header", "read_weather_for_site", "summary_text"]
