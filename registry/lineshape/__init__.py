"""Line-shape analysis: from variable-temperature spectra to rate constants and the registry.

Data flow: spectrum files → :mod:`.spectrum` / :mod:`.jcamp` (a :class:`~.spectrum.Spectrum`,
abscissa in ppm or Hz) → :mod:`.fit` (k per temperature, or ΔH‡/ΔS‡ for all at once, using
the model in :mod:`.simulate`) → :mod:`.store_link` (rate points for a measurement) and
:mod:`.plots` (PNGs).

Map:
    simulate    exchange-broadened spectra: the two-site closed form (Rogers & Woodbrey 1962)
                and n sites with any exchange matrix (Bloch–McConnell, Kubo–Sack resolvent);
                k is the rate constant for *leaving* a site (k_AB = 1/τ_A, Gutowsky & Holm)
    spectrum    the Spectrum record; reading and writing the simple CSV form
    jcamp       a reader for 1D JCAMP-DX (XYDATA in AFFN/SQZ/DIF/DUP, XYPOINTS)
    fit         per-temperature fits and the global Eyring-tied fit (scipy least_squares)
    eyring      ln k(T) from ΔH‡/ΔS‡ and the decorrelated (ΔG‡(T_m), ΔH‡) pair of the global fit
    store_link  fits → rate-point dicts → ``registry.api.add_rate_points``
    plots       PNG of data/fit/residuals per spectrum and the Eyring plot (matplotlib, lazily)

Importing the package itself costs nothing. :mod:`.simulate` needs numpy, :mod:`.spectrum` and
:mod:`.jcamp` also the unit layer (pint); scipy comes with :mod:`.fit` and :mod:`.eyring`,
matplotlib only inside :mod:`.plots` functions.
"""
