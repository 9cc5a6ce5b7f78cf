"""``fluxledger calc``: barriers, rates, half-lives and VT-NMR plans at the bench, no database.

Each command parses its options with :func:`registry.record.units.parse_value`, calls
:mod:`registry.kinetics` and renders text or ``--json``. numpy, scipy, pandas and pint are
imported inside the commands so that ``fluxledger --help`` stays fast.
"""

from __future__ import annotations

import math
from typing import Any

import typer

from registry.cli.context import ErrorBoundaryGroup
from registry.cli.output import print_json, table_text
from registry.errors import UsageError

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
_PAIR = typer.Option(
    False,
    "--pair",
    help="Half-life of the excess of one of two equally stable forms (racemization): ln2/(2k).",
)


# --- parsing helpers (text → canonical floats); errors are UnitError/UsageError ---------------


def _value(text: str, quantity: str, field: str, **kw: Any) -> Any:
    from registry.record.units import parse_value

    return parse_value(text, quantity, field=field, **kw)


def _mhz(text: str | None, field: str = "--mhz") -> float | None:
    if text is None:
        return None
    mhz = _value(text, "field", field, default_unit="MHz").value
    if mhz <= 0:
        from registry.errors import UnitError

        raise UnitError(field, text, "the spectrometer frequency must be > 0 MHz")
    return mhz


def _positive(text: str, quantity: str, field: str, **kw: Any) -> Any:
    """Parse a value that must be > 0 (a Δν of 0 Hz, a Tc of 0 K), naming the option if not."""
    parsed = _value(text, quantity, field, **kw)
    if parsed.value <= 0:
        from registry.errors import UnitError

        raise UnitError(field, text, "must be > 0")
    return parsed


def _optional(text: str | None, quantity: str, field: str, **kw: Any) -> float | None:
    return None if text is None else _value(text, quantity, field, **kw).value


def _barrier(dg: str | None, dh: str | None, ds: str | None) -> dict[str, float | None]:
    """The barrier options as keyword arguments for the planning functions."""
    if dg is not None and (dh is not None or ds is not None):
        raise UsageError("give --dg, or --dh with --ds, not both")
    if dg is None and (dh is None or ds is None):
        raise UsageError("give the barrier: --dg, or both --dh and --ds")
    return {
        "dg_kj_mol": _optional(dg, "energy", "--dg"),
        "dh_kj_mol": _optional(dh, "energy", "--dh"),
        "ds_j_mol_k": _optional(ds, "entropy", "--ds"),
    }


def _ratio(text: str, field: str = "--ratio") -> float:
    """A population ratio major/minor: '3', '3:1' or '75:25'."""
    from registry.errors import UnitError

    parts = text.split(":")
    if len(parts) > 2:
        raise UnitError(field, text, "write the ratio as '3' or '75:25' (major:minor)")
    nums = [_value(p, "dimensionless", field).value for p in parts]
    if any(n <= 0 for n in nums):
        raise UnitError(field, text, "populations must be > 0")
    ratio = nums[0] / nums[1] if len(nums) == 2 else nums[0]
    if ratio < 1:
        raise UnitError(
            field, text, "the ratio is major/minor and must be ≥ 1 (e.g. '3' or '75:25')"
        )
    return ratio


# --- formatting helpers -----------------------------------------------------------------------


def _kcal(kj: float) -> float:
    from registry.record.units import energy_from_kj

    return energy_from_kj(kj, "kcal/mol")


def _celsius(t_k: float) -> float:
    from registry.record.units import convert

    return convert(t_k, "K", "degC")


def _eu(ds_j: float) -> float:
    from registry.record.units import convert

    return convert(ds_j, "J/(mol*K)", "cal/(mol*K)")


def _g(x: float, digits: int = 3) -> str:
    """A number with ``digits`` significant figures, plain notation where that reads well."""
    if x is None or not math.isfinite(x):
        return "n/a"
    if x != 0 and (abs(x) >= 1e6 or abs(x) < 1e-3):
        return f"{x:.{digits - 1}e}"
    return f"{x:.{digits}g}" if abs(x) >= 10**digits else f"{x:#.{digits}g}".rstrip(".")


def _pm(value: float, err: float | None, decimals: int = 1) -> str:
    if err is None or not math.isfinite(err):
        return f"{value:.{decimals}f}"
    return f"{value:.{decimals}f} ± {err:.{decimals}f}"


def _energy(kj: float, err: float | None = None) -> str:
    kcal_err = None if err is None or not math.isfinite(err) else _kcal(err)
    return f"{_pm(kj, err, 2)} kJ/mol  ({_pm(_kcal(kj), kcal_err, 2)} kcal/mol)"


def _temp(t_k: float, err: float | None = None) -> str:
    if not math.isfinite(t_k):
        return "n/a"
    return f"{_pm(t_k, err, 2)} K  ({_celsius(t_k):.1f} °C)"


def duration_text(seconds: float) -> str:
    """A half-life in the largest unit that keeps it ≥ 1 (s, min, h, days, years)."""
    if not math.isfinite(seconds):
        return "n/a"
    for unit, size in (("years", 365.25 * 86400), ("days", 86400), ("h", 3600), ("min", 60)):
        if seconds >= size:
            return f"{_g(seconds / size)} {unit}"
    return f"{_g(seconds)} s"


def _dnu_text(dnu_hz: float, err: float | None, field_mhz: float | None) -> str:
    text = f"{_g(dnu_hz)}" + (f" ± {_g(err)}" if err else "") + " Hz"
    return text + (f" at {_g(field_mhz)} MHz" if field_mhz else "")


def _lines(title: str, pairs: list[tuple[str, str]], notes: list[str] | tuple[str, ...]) -> None:
    typer.echo(title)
    width = max(len(k) for k, _ in pairs)
    for key, value in pairs:
        typer.echo(f"  {key.ljust(width)}  {value}")
    for note in notes:
        typer.echo(f"note: {note}")


# --- commands ---------------------------------------------------------------------------------


@app.command()
def coalescence(
    tc: str = typer.Option(
        ..., "--tc", help="Coalescence temperature, e.g. '-12 °C' or '261 ± 1 K'."
    ),
    dnu: str = typer.Option(
        ..., "--dnu", help="Shift difference at slow exchange: '27 Hz', or '0.045 ppm' with --mhz."
    ),
    mhz: str = typer.Option(None, "--mhz", help="Spectrometer frequency (¹H, MHz) for Δν in ppm."),
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
    from registry.kinetics import coalescence_barrier, unequal_population_barriers

    field_mhz = _mhz(mhz)
    tc_p = _positive(tc, "temperature", "--tc")
    dnu_p = _positive(dnu, "shift", "--dnu", spectrometer_mhz=field_mhz)
    notes: list[str] = []
    tc_e = _optional(tc_err, "temperature_difference", "--tc-err", default_unit="K")
    if tc_e is None:
        tc_e = tc_p.error
    if tc_e is None:
        tc_e = 2.0
        notes.append("no Tc uncertainty given: ±2 K assumed (typical for coalescence)")
    dnu_e = _optional(dnu_err, "shift", "--dnu-err", spectrometer_mhz=field_mhz)
    if dnu_e is None:
        dnu_e = dnu_p.error
    if dnu_e is None:
        notes.append("no Δν uncertainty given: taken as 0")
    if ratio is not None and j is not None:
        raise UsageError("--ratio (unequal populations) and --j (coupled AB) cannot be combined")
    if ratio is not None:
        r = _ratio(ratio)
        r_e = None if ratio_err is None else _value(ratio_err, "dimensionless", "--ratio-err").value
        res = unequal_population_barriers(tc_p.value, dnu_p.value, r, tc_e, dnu_e, r_e, kappa=kappa)
        _show_unequal(res, tc_e, dnu_e, field_mhz, notes, as_json)
        return
    j_hz = _optional(j, "frequency", "--j", default_unit="Hz")
    j_e = _optional(j_err, "frequency", "--j-err", default_unit="Hz")
    res = coalescence_barrier(tc_p.value, dnu_p.value, j_hz, tc_e, dnu_e, j_err_hz=j_e, kappa=kappa)
    method = "coupled AB (Kurland–Rubin–Wise)" if j_hz else "equal populations (Gutowsky–Holm)"
    data = {
        "method": method,
        "tc_k": res.tc_k,
        "tc_err_k": tc_e,
        "dnu_hz": res.dnu_hz,
        "dnu_err_hz": dnu_e,
        "j_hz": res.j_hz,
        "k_c_per_s": res.k_c_per_s,
        "dg_kj_mol": res.dg_kj_mol,
        "dg_err_kj_mol": res.dg_err_kj_mol,
        "dg_kcal_mol": _kcal(res.dg_kj_mol),
        "dg_err_kcal_mol": _kcal(res.dg_err_kj_mol),
        "dg_err_from_tc_kj_mol": res.dg_err_from_tc_kj_mol,
        "dg_err_from_dnu_kj_mol": res.dg_err_from_dnu_kj_mol,
        "dg_err_from_j_kj_mol": res.dg_err_from_j_kj_mol,
        "notes": notes,
    }
    if as_json:
        print_json(data)
        return
    pairs = [
        ("Tc", _temp(res.tc_k, tc_e)),
        ("Δν", _dnu_text(res.dnu_hz, dnu_e, field_mhz)),
    ]
    if j_hz:
        pairs.append(("J", f"{_g(j_hz)} Hz"))
    pairs += [
        ("k_c", f"{_g(res.k_c_per_s)} s⁻¹"),
        ("ΔG‡(Tc)", _energy(res.dg_kj_mol, res.dg_err_kj_mol)),
        (
            "error from",
            f"Tc ±{res.dg_err_from_tc_kj_mol:.2f}, Δν ±{res.dg_err_from_dnu_kj_mol:.2f}"
            + (f", J ±{res.dg_err_from_j_kj_mol:.2f}" if j_hz else "")
            + " kJ/mol",
        ),
    ]
    _lines(f"Coalescence, {method}", pairs, notes)


def _show_unequal(
    res: Any,
    tc_e: float,
    dnu_e: float | None,
    field_mhz: float | None,
    notes: list[str],
    as_json: bool,
) -> None:
    data = {
        "method": "unequal populations (Shanan-Atidi–Bar-Eli)",
        "tc_k": res.tc_k,
        "tc_err_k": tc_e,
        "dnu_hz": res.dnu_hz,
        "dnu_err_hz": dnu_e,
        "ratio": res.ratio,
        "delta_p": res.delta_p,
        "x": res.x,
        "k_major_to_minor_per_s": res.k_ab_per_s,
        "k_minor_to_major_per_s": res.k_ba_per_s,
        "dg_major_to_minor_kj_mol": res.dg_ab_kj_mol,
        "dg_major_to_minor_err_kj_mol": res.dg_ab_err_kj_mol,
        "dg_minor_to_major_kj_mol": res.dg_ba_kj_mol,
        "dg_minor_to_major_err_kj_mol": res.dg_ba_err_kj_mol,
        "dg_major_to_minor_kcal_mol": _kcal(res.dg_ab_kj_mol),
        "dg_minor_to_major_kcal_mol": _kcal(res.dg_ba_kj_mol),
        "notes": notes,
    }
    if as_json:
        print_json(data)
        return
    pairs = [
        ("Tc", _temp(res.tc_k, tc_e)),
        ("Δν", _dnu_text(res.dnu_hz, dnu_e, field_mhz)),
        ("ratio", f"{_g(res.ratio)} (Δp = {res.delta_p:.3f}, X = {res.x:.4f})"),
        ("k major→minor", f"{_g(res.k_ab_per_s)} s⁻¹"),
        ("k minor→major", f"{_g(res.k_ba_per_s)} s⁻¹"),
        ("ΔG‡ major→minor", _energy(res.dg_ab_kj_mol, res.dg_ab_err_kj_mol)),
        ("ΔG‡ minor→major", _energy(res.dg_ba_kj_mol, res.dg_ba_err_kj_mol)),
    ]
    _lines("Coalescence, unequal populations (Shanan-Atidi–Bar-Eli)", pairs, notes)


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
    import numpy as np

    from registry.kinetics import fit_arrhenius, fit_eyring
    from registry.kinetics.constants import STANDARD_TEMPERATURE_K
    from registry.kinetics.rate_table import parse_point, read_rate_table

    if not file and not point:
        raise UsageError("give a table file, or rate points with --point 'T, k'")
    ts: list[float] = []
    ks: list[float] = []
    errs: list[float | None] = []
    if file:
        pts = read_rate_table(file, sheet=sheet)
        ts += pts.t_k.tolist()
        ks += pts.k_per_s.tolist()
        errs += [None] * len(pts.t_k) if pts.k_err_per_s is None else pts.k_err_per_s.tolist()
    for text in point or []:
        t_k, k, e = parse_point(text)
        ts.append(t_k)
        ks.append(k)
        errs.append(e)
    if any(e is None for e in errs) and not all(e is None for e in errs):
        raise UsageError("σk is given for some points but not all; give it for all or none")
    k_err = None if errs[0] is None else np.array(errs, dtype=float)
    t_refs = [_value(x, "temperature", "--t").value for x in (t or [])] or [STANDARD_TEMPERATURE_K]
    fit = fit_eyring(ts, ks, k_err, t_ref_k=t_refs[0], kappa=kappa)
    arr = fit_arrhenius(ts, ks, k_err)
    at = [fit.dg_at(x) for x in t_refs]
    warnings = list(fit.warnings)
    for b in at[1:]:
        if b.warning and b.warning not in warnings:
            warnings.append(b.warning)
    points = [
        {"T_K": tk, "k_per_s": kk, "k_err_per_s": ee, "residual_ln": float(r)}
        for tk, kk, ee, r in zip(fit.t_k, fit.k_per_s, errs, fit.residuals_ln, strict=True)
    ]
    data = {
        "n_points": fit.n_points,
        "weighted": fit.weighted,
        "T_min_K": float(fit.t_k.min()),
        "T_max_K": float(fit.t_k.max()),
        "dh_kj_mol": fit.dh_kj_mol,
        "dh_err_kj_mol": fit.dh_err_kj_mol,
        "ds_j_mol_k": fit.ds_j_mol_k,
        "ds_err_j_mol_k": fit.ds_err_j_mol_k,
        "corr_dh_ds": fit.corr_dh_ds,
        "T_best_K": fit.t_best_k,
        "dg_best_kj_mol": fit.dg_best_kj_mol,
        "dg_best_err_kj_mol": fit.dg_best_err_kj_mol,
        "dg_at": [
            {"T_K": b.t_k, "dg_kj_mol": b.dg_kj_mol, "dg_err_kj_mol": b.dg_err_kj_mol} for b in at
        ],
        "ea_kj_mol": arr.ea_kj_mol,
        "ea_err_kj_mol": arr.ea_err_kj_mol,
        "log10_a_per_s": arr.log10_a,
        "log10_a_err": arr.log10_a_err,
        "ci95_factor": fit.ci95_factor,
        "r_squared": fit.r_squared,
        "chi2_reduced": fit.chi2_reduced,
        "kappa": fit.kappa,
        "points": points,
        "warnings": warnings,
    }
    if as_json:
        print_json(data)
        return
    how = "weighted by σk" if fit.weighted else "unweighted, errors from the scatter"
    pairs = [
        ("points", f"{fit.n_points} ({how}), {_temp(data['T_min_K'])} to {_temp(data['T_max_K'])}"),
        ("ΔH‡", _energy(fit.dh_kj_mol, fit.dh_err_kj_mol)),
        (
            "ΔS‡",
            f"{_pm(fit.ds_j_mol_k, fit.ds_err_j_mol_k)} J/(mol·K)  "
            f"({_pm(_eu(fit.ds_j_mol_k), _eu(fit.ds_err_j_mol_k))} e.u.)",
        ),
        ("corr(ΔH‡, ΔS‡)", f"{fit.corr_dh_ds:.4f}"),
        (f"ΔG‡({fit.t_best_k:.2f} K)", _energy(fit.dg_best_kj_mol, fit.dg_best_err_kj_mol)),
    ]
    pairs += [(f"ΔG‡({b.t_k:.2f} K)", _energy(b.dg_kj_mol, b.dg_err_kj_mol)) for b in at]
    pairs += [
        ("Ea", _energy(arr.ea_kj_mol, arr.ea_err_kj_mol)),
        ("log10 A", f"{_pm(arr.log10_a, arr.log10_a_err, 2)}  (A in s⁻¹)"),
        ("R²", f"{fit.r_squared:.5f}"),
        ("95% interval", f"± {_g(fit.ci95_factor)} × standard error"),
    ]
    _lines("Eyring fit: ln(k/T) against 1/T (± one standard error)", pairs, [])
    typer.echo("  (ΔG‡ is best determined at the first temperature listed, the centre of the data)")
    typer.echo("")
    rows = [
        {
            "T (K)": f"{p['T_K']:.2f}",
            "k (s⁻¹)": _g(p["k_per_s"], 4),
            "σk (s⁻¹)": "" if p["k_err_per_s"] is None else _g(p["k_err_per_s"], 2),
            "residual ln(k/T)": f"{p['residual_ln']:+.4f}",
        }
        for p in points
    ]
    typer.echo(table_text(rows))
    for w in warnings:
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
    import numpy as np

    from registry.kinetics import eyring_barrier, half_life, rate_at

    barrier = _barrier(dg, dh, ds)
    temps = np.array([_value(x, "temperature", "--t").value for x in (t or ["25 °C"])])
    k = np.atleast_1d(
        rate_at(
            temps,
            barrier["dg_kj_mol"],
            dh_kj_mol=barrier["dh_kj_mol"],
            ds_j_mol_k=barrier["ds_j_mol_k"],
            kappa=kappa,
        )
    )
    halves = np.atleast_1d(half_life(k, pair=pair))
    dgs = np.atleast_1d(eyring_barrier(k, temps, kappa))
    rows = [
        {
            "T_K": float(tk),
            "dg_kj_mol": float(g),
            "k_per_s": float(kk),
            "half_life_s": float(h),
        }
        for tk, g, kk, h in zip(temps, dgs, k, halves, strict=True)
    ]
    if as_json:
        print_json({"pair": pair, "kappa": kappa, "rows": rows})
        return
    table = [
        {
            "T (K)": f"{r['T_K']:.2f}",
            "T (°C)": f"{_celsius(r['T_K']):.1f}",
            "ΔG‡ (kJ/mol)": f"{r['dg_kj_mol']:.2f}",
            "k (s⁻¹)": _g(r["k_per_s"]),
            "t½": duration_text(r["half_life_s"]),
        }
        for r in rows
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
    from registry.kinetics import rate_at, safety_notes, temperature_for_half_life

    barrier = _barrier(dg, dh, ds)
    t_half = _value(target, "time", "--target").value
    if t_half <= 0:
        from registry.errors import UnitError

        raise UnitError("--target", target, "a half-life must be > 0")
    t_k = temperature_for_half_life(
        t_half,
        barrier["dg_kj_mol"],
        dh_kj_mol=barrier["dh_kj_mol"],
        ds_j_mol_k=barrier["ds_j_mol_k"],
        kappa=kappa,
        pair=pair,
    )
    if not math.isfinite(t_k):
        raise UsageError("no positive temperature gives that half-life for this barrier (ΔH‡ ≤ 0?)")
    k = float(
        rate_at(
            t_k,
            barrier["dg_kj_mol"],
            dh_kj_mol=barrier["dh_kj_mol"],
            ds_j_mol_k=barrier["ds_j_mol_k"],
            kappa=kappa,
        )
    )
    bp = _optional(solvent_bp, "temperature", "--solvent-bp")
    mp = _optional(solvent_mp, "temperature", "--solvent-mp")
    cautions = safety_notes(t_k, solvent_bp_k=bp, solvent_mp_k=mp)
    data = {
        "half_life_s": t_half,
        "T_K": float(t_k),
        "k_per_s": k,
        "pair": pair,
        "cautions": cautions,
    }
    if as_json:
        print_json(data)
        return
    _lines(
        f"Temperature for a half-life of {duration_text(t_half)}",
        [("T", _temp(float(t_k))), ("k", f"{_g(k)} s⁻¹")],
        [],
    )
    for c in cautions:
        typer.echo(f"caution: {c}")


@app.command()
def plan(
    dnu: str = typer.Option(
        ..., "--dnu", help="Shift difference: '0.15 ppm' (for each --mhz) or '9 Hz' (one field)."
    ),
    mhz: list[str] = typer.Option(
        None, "--mhz", help="Spectrometer frequency (MHz). Repeatable; default 60–800 for ppm."
    ),
    dg: str = _DG,
    dh: str = _DH,
    ds: str = _DS,
    j: str = typer.Option(None, "--j", help="Coupling J between the two sites (AB case)."),
    t: str = typer.Option("25 °C", "--t", help="Temperature to describe the exchange at."),
    solvent_bp: str = _BP,
    solvent_mp: str = _MP,
    kappa: float = _KAPPA,
    as_json: bool = _JSON,
) -> None:
    """Predict the coalescence temperature per field, the exchange regime and stability."""
    from registry.kinetics import plan_coalescence
    from registry.record.units import clean_text

    barrier = _barrier(dg, dh, ds)
    fields = [_mhz(m) for m in (mhz or [])]
    is_ppm = clean_text(dnu).lower().endswith("ppm")
    kw: dict[str, Any] = {"dnu_ppm": None, "dnu_hz": None}
    if is_ppm:
        kw["dnu_ppm"] = _value(dnu, "shift", "--dnu", spectrometer_mhz=1.0).value
    else:
        kw["dnu_hz"] = _value(dnu, "shift", "--dnu").value
    res = plan_coalescence(
        **kw,
        fields_mhz=fields,  # type: ignore[arg-type]
        **barrier,
        j_hz=_optional(j, "frequency", "--j", default_unit="Hz") or 0.0,
        t_k=_value(t, "temperature", "--t").value,
        solvent_bp_k=_optional(solvent_bp, "temperature", "--solvent-bp"),
        solvent_mp_k=_optional(solvent_mp, "temperature", "--solvent-mp"),
        kappa=kappa,
    )
    atrop = res.atropisomer
    data = {
        "T_K": res.t_k,
        "dg_at_T_kj_mol": res.dg_at_t_kj_mol,
        "k_at_T_per_s": res.k_at_t_per_s,
        "half_life_at_T_s": res.half_life_at_t_s,
        "fields": [
            {
                "field_MHz": f.field_mhz,
                "dnu_hz": f.dnu_hz,
                "k_c_per_s": f.k_c_per_s,
                "tc_K": f.tc_k,
                "regime_at_T": f.regime_at_t,
                "k_over_k_c_at_T": f.k_over_k_c_at_t,
                "flags": list(f.flags),
            }
            for f in res.fields
        ],
        "atropisomer_class": atrop.stability_class,
        "dg_37C_kj_mol": atrop.dg_kj_mol,
        "half_life_37C_s": atrop.half_life_37c_s,
        "atropisomer_text": atrop.description,
        "cautions": list(res.cautions),
    }
    if as_json:
        print_json(data)
        return
    rows = [
        {
            "field (MHz)": "" if f.field_mhz is None else f"{f.field_mhz:g}",
            "Δν (Hz)": f"{f.dnu_hz:.4g}",
            "k_c (s⁻¹)": _g(f.k_c_per_s),
            "Tc (K)": f"{f.tc_k:.0f}" if math.isfinite(f.tc_k) else "n/a",
            "Tc (°C)": f"{_celsius(f.tc_k):.0f}" if math.isfinite(f.tc_k) else "n/a",
            f"at {_celsius(res.t_k):.0f} °C": f.regime_at_t,
            "flags": ", ".join(f.flags),
        }
        for f in res.fields
    ]
    typer.echo("Predicted coalescence (two equally populated sites):")
    typer.echo(table_text(rows))
    typer.echo("")
    _lines(
        f"At {_temp(res.t_k)}:",
        [
            ("ΔG‡", _energy(res.dg_at_t_kj_mol)),
            ("k", f"{_g(res.k_at_t_per_s)} s⁻¹"),
            ("t½", duration_text(res.half_life_at_t_s)),
            (
                "if an atropisomer",
                f"LaPlante {atrop.description}; t½(37 °C) = {duration_text(atrop.half_life_37c_s)}",
            ),
        ],
        [],
    )
    for c in res.cautions:
        typer.echo(f"caution: {c}")
