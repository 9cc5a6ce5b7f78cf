"""Mutual exchange of a coupled pair of spins-½ (AB ⇌ BA), from the density matrix.

Two spins with shifts ν_A, ν_B (Hz) and scalar coupling J (Hz) swap their environments at rate
k (a diastereotopic CH₂ group whose two protons trade places). In Liouville space the density
matrix obeys dσ/dt = −2πi[H, σ] + k(PσP − σ) − R σ, with H = ν_A I₁z + ν_B I₂z + J I₁·I₂ and
P the permutation of the two spins (the published density-matrix treatment of mutual exchange).
Only the four single-quantum coherences that I₊ detects take part, so L is 4 × 4. In the product
basis |αα⟩, |αβ⟩, |βα⟩, |ββ⟩ (energies E₁…E₄, ⟨αβ|H|βα⟩ = J/2) they are
c₁ = |αβ⟩⟨αα|, c₂ = |βα⟩⟨αα|, c₃ = |ββ⟩⟨αβ|, c₄ = |ββ⟩⟨βα|, and from [H, cₐ]:

* diagonal: 2πi·(ν_B + J/2, ν_A + J/2, ν_A − J/2, ν_B − J/2);
* coupling: −iπJ between c₁ and c₂, +iπJ between c₃ and c₄;
* exchange: PσP swaps c₁ ↔ c₂ and c₃ ↔ c₄ (rate k each way; populations are equal).

After a 90° pulse σ ∝ I₋ = c₁ + c₂ + c₃ + c₄ and ⟨I₊⟩ reads each with weight one, so the
spectrum is 2·Re[1ᵀ(iω − L)⁻¹p] with p = ¼·1: the same resolvent as the uncoupled sites
(:mod:`registry.lineshape.simulate`), unit area, and a common width or offset still only shifts
the eigenvalues. With J = 0 it is the two-site shape with equal populations and k_AB = k; in slow
exchange the AB quartet. k is the rate at which each nucleus leaves its site (k_AB of Gutowsky &
Holm), as everywhere in :mod:`registry.lineshape`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.lineshape.simulate import Resolvent, _diagonalise, evaluate

FloatArray = NDArray[np.float64]

#: the swap of the two spins acting on (c₁, c₂, c₃, c₄): pairs (c₁, c₂) and (c₃, c₄)
_SWAP = np.array(
    [[-1.0, 1.0, 0.0, 0.0], [1.0, -1.0, 0.0, 0.0], [0.0, 0.0, -1.0, 1.0], [0.0, 0.0, 1.0, -1.0]]
)


def ab_precession(nu_a_hz: float, nu_b_hz: float, j_hz: float) -> NDArray[np.complex128]:
    """The coherent part of L on (c₁…c₄): Zeeman and coupling terms (see module docstring)."""
    two_pi_i = 2j * math.pi
    half = 0.5 * j_hz
    diag = [nu_b_hz + half, nu_a_hz + half, nu_a_hz - half, nu_b_hz - half]
    liou = np.diag([two_pi_i * d for d in diag])
    liou[0, 1] = liou[1, 0] = -1j * math.pi * j_hz
    liou[2, 3] = liou[3, 2] = 1j * math.pi * j_hz
    return liou


@dataclass(frozen=True)
class CoupledABModel:
    """Two coupled spins in mutual exchange: what a line-shape fit varies is k (and w, δ).

    It offers what the fits ask of an exchange model (``shifts_hz``, ``span_hz``,
    ``min_separation_hz``, ``generator``, ``resolvent``, ``spectrum``), so the per-temperature
    and the global fit take it unchanged.
    """

    shifts_hz: tuple[float, float]
    j_hz: float
    scheme: str = "coupled AB"

    def __post_init__(self) -> None:
        if len(self.shifts_hz) != 2:
            raise ValueError("a coupled AB system has exactly two sites")
        if not math.isfinite(self.j_hz):
            raise ValueError("the coupling constant must be finite")

    @property
    def populations(self) -> tuple[float, float]:
        """Mutual exchange of the two spins of one molecule keeps the sites equally populated."""
        return (0.5, 0.5)

    @property
    def span_hz(self) -> float:
        return float(abs(self.shifts_hz[0] - self.shifts_hz[1]) + abs(self.j_hz))

    @property
    def min_separation_hz(self) -> float:
        return float(abs(self.shifts_hz[0] - self.shifts_hz[1]))

    @cached_property
    def _precession(self) -> NDArray[np.complex128]:
        return ab_precession(self.shifts_hz[0], self.shifts_hz[1], self.j_hz)

    def generator(self, k_per_s: float) -> FloatArray:
        """The exchange part of L at rate k."""
        return k_per_s * _SWAP

    def resolvent(self, k_per_s: float) -> Resolvent:
        return _diagonalise(self._precession + self.generator(k_per_s), np.full(4, 0.25))

    def site_derivative(
        self, name: str, k_per_s: float
    ) -> tuple[NDArray[np.complex128], NDArray[np.complex128]]:
        """∂L and ∂p with respect to Δν = ν_A − ν_B (``delta``, the centre held) or J
        (``coupling``): L's coherent part is linear in both, so ∂L is that part at
        (ν_A, ν_B, J) = (½, −½, 0) or (0, 0, 1); p does not move."""
        if name == "delta":
            return ab_precession(0.5, -0.5, 0.0), np.zeros(4, complex)
        if name == "coupling":
            return ab_precession(0.0, 0.0, 1.0), np.zeros(4, complex)
        raise ValueError(f"no derivative for {name!r}")

    def spectrum(
        self, freq_hz: ArrayLike, k_per_s: float, width_hz: float = 0.0, offset_hz: float = 0.0
    ) -> FloatArray:
        """Unit-area spectrum at rate k, intrinsic FWHM ``width_hz`` and common offset (Hz)."""
        return evaluate(self.resolvent(k_per_s), np.asarray(freq_hz, float), width_hz, offset_hz)


def coupled_ab_spectrum(
    freq_hz: ArrayLike,
    nu_a_hz: float,
    nu_b_hz: float,
    j_hz: float,
    k_per_s: float,
    width_hz: float = 0.0,
) -> FloatArray:
    """The AB mutual-exchange spectrum (unit area over ν in Hz); see the module docstring."""
    if not k_per_s >= 0.0:
        raise ValueError(f"k_per_s must be ≥ 0, got {k_per_s}")
    if width_hz < 0:
        raise ValueError("the intrinsic width cannot be negative")
    return CoupledABModel((float(nu_a_hz), float(nu_b_hz)), float(j_hz)).spectrum(
        freq_hz, k_per_s, width_hz
    )
