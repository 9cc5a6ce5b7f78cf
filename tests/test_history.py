"""edit, retract, history: values re-normalized from any notation, nothing lost, every change kept.

Check values: 1 kcal = 4.184 kJ exactly (thermochemical calorie, NIST SP 811 (2008) B.8);
T/K = t/°C + 273.15 (NIST SP 811 (2008) 4.2.1.1); a shift difference in ppm times the
spectrometer frequency in MHz is the separation in Hz (common practice, no source).

ADD_AMIDE reports 14.2 ± 0.3 kcal/mol, far from ΔG‡(Tc) = 55.67 kJ/mol = 13.30 kcal/mol that
Tc = 261.15 K and Δν = 0.045 ppm × 400 MHz = 18 Hz give (Gutowsky–Holm k_c = πΔν/√2 with the
Eyring equation, CODATA constants via scipy.constants; computed beside this test), so the
check that follows the add leaves an error finding open and the status rule flags it: its
history is ``add`` then ``flag``. 55.7 kJ/mol is within the tolerance of that value.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from registry import api
from registry.record.entry import EntryInput, normalize_entry
from registry.storage import audit
from registry.storage.writer import write_entries

ADD_AMIDE = [
    "--as", "alice", "add", "--method", "coalescence", "--smiles", "CN(C)C(=O)c1ccc(Cl)cc1",
    "--compound", "AM-1", "--process", "amide rotation", "--nucleus", "1H", "--solvent", "CDCl3",
    "--mhz", "400", "--tc", "-12 °C", "--dnu", "0.045 ppm", "--dg", "14.2 ± 0.3 kcal/mol",
]  # fmt: skip


def _record(db_path: Path, mid: int = 1) -> dict:
    database = api.open_registry(str(db_path))
    try:
        return api.get_measurement(database, mid)
    finally:
        database.dispose()


def _history(db_path: Path, mid: int | None = 1) -> list[dict]:
    database = api.open_registry(str(db_path))
    try:
        return api.history(database, mid, limit=None)
    finally:
        database.dispose()


def test_edit_energy_in_kcal_is_stored_as_text_and_kj(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli("--as", "bob", "edit", "1", "--set", "dg=14.5 kcal/mol", "--reason", "refit")
    assert result.exit_code == 0, result.stderr
    lines = result.stdout.splitlines()
    assert lines[:2] == [
        "measurement 1 changed (revision 3):",
        "  dg_text: '14.2 ± 0.3 kcal/mol' → '14.5 kcal/mol'",
    ]
    # the validation rules ran again on the edited values: 14.5 kcal/mol is far from what
    # Tc and Δν give (Gutowsky–Holm), so an error finding is shown
    assert any(line.startswith("  error: ") for line in lines[2:])
    record = _record(db_path)
    assert record["dg_kj_mol"] == pytest.approx(14.5 * 4.184)  # NIST SP 811 B.8
    assert record["dg_err_kj_mol"] is None
    assert record["dg_text"] == "14.5 kcal/mol"
    assert record["updated_at"] is not None
    entries = _history(db_path)
    assert [e["action"] for e in entries] == ["add", "flag", "edit"]  # still flagged: no unflag
    last = entries[-1]
    assert (last["actor"], last["action"], last["reason"]) == ("bob", "edit", "refit")
    assert last["before"]["dg_kj_mol"] == pytest.approx(14.2 * 4.184)
    assert last["before"]["dg_err_kj_mol"] == pytest.approx(0.3 * 4.184)
    assert last["after"] == {
        "dg_text": "14.5 kcal/mol",
        "dg_kj_mol": pytest.approx(14.5 * 4.184),
        "dg_err_kj_mol": None,
    }


def test_edit_tc_updates_the_coalescence_row_and_the_temperature_of_dg(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    assert cli("edit", "1", "--set", "tc=-10 °C").exit_code == 0
    record = _record(db_path)
    (co,) = record["coalescence"]
    assert co["tc_k"] == pytest.approx(263.15)  # NIST SP 811 4.2.1.1
    assert co["tc_text"] == "-10 °C"
    assert record["dg_t_k"] == pytest.approx(263.15)  # ΔG‡ given without its own T refers to Tc


def test_new_spectrometer_frequency_re_derives_a_separation_in_ppm(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli("edit", "1", "--set", "mhz=500")
    assert result.exit_code == 0, result.stderr
    assert result.stdout.splitlines()[1:4] == [
        "  coalescence.dnu_hz: 18 → 22.5",
        "  coalescence.field_text: '400' → '500'",
        "  field_text: '400' → '500'",
    ]
    (co,) = _record(db_path)["coalescence"]
    assert co["dnu_hz"] == pytest.approx(0.045 * 500)
    assert co["dnu_text"] == "0.045 ppm"


def test_solvent_status_reference_and_a_status_only_change(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli("edit", "1", "--set", "solvent=CD2Cl2", "--set", "reference=doi:10.1000/demo")
    assert result.exit_code == 0, result.stderr
    assert cli("edit", "1", "--set", "dg=55.7 kJ/mol").exit_code == 0  # the finding resolves
    assert cli("edit", "1", "--set", "status=reviewed").exit_code == 0
    record = _record(db_path)
    assert record["solvent_text"] == "CD2Cl2"
    assert record["solvent"]["formula"] == "CD2Cl2"
    assert record["reference"] == "doi:10.1000/demo"
    assert record["status"] == "reviewed"
    actions = [h["action"] for h in _history(db_path)]
    assert actions == ["add", "flag", "edit", "edit", "unflag", "status"]


def test_edit_with_the_same_value_writes_nothing(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli("edit", "1", "--set", "solvent=CDCl3")
    assert result.stdout == "measurement 1: nothing changed (the values are the same)\n"
    assert [h["action"] for h in _history(db_path)] == ["add", "flag"]


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        (["edit", "1", "--set", "dg=14"], 1, "error: dg: cannot read '14': no unit given; write one, e.g. '14 kJ/mol'\n"),
        (["edit", "1", "--set", "colour=blue"], 2, "error: cannot edit 'colour'; editable fields: label, process, sites, nucleus, method, solvent, field, t_min, t_max, dg, dg_t, dh, ds, ea, log10_a, tc, dnu, j, population, direction, convention, degeneracy, kappa, order, concentration, calibration, dh_ds_corr, theory, functional, basis, solvation, conformers, standard_state, reference, status\n"),
        (["edit", "1", "--set", "dg"], 2, "error: 'dg': write FIELD=VALUE, e.g. dg=\"14.5 kcal/mol\"\n"),
        (["edit", "1"], 2, "error: nothing to change; give at least one --set FIELD=VALUE\n"),
        (["edit", "1", "--set", "tc="], 1, "error: tc: missing: coalescence data needs both Tc and Δν\n"),
        (["edit", "1", "--set", "status=retracted"], 2, "error: status: a measurement is retracted, with a reason the history keeps, not edited to 'retracted'\n"),
        (["edit", "7", "--set", "dg=60 kJ/mol"], 1, "error: no measurement with id 7\n"),
        (["edit", "x", "--set", "dg=60 kJ/mol"], 2, "error: 'x' is not a measurement id (a whole number from 1)\n"),
    ],
)  # fmt: skip
def test_bad_edits_name_the_problem_and_change_nothing(
    cli, db_path: Path, args, code, message
) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    before = _record(db_path)
    result = cli(*args)
    assert result.exit_code == code
    assert result.stderr == message
    assert _record(db_path) == before
    assert [h["action"] for h in _history(db_path)] == ["add", "flag"]


def test_clearing_both_coalescence_values_removes_the_observation(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    assert cli("edit", "1", "--set", "tc=", "--set", "dnu=").exit_code == 0
    record = _record(db_path)
    assert record["coalescence"] == []
    *_, last, unflag = _history(db_path)
    assert last["before"]["coalescence"]["tc_text"] == "-12 °C"
    assert last["after"]["coalescence"] is None
    # without Tc and Δν there is nothing to recompute ΔG‡ from: the finding goes, and so
    # does the flag
    assert (unflag["action"], unflag["after"], record["status"]) == (
        "unflag",
        {"status": "draft"},
        "draft",
    )


def test_retract_hides_keeps_and_explains(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli("--as", "carol", "retract", "1", "--reason", "duplicate of a later run")
    assert result.exit_code == 0, result.stderr
    assert result.stdout == (
        "measurement 1 retracted (was flagged; revision 3): duplicate of a later run\n"
    )
    assert json.loads(cli("list", "--json").stdout) == []
    listed = json.loads(cli("list", "--json", "--include-retracted").stdout)
    assert [(r["id"], r["status"]) for r in listed] == [(1, "retracted")]
    again = cli("retract", "1", "--reason", "again")
    assert (again.exit_code, again.stderr) == (2, "error: measurement 1 is already retracted\n")
    no_reason = cli("retract", "1", "--reason", " ")
    assert no_reason.exit_code == 2
    shown = cli("history", "1")
    lines = shown.stdout.splitlines()
    assert lines[0].split() == ["revision", "at", "(UTC)", "actor", "action", "measurement", "what"]
    assert lines[2].split()[3:] == ["alice", "add", "1", "add:", "AM-1,", "coalescence,", "14.2", "±", "0.3", "kcal/mol,", "CDCl3"]  # fmt: skip
    assert lines[3].split()[3:5] == ["alice", "flag"]
    assert lines[4].split()[3:] == ["carol", "retract", "1", "status:", "'flagged'", "→", "'retracted'", "(reason:", "duplicate", "of", "a", "later", "run)"]  # fmt: skip
    # a retracted measurement can be brought back, and that is a change like any other; its
    # error finding is still open, so the check that follows flags it again
    assert cli("edit", "1", "--set", "status=draft").exit_code == 0
    assert [(r["id"], r["status"]) for r in json.loads(cli("list", "--json").stdout)] == [
        (1, "flagged")
    ]
    assert [h["action"] for h in _history(db_path)][-2:] == ["status", "flag"]


def test_history_json_of_the_whole_registry_latest_first_window(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    assert cli(*ADD_AMIDE[:-2], "--dg", "55.7 kJ/mol").exit_code == 0
    assert cli("edit", "2", "--set", "reference=notebook 4, p. 12").exit_code == 0
    everything = json.loads(cli("history", "--json", "--limit", "0").stdout)
    assert [(e["revision"], e["entity_id"], e["action"]) for e in everything] == [
        (1, 1, "add"),
        (2, 1, "flag"),
        (3, 2, "add"),
        (4, 2, "edit"),
    ]
    latest = json.loads(cli("history", "--json", "-n", "2").stdout)
    assert [e["revision"] for e in latest] == [3, 4]
    assert latest[1]["after"] == {"reference": "notebook 4, p. 12"}
    assert latest[1]["before"] == {"reference": None}
    one = json.loads(cli("history", "1", "--json").stdout)
    assert [e["revision"] for e in one] == [1, 2]
    assert cli("history", "9").stderr == "error: no measurement with id 9\n"


def test_edit_keeps_a_bare_number_whose_unit_came_from_a_column_header(database) -> None:  # type: ignore[no-untyped-def]
    """An imported '14.2' under a 'ΔG‡ (kcal/mol)' header must still mean kcal/mol after an edit."""
    entry = EntryInput(
        method="coalescence", compound="HDR-1", dg="14.2", tc="250", dnu="30 Hz",
        units={"dg": "kcal/mol", "tc": "K"},
    )  # fmt: skip
    normalized, problems = normalize_entry(entry)
    assert not problems and normalized is not None
    database.write(lambda conn: write_entries(conn, [normalized], [None], actor="import"))
    result = api.edit_measurement(database, 1, {"reference": "lab book 7"}, actor="dave")
    assert result["after"] == {"reference": "lab book 7"}
    record = api.get_measurement(database, 1)
    assert record["dg_kj_mol"] == pytest.approx(14.2 * 4.184)  # NIST SP 811 B.8
    assert record["dg_text"] == "14.2"
    changed = api.edit_measurement(database, 1, {"tc": "260 K"})
    assert changed["after"]["coalescence"] == {"tc_k": 260.0, "tc_text": "260 K"}
    assert api.get_measurement(database, 1)["dg_kj_mol"] == pytest.approx(14.2 * 4.184)


def test_every_change_extends_an_intact_hash_chain(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    changes = ("dg=55.7 kJ/mol", "reference=lab book 7", "label=run 2", "status=reviewed")
    for change in changes:
        assert cli("edit", "1", "--set", change).exit_code == 0
    assert cli("retract", "1", "--reason", "superseded").exit_code == 0
    database = api.open_registry(str(db_path))
    try:
        with database.read() as conn:
            assert audit.verify_chain(conn) == []
        record = api.get_measurement(database, 1)
    finally:
        database.dispose()
    assert record["dg_kj_mol"] == pytest.approx(55.7)
    # add, flag, the dg edit, unflag (the finding resolved), three more edits, the retraction
    assert record["revision_count"] == 8


def test_summary_shows_texts_not_the_floats_behind_them() -> None:
    line = api.summarize_change(
        "edit",
        {"dg_text": "14.2 kcal/mol", "dg_kj_mol": 59.4128, "dg_err_kj_mol": None},
        {"dg_text": "60 kJ/mol", "dg_kj_mol": 60.0, "dg_err_kj_mol": None},
    )
    assert line == "dg_text: '14.2 kcal/mol' → '60 kJ/mol'"


def test_accepting_a_finding_appears_in_the_measurement_history(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    from registry import validation

    assert cli(*ADD_AMIDE).exit_code == 0  # 14.2 kcal/mol is far from what Tc and Δν give
    database = api.open_registry(str(db_path))
    try:
        finding = api.get_measurement(database, 1)["findings"][0]
        validation.accept_finding(database, finding["id"], "solvent effect", actor="erin")
        entries = api.history(database, 1, limit=None)
    finally:
        database.dispose()
    *_, last, unflag = entries
    assert (last["actor"], last["action"], last["reason"]) == (
        "erin",
        "accept-finding",
        "solvent effect",
    )
    # accepting the only open error returns the measurement to the status it had: by erin
    assert (unflag["actor"], unflag["action"], unflag["before"], unflag["after"]) == (
        "erin",
        "unflag",
        {"status": "flagged"},
        {"status": "draft"},
    )
    assert last["summary"] == (
        f"accepted finding {finding['id']} [{finding['rule_id']}] {finding['severity']}"
    )
