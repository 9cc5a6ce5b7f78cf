"""Exchange-broadened NMR spectra of uncoupled sites: the two-site closed form and n sites.

Convention for rate constants (used everywhere in :mod:`registry.lineshape`): ``k_ij`` is the
first-order rate constant (s⁻¹) for a nucleus *leaving* site i for site j, so the mean lifetime
at site i is τ_i = 1/Σ_j k_ij. For two sites, k = k_AB = 1/τ_A, the rate constant of Gutowsky &
Holm, J. Chem. Phys. 25, 1228 (1956): with equal populations and negligible intrinsic width the
two lines coalesce at k = πΔν/√2. (It is *not* 1/τ with τ = τ_Aτ_B/(τ_A+τ_B), which is twice as
large for equal populations.)

Frequencies are in Hz (ν, not ω); intrinsic line widths are full widths at half height in Hz
(w = 1/(πT₂)). Every spectrum returned here has unit area over ν (for populations summing to 1),
so a fit's scale factor is the integrated intensity.

Two ways to the same spectrum:

* :func:`two_site_spectrum` – the classic closed form for two sites with unequal populations and
  intrinsic widths, written as by Rogers & Woodbrey, J. Phys. Chem. 66, 540 (1962), from the Bloch
  equations modified for exchange (Gutowsky & Holm 1956; McConnell, J. Chem. Phys. 28, 430 (1958)).
* :func:`bloch_mcconnell_spectrum` – n sites with any exchange matrix, as the Kubo–Sack
  (Sack, Mol. Phys. 1, 163 (1958)) resolvent S(ν) = 2·Re[1ᵀ(iω − L)⁻¹p] with
  L = iΩ − R + X, X the exchange generator. L is diagonalised once (L = VΛV⁻¹) and the spectrum is
  a sum of n complex Lorentzians broadcast over the frequency points, so 16,384 points cost
  microseconds per site.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]

#: schemes that tie all exchange rates to one rate constant k (see :func:`scheme_rate_matrix`)
SCHEMES = ("mutual", "cycle")

#: V of L = VΛV⁻¹ beyond this condition number (near an exceptional point, where L is defective)
#: makes the eigen route inaccurate; the spectrum is then solved point by point instead.
_MAX_CONDITION = 1e7


def two_site_spectrum(
    freq_hz: ArrayLike,
    nu_a_hz: float,
    nu_b_hz: float,
    k_ab_per_s: float,
    p_a: float = 0.5,
    width_a_hz: float = 0.0,
    width_b_hz: float = 0.0,
) -> FloatArray:
    """Two-site exchange line shape in closed form (unit area over ν in Hz).

    ``k_ab_per_s`` is the rate constant for leaving site A (k_AB = 1/τ_A); k_BA follows from
    detailed balance, p_A·k_AB = p_B·k_BA. With τ = p_B·τ_A, Δν = ½(ν_A+ν_B) − ν and
    δν = ν_A − ν_B, Rogers & Woodbrey (1962) write g(ν) ∝ {P[1 + τ(p_B/T₂A + p_A/T₂B)] + QR}/(P²+R²),
    with
    P = τ[1/(T₂A·T₂B) − 4π²Δν² + π²δν²] + p_A/T₂A + p_B/T₂B,
    Q = τ[2πΔν − πδν(p_A − p_B)],
    R = 2πΔν[1 + τ(1/T₂A + 1/T₂B)] + πδν·τ(1/T₂B − 1/T₂A) + πδν(p_A − p_B).
    The constant in front is 2, which makes the area one.
    """
    nu = np.asarray(freq_hz, dtype=float)
    if not 0.0 < p_a < 1.0:
        raise ValueError(f"p_a must lie strictly between 0 and 1, got {p_a}")
    if not k_ab_per_s > 0.0:
        raise ValueError(f"k_ab_per_s must be > 0, got {k_ab_per_s}")
    if width_a_hz < 0 or width_b_hz < 0:
        raise ValueError("intrinsic widths cannot be negative")
    p_b = 1.0 - p_a
    tau = p_b / k_ab_per_s
    r_a = math.pi * width_a_hz  # 1/T2A
    r_b = math.pi * width_b_hz  # 1/T2B
    big = 0.5 * (nu_a_hz + nu_b_hz) - nu
    small = nu_a_hz - nu_b_hz
    pi = math.pi
    p = tau * (r_a * r_b - 4 * pi**2 * big**2 + pi**2 * small**2) + p_a * r_a + p_b * r_b
    q = tau * (2 * pi * big - pi * small * (p_a - p_b))
    r = (
        2 * pi * big * (1 + tau * (r_a + r_b))
        + pi * small * tau * (r_b - r_a)
        + pi * small * (p_a - p_b)
    )
    return 2.0 * (p * (1 + tau * (p_b * r_a + p_a * r_b)) + q * r) / (p**2 + r**2)


def exchange_generator(rate_matrix_per_s: ArrayLike) -> NDArray[np.float64]:
    """The matrix X of dM/dt = X·M for rate constants ``K[i, j]`` = k(i → j) (s⁻¹).

    Magnetization leaves site i at Σ_j k_ij and arrives from j at k_ji, so X = Kᵀ − diag(ΣK rows).
    The diagonal of K is ignored.
    """
    k = np.array(rate_matrix_per_s, dtype=float)
    if k.ndim != 2 or k.shape[0] != k.shape[1]:
        raise ValueError(f"the rate matrix must be square, got shape {k.shape}")
    np.fill_diagonal(k, 0.0)
    if (k < 0).any() or not np.isfinite(k).all():
        raise ValueError("rate constants must be finite and ≥ 0")
    return k.T - np.diag(k.sum(axis=1))


def stationary_populations(rate_matrix_per_s: ArrayLike) -> FloatArray:
    """Equilibrium populations of a rate matrix: the null vector of its generator, summing to 1."""
    x = exchange_generator(rate_matrix_per_s)
    n = x.shape[0]
    # Solve X·p = 0 with Σp = 1 in the least-squares sense (exact for a connected scheme).
    a = np.vstack([x, np.ones((1, n))])
    b = np.zeros(n + 1)
    b[-1] = 1.0
    p, *_ = np.linalg.lstsq(a, b, rcond=None)
    if np.abs(x @ p).max() > 1e-9 * max(1.0, np.abs(x).max()) or (p < -1e-12).any():
        raise ValueError("the exchange scheme has no unique equilibrium (is it connected?)")
    return np.clip(p, 0.0, None) / np.clip(p, 0.0, None).sum()


def scheme_rate_matrix(
    k_per_s: float, populations: Sequence[float], scheme: str = "mutual"
) -> FloatArray:
    """Rate constants k(i → j) for n sites tied to one rate constant ``k_per_s``.

    ``mutual``: every pair of sites exchanges; ``cycle``: 1 → 2 → … → n → 1 (a degenerate
    rearrangement or rotation in one sense). With connectivity A, k_ij = k·A_ij·p₁/p_i: every
    connected pair (or step of the cycle) carries the same flux, the populations are stationary,
    and k is the rate constant for leaving site 1 towards each partner. For two sites both
    schemes give k_AB = k and k_BA = k·p_A/p_B.
    """
    pops = _check_populations(populations)
    n = len(pops)
    if scheme not in SCHEMES:
        raise ValueError(f"unknown scheme {scheme!r}; choose one of {', '.join(SCHEMES)}")
    adjacency = np.zeros((n, n))
    if scheme == "mutual" or n == 2:
        adjacency[:] = 1.0
        np.fill_diagonal(adjacency, 0.0)
    else:
        for i in range(n):
            adjacency[i, (i + 1) % n] = 1.0
    return k_per_s * adjacency * (pops[0] / pops)[:, None]


def _check_populations(populations: Sequence[float]) -> FloatArray:
    pops = np.asarray(populations, dtype=float)
    if pops.ndim != 1 or len(pops) < 2:
        raise ValueError("at least two site populations are needed")
    if (pops <= 0).any() or not np.isfinite(pops).all():
        raise ValueError("populations must be positive")
    return pops / pops.sum()


@dataclass(frozen=True)
class Resolvent:
    """L = VΛV⁻¹ for one set of shifts, widths and rates, ready to broadcast over frequencies.

    ``amplitudes[m] = (1ᵀV)_m·(V⁻¹p)_m``; the spectrum is 2·Re Σ_m a_m/(iω − λ_m). ``direct``
    is set when V is too ill-conditioned (near an exceptional point) and the resolvent must be
    solved at each frequency instead. ``left``/``right`` keep 1ᵀV and V⁻¹p for derivatives.
    """

    eigenvalues: NDArray[np.complex128]
    amplitudes: NDArray[np.complex128]
    left: NDArray[np.complex128]
    right: NDArray[np.complex128]
    vectors: NDArray[np.complex128]
    inverse: NDArray[np.complex128]
    liouvillian: NDArray[np.complex128]
    populations: FloatArray
    direct: bool = field(default=False)


def resolvent(
    shifts_hz: Sequence[float] | FloatArray,
    rate_matrix_per_s: ArrayLike,
    populations: Sequence[float] | FloatArray | None = None,
    widths_hz: float | Sequence[float] | FloatArray = 0.0,
) -> Resolvent:
    """Diagonalise the Bloch–McConnell matrix once for a set of sites (see module docstring)."""
    shifts = np.asarray(shifts_hz, dtype=float)
    n = len(shifts)
    gen = exchange_generator(rate_matrix_per_s)
    if gen.shape != (n, n):
        raise ValueError(f"rate matrix is {gen.shape}, but there are {n} sites")
    pops = (
        stationary_populations(rate_matrix_per_s)
        if populations is None
        else _check_populations(populations)
    )
    widths = np.broadcast_to(np.asarray(widths_hz, dtype=float), (n,))
    if (widths < 0).any():
        raise ValueError("intrinsic widths cannot be negative")
    return _diagonalise(np.diag(2j * np.pi * shifts - np.pi * widths) + gen, pops)


def _diagonalise(liou: NDArray[np.complex128], pops: FloatArray) -> Resolvent:
    """Eigen-decomposition of L; falls back to direct solves where V is ill-conditioned."""
    lam, vec = np.linalg.eig(liou)
    try:
        inv = np.linalg.inv(vec)
        # Frobenius-norm condition number: an upper bound of the 2-norm one, no SVD needed
        cond = float(np.linalg.norm(vec) * np.linalg.norm(inv))
    except np.linalg.LinAlgError:
        inv, cond = np.full_like(vec, np.nan), math.inf
    direct = not math.isfinite(cond) or cond > _MAX_CONDITION
    left = vec.sum(axis=0)
    right = inv @ pops
    return Resolvent(lam, left * right, left, right, vec, inv, liou, pops, direct)


def evaluate(
    res: Resolvent, freq_hz: FloatArray, width_hz: float = 0.0, offset_hz: float = 0.0
) -> FloatArray:
    """Spectrum of a :class:`Resolvent`, with an extra common width and a common offset (Hz).

    Adding the same width and offset to every site shifts all eigenvalues by −πw + 2πi·δ and
    leaves the eigenvectors alone, which is why a fit can vary them without re-diagonalising.
    """
    omega = 2.0 * np.pi * np.asarray(freq_hz, dtype=float)
    shift = -np.pi * width_hz + 2j * np.pi * offset_hz
    if res.direct:
        return _direct(res, omega, shift)
    # Re[a/(iω − λ)] with λ = −c + iβ is (a_r·c + a_i·(ω − β))/(c² + (ω − β)²): real arithmetic,
    # one pass per eigenvalue, ~4× faster than complex division over an (N, n) array.
    out = np.zeros_like(omega)
    for amp, lam in zip(res.amplitudes, res.eigenvalues + shift, strict=True):
        c = -lam.real
        d = omega - lam.imag
        out += (amp.real * c + amp.imag * d) / (c * c + d * d)
    return 2.0 * out


def _direct(res: Resolvent, omega: FloatArray, shift: complex) -> FloatArray:
    """Solve (iω − L)x = p at each frequency; slower, used only where L is nearly defective."""
    n = len(res.populations)
    eye = np.eye(n)
    mats = 1j * omega[:, None, None] * eye - (res.liouvillian + shift * eye)[None, :, :]
    rhs = np.broadcast_to(res.populations.astype(complex), (len(omega), n))[..., None]
    sol = np.linalg.solve(mats, rhs)[..., 0]
    return 2.0 * np.real(sol.sum(axis=1))


def bloch_mcconnell_spectrum(
    freq_hz: ArrayLike,
    shifts_hz: Sequence[float] | FloatArray,
    rate_matrix_per_s: ArrayLike,
    populations: Sequence[float] | FloatArray | None = None,
    widths_hz: float | Sequence[float] | FloatArray = 0.0,
) -> FloatArray:
    """n-site exchange spectrum (unit area over ν in Hz) for rate constants ``K[i, j]`` = k(i→j).

    ``populations`` default to the equilibrium of the rate matrix; when given they must be
    stationary under it (else the "spectrum" would describe a system relaxing to equilibrium).
    """
    if populations is not None:
        pops = _check_populations(populations)
        drift = exchange_generator(rate_matrix_per_s) @ pops
        scale = max(1.0, float(np.abs(np.asarray(rate_matrix_per_s, dtype=float)).max()))
        if np.abs(drift).max() > 1e-9 * scale:
            raise ValueError(
                "populations are not at equilibrium under the rate matrix "
                "(detailed balance p_i·k_ij = p_j·k_ji fails)"
            )
    res = resolvent(shifts_hz, rate_matrix_per_s, populations, widths_hz)
    return evaluate(res, np.asarray(freq_hz, dtype=float))


@dataclass(frozen=True)
class ExchangeModel:
    """Sites (shifts in Hz, populations) and the scheme that ties their exchange to one k.

    This is what a line-shape fit varies: k (through :func:`scheme_rate_matrix`), a common
    intrinsic width and a common offset.
    """

    shifts_hz: tuple[float, ...]
    populations: tuple[float, ...]
    scheme: str = "mutual"

    def __post_init__(self) -> None:
        if len(self.shifts_hz) < 2:
            raise ValueError("at least two sites are needed")
        if len(self.populations) != len(self.shifts_hz):
            raise ValueError(f"{len(self.shifts_hz)} sites but {len(self.populations)} populations")
        _check_populations(self.populations)
        if self.scheme not in SCHEMES:
            raise ValueError(f"unknown scheme {self.scheme!r}; choose one of {', '.join(SCHEMES)}")

    @classmethod
    def equal(cls, shifts_hz: Sequence[float], scheme: str = "mutual") -> ExchangeModel:
        n = len(shifts_hz)
        return cls(tuple(float(s) for s in shifts_hz), tuple([1.0 / n] * n), scheme)

    @property
    def span_hz(self) -> float:
        return float(max(self.shifts_hz) - min(self.shifts_hz))

    @property
    def min_separation_hz(self) -> float:
        s = np.sort(np.asarray(self.shifts_hz))
        gaps = np.diff(s)
        gaps = gaps[gaps > 0]
        return float(gaps.min()) if len(gaps) else 0.0

    def rate_matrix(self, k_per_s: float) -> FloatArray:
        return scheme_rate_matrix(k_per_s, self.populations, self.scheme)

    @cached_property
    def _unit_generator(self) -> FloatArray:
        """Exchange generator at k = 1 s⁻¹; the generator at k is k times this (it is linear)."""
        return exchange_generator(self.rate_matrix(1.0))

    @cached_property
    def _precession(self) -> NDArray[np.complex128]:
        return np.diag(2j * np.pi * np.asarray(self.shifts_hz, dtype=float))

    @cached_property
    def _pops(self) -> FloatArray:
        return _check_populations(self.populations)

    def generator(self, k_per_s: float) -> FloatArray:
        """The exchange generator X at rate k (see :func:`exchange_generator`)."""
        return k_per_s * self._unit_generator

    def resolvent(self, k_per_s: float) -> Resolvent:
        """Diagonalised matrix for rate k with zero intrinsic width (width is added later)."""
        return _diagonalise(self._precession + self.generator(k_per_s), self._pops)

    def site_derivative(
        self, name: str, k_per_s: float
    ) -> tuple[NDArray[np.complex128], NDArray[np.complex128]]:
        """∂L and ∂p with respect to Δν = ν₁ − ν₂ (``delta``, the centre held) or p₁
        (``population``, p₂ = 1 − p₁) of two sites, at rate k.

        ν₁,₂ = centre ± Δν/2 puts ±iπ on L's diagonal. With k₁₂ = k and k₂₁ = k·p₁/p₂ (detailed
        balance) the generator is k·[[−1, p₁/p₂], [1, −p₁/p₂]], whose p₁-derivative is
        k/p₂²·[[0, 1], [0, −1]]; the starting magnetization p moves by (1, −1).
        """
        if len(self.shifts_hz) != 2:
            raise ValueError("Δν and p₁ are parameters of two sites only")
        if name == "delta":
            return np.diag([1j * np.pi, -1j * np.pi]), np.zeros(2, complex)
        if name == "population":
            p2 = float(self._pops[1])
            d_gen = k_per_s / (p2 * p2) * np.array([[0.0, 1.0], [0.0, -1.0]])
            return d_gen.astype(complex), np.array([1.0, -1.0], complex)
        raise ValueError(f"no derivative for {name!r}")

    def spectrum(
        self, freq_hz: ArrayLike, k_per_s: float, width_hz: float = 0.0, offset_hz: float = 0.0
    ) -> FloatArray:
        """Unit-area spectrum at rate k, common intrinsic width (FWHM, Hz) and offset (Hz)."""
        return evaluate(self.resolvent(k_per_s), np.asarray(freq_hz, float), width_hz, offset_hz)
