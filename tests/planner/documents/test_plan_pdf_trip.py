"""The plan PDF's "if the scrubber fails" and SO2/CO2 tables (the scrubber section).

The scrubber sample (areas_sample/egcs_voyage.toml, fictional) as ``changeover plan --pdf``
builds it: the plan's document with its ``scrubber_trip``. The PDF is read back with
pdftotext (cell by cell, ``-raw``); every figure the tables must show is the document's own
(the terminal prints the same), formatted here by hand: hours to two decimals with the
minutes, times to the minute in UTC, positions in degrees and minutes to 0.1' (the sample's
ship's time is UTC+12:00 before its zone change, UTC-11:00 after). A document without the
keys (a plan without a scrubber) prints neither table.
"""

from __future__ import annotations

import pytest

from tests.helpers.paths import ROOT
from tests.helpers.pdf import pdf_flat

pytestmark = pytest.mark.requires_poppler


def hm(h: float) -> str:
    """``1.91 h (114 min)``, by hand."""
    return f"{h:.2f} h ({h * 60:.0f} min)"


def utc_cell(iso: str) -> str:
    """``2027-05-30 09:14Z`` of ``2027-05-30T09:14:05Z`` (to the minute, cut not rounded)."""
    return f"{iso[:10]} {iso[11:16]}Z"


def ship_cell(iso: str) -> str:
    """``2027-05-30 21:14 (+12:00)`` of ``2027-05-30T21:14+12:00``."""
    return f"{iso[:10]} {iso[11:16]} ({iso[16:]})"


def dm(value: float, hemi: str) -> str:
    """Degrees and minutes to 0.1', by hand: -39.5694 → 39°34.2'S."""
    a = abs(value)
    deg, minutes = int(a), round((abs(value) - int(a)) * 60.0, 1)
    if minutes >= 60.0:
        deg, minutes = deg + 1, 0.0
    return f"{deg}°{minutes:04.1f}'{hemi[0] if value >= 0 else hemi[1]}"


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    from planner.documents.plan_pdf import write_plan_pdf
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan
    from planner.voyage.scrubber_trip import plan_trip_leads
    from planner.voyage.scrubber_trip_json import trip_json

    out = tmp_path_factory.mktemp("trip_pdf")
    plan = build_plan(ROOT / "areas_sample" / "egcs_voyage.toml")
    doc = plan_json(plan)
    write_plan_pdf(out / "bare.pdf", doc)  # the document without scrubber_trip
    doc.update(trip_json(plan, plan_trip_leads(plan)))
    write_plan_pdf(out / "plan.pdf", doc)
    return doc, pdf_flat(out / "plan.pdf"), pdf_flat(out / "bare.pdf")


def test_the_boundary_table_is_in_the_pdf(sample):
    doc, t, _ = sample
    assert "If the scrubber fails at a boundary (times from the failure) Circuit Change if it " \
           "fails To compliant Out of compliance Compliant UTC Compliant ship's time" in t
    rows = doc["scrubber_trip"]["boundaries"]
    assert len(rows) == 7  # the sample's seven boundaries passed on egcs (the terminal's)
    words = {"enter": "entered on the scrubber",
             "inside_at_start": "on the scrubber from here, inside the area"}
    for r in rows:
        head = (f"{r['area']}: {words[r['event']]} ({r['scrubber']}) {utc_cell(r['utc'])}, "
                f"ship's time {r['ship_time'][:10]} {r['ship_time'][11:16]} "
                f"(UTC{r['ship_time'][16:]}), at {dm(r['lat'], 'NS')} {dm(r['lon'], 'EW')}, "
                f"{r['distance_nm']:,.1f} nm from departure")
        row = (f"{r['circuit']} {r['fuel']} to {r['fallback_fuel']} "
               f"{hm(r['time_to_compliant_h'])} {hm(r['out_of_compliance_h'])} "
               f"{utc_cell(r['compliant_utc'])} {ship_cell(r['compliant_ship_time'])}")
        assert f"{head} {row}" in t, row
    # the sample's figures as the terminal prints them (areas_sample, fictional)
    assert "main hsfo to mgo 1.91 h (114 min) 1.91 h (114 min) 2027-05-30 09:14Z " \
           "2027-05-30 21:14 (+12:00)" in t
    assert "2.83 h (170 min) 2.83 h (170 min) 2027-06-02 02:23Z 2027-06-01 15:23 (-11:00)" in t


def test_the_longest_table_is_in_the_pdf(sample):
    doc, t, _ = sample
    assert "Longest time out of compliance along each span on a scrubber" in t
    spans = doc["scrubber_trip"]["spans"]
    assert len(spans) == 12
    for s in spans:
        (w,) = s["worst"]
        row = (f"{s['scrubber']} {w['circuit']} {utc_cell(s['from_utc'])} "
               f"{utc_cell(s['to_utc'])} {hm(w['out_of_compliance_h'])} "
               f"{utc_cell(w['utc'])} {dm(w['lat'], 'NS')} {dm(w['lon'], 'EW')}")
        assert row in t, row
    # the failure at the valve switch into hsfo (21:20Z) is not the worst of the first span
    assert "egcs main 2027-05-29 21:20Z 2027-05-30 07:20Z 2.05 h (123 min) 2027-05-30 00:05Z" \
           in t
    assert "A failure while the changeover into that fuel is still under way starts from " \
           "the state it has reached." in t


def test_the_ratio_table_is_in_the_pdf(sample):
    doc, t, _ = sample
    assert "SO2/CO2 of the fuel burnt on a scrubber, by stretch From nm To nm Limit % m/m " \
           "Ratio limit Uncleaned ratio Removal needed %" in t
    assert "Circuit main on hsfo, scrubber egcs: 2.60 % m/m sulphur, 84.93 % m/m carbon" in t
    n = 0
    for st in doc["stretches"]:
        for x in st.get("scrubbed", []):
            n += 1
            row = (f"{st['from_nm']:,.1f} {st['to_nm']:,.1f} {st['limit_pct']:.2f} "
                   f"{st['ratio_limit']:.1f} {x['uncleaned_ratio']:.1f} "
                   f"{x['so2_removal_needed_pct']:.1f}")
            assert row in t, row
    assert n == 8
    # the terminal's rows (areas_sample): 0.10 % limit, 4.3 against 114.7 ppm/%: 96.3 %
    assert "186.8 326.3 0.10 4.3 114.7 96.3" in t
    assert "1,077.9 1,219.6 0.10 4.3 114.7 96.3" in t


def test_a_document_without_the_keys_prints_neither_trip_table(sample):
    _, _, bare = sample
    assert "If the scrubber fails" not in bare
    assert "Longest time out of compliance" not in bare
    assert "SO2/CO2 of the fuel burnt on a scrubber" in bare  # from the stretches alone


def test_no_scrubber_no_tables(tmp_path):
    from planner.documents.plan_pdf import write_plan_pdf
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    doc = plan_json(build_plan(ROOT / "areas_sample" / "voyage.toml"))
    write_plan_pdf(tmp_path / "plan.pdf", doc)
    t = pdf_flat(tmp_path / "plan.pdf")
    assert "Changeovers, by boundary" in t
    assert "If the scrubber fails" not in t
    assert "SO2/CO2 of the fuel burnt on a scrubber" not in t


def test_a_lead_without_a_figure_prints_its_reason(sample, tmp_path):
    """A boundary row whose flush cannot be followed: dashes for the hours, its reason (markup
    characters printed as they are) across both 'compliant' columns."""
    import copy

    from planner.documents.plan_pdf import write_plan_pdf

    doc = copy.deepcopy(sample[0])
    r = doc["scrubber_trip"]["boundaries"][0]
    r.update(time_to_compliant_h=None, out_of_compliance_h=None, compliant_utc=None,
             compliant_ship_time=None, problem="tank mgo_service runs dry <&> at 0.5 h")
    write_plan_pdf(tmp_path / "plan.pdf", doc)
    t = pdf_flat(tmp_path / "plan.pdf")
    assert f"{r['circuit']} {r['fuel']} to {r['fallback_fuel']} — — tank mgo_service runs dry " \
           "<&> at 0.5 h" in t
