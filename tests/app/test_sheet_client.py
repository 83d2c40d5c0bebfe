"""Who the sheet is for: stored with the site, printed without holes, set from the command
line; and the sheet's lead (basis, mounting, minimum tilt, weakest month)."""

from __future__ import annotations

import dataclasses
import datetime as dt
import io
import json

import pypdf
import pytest

from tiltyard.app.cli import main as cli_main
from tiltyard.app.sheet import SheetMeta, lay_out
from tiltyard.engine.assess import assess
from tiltyard.engine.assessment import demo_assessment, load_assessment, save_assessment
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.exports import input_digest
from tiltyard.engine.site import SiteError
from tiltyard.engine.site_file import site_from_dict, site_to_dict

META = SheetMeta("Jane Doe", "Example Solar Ltd", dt.date(2025, 5, 12))


def _sheet(assessment):
    a = assessment.with_changes(study=dataclasses.replace(assessment.study, tilt_step_deg=5.0))
    return lay_out(assess(a).sheet_data(), META, "a4").document


def _page1(doc) -> dict:
    return {o.role: o.text for o in doc.pages[0].texts()}


def test_client_fields_round_trip_and_old_files_load(tmp_path):
    a = demo_assessment("larkmoor-dairy")
    site = a.site.with_changes(client="Hollin Farm Partnership", address="Moor Lane, Larkmoor",
                               reference="LM-2025-014")
    d = site_to_dict(site)
    assert d["prepared_for"] == {"client": "Hollin Farm Partnership",
                                 "address": "Moor Lane, Larkmoor", "reference": "LM-2025-014"}
    assert site_from_dict(json.loads(json.dumps(d))) == site
    path = tmp_path / "site.json"
    save_assessment(a.with_site(site), path)
    assert load_assessment(path).site.reference == "LM-2025-014"
    # a file without the block (every older file) loads with blank fields, and writes none
    old = site_to_dict(a.site)
    assert "prepared_for" not in old and site_from_dict(old).client == ""
    with pytest.raises(SiteError, match="prepared_for.phone"):
        site_from_dict({**d, "prepared_for": {"phone": "1"}})
    # who it is for decides no figure: the inputs digest ignores it
    opts = a.study_options(assess(a).irradiance_options)
    assert input_digest(site, opts) == input_digest(a.site, opts)
    assert input_digest(a.site, opts, basis="clear") != input_digest(a.site, opts,
                                                                    basis="monthly")
    assert input_digest(a.site, opts, mounting="flush") != input_digest(a.site, opts,
                                                                       mounting="fixed-rack")


def test_prepared_for_block_and_the_blank_field_rule(qapp):
    a = demo_assessment("kelpie-creek-shed")
    full = _page1(_sheet(a.with_site(a.site.with_changes(
        client="Creek Co-op", address="", reference="KC-7"))))
    assert full["prepared-for"] == "Prepared for Creek Co-op · reference KC-7"   # no hole
    none = _page1(_sheet(a))
    assert "prepared-for" not in none                         # no label at all when blank
    assert none["prepared"] == "Prepared 12 May 2025 by Jane Doe, Example Solar Ltd"


@pytest.mark.parametrize("demo, basis, heading", [
    ("larkmoor-dairy", "on the site's monthly irradiation values", "This roof as it is"),
    ("coral-lane-clinic", "clear sky: upper bound only", "Best fixed tilt for"),
    ("tarnvik-cabin", "clear sky: upper bound only", "Recommended for the weakest month"),
])
def test_the_lead_names_basis_and_mounting(qapp, demo, basis, heading):
    doc = _sheet(demo_assessment(demo))
    p1 = _page1(doc)
    assert p1["key.heading"].startswith("Key figures · " + heading)
    assert p1["key.heading"].endswith(basis)
    texts = " ".join(o.text for o in doc.pages[0].texts())
    if "clear sky" in basis:
        assert "every figure here is an upper bound" in texts
        assert "weather file would give an expected value" in texts
    assert "10° or steeper" in texts                          # the minimum tilt line
    assert "Weakest" in texts


def test_the_clinic_keeps_the_minimum_tilt_and_the_cabin_names_its_dark_months(qapp):
    clinic = _sheet(demo_assessment("coral-lane-clinic"))
    for opt in clinic.figures.study.options:
        if opt.kind in ("fixed-optimal", "two-season", "four-season", "monthly"):
            assert all(p.tilt_deg >= 10.0 for p in opt.schedule), opt.label
    cabin = _sheet(demo_assessment("tarnvik-cabin"))
    texts = " ".join(o.text for o in cabin.pages[0].texts())
    assert "Weakest sunlit month" in texts and "almost no sun" in texts
    assert "does not rise at all" in texts                    # polar night dates


def test_cli_client_flags(tmp_path, qapp):
    out = tmp_path / "s.pdf"
    rc = cli_main(["sheet", "kelpie-creek-shed", "-o", str(out), "--tilt-step", "5",
                   "--client", "Creek Co-op", "--reference", "KC-7", "--prepared",
                   "2025-05-12"])
    assert rc == 0
    text = " ".join(" ".join(p.extract_text() for p in
                             pypdf.PdfReader(io.BytesIO(out.read_bytes())).pages).split())
    assert "Prepared for Creek Co-op · reference KC-7" in text
    assert load_demo("kelpie-creek-shed").client == ""          # the demo is unchanged


def test_a_full_client_block_on_letter_keeps_every_key_row_whole(qapp):
    # the client block takes page 1 lines from the charts; their keys widen instead of
    # dropping or cutting a row (seen: "Two-axis (ceiling): 2739 kWh/…" and the sun
    # chart's last two rows missing on Letter at the cabin)
    a = demo_assessment("tarnvik-cabin")
    a = a.with_site(a.site.with_changes(client="Fjord Cabins Ltd", address="Tarnvik 12",
                                        reference="Q-2026-114"))
    doc = lay_out(assess(a).sheet_data(), META, "letter").document
    legend = [o for o in doc.pages[0].texts() if o.role == "legend"]
    text = " ".join(" ".join(o.text for o in legend).split())
    assert "…" not in text
    for words in ("December solstice", "June solstice", "hour lines", "terrain and obstacles",
                  "Two-axis (ceiling)", "a year"):
        assert words in text, words
