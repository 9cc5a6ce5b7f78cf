"""``calc exsy``: rate constants from 2D exchange volumes, checked against an independent
calculation done here with scipy.linalg (``expm`` for the forward model, ``logm`` for the
inverse) and against the published two-site closed form written out in the test.

Forward model (C. L. Perrin and T. J. Dwyer, Chem. Rev. 90, 935 (1990)): the volume matrix
at mixing time τm is I(τm) = expm(−R·τm)·diag(M0), with R_ii = R1_i + Σ_j k(i→j) and
R_ij = −k(j→i); I_ij is the peak at site i whose magnetization started at site j.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy import constants as codata
from scipy.linalg import expm, logm
from typer.testing import CliRunner

from registry import api
from registry.cli.calc import app as calc_app
from registry.errors import UnitError, UsageError
from registry.kinetics.checks import KineticsInputError
from registry.kinetics.exsy import exsy_rates

runner = CliRunner()
R_KJ = codata.R / 1000


def relaxation_matrix(k: np.ndarray, r1: np.ndarray) -> np.ndarray:
    """R of dM/dt = −R·(M − M_eq) (McConnell, J. Chem. Phys. 28, 430 (1958)), written here."""
    n = len(r1)
    out = np.zeros((n, n))
    for i in range(n):
        out[i, i] = r1[i] + sum(k[i, j] for j in range(n) if j != i)
        for j in range(n):
            if i != j:
                out[i, j] = -k[j, i]
    return out


def volumes(k: np.ndarray, r1: np.ndarray, m0: np.ndarray, tau: float) -> np.ndarray:
    """The forward model: I(τm) = expm(−R·τm)·diag(M0)."""
    return expm(-relaxation_matrix(k, r1) * tau) @ np.diag(m0)


def rates_by_logm(vol: np.ndarray, m0: np.ndarray, tau: float) -> np.ndarray:
    """The inverse, independently: R = −logm(I·diag(M0)⁻¹)/τm, k(i→j) = −R_ji."""
    r = -np.real(logm(vol @ np.diag(1.0 / m0))) / tau
    k = -r.T.copy()
    np.fill_diagonal(k, 0.0)
    return k


def balanced(upper: dict[tuple[int, int], float], p: np.ndarray) -> np.ndarray:
    """k(i→j) given above the diagonal, k(j→i) = k(i→j)·p_i/p_j (detailed balance)."""
    n = len(p)
    k = np.zeros((n, n))
    for (i, j), v in upper.items():
        k[i, j] = v
        k[j, i] = v * p[i] / p[j]
    return k


def text(vol: np.ndarray) -> str:
    return ";".join(",".join(repr(float(v)) for v in row) for row in vol)


def perrin_dwyer_two_site(vol: np.ndarray, pa: float, pb: float, tau: float) -> float:
    """k = k_AB + k_BA = ln((r+1)/(r−1))/τm with r = 4·x_A·x_B·(I_AA + I_BB)/(I_AB + I_BA) −
    (x_A − x_B)² (Perrin & Dwyer, Chem. Rev. 90, 935 (1990), the two-site case; from memory)."""
    r = 4 * pa * pb * (vol[0, 0] + vol[1, 1]) / (vol[0, 1] + vol[1, 0]) - (pa - pb) ** 2
    return math.log((r + 1) / (r - 1)) / tau


# --- the matrix method against expm/logm ---------------------------------------------------


P3 = np.array([0.5, 0.3, 0.2])
K3 = balanced({(0, 1): 1.2, (0, 2): 0.4, (1, 2): 0.9}, P3)


def test_three_sites_unequal_populations_recover_k() -> None:
    tau = 0.15
    vol = volumes(K3, np.full(3, 0.8), 1000.0 * P3, tau)
    res = api.calc_exsy(mixing="150 ms", volumes=text(vol), populations="0.5,0.3,0.2")
    got = np.array(res.rate_matrix_per_s)
    off = ~np.eye(3, dtype=bool)
    assert got[off] == pytest.approx(K3[off], rel=1e-8)
    # the same numbers by scipy's logm, written here (independent of the code's eigen route)
    assert got[off] == pytest.approx(rates_by_logm(vol, 1000.0 * P3 * np.exp(-0.8 * tau), tau)[off])
    assert np.sum(got, axis=1) == pytest.approx(np.zeros(3), abs=1e-12)
    assert res.method == "general matrix method (Perrin & Dwyer 1990)"
    assert res.populations == pytest.approx(tuple(P3))
    assert res.rate("A", "C").k_per_s == pytest.approx(0.4, rel=1e-8)


def test_reference_spectrum_gives_unequal_relaxation() -> None:
    r1 = np.array([0.5, 1.1, 2.0])
    m0 = 100.0 * P3
    vol = volumes(K3, r1, m0, 0.1)
    res = exsy_rates(vol, 0.1, reference=np.diag(m0))
    off = ~np.eye(3, dtype=bool)
    assert res.k_per_s[off] == pytest.approx(K3[off], rel=1e-8)
    assert res.r1_per_s == pytest.approx(r1, rel=1e-8)
    assert res.k_per_s[off] == pytest.approx(rates_by_logm(vol, m0, 0.1)[off], rel=1e-8)


def test_two_site_closed_form_against_perrin_dwyer() -> None:
    pa, pb, tau = 0.7, 0.3, 0.25
    k = balanced({(0, 1): 0.6}, np.array([pa, pb]))  # k_AB 0.6, k_BA 1.4 s⁻¹
    vol = volumes(k, np.full(2, 0.5), np.array([pa, pb]) * 500.0, tau)
    data = json.loads(
        runner.invoke(
            calc_app,
            ["exsy", "--mixing", "0.25 s", "--volumes", text(vol), "--populations", "70:30",
             "--json"],
        ).stdout
    )  # fmt: skip
    k_ex = perrin_dwyer_two_site(vol, pa, pb, tau)
    assert k_ex == pytest.approx(2.0, rel=1e-9)  # the published form inverts the forward model
    assert data["method"] == "two-site closed form (equal T1)"
    assert data["k_exchange_per_s"] == pytest.approx(k_ex, rel=1e-9)
    assert data["k_per_s"] == pytest.approx(pb * k_ex, rel=1e-9)  # A→B
    assert data["k_reverse_per_s"] == pytest.approx(pa * k_ex, rel=1e-9)
    assert data["k_convention"] == "per-site"
    assert data["rate_matrix_per_s"][0] == pytest.approx([-0.6, 0.6], rel=1e-9)


def test_two_site_closed_form_equals_matrix_method() -> None:
    k = balanced({(0, 1): 2.0}, np.array([0.5, 0.5]))
    vol = volumes(k, np.full(2, 0.3), np.array([50.0, 50.0]), 0.1)
    closed = api.calc_exsy(mixing="0.1 s", volumes=vol.tolist())
    matrix = exsy_rates(vol, 0.1)
    assert closed.rate("A", "B").k_per_s == pytest.approx(matrix.k_per_s[0, 1], rel=1e-9)
    assert closed.rate("A", "B").k_per_s == pytest.approx(2.0, rel=1e-9)


def test_several_mixing_times_fitted_together() -> None:
    r1 = np.array([0.6, 0.9, 1.3])
    m0 = 200.0 * P3
    taus = [0.0, 0.05, 0.1, 0.2, 0.4]
    mats = [text(volumes(K3, r1, m0, t)) for t in taus]
    args = ["exsy", "--json", "--sites", "ax,eq,tw"]
    for t, m in zip(taus, mats, strict=True):
        args += ["--mixing", f"{t * 1000:g} ms" if t else "0", "--volumes", m]
    result = runner.invoke(calc_app, args)
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["method"].startswith("least squares on the volumes of all mixing times")
    got = np.array(data["rate_matrix_per_s"])
    off = ~np.eye(3, dtype=bool)
    assert got[off] == pytest.approx(K3[off], rel=1e-5)
    assert data["r1_per_s"] == pytest.approx(r1.tolist(), rel=1e-5)
    assert data["populations"] == pytest.approx(P3.tolist(), rel=1e-6)
    assert data["populations_from"] == "fitted"
    assert data["mixing_s"] == pytest.approx(taus)
    assert [r["from"] + r["to"] for r in data["rates"][:2]] == ["axeq", "axtw"]


def test_eyring_barrier_of_each_rate() -> None:
    vol = volumes(K3, np.full(3, 0.8), 1000.0 * P3, 0.15)
    res = api.calc_exsy(
        mixing="0.15 s", volumes=text(vol), populations="50,30,20", temperature="-20 °C"
    )
    t = 253.15
    for r in res.rates:
        # ΔG‡ = RT·ln(k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)), CODATA constants
        expected = R_KJ * t * math.log(codata.Boltzmann * t / (codata.Planck * r.k_per_s))
        assert r.dg.kj_mol == pytest.approx(expected, rel=1e-10)


# --- uncertainties: first-order propagation against a Monte-Carlo done here ----------------


@pytest.mark.parametrize("n_sites", [2, 3])
def test_propagated_sigma_matches_monte_carlo(n_sites: int) -> None:
    if n_sites == 2:
        p = np.array([0.6, 0.4])
        k = balanced({(0, 1): 1.0}, p)
    else:
        p, k = P3, K3
    tau, sigma = 0.2, 0.5
    vol = volumes(k, np.full(n_sites, 0.5), 100.0 * p, tau)
    res = api.calc_exsy(mixing=tau, volumes=vol.tolist(), volume_err=sigma)
    rng = np.random.default_rng(20261205)
    draws = []
    for _ in range(3000):
        noisy = vol + rng.normal(0.0, sigma, vol.shape)
        if n_sites == 2:  # column-sum populations, as the code under test uses without them
            pa, pb = noisy.sum(axis=0) / noisy.sum()
            draws.append(pb * perrin_dwyer_two_site(noisy, pa, pb, tau))
        else:
            draws.append(rates_by_logm(noisy, noisy.sum(axis=0), tau)[0, 1])
    mc = float(np.std(draws, ddof=1))
    # 3000 draws: the standard error of a standard deviation is ≈ 1/√(2·3000) ≈ 1.3 %; the
    # linear propagation misses the logarithm's curvature by a few % at this noise: 10 %
    assert res.rate("A", "B").k_err_per_s == pytest.approx(mc, rel=0.10)
    assert res.rate("A", "B").k_per_s == pytest.approx(np.mean(draws), rel=0.02)


def test_without_sigma_no_uncertainty_is_invented() -> None:
    vol = volumes(K3, np.full(3, 0.8), 1000.0 * P3, 0.15)
    res = api.calc_exsy(mixing="0.15 s", volumes=vol.tolist())
    assert all(r.k_err_per_s is None for r in res.rates)
    assert "no σ of the volumes given (volume_err): no uncertainties propagated" in res.notes


# --- bad input --------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        (["--volumes", "80,12;12"], 1, "the matrix must be square"),
        (["--volumes", "80,12,1;12,80,1"], 1, "the matrix must be square"),
        (["--volumes", "80,-12;12,80"], 1, "a peak volume cannot be negative"),
        (["--volumes", "0,12;12,80"], 1, "diagonal peak 1 is ≤ 0"),
        (["--volumes", "80,12;12,eighty"], 1, "cannot read 'eighty'"),
        (["--volumes", "80,12;12,80", "--populations", "0.7,0.2"], 1, "sum to 0.9"),
        (["--volumes", "80,12;12,80", "--populations", "0.5,0.3,0.2"], 1, "give 2 populations"),
        (["--volumes", "80,12;12,80", "--volume-err", "-1"], 1, "volume_err"),
    ],
)
def test_bad_volumes_are_named(args: list[str], code: int, message: str) -> None:
    result = runner.invoke(calc_app, ["exsy", "--mixing", "0.3 s", *args])
    assert result.exit_code == code
    assert result.stdout == ""
    assert result.stderr.startswith("error: ") and message in result.stderr
    assert "Traceback" not in result.stderr


@pytest.mark.parametrize(
    ("mixing", "code", "message"),
    [
        (["0"], 2, "give at least one mixing time > 0"),
        (["0 s"], 2, "give at least one mixing time > 0"),
        (["-0.3 s"], 1, "a mixing time cannot be negative"),
        (["0.3 parsecs"], 1, "mixing: cannot read '0.3 parsecs'"),
        (["0.3"], 1, "mixing: cannot read '0.3': no unit given"),
        (["0.3 s", "0.6 s"], 2, "2 mixing time(s) but 1 volume matrices"),
    ],
)
def test_bad_mixing_times(mixing: list[str], code: int, message: str) -> None:
    args = ["exsy", "--volumes", "80,12;12,80"]
    for m in mixing:
        args += ["--mixing", m]
    result = runner.invoke(calc_app, args)
    assert result.exit_code == code, result.stderr
    assert message in result.stderr
    assert "Traceback" not in result.stderr


def test_library_errors_are_typed() -> None:
    with pytest.raises(UsageError):
        api.calc_exsy(mixing="0", volumes="80,12;12,80")
    with pytest.raises(UnitError):
        api.calc_exsy(mixing="0.3 s", volumes="80,12;12")
    with pytest.raises(KineticsInputError, match="mixing time must be > 0"):
        exsy_rates([[80, 12], [12, 80]], 0.0)
    with pytest.raises(KineticsInputError, match="eigenvalue"):
        # cross peaks larger than the diagonal: past equilibrium, no real logarithm
        exsy_rates([[10, 90], [90, 10]], 0.3)


# --- property: any 2–4-site rate matrix comes back --------------------------------------


@st.composite
def exchange_systems(draw: st.DrawFn) -> tuple[np.ndarray, np.ndarray, float]:
    n = draw(st.integers(2, 4))
    raw = np.array([draw(st.floats(0.5, 5.0)) for _ in range(n)])
    p = raw / raw.sum()
    upper = {(i, j): draw(st.floats(0.05, 3.0)) for i in range(n) for j in range(i + 1, n)}
    tau = draw(st.floats(0.02, 0.3))
    return balanced(upper, p), p, tau


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(exchange_systems())
def test_property_rate_matrix_recovered(system: tuple[np.ndarray, np.ndarray, float]) -> None:
    k, p, tau = system
    n = len(p)
    vol = volumes(k, np.full(n, 0.7), 100.0 * p, tau)
    res = api.calc_exsy(mixing=tau, volumes=vol.tolist(), populations=p.tolist())
    off = ~np.eye(n, dtype=bool)
    assert np.array(res.rate_matrix_per_s)[off] == pytest.approx(k[off], rel=1e-6, abs=1e-9)


def test_fit_sigma_against_monte_carlo() -> None:
    """Several noisy mixing times: the fit's σ (absolute, from σ of the volumes) against the
    spread of k over repeated noisy data sets made here."""
    p = np.array([0.65, 0.35])
    k = balanced({(0, 1): 0.3}, p)
    taus = [0.0, 0.1, 0.2, 0.4, 0.8]
    clean = [volumes(k, np.array([0.7, 1.1]), 200.0 * p, t) for t in taus]
    sigma = 0.3
    rng = np.random.default_rng(5)
    ks, errs, chi2 = [], [], []
    for _ in range(150):
        mats = [(v + rng.normal(0.0, sigma, v.shape)).clip(0).tolist() for v in clean]
        res = api.calc_exsy(mixing=taus, volumes=mats, volume_err=sigma)
        ks.append(res.rate("A", "B").k_per_s)
        errs.append(res.rate("A", "B").k_err_per_s)
        chi2.append(res.chi2_reduced)
    # 150 fits: σ of the spread known to ≈ 6 %; 20 % allowed. χ²/dof averages 1 when σ is right
    assert float(np.median(errs)) == pytest.approx(float(np.std(ks, ddof=1)), rel=0.2)
    assert float(np.mean(ks)) == pytest.approx(0.3, rel=0.02)
    assert float(np.mean(chi2)) == pytest.approx(1.0, abs=0.15)
