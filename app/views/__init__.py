"""The six views, in navigation order."""

from .sheet_view import SheetView
from .site_view import SiteView

VIEW_CLASSES = [SiteView, SheetView]

__all__ = ["VIEW_CLASSES"]
