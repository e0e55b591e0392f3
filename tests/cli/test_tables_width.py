"""Terminal tables never cut a time, a position, an identifier or a number (issue 12).

Every table of ``plan``, ``route``, ``flush`` and ``procedure`` is printed on a
terminal 80 and 120 columns wide and piped to a file, and every time, position
and number of the command's own ``--json`` document is looked for, whole, on one
line of the text. The values are written out by the independent formatters of
``tests/helpers/terminal.py`` (degrees and minutes to 0.1', times to the minute).
No line is wider than the terminal and none ends in spaces.
"""

from __future__ import annotations

import json
import re

import pytest

from tests.helpers.terminal import moment, on_tty, piped, position, utc_full

PLAN = ["plan", "areas_sample/voyage.toml"]
ROUTE = ["route", "areas_sample/aldmere_to_skarvik.csv", "--areas", "areas_sample",
         "--depart", "2027-05-30T06:00+12:00"]
FLUSH = ["flush", "areas_sample/voyage.toml", "--table"]
FLUSH_BACK = ["flush", "areas_sample/voyage.toml", "--from", "mgo", "--to", "vlsfo"]
PROCEDURE = ["procedure", "areas_sample/ship.toml", "--csv"]
WIDTHS = (80, 120, None)  # None: piped


def outputs(args: list[str]) -> dict[int | None, str]:
    return {w: (piped(args) if w is None else on_tty(args, w)) for w in WIDTHS}


@pytest.fixture(scope="module")
def plan():
    return json.loads(piped([*PLAN, "--json"])), outputs(PLAN)


def check_lines(text: str, width: int | None) -> None:
    for line in text.splitlines():
        assert line == line.rstrip(), f"trailing spaces: {line!r}"
        assert "…" not in line, f"cut: {line!r}"
        if width is not None and not line.startswith("wrote "):  # a path is never broken
            assert len(line) <= width, f"{len(line)} > {width}: {line!r}"


def on_a_line(token: str, text: str) -> bool:
    return any(token in line for line in text.splitlines())


def blocks(text: str) -> dict[int, str]:
    """The text of each changeover's group: from its head to the next head or table end."""
    out, n, cur = {}, None, []
    for line in text.splitlines():
        m = re.match(r"Changeover (\d+): ", line)
        if m or line.startswith(("Start: switch", "Fuel on each stretch")):
            if n is not None:
                out[n] = "\n".join(cur)
            n, cur = (int(m.group(1)), []) if m else (None, [])
        if n is not None:
            cur.append(line)
    return out


def time_shown(iso: str, block: str, ship: bool = False) -> bool:
    """The time whole in the block: in full, or ``HH:MM`` with its date in the head."""
    t = moment(iso)
    if not ship:
        day, hm = t.strftime("%Y-%m-%d"), t.strftime("%H:%MZ")
        return on_a_line(utc_full(iso), block) or (
            on_a_line(f"UTC on {day}", block) and on_a_line(hm, block))
    off = iso[-6:]
    day, hm = t.strftime("%Y-%m-%d"), t.strftime("%H:%M")
    return on_a_line(f"{day} {hm} ({off})", block) or (
        on_a_line(f"ship's time on {day} ({off})", block) and on_a_line(hm, block))


@pytest.mark.parametrize("width", WIDTHS)
def test_plan_changeovers_whole(plan, width):
    doc, texts = plan
    text = texts[width]
    check_lines(text, width)
    got = blocks(text)
    assert sorted(got) == sorted({r["number"] for r in doc["changeovers"]})
    for r in doc["changeovers"]:
        b = got[r["number"]]
        assert on_a_line(f"Changeover {r['number']}: {r['area']}", b)
        assert on_a_line(utc_full(r["boundary_utc"]), b)  # the boundary in full, in the head
        assert on_a_line(position(r["boundary_lat"], r["boundary_lon"]), b)
        assert on_a_line(f"{r['boundary_nm']:,.1f} nm", b)
        assert on_a_line(r["circuit"], b)
        assert time_shown(r["start_utc"], b)
        assert time_shown(r["start_ship_time"], b, ship=True)
        assert on_a_line(position(r["start_lat"], r["start_lon"]), b)
        down = r["direction"] == "to_compliant"
        key = "compliant" if down else "complete"
        assert time_shown(r[f"{key}_utc"], b)
        assert on_a_line(position(r[f"{key}_lat"], r[f"{key}_lon"]), b)
        assert on_a_line(f"{r['duration_h']:.2f}", b)
        if down:
            assert on_a_line(f"{r['margin_h']:.2f}", b)


@pytest.mark.parametrize("width", WIDTHS)
def test_plan_fuel_tables_whole(plan, width):
    doc, texts = plan
    text = texts[width]
    for s in doc["stretches"]:
        assert on_a_line(f"{s['from_nm']:,.1f}", text) and on_a_line(f"{s['to_nm']:,.1f}", text)
        assert on_a_line(utc_full(s["from_utc"]), text)
    for f, x in doc["fuel_totals"].items():
        for k in ("needed_t", "needed_m3_15c", "on_board_t"):
            assert on_a_line(f"{x[k]:.1f}", text), (f, k)
    for a, x in doc["so2"]["areas"].items():
        assert on_a_line(f"{x['so2_kg']:,.0f}", text) and on_a_line(a, text)


def test_plan_narrow_is_stacked_wide_is_columns(plan):
    _, texts = plan
    assert "Start position: " in texts[80]  # one block per changeover, Header: value
    assert "Start position" in texts[None] and "Start position: " not in texts[None]
    # a piped line carries its values without padding to 160 columns
    assert max(len(line) for line in texts[None].splitlines()) <= 160


@pytest.fixture(scope="module")
def route():
    return json.loads(piped([*ROUTE, "--json"])), outputs(ROUTE)


@pytest.mark.parametrize("width", WIDTHS)
def test_route_tables_whole(route, width):
    doc, texts = route
    text = texts[width]
    check_lines(text, width)
    for c in doc["crossings"]:
        assert on_a_line(position(c["lat"], c["lon"]), text)
        assert on_a_line(utc_full(c["time_utc"]), text)
        assert on_a_line(f"{c['distance_nm']:,.2f}", text)
        assert re.search(rf"\b{c['event']}\b", text)
    for s in doc["stretches"]:
        assert on_a_line(f"{s['to_nm'] - s['from_nm']:,.2f}", text)
        assert on_a_line(utc_full(s["to_utc"]), text)
    for a in doc["areas"]:
        assert on_a_line(f"{a['inside_nm']:,.2f}", text) and on_a_line(f"{a['inside_h']:,.2f}",
                                                                        text)


@pytest.mark.parametrize("args", [FLUSH, FLUSH_BACK], ids=["to_compliant", "back"])
def test_flush_tables_whole(args):
    doc = json.loads(piped([*args, "--json"]))
    for width, text in outputs(args).items():
        check_lines(text, width)
        for c in doc["circuits"]:
            assert on_a_line(c["name"], text)
            limit_h = c["time_to_limit_h"]
            assert on_a_line(f"{limit_h:.2f} h ({limit_h * 60:.0f} min)", text)
            done = c["time_to_target_h"] if c["direction"] == "to_compliant" \
                else c["back_on_regular_h"]
            assert on_a_line(f"{done:.2f} h ({done * 60:.0f} min)", text)
            assert on_a_line(f"{c['min_viscosity_cst']:.1f}-{c['max_viscosity_cst']:.1f}", text)
        for rows in doc.get("table", {}).values():
            for r in rows:
                assert on_a_line(f"{r['time_to_target_h']:.2f}", text)
                assert on_a_line(f"{r['speed_kn']:.1f}", text)


def test_procedure_table_whole(tmp_path):
    args = [*PROCEDURE, str(tmp_path / "csv")]
    doc = json.loads(piped(["procedure", "areas_sample/ship.toml", "--json"]))
    for width, text in outputs(args).items():
        check_lines(text, width)
        for c in doc["circuits"]:
            for r in c["rows"]:
                assert on_a_line(f"{r['time_to_target_h']:.2f}", text)
                assert on_a_line(f"{r['start_before_h']:.2f}", text)


def test_plan_confidence_table_whole():
    args = [*PLAN, "--confidence", "0.9", "--samples", "100"]
    doc = json.loads(piped([*args, "--json"]))
    rows = [r for r in doc["changeovers"] if "start_p50_utc" in r]
    assert rows
    for width, text in outputs(args).items():
        check_lines(text, width)
        for r in rows:
            assert on_a_line(utc_full(r["start_p50_utc"]), text)
            assert on_a_line(utc_full(r["start_confidence_utc"]), text)
            assert on_a_line(f"{r['lead_confidence_h']:.2f}", text)


def test_flush_uncertainty_tables_whole():
    args = ["flush", "areas_sample/ship.toml", "--circuit", "main", "--confidence", "0.9",
            "--samples", "100"]
    doc = json.loads(piped([*args, "--json"]))
    u = doc["circuits"][0]["uncertainty"]
    for width, text in outputs(args).items():
        check_lines(text, width)
        assert on_a_line(f"{u['lead_at_confidence_h']:.2f}", text)
        assert on_a_line(f"{u['time_to_target_at_confidence_h']:.2f}", text)
        for s in u["swings"]:
            assert on_a_line(f"{s['low']:.4f} % m/m" if s["unit"] == "% m/m" else
                             f"{s['low']:.3f}", text)
        # no quantile beyond the analysis horizon is printed as a number
        assert not re.search(r"\d{9,}", text)


def test_readme_excerpt_is_the_real_output_at_80_columns(plan):
    from tests.helpers.paths import ROOT

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    marker = "A real excerpt, at 80 columns:\n\n```\n"
    assert marker in readme
    excerpt = readme.split(marker, 1)[1].split("\n```", 1)[0]
    _, texts = plan
    assert excerpt in texts[80]
    assert all(len(line) <= 80 for line in excerpt.splitlines())
