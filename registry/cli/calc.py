"""``fluxledger calc``: barriers, rates, half-lives and VT-NMR plans at the bench, no database.

Each command passes its options as texts to one :mod:`registry.api` call (``calc_*``) and
renders the record it returns as text or ``--json``. The api loads numpy and pint only when
called, so ``fluxledger --help`` stays fast.
"""

from __future__ import annotations

import math
from typing import Any

import typer

from registry import api
from registry.cli.calc_methods import register as register_methods
from registry.cli.calc_text import (
    dnu_text,
    duration_text,
    energy_text,
    figures,
    plus_minus,
    print_lines,
    temperature_text,
)
from registry.cli.context import ErrorBoundaryGroup
from registry.cli.output import print_json, table_text

NAME = "calc"


app = typer.Typer(
    cls=ErrorBoundaryGroup,
    no_args_is_help=True,
    help="Kinetics at the bench: ΔG‡ from coalescence, Eyring fits, rates, half-lives, plans.",
)

_JSON = typer.Option(False, "--json", help="Print one JSON object; keys carry their unit.")
_DG = typer.Option(None, "--dg", help="Free-energy barrier ΔG‡, e.g. '21 kcal/mol', '88 kJ/mol'.")
_DH = typer.Option(None, "--dh", help="Activation enthalpy ΔH‡ (use with --ds), e.g. '80 kJ/mol'.")
_DS = typer.Option(None, "--ds", help="Activation entropy ΔS‡ (use with --dh), e.g. '-5 e.u.'.")
_KAPPA = typer.Option(1.0, "--kappa", help="Transmission coefficient κ of the Eyring equation.")
_BP = typer.Option(None, "--solvent-bp", help="Solvent boiling point, e.g. '61 °C', for cautions.")
_MP = typer.Option(None, "--solvent-mp", help="Solvent melting point, e.g. '-64 °C', for cautions.")
_NUCLEUS = typer.Option(
    None,
    "--nucleus",
    help="Observed nucleus (1H, 13C, 19F …): a Δν in ppm is taken at its own frequency.",
)
_PAIR = typer.Option(
    False,
    "--pair",
    help="Half-life of the excess of one of two equally stable forms (racemization): ln2/(2k).",
)


# --- commands ---------------------------------------------------------------------------------


@app.command()
def coalescence(
    tc: str = typer.Option(
        ..., "--tc", help="Coalescence temperature, e.g. '-12 °C' or '261 ± 1 K'."
    ),
    dnu: str = typer.Option(
        ..., "--dnu", help="Shift difference at slow exchange: '27 Hz', or '0.045 ppm' with --mhz."
    ),
    mhz: str = typer.Option(
        None, "--mhz", "--field", help="Spectrometer frequency (¹H, MHz) for Δν in ppm."
    ),
    nucleus: str = _NUCLEUS,
    tc_err: str = typer.Option(
        None, "--tc-err", help="Uncertainty of Tc, e.g. '1 K' (default ±2 K if none is written)."
    ),
    dnu_err: str = typer.Option(None, "--dnu-err", help="Uncertainty of Δν, e.g. '0.5 Hz'."),
    j: str = typer.Option(
        None, "--j", help="Coupling J between the two sites (AB case), e.g. '12 Hz'."
    ),
    j_err: str = typer.Option(None, "--j-err", help="Uncertainty of J."),
    ratio: str = typer.Option(
        None, "--ratio", help="Population ratio major:minor at slow exchange, e.g. '3' or '75:25'."
    ),
    ratio_err: str = typer.Option(None, "--ratio-err", help="Uncertainty of the ratio."),
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """ΔG‡ at the coalescence temperature, with its uncertainty from Tc and Δν."""
    res = api.calc_coalescence(
        tc=tc,
        dnu=dnu,
        field=mhz,
        tc_err=tc_err,
        dnu_err=dnu_err,
        j=j,
        j_err=j_err,
        ratio=ratio,
        ratio_err=ratio_err,
        kappa=kappa,
        nucleus=nucleus,
    )
    if as_json:
        print_json(res.to_dict())
    elif hasattr(res, "ratio"):
        _show_unequal(res)
    else:
        _show_equal(res)


def _show_equal(res: Any) -> None:
    pairs = [
        ("Tc", temperature_text(res.tc)),
        ("Δν", dnu_text(res.dnu_hz, res.dnu_err_hz, res.field_mhz, res.nucleus, res.observe_mhz)),
    ]
    if res.coupled:
        pairs.append(("J", f"{figures(res.j_hz)} Hz"))
    pairs += [
        ("k_c", f"{figures(res.k_c_per_s)} s⁻¹"),
        ("ΔG‡(Tc)", energy_text(res.dg)),
        (
            "error from",
            f"Tc ±{res.dg_err_from_tc_kj_mol:.2f}, Δν ±{res.dg_err_from_dnu_kj_mol:.2f}"
            + (f", J ±{res.dg_err_from_j_kj_mol:.2f}" if res.coupled else "")
            + " kJ/mol",
        ),
    ]
    print_lines(f"Coalescence, {res.method}", pairs, res.notes)


def _show_unequal(res: Any) -> None:
    pairs = [
        ("Tc", temperature_text(res.tc)),
        ("Δν", dnu_text(res.dnu_hz, res.dnu_err_hz, res.field_mhz, res.nucleus, res.observe_mhz)),
        ("ratio", f"{figures(res.ratio)} (Δp = {res.delta_p:.3f}, X = {res.x:.4f})"),
        ("k major→minor", f"{figures(res.k_major_to_minor_per_s)} s⁻¹"),
        ("k minor→major", f"{figures(res.k_minor_to_major_per_s)} s⁻¹"),
        ("ΔG‡ major→minor", energy_text(res.dg_major_to_minor)),
        ("ΔG‡ minor→major", energy_text(res.dg_minor_to_major)),
    ]
    print_lines(f"Coalescence, {res.method}", pairs, res.notes)


@app.command()
def eyring(
    file: str = typer.Argument(
        None, help="CSV/TSV or spreadsheet with T and k columns (optional σk); units in headers."
    ),
    point: list[str] = typer.Option(
        None,
        "--point",
        help="A rate point 'T, k' or 'T; k; σk' (K and s⁻¹ if no unit). Repeatable.",
    ),
    sheet: str = typer.Option(None, "--sheet", help="Sheet name of a spreadsheet."),
    t: list[str] = typer.Option(
        None, "--t", help="Temperature for ΔG‡ (default 25 °C). Repeatable."
    ),
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """Eyring and Arrhenius fits of rate constants against temperature, with honest errors."""
    res = api.calc_eyring(point or None, file=file, sheet=sheet, t=t or None, kappa=kappa)
    if as_json:
        print_json(res.to_dict())
        return
    how = "weighted by σk" if res.weighted else "unweighted, errors from the scatter"
    ds = res.ds
    pairs = [
        (
            "points",
            f"{res.n_points} ({how}), {temperature_text(res.t_min)} to {temperature_text(res.t_max)}",
        ),
        ("ΔH‡", energy_text(res.dh)),
        (
            "ΔS‡",
            f"{plus_minus(ds.j_mol_k, ds.err_j_mol_k)} J/(mol·K)  ({plus_minus(ds.eu, ds.err_eu)} e.u.)",
        ),
        ("corr(ΔH‡, ΔS‡)", f"{res.corr_dh_ds:.4f}"),
        (f"ΔG‡({res.t_best_k:.2f} K)", energy_text(res.dg_best)),
    ]
    pairs += [(f"ΔG‡({b.t_k:.2f} K)", energy_text(b.dg)) for b in res.dg_at]
    pairs += [
        ("Ea", energy_text(res.ea)),
        ("log10 A", f"{plus_minus(res.log10_a_per_s, res.log10_a_err, 2)}  (A in s⁻¹)"),
        ("R²", f"{res.r_squared:.5f}"),
        ("95% interval", f"± {figures(res.ci95_factor)} × standard error"),
    ]
    print_lines("Eyring fit: ln(k/T) against 1/T (± one standard error)", pairs, [])
    typer.echo("  (ΔG‡ is best determined at the first temperature listed, the centre of the data)")
    typer.echo("")
    rows = [
        {
            "T (K)": f"{p.t_k:.2f}",
            "k (s⁻¹)": figures(p.k_per_s, 4),
            "σk (s⁻¹)": "" if p.k_err_per_s is None else figures(p.k_err_per_s, 2),
            "residual ln(k/T)": f"{p.residual_ln:+.4f}",
        }
        for p in res.points
    ]
    typer.echo(table_text(rows))
    for w in res.warnings:
        typer.echo(f"warning: {w}")


@app.command()
def rate(
    t: list[str] = typer.Option(
        None, "--t", help="Temperature, e.g. '37 °C'. Repeatable (default 25 °C)."
    ),
    dg: str = _DG,
    dh: str = _DH,
    ds: str = _DS,
    pair: bool = _PAIR,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """Rate constant and half-life at one or more temperatures from a barrier."""
    res = api.calc_rate(t=t or None, dg=dg, dh=dh, ds=ds, pair=pair, kappa=kappa)
    if as_json:
        print_json(res.to_dict())
        return
    table = [
        {
            "T (K)": f"{r.t.k:.2f}",
            "T (°C)": f"{r.t.celsius:.1f}",
            "ΔG‡ (kJ/mol)": f"{r.dg_kj_mol:.2f}",
            "k (s⁻¹)": figures(r.k_per_s),
            "t½": duration_text(r.half_life),
        }
        for r in res.rows
    ]
    typer.echo(table_text(table))
    typer.echo(
        "t½ = ln2/(2k): decay of the excess of one of two equal forms"
        if pair
        else "t½ = ln2/k (first order)"
    )


@app.command()
def halflife(
    target: str = typer.Option(..., "--target", help="Half-life wanted, e.g. '10 min', '1 h'."),
    dg: str = _DG,
    dh: str = _DH,
    ds: str = _DS,
    pair: bool = _PAIR,
    solvent_bp: str = _BP,
    solvent_mp: str = _MP,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """The temperature at which the half-life reaches a target (to plan a kinetic run)."""
    res = api.calc_halflife(
        target=target,
        dg=dg,
        dh=dh,
        ds=ds,
        pair=pair,
        solvent_bp=solvent_bp,
        solvent_mp=solvent_mp,
        kappa=kappa,
    )
    if as_json:
        print_json(res.to_dict())
        return
    print_lines(
        f"Temperature for a half-life of {duration_text(res.half_life)}",
        [("T", temperature_text(res.t)), ("k", f"{figures(res.k_per_s)} s⁻¹")],
        [],
    )
    for c in res.cautions:
        typer.echo(f"caution: {c}")


@app.command()
def plan(
    dnu: str = typer.Option(
        ..., "--dnu", help="Shift difference: '0.15 ppm' (for each --mhz) or '9 Hz' (one field)."
    ),
    mhz: list[str] = typer.Option(
        None,
        "--mhz",
        "--field",
        help="Spectrometer frequency (MHz). Repeatable; default 60–800 for ppm.",
    ),
    dg: str = _DG,
    dh: str = _DH,
    ds: str = _DS,
    j: str = typer.Option(None, "--j", help="Coupling J between the two sites (AB case)."),
    nucleus: str = _NUCLEUS,
    t: str = typer.Option("25 °C", "--t", help="Temperature to describe the exchange at."),
    solvent_bp: str = _BP,
    solvent_mp: str = _MP,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """Predict the coalescence temperature per field, the exchange regime and stability."""
    res = api.calc_plan(
        dnu=dnu,
        field=mhz or None,
        dg=dg,
        dh=dh,
        ds=ds,
        j=j,
        t=t,
        solvent_bp=solvent_bp,
        solvent_mp=solvent_mp,
        kappa=kappa,
        nucleus=nucleus,
    )
    if as_json:
        print_json(res.to_dict())
        return
    show_plan(res)


def show_plan(res: Any) -> None:
    """A coalescence plan as text (``calc plan`` and ``estimate`` print it alike)."""
    rows = [
        {
            "field (MHz)": "" if f.field_mhz is None else f"{f.field_mhz:g}",
            "Δν (Hz)": f"{f.dnu_hz:.4g}",
            "k_c (s⁻¹)": figures(f.k_c_per_s),
            "Tc (K)": f"{f.tc.k:.0f}" if math.isfinite(f.tc.k) else "n/a",
            "Tc (°C)": f"{f.tc.celsius:.0f}" if math.isfinite(f.tc.k) else "n/a",
            f"at {res.t.celsius:.0f} °C": f.regime_at_t,
            "flags": ", ".join(f.flags),
        }
        for f in res.fields
    ]
    observed = "" if res.nucleus == "1H" else f", {res.nucleus} (Δν at its own frequency)"
    typer.echo(f"Predicted coalescence (two equally populated sites{observed}):")
    typer.echo(table_text(rows))
    typer.echo("")
    print_lines(
        f"At {temperature_text(res.t)}:",
        [
            ("ΔG‡", energy_text(res.dg_at_t)),
            ("k", f"{figures(res.k_at_t_per_s)} s⁻¹"),
            ("t½", duration_text(res.half_life_at_t)),
            (
                "if an atropisomer",
                f"LaPlante {res.atropisomer_text}; t½(37 °C) = {duration_text(res.half_life_37c)}",
            ),
        ],
        [],
    )
    for c in res.cautions:
        typer.echo(f"caution: {c}")


register_methods(app)
