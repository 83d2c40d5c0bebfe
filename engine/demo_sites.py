"""The bundled demo sites (invented, shipped as package data) and the SITE argument.

A SITE argument is a site file's path or the name of a bundled demo site.
"""

from __future__ import annotations

import json
import os
from importlib import resources
from pathlib import Path

from .site import Site, SiteError
from .site_file import load_site, site_from_dict

#: Name of the demo site the quick start and the app open by default.
DEFAULT_DEMO = "larkmoor-dairy"


def demo_site_names() -> list[str]:
    """Names of the bundled demo sites (file names without ``.json``)."""
    files = resources.files("tiltyard.sample_sites")
    return sorted(p.name[:-5] for p in files.iterdir() if p.name.endswith(".json"))


def load_demo(name: str = DEFAULT_DEMO) -> Site:
    """Load a bundled demo site by name."""
    if name not in demo_site_names():
        raise SiteError("site", name, "is not a bundled demo site; choose one of "
                        + ", ".join(demo_site_names()))
    res = resources.files("tiltyard.sample_sites") / f"{name}.json"
    try:
        return site_from_dict(json.loads(res.read_text(encoding="utf-8")))
    except SiteError as err:
        raise err.in_file(f"demo:{name}") from None


def is_site_path(arg: str) -> bool:
    """Whether a SITE argument names a file (else the name of a bundled demo site)."""
    return Path(arg).suffix.lower() == ".json" or Path(arg).exists() or os.sep in arg


def resolve_site(arg: str) -> Site:
    """A site from a file path or the name of a bundled demo site."""
    return load_site(arg) if is_site_path(arg) else load_demo(arg)
