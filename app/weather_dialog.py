"""The weather-file dialog: pick a file, name a CSV file's columns, see what the import found.

TMY3, TMY2 and EPW files say what their columns, timestamps and time zone are,
so they are read as they are. Any other CSV file needs a column mapping: which
column holds the timestamp and which the irradiance, temperature and wind
values, what the timestamps mark in each interval and which time zone they are
in. Reading happens in an engine worker process
(:func:`tiltyard.engine.weather_check.read_weather_for_site`; the header, the
column guess and the texts come from :mod:`tiltyard.engine.weather`); the
dialog holds only widgets. It shows the importer's findings (or its message,
with the line number) and only "Use this weather" changes the app's sky basis.
A file that fails leaves the sky choice and the site as they were.
"""

from __future__ import annotations

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

from tiltyard.engine.assessment import WeatherSource
from tiltyard.engine.weather import (
    LABELS,
    MAPPED_COLUMNS,
    CsvHeader,
    Loaded,
    LoadFailure,
    finding_text,
    summary_text,
)
from tiltyard.engine.weather_check import read_weather_for_site
from tiltyard.engine.words import user_text

from . import theme
from .engine_process import EngineCall

FILE_FILTER = ("Weather files (*.csv *.CSV *.epw *.EPW *.tm2 *.TM2 *.txt);;"
               "All files (*)")

NONE_TEXT = "(not in the file)"
OWN_OFFSET_TEXT = "(each timestamp carries its UTC offset)"


# -- the dialog -----------------------------------------------------------------------

class WeatherDialog(QDialog):
    """Choose a weather file for the sky basis.

    ``ctx.set_settings(sky="file", weather=WeatherSource(...))`` happens only on
    "Use this weather" after a successful read (and, for a file that may not
    belong to the site, a confirmation); the file's path, import settings and
    SHA-256 are then saved with the site.
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
        self.label_combo.addItem("(choose)", None)
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
        self.status.hide()
        self.status.setWordWrap(True)
        self.status.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        lay.addWidget(self.status)
        self.findings = QListWidget()
        self.findings.setWordWrap(True)
        self.findings.setMinimumHeight(140)
        self.findings.hide()
        lay.addWidget(self.findings, 1)
        # the room left over goes under what is shown (not between the rows), until the
        # findings list shows and takes it
        lay.addStretch(1)
        self._filler = lay.count() - 1
        self._layout = lay

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
        self.status.setVisible(bool(text))
        self.status.setStyleSheet(f"color: {theme.ERROR};" if error else "")

    def _show_findings(self, shown: bool) -> None:
        self.findings.setVisible(shown)
        self._layout.setStretch(self._filler, 0 if shown else 1)

    def _path_edited(self, _text: str) -> None:
        self._loaded = None
        self._read_options = (None, None, None)
        self._header = None
        self.use_button.setEnabled(False)
        self.mapping.hide()
        self._show_findings(False)
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
        """Read the file in an engine worker process (with the mapping when the form is shown)."""
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
        self._show_findings(False)
        self._busy = True
        self.read_button.setEnabled(False)
        self._set_status(f"Reading {path.name}…")
        self._read_options = (columns, label, timezone)
        self.ctx.runner.submit_call(
            self.CHANNEL,
            EngineCall(read_weather_for_site, (path, site, columns, label, timezone)),
            self._show_result, label="Weather file", debounce_ms=0)

    def _runner_error(self, label: str, message: str, _tb: str) -> None:
        if label == "Weather file" and self._busy:
            self._busy = False
            self.read_button.setEnabled(True)
            self._set_status(f"Could not read the file: {user_text(message)}", error=True)

    def _show_result(self, result) -> None:
        self._busy = False
        self.read_button.setEnabled(True)
        if isinstance(result, CsvHeader):
            self._show_mapping(result)
            return
        if isinstance(result, LoadFailure):
            self._set_status(f"Could not use the file: {user_text(result.message)}",
                             error=True)
            return
        self._loaded = result
        weather = result.weather
        self._set_status(summary_text(weather) + ". Check the findings, then use it.")
        self.findings.clear()
        for f in weather.findings:
            item = QListWidgetItem(user_text(finding_text(f)))
            if f.severity != "info":
                item.setForeground(theme.series_color(1) if f.severity == "warning"
                                   else theme.series_color(6))
            self.findings.addItem(item)
        if not weather.findings:
            self.findings.addItem("The importer noticed nothing to report.")
        self._show_findings(True)
        self.use_button.setEnabled(True)

    def use(self) -> None:
        """Make the loaded series the app's sky basis and close."""
        if self._loaded is None:
            self._set_status("Read a file first.", error=True)
            return
        loaded = self._loaded
        accept = False
        if loaded.fit_warnings:
            if not self.confirm_fit_warnings(loaded.fit_warnings):
                return
            accept = True
        columns, label, zone = self._read_options
        source = WeatherSource(str(Path(loaded.path).resolve()), tuple((columns or {}).items()),
                               label, zone, loaded.sha256, accept_warnings=accept)
        if self.ctx.set_settings(sky="file", weather=source):
            self.accept()

    @staticmethod
    def fit_warning_text(warnings) -> str:
        """The question asked before using a file that may not belong to the site."""
        return ("\n\n".join(user_text(w) for w in warnings) + "\n\nUse it for this site "
                "anyway? The warning stays on the study and on the feasibility sheet.")

    def confirm_fit_warnings(self, warnings) -> bool:
        """Ask before using a file that may not belong to the site (tests replace this)."""
        from PySide6.QtWidgets import QMessageBox

        box = QMessageBox(QMessageBox.Icon.Warning, "Weather file may not fit the site",
                          self.fit_warning_text(warnings),
                          QMessageBox.StandardButton.Yes | QMessageBox.StandardButton.No, self)
        box.setDefaultButton(QMessageBox.StandardButton.No)
        return box.exec() == QMessageBox.StandardButton.Yes

    def done(self, result: int) -> None:  # Qt override: stop listening, drop pending work
        try:
            self.ctx.runner.error.disconnect(self._runner_error)
        except (RuntimeError, TypeError):
            pass
        self.ctx.runner.cancel(self.CHANNEL)
        super().done(result)


__all__ = ["WeatherDialog"]
