"""EXSY, transfer and time-course measurements stored with their raw data and recomputed by
``check`` (rule ``raw-data-barrier``), with the slips that reproduce a wrong number named.

Every expected barrier is computed here, independently of the code under test:

* Eyring: ΔG‡ = RT·ln(k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)), constants from
  CODATA through ``scipy.constants``;
* EXSY volumes from the forward model I(τm) = expm(K·τm)·diag(p) with K_ii = −Σ_j k(i→j),
  K_ij = k(j→i) (C. L. Perrin and T. J. Dwyer, Chem. Rev. 90, 935 (1990)), ``scipy.linalg.expm``;
  the equal-population two-site closed form k_ex·τm = ln((r + 1)/(r − 1)),
  r = (I_AA + I_BB)/(I_AB + I_BA), k = k_ex/2 (same review);
* saturation transfer: k = (1 − M_ss/M0)/T1_app = (1 − M_ss/M0)/(M_ss/M0 · T1_int)
  (S. Forsén and R. A. Hoffman, J. Chem. Phys. 39, 2892 (1963));
* an ee course ee(t) = ee0·exp(−k_rac·t), k_enant = k_rac/2; a fraction course
  x(t) = x_eq + (x0 − x_eq)·exp(−k_obs·t), k(P→Q) = (1 − x_eq)·k_obs (first-order reversible
  kinetics, any physical chemistry text; written out here);
* an inversion-transfer course M(t) = M0 + expm(−(R + K)·t)·(M(0) − M0), the two-site
  Bloch–McConnell equations (H. M. McConnell, J. Chem. Phys. 28, 430 (1958)).

All compounds and numbers are invented.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from scipy import constants as codata
from scipy.linalg import expm

from registry import api
from registry.storage.database import Database

pytest_plugins = ("conftest_pg",)

R_KJ = codata.R / 1000.0
RULE = "raw-data-barrier"


def eyring_dg(k: float, t: float) -> float:
    return R_KJ * t * math.log(codata.k * t / (codata.h * k))


def exsy_matrix(k: np.ndarray, p: np.ndarray, tau: float) -> np.ndarray:
    """Volumes after τm from k(i→j) (detailed balance assumed in ``k``) and populations."""
    n = len(p)
    kin = np.zeros((n, n))
    for i in range(n):
        kin[i, i] = -sum(k[i, j] for j in range(n) if j != i)
        for j in range(n):
            if i != j:
                kin[i, j] = k[j, i]
    return expm(kin * tau) @ np.diag(p)


def matrix_text(*mats: np.ndarray) -> str:
    return " | ".join(";".join(",".join(f"{v:.9f}" for v in row) for row in m) for m in mats)


def two_site(k_ab: float, p_a: float, tau: float) -> np.ndarray:
    p_b = 1.0 - p_a
    k = np.array([[0.0, k_ab], [k_ab * p_a / p_b, 0.0]])
    return exsy_matrix(k, np.array([p_a, p_b]), tau)


def ee_course(k_rac: float, minutes: tuple[float, ...] = (0, 30, 60, 120, 240)) -> str:
    rows = "; ".join(f"{t:g},{98.0 * math.exp(-k_rac * 60.0 * t):.6f}" for t in minutes)
    return f"t (min),ee (%); {rows}"


def add(database: Database, **entry: Any) -> dict[str, Any]:
    entry.setdefault("compound", f"RD-{entry['method']}-{len(entry)}-{entry.get('dg')}")
    mid = api.add_measurement(database, entry, actor="tester")
    return api.get_measurement(database, mid)


def raw_findings(record: dict[str, Any]) -> list[dict[str, Any]]:
    return [f for f in record["findings"] if f["rule_id"] == RULE]


def slips_of(record: dict[str, Any]) -> list[str]:
    found = raw_findings(record)
    assert len(found) == 1, found
    cause = found[0]["likely_cause"] or ""
    return [part.rsplit("[", 1)[1].rstrip("]") for part in cause.split("; ") if "[" in part]


# ---------------------------------------------------------------- saturation transfer

RATIO, T1 = 0.42, 1.2
K_SAT = (1 - RATIO) / T1  # Forsén–Hoffman with the T1 measured under saturation


def test_saturation_transfer_recomputed_and_t1_swap_named(database: Database) -> None:
    ok = add(database, method="saturation-transfer", ss_ratio=f"{RATIO}", t1=f"{T1} s",
             dg=f"{eyring_dg(K_SAT, 298.15):.2f} kJ/mol", dg_t="25 °C")  # fmt: skip
    assert raw_findings(ok) == []
    intrinsic = add(database, method="saturation-transfer", ss_ratio=f"{RATIO}",
                    t1=f"{T1 / RATIO:.6f} s", t1_kind="intrinsic",
                    dg=f"{eyring_dg(K_SAT, 298.15):.2f} kJ/mol", dg_t="298.15 K")  # fmt: skip
    assert raw_findings(intrinsic) == []
    # the apparent T1 put where the intrinsic one belongs: k = (1 − r)/(r·T1)
    swapped = add(database, method="saturation-transfer", ss_ratio=f"{RATIO}", t1=f"{T1} s",
                  dg=f"{eyring_dg(K_SAT / RATIO, 298.15):.2f} kJ/mol", dg_t="298.15 K")  # fmt: skip
    assert slips_of(swapped)[0] == "t1-kind-swapped"
    f = raw_findings(swapped)[0]
    assert f["recomputed"] == pytest.approx(eyring_dg(K_SAT, 298.15), abs=0.01)
    assert swapped["status"] == "flagged"


def test_t1_in_ms_used_as_s_is_named(database: Database) -> None:
    wrong = K_SAT / 1000.0  # T1 = 1200 (ms) put into the formula as seconds
    rec = add(database, method="saturation-transfer", ss_ratio=f"{RATIO}", t1="1200 ms",
              dg=f"{eyring_dg(wrong, 300.0):.2f} kJ/mol", dg_t="300 K")  # fmt: skip
    assert "time-unit" in slips_of(rec)
    assert "ms used as s" in raw_findings(rec)[0]["likely_cause"]


# ---------------------------------------------------------------- racemization time courses

K_RAC = 1.0e-4  # s⁻¹


def test_ee_course_barrier_is_that_of_k_enant(database: Database) -> None:
    good = eyring_dg(K_RAC / 2, 333.15)
    rec = add(database, method="equilibration", course=ee_course(K_RAC),
              dg=f"{good:.2f} kJ/mol", dg_t="60 °C")  # fmt: skip
    assert raw_findings(rec) == []
    assert rec["raw_data"]["kind"] == "ee"
    assert rec["raw_data"]["t_s"] == [0.0, 1800.0, 3600.0, 7200.0, 14400.0]
    slip = add(database, method="equilibration", course=ee_course(K_RAC),
               dg=f"{eyring_dg(K_RAC, 333.15):.2f} kJ/mol", dg_t="60 °C")  # fmt: skip
    assert slips_of(slip) == ["racemization-as-enantiomerization"]
    assert raw_findings(slip)[0]["recomputed"] == pytest.approx(good, abs=0.01)


def test_ee_course_with_racemization_convention(database: Database) -> None:
    meant = add(database, method="equilibration", course=ee_course(K_RAC), convention="k_rac",
                dg=f"{eyring_dg(K_RAC, 333.15):.2f} kJ/mol", dg_t="333.15 K")  # fmt: skip
    assert raw_findings(meant) == []
    halved = add(database, method="equilibration", course=ee_course(K_RAC), convention="k_rac",
                 dg=f"{eyring_dg(K_RAC / 2, 333.15):.2f} kJ/mol", dg_t="333.15 K")  # fmt: skip
    assert slips_of(halved) == ["enantiomerization-as-racemization"]


def test_minutes_used_as_seconds_is_named(database: Database) -> None:
    rec = add(database, method="equilibration", course=ee_course(K_RAC),
              dg=f"{eyring_dg(K_RAC / 2 * 60, 333.15):.2f} kJ/mol", dg_t="333.15 K")  # fmt: skip
    assert slips_of(rec) == ["time-unit"]
    assert "min used as s" in raw_findings(rec)[0]["likely_cause"]


def test_fraction_course_with_equilibrium_given(database: Database) -> None:
    x_eq, x0, k_obs = 0.7, 0.05, 3.0e-4
    rows = "; ".join(
        f"{t:g},{x_eq + (x0 - x_eq) * math.exp(-k_obs * 60 * t):.6f}" for t in (0, 10, 20, 40, 80)
    )
    course = f"t (min),fraction; {rows}"
    k_pq = (1 - x_eq) * k_obs
    rec = add(database, method="equilibration", course=course, x_eq=f"{x_eq}",
              dg=f"{eyring_dg(k_pq, 310.0):.2f} kJ/mol", dg_t="310 K")  # fmt: skip
    assert raw_findings(rec) == []
    observed = add(database, method="equilibration", course=course, x_eq=f"{x_eq}",
                   convention="kobs", dg=f"{eyring_dg(k_obs, 310.0):.2f} kJ/mol",
                   dg_t="310 K")  # fmt: skip
    assert raw_findings(observed) == []


# ---------------------------------------------------------------- EXSY


def test_two_site_exsy_and_k_exchange_slip(database: Database) -> None:
    k, tau, t = 2.0, 0.1, 300.0
    vol = matrix_text(two_site(k, 0.5, tau))
    rec = add(database, method="2d-exchange", mixing="100 ms", volumes=vol,
              dg=f"{eyring_dg(k, t):.2f} kJ/mol", dg_t=f"{t} K")  # fmt: skip
    assert raw_findings(rec) == []
    assert rec["raw_data"]["volumes"][0][0][0] == pytest.approx((1 + math.exp(-2 * k * tau)) / 4)
    slip = add(database, method="2d-exchange", mixing="100 ms", volumes=vol,
               dg=f"{eyring_dg(2 * k, t):.2f} kJ/mol", dg_t=f"{t} K")  # fmt: skip
    assert slips_of(slip) == ["k-exchange-as-per-site"]
    exchange = add(database, method="2d-exchange", mixing="100 ms", volumes=vol,
                   convention="exchange", dg=f"{eyring_dg(2 * k, t):.2f} kJ/mol",
                   dg_t=f"{t} K")  # fmt: skip
    assert raw_findings(exchange) == []


def test_unequal_populations_ignored_is_named(database: Database) -> None:
    k_ab, p_a, tau, t = 1.0, 0.9, 0.5, 310.0
    mat = two_site(k_ab, p_a, tau)
    # the equal-population closed form applied to these volumes (what ignoring them gives)
    r = (mat[0, 0] + mat[1, 1]) / (mat[0, 1] + mat[1, 0])
    k_equal = math.log((r + 1) / (r - 1)) / tau / 2
    rec = add(database, method="2d-exchange", mixing=f"{tau} s", volumes=matrix_text(mat),
              site_populations="90:10", direction="major-to-minor",
              dg=f"{eyring_dg(k_equal, t):.2f} kJ/mol", dg_t=f"{t} K")  # fmt: skip
    assert "populations-ignored" in slips_of(rec)
    f = raw_findings(rec)[0]
    assert f["recomputed"] == pytest.approx(eyring_dg(k_ab, t), abs=0.02)  # leaving A (major)


def test_three_sites_and_several_mixing_times(database: Database) -> None:
    p = np.array([0.5, 0.3, 0.2])
    upper = {(0, 1): 1.0, (0, 2): 0.5, (1, 2): 2.0}  # k(i→j) for i < j
    k = np.zeros((3, 3))
    for (i, j), v in upper.items():
        k[i, j], k[j, i] = v, v * p[i] / p[j]  # detailed balance
    t = 295.0
    one = add(database, method="2d-exchange", mixing="0.15 s",
              volumes=matrix_text(exsy_matrix(k, p, 0.15)), site_populations="0.5,0.3,0.2",
              site_names="A,B,C", dg=f"{eyring_dg(1.0, t):.2f} kJ/mol", dg_t=f"{t} K")  # fmt: skip
    assert raw_findings(one) == []
    taus = (0.05, 0.1, 0.2)
    fit = add(database, method="2d-exchange", mixing="50 ms, 100 ms, 200 ms",
              volumes=matrix_text(*(exsy_matrix(k, p, x) for x in taus)),
              dg=f"{eyring_dg(1.0, t):.2f} kJ/mol", dg_t=f"{t} K")  # fmt: skip
    assert raw_findings(fit) == []
    assert fit["raw_data"]["mixing_s"] == pytest.approx(list(taus))


# ---------------------------------------------------------------- inversion transfer


def inversion_course(
    k_ab: float, p_a: float, r1: tuple[float, float], delays_ms: list[float]
) -> str:
    p = np.array([p_a, 1 - p_a])
    k_ba = k_ab * p_a / p[1]
    kin = np.array([[k_ab, -k_ba], [-k_ab, k_ba]])
    relax = np.diag(r1) + kin
    start = np.array([-p[0], p[1]])  # A inverted
    rows = []
    for d in delays_ms:
        m = p + expm(-relax * d / 1000.0) @ (start - p)
        rows.append(f"{d:g},{m[0]:.7f},{m[1]:.7f}")
    return "delay (ms),A,B; " + "; ".join(rows)


def test_inversion_transfer_course(database: Database) -> None:
    delays = [1, 20, 50, 100, 200, 400, 800, 1500, 3000, 6000]
    course = inversion_course(3.0, 0.5, (0.8, 0.8), delays)
    rec = add(database, method="saturation-transfer", course=course,
              dg=f"{eyring_dg(3.0, 300.0):.2f} kJ/mol", dg_t="300 K")  # fmt: skip
    assert rec["raw_data"]["kind"] == "inversion"
    assert raw_findings(rec) == []
    slip = add(database, method="saturation-transfer", course=course,
               dg=f"{eyring_dg(6.0, 300.0):.2f} kJ/mol", dg_t="300 K")  # fmt: skip
    assert slips_of(slip) == ["k-exchange-as-per-site"]


# ---------------------------------------------------------------- what cannot be recomputed


def test_no_temperature_is_a_warning(database: Database) -> None:
    rec = add(database, method="saturation-transfer", ss_ratio="0.5", t1="1 s", dg="70 kJ/mol")
    (f,) = raw_findings(rec)
    assert f["severity"] == "warning" and "no temperature" in f["message"]


def test_uncomputable_volumes_are_a_warning(database: Database) -> None:
    # cross peaks larger than the diagonal: no real matrix logarithm (the computation says so)
    rec = add(database, method="2d-exchange", mixing="0.1 s", volumes="0.1,0.4;0.4,0.1",
              dg="70 kJ/mol", dg_t="300 K")  # fmt: skip
    (f,) = raw_findings(rec)
    assert f["severity"] == "warning" and "cannot be recomputed" in f["message"]


# ---------------------------------------------------------------- round trips and verify


def test_export_import_round_trip_keeps_raw_data(database: Database, tmp_path: Path) -> None:
    add(database, method="2d-exchange", compound="RT-1", mixing="0, 100 ms",
        volumes="0.5,0;0,0.5 | 0.4,0.1;0.1,0.4", site_names="A,B", volume_err="0.002",
        dg="70 kJ/mol", dg_t="300 K")  # fmt: skip
    add(database, method="saturation-transfer", compound="RT-2", ss_ratio="0.42 ± 0.01",
        t1="1.2 ± 0.05 s", t1_kind="intrinsic")  # fmt: skip
    add(database, method="equilibration", compound="RT-3", course=ee_course(K_RAC))
    out = tmp_path / "out.csv"
    api.export_measurements(database, str(out), format="csv", include_flagged=True)
    api.init_registry(str(tmp_path / "again.sqlite"))
    again = api.open_registry(str(tmp_path / "again.sqlite"))
    try:
        api.import_table(again, str(out), actor="tester")
        for label in ("RT-1", "RT-2", "RT-3"):
            (a,) = [r for r in api.list_measurements(database) if r["compound"] == label]
            (b,) = [r for r in api.list_measurements(again) if r["compound"] == label]
            first = api.get_measurement(database, a["id"])["raw_data"]
            assert api.get_measurement(again, b["id"])["raw_data"] == first
        assert api.verify(again)["ok"]
    finally:
        again.close()


def test_edit_of_raw_data_rechecks_and_verify_stays_clean(database: Database) -> None:
    rec = add(database, method="saturation-transfer", ss_ratio=f"{RATIO}", t1=f"{T1} s",
              dg=f"{eyring_dg(K_SAT / RATIO, 300.0):.2f} kJ/mol", dg_t="300 K")  # fmt: skip
    assert raw_findings(rec)
    api.edit_measurement(database, rec["id"], {"t1_kind": "intrinsic"}, actor="tester",
                         reason="the T1 was measured without saturation")  # fmt: skip
    after = api.get_measurement(database, rec["id"])
    assert raw_findings(after) == []
    assert after["raw_data"]["t1_kind"] == "intrinsic"
    assert api.verify(database)["ok"]


def test_verify_finds_raw_data_changed_by_hand(database: Database) -> None:
    rec = add(database, method="equilibration", course=ee_course(K_RAC))
    database.write(lambda conn: conn.execute(
        "UPDATE measurement SET course_json = replace(course_json, '0.98', '0.97') "
        "WHERE id = :id", {"id": rec["id"]}))  # fmt: skip
    report = api.verify(database)
    assert not report["ok"]
    text = str(report)
    assert "course_json" in text and "course_text" in text


def test_cli_add_with_a_course_file_and_show(tmp_path: Path, db_path: Path) -> None:
    import subprocess

    exe = Path(sys.executable).with_name("fluxledger")
    course = tmp_path / "rac.csv"
    course.write_text("t (h),ee (%)\n0,97\n1,88.1\n2,80.0\n4,66.0\n8,44.9\n", encoding="utf-8")
    run = subprocess.run(
        [str(exe), "--db", str(db_path), "add", "--method", "equilibration", "--compound",
         "ATR-1", "--course", str(course), "--dg", "100 kJ/mol", "--dg-t", "60 °C"],
        capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    assert run.returncode in (0, 1), run.stderr
    shown = subprocess.run([str(exe), "--db", str(db_path), "show", "1"], capture_output=True,
                           text=True, timeout=120)  # fmt: skip
    assert "course       ee: 5 points, t (h), ee (%)" in shown.stdout
    assert "t 28800 s   0.449" in shown.stdout
    both = subprocess.run(
        [str(exe), "--db", str(db_path), "add", "--method", "saturation-transfer", "--compound",
         "X", "--ratio", "0.5", "--t1", "1 s", "--t1-intrinsic", "2 s"],
        capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    assert both.returncode == 2 and "not both" in both.stderr


# ---------------------------------------------------------------- PostgreSQL


@pytest.mark.postgres
def test_same_findings_on_postgresql(pg_url: str, database: Database) -> None:
    api.init_registry(pg_url)
    pg = api.open_registry(pg_url)
    try:
        entry = dict(method="equilibration", compound="PG-1", course=ee_course(K_RAC),
                     dg=f"{eyring_dg(K_RAC, 333.15):.2f} kJ/mol", dg_t="60 °C")  # fmt: skip
        on_pg = api.get_measurement(pg, api.add_measurement(pg, entry, actor="t"))
        on_lite = api.get_measurement(database, api.add_measurement(database, entry, actor="t"))
        assert on_pg["raw_data"] == on_lite["raw_data"]
        pf, lf = raw_findings(on_pg)[0], raw_findings(on_lite)[0]
        assert (pf["message"], pf["likely_cause"], pf["inputs_hash"]) == (
            lf["message"], lf["likely_cause"], lf["inputs_hash"])  # fmt: skip
        assert api.verify(pg)["ok"]
    finally:
        pg.close()
