"""Site view: name, coordinates, elevation, time zone, ground albedo, planes, monthly GHI."""

from __future__ import annotations

import math
import zoneinfo
from datetime import datetime

from PySide6.QtCore import Qt
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QCompleter,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QListWidget,
    QPlainTextEdit,
    QPushButton,
    QScrollArea,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.site import ALBEDO_PRESETS, Plane, SiteError, parse_coordinate
from tiltyard.engine.words import MONTH_ABBR, MOUNTING_WORDS, azimuth, field_message, figure

from .. import places
from ..widgets import ValidatedField, View


def _number(text: str, field: str, lo: float, hi: float, unit: str) -> float:
    try:
        value = float(text.strip().replace(",", "."))
    except ValueError:
        raise SiteError(field, text, "is not a number") from None
    if not math.isfinite(value) or not lo <= value <= hi:
        u = "°" if unit == "°" else (f" {unit}" if unit else "")
        raise SiteError(field, text, f"must be between {figure(lo)}{u} and {figure(hi)}{u}")
    return value


def _fmt(v: float, digits: int = 5) -> str:
    return f"{v:.{digits}f}".rstrip("0").rstrip(".") if v != 0 else "0"


def _dms(value: float, axis: str) -> str:
    letter = ("N" if value >= 0 else "S") if axis == "latitude" else ("E" if value >= 0 else "W")
    a = abs(value)
    d = int(a)
    m = int((a - d) * 60)
    s = (a - d - m / 60) * 3600
    return f"{d}°{m:02d}′{s:04.1f}″ {letter}"


class SiteView(View):
    title = "Site"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        self._updating = False
        scroll = QScrollArea(self)
        scroll.setWidgetResizable(True)
        inner = QWidget()
        scroll.setWidget(inner)
        outer = QVBoxLayout(self)
        outer.setContentsMargins(0, 0, 0, 0)
        outer.addWidget(scroll)
        grid = QGridLayout(inner)
        grid.setContentsMargins(18, 12, 18, 12)
        grid.setHorizontalSpacing(18)
        head = QLabel("Site")
        head.setProperty("role", "heading")
        grid.addWidget(head, 0, 0, 1, 2)

        # -- place --------------------------------------------------------------
        place = QGroupBox("Place")
        form = QFormLayout(place)
        self.name = ValidatedField(self._parse_name, "a name the client will recognise")
        self.name.accepted.connect(lambda v: self._propose(name=v))
        form.addRow("Name", self.name)
        find_row = QWidget()
        fl = QVBoxLayout(find_row)
        fl.setContentsMargins(0, 0, 0, 0)
        self.find = QLineEdit()
        self.find.setPlaceholderText("type a town or city (offline list), then pick a result")
        self.find_results = QListWidget()
        self.find_results.setMaximumHeight(110)
        self.find_results.hide()
        fl.addWidget(self.find)
        fl.addWidget(self.find_results)
        form.addRow("Find a place", find_row)
        self.find.textEdited.connect(self._search)
        self.find_results.itemActivated.connect(self._pick_place)
        self.find_results.itemClicked.connect(self._pick_place)
        self._places = []

        self.latitude = ValidatedField(lambda t: parse_coordinate(t, "latitude"),
                                       "53.71 or 53°42′36″N", "°")
        self.longitude = ValidatedField(lambda t: parse_coordinate(t, "longitude"),
                                        "-2.48 or 2°28′48″W", "°")
        self.latitude.accepted.connect(lambda v: self._propose_coords(latitude_deg=v))
        self.longitude.accepted.connect(lambda v: self._propose_coords(longitude_deg=v))
        self.coords_note = QLabel()
        self.coords_note.setProperty("role", "muted")
        form.addRow("Latitude (north +)", self.latitude)
        form.addRow("Longitude (east +)", self.longitude)
        form.addRow("", self.coords_note)
        self.elevation = ValidatedField(
            lambda t: _number(t, "Elevation", -500, 9000, "m"), "above sea level", "m")
        self.elevation.accepted.connect(lambda v: self._propose(elevation_m=v))
        form.addRow("Elevation", self.elevation)

        tz_row = QWidget()
        tl = QVBoxLayout(tz_row)
        tl.setContentsMargins(0, 0, 0, 0)
        self.timezone = QComboBox()
        self.timezone.setEditable(True)
        zones = sorted(zoneinfo.available_timezones())
        self.timezone.addItems(zones)
        comp = QCompleter(zones, self.timezone)
        comp.setCaseSensitivity(Qt.CaseSensitivity.CaseInsensitive)
        comp.setFilterMode(Qt.MatchFlag.MatchContains)
        self.timezone.setCompleter(comp)
        self.timezone.lineEdit().editingFinished.connect(self._timezone_typed)
        self.timezone.activated.connect(lambda _i: self._timezone_typed())
        self.tz_follow = QCheckBox("set from the coordinates")
        self.tz_follow.setChecked(True)
        self.tz_follow.setToolTip("Look the IANA time zone up from the coordinates "
                                  "(offline zone boundaries); untick to choose it yourself")
        self.tz_error = QLabel()
        self.tz_error.setProperty("role", "fieldError")
        self.tz_error.hide()
        self.tz_note = QLabel()
        self.tz_note.setProperty("role", "muted")
        tl.addWidget(self.timezone)
        tl.addWidget(self.tz_follow)
        tl.addWidget(self.tz_error)
        tl.addWidget(self.tz_note)
        form.addRow("Time zone", tz_row)

        # -- ground -------------------------------------------------------------
        ground = QGroupBox("Ground reflectance (albedo)")
        gl = QVBoxLayout(ground)
        row = QHBoxLayout()
        self.albedo_preset = QComboBox()
        self.albedo_preset.addItem("custom value", None)
        for k, v in ALBEDO_PRESETS.items():
            self.albedo_preset.addItem(f"{k} ({v:.2f})", v)
        self.albedo_preset.activated.connect(self._preset_picked)
        self.albedo = ValidatedField(lambda t: _number(t, "Albedo", 0, 1, ""), "0 to 1")
        self.albedo.accepted.connect(lambda v: self._propose(albedo=v))
        row.addWidget(self.albedo_preset)
        row.addWidget(self.albedo, 1)
        gl.addLayout(row)
        src = QLabel("Presets from pvlib's surface albedo table (Marion 2021; Myers 2013).")
        src.setProperty("role", "muted")
        src.setWordWrap(True)
        gl.addWidget(src)
        self.albedo_monthly = QCheckBox("different value each month (snow cover)")
        self.albedo_monthly.toggled.connect(self._albedo_mode)
        gl.addWidget(self.albedo_monthly)
        self.albedo_months = self._twelve_fields(
            lambda t: _number(t, "albedo", 0, 1, ""), self._monthly_albedo_edited)
        gl.addWidget(self.albedo_months["widget"])
        gl.addStretch(1)        # beside a taller group the space goes below, not between

        # -- planes -------------------------------------------------------------
        planes = QGroupBox("Existing planes (roof slopes as they are)")
        pl = QVBoxLayout(planes)
        self.planes = QTableWidget(0, 4)
        self.planes.setHorizontalHeaderLabels(["Label", "Tilt (°)", "Azimuth (°)", "Panels"])
        self.planes.horizontalHeaderItem(2).setToolTip("Degrees clockwise from true north "
                                                       "(south = 180°)")
        self.planes.horizontalHeader().setStretchLastSection(True)
        for col, width in enumerate((170, 60, 90)):
            self.planes.setColumnWidth(col, width)
        self.planes.verticalHeader().setVisible(False)
        self.planes.setMinimumHeight(120)
        self.planes.itemChanged.connect(self._planes_edited)
        pl.addWidget(self.planes)
        brow = QHBoxLayout()
        add = QPushButton("Add plane")
        add.clicked.connect(self._add_plane)
        rem = QPushButton("Remove selected")
        rem.clicked.connect(self._remove_plane)
        brow.addWidget(add)
        brow.addWidget(rem)
        brow.addStretch(1)
        pl.addLayout(brow)
        self.planes_error = QLabel()
        self.planes_error.setProperty("role", "fieldError")
        self.planes_error.setWordWrap(True)
        self.planes_error.hide()
        pl.addWidget(self.planes_error)
        hint = QLabel("Tilt 0° is flat, 90° vertical. Azimuth is the direction the plane faces, "
                      "clockwise from true north (south = 180°).")
        hint.setProperty("role", "muted")
        hint.setWordWrap(True)
        pl.addWidget(hint)

        # -- monthly GHI --------------------------------------------------------
        ghi = QGroupBox("Monthly mean daily global horizontal irradiation")
        ml = QVBoxLayout(ghi)
        self.ghi_use = QCheckBox("use values from a local meteorological table (kWh/m²/day)")
        self.ghi_use.toggled.connect(self._ghi_mode)
        ml.addWidget(self.ghi_use)
        self.ghi_months = self._twelve_fields(
            lambda t: _number(t, "monthly_ghi_kwh_m2_day", 0, 12, "kWh/m²/day"),
            self._monthly_ghi_edited)
        ml.addWidget(self.ghi_months["widget"])
        note = QLabel("Used by the ‘monthly values’ sky basis in Irradiance and Tilt study.")
        note.setProperty("role", "muted")
        note.setWordWrap(True)
        ml.addWidget(note)

        notes = QGroupBox("Notes")
        nl = QVBoxLayout(notes)
        self.notes = QPlainTextEdit()
        self.notes.setMaximumHeight(80)
        self.notes.textChanged.connect(self._notes_edited)
        nl.addWidget(self.notes)

        client = QGroupBox("Prepared for (printed on the feasibility sheet)")
        cl = QFormLayout(client)
        self.client_fields = {}
        for key, label, hint in (("client", "Client", "the client's name"),
                                 ("address", "Site address", "where the site is"),
                                 ("reference", "Reference", "your job or quote number")):
            e = QLineEdit()
            e.setPlaceholderText(hint + " (left blank: not printed)")
            e.editingFinished.connect(lambda key=key, e=e: self._client_edited(key, e.text()))
            cl.addRow(label, e)
            self.client_fields[key] = e
        self._grid = grid
        self._columns = (place, ground), (planes, ghi), (notes, client)
        self._two_columns = None
        self._arrange(True)
        self.show_site(ctx.site)

    # -- layout -------------------------------------------------------------
    def _arrange(self, two: bool) -> None:
        """The groups in two columns, or one under the other when the view is too narrow
        for two (a small laptop screen), so no form column is cut off."""
        if two == self._two_columns:
            return
        self._two_columns = two
        grid = self._grid
        (place, ground), (planes, ghi), (notes, client) = self._columns
        for w in (place, ground, planes, ghi, notes, client):
            grid.removeWidget(w)
        if two:
            cells = ((place, 1, 0, 1), (ground, 2, 0, 1), (planes, 1, 1, 1), (ghi, 2, 1, 1),
                     (notes, 3, 0, 2), (client, 4, 0, 2))
        else:
            cells = tuple((w, row, 0, 2) for row, w in
                          enumerate((place, ground, planes, ghi, notes, client), start=1))
        for w, row, col, span in cells:
            grid.addWidget(w, row, col, 1, span)
        for row in range(1, 8):
            grid.setRowStretch(row, 0)
        grid.setRowStretch(len(cells) + 1 if not two else 5, 1)
        grid.setColumnStretch(0, 1)
        grid.setColumnStretch(1, 1 if two else 0)

    def two_column_width(self) -> int:
        """The narrowest view that shows the groups side by side."""
        (place, ground), (planes, ghi), _ = self._columns
        left = max(place.minimumSizeHint().width(), ground.minimumSizeHint().width())
        right = max(planes.minimumSizeHint().width(), ghi.minimumSizeHint().width(), 380)
        return left + right + 18 * 3 + 20      # margins, spacing and a scroll bar

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().resizeEvent(event)
        self._arrange(event.size().width() >= self.two_column_width())

    # -- helpers ------------------------------------------------------------
    def _twelve_fields(self, parse, on_edit):
        w = QWidget()
        g = QGridLayout(w)
        g.setContentsMargins(0, 0, 0, 0)
        g.setHorizontalSpacing(6)
        edits = []
        for i, m in enumerate(MONTH_ABBR):
            lab = QLabel(m)
            lab.setAlignment(Qt.AlignmentFlag.AlignCenter)
            e = QLineEdit()
            e.setMaximumWidth(64)
            e.setAlignment(Qt.AlignmentFlag.AlignRight)
            e.textEdited.connect(lambda _t: on_edit())
            g.addWidget(lab, (i // 6) * 2, i % 6)
            g.addWidget(e, (i // 6) * 2 + 1, i % 6)
            edits.append(e)
        err = QLabel()
        err.setProperty("role", "fieldError")
        err.setWordWrap(True)
        err.hide()
        g.addWidget(err, 4, 0, 1, 6)
        return {"widget": w, "edits": edits, "parse": parse, "error": err}

    def _read_twelve(self, group):
        values = []
        for m, e in zip(MONTH_ABBR, group["edits"], strict=True):
            try:
                values.append(group["parse"](e.text()))
            except SiteError as exc:
                group["error"].setText(f"{m}: {exc.value!r} {exc.reason}")
                group["error"].show()
                return None
        group["error"].hide()
        return tuple(values)

    def _propose(self, **changes) -> bool:
        if self._updating:
            return False
        return self.ctx.propose(**changes)

    @staticmethod
    def _parse_name(text: str) -> str:
        if not text.strip():
            raise SiteError("name", text, "must not be empty")
        if len(text) > 200:
            raise SiteError("name", text[:20] + "…", "must be at most 200 characters")
        return text.strip()

    # -- place search and time zone -------------------------------------------
    def _search(self, text: str) -> None:
        if len(text.strip()) < 2:
            self.find_results.hide()
            return
        self.ctx.runner.submit("place search", lambda progress: places.search_places(text),
                               self._show_places, label="Place search")

    def _show_places(self, found) -> None:
        self._places = list(found)
        self.find_results.clear()
        if not found:
            self.find_results.addItem("no place of 15,000 people or more by that name")
        for p in found:
            self.find_results.addItem(p.label)
        self.find_results.show()

    def _pick_place(self, item) -> None:
        row = self.find_results.row(item)
        if not 0 <= row < len(self._places):
            return
        p = self._places[row]
        changes = {"latitude_deg": round(p.latitude_deg, 5),
                   "longitude_deg": round(p.longitude_deg, 5), "timezone": p.timezone}
        if self.ctx.site.name in ("New site", ""):
            changes["name"] = p.name
        self._propose(**changes)
        self.find_results.hide()
        self.find.clear()

    def _propose_coords(self, **changes) -> None:
        if not self._propose(**changes):
            return
        if self.tz_follow.isChecked():
            lat, lon = self.ctx.site.latitude_deg, self.ctx.site.longitude_deg
            self.ctx.runner.submit("timezone", lambda progress: places.timezone_at(lat, lon),
                                   self._timezone_found, label="Time zone lookup")

    def _timezone_found(self, name) -> None:
        if name and name != self.ctx.site.timezone:
            self._propose(timezone=name)

    def _timezone_typed(self) -> None:
        text = self.timezone.currentText().strip()
        if text == self.ctx.site.timezone:
            return
        err = self.ctx.document.propose(timezone=text)
        if err is not None:
            self.tz_error.setText(f"{text!r}: {err.reason}")
            self.tz_error.show()
        else:
            self.tz_error.hide()
            self.tz_follow.setChecked(False)

    # -- ground -------------------------------------------------------------
    def _preset_picked(self, index: int) -> None:
        value = self.albedo_preset.itemData(index)
        if value is not None:
            self.albedo_monthly.setChecked(False)
            self._propose(albedo=float(value))

    def _albedo_mode(self, monthly: bool) -> None:
        self.albedo_months["widget"].setVisible(monthly)
        self.albedo.setEnabled(not monthly)
        self.albedo_preset.setEnabled(not monthly)
        if self._updating:
            return
        a = self.ctx.site.albedo
        if monthly and not isinstance(a, tuple):
            for e in self.albedo_months["edits"]:
                e.setText(_fmt(a, 3))
            self._propose(albedo=(float(a),) * 12)
        elif not monthly and isinstance(a, tuple):
            self._propose(albedo=float(sum(a) / 12))

    def _monthly_albedo_edited(self) -> None:
        values = self._read_twelve(self.albedo_months)
        if values is not None:
            self._propose(albedo=values)

    def _ghi_mode(self, use: bool) -> None:
        self.ghi_months["widget"].setEnabled(use)
        if self._updating:
            return
        if not use:
            self._propose(monthly_ghi_kwh_m2_day=None)
        else:
            self._monthly_ghi_edited()

    def _monthly_ghi_edited(self) -> None:
        if not self.ghi_use.isChecked():
            return
        values = self._read_twelve(self.ghi_months)
        if values is not None:
            self._propose(monthly_ghi_kwh_m2_day=values)

    def _client_edited(self, key: str, text: str) -> None:
        if getattr(self.ctx.site, key) != text.strip():
            self._propose(**{key: text.strip()})

    def _notes_edited(self) -> None:
        self._propose(notes=self.notes.toPlainText())

    # -- planes -------------------------------------------------------------
    def _mounting_box(self, mounting: str) -> QComboBox:
        """How the panels on a plane are held (a roof plane: flush by default)."""
        box = QComboBox()
        for key, text in MOUNTING_WORDS.items():
            box.addItem(text, key)
        box.setCurrentIndex(max(0, box.findData(mounting)))
        box.setToolTip("Flush: panels lie on this roof plane as it is. A rack or rows: the "
                       "plane is a frame's tilt and direction.")
        box.currentIndexChanged.connect(lambda _i: self._planes_edited(None))
        return box

    def _add_plane(self) -> None:
        site = self.ctx.site
        n = len(site.planes) + 1
        new = Plane(f"plane {n}", round(abs(site.latitude_deg)) if abs(site.latitude_deg) <= 90
                    else 30.0, site.equator_azimuth_deg)
        self._propose(planes=site.planes + (new,))

    def _remove_plane(self) -> None:
        rows = sorted({i.row() for i in self.planes.selectedIndexes()}, reverse=True)
        if not rows:
            return
        planes = list(self.ctx.site.planes)
        for r in rows:
            if r < len(planes):
                planes.pop(r)
        self._propose(planes=tuple(planes))

    def _planes_edited(self, _item) -> None:
        if self._updating:
            return
        planes = []
        for r in range(self.planes.rowCount()):
            cells = [self.planes.item(r, c) for c in range(3)]
            texts = [c.text() if c is not None else "" for c in cells]
            try:
                tilt = _number(texts[1], "Tilt", 0, 90, "°")
                az = _number(texts[2], "Azimuth", 0, 360, "°")
                box = self.planes.cellWidget(r, 3)
                mounting = box.currentData() if box is not None else "flush"
                planes.append(Plane(texts[0].strip() or f"plane {r + 1}", tilt, az, mounting))
            except (SiteError, ValueError) as exc:
                said = (field_message(exc.value, exc.reason, exc.field)
                        if isinstance(exc, SiteError) else str(exc))
                self.planes_error.setText(f"Row {r + 1}: {said}")
                self.planes_error.show()
                for c in cells:
                    if c is not None:
                        c.setBackground(QColor("#fdf3f2"))
                return
        self.planes_error.hide()
        self._propose(planes=tuple(planes))

    # -- show the site --------------------------------------------------------
    def _on_site_changed(self, site) -> None:
        self.show_site(site)

    def show_site(self, site) -> None:
        self._updating = True
        try:
            self.name.set_text(site.name)
            self.latitude.set_text(_fmt(site.latitude_deg))
            self.longitude.set_text(_fmt(site.longitude_deg))
            self.coords_note.setText(f"{_dms(site.latitude_deg, 'latitude')}, "
                                     f"{_dms(site.longitude_deg, 'longitude')} · equator-facing "
                                     f"azimuth {azimuth(site.equator_azimuth_deg)}")
            self.elevation.set_text(_fmt(site.elevation_m, 1))
            if not self.timezone.lineEdit().hasFocus():
                self.timezone.setCurrentText(site.timezone)
            self.tz_error.hide()
            now = datetime.now(zoneinfo.ZoneInfo(site.timezone))
            jan = datetime(now.year, 1, 15, 12, tzinfo=zoneinfo.ZoneInfo(site.timezone))
            jul = datetime(now.year, 7, 15, 12, tzinfo=zoneinfo.ZoneInfo(site.timezone))
            offs = sorted({jan.strftime("UTC%z"), jul.strftime("UTC%z")})
            self.tz_note.setText("offset " + " / ".join(o[:-2] + ":" + o[-2:] for o in offs)
                                 + (" (daylight saving)" if len(offs) > 1 else ""))
            monthly = isinstance(site.albedo, tuple)
            self.albedo_monthly.setChecked(monthly)
            self.albedo_months["widget"].setVisible(monthly)
            if monthly:
                for e, v in zip(self.albedo_months["edits"], site.albedo, strict=True):
                    if not e.hasFocus():
                        e.setText(_fmt(v, 3))
            else:
                self.albedo.set_text(_fmt(site.albedo, 3))
                idx = next((i for i in range(1, self.albedo_preset.count())
                            if abs(self.albedo_preset.itemData(i) - site.albedo) < 1e-9), 0)
                self.albedo_preset.setCurrentIndex(idx)
            use = site.monthly_ghi_kwh_m2_day is not None
            self.ghi_use.setChecked(use)
            self.ghi_months["widget"].setEnabled(use)
            values = site.monthly_ghi_kwh_m2_day if use else ("",) * 12
            for e, v in zip(self.ghi_months["edits"], values, strict=True):
                if not e.hasFocus() or not use:     # another site's values never linger
                    e.setText(_fmt(v, 2) if use else "")
            if self.notes.toPlainText() != site.notes:
                self.notes.setPlainText(site.notes)
            for key, e in self.client_fields.items():
                if not e.hasFocus():
                    e.setText(getattr(site, key))
            if not self.planes.hasFocus():
                self.planes.setRowCount(len(site.planes))
                for r, p in enumerate(site.planes):
                    for c, text in enumerate((p.label, _fmt(p.tilt_deg, 2),
                                              _fmt(p.azimuth_deg, 2))):
                        self.planes.setItem(r, c, QTableWidgetItem(text))
                    self.planes.setCellWidget(r, 3, self._mounting_box(p.mounting))
                self.planes_error.hide()
        finally:
            self._updating = False
