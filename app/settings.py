"""User preferences kept with QSettings, and the recent-files list."""

from __future__ import annotations

from dataclasses import asdict, dataclass, fields

from PySide6.QtCore import QSettings

ORGANISATION = "Tiltyard"
APPLICATION = "Tiltyard"
MAX_RECENT = 8

SKY_CHOICES = ("auto", "clear", "monthly")
MODEL_CHOICES = ("perez", "haydavies", "isotropic")
TIME_CHOICES = ("clock", "standard", "solar")
PAPER_CHOICES = ("a4", "letter")


@dataclass(frozen=True)
class Preferences:
    preparer: str = ""
    organisation: str = ""
    sky: str = "auto"
    model: str = "perez"
    time_basis: str = "clock"
    paper: str = "a4"


def _settings() -> QSettings:
    return QSettings(ORGANISATION, APPLICATION)


def load_preferences() -> Preferences:
    s = _settings()
    values = {}
    for f in fields(Preferences):
        v = s.value(f"preferences/{f.name}", f.default)
        values[f.name] = str(v) if v is not None else f.default
    choices = {"sky": SKY_CHOICES, "model": MODEL_CHOICES, "time_basis": TIME_CHOICES,
               "paper": PAPER_CHOICES}
    for name, allowed in choices.items():
        if values[name] not in allowed:
            values[name] = getattr(Preferences, name)
    return Preferences(**values)


def save_preferences(prefs: Preferences) -> None:
    s = _settings()
    for name, value in asdict(prefs).items():
        s.setValue(f"preferences/{name}", value)
    s.sync()


def recent_files() -> list[str]:
    v = _settings().value("recent_files", [])
    if isinstance(v, str):
        v = [v]
    return [str(p) for p in (v or [])][:MAX_RECENT]


def add_recent_file(path: str) -> list[str]:
    items = [path] + [p for p in recent_files() if p != path]
    s = _settings()
    s.setValue("recent_files", items[:MAX_RECENT])
    s.sync()
    return items[:MAX_RECENT]
