"""The six views, in navigation order."""

from .horizon_view import HorizonView
from .irradiance_view import IrradianceView
from .sheet_view import SheetView
from .site_view import SiteView
from .study_view import StudyView
from .sunpath_view import SunPathView

VIEW_CLASSES = [SiteView, HorizonView, SunPathView, IrradianceView, StudyView, SheetView]

__all__ = ["VIEW_CLASSES"]
