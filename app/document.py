"""The open site: one validated :class:`Site`, its file and whether it has unsaved edits.

Views never hold their own copy of the site. They read ``document.site`` and
propose a new one with :meth:`SiteDocument.propose`; a proposal that fails
validation is refused with the engine's message and the current site stays.
Every accepted change emits ``site_changed`` once.
"""

from __future__ import annotations

import os
from pathlib import Path

from PySide6.QtCore import QObject, QStandardPaths, Signal

from tiltyard.engine.site import (
    DEFAULT_DEMO,
    Site,
    SiteError,
    load_demo,
    load_site,
    save_site,
)

AUTOSAVE_NAME = "autosave-site.json"


def data_dir() -> Path:
    """Per-user folder for the autosave (created on demand)."""
    base = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.AppDataLocation)
    path = Path(base or Path.home() / ".tiltyard")
    path.mkdir(parents=True, exist_ok=True)
    return path


class SiteDocument(QObject):
    """Holds the current site; emits ``site_changed(Site)`` and ``state_changed()``."""

    site_changed = Signal(object)
    state_changed = Signal()

    def __init__(self, site: Site | None = None, parent=None):
        super().__init__(parent)
        self._site = site if site is not None else load_demo(DEFAULT_DEMO)
        self._path: Path | None = None
        self._dirty = False
        self._demo_name: str | None = DEFAULT_DEMO if site is None else None

    # -- state ----------------------------------------------------------------
    @property
    def site(self) -> Site:
        return self._site

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def dirty(self) -> bool:
        return self._dirty

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
        except SiteError as exc:
            return exc
        if new != self._site:
            self._site = new
            self._dirty = True
            self.site_changed.emit(new)
            self.state_changed.emit()
        return None

    def replace(self, site: Site, path: str | os.PathLike | None = None, dirty: bool = False,
                demo_name: str | None = None) -> None:
        """Make ``site`` the open site (after New, Open or a recovery)."""
        self._site = site
        self._path = Path(path) if path is not None else None
        self._dirty = dirty
        self._demo_name = demo_name
        self.site_changed.emit(site)
        self.state_changed.emit()

    # -- files ----------------------------------------------------------------
    def open(self, path: str | os.PathLike) -> None:
        """Load a site file; on any error the current site is left untouched."""
        site = load_site(path)            # raises SiteError naming the file
        self.replace(site, path=path)

    def open_demo(self, name: str) -> None:
        self.replace(load_demo(name), demo_name=name)

    def save(self, path: str | os.PathLike | None = None) -> Path:
        """Write the site atomically; returns the path written."""
        target = Path(path) if path is not None else self._path
        if target is None:
            raise ValueError("no file name yet: use Save As")
        save_site(self._site, target)
        self._path = target
        self._dirty = False
        self._demo_name = None
        self.state_changed.emit()
        return target

    # -- crash recovery -------------------------------------------------------
    @staticmethod
    def autosave_path() -> Path:
        return data_dir() / AUTOSAVE_NAME

    def write_autosave(self) -> Path | None:
        """Write the unsaved site to the autosave file (only when there are edits)."""
        if not self._dirty:
            return None
        target = self.autosave_path()
        save_site(self._site, target)
        return target

    @classmethod
    def clear_autosave(cls) -> None:
        try:
            cls.autosave_path().unlink()
        except FileNotFoundError:
            pass

    @classmethod
    def pending_recovery(cls) -> Site | None:
        """The site left by a session that did not close cleanly, if readable."""
        path = cls.autosave_path()
        if not path.exists():
            return None
        try:
            return load_site(path)
        except SiteError:
            return None
