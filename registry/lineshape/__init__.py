"""Line-shape analysis: from variable-temperature spectra to rate constants (and the registry).

Data flow: the caller's quantities → :mod:`.inputs` (Hz, s⁻¹, K; the exchange model); spectrum
files → :mod:`.spectrum` / :mod:`.jcamp` (a :class:`~.spectrum.Spectrum`, abscissa in ppm or Hz)
→ :mod:`.workflow` (window, :mod:`.series` or :mod:`.fit` per temperature, :mod:`.fit_global`
for all at once, :mod:`.plots`, :mod:`.store_link` rate points, safety cautions) → a record of
:mod:`.results`.
:mod:`registry.api.lineshape` calls the workflows and stores the rate points; nothing here
imports the api.

Map:
    simulate    exchange-broadened spectra: the two-site closed form (Rogers & Woodbrey 1962)
                and n sites with any exchange matrix (Bloch–McConnell, Kubo–Sack resolvent);
                k is the rate constant for *leaving* a site (k_AB = 1/τ_A, Gutowsky & Holm)
    spectrum    the Spectrum record; reading and writing the simple CSV form
    jcamp       a reader for 1D JCAMP-DX (XYDATA in AFFN/SQZ/DIF/DUP, XYPOINTS)
    inputs      quantities as written (texts or numbers) → canonical floats; errors name the field
    fit_core    the model of one spectrum, its analytic derivatives, the LineShapeFit record
    fit         the per-temperature fit (grid start, scipy least_squares) and the Eyring line
    fit_global  the global fit: ΔH‡/ΔS‡ shared by all spectra (Eyring-tied k)
    coupled     a coupled AB pair in mutual exchange (density matrix, Liouville space)
    sitefit     one two-site spectrum with Δν, p₁, width, J fitted, held or tied (priors)
    series      a VT series: Δν drift and van 't Hoff populations tied where not determined
    reference   the intrinsic width from a non-exchanging line of the same spectrum
    diagnose    plain words for doubtful fits (k–width correlation, Durbin–Watson, …)
    eyring      ln k(T) from ΔH‡/ΔS‡ and the decorrelated (ΔG‡(T_m), ΔH‡) pair of the global fit
    store_link  fits → rate-point dicts (stored by ``registry.api.fit_lineshapes``)
    plots       PNG of data/fit/residuals per spectrum and the Eyring plot (matplotlib, lazily)
    workflow    simulate one spectrum; load, fit, plot and caution a set of spectra
    results     the frozen records the workflows return (SimulatedSpectrum, LineShapeAnalysis)

Importing the package itself costs nothing, nor does :mod:`.results`. :mod:`.simulate` needs
numpy, :mod:`.spectrum`, :mod:`.jcamp` and :mod:`.inputs` also the unit layer (pint); scipy
comes with the fit modules and :mod:`.eyring`, matplotlib only inside :mod:`.plots` functions.
"""
