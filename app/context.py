"""What every view shares: the open site, the task runner, the sky choice and preferences.

Views talk to each other only through this object: the Irradiance view's sky
basis is the one the Tilt study uses, and the study result it publishes is
what the Irradiance bars and the Sheet show.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

from PySide6.QtCore import QObject, Signal

from tiltyard.engine.site import Site

from .document import SiteDocument
from .settings import Preferences
from .tasks import TaskRunner


@dataclass(frozen=True)
class SkyChoice:
    """The sky basis chosen in the app: ``clear``, ``monthly`` or ``file``."""

    sky: str = "clear"
    model: str = "perez"
    weather_path: Path | None = None
    weather: object | None = None     # a loaded WeatherData when sky == "file"

    def irradiance_options(self, **kw):
        """Engine options for this choice (weather data passed through when loaded)."""
        from tiltyard.engine.skyyear import IrradianceOptions  # pvlib: load when first needed

        sky = "file" if self.sky == "file" else self.sky
        extra = {"weather": self.weather} if self.sky == "file" else {}
        return IrradianceOptions(model=self.model, sky=sky, **extra, **kw)

    def label(self) -> str:
        if self.sky == "file" and self.weather_path is not None:
            return f"weather file {self.weather_path.name}"
        return {"clear": "clear sky (upper bound)", "monthly": "monthly GHI values"}.get(
            self.sky, self.sky)


class AppContext(QObject):
    """Shared state with change signals."""

    sky_changed = Signal(object)        # SkyChoice
    study_changed = Signal(object)      # TiltStudy or None
    preferences_changed = Signal(object)
    message = Signal(str, str)          # level ("error"|"warning"|"info"), text

    def __init__(self, document: SiteDocument, runner: TaskRunner, prefs: Preferences,
                 parent=None):
        super().__init__(parent)
        self.document = document
        self.runner = runner
        self.prefs = prefs
        self.sky = SkyChoice(sky=prefs.sky if prefs.sky in ("clear", "monthly") else "clear",
                             model=prefs.model)
        self.study = None

    @property
    def site(self) -> Site:
        return self.document.site

    def set_sky(self, **changes) -> None:
        new = replace(self.sky, **changes)
        if new != self.sky:
            self.sky = new
            self.sky_changed.emit(new)

    def publish_study(self, study) -> None:
        self.study = study
        self.study_changed.emit(study)

    def set_preferences(self, prefs: Preferences) -> None:
        self.prefs = prefs
        self.preferences_changed.emit(prefs)

    def notify(self, level: str, text: str) -> None:
        self.message.emit(level, text)
