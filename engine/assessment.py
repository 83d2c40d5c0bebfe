"""One assessment of one site: everything that decides its figures, as plain data.

An :class:`Assessment` holds the site, the sky basis (with its weather file and
how to read it), the transposition and clear-sky models and the solar
constant, the interval, the study settings, the mounting and the row
settings. It is frozen, picklable and has a JSON form, the ``assessment``
section of a site file (format 2). :func:`tiltyard.engine.assess.assess`
turns it into an :class:`~tiltyard.engine.assess.AssessmentResult`, which the
command line, every view and the sheet read.

Nothing here computes physics: the study and row settings are the tilt
study's own classes (:class:`tiltyard.engine.tilt.StudySettings`,
:class:`~tiltyard.engine.tilt.RowSettings`), which judge each setting in one
place.
"""

from __future__ import annotations

import hashlib
import json
import os
from dataclasses import asdict, dataclass, field, fields, is_dataclass, replace
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING

from .atomic_files import write_bytes_atomically
from .choices import (
    CLEARSKY_MODELS,
    REFERENCE_YEAR,
    SOLAR_CONSTANT_W_M2,
    TRANSPOSITION_MODELS,
    RowSettings,
    StudySettings,
    check_positions,
    check_sky_choices,
    check_step_min,
)
from .demo_sites import is_site_path, load_demo
from .site import MOUNTINGS, Site, SiteError
from .site_file import FORMAT_NAME, FORMAT_VERSION, load_site_document, site_from_dict, site_to_dict

if TYPE_CHECKING:
    from .skyyear import IrradianceOptions
    from .tilt import StudyOptions

#: Sky bases an assessment may ask for. ``auto``: the weather file if one is named,
#: else the site's twelve monthly values if all are there, else the clear sky.
SKY_CHOICES = ("auto", "clear", "monthly", "file")

#: Interval of a clear or monthly sky when the assessment names none, minutes.
DEFAULT_INTERVAL_MIN = 60


@dataclass(frozen=True)
class WeatherSource:
    """A weather file and how to read it.

    Attributes
    ----------
    path : str
        The file (absolute once loaded from a site file; written relative to
        the site file's folder where possible).
    columns : tuple of (str, str)
        For a generic CSV file: our column names to the file's header names.
    timestamp_label : {"start", "end", "centre"} or None
        What a CSV file's timestamps mark in their interval.
    timezone : str or None
        Zone of a CSV file's naive timestamps.
    sha256 : str or None
        SHA-256 (hex) of the file's bytes when it was chosen; a file whose
        bytes differ is reported, never used silently.
    accept_warnings : bool
        The user has seen the site-fit warnings (far from the site, light
        with the sun down) and uses the file anyway.
    """

    path: str
    columns: tuple = ()
    timestamp_label: str | None = None
    timezone: str | None = None
    sha256: str | None = None
    accept_warnings: bool = False

    def __post_init__(self):
        if not isinstance(self.path, str) or not self.path.strip():
            raise ValueError("weather file: give the path of the file")
        if is_dataclass(self.columns):           # a ColumnMap: its named columns
            object.__setattr__(self, "columns", {
                f.name: getattr(self.columns, f.name) for f in fields(self.columns)
                if getattr(self.columns, f.name) is not None})
        if isinstance(self.columns, dict):
            object.__setattr__(self, "columns", tuple(self.columns.items()))
        cols = tuple(tuple(p) for p in self.columns)
        if any(len(p) != 2 or not all(isinstance(x, str) for x in p) for p in cols):
            raise ValueError("weather file columns: give pairs of our name and the file's "
                             "header name, e.g. ghi=GHI")
        object.__setattr__(self, "columns", cols)
        if self.timestamp_label not in (None, "start", "end", "centre", "center"):
            raise ValueError(f"weather file time label {self.timestamp_label!r}: must be "
                             "start, end or centre")

    @property
    def name(self) -> str:
        return Path(self.path).name

    @property
    def column_map(self) -> dict | None:
        return dict(self.columns) if self.columns else None


def file_sha256(path) -> str:
    """SHA-256 (hex) of a file's bytes."""
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


@dataclass(frozen=True)
class Mounting:
    """How the panels are to be held.

    ``kind`` None takes the site's own planes' mounting (``flush`` for a roof
    plane unless the site file says otherwise) when the site has planes, else
    ``fixed-rack``. ``max_positions`` caps the tilt positions a year of an
    ``adjustable`` mounting.
    """

    kind: str | None = None
    max_positions: int = 12

    def __post_init__(self):
        if self.kind is not None and self.kind not in MOUNTINGS:
            raise ValueError(f"mounting {self.kind!r}: must be one of {', '.join(MOUNTINGS)}")

    def resolved(self, site: Site) -> str:
        """The mounting kind in force for ``site``."""
        if self.kind is not None:
            return self.kind
        return site.planes[0].mounting if site.planes else "fixed-rack"


@dataclass(frozen=True)
class Assessment:
    """Everything that decides one site's figures (frozen, picklable, JSON round trip)."""

    site: Site
    sky: str = "auto"
    weather: WeatherSource | None = None
    model: str = "perez"
    clearsky_model: str = "ineichen"
    solar_constant_w_m2: float = SOLAR_CONSTANT_W_M2
    year: int = REFERENCE_YEAR
    interval_min: int | None = None
    study: StudySettings = field(default_factory=StudySettings)
    mounting: Mounting = field(default_factory=Mounting)
    rows: RowSettings = field(default_factory=RowSettings)

    def __post_init__(self):
        if not isinstance(self.site, Site):
            raise ValueError("assessment: site must be a Site")
        if self.sky not in SKY_CHOICES:
            raise ValueError(f"sky basis {self.sky!r}: must be one of {', '.join(SKY_CHOICES)}")
        if self.sky == "file" and self.weather is None:
            raise ValueError("sky basis 'file': choose the weather file")
        if self.model not in TRANSPOSITION_MODELS:
            raise ValueError(f"sky diffuse model {self.model!r}: must be one of "
                             f"{', '.join(TRANSPOSITION_MODELS)}")
        if self.clearsky_model not in CLEARSKY_MODELS:
            raise ValueError(f"clear-sky model {self.clearsky_model!r}: must be one of "
                             f"{', '.join(CLEARSKY_MODELS)}")
        if self.interval_min is not None:
            check_step_min(self.interval_min)
        # the sky's and the study's own checks, in one place each (engine.choices, which
        # needs no numerical library, so a site opens before they are loaded)
        check_sky_choices(self.model, "clear", self.clearsky_model, self.solar_constant_w_m2,
                          self.year, 60)
        check_positions(self.mounting_kind, int(self.mounting.max_positions), MOUNTINGS)

    @property
    def mounting_kind(self) -> str:
        return self.mounting.resolved(self.site)

    def study_options(self, irradiance: IrradianceOptions) -> StudyOptions:
        """The tilt study's options for this assessment on the sky ``irradiance``."""
        from .tilt import StudyOptions
        return StudyOptions(irradiance=irradiance, mounting=self.mounting_kind,
                            max_positions=int(self.mounting.max_positions),
                            **asdict(self.study), **asdict(self.rows))

    def with_site(self, site: Site) -> Assessment:
        """The same settings for an edited site."""
        return replace(self, site=site)

    def with_changes(self, **changes) -> Assessment:
        return replace(self, **changes)


# -- JSON form ----------------------------------------------------------------------------------

def _relative(path: str, base_dir: Path | None) -> str:
    if base_dir is None:
        return path
    try:
        return os.path.relpath(Path(path).resolve(), Path(base_dir).resolve())
    except ValueError:              # another drive (Windows)
        return path


def assessment_to_dict(a: Assessment, base_dir=None) -> dict:
    """The ``assessment`` section of a site file (without the site itself).

    The weather file's path is written relative to ``base_dir`` (the site
    file's folder) where possible, with its SHA-256.
    """
    base = Path(base_dir) if base_dir is not None else None
    w = None
    if a.weather is not None:
        w = {"path": _relative(a.weather.path, base),
             "sha256": a.weather.sha256,
             "columns": dict(a.weather.columns) or None,
             "time_label": a.weather.timestamp_label,
             "time_zone": a.weather.timezone,
             "accept_warnings": a.weather.accept_warnings}
    return {
        "sky": a.sky, "weather": w, "model": a.model, "clearsky_model": a.clearsky_model,
        "solar_constant_w_m2": a.solar_constant_w_m2, "year": a.year,
        "interval_min": a.interval_min,
        "study": {k: (list(v) if isinstance(v, tuple) else v)
                  for k, v in asdict(a.study).items()},
        "mounting": {"kind": a.mounting.kind, "max_positions": a.mounting.max_positions},
        "rows": asdict(a.rows),
    }


def _known(section: str, d, cls) -> dict:
    if not isinstance(d, dict):
        raise SiteError(f"assessment.{section}", d, "must be an object")
    names = {f.name for f in fields(cls)}
    unknown = sorted(set(d) - names)
    if unknown:
        raise SiteError(f"assessment.{section}.{unknown[0]}", d[unknown[0]],
                        "is not a setting this Tiltyard knows")
    return {k: (tuple(v) if isinstance(v, list) else v) for k, v in d.items()}


def assessment_from_dict(d: dict, site: Site, base_dir=None) -> Assessment:
    """An :class:`Assessment` from a site file's ``assessment`` section.

    Raises
    ------
    SiteError
        Naming the setting (``assessment.study.tilt_step_deg``...) and the reason.
    """
    if d is None:
        return Assessment(site)
    if not isinstance(d, dict):
        raise SiteError("assessment", d, "must be an object")
    weather = None
    w = d.get("weather")
    try:
        if w is not None:
            if not isinstance(w, dict) or not isinstance(w.get("path"), str):
                raise SiteError("assessment.weather.path", w, "must be the weather file's path")
            path = Path(w["path"])
            if base_dir is not None and not path.is_absolute():
                path = Path(base_dir) / path
            path = Path(os.path.abspath(path))        # absolute and normalised, once
            weather = WeatherSource(str(path), tuple((w.get("columns") or {}).items()),
                                    w.get("time_label"), w.get("time_zone"), w.get("sha256"),
                                    bool(w.get("accept_warnings", False)))
        mounting = _known("mounting", d.get("mounting") or {}, Mounting)
        return Assessment(
            site, sky=d.get("sky", "auto"), weather=weather, model=d.get("model", "perez"),
            clearsky_model=d.get("clearsky_model", "ineichen"),
            solar_constant_w_m2=d.get("solar_constant_w_m2", SOLAR_CONSTANT_W_M2),
            year=d.get("year", REFERENCE_YEAR), interval_min=d.get("interval_min"),
            study=StudySettings(**_known("study", d.get("study") or {}, StudySettings)),
            mounting=Mounting(**mounting),
            rows=RowSettings(**_known("rows", d.get("rows") or {}, RowSettings)))
    except SiteError:
        raise
    except (TypeError, ValueError) as err:
        raise SiteError("assessment", "", str(err)) from None


def assessment_document(a: Assessment, base_dir=None) -> dict:
    """The whole site file (current format) for ``a``: the site and its ``assessment``."""
    d = site_to_dict(a.site)
    d["assessment"] = assessment_to_dict(a, base_dir)
    return d


def load_assessment(path) -> Assessment:
    """Read a site file (format 1 or 2) as an :class:`Assessment`.

    A format-1 file, or one without an ``assessment`` section, gives the
    default settings (sky basis ``auto``).

    Raises
    ------
    SiteError
        With ``file`` set, naming the field and the reason.
    """
    path = Path(path)
    data = load_site_document(path)
    try:
        site = site_from_dict(data)
        return assessment_from_dict(data.get("assessment"), site, path.parent)
    except SiteError as err:
        raise err.in_file(path) from None


def save_assessment(a: Assessment, path) -> None:
    """Write ``a`` as a site file (format :data:`FORMAT_VERSION`), atomically."""
    path = Path(path)
    text = json.dumps(assessment_document(a, path.parent), indent=2, ensure_ascii=False)
    write_bytes_atomically(path, (text + "\n").encode("utf-8"))


def demo_assessment(name: str) -> Assessment:
    """A bundled demo site as an :class:`Assessment` (its ``assessment`` section, if any)."""
    load_demo(name)                      # the one message for an unknown name
    res = resources.files("tiltyard.sample_sites") / f"{name}.json"
    data = json.loads(res.read_text(encoding="utf-8"))
    try:
        return assessment_from_dict(data.get("assessment"), site_from_dict(data))
    except SiteError as err:
        raise err.in_file(f"demo:{name}") from None


def resolve_assessment(arg: str) -> Assessment:
    """An assessment from a site file path or the name of a bundled demo site."""
    return load_assessment(arg) if is_site_path(arg) else demo_assessment(arg)


__all__ = ["DEFAULT_INTERVAL_MIN", "FORMAT_NAME", "FORMAT_VERSION", "SKY_CHOICES", "Assessment",
           "Mounting", "RowSettings", "StudySettings", "WeatherSource", "assessment_document",
           "assessment_from_dict", "assessment_to_dict", "demo_assessment", "file_sha256",
           "load_assessment", "resolve_assessment", "save_assessment"]
