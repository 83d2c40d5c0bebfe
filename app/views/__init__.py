"""The six views, in navigation order.

Each view module is imported, and its view built, the first time it is shown,
so the window opens without loading what the first view does not need.
"""

from __future__ import annotations

from importlib import import_module

#: (title, module, class) in navigation order.
VIEW_SPECS = (
    ("Site", "site_view", "SiteView"),
    ("Horizon", "horizon_view", "HorizonView"),
    ("Sun path", "sunpath_view", "SunPathView"),
    ("Irradiance", "irradiance_view", "IrradianceView"),
    ("Tilt study", "study_view", "StudyView"),
    ("Sheet", "sheet_view", "SheetView"),
)
VIEW_TITLES = tuple(t for t, _, _ in VIEW_SPECS)


def view_class(title: str):
    """The view class for a navigation title (imports its module on first use)."""
    for t, module, cls in VIEW_SPECS:
        if t == title:
            return getattr(import_module(f"{__name__}.{module}"), cls)
    raise KeyError(title)


__all__ = ["VIEW_SPECS", "VIEW_TITLES", "view_class"]
