"""``changeover nonavailability``: the fuel oil non-availability report (PDF) for a voyage.

Builds the plan, gathers the report's facts (:mod:`planner.voyage.shortfall_facts`:
the ship, the voyage plan and its area entries, the compliant fuel needed and on
board, where it runs out, the purchase attempts and bunker ports of the voyage
file, the shortfall plan's alternatives) and, with ``--journal``, the ship's
identity and the latest tank soundings and fuel entries from the journal (read
only). Everything is computed before the PDF is written; bad input writes nothing.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.log_options import NameOpt, RankOpt
from planner.cli.options import JsonOpt

if TYPE_CHECKING:
    from planner.journal.state import JournalState


def nonavailability_cmd(
    voyage: Annotated[Path, typer.Argument(help="Voyage file (TOML) with its "
                                           "[[purchase_attempt]] and [[bunker_port]] tables.")],
    pdf: Annotated[Path | None, typer.Option(help="The report to write (PDF).")] = None,
    journal: Annotated[Path | None, typer.Option(help="The ship's journal: its ship identity, "
                                                 "latest tank soundings and fuel entries go "
                                                 "into the report, and the report is "
                                                 "recorded in it (a report entry with the "
                                                 "PDF's bytes).")] = None,
    rank: RankOpt = None,
    name: NameOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """The fuel oil non-availability report (MARPOL Annex VI regulation 18.2) as a PDF.

    Advisory: the master decides, signs and sends it; notifying the Administration and
    the next port's authority is the ship's duty.
    """
    from geo.errors import InputError
    from planner.common.outputs import check_outputs

    if pdf is None:
        raise InputError("--pdf", "", None, "the PDF file to write, e.g. --pdf fonar.pdf")
    check_outputs({"--pdf": pdf})
    if journal is not None:
        _check_signer(rank, name)
    from planner.cli.progress import status
    from planner.voyage import run
    from planner.voyage.report import plan_json
    from planner.voyage.shortfall_facts import nonavailability_facts

    with status("planning", json_out) as say:
        plan = run.build_plan(voyage, say)
    facts = nonavailability_facts(plan, plan_json(plan))
    facts["journal"] = None
    if journal is not None:
        facts["journal"] = journal_facts(journal, facts["ship"])
        facts["ship"]["name"] = facts["journal"]["ship_name"] or facts["ship"]["name"]
    from planner.documents.nonavailability_pdf import write_nonavailability_pdf

    write_nonavailability_pdf(pdf, facts)
    facts["pdf"] = str(pdf)
    facts["journal_entry"] = None
    if journal is not None:
        facts["journal_entry"] = _record(journal, pdf, facts, rank or "", name or "")
    if json_out:
        from planner.common.outputs import dumps

        typer.echo(dumps(facts))
        return
    _print(facts, pdf)


def _check_signer(rank: str | None, name: str | None) -> None:
    """Who records the report in the journal: rank and name, checked before anything is
    written."""
    from geo.errors import InputError

    for opt, v in (("--rank", rank), ("--name", name)):
        if not v or not v.strip():
            raise InputError(opt, "", None, "who records the report in the journal: rank and "
                             "name as they sign (or set CHANGEOVER_RANK and CHANGEOVER_NAME)")


def _record(journal: Path, pdf: Path, facts: dict, rank: str, name: str) -> int:
    """The report recorded in the journal (its bytes kept); the new entry's number."""
    from datetime import UTC, datetime

    from planner.documents.nonavailability_pdf import TITLE
    from planner.journal.reports import record_document

    sf = facts["shortfall"]
    short = "; ".join(f"{f['fuel']} {f['short_t']:.1f} t short" for f in sf["fuels"]) if sf \
        else "no compliant fuel short in the plan"
    note = (f"voyage file {facts['voyage_plan']['file']}: {short}; "
            f"{len(facts['purchase_attempts'])} purchase attempt(s)")
    return record_document(journal, pdf, "nonavailability", TITLE, datetime.now(UTC), name,
                           note, rank=rank, voyage=facts["voyage_plan"]["voyage"])


def journal_facts(path: Path, ship: dict) -> dict:
    """The journal's part of the report: ship identity, the latest sounding of each tank
    and the fuel entries (read only; refused when it is another ship's journal).

    Parameters
    ----------
    path : Path
        The journal file.
    ship : dict
        The report's ship (name and IMO number from the ship file).
    """
    from geo.errors import InputError
    from planner.journal.store import Journal

    with Journal.open_read(path, option="--journal") as j:
        state = j.state()
    if state.imo_number and ship["imo"] and state.imo_number != ship["imo"]:
        raise InputError("--journal", "ship", f"IMO {state.imo_number}",
                         f"the journal of {ship['name']}, IMO {ship['imo']}")
    return {"file": str(path), "ship_name": state.ship_name, "imo": state.imo_number,
            "entries": state.last_seq, "tanks": latest_soundings(state),
            "fuels": fuel_entries(state)}


def latest_soundings(state: JournalState) -> list[dict]:
    """The latest live sounding of each tank (tank-sounding entries and changeover steps),
    in tank-name order.

    Parameters
    ----------
    state : JournalState
        The journal as it stands.
    """
    from planner.common.timefmt import iso_utc
    from planner.journal.entries import CORRECTION, FUEL, SETUP

    kinds = {s.entry.kind for s in state.originals()} - {CORRECTION, FUEL, SETUP}
    latest: dict[str, dict] = {}
    for s, r in state.live(kinds):
        for t in getattr(r.details, "tanks", ()) or ():
            if not hasattr(t, "volume15_m3"):
                continue
            old = latest.get(t.tank)
            if old is None or r.time_utc >= old["_at"]:
                latest[t.tank] = {"_at": r.time_utc, "tank": t.tank, "fuel": t.fuel,
                                  "volume_m3": t.volume_m3, "temperature_c": t.temperature_c,
                                  "volume15_m3": t.volume15_m3, "mass_t": t.mass_t,
                                  "utc": iso_utc(r.time_utc), "entry": s.seq}
    return [{k: v for k, v in latest[n].items() if k != "_at"} for n in sorted(latest)]


def fuel_entries(state: JournalState) -> list[dict]:
    """The live fuel entries (delivery-note items), in entry order.

    Parameters
    ----------
    state : JournalState
        The journal as it stands.
    """
    from planner.journal.entries import FUEL

    out = []
    for s, r in state.live([FUEL]):
        f = r.details.fuel
        out.append({"entry": s.seq, "name": f.name, "grade": f.grade,
                    "sulphur_pct": f.sulphur_pct, "density15_kg_m3": f.density15_kg_m3,
                    "bdn_ref": f.bdn_ref, "port": f.port or None,
                    "bunkered_on": f.bunkered_on or None, "supplier": f.supplier or None,
                    "quantity_t": f.quantity_t})
    return out


def _print(facts: dict, pdf: Path) -> None:
    """What was written, and the shortfall's first lines."""
    from planner.cli.console import echo_lines, text_lines, width

    cols = width()
    sf = facts["shortfall"]
    out = []
    if sf is None:
        out += text_lines("The plan finds enough compliant fuel on board for the voyage; the "
                          "report says so and keeps the purchase attempts on record.", cols)
    else:
        for f in sf["fuels"]:
            out += text_lines(f["advice"][0], cols)
        if sf["must_notify"]:
            out += text_lines("Neither a lower speed nor a bunker port on the way makes the "
                              "compliant fuel suffice: the ship must notify its Administration "
                              "and the next port's authority (regulation 18.2).", cols)
    n = len(facts["purchase_attempts"])
    out += text_lines(f"wrote {pdf}: fuel oil non-availability report of {facts['ship']['name']}"
                      f", {n} purchase attempt(s), to be completed and signed by the master",
                      cols)
    if facts.get("journal_entry") is not None:
        out += text_lines(f"recorded in the journal {facts['journal']['file']} as entry "
                          f"{facts['journal_entry']} (report, the PDF's bytes kept)", cols)
    echo_lines(out)
