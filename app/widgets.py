"""Small widgets shared by the views: the message banner, the view base class,
validated text fields and a copyable table."""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QGuiApplication, QKeySequence, QShortcut
from PySide6.QtWidgets import (
    QFrame,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QTableView,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from tiltyard.engine.cautions import CAUTION
from tiltyard.engine.site import SiteError
from tiltyard.engine.words import field_message, user_text

#: Delay between showing a view and drawing the result it was kept for, ms: long
#: enough that the view's first paint has an event-loop turn to itself.
SHOWN_SETTLE_MS = 20


class MessageBanner(QFrame):
    """A non-modal message strip above the views; closes on request.

    A message may name its ``owner`` (the task or the edited fields that raised it):
    :meth:`resolve` with that owner takes it away once the cause is fixed, and changing
    view leaves it standing.
    """

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("banner")
        lay = QHBoxLayout(self)
        lay.setContentsMargins(10, 6, 6, 6)
        self.label = QLabel()
        self.label.setWordWrap(True)
        self.label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        close = QToolButton()
        close.setText("×")
        close.setToolTip("Dismiss this message")
        close.clicked.connect(self.hide)
        lay.addWidget(self.label, 1)
        lay.addWidget(close, 0, Qt.AlignmentFlag.AlignTop)
        self.details = ""
        self.owner = ""
        self.hide()

    def show_message(self, level: str, text: str, details: str = "", owner: str = "") -> None:
        self.setProperty("level", level)
        self.style().unpolish(self)
        self.style().polish(self)
        prefix = {"error": "Problem: ", "warning": "Note: ", "info": ""}.get(level, "")
        self.label.setText(prefix + user_text(text))
        self.details = details
        self.setToolTip(details[-2000:] if details else "")
        self.owner = owner
        self.show()

    def resolve(self, owner: str) -> None:
        """The cause named ``owner`` is fixed: its message goes, any other stays."""
        if owner and self.owner == owner and self.isVisible():
            self.hide()

    @property
    def level(self) -> str:
        return str(self.property("level") or "")

    @property
    def text(self) -> str:
        return self.label.text()


class CautionLabel(QLabel):
    """The standing caution shown under every figure that could be built on."""

    def __init__(self, parent=None):
        super().__init__(CAUTION, parent)
        self.setProperty("role", "caution")
        self.setWordWrap(True)


class View(QWidget):
    """Base of the six views. Subclasses compute through ``ctx.runner`` only.

    A view is told about a new site through :meth:`site_changed`; it recomputes
    at once when visible and marks itself stale otherwise, catching up in
    :meth:`activated`.
    """

    title = "View"

    def __init__(self, ctx, parent=None):
        super().__init__(parent)
        self.ctx = ctx
        self._stale = True
        self._deferred: dict[str, list] = {}
        ctx.document.site_changed.connect(self._on_site_changed)
        ctx.document.settings_changed.connect(lambda _a: self.mark_stale())

    def hasHeightForWidth(self) -> bool:  # noqa: N802 - Qt override
        # the window holds each view in a scroll area, which would scroll to the
        # preferred height for the width (every wrapped line at its ease); the view
        # scrolls only below its minimum size, and its layout shares out what is left
        return False

    def heightForWidth(self, _width: int) -> int:  # noqa: N802 - Qt override
        return self.minimumSizeHint().height()      # the scroll area asks the layout

    def draw_in_stages(self, owner: str, steps) -> None:
        """Draw a result through the runner's ``run_in_stages``, now if the view is
        visible, else once it is next shown.

        Drawing into a hidden view would pile up repaints that all fall due in
        the turn the view is shown; instead the view is shown as it was, and the
        newest result kept for it is drawn over the following turns.
        """
        steps = [*steps, self.cache_chart_items]
        if self.isVisible():
            self._deferred.pop(owner, None)
            self.ctx.runner.run_in_stages(owner, steps)
        else:
            self._deferred[owner] = steps
            self.ctx.runner.run_in_stages(owner, ())    # abandon an older drawing

    def cache_chart_items(self) -> None:
        """Keep each drawn curve, bar set, image and marker set of this view's charts as
        a device pixmap that Qt reuses until the item changes.

        Stroking wide antialiased curves is most of what a chart costs to repaint, and
        a view repaints all of its charts whenever it is shown again; text items keep
        no cache (they follow the view's scale).
        """
        import pyqtgraph as pg
        from PySide6.QtWidgets import QGraphicsItem

        kinds = (pg.PlotCurveItem, pg.IsocurveItem, pg.BarGraphItem, pg.ImageItem,
                 pg.ScatterPlotItem)
        cached = QGraphicsItem.CacheMode.DeviceCoordinateCache
        for view in self.findChildren(pg.GraphicsView):
            for item in view.scene().items():
                if isinstance(item, kinds) and item.cacheMode() != cached:
                    item.setCacheMode(cached)

    def showEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().showEvent(event)
        for owner, steps in list(self._deferred.items()):
            def start(owner=owner, steps=steps) -> None:
                # only if no newer result has been drawn or kept meanwhile
                if self._deferred.get(owner) is steps:
                    del self._deferred[owner]
                    self.ctx.runner.run_in_stages(owner, steps)
            QTimer.singleShot(SHOWN_SETTLE_MS, start)   # after the view's first paint

    def _on_site_changed(self, site) -> None:
        self._stale = True
        if self.isVisible():
            self.refresh()

    def mark_stale(self) -> None:
        self._stale = True
        if self.isVisible():
            self.refresh()

    def activated(self) -> None:
        if self._stale:
            self.refresh()

    def refresh(self) -> None:
        """Start the computations this view shows (results arrive asynchronously)."""
        self._stale = False

    def channel(self, name: str = "") -> str:
        return f"{self.title}:{name}" if name else self.title


class ValidatedField(QWidget):
    """A line edit with its message beside it.

    ``parse(text)`` returns a value or raises SiteError/ValueError. The message
    shows as soon as the text is invalid; a valid value is emitted as
    ``accepted(value)`` once typing pauses (``COMMIT_MS``) or the field loses
    focus, so the half-typed "9" of "95" never reaches the site. An invalid
    text emits nothing: the last good value stays everywhere.
    """

    accepted = Signal(object)
    COMMIT_MS = 300

    def __init__(self, parse: Callable[[str], object], placeholder: str = "",
                 unit: str = "", parent=None):
        super().__init__(parent)
        self._parse = parse
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(1)
        row = QHBoxLayout()
        row.setContentsMargins(0, 0, 0, 0)
        self.edit = QLineEdit()
        self.edit.setPlaceholderText(placeholder)
        row.addWidget(self.edit, 1)
        if unit:
            u = QLabel(unit)
            u.setProperty("role", "muted")
            u.setMinimumWidth(28)
            row.addWidget(u)
        lay.addLayout(row)
        self.error = QLabel()
        self.error.setProperty("role", "fieldError")
        self.error.setWordWrap(True)
        self.error.hide()
        lay.addWidget(self.error)
        self._pending = False
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(self.COMMIT_MS)
        self._timer.timeout.connect(self.commit)
        self.edit.textEdited.connect(self._on_edit)
        self.edit.editingFinished.connect(self.commit)

    def _check(self, text: str):
        try:
            value = self._parse(text)
        except (SiteError, ValueError) as exc:
            self.set_error(_reason(exc))
            return None, False
        self.set_error("")
        return value, True

    def _on_edit(self, text: str) -> None:
        _, ok = self._check(text)
        self._pending = ok
        if ok:
            self._timer.start()
        else:
            self._timer.stop()

    def commit(self) -> None:
        """Emit the typed value now if it is valid (pending edits only)."""
        if not self._pending:
            return
        self._pending = False
        self._timer.stop()
        value, ok = self._check(self.edit.text())
        if ok:
            self.accepted.emit(value)

    def set_error(self, message: str) -> None:
        self.error.setText(message)
        self.error.setVisible(bool(message))
        self.edit.setProperty("invalid", bool(message))
        self.edit.style().unpolish(self.edit)
        self.edit.style().polish(self.edit)

    def clear(self) -> None:
        """Empty the field, its message and any commit still pending (a form that
        took the value: Enter within ``COMMIT_MS`` of the last key must not leave the
        pending commit to re-check the emptied field)."""
        self._pending = False
        self._timer.stop()
        self.edit.clear()
        self.set_error("")

    def set_text(self, text: str) -> None:
        """Show a value coming from the site (no signal)."""
        if self.edit.text() != text and not self.edit.hasFocus():
            self.edit.setText(text)
            self.set_error("")

    @property
    def message(self) -> str:
        return self.error.text()


def _reason(exc: Exception) -> str:
    if isinstance(exc, SiteError):
        return field_message(exc.value, exc.reason, exc.field)
    return str(exc)


class WholeLabel(QLabel):
    """A word-wrapped label that always has the height its text needs at its width.

    A layout short of height gives a wrapped label no more than its minimum size hint
    (about two lines) and cuts the rest; this label raises its minimum height to what
    its text needs, so a short window scrolls the view instead.
    """

    def __init__(self, text: str = "", parent=None):
        super().__init__(text, parent)
        self.setWordWrap(True)
        # given more height than its text needs, the text stays at the top
        self.setAlignment(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignTop)

    def setText(self, text: str) -> None:  # noqa: N802 - Qt override
        super().setText(text)
        self._fit()

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt override
        super().resizeEvent(event)
        self._fit()

    def _fit(self) -> None:
        if self.width() <= 0:
            return
        need = self.heightForWidth(self.width()) if self.text() else 0
        if need >= 0 and need != self.minimumHeight():
            self.setMinimumHeight(need)


def wrapping(label: QLabel, lines: int = 0) -> QLabel:
    """Let a label wrap instead of setting its row's minimum width (a laptop screen),
    keeping room for ``lines`` lines when given, so a readout whose text changes as the
    pointer moves does not move what sits under it."""
    label.setWordWrap(True)
    if lines:
        label.setMinimumHeight(lines * label.fontMetrics().lineSpacing() + 2)
    return label


class CopyableTable(QTableView):
    """A table view whose selection (or everything) copies as tab-separated text."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setSortingEnabled(True)
        self.setAlternatingRowColors(True)
        self.setSelectionBehavior(QTableView.SelectionBehavior.SelectRows)
        self.verticalHeader().setVisible(False)
        sc = QShortcut(QKeySequence.StandardKey.Copy, self)
        sc.activated.connect(self.copy_to_clipboard)

    def as_tsv(self, selected_only: bool = False) -> str:
        model = self.model()
        if model is None:
            return ""
        rows = range(model.rowCount())
        if selected_only and self.selectionModel() is not None:
            picked = sorted({i.row() for i in self.selectionModel().selectedIndexes()})
            if picked:
                rows = picked
        cols = [c for c in range(model.columnCount()) if not self.isColumnHidden(c)]
        head = [str(model.headerData(c, Qt.Orientation.Horizontal)) for c in cols]
        lines = ["\t".join(head)]
        for r in rows:
            lines.append("\t".join(str(model.index(r, c).data() or "") for c in cols))
        return "\n".join(lines) + "\n"

    def copy_to_clipboard(self) -> str:
        text = self.as_tsv(selected_only=True)
        QGuiApplication.clipboard().setText(text)
        return text
