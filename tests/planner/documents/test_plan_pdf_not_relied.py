"""The plan PDF says why a scrubber is relied on nowhere, as the terminal does.

A copy of the scrubber sample (``areas_sample``, fictional) whose scrubber's load range is
95-100 % MCR: the main engine runs at 85 % MCR at 14 kn (the ship file's reference point)
and the generators at 60 % of their rating, so no leg qualifies and the plan relies on the
scrubber nowhere (README "Scrubbers in the plan", rule 4). ``changeover plan VOYAGE --pdf``
is run as a user runs it and the PDF read back with pdftotext (``-raw``, white space made
single spaces): its section "Scrubber" must carry "Scrubber egcs is not relied on: " and
the JSON's own ``not_relied_on`` reason, word for word. Before, the section was left out
and the reason was only in the terminal and the JSON. The unchanged sample (relied on)
prints no such line; a document with one more scrubber relied on nowhere prints the line
beneath the events table.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers.paths import ROOT
from tests.helpers.pdf import pdf_flat, pdf_pages

pytestmark = pytest.mark.requires_poppler

LINE = "Scrubber egcs is not relied on: "


def _run(cwd: Path, *args: str) -> subprocess.CompletedProcess:
    env = {**os.environ, "PYTHONDONTWRITEBYTECODE": "1"}
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def nowhere(tmp_path_factory) -> tuple[dict, Path]:
    d = tmp_path_factory.mktemp("not_relied")
    shutil.copytree(ROOT / "areas_sample", d, dirs_exist_ok=True)
    ship = d / "ship_egcs.toml"
    text = ship.read_text(encoding="utf-8")
    assert "min_load_pct = 0.0" in text and "max_load_pct = 110.0" in text
    ship.write_text(text.replace("min_load_pct = 0.0", "min_load_pct = 95.0")
                    .replace("max_load_pct = 110.0", "max_load_pct = 100.0"), encoding="utf-8")
    r = _run(d, "plan", "egcs_voyage.toml", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    r = _run(d, "plan", "egcs_voyage.toml", "--pdf", "plan.pdf")
    assert r.returncode == 0, r.stderr
    return doc, d / "plan.pdf"


def test_the_plan_relies_on_the_scrubber_nowhere(nowhere):
    doc, _ = nowhere
    assert doc["scrubber_spans"] == [] and doc["scrubber_events"] == []
    why = doc["scrubbers"][0]["not_relied_on"]
    assert why.startswith("the engines it serves run outside its load range 95-100 % MCR on "
                          "every leg sailed (main_engine load 85.0 % MCR at 14.0 kn")


def test_the_pdf_says_why_in_its_scrubber_section(nowhere):
    doc, pdf = nowhere
    why = " ".join(doc["scrubbers"][0]["not_relied_on"].split())
    pages = pdf_pages(pdf)
    on = [p for p in pages if LINE in p]
    assert len(on) == 1, "the line is printed once"
    page = on[0]
    assert f"{LINE}{why}." in page
    head = "Scrubber No scrubber event: the plan relies on no scrubber on this voyage."
    assert head in page and page.index(head) < page.index(LINE)


def _sample_doc() -> dict:
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    return plan_json(build_plan(ROOT / "areas_sample" / "egcs_voyage.toml"))


def test_the_sample_relied_on_prints_no_such_line(tmp_path):
    from planner.documents.plan_pdf import write_plan_pdf

    doc = _sample_doc()
    assert doc["scrubbers"][0]["not_relied_on"] is None
    write_plan_pdf(tmp_path / "plan.pdf", doc)
    text = pdf_flat(tmp_path / "plan.pdf")
    assert "Scrubber events, in time order" in text
    assert "is not relied on" not in text


def test_a_second_scrubber_relied_on_nowhere_is_named_beneath_the_events(tmp_path):
    """A hand-made second scrubber (fictional) with a reason, beside the sample's relied-on
    one: the line comes after the events table's note, before the "if it fails" tables."""
    from planner.documents.plan_pdf import write_plan_pdf

    doc = _sample_doc()
    doc["scrubbers"].append({**doc["scrubbers"][0], "name": "aux_egcs",
                             "not_relied_on": "it serves no whole circuit"})
    write_plan_pdf(tmp_path / "plan.pdf", doc)
    text = pdf_flat(tmp_path / "plan.pdf")
    line = "Scrubber aux_egcs is not relied on: it serves no whole circuit."
    assert text.count(line) == 1
    note = "Numbered S1, S2 ... as on the route map"
    assert note in text and text.index(note) < text.index(line)
    assert "Scrubber egcs is not relied on" not in text


def test_readme_scrubbers_in_the_plan_tells_of_the_reason():
    """README's section "Scrubbers in the plan" names the JSON key and the printed line
    (terminal and PDF)."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    section = text.split("#### Scrubbers in the plan\n", 1)[1].split("\n#### ", 1)[0]
    flat = " ".join(section.split())
    assert "`not_relied_on`" in flat
    assert '"Scrubber egcs is not relied on: …"' in flat
    assert "PDF in its section **Scrubber**" in flat
