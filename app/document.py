"""The open site: one validated :class:`Assessment`, its file and whether it has unsaved edits.

The document is the whole assessment of one site: the site itself and every
per-site setting (sky basis and weather file, models, study settings,
mounting, rows), saved together in the site file (format 2). Views never hold
their own copy. They read ``document.site`` / ``document.assessment``, propose
a new site with :meth:`SiteDocument.propose` and new settings with
:meth:`SiteDocument.set_settings`; a proposal that fails validation is refused
with the engine's message and the document stays as it was. An accepted site
change emits ``site_changed`` once, a settings change ``settings_changed``;
opening or creating a site replaces **all** of it and emits ``replaced`` (and
``site_changed``), so nothing of the previous site is left behind.
"""

from __future__ import annotations

import os
from pathlib import Path

from PySide6.QtCore import QObject, QStandardPaths, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from tiltyard.engine.assessment import (
    Assessment,
    demo_assessment,
    load_assessment,
    save_assessment,
)
from tiltyard.engine.demo_sites import DEFAULT_DEMO
from tiltyard.engine.site import Site, SiteError

AUTOSAVE_NAME = "autosave-site.json"


def data_dir() -> Path:
    """Per-user folder for the autosave (created on demand)."""
    base = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.AppDataLocation)
    path = Path(base or Path.home() / ".tiltyard")
    path.mkdir(parents=True, exist_ok=True)
    return path


def _as_assessment(doc: Site | Assessment) -> Assessment:
    return doc if isinstance(doc, Assessment) else Assessment(doc)


class _Edit(QUndoCommand):
    """One accepted edit of the document: the assessment before and after it."""

    def __init__(self, document: SiteDocument, before: Assessment, after: Assessment,
                 text: str):
        super().__init__(text)
        self._doc, self._before, self._after = document, before, after

    def redo(self) -> None:
        self._doc._show(self._after)

    def undo(self) -> None:
        self._doc._show(self._before)


def _edit_text(changes: dict) -> str:
    """What an edit changed, for Edit → Undo …, in the user's words."""
    names = {"name": "name", "latitude_deg": "latitude", "longitude_deg": "longitude",
             "elevation_m": "elevation", "timezone": "time zone", "albedo": "albedo",
             "horizon": "horizon", "obstacles": "obstacles", "planes": "planes",
             "monthly_ghi_kwh_m2_day": "monthly GHI values", "notes": "notes",
             "linke_turbidity": "turbidity", "sky": "sky basis", "weather": "weather file",
             "model": "sky diffuse model", "study": "study settings", "mounting": "mounting",
             "rows": "row settings", "interval_min": "interval", "year": "year"}
    return "change " + ", ".join(names.get(k, k.replace("_", " ")) for k in changes)


class SiteDocument(QObject):
    """Holds the current assessment; emits ``site_changed(Site)``,
    ``settings_changed(Assessment)``, ``replaced(Assessment)`` and ``state_changed()``."""

    site_changed = Signal(object)
    settings_changed = Signal(object)
    replaced = Signal(object)
    state_changed = Signal()

    def __init__(self, site: Site | Assessment | None = None, parent=None):
        super().__init__(parent)
        self._assessment = (_as_assessment(site) if site is not None
                            else demo_assessment(DEFAULT_DEMO))
        self._path: Path | None = None
        self._dirty = False            # unsaved before any edit (a new or recovered site)
        self._demo_name: str | None = DEFAULT_DEMO if site is None else None
        self.undo_stack = QUndoStack(self)
        # a bound slot, not a lambda: Qt drops it with the document (a lambda outlived the
        # stack at teardown and raised "Signal source has been deleted")
        self.undo_stack.cleanChanged.connect(self._on_clean_changed)

    def _on_clean_changed(self, _clean: bool) -> None:
        self.state_changed.emit()

    # -- state ----------------------------------------------------------------
    @property
    def site(self) -> Site:
        return self._assessment.site

    @property
    def _site(self) -> Site:
        return self._assessment.site

    @property
    def assessment(self) -> Assessment:
        """The site with every per-site setting: what the views compute from."""
        return self._assessment

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def dirty(self) -> bool:
        """Unsaved edits: the undo stack away from its clean (saved) state, or a document
        that was never saved."""
        return self._dirty or not self.undo_stack.isClean()

    @property
    def title(self) -> str:
        if self._path is not None:
            where = self._path.name
        elif self._demo_name:
            where = f"demo: {self._demo_name}"
        else:
            where = "not saved"
        return f"{self._site.name} ({where})"

    # -- changes --------------------------------------------------------------
    def propose(self, **changes) -> SiteError | None:
        """Apply field changes if they validate; return the error otherwise."""
        try:
            new = self._site.with_changes(**changes)
            assessment = self._assessment.with_site(new)
        except SiteError as exc:
            return exc
        except ValueError as exc:      # the settings no longer fit the edited site
            return SiteError("site", "", str(exc))
        if new != self._site:
            self.undo_stack.push(_Edit(self, self._assessment, assessment, _edit_text(changes)))
        return None

    def set_settings(self, **changes) -> ValueError | None:
        """Change per-site settings (``sky``, ``weather``, ``model``, ``study``, ``mounting``,
        ``rows``...); return the engine's error instead of applying a bad one."""
        try:
            new = self._assessment.with_changes(**changes)
        except ValueError as exc:
            return exc
        if new != self._assessment:
            self.undo_stack.push(_Edit(self, self._assessment, new, _edit_text(changes)))
        return None

    def _show(self, assessment: Assessment) -> None:
        """Make ``assessment`` current (an edit, its undo or its redo) and say what changed."""
        before, self._assessment = self._assessment, assessment
        if assessment.site != before.site:
            self.site_changed.emit(assessment.site)
        if assessment.with_site(before.site) != before:
            self.settings_changed.emit(assessment)
        self.state_changed.emit()

    def replace(self, site: Site | Assessment, path: str | os.PathLike | None = None,
                dirty: bool = False, demo_name: str | None = None) -> None:
        """Make ``site`` (a Site with default settings, or a whole Assessment) the open
        document (after New, Open or a recovery): every per-site setting is replaced."""
        self._assessment = _as_assessment(site)
        self._path = Path(path) if path is not None else None
        self._dirty = dirty
        self._demo_name = demo_name
        self.undo_stack.clear()           # no undoing into the previous site
        self.replaced.emit(self._assessment)
        self.site_changed.emit(self._assessment.site)
        self.state_changed.emit()

    # -- files ----------------------------------------------------------------
    def open(self, path: str | os.PathLike) -> None:
        """Load a site file; on any error the current site is left untouched."""
        assessment = load_assessment(path)     # raises SiteError naming the file
        self.replace(assessment, path=path)

    def open_demo(self, name: str) -> None:
        self.replace(demo_assessment(name), demo_name=name)

    def save(self, path: str | os.PathLike | None = None) -> Path:
        """Write the site with its settings atomically; returns the path written."""
        target = Path(path) if path is not None else self._path
        if target is None:
            raise ValueError("no file name yet: use Save As")
        save_assessment(self._assessment, target)
        self._path = target
        self._dirty = False
        self.undo_stack.setClean()
        self._demo_name = None
        self.state_changed.emit()
        return target

    # -- crash recovery -------------------------------------------------------
    @staticmethod
    def autosave_path() -> Path:
        return data_dir() / AUTOSAVE_NAME

    def write_autosave(self) -> Path | None:
        """Write the unsaved site to the autosave file (only when there are edits)."""
        if not self.dirty:
            return None
        target = self.autosave_path()
        save_assessment(self._assessment, target)
        return target

    @classmethod
    def clear_autosave(cls) -> None:
        try:
            cls.autosave_path().unlink()
        except FileNotFoundError:
            pass

    @classmethod
    def pending_recovery(cls) -> Assessment | None:
        """The site (with its settings) left by a session that did not close cleanly, if
        readable."""
        path = cls.autosave_path()
        if not path.exists():
            return None
        try:
            return load_assessment(path)
        except SiteError:
            return None
