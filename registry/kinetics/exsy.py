"""Rate constants from 2D exchange (EXSY) peak volumes at one mixing time.

The general matrix method (C. L. Perrin and T. J. Dwyer, Chem. Rev. 90, 935 (1990)): during
the mixing time τm the longitudinal magnetization evolves as exp(L·τm) (see
:mod:`.exchange_matrix`), so the volume matrix is I(τm) = exp(−R·τm)·diag(M0) with R = −L.
Normalising each column by the magnetization it started from, A = I·diag(M0)⁻¹, gives
R = −ln(A)/τm, the logarithm taken through the eigen-decomposition A = X·Λ·X⁻¹,
ln A = X·ln(Λ)·X⁻¹. Off the diagonal R_ji = −k(i→j).

Volumes: ``volumes[i][j]`` is the peak observed at site i after mixing whose magnetization
started at site j (Perrin and Dwyer's I_ij): rows are the detected site (F2), columns the site
of origin (F1). At equilibrium the matrix is symmetric, so a transposed matrix changes only
how the noise enters.

M0 comes from, in this order of preference: the diagonal of a τm = 0 spectrum (absolute, so
R keeps the relaxation rates R1 on its diagonal and they are reported); the equilibrium
populations given (M0 ∝ p, the common scale cancels from every k); or, as Perrin and Dwyer
describe for equal T1s, the column sums of the volume matrix (relaxation then cancels too).

Two sites have a closed form (:func:`exsy_two_site`): with r = 4·p_A·p_B·(I_AA + I_BB)/
(I_AB + I_BA) − (p_A − p_B)², k_ex = k_AB + k_BA = ln((r + 1)/(r − 1))/τm, k_AB = p_B·k_ex,
k_BA = p_A·k_ex (derived from the two-site solution; for p_A = p_B it is the familiar
ln((r + 1)/(r − 1))/τm for k_ex = 2k). It assumes equal T1 at both sites, as the column-sum
normalisation does, and equals the matrix method then.

Uncertainties are propagated linearly from the volumes (independent errors σ_I, the same for
every peak: the base-plane noise integrated over a peak) through the whole calculation —
normalisation, logarithm, populations from the same volumes — by central differences
(:mod:`.lsq`). The logarithm amplifies noise steeply as τm grows towards 1/k and fails when an
eigenvalue of A is ≤ 0; that is refused with a message, never returned as a number.
numpy only.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import KineticsInputError
from registry.kinetics.lsq import propagate, sigmas

FloatArray = NDArray[np.float64]

MATRIX = "general matrix method (Perrin & Dwyer 1990)"
TWO_SITE = "two-site closed form (equal T1)"
GIVEN = "given"
REFERENCE = "τm = 0 spectrum"
COLUMN_SUMS = "column sums of the volume matrix (equal T1 assumed)"

#: an eigenvalue's imaginary part below this share of the largest is round-off
_IMAGINARY_TOLERANCE = 1e-9


@dataclass(frozen=True)
class ExsyRates:
    """Rate constants between n sites from EXSY volumes.

    ``k_per_s[i, j]`` is k(i→j), the first-order rate constant of one molecule at site i
    going to site j (diagonal 0). ``r1_per_s`` are the sites' longitudinal relaxation rates,
    known only when M0 was absolute (a τm = 0 spectrum, or a fit over mixing times).
    """

    sites: tuple[str, ...]
    k_per_s: FloatArray
    k_err_per_s: FloatArray | None
    populations: FloatArray
    populations_from: str
    r1_per_s: FloatArray | None
    r1_err_per_s: FloatArray | None
    method: str
    mixing_s: tuple[float, ...]
    k_exchange_err_per_s: float | None = None
    chi2_reduced: float | None = None
    notes: tuple[str, ...] = ()

    @property
    def n_sites(self) -> int:
        return len(self.sites)

    @property
    def rate_matrix_per_s(self) -> FloatArray:
        """k(i→j) off the diagonal, −Σ_j k(i→j) on it: each row sums to zero."""
        out = self.k_per_s.copy()
        np.fill_diagonal(out, -self.k_per_s.sum(axis=1))
        return out

    @property
    def k_exchange_per_s(self) -> float | None:
        """Two sites: k_ex = k_AB + k_BA (the relaxation rate of the population difference)."""
        if self.n_sites != 2:
            return None
        return float(self.k_per_s[0, 1] + self.k_per_s[1, 0])


def volume_matrix(volumes: ArrayLike, field: str = "volumes") -> FloatArray:
    """A square n×n (n ≥ 2) matrix of finite volumes with positive diagonal peaks, or an error."""
    try:
        rows = [list(map(float, row)) for row in volumes]  # type: ignore[union-attr]
    except (TypeError, ValueError) as exc:
        raise KineticsInputError(field, "expected rows of numbers") from exc
    n = len(rows)
    if n < 2:
        raise KineticsInputError(field, f"need at least 2 sites; got {n} row(s)")
    lengths = sorted({len(r) for r in rows})
    if lengths != [n]:
        raise KineticsInputError(
            field, f"the matrix must be square: {n} rows but rows of {lengths} values"
        )
    out = np.array(rows)
    if not np.isfinite(out).all():
        raise KineticsInputError(field, "every volume must be a finite number")
    if (out < 0).any():
        i, j = (int(v) for v in np.argwhere(out < 0)[0])
        raise KineticsInputError(
            field,
            f"volume in row {i + 1}, column {j + 1} is {out[i, j]:g}: a peak volume cannot be "
            "negative (a cross peak lost in the noise is entered as 0)",
        )
    diag = np.diag(out)
    if (diag <= 0).any():
        i = int(np.flatnonzero(diag <= 0)[0])
        raise KineticsInputError(
            field, f"diagonal peak {i + 1} is ≤ 0: diagonal volumes must be positive"
        )
    return out


def site_names(sites: Sequence[str] | None, n: int) -> tuple[str, ...]:
    """The names given, or A, B, C … (one per site)."""
    if sites is None:
        return tuple(chr(ord("A") + i) if i < 26 else f"S{i + 1}" for i in range(n))
    names = tuple(str(s).strip() for s in sites)
    if len(names) != n or not all(names) or len(set(names)) != n:
        raise KineticsInputError("sites", f"give {n} distinct site names", value=list(sites))
    return names


#: how far fractions may miss 1 (or percentages 100) through rounding: 0.7,0.3 or 33,33,33
POPULATION_SUM_TOLERANCE = 0.015


def normalised_populations(populations: ArrayLike, n: int) -> FloatArray:
    """Populations as fractions summing to 1: fractions (0.7,0.3) or percentages (70,30).

    Why the sum is checked: a list that sums to neither 1 nor 100 (0.7,0.2) is a typo or a
    missing site more often than a ratio, and normalising it silently moves every k. A ratio
    (7:3) is read by :func:`registry.kinetics.calc_exsy.parse_populations`.
    """
    p = np.asarray(populations, dtype=float).ravel()
    if p.size != n:
        raise KineticsInputError("populations", f"give {n} populations, one per site; got {p.size}")
    if not (np.isfinite(p).all() and (p > 0).all()):
        raise KineticsInputError("populations", "every population must be > 0", value=p.tolist())
    total = float(p.sum())
    if not any(abs(total / scale - 1.0) <= POPULATION_SUM_TOLERANCE for scale in (1.0, 100.0)):
        raise KineticsInputError(
            "populations",
            f"the populations sum to {total:g}: give fractions summing to 1 (0.7,0.3), "
            "percentages summing to 100 (70,30) or a ratio (7:3)",
            value=p.tolist(),
        )
    return p / total


def _m0(
    vol: FloatArray, populations: ArrayLike | None, reference: ArrayLike | None
) -> tuple[FloatArray, str]:
    """M0 per site (the column normaliser) and where it came from."""
    n = vol.shape[0]
    if populations is not None and reference is not None:
        raise KineticsInputError(
            "populations", "give the populations or a τm = 0 spectrum, not both"
        )
    if reference is not None:
        ref = np.asarray(reference, dtype=float)
        m0 = np.diag(ref) if ref.ndim == 2 else ref.ravel()
        if m0.size != n or not (np.isfinite(m0).all() and (m0 > 0).all()):
            raise KineticsInputError(
                "reference", f"the τm = 0 spectrum needs {n} positive diagonal volumes"
            )
        return m0, REFERENCE
    if populations is not None:
        return normalised_populations(populations, n) * vol.sum(), GIVEN
    sums = vol.sum(axis=0)
    if (sums <= 0).any():
        raise KineticsInputError("volumes", "a column of the volume matrix sums to ≤ 0")
    return sums, COLUMN_SUMS


def log_rate_matrix(a: FloatArray, mixing_s: float) -> FloatArray:
    """R = −ln(A)/τm through A's eigen-decomposition; refused when ln A is not real."""
    evals, vecs = np.linalg.eig(a)
    biggest = float(np.max(np.abs(evals)))
    if np.max(np.abs(evals.imag)) > _IMAGINARY_TOLERANCE * biggest:
        raise KineticsInputError(
            "volumes",
            f"at τm = {mixing_s:g} s the normalised volume matrix has complex eigenvalues, so "
            "no real rate matrix reproduces it: the peaks are too noisy or too asymmetric; "
            "check the integration, or fit several mixing times together",
        )
    evals = evals.real
    if (evals <= 0).any():
        raise KineticsInputError(
            "volumes",
            f"at τm = {mixing_s:g} s the normalised volume matrix has an eigenvalue "
            f"{float(evals.min()):.3g} ≤ 0, so its logarithm (the rate matrix) has no real "
            "solution: the mixing time is too long for these rates (the cross peaks are at "
            "equilibrium) or noise dominates; use a shorter mixing time, or fit several "
            "together",
        )
    vecs = vecs.real
    log_a = vecs @ np.diag(np.log(evals)) @ np.linalg.inv(vecs)
    return -log_a / mixing_s


def _check_mixing(mixing_s: float) -> float:
    tau = float(mixing_s)
    if not (np.isfinite(tau) and tau > 0):
        raise KineticsInputError("mixing", "the mixing time must be > 0 s", value=mixing_s)
    return tau


def _matrix_outputs(
    x: FloatArray, n: int, tau: float, populations: ArrayLike | None, with_reference: bool
) -> FloatArray:
    """k(i→j) flattened (and R1 with a reference, k_ex for two sites) from the inputs in x."""
    vol = x[: n * n].reshape(n, n)
    reference = x[n * n :] if with_reference else None
    m0, _ = _m0(vol, populations, reference)
    r = log_rate_matrix(vol / m0[None, :], tau)
    k = -r.T
    np.fill_diagonal(k, 0.0)
    parts = [k.ravel()]
    if with_reference:
        parts.append(r.sum(axis=0))  # column sums of R: R1 of each site
    if n == 2:
        parts.append(np.array([k[0, 1] + k[1, 0]]))
    return np.concatenate(parts)


def exsy_rates(
    volumes: ArrayLike,
    mixing_s: float,
    *,
    populations: ArrayLike | None = None,
    reference: ArrayLike | None = None,
    volume_err: float | None = None,
    sites: Sequence[str] | None = None,
) -> ExsyRates:
    """The general matrix method at one mixing time (any number of sites).

    ``reference``: the τm = 0 volumes (a matrix, only its diagonal is used, or the n diagonal
    volumes); ``volume_err``: σ of every volume, in the volumes' units (None: no σ).
    """
    vol = volume_matrix(volumes)
    n = vol.shape[0]
    tau = _check_mixing(mixing_s)
    names = site_names(sites, n)
    m0, source = _m0(vol, populations, reference)
    ref = None if reference is None else m0
    x = np.concatenate([vol.ravel(), [] if ref is None else ref])
    out = _matrix_outputs(x, n, tau, populations, ref is not None)
    errs = _propagated(
        lambda v: _matrix_outputs(v, n, tau, populations, ref is not None), x, volume_err
    )
    return _record(names, out, errs, n, m0, source, ref is not None, MATRIX, tau, vol)


def _propagated(
    fn: Callable[[FloatArray], FloatArray], x: FloatArray, volume_err: float | None
) -> FloatArray | None:
    """σ of each output of ``fn`` for independent volume errors ``volume_err`` (None: none)."""
    if volume_err is None:
        return None
    if not (np.isfinite(volume_err) and volume_err > 0):
        raise KineticsInputError("volume_err", "the volumes' σ must be > 0", value=volume_err)
    return sigmas(propagate(fn, x, np.eye(x.size) * float(volume_err) ** 2))


def _record(
    names: tuple[str, ...],
    out: FloatArray,
    errs: FloatArray | None,
    n: int,
    m0: FloatArray,
    source: str,
    with_r1: bool,
    method: str,
    tau: float,
    vol: FloatArray,
) -> ExsyRates:
    k = out[: n * n].reshape(n, n)
    r1 = out[n * n : n * n + n] if with_r1 else None
    k_err = None if errs is None else errs[: n * n].reshape(n, n)
    r1_err = None if errs is None or not with_r1 else errs[n * n : n * n + n]
    kex_err = None if errs is None or n != 2 else float(errs[-1])
    return ExsyRates(
        sites=names,
        k_per_s=k,
        k_err_per_s=k_err,
        populations=m0 / m0.sum(),
        populations_from=source,
        r1_per_s=r1,
        r1_err_per_s=r1_err,
        method=method,
        mixing_s=(tau,),
        k_exchange_err_per_s=kex_err,
        notes=tuple(_notes(names, k, vol)),
    )


def _notes(names: tuple[str, ...], k: FloatArray, vol: FloatArray) -> list[str]:
    notes = []
    n = len(names)
    for i in range(n):
        for j in range(n):
            if i != j and k[i, j] < 0:
                notes.append(
                    f"k({names[i]}→{names[j]}) is negative: within noise of zero, or the two "
                    "sites do not exchange directly"
                )
    cross = vol[~np.eye(n, dtype=bool)]
    pair = np.abs(vol - vol.T)[~np.eye(n, dtype=bool)]
    if cross.size and np.max(pair) > 0.2 * max(float(np.max(np.abs(cross))), 1e-300):
        notes.append(
            "the cross peaks differ by more than 20 % from their mirror images (I_ij vs I_ji); "
            "at equilibrium they are equal, so check the integration"
        )
    return notes


def _two_site_outputs(x: FloatArray, tau: float, populations: ArrayLike | None) -> FloatArray:
    vol = x.reshape(2, 2)
    m0, _ = _m0(vol, populations, None)
    pa, pb = m0 / m0.sum()
    cross = vol[0, 1] + vol[1, 0]
    if cross == 0:
        k_ex = 0.0
    else:
        r = 4.0 * pa * pb * (vol[0, 0] + vol[1, 1]) / cross - (pa - pb) ** 2
        if not r > 1:
            raise KineticsInputError(
                "volumes",
                f"at τm = {tau:g} s the cross peaks are as large as or larger than equilibrium "
                "allows for these populations, so ln((r+1)/(r−1)) has no real solution: the "
                "mixing time is too long for this rate, or noise dominates",
            )
        k_ex = float(np.log((r + 1.0) / (r - 1.0)) / tau)
    return np.array([0.0, pb * k_ex, pa * k_ex, 0.0, k_ex])


def exsy_two_site(
    volumes: ArrayLike,
    mixing_s: float,
    *,
    populations: ArrayLike | None = None,
    volume_err: float | None = None,
    sites: Sequence[str] | None = None,
) -> ExsyRates:
    """Two sites in closed form: k_ex, k_AB = p_B·k_ex (A→B), k_BA = p_A·k_ex.

    Populations given, or from the column sums (equal T1 assumed either way).
    """
    vol = volume_matrix(volumes)
    if vol.shape != (2, 2):
        raise KineticsInputError("volumes", f"the closed form is for 2 sites; got {len(vol)}")
    tau = _check_mixing(mixing_s)
    if vol[0, 1] + vol[1, 0] < 0:
        raise KineticsInputError(
            "volumes", "the cross peaks sum to less than 0: no exchange can be read from them"
        )
    names = site_names(sites, 2)
    m0, source = _m0(vol, populations, None)
    x = vol.ravel()
    out = _two_site_outputs(x, tau, populations)
    errs = _propagated(lambda v: _two_site_outputs(v, tau, populations), x, volume_err)
    return _record(names, out, errs, 2, m0, source, False, TWO_SITE, tau, vol)
