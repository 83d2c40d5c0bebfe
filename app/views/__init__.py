"""The six views, in navigation order."""

from .sheet_view import SheetView
from .site_view import SiteView
from .sunpath_view import SunPathView

VIEW_CLASSES = [SiteView, SunPathView, SheetView]

__all__ = ["VIEW_CLASSES"]
