"""``fluxledger calc exsy | transfer | timecourse``: rate constants from 2D exchange, from
magnetization transfer, and from racemization/equilibration time courses.

Each command passes its options as texts to one :mod:`registry.api` call and renders the record
it returns, saying which rate constant is which (one molecule's k(A→B), k_ex = k_AB + k_BA,
k_rac = 2·k_enant, k_obs = k_PQ + k_QP). :func:`register` adds them to the ``calc`` group.
"""

from __future__ import annotations

from typing import Any

import typer

from registry import api
from registry.cli.calc_text import (
    duration_text,
    energy_text,
    figures,
    plus_minus,
    print_lines,
    temperature_text,
)
from registry.cli.output import print_json, table_text

_JSON = typer.Option(False, "--json", help="Print one JSON object; keys carry their unit.")
_KAPPA = typer.Option(1.0, "--kappa", help="Transmission coefficient κ of the Eyring equation.")
_TEMPERATURE = typer.Option(
    None, "--temperature", help="Sample temperature, e.g. '60 °C', for ΔG‡ (Eyring)."
)
_SHEET = typer.Option(None, "--sheet", help="Sheet name of a spreadsheet.")


def register(app: typer.Typer) -> None:
    """Add the three commands to the ``calc`` group."""
    app.command()(exsy)
    app.command()(transfer)
    app.command()(timecourse)


def _k(value: float | None, err: float | None) -> str:
    """'0.676 ± 0.026 s⁻¹' (σ with two figures)."""
    if value is None:
        return "n/a"
    return figures(value) + ("" if err is None else f" ± {figures(err, 2)}") + " s⁻¹"


def _barrier_pairs(label: str, dg: Any, t: Any) -> list[tuple[str, str]]:
    if dg is None or t is None:
        return []
    return [(f"ΔG‡({label}, {t.k:.2f} K)", energy_text(dg))]


# --- exsy ---------------------------------------------------------------------------------


def exsy(
    mixing: list[str] = typer.Option(
        ...,
        "--mixing",
        help="Mixing time, e.g. '0.3 s' or '300 ms'; repeat with --volumes for each (0 = "
        "the reference spectrum).",
    ),
    volumes: list[str] = typer.Option(
        ...,
        "--volumes",
        help="Peak volumes at that mixing time: 'I_AA,I_AB;I_BA,I_BB' (rows ';', values ','; "
        "row = site observed, column = site of origin). Repeatable, in --mixing order.",
    ),
    populations: str = typer.Option(
        None,
        "--populations",
        help="Equilibrium populations: '0.7,0.3', '70,30' or a ratio '7:3' (else column sums).",
    ),
    volume_err: str = typer.Option(
        None, "--volume-err", help="σ of every volume (in the volumes' units), propagated to k."
    ),
    sites: str = typer.Option(
        None, "--sites", help="Site names, e.g. 'syn,anti' (default A, B …)."
    ),
    temperature: str = _TEMPERATURE,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """Rate constants between exchanging sites from 2D exchange (EXSY) peak volumes."""
    res = api.calc_exsy(
        mixing=mixing,
        volumes=volumes,
        populations=populations,
        volume_err=volume_err,
        sites=sites,
        temperature=temperature,
        kappa=kappa,
    )
    if as_json:
        print_json(res.to_dict())
        return
    taus = ", ".join(f"{figures(t)} s" if t else "0 s (reference)" for t in res.mixing_s)
    pops = ", ".join(f"{s} {p:.3f}" for s, p in zip(res.sites, res.populations, strict=True))
    pairs = [("mixing time(s)", taus), ("populations", f"{pops}  ({res.populations_from})")]
    if len(res.sites) == 2:
        pairs += _two_site_pairs(res)
    elif res.t is not None:
        pairs.append(("T (for ΔG‡)", temperature_text(res.t)))
    if res.r1_per_s is not None:
        errs = res.r1_err_per_s or (None,) * len(res.sites)
        r1 = ", ".join(
            f"{s} {_k(r, e)}" for s, r, e in zip(res.sites, res.r1_per_s, errs, strict=True)
        )
        pairs.append(("R1 = 1/T1", r1))
    if res.chi2_reduced is not None:
        pairs.append(("χ²/dof", f"{res.chi2_reduced:.2f}"))
    print_lines(f"2D exchange (EXSY), {res.method}", pairs, [])
    if len(res.sites) > 2:
        typer.echo(table_text([_rate_row(r) for r in res.rates]))
    typer.echo(
        "k(X→Y): rate constant of one molecule leaving X for Y (per site; this k goes into "
        "Eyring)" + ("; k_ex = k_AB + k_BA" if len(res.sites) == 2 else "")
    )
    for note in res.notes:
        typer.echo(f"note: {note}")


def _two_site_pairs(res: Any) -> list[tuple[str, str]]:
    a, b = res.sites
    ab, ba = res.rate(a, b), res.rate(b, a)
    pairs = [
        (f"k({a}→{b})", _k(ab.k_per_s, ab.k_err_per_s)),
        (f"k({b}→{a})", _k(ba.k_per_s, ba.k_err_per_s)),
        ("k_ex", _k(res.k_exchange_per_s, res.k_exchange_err_per_s)),
    ]
    pairs += _barrier_pairs(f"{a}→{b}", ab.dg, res.t)
    pairs += _barrier_pairs(f"{b}→{a}", ba.dg, res.t)
    return pairs


def _rate_row(r: Any) -> dict[str, str]:
    row = {
        "from": r.source,
        "to": r.target,
        "k (s⁻¹)": figures(r.k_per_s),
        "σk (s⁻¹)": "" if r.k_err_per_s is None else figures(r.k_err_per_s, 2),
    }
    if r.dg is not None:
        row["ΔG‡ (kJ/mol)"] = plus_minus(r.dg.kj_mol, r.dg.err_kj_mol, 2)
    return row


# --- transfer -----------------------------------------------------------------------------


def transfer(
    file: str = typer.Argument(
        None,
        help="Inversion-transfer table: a time column ('t (s)') and the intensities of the "
        "inverted site, then its partner.",
    ),
    ratio: str = typer.Option(
        None, "--ratio", help="M_ss/M0 of the observed site with its partner saturated, e.g. 0.42."
    ),
    t1: str = typer.Option(
        None,
        "--t1",
        help="T1 of the observed site measured WHILE the partner is saturated, e.g. '1.2 s'.",
    ),
    t1_intrinsic: str = typer.Option(
        None, "--t1-intrinsic", help="T1 of the observed site without exchange (instead of --t1)."
    ),
    ratio_err: str = typer.Option(None, "--ratio-err", help="σ of the ratio."),
    t1_err: str = typer.Option(None, "--t1-err", help="σ of the T1, e.g. '0.05 s'."),
    inverted: str = typer.Option(
        None, "--inverted", help="Header of the inverted site's column (default: the first)."
    ),
    intensity_err: str = typer.Option(
        None, "--intensity-err", help="σ of every intensity (else from the scatter of the fit)."
    ),
    sheet: str = _SHEET,
    temperature: str = _TEMPERATURE,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """k from saturation transfer (ratio and T1) or from an inversion-transfer time course."""
    res = api.calc_transfer(
        ratio=ratio,
        t1=t1,
        t1_intrinsic=t1_intrinsic,
        ratio_err=ratio_err,
        t1_err=t1_err,
        file=file,
        sheet=sheet,
        inverted=inverted,
        intensity_err=intensity_err,
        temperature=temperature,
        kappa=kappa,
    )
    if as_json:
        print_json(res.to_dict())
        return
    if hasattr(res, "ratio"):
        mark = {"apparent": (" (given)", " (= T1_sat/r)"), "intrinsic": (" (= r·T1)", " (given)")}
        sat, own = mark[res.t1_given]
        r_err = "" if res.ratio_err is None else f" ± {figures(res.ratio_err, 2)}"
        pairs = [
            ("ratio r = M_ss/M0", figures(res.ratio) + r_err),
            ("T1 with partner saturated", f"{figures(res.t1_apparent_s)} s{sat}"),
            ("T1 intrinsic", f"{figures(res.t1_intrinsic_s)} s{own}"),
            ("k(observed→partner)", _k(res.k_per_s, res.k_err_per_s)),
        ]
        how = "k = (1 − r)/T1_sat" if res.t1_given == "apparent" else "k = (1 − r)/(r·T1)"
        site = "observed"
    else:
        pairs = [
            ("inverted site", f"{res.columns[0]!r}, partner {res.columns[1]!r}"),
            ("k(inverted→partner)", _k(res.k_per_s, res.k_err_per_s)),
            ("k(partner→inverted)", _k(res.k_reverse_per_s, res.k_reverse_err_per_s)),
            ("T1", f"{_t1(res.t1_s[0], res.t1_err_s[0])}, {_t1(res.t1_s[1], res.t1_err_s[1])}"),
            ("M0", f"{figures(res.m0[0])}, {figures(res.m0[1])}"),
            ("rms residual", figures(res.rms_residual, 2)),
        ]
        how = f"{len(res.points)} delays"
        site = "inverted"
    pairs += _barrier_pairs(f"{site}→partner", res.dg, res.t)
    print_lines(f"{res.method}: {how}", pairs, [])
    typer.echo(
        f"k: rate constant of one molecule leaving the {site} site (this k goes into Eyring)"
    )
    for note in res.notes:
        typer.echo(f"note: {note}")


def _t1(t1: float, err: float | None) -> str:
    return f"{figures(t1)}" + ("" if err is None else f" ± {figures(err, 2)}") + " s"


# --- timecourse ---------------------------------------------------------------------------


def timecourse(
    file: str = typer.Argument(
        ..., help="Table with a time column ('t (min)') and an 'ee (%)' or 'fraction' column."
    ),
    temperature: str = _TEMPERATURE,
    quantity: str = typer.Option(
        None, "--quantity", help="'ee' or 'fraction', when the table has both columns."
    ),
    x_eq: str = typer.Option(
        None, "--x-eq", help="Equilibrium fraction of the followed isomer (else fitted)."
    ),
    sheet: str = _SHEET,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """First-order fit of a racemization (ee) or equilibration (fraction) time course."""
    res = api.calc_timecourse(
        file, sheet=sheet, quantity=quantity, temperature=temperature, x_eq=x_eq, kappa=kappa
    )
    if as_json:
        print_json(res.to_dict())
        return
    ee = res.quantity == "ee"
    half = duration_text(res.half_life)
    if ee:
        title = "Racemization"
        pairs = [
            ("k_rac", _k(res.k_obs_per_s, res.k_obs_err_per_s) + "  (decay of ee)"),
            ("k_enant", _k(res.k_per_s, res.k_err_per_s) + "  (one molecule inverting)"),
            ("t½ (ee halves)", half),
            ("ee0", f"{100 * res.start:.1f} %"),
        ]
    else:
        title = "Equilibration"
        fitted = "fitted" if res.equilibrium_fitted else "given"
        pairs = [
            ("k_obs = k_PQ + k_QP", _k(res.k_obs_per_s, res.k_obs_err_per_s)),
            ("k(P→Q)", _k(res.k_per_s, res.k_err_per_s) + "  (P: the followed isomer)"),
            ("k(Q→P)", _k(res.k_reverse_per_s, res.k_reverse_err_per_s)),
            ("t½ (to equilibrium)", half),
            ("x0, x_eq", f"{res.start:.3f}, {res.equilibrium:.3f} ({fitted})"),
        ]
    if res.t is not None:
        pairs.append(("T", temperature_text(res.t)))
    pairs += _barrier_pairs("k_enant" if ee else "P→Q", res.dg, res.t)
    if not ee:
        pairs += _barrier_pairs("Q→P", res.dg_reverse, res.t)
    pairs.append(("points", f"{len(res.points)}, rms residual {figures(res.rms_residual, 2)}"))
    print_lines(f"{title} time course: {res.columns[1]!r} against {res.columns[0]!r}", pairs, [])
    typer.echo(
        "ΔG‡ is from k_enant = k_rac/2, the rate constant of one molecule"
        if ee
        else "ΔG‡ is from one molecule's rate constant, k(P→Q) = (1 − x_eq)·k_obs"
    )
    for note in res.notes:
        typer.echo(f"note: {note}")
