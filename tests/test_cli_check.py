"""``fluxledger check`` and ``fluxledger accept``: text, JSON, filters, exit codes."""

from __future__ import annotations

import json
import math

from scipy import constants as C

# Gutowsky–Holm + Eyring at Tc = 300 K, Δν = 50 Hz, from CODATA constants (scipy.constants)
DG = C.R / 1000 * 300 * math.log(C.Boltzmann * 300 / (C.Planck * math.pi * 50 / math.sqrt(2)))

ADD = ["add", "--method", "coalescence", "--process", "bond-rotation", "--nucleus", "1H",
       "--solvent", "toluene-d8", "--mhz", "400", "--tc", "300 K", "--dnu", "50 Hz"]  # fmt: skip


def add(cli, label: str, dg: str):  # type: ignore[no-untyped-def]
    result = cli(*ADD, "--compound", label, "--dg", dg)
    assert result.exit_code == 0, result.stderr
    return result


def test_empty_registry(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("check")
    assert result.exit_code == 0
    assert result.stdout.splitlines() == [
        "no findings",
        "checked 0 measurements: 0 errors, 0 warnings, 0 notes (0 new since the last run, 0 accepted)",
    ]


def test_add_prints_findings(cli) -> None:  # type: ignore[no-untyped-def]
    result = add(cli, "K-1", f"{DG / C.calorie:.2f} kJ/mol")
    lines = result.stdout.splitlines()
    assert lines[0].startswith("added measurement 1")
    assert lines[1].startswith("  error: ΔG‡")


def test_error_exits_1_and_names_the_slip(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG / C.calorie:.2f} kJ/mol")
    add(cli, "K-2", f"{DG:.2f} kJ/mol")
    result = cli("check")
    assert result.exit_code == 1
    out = result.stdout
    assert out.splitlines()[0].split() == ["finding", "measurement", "severity", "rule", "reported",
                                           "recomputed", "difference", "unit", "status"]  # fmt: skip
    assert "coalescence-barrier" in out and "[kcal-as-kj]" in out
    assert out.rstrip().endswith(
        "checked 2 measurements: 1 error, 1 warning, 0 notes (2 new since the last run, 0 accepted)"
    )  # the warning: 16 "kJ/mol" at 300 K is k ≈ 10¹⁰ s⁻¹, faster than coalescence sees


def test_json_objects(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG / C.calorie:.2f} kJ/mol")
    result = cli("check", "--json")
    assert result.exit_code == 1
    (obj,) = [f for f in json.loads(result.stdout) if f["severity"] == "error"]
    for key in ("measurement_id", "rule", "severity", "message", "reported", "recomputed",
                "likely_cause"):  # fmt: skip
        assert key in obj
    assert obj["measurement_id"] == 1 and obj["rule"] == "coalescence-barrier"
    assert obj["slips"][0] == "kcal-as-kj"
    assert "1 error" in result.stderr


def test_severity_and_new_filters(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", "3 kJ/mol")  # error and a below-range warning
    warnings = json.loads(cli("check", "--json", "--severity", "warning").stdout)
    errors = json.loads(cli("check", "--json", "--severity", "error").stdout)
    assert {f["severity"] for f in warnings} == {"error", "warning"}
    assert {f["severity"] for f in errors} == {"error"}
    assert json.loads(cli("check", "--json", "--new").stdout) == []


def test_bad_options(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("check", "--severity", "fatal")
    assert result.exit_code == 2
    assert result.stderr.startswith("error: --severity 'fatal': use one of error, warning, note")
    result = cli("check", "--tolerance", "1 Hz")
    assert result.exit_code == 2 and result.stderr.startswith("error: tolerance: cannot read")


def test_tolerance_option(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG + 2:.2f} kJ/mol")
    assert cli("check").exit_code == 1
    assert cli("check", "--tolerance", "1 kcal/mol").exit_code == 0


def test_accept_then_check_passes(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG + 2:.2f} kJ/mol")
    (finding,) = json.loads(cli("check", "--json").stdout)
    result = cli("--as", "ada", "accept", str(finding["id"]), "--reason", "line-shape value")
    assert result.exit_code == 0
    assert result.stdout.strip() == (
        f"finding {finding['id']} (error, coalescence-barrier, measurement 1) accepted by ada: "
        "line-shape value"
    )
    checked = cli("check")
    assert checked.exit_code == 0
    assert "accepted by ada: line-shape value" in checked.stdout
    assert cli("accept", "999", "--reason", "x").exit_code == 1


def test_unknown_id_is_reported(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("check", "--id", "7")
    assert result.exit_code == 0
    assert "warning: no measurement 7 to check (unknown or retracted)" in result.stderr


def test_new_means_since_the_last_check(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG + 2:.2f} kJ/mol")
    first = json.loads(cli("check", "--json", "--new").stdout)
    assert [f["measurement_id"] for f in first] == [1]  # stored by add, new to check
    assert json.loads(cli("check", "--json", "--new").stdout) == []
    add(cli, "K-2", f"{DG - 2:.2f} kJ/mol")
    later = cli("check", "--new")
    assert later.exit_code == 1
    assert "(1 new since the last run, 0 accepted)" in later.stdout
    assert [f["measurement_id"] for f in json.loads(cli("check", "--json").stdout)] == [1, 2]


def test_checking_one_id_does_not_reset_new(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG + 2:.2f} kJ/mol")
    assert json.loads(cli("check", "--json", "--new", "--id", "1").stdout) != []
    assert [f["measurement_id"] for f in json.loads(cli("check", "--json", "--new").stdout)] == [1]
    assert json.loads(cli("check", "--json", "--new").stdout) == []


def test_a_check_with_another_tolerance_is_a_view_that_changes_nothing(cli) -> None:  # type: ignore[no-untyped-def]
    add(cli, "K-1", f"{DG + 2:.2f} kJ/mol")  # 2 kJ/mol off: an error at the 1 kJ/mol default
    stored = json.loads(cli("check", "--json").stdout)
    assert [f["severity"] for f in stored] == ["error"]
    fid = stored[0]["id"]
    assert cli("accept", str(fid), "--reason", "integration limits checked").exit_code == 0
    before = cli("show", "1", "--json").stdout
    strict = cli("check", "--tolerance", "0.5 kcal/mol")  # a view: shows the error again
    assert "a view with other settings: the stored findings are unchanged" in strict.stdout
    loose = cli("check", "--tolerance", "900 kJ/mol", "--json")  # a view: shows none
    assert json.loads(loose.stdout) == []
    after = json.loads(cli("show", "1", "--json").stdout)
    assert after["findings"][0]["id"] == fid
    assert after["findings"][0]["accepted_by"] is not None  # the acceptance survived both
    assert json.loads(before)["status"] == after["status"]
    assert cli("check", "--tolerance", "1e308 kcal/mol").exit_code == 2  # refused, not stored
    assert json.loads(cli("show", "1", "--json").stdout)["findings"] == after["findings"]
