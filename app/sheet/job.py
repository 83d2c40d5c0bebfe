"""The sheet from a site, end to end: study, sky, figures, sun chart, layout.

:func:`compute_sheet` is what the command line runs and what the Sheet view
submits to the task runner; it only calls engine functions and the layout.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from tiltyard.engine.exports import SheetFigures, sheet_figures
from tiltyard.engine.site import Site
from tiltyard.engine.skyyear import SkyYear, sky_year
from tiltyard.engine.sunchart import SunChart, sun_chart
from tiltyard.engine.tilt import StudyOptions, TiltStudy, tilt_study

from .content import SheetMeta
from .pages import SheetDocument, build_sheet

#: Sampling step of the sun-path chart's day paths on paper, minutes.
SUN_STEP_MIN = 10.0


@dataclass(frozen=True)
class SheetResult:
    """Everything behind one sheet."""

    study: TiltStudy
    sky: SkyYear
    figures: SheetFigures
    sun: SunChart
    document: SheetDocument


def compute_sheet(site: Site, study: TiltStudy | StudyOptions | None = None,
                  meta: SheetMeta | None = None, paper: str = "a4",
                  progress: Callable[[float, str], None] | None = None) -> SheetResult:
    """Study (unless given), sky, figures, sun chart and the laid-out pages.

    Parameters
    ----------
    site : Site
    study : TiltStudy or StudyOptions, optional
        A finished study of ``site`` to use as it is, or the options to run one
        with (default options when None).
    meta : SheetMeta, optional
    paper : {"a4", "letter"}
    progress : callable, optional
        ``progress(fraction, stage)``; may raise to cancel.
    """
    meta = meta or SheetMeta()

    def report(fraction, stage):
        if progress is not None:
            progress(fraction, stage)

    if not isinstance(study, TiltStudy):
        opts = study if isinstance(study, StudyOptions) else StudyOptions()
        study = tilt_study(site, opts, progress=lambda f, st: report(0.7 * f, st))
    elif study.site != site:
        raise ValueError("the study given is of another site (or of an earlier version of it)")
    report(0.72, "sky for the hourly figures")
    sky = sky_year(site, study.options_used.irradiance)
    report(0.8, "sheet figures")
    figures = sheet_figures(study, sky)
    report(0.86, "sun path")
    sun = sun_chart(site, f"{study.options_used.irradiance.year}-06-21", basis=meta.time_basis,
                    step_min=SUN_STEP_MIN)
    report(0.93, "laying out the pages")
    document = build_sheet(figures, sun, meta, paper)
    report(1.0, "done")
    return SheetResult(study, sky, figures, sun, document)


__all__ = ["SUN_STEP_MIN", "SheetResult", "compute_sheet"]
