"""One results row per site, read from its :class:`~tiltyard.engine.assess.AssessmentResult`.

Every figure is the one ``tiltyard study --json`` prints for the same site and settings
(:meth:`tiltyard.engine.tilt.TiltStudy.to_json_dict`), the horizon loss is
:meth:`AssessmentResult.option_horizon_loss` of the recommended option, the weakest month is
:func:`tiltyard.engine.exports.weakest_month` (the sheet's) and the inputs hash is
:func:`tiltyard.engine.exports.input_digest` (the fingerprint the sheet prints): nothing is
derived here.

The columns are fixed for a run (:func:`result_columns`): the key columns, the basis and the
recommendation, then for each option kind (and each site plane, ``plane1_`` ...) its annual
and weakest-month irradiation, its gains and its indicative specific yield, empty where the
mounting does not allow the option.
"""

from __future__ import annotations

import json
from dataclasses import dataclass

from ..assessment import Assessment, assessment_document, assessment_from_dict
from ..cautions import CAUTION
from ..exports import input_digest, weakest_month
from ..site_file import site_from_dict
from ..tilt import OPTION_KINDS
from ..words import schedule_code

#: Key columns, from the input row.
KEY_COLUMNS = (("line", "int"), ("source", "str"), ("id", "str"), ("name", "str"),
               ("latitude_deg", "float"), ("longitude_deg", "float"), ("elevation_m", "float"),
               ("timezone", "str"))
#: Site-wide columns, from the study.
SITE_COLUMNS = (
    ("basis", "str"), ("basis_reason", "str"), ("mounting", "str"), ("objective", "str"),
    ("recommended", "str"), ("recommended_kind", "str"), ("recommended_schedule", "str"),
    ("recommended_annual_kwh_m2", "float"), ("recommended_kwh_kwp", "float"),
    ("best_tilt_deg", "float"), ("best_azimuth_deg", "float"),
    ("horizon_loss_pct", "float"), ("horizon_loss_kwh_m2", "float"),
    ("row_tilt_deg", "float"), ("row_pitch_m", "float"), ("row_gcr", "float"),
)
#: Per-option columns (prefixed with the option's column name).
OPTION_FIELDS = (("annual_kwh_m2", "float"), ("weakest_month", "float"),
                 ("weakest_month_kwh_m2", "float"), ("gain_vs_horizontal_pct", "float"),
                 ("gain_vs_best_plane_pct", "float"), ("kwh_kwp", "float"),
                 ("schedule", "str"))
TAIL_COLUMNS = (("warnings", "str"), ("inputs_hash", "str"), ("caution", "str"),
                ("site_file", "str"))
#: Columns of RESULTS.errors.csv.
ERROR_COLUMNS = ("line", "source", "field", "value", "reason")
#: Option kinds other than the site's planes, in the study's order.
_KINDS = tuple(k for k in OPTION_KINDS if k != "plane")


def option_prefix(kind: str, plane_number: int | None = None) -> str:
    """The column prefix of an option: ``fixed_optimal``, ``plane2``..."""
    return f"plane{plane_number}" if kind == "plane" else kind.replace("-", "_")


def result_columns(max_planes: int) -> tuple:
    """(name, kind) of every results column for a portfolio whose sites have at most
    ``max_planes`` planes; kind is ``int``, ``float`` or ``str``."""
    prefixes = [option_prefix(k) for k in _KINDS[:1]]
    prefixes += [option_prefix("plane", n) for n in range(1, max_planes + 1)]
    prefixes += [option_prefix(k) for k in _KINDS[1:]]
    options = tuple((f"{p}_{f}", kind) for p in prefixes for f, kind in OPTION_FIELDS)
    return KEY_COLUMNS + SITE_COLUMNS + options + TAIL_COLUMNS


def inputs_hash(result) -> str:
    """The inputs hash of an assessment result: the sheet's fingerprint of the site, the
    study settings, the sky basis and the mounting (:func:`input_digest`)."""
    opts = result.study_options
    return input_digest(result.site, opts, result.basis.kind, result.mounting)


def result_row(result, key: dict, notes=()) -> dict:
    """The results row of one assessed site.

    Parameters
    ----------
    result : tiltyard.engine.assess.AssessmentResult
    key : dict
        The input's key columns (``line``, ``source``, ``id``, ``name``, coordinates,
        time zone).
    notes : sequence of str
        What reading the row noted (a time zone looked up), put first in ``warnings``.
    """
    st = result.study()
    d = st.to_json_dict()
    by_label = {r["label"]: r for r in d["options"]}
    yields = {(y["label"], y["kind"]): y["annual_kwh_kwp"]
              for y in (d["specific_yield"] or {}).get("options", [])}
    rec = by_label[d["recommended"]]
    best = next((r for r in d["options"] if r["kind"] == "fixed-optimal"), None)
    loss = result.option_horizon_loss(st.recommended)
    row = {name: key.get(name) for name, _ in KEY_COLUMNS}
    row.update({
        "basis": result.basis.kind, "basis_reason": result.basis.reason,
        "mounting": result.mounting, "objective": d["objective"],
        "recommended": rec["label"], "recommended_kind": rec["kind"],
        "recommended_schedule": schedule_code(rec["schedule"]),
        "recommended_annual_kwh_m2": rec["annual_kwh_m2"],
        "recommended_kwh_kwp": yields.get((rec["label"], rec["kind"])),
        "best_tilt_deg": None if best is None else best["schedule"][0]["tilt_deg"],
        "best_azimuth_deg": None if best is None else best["schedule"][0]["azimuth_deg"],
        "horizon_loss_pct": loss.loss_pct, "horizon_loss_kwh_m2": loss.loss_kwh_m2,
    })
    chosen = (d["rows"] or {}).get("chosen")
    if st.mounting != "flush" and chosen is not None:     # panels on a roof: no rows
        row.update(row_tilt_deg=chosen["tilt_deg"], row_pitch_m=chosen["pitch_m"],
                   row_gcr=chosen["gcr"])
    plane_number = 0
    for r in d["options"]:
        if r["kind"] == "plane":
            plane_number += 1
        p = option_prefix(r["kind"], plane_number)
        month, month_kwh = weakest_month(st, r["monthly_kwh_m2"])
        row.update({f"{p}_annual_kwh_m2": r["annual_kwh_m2"], f"{p}_weakest_month": month,
                    f"{p}_weakest_month_kwh_m2": month_kwh,
                    f"{p}_gain_vs_horizontal_pct": r["gain_vs_horizontal_pct"],
                    f"{p}_gain_vs_best_plane_pct": r["gain_vs_fixed_optimal_pct"],
                    f"{p}_kwh_kwp": yields.get((r["label"], r["kind"])),
                    f"{p}_schedule": schedule_code(r["schedule"])})
    warnings = list(notes) + list(result.weather_warnings) + list(d["warnings"])
    row.update(warnings=" | ".join(warnings), inputs_hash=inputs_hash(result), caution=CAUTION,
               site_file=json.dumps(assessment_document(result.assessment),
                                    separators=(",", ":"), ensure_ascii=False))
    return row


def row_assessment(row) -> Assessment:
    """The assessment a results row was made from (its ``site_file`` column: the whole site
    file, settings included), to open that site on its own."""
    d = json.loads(row["site_file"])
    return assessment_from_dict(d.get("assessment"), site_from_dict(d))


def read_results(path):
    """A results file (CSV or Parquet) as a DataFrame, each column typed as the batch wrote
    it (text columns as text, empty cells as empty text)."""
    import pandas as pd

    path = str(path)
    if path.lower().endswith(".parquet"):
        df = pd.read_parquet(path)
    else:
        df = pd.read_csv(path, keep_default_na=False, na_values=[""], dtype=str)
    return typed_frame(df, result_columns(_planes_in(df.columns)), keep_extra=True)


def typed_frame(df, columns: tuple, keep_extra: bool = False):
    """``df`` with the results ``columns`` (name, kind) in order and typed: ``int`` as
    nullable integers, ``float`` as float64, ``str`` as text with empty cells as ``""``;
    columns missing from ``df`` come empty. ``keep_extra`` keeps other columns (as text)."""
    import pandas as pd

    names = [c for c, _ in columns]
    extra = [c for c in df.columns if c not in names] if keep_extra else []
    df = df.reindex(columns=names + extra)
    for name, kind in list(columns) + [(c, "str") for c in extra]:
        if kind == "int":
            df[name] = pd.to_numeric(df[name], errors="coerce").astype("Int64")
        elif kind == "float":
            df[name] = pd.to_numeric(df[name], errors="coerce").astype("float64")
        else:
            df[name] = df[name].astype(object).where(df[name].notna(), "").astype(str)
    return df


def _planes_in(names) -> int:
    import re

    numbers = [int(m.group(1)) for n in names if (m := re.match(r"^plane(\d+)_", n))]
    return max(numbers, default=0)


@dataclass(frozen=True)
class PortfolioSummary:
    """A results file read for a table and a chart: the rows, and the distribution of the
    best-plane annual irradiation (``fixed_optimal_annual_kwh_m2``), kWh/m²."""

    path: str
    frame: object
    counts: tuple
    edges_kwh_m2: tuple
    sites: int


def portfolio_summary(path, bins: int = 20) -> PortfolioSummary:
    """:func:`read_results` and the histogram of the best-plane irradiation (a module-level
    function: the app reads a results file in a worker process)."""
    import numpy as np

    df = read_results(path)
    values = df["fixed_optimal_annual_kwh_m2"].dropna().to_numpy(dtype=float) \
        if "fixed_optimal_annual_kwh_m2" in df else np.array([])
    if len(values):
        counts, edges = np.histogram(values, bins=bins)
    else:
        counts, edges = np.array([], dtype=int), np.array([])
    return PortfolioSummary(str(path), df, tuple(int(c) for c in counts),
                            tuple(float(e) for e in edges), len(df))


__all__ = ["ERROR_COLUMNS", "KEY_COLUMNS", "OPTION_FIELDS", "SITE_COLUMNS", "TAIL_COLUMNS",
           "PortfolioSummary", "inputs_hash", "option_prefix", "portfolio_summary",
           "read_results", "result_columns", "result_row", "row_assessment", "typed_frame"]
