"""Line-shape analysis: simulate an exchange-broadened spectrum; fit rates to spectra and store them.

Quantities are given as chemists write them — texts with or without a unit (``'3.10,2.95'`` ppm,
``'-60,60 Hz'``, ``'1.2 kHz'``, ``'-20 °C'``) or plain numbers in the default unit — and read
through the one unit layer. Errors name the argument (``sites``, ``width`` …) and the text.
numpy, scipy and matplotlib load when a function is called, not when this module is imported.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING

from registry.api.records import add_rate_points
from registry.errors import NotFoundError, UsageError
from registry.storage.database import Database

if TYPE_CHECKING:
    from registry.lineshape.inputs import Quantity, QuantityList
    from registry.lineshape.results import LineShapeAnalysis, SimulatedSpectrum
    from registry.lineshape.spectrum import Spectrum

#: fewer points than this cannot show an exchange-broadened line
MIN_POINTS = 16


def simulate_lineshape(
    sites: QuantityList,
    k: Quantity,
    *,
    out: str | Path | None = None,
    populations: QuantityList | None = None,
    scheme: str = "mutual",
    width: Quantity = "1 Hz",
    field: Quantity | None = None,
    points: int = 16384,
    window: QuantityList | None = None,
    noise: float = 0.0,
    seed: int = 0,
    temperature: Quantity | None = None,
    coupling: Quantity | None = None,
    reference: Quantity | None = None,
) -> SimulatedSpectrum:
    """The unit-area spectrum of exchanging sites; written as CSV to ``out`` when given.

    ``sites`` are shifts (ppm unless written in Hz; ppm needs ``field``, the spectrometer
    frequency in MHz); ``k`` the rate constant for leaving site 1 (s⁻¹ unless written);
    ``width`` the intrinsic FWHM (Hz unless written); ``window`` 'lo,hi' in the sites' unit
    (default: the sites with a margin); ``noise`` Gaussian noise as a fraction of the tallest
    point, drawn from ``seed``; ``temperature`` is only noted in the file. ``coupling`` (J, Hz
    unless written) makes the two sites a coupled AB pair in mutual exchange; ``reference``
    (the sites' unit) adds a non-exchanging singlet of the intrinsic width and half the area of
    the sites there. The record holds the points too (``x`` in the sites' unit, ``intensity``).
    """
    from registry.lineshape import inputs, workflow

    if isinstance(points, bool) or not isinstance(points, int) or points < MIN_POINTS:
        raise UsageError(f"points must be a whole number ≥ {MIN_POINTS}, not {points!r}")
    if not noise >= 0:
        raise UsageError(f"noise must be ≥ 0 (a fraction of the tallest point), not {noise!r}")
    mhz = inputs.read_field(field)
    model, unit = inputs.read_sites(sites, populations, scheme, mhz)
    j_hz = inputs.read_coupling(coupling)
    if j_hz is not None:
        model = inputs.coupled_model(model, j_hz, populations is not None)
    k_per_s = inputs.read_positive(k, "rate", "k", "1/s")
    width_hz = inputs.read_positive(width, "shift", "width", "Hz")
    window_hz = None if window is None else inputs.read_window(window, "window", unit, mhz)
    t = None if temperature is None else inputs.read_temperature(temperature)
    ref_hz = None if reference is None else _reference_position(reference, unit, mhz)
    return workflow.simulate(
        model, k_per_s, width_hz, x_unit=unit, mhz=mhz, points=points, window_hz=window_hz,
        noise=float(noise), seed=int(seed), temperature=t, out=out, reference_hz=ref_hz,
    )  # fmt: skip


def _reference_position(value: Quantity, unit: str, mhz: float | None) -> float:
    from registry.lineshape import inputs

    """One position: a text as written (ppm unless it says Hz), a bare number in the sites' unit."""
    text = value if isinstance(value, str) else f"{value} {unit}"
    values, vunit = inputs.read_shifts(text, "reference")
    if len(values) != 1:
        raise UsageError("reference: give one position, e.g. '0.00' (ppm) or '-250 Hz'")
    return inputs.shifts_in_hz(values, vunit, mhz, "reference")[0]


def fit_lineshapes(
    files: Sequence[str | Path | Spectrum],
    sites: QuantityList,
    *,
    populations: QuantityList | None = None,
    scheme: str = "mutual",
    temps: QuantityList | None = None,
    field: Quantity | None = None,
    x_unit: str | None = None,
    width: Quantity = "1 Hz",
    fix_width: bool = False,
    region: QuantityList | None = None,
    global_fit: bool = False,
    plots_dir: str | Path | None = None,
    database: Database | None = None,
    measurement_id: int | None = None,
    actor: str | None = None,
    solvent_bp: Quantity | None = None,
    shifts_mode: str = "auto",
    populations_mode: str = "auto",
    reference: QuantityList | None = None,
    tie_width: bool = False,
    coupling: Quantity | None = None,
    fit_coupling: bool = False,
    store_doubtful: bool = False,
    plot_format: str = "png",
    plot_style: str = "screen",
    plot_size: str | tuple[float, float] | None = None,
    plot_dpi: int | None = None,
    plot_zoom: bool = True,
) -> LineShapeAnalysis:
    """Fit the exchange rate k to each spectrum (one per temperature) and analyse the rates.

    ``files`` are CSV or JCAMP-DX files (or :class:`~registry.lineshape.spectrum.Spectrum`
    records). ``temps`` gives their temperatures in order (K unless written), over what the
    files say; ``field`` the spectrometer frequency when the files do not; ``x_unit`` (ppm or
    Hz) the unit of a CSV shift column whose header does not name it. ``width`` is the
    intrinsic FWHM to start from, or to hold with ``fix_width`` (near the slow- and
    fast-exchange limits). ``region`` fits only the window 'lo,hi' (sites' unit).
    ``global_fit`` also fits ΔH‡ and ΔS‡ to all spectra at once; ``plots_dir`` gets a PNG per
    spectrum and ``eyring.png``. With ``database`` and ``measurement_id`` the per-temperature
    rates are added to that measurement as rate points (one transaction, in its history).
    ``solvent_bp`` (K unless written) sharpens the safety cautions. The plots are
    ``plot_format`` (png, svg, pdf) in the one figure style (``plot_style`` screen or print,
    ``plot_size``, ``plot_dpi``: see :func:`registry.reports.style.figure_style`), zoomed to
    the exchanging lines unless ``plot_zoom`` is False.

    Two sites may drift with temperature. ``shifts_mode`` (Δν; the centre is always fitted) and
    ``populations_mode`` are each ``'auto'`` (fitted in each spectrum that determines them, tied
    elsewhere to the series' linear drift / van 't Hoff line), ``'fit'``, ``'hold'`` (as given)
    or ``'tie'`` (every spectrum on the series' function). ``reference`` is a window 'lo,hi'
    (sites' unit) holding a non-exchanging line in every spectrum: its width, with its error,
    is the intrinsic width of that spectrum (``tie_width``: one weighted mean for the series).
    ``coupling`` (J, Hz unless written) makes the two sites a coupled AB pair in mutual
    exchange, J held or, with ``fit_coupling``, fitted. Fits whose rate is doubtful (a
    parameter at a bound, k–width correlation, residuals not noise-like; see each fit's
    ``problems``) are not stored unless ``store_doubtful``.
    """
    # long: the docstring names every argument; the body reads them and calls the workflow
    from registry.reports.style import figure_style

    look = figure_style(plot_style, size=plot_size, dpi=plot_dpi)
    if plot_format not in ("png", "svg", "pdf"):
        raise UsageError(f"plot_format {plot_format!r}: use png, svg or pdf")
    from registry.lineshape import inputs, workflow
    from registry.lineshape.series import SiteOptions

    single = isinstance(files, (str, Path)) or not hasattr(files, "__iter__")
    sources = [] if single else list(files)
    if not sources:
        raise UsageError("files: give a list of one or more spectra")
    if measurement_id is not None and database is None:
        raise UsageError("measurement_id: storing rate points needs the registry (database)")
    mhz_given = inputs.read_field(field)
    temperatures = None if temps is None else inputs.read_temperatures(temps, len(sources))
    spectra = workflow.load_spectra(sources, temperatures, inputs.read_x_unit(x_unit), mhz_given)
    mhz = workflow.common_mhz(spectra, mhz_given)
    model, unit = inputs.read_sites(sites, populations, scheme, mhz)
    model = _coupled(model, coupling, fit_coupling, populations is not None)
    window_hz = None if region is None else inputs.read_window(region, "region", unit, mhz)
    reference_hz = (
        None if reference is None else inputs.read_window(reference, "reference", unit, mhz)
    )
    options = SiteOptions(
        shifts=shifts_mode, populations=populations_mode,
        width_hz=inputs.read_positive(width, "shift", "width", "Hz"), fix_width=fix_width,
        reference_hz=reference_hz, tie_width=tie_width, fit_coupling=fit_coupling,
    )  # fmt: skip
    bp_k = None
    if solvent_bp is not None:
        bp_k = inputs.read_positive(solvent_bp, "temperature", "solvent_bp", "K")
    if global_fit or measurement_id is not None:
        workflow.require_temperatures(spectra)
    if measurement_id is not None:
        _require_measurement(database, measurement_id)  # before the fits: fail early
    result = workflow.analyse(
        spectra, model, mhz, options=options, window_hz=window_hz, global_fit=global_fit,
        plots_dir=plots_dir, solvent_bp_k=bp_k, store_doubtful=store_doubtful,
        plot_style=look, plot_format=plot_format, plot_zoom=plot_zoom,
    )  # fmt: skip
    if measurement_id is None:
        return result
    assert database is not None
    stored = add_rate_points(database, measurement_id, result.rate_points, actor=actor)
    return replace(result, stored_rate_points=stored, measurement_id=measurement_id)


def _coupled(model, coupling: Quantity | None, fit_coupling: bool, pops_given: bool):  # type: ignore[no-untyped-def]
    """The two sites as a coupled AB pair when a coupling is given."""
    from registry.lineshape import inputs

    j_hz = inputs.read_coupling(coupling)
    if j_hz is not None:
        return inputs.coupled_model(model, j_hz, pops_given)
    if fit_coupling:
        raise UsageError("fit_coupling: give the coupling J to start from (coupling)")
    return model


def _require_measurement(database: Database | None, measurement_id: int) -> None:
    from registry.record.ids import as_id

    assert database is not None
    measurement_id = as_id(measurement_id)
    with database.read() as conn:
        found = conn.scalar("SELECT id FROM measurement WHERE id = :id", {"id": measurement_id})
    if found is None:
        raise NotFoundError(f"no measurement with id {measurement_id}")


def value_with_error_text(value: float, error: float | None, unit: str) -> str:
    """``'123.5 ± 4.6 s-1'``: the error to two significant figures and the value to match
    (how stored rate texts are written; they read back to the same numbers)."""
    from registry.lineshape.store_link import value_with_error_text as text

    return text(value, error, unit)
