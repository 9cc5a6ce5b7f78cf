"""Findings travel with the data: a measurement with an open error finding is *flagged*.

It is marked in ``list``, ``find``, ``show``, their ``--json``/``--csv``, the HTML report and
plots; it is left out of aggregates (``find --compounds`` ranges, the overview plot, paper
tables, the report's ranges) unless asked for, and footnoted when it is included; ``list`` and
``find`` select clean or flagged rows; and the status follows the findings through check,
accept, edit and resolve, every change in the history.

The registry is invented demo data on real structures. Which values are wrong is planted by
construction: ΔG‡(Tc) is computed here from Tc and Δν with the Gutowsky–Holm rate constant
k_c = πΔν/√2 (H. S. Gutowsky and C. H. Holm, J. Chem. Phys. 25, 1228 (1956)) and the Eyring
equation ΔG‡ = RT·ln(k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)) with CODATA
constants from ``scipy.constants`` — not from the code under test. A clean entry reports that
value (rounded to 0.01 kJ/mol, well inside the 1 kJ/mol tolerance); a flagged one is 5 or 8
kJ/mol off. FT-D reports ΔG‡(298.15 K) = 70 kJ/mol beside ΔH‡ = 60 kJ/mol and ΔS‡ = 0, which
disagrees with ΔG‡ = ΔH‡ − TΔS‡ = 60 kJ/mol (Gibbs) by 10 kJ/mol.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import math
from pathlib import Path
from typing import Any

import pytest
from scipy import constants as codata

from registry import api
from registry.errors import OpenFindingError, UsageError
from registry.record.entry import EntryInput
from registry.storage import audit
from registry.storage.database import Database
from registry.validation import accept_finding, check_measurements
from registry.validation.rule_coalescence import CoalescenceBarrier

pytest_plugins = ("conftest_pg",)


def dg_at_tc(tc_k: float, dnu_hz: float) -> float:
    """ΔG‡(Tc) in kJ/mol from Gutowsky–Holm and Eyring with CODATA constants (see above)."""
    k_c = math.pi * dnu_hz / math.sqrt(2)
    return codata.R * tc_k * math.log(codata.k * tc_k / (codata.h * k_c)) / 1000.0


def eyring_k(t_k: float) -> float:
    """k = (k_B·T/h)·exp(−ΔG‡/RT) with ΔH‡ 60 kJ/mol, ΔS‡ 0 (Eyring 1935); CODATA."""
    return codata.k * t_k / codata.h * math.exp(-60000.0 / (codata.R * t_k))


A1_DG = dg_at_tc(300.0, 50.0)  # clean
A2_DG = dg_at_tc(300.0, 50.0) - 8.0  # flagged: the low end of FT-A's range, if let in
B_DG = dg_at_tc(320.0, 40.0)  # clean
C_DG = dg_at_tc(220.0, 100.0) + 5.0  # flagged, the only value of FT-C


def _coalescence(label: str, compound: str, smiles: str, process: str, solvent: str,
                 tc: float, dnu: float, dg: float) -> EntryInput:  # fmt: skip
    return EntryInput(
        method="coalescence", label=label, compound=compound, smiles=smiles, process=process,
        nucleus="1H", solvent=solvent, field="400 MHz", tc=f"{tc} K", dnu=f"{dnu} Hz",
        dg=f"{dg:.2f} kJ/mol", reference="invented demo value",
    )  # fmt: skip


ENTRIES = {
    "a1": _coalescence("a1", "FT-A", "CC(=O)N(C)C", "bond-rotation", "CDCl3", 300, 50, A1_DG),
    "a2": _coalescence("a2", "FT-A", "CC(=O)N(C)C", "bond-rotation", "toluene-d8", 300, 50, A2_DG),
    "b": _coalescence("b", "FT-B", "O=CN(C)C", "bond-rotation", "CDCl3", 320, 40, B_DG),
    "c": _coalescence("c", "FT-C", "C1CCCCC1", "ring-inversion", "CD2Cl2", 220, 100, C_DG),
    "d": EntryInput(
        method="lineshape", label="d", compound="FT-D", smiles="Cc1ccccc1-c1ccccc1C",
        process="bond-rotation", solvent="toluene-d8", dh="60 kJ/mol", ds="0 J/(mol*K)",
        dg="70 kJ/mol", dg_t="298.15 K", reference="invented demo value",
        rates=[(f"{t} K", f"{eyring_k(t):.10g} s-1") for t in (283.0, 293.0, 303.0, 313.0)],
    ),
}  # fmt: skip
FLAGGED = {"a2", "c", "d"}
CLEAN = {"a1", "b"}


def fill(database: Database) -> dict[str, int]:
    """Add the entries (each checked as ``add`` does); their ids by label."""
    return {label: api.add_measurement(database, e, actor="ada") for label, e in ENTRIES.items()}


@pytest.fixture
def filled(database: Database) -> tuple[Database, dict[str, int]]:
    return database, fill(database)


def _by_label(rows: list[dict[str, Any]], ids: dict[str, int]) -> dict[str, Any]:
    label_of = {v: k for k, v in ids.items()}
    return {label_of[r["id"]]: r for r in rows}


def _open_error(database: Database, mid: int) -> dict[str, Any]:
    (finding,) = [
        f
        for f in api.get_measurement(database, mid)["findings"]
        if f["severity"] == "error" and not f["accepted_by"]
    ]
    return finding


# ---------------------------------------------------------------- listings


def test_every_listing_row_says_whether_it_is_flagged(filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    rows = _by_label(api.list_measurements(database), ids)
    assert {label: r["flagged"] for label, r in rows.items()} == {
        "a1": 0, "a2": 1, "b": 0, "c": 1, "d": 1,
    }  # fmt: skip
    # the status says the same: the checks that ran after each add set it
    assert {label: r["status"] for label, r in rows.items()} == {
        "a1": "draft", "a2": "flagged", "b": "draft", "c": "flagged", "d": "flagged",
    }  # fmt: skip
    only_flagged = api.list_measurements(database, flagged=True)
    only_clean = api.list_measurements(database, flagged=False)
    assert {r["id"] for r in only_flagged} == {ids[x] for x in FLAGGED}
    assert {r["id"] for r in only_clean} == {ids[x] for x in CLEAN}
    with pytest.raises(UsageError, match="flagged 'yes'"):
        api.list_measurements(database, flagged="yes")


def test_list_marks_and_selects(cli, filled) -> None:  # type: ignore[no-untyped-def]
    _, ids = filled
    table = cli("list")
    assert table.exit_code == 0, table.stderr
    lines = table.stdout.splitlines()
    assert lines[0].split()[-2:] == ["status", "flagged"]
    marks = {int(line.split()[0]): line.split()[-1] for line in lines[2:]}
    assert marks == {
        ids["a1"]: "draft", ids["a2"]: "yes", ids["b"]: "draft", ids["c"]: "yes", ids["d"]: "yes",
    }  # fmt: skip
    flagged = json.loads(cli("list", "--flagged", "--json").stdout)
    assert sorted((r["id"], r["flagged"]) for r in flagged) == sorted((ids[x], 1) for x in FLAGGED)
    clean = list(csv.DictReader(io.StringIO(cli("list", "--clean", "--csv").stdout)))
    assert sorted(int(r["id"]) for r in clean) == sorted(ids[x] for x in CLEAN)
    assert {r["flagged"] for r in clean} == {"0"}
    both = cli("list", "--flagged", "--clean")
    assert (both.exit_code, both.stderr) == (2, "error: choose one of --flagged and --clean\n")


def test_find_marks_selects_and_keeps_flagged_values_out_of_ranges(cli, filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    amides = "[CX3](=O)[NX3]"
    table = cli("find", "--smarts", amides)
    assert table.exit_code == 0, table.stderr
    head, _, *body = table.stdout.splitlines()
    assert head.split()[8:10] == ["status", "flagged"]
    assert {int(line.split()[0]): "yes" in line.split() for line in body} == {
        ids["a1"]: False, ids["a2"]: True, ids["b"]: False,
    }  # fmt: skip
    assert table.stderr.endswith("; 1 of the rows shown flagged (an error finding is open)\n")
    as_json = json.loads(cli("find", "--smarts", amides, "--json").stdout)
    assert {r["id"]: r["flagged"] for r in as_json["measurements"]} == {
        ids["a1"]: 0, ids["a2"]: 1, ids["b"]: 0,
    }  # fmt: skip
    as_csv = list(csv.DictReader(io.StringIO(cli("find", "--smarts", amides, "--csv").stdout)))
    assert {int(r["id"]): r["flagged"] for r in as_csv} == {
        ids["a1"]: "0", ids["a2"]: "1", ids["b"]: "0",
    }  # fmt: skip
    clean = json.loads(cli("find", "--smarts", amides, "--clean", "--json").stdout)
    assert [r["id"] for r in clean["measurements"]] == [ids["a1"], ids["b"]]
    assert clean["query"]["filters"] == {"clean": True}
    flagged = json.loads(cli("find", "--smarts", amides, "--flagged", "--json").stdout)
    assert [r["id"] for r in flagged["measurements"]] == [ids["a2"]]

    # --compounds: FT-A's range is its clean value only, FT-C (only flagged values) has none
    every = json.loads(cli("find", "--smarts", "[#6]", "--compounds", "--json").stdout)
    ranges = {c["compound"]: c for c in every["compounds"]}
    assert ranges["FT-A"]["dg_min_kj_mol"] == pytest.approx(A1_DG, abs=0.006)
    assert ranges["FT-A"]["dg_max_kj_mol"] == pytest.approx(A1_DG, abs=0.006)
    assert (ranges["FT-A"]["measurements"], ranges["FT-A"]["flagged"]) == (2, 1)
    assert ranges["FT-C"]["dg_min_kj_mol"] is None and ranges["FT-C"]["flagged"] == 1
    text = cli("find", "--smarts", "[#6]", "--compounds")
    assert text.stderr.splitlines()[-1] == (
        "3 flagged measurement(s) not counted in the ranges (--include-flagged counts them)"
    )
    asked = json.loads(
        cli("find", "--smarts", "[#6]", "--compounds", "--json", "--include-flagged").stdout
    )
    ranges = {c["compound"]: c for c in asked["compounds"]}
    assert asked["include_flagged"] is True
    assert ranges["FT-A"]["dg_min_kj_mol"] == pytest.approx(A2_DG, abs=0.006)
    assert ranges["FT-A"]["dg_max_kj_mol"] == pytest.approx(A1_DG, abs=0.006)
    assert ranges["FT-C"]["dg_min_kj_mol"] == pytest.approx(C_DG, abs=0.006)
    # the same through the library
    found = api.find(database, smarts="[#6]")
    table_rows = {c["compound"]: c for c in found.compound_table()}
    assert table_rows["FT-A"]["values_in_range"] == 1
    assert {c["compound"]: c["values_in_range"] for c in found.compound_table(True)} == {
        "FT-A": 2, "FT-B": 1, "FT-C": 1, "FT-D": 1,
    }  # fmt: skip


def test_the_listing_cache_follows_findings_and_acceptances(filled, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    from registry.search import cachefile

    database, ids = filled

    def flags_from_csv() -> dict[int, str]:
        out = io.BytesIO()
        api.find(database, smarts="[CX3](=O)[NX3]", output="csv").write_csv(out)
        rows = csv.DictReader(io.StringIO(out.getvalue().decode("utf-8")))
        return {int(r["id"]): r["flagged"] for r in rows}

    assert flags_from_csv()[ids["a2"]] == "1"
    assert Path(f"{db_path}.listing").exists()  # the lines came from the listing file
    accept_finding(database, _open_error(database, ids["a2"])["id"], "checked", actor="ada")
    assert flags_from_csv()[ids["a2"]] == "0"
    # an acceptance taken back in plain SQL (no measurement row changes) is seen as well, by
    # this process and by a new one reading the listing file
    database.write(
        lambda conn: conn.execute(
            "UPDATE validation_finding SET accepted_by = NULL, accepted_at = NULL "
            "WHERE measurement_id = :id",
            {"id": ids["a2"]},
        )
    )
    assert flags_from_csv()[ids["a2"]] == "1"
    cachefile.forget()
    assert flags_from_csv()[ids["a2"]] == "1"


def test_show_marks_a_flagged_measurement(cli, filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    finding = _open_error(database, ids["a2"])
    shown = cli("show", str(ids["a2"]))
    assert shown.exit_code == 0, shown.stderr
    lines = shown.stdout.splitlines()
    assert lines[0].startswith(f"measurement {ids['a2']}  [flagged]")
    assert lines[1] == (
        f"  FLAGGED      error finding {finding['id']} open: left out of barrier ranges, overview"
        " plots and paper tables unless asked for, until the finding is resolved or accepted"
    )
    assert "FLAGGED" not in cli("show", str(ids["a1"])).stdout
    assert json.loads(cli("show", str(ids["a2"]), "--json").stdout)["flagged"] is True
    assert json.loads(cli("show", str(ids["a1"]), "--json").stdout)["flagged"] is False


# ---------------------------------------------------------------- report, plots, tables


def test_report_marks_flagged_rows_and_keeps_them_out_of_ranges(filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    out = tmp_path / "site"
    result = api.build_report(database, out, plots=False)
    assert (result.measurements, result.flagged) == (5, 3)
    assert result.notes[0] == (
        "3 flagged value(s) left out of the overview and of the compounds' ΔG‡ ranges"
    )
    index = (out / "index.html").read_text(encoding="utf-8")
    assert index.count('<tr class="flagged"') == 3
    assert "<li><b>3</b> flagged (open error finding)</li>" in index
    compound_a = api.get_measurement(database, ids["a1"])["compound"]["id"]
    page = (out / "compounds" / f"c{compound_a}.html").read_text(encoding="utf-8")
    assert page.count('class="badge flagged" title=') == 1  # a2's card (beside its status)
    assert (
        f'<p class="small" id="barrier-range">ΔG‡ {A1_DG:.1f} kJ/mol from 1 value; '
        "1 flagged value(s) left out.</p>"
    ) in page
    api.build_report(database, out, plots=False, include_flagged=True)
    page = (out / "compounds" / f"c{compound_a}.html").read_text(encoding="utf-8")
    assert (
        f"ΔG‡ from {A2_DG:.1f} to {A1_DG:.1f} kJ/mol over 2 values (1 of them flagged)."
    ) in page


def test_overview_plot_leaves_flagged_values_out_unless_asked(filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, _ = filled
    drawn = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
    groups = {g["group"]: g for g in drawn.groups}
    assert (groups["bond-rotation"]["n"], drawn.left_out_flagged) == (2, 3)
    assert "ring-inversion" not in groups  # its only value is flagged
    assert groups["bond-rotation"]["min_kj_mol"] == pytest.approx(A1_DG, abs=0.006)
    assert "an error finding is open" not in (tmp_path / "o.svg").read_text(encoding="utf-8")
    every = api.plot_overview(database, out=tmp_path / "e.svg", by="kind", include_flagged=True)
    groups = {g["group"]: g for g in every.groups}
    assert (groups["bond-rotation"]["n"], groups["bond-rotation"]["flagged"]) == (4, 2)
    assert (groups["ring-inversion"]["n"], groups["ring-inversion"]["flagged"]) == (1, 1)
    assert groups["bond-rotation"]["min_kj_mol"] == pytest.approx(A2_DG, abs=0.006)
    assert every.left_out_flagged == 0
    # the crosses have a legend entry saying what they are (SVG text stays text)
    assert "flagged: an error finding is open" in (tmp_path / "e.svg").read_text(encoding="utf-8")


def test_eyring_and_coalescence_plots_say_a_measurement_is_flagged(filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    finding = _open_error(database, ids["d"])
    drawn = api.plot_eyring(database, measurement_id=ids["d"], out=tmp_path / "d.svg")
    assert drawn.flagged and drawn.as_dict()["open_errors"] == [
        {"finding": finding["id"], "rule": "dg-from-dh-ds"}
    ]
    assert drawn.notes[-1] == (
        f"measurement {ids['d']} is flagged: error finding {finding['id']} [dg-from-dh-ds] is "
        "open (not resolved, not accepted)"
    )
    assert "flagged: an error finding is open" in (tmp_path / "d.svg").read_text(encoding="utf-8")
    tc = api.plot_coalescence(database, out=tmp_path / "c.svg", measurement_id=ids["a2"])
    assert [o["flagged"] for o in tc.observed] == [True]
    assert tc.notes == (
        f"measurement {ids['a2']} is flagged (an error finding is open): its point is drawn as a"
        " cross; the prediction uses its ΔG‡ as stored",
    )
    clean = api.plot_coalescence(database, out=tmp_path / "k.svg", measurement_id=ids["a1"])
    assert [o["flagged"] for o in clean.observed] == [False] and clean.notes == ()


def test_paper_tables_leave_flagged_values_out_or_footnote_them(filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, _ = filled
    from registry.reports.table_file import export_table

    plain = export_table(database, tmp_path / "t.md", uncertainty="pm")
    assert (plain["measurements"], plain["flagged_left_out"], plain["flagged_included"]) == (
        2,
        3,
        0,
    )
    text = (tmp_path / "t.md").read_text(encoding="utf-8")
    assert "FT-C" not in text and "†" not in text
    asked = export_table(database, tmp_path / "all.md", uncertainty="pm", include_flagged=True)
    assert (asked["measurements"], asked["flagged_included"]) == (5, 3)
    text = (tmp_path / "all.md").read_text(encoding="utf-8")
    marked = [
        line.split(" | ")[0].lstrip("| ")
        for line in text.splitlines()
        if line.startswith("|") and "†" in line
    ]
    assert marked == ["FT-A", "FT-C", "FT-D"]  # a2, c and d, in id order
    assert (
        "\n† Flagged in the registry: an error-level check of this entry is open (not resolved,"
        " not accepted); shown on request."
    ) in text
    only = export_table(database, tmp_path / "f.tex", flagged=True)  # asking for them includes
    assert (only["measurements"], only["flagged_included"]) == (3, 3)
    latex = (tmp_path / "f.tex").read_text(encoding="utf-8")
    assert latex.count(r"\dag}") == 4  # three rows and the note
    assert api.export_measurements(database, tmp_path / "c.md", flagged=False)["measurements"] == 2
    with pytest.raises(UsageError, match="the 1 selected are flagged"):
        export_table(database, tmp_path / "x.md", compound="FT-C")


# ---------------------------------------------------------------- the status rule


def _actions(database: Database, mid: int) -> list[tuple[str, Any, Any]]:
    return [
        (h["action"], (h["before"] or {}).get("status"), (h["after"] or {}).get("status"))
        for h in api.history(database, mid, limit=None)
        if h["action"] in ("flag", "unflag", "status")
    ]


def test_a_check_flags_and_resolving_returns_the_earlier_status(filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    a1 = ids["a1"]
    api.edit_measurement(database, a1, {"status": "reviewed"}, actor="ben")
    # a wrong value on a reviewed measurement: the check after the edit flags it …
    api.edit_measurement(database, a1, {"dg": f"{A1_DG + 6:.2f} kJ/mol"}, actor="ben")
    record = api.get_measurement(database, a1)
    assert (record["status"], record["flagged"]) == ("flagged", True)
    # … and correcting it returns it to reviewed, both steps recorded under the editor's name
    api.edit_measurement(database, a1, {"dg": f"{A1_DG:.2f} kJ/mol"}, actor="cleo")
    assert api.get_measurement(database, a1)["status"] == "reviewed"
    assert _actions(database, a1) == [
        ("status", "draft", "reviewed"),
        ("flag", "reviewed", "flagged"),
        ("unflag", "flagged", "reviewed"),
    ]
    entries = [h for h in api.history(database, a1, limit=None) if h["action"] == "unflag"]
    assert (entries[0]["actor"], entries[0]["reason"]) == ("cleo", "no error finding open any more")


def test_an_edit_cannot_contradict_an_open_finding(cli, filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    a2 = ids["a2"]
    finding = _open_error(database, a2)
    before = api.get_measurement(database, a2)
    with pytest.raises(OpenFindingError) as caught:
        api.edit_measurement(database, a2, {"status": "reviewed"}, actor="ben")
    assert caught.value.findings[0][:2] == (finding["id"], "coalescence-barrier")
    refused = cli("edit", str(a2), "--set", "status=reviewed")
    assert refused.exit_code == 1
    assert refused.stderr.startswith(
        f"error: status: measurement {a2} stays 'flagged' while an error finding is open, so it "
        f"cannot become 'reviewed' — finding {finding['id']} [coalescence-barrier]: ΔG‡ "
    )
    assert refused.stderr.endswith(
        "Correct the values so that the check passes, or accept the finding with a reason; the"
        " status then returns by itself\n"
    )
    by_hand = cli("edit", str(ids["a1"]), "--set", "status=flagged")
    assert (by_hand.exit_code, by_hand.stderr) == (
        2,
        "error: status: 'flagged' is set by the checks while an error finding is open, and "
        "cleared when none is; edit the status to draft or reviewed\n",
    )
    assert api.get_measurement(database, a2) == before
    with pytest.raises(UsageError, match="'flagged' is set by the checks"):
        api.add_measurement(database, dataclasses.replace(ENTRIES["b"], status="flagged"))
    # correcting the value resolves the finding: the edit says the status went back
    fixed = cli("edit", str(a2), "--set", f"dg={A1_DG:.2f} kJ/mol")
    assert fixed.exit_code == 0, fixed.stderr
    assert fixed.stdout.splitlines()[-1] == "  status: flagged → draft (set by the check)"
    assert cli("edit", str(a2), "--set", "status=reviewed").exit_code == 0


def test_correcting_and_reviewing_in_one_edit_is_judged_on_the_corrected_values(
    cli, filled
) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    a2 = ids["a2"]
    before = api.get_measurement(database, a2)
    history = len(api.history(database, a2, limit=None))
    # still 5 kJ/mol off after the "correction": refused, and nothing is written
    still_wrong = cli("edit", str(a2), "--set", f"dg={A1_DG - 5:.2f} kJ/mol", "--set",
                      "status=reviewed")  # fmt: skip
    assert still_wrong.exit_code == 1
    assert still_wrong.stderr.startswith(
        f"error: status: measurement {a2} cannot become 'reviewed': with the edited values the "
        "check still finds an error — [coalescence-barrier]: ΔG‡ "
    )
    assert "Nothing was written" in still_wrong.stderr
    assert api.get_measurement(database, a2) == before
    assert len(api.history(database, a2, limit=None)) == history
    # the right value and the status together: both land, and the finding is gone
    fixed = cli("edit", str(a2), "--set", f"dg={A1_DG:.2f} kJ/mol", "--set", "status=reviewed")
    assert fixed.exit_code == 0, fixed.stderr
    record = api.get_measurement(database, a2)
    assert (record["status"], record["flagged"]) == ("reviewed", False)


def test_add_says_when_the_new_measurement_is_flagged(cli) -> None:  # type: ignore[no-untyped-def]
    entry = ENTRIES["c"]
    added = cli(
        "add", "--method", "coalescence", "--compound", "FT-C", "--smiles", "C1CCCCC1",
        "--process", "ring-inversion", "--solvent", "CD2Cl2", "--mhz", "400", "--tc", entry.tc,
        "--dnu", entry.dnu, "--dg", entry.dg,
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    lines = added.stdout.splitlines()
    assert lines[1].startswith("  error: ΔG‡ ")
    assert lines[-1] == (
        "  status flagged: left out of barrier ranges, overview plots and paper tables unless "
        "asked for, until the finding is resolved or accepted"
    )


def test_accepting_returns_the_status_and_survives_rechecks(filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    a2 = ids["a2"]
    finding = _open_error(database, a2)
    accept_finding(database, finding["id"], "value from the thesis, p. 12", actor="dora")
    assert api.get_measurement(database, a2)["status"] == "draft"
    assert _actions(database, a2) == [("flag", "draft", "flagged"), ("unflag", "flagged", "draft")]
    unflag = api.history(database, a2, limit=None)[-1]
    assert (unflag["actor"], unflag["reason"]) == ("dora", f"finding {finding['id']} accepted")
    # re-checks keep the acceptance while the inputs are unchanged, and change no status
    for _ in range(2):
        report = check_measurements(database, actor="eve")
        assert report.status_changes == ()
    record = api.get_measurement(database, a2)
    assert (record["status"], record["flagged"]) == ("draft", False)
    assert [f["accepted_by"] for f in record["findings"] if f["severity"] == "error"] == ["dora"]
    assert api.list_measurements(database, flagged=True, compound="FT-A") == []


def test_a_new_rule_version_flags_again(filled, monkeypatch: pytest.MonkeyPatch) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    a2 = ids["a2"]
    accept_finding(database, _open_error(database, a2)["id"], "known", actor="dora")
    monkeypatch.setattr(CoalescenceBarrier, "version", CoalescenceBarrier.version + 1)
    report = check_measurements(database, actor="eve")
    # the acceptance was for the old rule: the new finding is open, so a2 is flagged again (c
    # stays flagged, a1 and b stay clean)
    assert {c["id"]: (c["before"], c["after"]) for c in report.status_changes} == {
        a2: ("draft", "flagged")
    }
    assert api.get_measurement(database, a2)["status"] == "flagged"


def test_a_check_repairs_statuses_changed_in_plain_sql(filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled

    def set_status(mid: int, status: str) -> None:
        database.write(
            lambda conn: conn.execute(
                "UPDATE measurement SET status = :s WHERE id = :id", {"s": status, "id": mid}
            )
        )

    set_status(ids["c"], "reviewed")  # a flagged value marked reviewed behind our back
    set_status(ids["b"], "flagged")  # a clean one marked flagged
    report = check_measurements(database, actor="eve")
    assert {c["id"]: (c["before"], c["after"]) for c in report.status_changes} == {
        ids["b"]: ("flagged", "draft"),  # no flag revision says otherwise: back to draft
        ids["c"]: ("reviewed", "flagged"),
    }
    with database.read() as conn:
        assert audit.verify_chain(conn) == []
        from registry.validation import out_of_step

        assert out_of_step(conn) == []
    # a resolved flag returns to the status recorded when it was set: reviewed
    api.edit_measurement(database, ids["c"], {"dg": f"{C_DG - 5:.2f} kJ/mol"}, actor="eve")
    assert api.get_measurement(database, ids["c"])["status"] == "reviewed"


def test_retracted_measurements_keep_their_status(filled) -> None:  # type: ignore[no-untyped-def]
    database, ids = filled
    api.retract_measurement(database, ids["c"], "duplicate", actor="eve")
    report = check_measurements(database, actor="eve")
    assert ids["c"] not in {c["id"] for c in report.status_changes}
    assert api.get_measurement(database, ids["c"])["status"] == "retracted"


# ---------------------------------------------------------------- PostgreSQL


@pytest.mark.postgres
def test_flagged_column_filter_and_status_rule_on_postgresql(pg_url: str, tmp_path: Path) -> None:
    api.init_registry(pg_url)
    database = api.open_registry(pg_url)
    try:
        ids = fill(database)
        rows = _by_label(api.list_measurements(database), ids)
        assert {label: r["flagged"] for label, r in rows.items()} == {
            "a1": 0, "a2": 1, "b": 0, "c": 1, "d": 1,
        }  # fmt: skip
        assert all(type(r["flagged"]) is int for r in rows.values())  # as on SQLite
        assert {r["id"] for r in api.list_measurements(database, flagged=False)} == {
            ids[x] for x in CLEAN
        }
        found = api.find(database, smarts="[CX3](=O)[NX3]", flagged=True)
        assert [r["id"] for r in found.rows] == [ids["a2"]]
        ranges = {c["compound"]: c for c in api.find(database, smarts="[#6]").compound_table()}
        assert ranges["FT-A"]["dg_min_kj_mol"] == pytest.approx(A1_DG, abs=0.006)
        finding = _open_error(database, ids["a2"])
        accept_finding(database, finding["id"], "checked", actor="dora")
        assert api.get_measurement(database, ids["a2"])["status"] == "draft"
        assert _actions(database, ids["a2"]) == [
            ("flag", "draft", "flagged"),
            ("unflag", "flagged", "draft"),
        ]
        drawn = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
        assert drawn.left_out_flagged == 2
    finally:
        database.close()
