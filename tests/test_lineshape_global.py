"""The global (Eyring-tied) line-shape fit with Δν, the populations and J fitted alongside:
the site derivatives against finite differences, the errors' coverage over seeded series, and
the plans it refuses.

The demo series here are invented (sites, barrier and site equilibrium made up for the test).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import R, h, k

from registry import api
from registry.errors import UsageError
from registry.lineshape.coupled import CoupledABModel
from registry.lineshape.fit_core import ModelShape
from registry.lineshape.fit_global import SpectrumInput, fit_global
from registry.lineshape.global_sites import SitePlan
from registry.lineshape.simulate import ExchangeModel, two_site_spectrum
from registry.lineshape.spectrum import Spectrum

FREQ = np.linspace(-200.0, 200.0, 801)


def _central(make, value: float, step: float, k_per_s: float, w: float, off: float):  # type: ignore[no-untyped-def]
    """Central difference of the spectrum in one site parameter (independent of ``along``)."""
    up = ModelShape(make(value + step), 2 * np.pi * FREQ).value(k_per_s, w, off)
    down = ModelShape(make(value - step), 2 * np.pi * FREQ).value(k_per_s, w, off)
    return (up - down) / (2 * step)


@settings(max_examples=40, deadline=None)
@given(
    k_per_s=st.floats(1.0, 5000.0),
    delta=st.floats(20.0, 150.0),
    p1=st.floats(0.2, 0.8),
    w=st.floats(0.5, 5.0),
    off=st.floats(-5.0, 5.0),
)
def test_two_site_derivatives_match_finite_differences(
    k_per_s: float, delta: float, p1: float, w: float, off: float
) -> None:
    def by_delta(d: float) -> ExchangeModel:
        return ExchangeModel((10.0 + d / 2, 10.0 - d / 2), (p1, 1.0 - p1))

    def by_p1(p: float) -> ExchangeModel:
        return ExchangeModel((10.0 + delta / 2, 10.0 - delta / 2), (p, 1.0 - p))

    model = by_delta(delta)
    shape = ModelShape(model, 2 * np.pi * FREQ)
    for name, make, value, step in (("delta", by_delta, delta, 1e-4),
                                    ("population", by_p1, p1, 1e-6)):  # fmt: skip
        exact = shape.along(k_per_s, w, off, *model.site_derivative(name, k_per_s))
        numeric = _central(make, value, step, k_per_s, w, off)
        scale = float(np.abs(numeric).max()) + 1e-12
        # central differences carry an O(step²) error and rounding: 1e-5 of the largest value
        assert np.abs(exact - numeric).max() <= 1e-5 * scale + 1e-9  # common practice, no source


@settings(max_examples=30, deadline=None)
@given(
    k_per_s=st.floats(1.0, 2000.0),
    delta=st.floats(20.0, 120.0),
    j=st.floats(2.0, 20.0),
    w=st.floats(0.5, 5.0),
)
def test_coupled_derivatives_match_finite_differences(
    k_per_s: float, delta: float, j: float, w: float
) -> None:
    model = CoupledABModel((delta / 2, -delta / 2), j)
    shape = ModelShape(model, 2 * np.pi * FREQ)
    cases = (
        ("delta", lambda d: CoupledABModel((d / 2, -d / 2), j), delta),
        ("coupling", lambda jj: CoupledABModel((delta / 2, -delta / 2), jj), j),
    )
    for name, make, value in cases:
        exact = shape.along(k_per_s, w, 0.3, *model.site_derivative(name, k_per_s))
        numeric = _central(make, value, 1e-4, k_per_s, w, 0.3)
        scale = float(np.abs(numeric).max()) + 1e-12
        assert np.abs(exact - numeric).max() <= 1e-5 * scale + 1e-9  # common practice, no source


def test_derivative_near_a_defective_matrix_uses_direct_solves() -> None:
    # for equal populations L = [[iπΔν − k, k], [k, −iπΔν − k]] has eigenvalues
    # −k ± √(k² − π²Δν²) (worked by hand), which meet at k = πΔν: there L is defective and the
    # eigen route gives way to solves per frequency
    model = ExchangeModel((50.0, -50.0), (0.5, 0.5))
    k_c = math.pi * 100.0
    shape = ModelShape(model, 2 * np.pi * FREQ)
    assert shape.resolvent(k_c).direct
    exact = shape.along(k_c, 1.0, 0.0, *model.site_derivative("delta", k_c))
    numeric = _central(
        lambda d: ExchangeModel((d / 2, -d / 2), (0.5, 0.5)), 100.0, 1e-3, k_c, 1.0, 0.0
    )
    assert np.abs(exact - numeric).max() <= 1e-5 * np.abs(numeric).max()  # as above


# ---- coverage over seeded drifting series -----------------------------------------------------

TEMPS = (270.0, 285.0, 300.0, 315.0, 330.0)
DH, DS = 58.0, -7.0  # kJ/mol, J/(mol·K): invented barrier
SITE_DH, SITE_DS = 2.0, 5.0  # kJ/mol, J/(mol·K): invented site equilibrium p₂/p₁


def _rate(t: float) -> float:
    """Eyring (1935), κ = 1, written out with CODATA constants (not the code's eyring module)."""
    return k * t / h * math.exp(DS / R - DH * 1000.0 / (R * t))


def _p1(t: float) -> float:
    return 1.0 / (1.0 + math.exp(-SITE_DH * 1000.0 / (R * t) + SITE_DS / R))


def _series(seed: int) -> list[Spectrum]:
    """Five invented spectra: sites drifting 50 → 55 / −50 → −48 Hz, p₁ by van 't Hoff, the
    width 1.3 → 1.0 Hz seen also on a reference line at −250 Hz, 1 % noise."""
    rng = np.random.default_rng(7000 + seed)
    freq = np.linspace(-280.0, 200.0, 1536)
    out = []
    for t in TEMPS:
        frac = (t - TEMPS[0]) / (TEMPS[-1] - TEMPS[0])
        w = 1.3 - 0.3 * frac
        y = two_site_spectrum(freq, 50.0 + 5.0 * frac, -50.0 + 2.0 * frac, _rate(t), _p1(t), w, w)
        y = y + 0.5 * (w / 2 / math.pi) / ((freq + 250.0) ** 2 + (w / 2) ** 2)
        y = y + rng.normal(0.0, 0.01 * y.max(), freq.size)
        out.append(Spectrum(freq, y, "Hz", f"s{t:.0f}", t_k=t))
    return out


def _coverage_ok(z: np.ndarray) -> bool:
    """Normal errors put 68.3 % of |z| below 1 and 95.4 % below 2. One z per series (the
    series are independent, the rates within one are not): with 60 draws the first fraction
    has binomial σ = √(0.683·0.317/60) = 0.060, so it lies in [0.50, 0.86] (±3σ); the second
    (σ = 0.027) lies above 0.85 (≈ −3.8σ)."""
    inside1 = float(np.mean(np.abs(z) < 1.0))
    inside2 = float(np.mean(np.abs(z) < 2.0))
    return 0.50 <= inside1 <= 0.86 and inside2 >= 0.85


def _z_values(seeds: int) -> tuple[np.ndarray, np.ndarray]:
    """z of one rate per series (the temperature taken in turn) and of ΔH‡, Δν and p₁ 'auto'
    and the width from a reference line."""
    z_rate, z_dh = [], []
    for seed in range(seeds):
        result = api.fit_lineshapes(
            _series(seed), "50,-50 Hz", populations="0.5,0.5", region="-200,200 Hz",
            reference="-280,-220 Hz", store_doubtful=True, global_fit=True,
        )  # fmt: skip
        g = result.global_fit
        assert g is not None and g.converged
        fit = g.fits[seed % len(TEMPS)]
        z_rate.append((fit.k_per_s - _rate(fit.t_k)) / fit.k_err_per_s)  # type: ignore[arg-type, operator]
        z_dh.append((g.eyring.dh_kj_mol - DH) / g.eyring.dh_err_kj_mol)  # type: ignore[operator]
    return np.array(z_rate), np.array(z_dh)


def test_global_errors_cover_the_truth_at_their_stated_level() -> None:
    """60 seeded series fitted globally with Δν and p₁ on shared lines: the rates' and ΔH‡'s z
    must cover the truth as normal errors do; halved or doubled errors must not."""
    for z in _z_values(60):
        assert _coverage_ok(z)
        # the check can fail: errors half or twice as large as reported would not pass it
        assert not _coverage_ok(2.0 * z)
        assert not _coverage_ok(0.5 * z)


def test_coverage_fails_with_the_sites_held(monkeypatch: pytest.MonkeyPatch) -> None:
    """Holding Δν and p₁ at the series fit's values (as the global fit once did) leaves their
    uncertainty out of the errors, and the same check catches it."""
    import registry.lineshape.global_sites as global_sites

    monkeypatch.setattr(global_sites, "plan_for", lambda *args: SitePlan())
    z_rate, z_dh = _z_values(60)
    assert not _coverage_ok(z_rate)
    assert not _coverage_ok(z_dh)


def test_global_fit_reports_its_shared_lines() -> None:
    result = api.fit_lineshapes(
        _series(0), "50,-50 Hz", populations="0.5,0.5", region="-200,200 Hz",
        reference="-280,-220 Hz", store_doubtful=True, global_fit=True,
    )  # fmt: skip
    g = result.global_fit
    assert g is not None
    kinds = {t.name: t.kind for t in g.trends}
    assert kinds == {"delta": "linear drift", "population": "van 't Hoff"}
    data = result.to_dict()["global"]["trends"]
    drift = next(d for d in data if d["parameter"] == "delta")
    # the series' Δν: 100 + 3·(T − 270)/60 Hz; at T̄ = 300 K that is 101.5 Hz (from the setup)
    assert drift["at_k"] == pytest.approx(300.0)
    assert abs(drift["value_hz"] - 101.5) < 4 * drift["error_hz"]
    vh = next(d for d in data if d["parameter"] == "population")
    assert abs(vh["dh_kj_mol"] - SITE_DH) < 4 * vh["dh_err_kj_mol"]
    hows = {n: how for n, _v, _e, how in g.fits[0].parameters}
    assert hows == {"delta": "global drift", "population": "global van 't Hoff",
                    "width": "reference"}  # fmt: skip


# ---- plans refused --------------------------------------------------------------------------


def test_site_plan_refuses_unknown_words() -> None:
    with pytest.raises(UsageError, match="delta must be one of held, own, level, drift"):
        SitePlan(delta="wobble")
    with pytest.raises(UsageError, match="population must be one of"):
        SitePlan(population="drift")


def test_global_fit_refuses_varying_sites_for_three_sites() -> None:
    model = ExchangeModel((-60.0, 0.0, 60.0), (1 / 3, 1 / 3, 1 / 3))
    freq = np.linspace(-150.0, 150.0, 600)
    spectra = [
        SpectrumInput(freq, model.spectrum(freq, 50.0 * (i + 1), 1.0), t, f"s{i}")
        for i, t in enumerate((290.0, 310.0))
    ]
    with pytest.raises(UsageError, match="vary only for two sites"):
        fit_global(spectra, model, width_hz=1.0, fix_width=True, plan=SitePlan(delta="drift"))


def test_site_derivative_refuses_what_a_model_has_not() -> None:
    with pytest.raises(ValueError, match="two sites only"):
        ExchangeModel((-60.0, 0.0, 60.0), (1 / 3, 1 / 3, 1 / 3)).site_derivative("delta", 1.0)
    with pytest.raises(ValueError, match="no derivative for 'coupling'"):
        ExchangeModel((-60.0, 60.0), (0.5, 0.5)).site_derivative("coupling", 1.0)
    with pytest.raises(ValueError, match="no derivative for 'population'"):
        CoupledABModel((-30.0, 30.0), 10.0).site_derivative("population", 1.0)


def test_cli_shows_the_global_lines(cli, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from registry.lineshape.spectrum import csv_text

    files = []
    for s in _series(0):
        path = tmp_path / f"{s.source}.csv"
        path.write_text(csv_text(s.x, s.intensity, "Hz", {"temperature": f"{s.t_k:.2f} K"}))
        files.append(str(path))
    args = ("lineshape", "fit", *files, "--sites", "50,-50 Hz", "--populations", "0.5,0.5",
            "--region", "-200,200 Hz", "--reference", "-280,-220 Hz", "--global")  # fmt: skip
    result = cli(*args)
    assert result.exit_code == 0, result.stderr
    lines = result.stdout.splitlines()
    at = next(i for i, ln in enumerate(lines) if ln.startswith("global fit (5 spectra, "))
    assert lines[at + 1].startswith("Δν drift (global fit): ")
    assert lines[at + 1].endswith(" Hz/K") and " at 300.0 K, " in lines[at + 1]
    assert lines[at + 2].startswith("populations, van 't Hoff (global fit; K = p2/p1): ΔH° = ")
    data = json.loads(cli(*args, "--json").stdout)
    trends = data["global"]["trends"]
    assert [(t["parameter"], t["kind"]) for t in trends] == [
        ("delta", "linear drift"), ("population", "van 't Hoff")
    ]  # fmt: skip
    assert trends[0]["from"] == files
    rows = data["global"]["fits"][0]["parameters"]
    assert [r["how"] for r in rows] == ["global drift", "global van 't Hoff", "reference"]
    assert all(r["error"] is not None and r["error"] > 0 for r in rows)


def test_modes_other_than_auto() -> None:
    """'fit' gives each spectrum its own Δν and p₁ (no shared lines); 'hold' holds them; a
    tied width is one width for all spectra."""
    spectra = _series(1)
    common = dict(populations="0.5,0.5", region="-200,200 Hz", reference="-280,-220 Hz",
                  store_doubtful=True, global_fit=True)  # fmt: skip
    own = api.fit_lineshapes(spectra, "50,-50 Hz", shifts_mode="fit", populations_mode="fit",
                             **common).global_fit  # type: ignore[arg-type]  # fmt: skip
    assert own is not None and own.trends == ()
    assert [h for _n, _v, _e, h in own.fits[0].parameters] == ["fitted", "fitted", "reference"]
    # the slow-exchange spectrum at 270 K fixes its own Δν: 100 Hz there (from the setup)
    delta = own.fits[0].parameters[0]
    assert abs(delta[1] - 100.0) < 4 * delta[2]
    held = api.fit_lineshapes(spectra, "50,-50 Hz", shifts_mode="hold", populations_mode="hold",
                              **common).global_fit  # type: ignore[arg-type]  # fmt: skip
    assert held is not None and held.trends == ()
    assert [(v, e, h) for _n, v, e, h in held.fits[0].parameters[:2]] == [
        (100.0, None, "held"), (0.5, None, "held")
    ]  # fmt: skip
    tied = api.fit_lineshapes(spectra, "50,-50 Hz", tie_width=True, **common).global_fit  # type: ignore[arg-type]
    assert tied is not None
    widths = {(v, e, h) for f in tied.fits for n, v, e, h in f.parameters if n == "width"}
    assert len(widths) == 1 and next(iter(widths))[2] == "tied (series)"


def test_coupled_pair_shares_one_coupling() -> None:
    """An invented AB series (J = 12 Hz, ΔH‡ = 62 kJ/mol, ΔS‡ = 0) with J fitted: one J for
    the whole series, within its error of the value simulated."""
    rng = np.random.default_rng(11)
    freq = np.linspace(-120.0, 120.0, 2048)
    spectra = []
    for t in (280.0, 295.0, 310.0, 325.0):
        rate = k * t / h * math.exp(-62000.0 / (R * t))  # Eyring, κ = 1, CODATA constants
        y = CoupledABModel((30.0, -30.0), 12.0).spectrum(freq, rate, 1.0)
        spectra.append(Spectrum(freq, y + rng.normal(0.0, 0.01 * y.max(), freq.size), "Hz",
                                f"ab{t:.0f}", t_k=t))  # fmt: skip
    result = api.fit_lineshapes(spectra, "30,-30 Hz", coupling="10 Hz", fit_coupling=True,
                                width="1 Hz", fix_width=True, global_fit=True)  # fmt: skip
    g = result.global_fit
    assert g is not None and g.converged
    j = next(t for t in g.trends if t.name == "coupling")
    assert j.kind == "constant" and abs(j.a - 12.0) < 4 * math.sqrt(j.cov[0][0])
    assert abs(g.eyring.dh_kj_mol - 62.0) < 4 * g.eyring.dh_err_kj_mol  # type: ignore[operator]


@pytest.mark.parametrize("sigma", [-0.1, math.nan, math.inf])
def test_global_fit_refuses_a_width_sigma_that_is_no_sigma(sigma: float) -> None:
    model = ExchangeModel((50.0, -50.0), (0.5, 0.5))
    freq = np.linspace(-150.0, 150.0, 600)
    spectra = [
        SpectrumInput(
            freq,
            model.spectrum(freq, 20.0 * (i + 1), 1.0),
            t,
            f"s{i}",
            width_hz=1.0,
            width_err_hz=sigma,
        )
        for i, t in enumerate((290.0, 310.0))
    ]
    with pytest.raises(UsageError, match=r"s0: width_err_hz must be a finite σ ≥ 0, not "):
        fit_global(spectra, model, width_hz=1.0)
