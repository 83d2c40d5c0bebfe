"""The public scripting face, tiltyard.api: what it offers, and that it stays Qt-free."""

import subprocess
import sys

import tiltyard.api as api
from tiltyard.engine import assess, assessment, jobs, site, site_file, tilt, weather, weather_site

# the brief of the scripting API: every name it must offer
REQUIRED = (
    "Site", "Plane", "Obstacle", "HorizonProfile", "load_site", "save_site",
    "Assessment", "StudySettings", "RowSettings", "Mounting", "WeatherSource",
    "load_assessment", "save_assessment", "demo_assessment", "resolve_assessment",
    "assess", "AssessmentResult", "Basis", "AssessmentError", "WeatherFitError",
    "TiltStudy", "StudyOption", "Period", "IrradianceResult", "SunDay", "sun_day",
    "HorizonLoss", "DayCurves", "SkyYear",
    "read_weather_file", "read_weather_csv", "WeatherData", "WeatherImportError", "ColumnMap",
    "load_weather_for_site", "demo_site_names", "load_demo", "CAUTION",
)


def test_all_lists_the_required_names_once_and_each_exists():
    assert len(api.__all__) == len(set(api.__all__))
    assert set(REQUIRED) <= set(api.__all__)
    missing = [n for n in api.__all__ if not hasattr(api, n)]
    assert missing == []


def test_the_names_are_the_engines_own_objects():
    # the API re-exports; it never wraps or copies (a figure is the same number everywhere)
    assert api.Site is site.Site and api.load_site is site_file.load_site
    assert api.Assessment is assessment.Assessment
    assert api.assess is assess.assess and api.AssessmentResult is assess.AssessmentResult
    assert api.TiltStudy is tilt.TiltStudy and api.Period is tilt.Period
    assert api.sun_day is jobs.sun_day
    assert api.read_weather_file is weather.read_weather_file
    assert api.load_weather_for_site is weather_site.load_weather_for_site
    assert issubclass(api.WeatherFitError, api.AssessmentError)
    from tiltyard.engine.batch import inputs, run
    assert api.read_portfolio is inputs.read_portfolio and api.run_batch is run.run_batch


def test_star_import_gives_exactly_all():
    ns: dict = {}
    exec("from tiltyard.api import *", ns)
    assert sorted(k for k in ns if k != "__builtins__") == sorted(api.__all__)


def test_importing_the_api_loads_no_qt_and_no_app():
    code = ("import sys\n"
            "import tiltyard.api\n"
            "bad = [m for m in sys.modules if m.split('.')[0] in "
            "('PySide6', 'shiboken6', 'PyQt5', 'PyQt6', 'pyqtgraph') "
            "or m.startswith('tiltyard.app')]\n"
            "print(bad)\n"
            "sys.exit(1 if bad or 'PySide6' in sys.modules else 0)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 0, out.stdout + out.stderr


def test_the_module_docstring_explains_the_layers():
    doc = api.__doc__
    for word in ("Assessment", "assess()", "once", "first use", "preliminary"):
        assert word in doc
