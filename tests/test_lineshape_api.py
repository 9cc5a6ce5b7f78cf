"""The line-shape library calls: ``api.simulate_lineshape`` and ``api.fit_lineshapes``.

What the records hold, what is written and stored, and bad input (errors name the argument and
the text, nothing is written or stored before the input is known to be good). Reference values:
the Lorentzian peak height 2/(πΓ) of a unit-area line of FWHM Γ (the Cauchy density); ppm × MHz
= Hz (definition of the ppm scale); 0 °C = 273.15 K (SI); the Eyring equation with CODATA
constants for the simulated rates (checked in test_lineshape_fit.py).
"""

from __future__ import annotations

import dataclasses
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from registry import api
from registry.errors import NotFoundError, UnitError, UsageError
from registry.lineshape.eyring import eyring_ln_rate
from registry.lineshape.spectrum import read_spectrum
from registry.storage.database import Database

SITES = "3.15,2.85"
TEMPS = (270.0, 285.0, 300.0)
DH, DS = 60.0, 5.0  # invented demo barrier


@pytest.fixture(scope="module")
def vt_files(tmp_path_factory: pytest.TempPathFactory) -> list[Path]:
    """Three simulated spectra (in ppm, 400.13 MHz, temperatures in the files), seeded noise."""
    folder = tmp_path_factory.mktemp("vt")
    files = []
    for i, t in enumerate(TEMPS):
        path = folder / f"vt_{t:.0f}.csv"
        api.simulate_lineshape(
            SITES, math.exp(eyring_ln_rate(t, DH, DS)), out=path, field="400.13 MHz",
            width=1.2, points=4096, noise=0.01, seed=i + 1, temperature=f"{t} K",
        )  # fmt: skip
        files.append(path)
    return files


# ------------------------------------------------------------------------------ simulate


def test_simulate_slow_exchange_peak_heights() -> None:
    # k → 0: two Lorentzians of area 1/2 and FWHM w; each peaks at ½·2/(πw) = 1/(πw)
    width = 2.0
    result = api.simulate_lineshape(
        "-100,100 Hz", 1e-6, width=width, window="-300,300 Hz", points=6001
    )  # a point every 0.1 Hz, one on each site
    assert result.file is None and result.x_unit == "Hz" and result.observe_mhz is None
    assert result.x is not None and result.intensity is not None
    at_site = result.intensity[np.argmin(np.abs(result.x - 100.0))]
    # the other line's tail adds 1/(2π)·(w/2)/200² there, 3e-5 relative
    assert at_site == pytest.approx(1.0 / (math.pi * width), rel=1e-4)
    assert result.seed is None  # no noise drawn


def test_simulate_reads_ppm_numbers_and_temperature() -> None:
    result = api.simulate_lineshape(
        [3.0, 2.9], "20 s-1", field=400, window="3.2,2.7", points=501, temperature="-20 °C"
    )
    assert result.sites_hz == pytest.approx((1200.0, 1160.0))  # ppm × MHz = Hz
    assert result.window_hz == pytest.approx((1080.0, 1280.0))
    assert result.x_unit == "ppm"
    assert result.x is not None and result.x.min() == pytest.approx(2.7)
    assert result.t_k == pytest.approx(253.15)  # −20 °C
    assert result.to_dict()["populations"] == [0.5, 0.5]
    with pytest.raises(dataclasses.FrozenInstanceError):
        result.k_per_s = 1.0  # type: ignore[misc]


def test_simulate_noise_is_seeded() -> None:
    def draw(seed: int) -> np.ndarray:
        r = api.simulate_lineshape("-60,60 Hz", 266, points=256, noise=0.05, seed=seed)
        assert r.intensity is not None
        return r.intensity

    np.testing.assert_array_equal(draw(4), draw(4))
    assert not np.array_equal(draw(4), draw(5))


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"sites": "3.0,abc"}, UnitError, "sites: cannot read '3.0,abc': write numbers"),
        ({"sites": "3.0 Hz"}, UsageError, "sites needs at least two shifts"),
        ({"sites": "5,5 Hz"}, UsageError, "sites: two sites at the same shift"),
        ({"sites": "3.0,2.9"}, UsageError, "sites is in ppm: give the spectrometer frequency"),
        ({"sites": "3.0 ppm,60 Hz"}, UnitError, "sites: cannot read '3.0 ppm,60 Hz': write all"),
        ({"k": "-5"}, UnitError, "k: cannot read '-5': must be > 0"),
        ({"k": "5 kJ/mol"}, UnitError, "k: cannot read '5 kJ/mol'"),
        ({"width": 0}, UnitError, "width: cannot read '0': must be > 0"),
        ({"field": "0"}, UnitError, "field: cannot read '0': the spectrometer frequency"),
        ({"populations": "1,2 Hz"}, UnitError, "populations: cannot read '1,2 Hz': populations"),
        ({"populations": "1,-1"}, UnitError, "populations: cannot read '1,-1': every population"),
        ({"populations": "1"}, UsageError, "populations gives 1 value for 2 sites"),
        ({"scheme": "star"}, UsageError, "scheme must be one of mutual, cycle, not 'star'"),
        ({"window": "10 Hz"}, UnitError, "window: cannot read '10 Hz': give two values"),
        ({"window": "5,5 Hz"}, UnitError, "window: cannot read '5,5 Hz': the two ends must"),
        ({"points": 8}, UsageError, "points must be a whole number ≥ 16, not 8"),
        ({"noise": -0.1}, UsageError, "noise must be ≥ 0"),
        ({"noise": math.nan}, UsageError, "noise must be ≥ 0"),
        ({"temperature": "hot"}, UnitError, "temperature: cannot read 'hot'"),
    ],
)
def test_simulate_bad_input_names_the_argument(
    kwargs: dict[str, object], error: type[Exception], message: str
) -> None:
    args: dict[str, object] = {"sites": "-60,60 Hz", "k": 100, "points": 64, **kwargs}
    with pytest.raises(error) as info:
        api.simulate_lineshape(args.pop("sites"), args.pop("k"), **args)  # type: ignore[arg-type]
    assert str(info.value).startswith(message)
    assert "--" not in str(info.value)  # no command-line flags in library errors


def test_simulate_unwritable_file(tmp_path: Path) -> None:
    target = tmp_path / "no" / "such" / "dir.csv"
    with pytest.raises(UsageError, match=r"^out .*dir\.csv: folder .* does not exist$"):
        api.simulate_lineshape("-60,60 Hz", 100, points=64, out=target)


def test_simulate_never_overwrites_a_registry(tmp_path: Path, db_path: Path) -> None:
    before = db_path.read_bytes()
    with pytest.raises(UsageError, match=r"is a SQLite database; choose another file"):
        api.simulate_lineshape("-60,60 Hz", 100, points=64, out=db_path)
    assert db_path.read_bytes() == before


# ------------------------------------------------------------------------------ fit


def test_fit_recovers_the_rates(vt_files: list[Path]) -> None:
    result = api.fit_lineshapes(vt_files, SITES, width="1.2 Hz", fix_width=True)
    assert result.observe_mhz == pytest.approx(400.13)
    assert result.sites_hz == pytest.approx((3.15 * 400.13, 2.85 * 400.13))
    for fit, t in zip(result.fits, TEMPS, strict=True):
        k_true = math.exp(eyring_ln_rate(t, DH, DS))
        assert fit.t_k == t and fit.k_err_per_s is not None
        assert abs(fit.k_per_s - k_true) < 3 * fit.k_err_per_s
    assert result.eyring_line is not None
    assert abs(result.eyring_line.dh_kj_mol - DH) < 3 * result.eyring_line.dh_err_kj_mol
    assert [p["t_k"] for p in result.rate_points] == list(TEMPS)
    assert result.global_fit is None and result.stored_rate_points is None
    assert result.cautions == ()  # 270–300 K: no cryogen, no heat, below 40 °C
    data = result.to_dict()
    assert data["notes"] == list(result.notes)
    assert data["fits"][0]["source"] == str(vt_files[0])


def test_fit_in_memory_spectra_with_temps_global_and_plots(
    vt_files: list[Path], tmp_path: Path
) -> None:
    spectra = [read_spectrum(f) for f in vt_files]
    result = api.fit_lineshapes(
        spectra, [3.15, 2.85], temps="-3.15,11.85,26.85 °C",
        width=1.2, fix_width=True, global_fit=True, plots_dir=tmp_path / "plots",
        region="3.4,2.6",
    )  # fmt: skip
    assert [f.t_k for f in result.fits] == pytest.approx(list(TEMPS))  # °C + 273.15
    assert all(f.n_points < 4096 for f in result.fits)  # the region cut the window
    assert result.global_fit is not None
    g = result.global_fit.eyring
    assert g.dh_err_kj_mol is not None and abs(g.dh_kj_mol - DH) < 3 * g.dh_err_kj_mol
    assert sorted(Path(p).name for p in result.plots) == [
        "eyring.png", "vt_270_fit.png", "vt_285_fit.png", "vt_300_fit.png",
    ]  # fmt: skip


def test_fit_stores_rate_points(vt_files: list[Path], database: Database) -> None:
    mid = api.add_measurement(
        database, {"method": "lineshape", "compound": "DEMO-LS", "smiles": "CN(C)C=O"}
    )
    result = api.fit_lineshapes(
        vt_files, SITES, width=1.2, fix_width=True, database=database, measurement_id=mid,
        actor="tester", solvent_bp="20 °C",
    )  # fmt: skip
    assert result.stored_rate_points == 3 and result.measurement_id == mid
    stored = api.get_measurement(database, mid)["rate_points"]
    assert [r["t_k"] for r in stored] == list(TEMPS)
    assert [r["k_text"] for r in stored] == [p["k_text"] for p in result.rate_points]
    assert [h["action"] for h in api.history(database, mid)][-1] == "rate-points"
    # 300 K is above a boiling point of 20 °C (293.15 K): the sealed-tube caution
    assert any("above the solvent's boiling point" in c for c in result.cautions)


def test_missing_measurement_fails_before_fitting(
    vt_files: list[Path], database: Database, tmp_path: Path
) -> None:
    plots = tmp_path / "plots"
    with pytest.raises(NotFoundError, match=r"^no measurement with id 99$"):
        api.fit_lineshapes(vt_files, SITES, database=database, measurement_id=99, plots_dir=plots)
    assert not plots.exists()  # nothing written


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"files": []}, UsageError, "files: give a list of one or more spectra"),
        ({"files": "one.csv"}, UsageError, "files: give a list of one or more spectra"),
        ({"files": read_spectrum}, UsageError, "files: give a list of one or more spectra"),
        ({"measurement_id": 1}, UsageError, "measurement_id: storing rate points needs"),
        ({"temps": "250"}, UsageError, "temps gives 1 temperature for 3 files"),
        ({"temps": "1,2,3 kJ/mol"}, UnitError, "temps: cannot read '1 kJ/mol'"),
        ({"x_unit": "cm"}, UsageError, "x_unit must be 'ppm' or 'Hz', not 'cm'"),
        ({"width": "-1"}, UnitError, "width: cannot read '-1': must be > 0"),
        ({"region": "3.0"}, UnitError, "region: cannot read '3.0': give two values"),
        ({"solvent_bp": "hot"}, UnitError, "solvent_bp: cannot read 'hot'"),
        ({"field": "x MHz"}, UnitError, "field: cannot read 'x MHz'"),
    ],
)
def test_fit_bad_input_names_the_argument(
    vt_files: list[Path], kwargs: dict[str, object], error: type[Exception], message: str
) -> None:
    files = kwargs.pop("files", vt_files)
    with pytest.raises(error) as info:
        api.fit_lineshapes(files, SITES, **kwargs)  # type: ignore[arg-type]
    assert str(info.value).startswith(message)
    assert "--" not in str(info.value)


def test_global_fit_needs_every_temperature(tmp_path: Path) -> None:
    path = tmp_path / "no_t.csv"
    api.simulate_lineshape("-60,60 Hz", 100, points=512, out=path)
    with pytest.raises(UsageError, match="no temperature in the file; give the temperatures"):
        api.fit_lineshapes([path, path], "-60,60 Hz", global_fit=True)


def test_value_with_error_text() -> None:
    # the error to two significant figures (4.567 → 4.6), the value to the same decimal place
    assert api.value_with_error_text(123.456, 4.567, "s-1") == "123.5 ± 4.6 s-1"


def test_simulate_loads_no_optimizer_or_plotting() -> None:
    # simulate needs numpy and the unit layer only: scipy.optimize and matplotlib cost ~0.7 s
    # each to import (PERFORMANCE.md), so only the fit workflow may load them
    code = (
        "import sys; from registry import api; "
        "api.simulate_lineshape('-60,60 Hz', 5, points=64); "
        "print(sorted(m for m in ('scipy.optimize', 'matplotlib') if m in sys.modules))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert out.stdout.strip() == "[]"


def test_three_sites_keep_their_sites_and_say_so() -> None:
    """Δν and populations vary only for two sites; more sites refuse other modes by name."""
    from registry.errors import UsageError
    from registry.lineshape.spectrum import Spectrum

    sim = api.simulate_lineshape("-80,10,75 Hz", 100.0, scheme="cycle", points=1024)
    spec = Spectrum(sim.x, sim.intensity, "Hz", "three", t_k=300.0)
    with pytest.raises(UsageError, match=r"^shifts_mode, populations_mode: Δν and the pop"):
        api.fit_lineshapes([spec], "-80,10,75 Hz", scheme="cycle", shifts_mode="tie")
    result = api.fit_lineshapes([spec], "-80,10,75 Hz", scheme="cycle", width=1.0)
    assert result.fits[0].parameters == ()


def test_three_sites_carry_the_reference_width_error_into_k() -> None:
    """A held measured width: σ(ln k) grows by the change of ln k over one σ_w (added in
    quadrature): σ_k is larger than with the same width held as exact."""
    from registry.lineshape.spectrum import Spectrum

    sim = api.simulate_lineshape(
        "-80,10,75 Hz", 30.0, scheme="cycle", points=4096, width=1.0, noise=0.002, seed=3,
        reference="-250 Hz", window="-300,200 Hz",
    )  # fmt: skip
    spec = Spectrum(sim.x, sim.intensity, "Hz", "three", t_k=300.0)
    measured = api.fit_lineshapes(
        [spec], "-80,10,75 Hz", scheme="cycle", reference="-280,-220 Hz", region="-200,200 Hz"
    ).fits[0]
    held = api.fit_lineshapes(
        [spec], "-80,10,75 Hz", scheme="cycle", width=1.0, fix_width=True, region="-200,200 Hz"
    ).fits[0]
    assert measured.width_err_hz is not None and measured.width_err_hz > 0
    assert measured.k_err_per_s is not None and held.k_err_per_s is not None
    assert measured.k_err_per_s > held.k_err_per_s
    assert abs(measured.k_per_s - 30.0) < 4 * measured.k_err_per_s
