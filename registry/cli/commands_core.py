"""Core commands: ``init``, ``info``, ``add``, ``show``, ``list``."""

from __future__ import annotations

import json
from typing import Any

import typer

from registry.cli import flags
from registry.cli.context import read_id, state
from registry.cli.output import render_record, render_rows
from registry.cli.ratefit_text import rate_fit_lines
from registry.cli.rawdata_text import raw_data_lines
from registry.errors import UsageError


def register(app: typer.Typer) -> None:
    app.command("init")(init)
    app.command("info")(info)
    app.command("add")(add)
    app.command("show")(show)
    app.command("list")(list_cmd)


def init(
    ctx: typer.Context,
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Create a registry (or bring an existing one up to the current schema)."""
    from registry import api

    result = api.init_registry(state(ctx).db)
    if as_json:
        render_record(result, as_json=True)
        return
    typer.echo(f"registry ready: {result['database']} (schema {result['schema_version']})")


def info(
    ctx: typer.Context,
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Which database, its schema version, and how much it holds."""
    from registry import api

    database = api.open_registry(state(ctx).db)
    result = api.registry_info(database)
    if as_json:
        render_record(result, as_json=True)
        return
    lines = [
        ("database", result["database"]),
        ("backend", result["backend"]),
        ("schema", f"{result['schema_version']} (head {result['schema_head']})"),
        *((name.replace("_", " "), count) for name, count in result["counts"].items()),
    ]
    width = max(len(name) for name, _ in lines) + 2
    for name, value in lines:
        typer.echo(f"{name:<{width}}{value}")


def _smiles_or_molfile(smiles: str | None, molfile: str | None) -> str | None:
    """The structure ``add`` was given: a SMILES, or the SMILES a Molfile stands for."""
    from registry import api

    if molfile is None:
        return smiles
    if smiles is not None:
        raise UsageError("give the structure once: --smiles or --molfile, not both")
    return api.smiles_from_molfile(molfile)


def add(
    ctx: typer.Context,
    method: str = typer.Option(
        ...,
        help="coalescence, lineshape, 2d-exchange, saturation-transfer, equilibration, computed",
    ),
    smiles: str = typer.Option(None, help="Structure as SMILES."),
    molfile: str = typer.Option(
        None, help="Structure as a Molfile (V2000/V3000, e.g. from a structure editor)."
    ),
    compound: str = typer.Option(None, help="The group's compound label."),
    name: str = typer.Option(None, help="Compound name."),
    process: str = typer.Option(None, help="Process kind (bond-rotation, ring-inversion …)."),
    sites: str = typer.Option(None, help="Which sites exchange, e.g. 'N-CH3 a/b'."),
    nucleus: str = typer.Option(None, help="Observed nucleus, e.g. 1H, 13C, 19F."),
    solvent: str = typer.Option(None, help="Solvent, e.g. CDCl3, toluene-d8."),
    field: str = typer.Option(
        None, "--field", "--mhz", help="Spectrometer frequency, e.g. '400 MHz'."
    ),
    dg: str = typer.Option(None, help="ΔG‡ with unit, e.g. '14.2 ± 0.3 kcal/mol'."),
    dg_t: str = typer.Option(None, "--dg-t", help="Temperature ΔG‡ refers to (default Tc)."),
    dh: str = typer.Option(None, help="ΔH‡ with unit."),
    ds: str = typer.Option(None, help="ΔS‡ with unit, e.g. '-5 e.u.'."),
    ea: str = typer.Option(None, help="Arrhenius Ea with unit."),
    log10_a: str = typer.Option(
        None, "--log10-a", help="log10 of the Arrhenius A factor (A in s-1)."
    ),
    tc: str = typer.Option(None, help="Coalescence temperature, e.g. '-12 °C'."),
    dnu: str = typer.Option(None, help="Slow-exchange separation, e.g. '24 Hz' or '0.06 ppm'."),
    j: str = typer.Option(
        None, "--j", help="Coupling between the exchanging sites (AB), e.g. '12 Hz'."
    ),
    population: str = typer.Option(
        None, help="Populations: '60:40', '3:1', '1.5' (major/minor), '25%', 'p = 0.25'."
    ),
    direction: str = typer.Option(
        None, help="Unequal populations: major-to-minor or minor-to-major (which barrier ΔG‡ is)."
    ),
    convention: str = typer.Option(
        None,
        help="Which rate constant k and ΔG‡ mean: per-site (k_AB), exchange (k_ex = k_AB + "
        "k_BA), observed, enantiomerization, racemization (k_rac = 2·k_enant).",
    ),
    degeneracy: str = typer.Option(
        None, help="Path degeneracy (statistical factor σ, a whole number ≥ 1; default 1)."
    ),
    kappa: str = typer.Option(None, help="Transmission coefficient κ (default 1)."),
    order: str = typer.Option(
        None, help="Reaction order: 1, or 2 for a bimolecular exchange (needs --concentration)."
    ),
    concentration: str = typer.Option(
        None, help="Partner concentration for order 2, e.g. '0.05 M' (ΔG‡ then refers to 1 M)."
    ),
    calibration: str = typer.Option(
        None,
        help="How the probe temperature was calibrated: methanol, ethylene glycol, thermocouple, "
        "none, other; optionally with σ(T), e.g. 'methanol ± 0.3 K'.",
    ),
    dh_ds_corr: str = typer.Option(
        None, "--dh-ds-corr", help="Correlation of ΔH‡ and ΔS‡ from their fit (−1 … 1)."
    ),
    mixing: str = typer.Option(
        None, help="EXSY mixing time(s), e.g. '0.3 s' or '0, 100 ms, 300 ms' (0: reference)."
    ),
    volumes: str = typer.Option(
        None,
        help="EXSY peak volumes, one matrix per mixing time: 'I_AA,I_AB;I_BA,I_BB' (rows split "
        "at ';', matrices at '|').",
    ),
    volume_err: str = typer.Option(None, "--volume-err", help="σ of one EXSY volume."),
    populations: str = typer.Option(
        None, help="EXSY site populations: '0.7,0.3', '70,30' or '7:3'."
    ),
    site_names: str = typer.Option(None, "--site-names", help="EXSY site names, e.g. 'A,B'."),
    ratio: str = typer.Option(
        None, help="Saturation transfer: M_ss/M0 of the observed site, partner saturated."
    ),
    t1: str = typer.Option(
        None, "--t1", help="T1 of the observed site measured while the partner is saturated."
    ),
    t1_intrinsic: str = typer.Option(
        None, "--t1-intrinsic", help="Or its T1 without exchange (intrinsic) instead."
    ),
    course: str = typer.Option(
        None,
        help="Time-course file (CSV/.xlsx): 't (min)' and 'ee (%)' or 'fraction', or two "
        "intensity columns after a selective inversion; stored as text.",
    ),
    course_quantity: str = typer.Option(
        None, "--course-quantity", help="What the course follows: ee, fraction or inversion."
    ),
    x_eq: str = typer.Option(
        None, "--x-eq", help="Equilibrium fraction of a fraction course, if known."
    ),
    theory: str = typer.Option(
        None, help="Computed barrier: level of theory as written, e.g. 'ωB97X-D/def2-TZVP, SMD'."
    ),
    functional: str = typer.Option(None, help="Computed: electronic-structure method."),
    basis: str = typer.Option(None, help="Computed: basis set."),
    solvation: str = typer.Option(None, help="Computed: solvation model, e.g. 'SMD(CHCl3)'."),
    conformers: str = typer.Option(None, help="Computed: how conformers were treated."),
    standard_state: str = typer.Option(
        None, "--standard-state", help="Computed: 1 M, 1 atm or 1 bar."
    ),
    t_min: str = typer.Option(None, "--t-min", help="Lowest temperature measured."),
    t_max: str = typer.Option(None, "--t-max", help="Highest temperature measured."),
    rate: list[str] = typer.Option(
        None, "--rate", help="A rate point 'T, k', e.g. '298 K, 12.5 s-1' (repeat)."
    ),
    reference: str = typer.Option(None, help="DOI, citation or notebook page."),
    label: str = typer.Option(None, help="Label of this measurement (e.g. a notebook code)."),
    status: str = typer.Option(
        None, help="draft (default) or reviewed; the checks set 'flagged' themselves."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Add one measurement; values take units in any usual notation."""
    # long: only by its option declarations; the body builds the entry and renders
    from registry import api

    rates = []
    for text in rate or []:
        if "," not in text:
            raise UsageError(f"--rate {text!r}: write 'T, k', e.g. '298 K, 12.5 s-1'")
        t_text, k_text = (part.strip() for part in text.split(",", 1))
        rates.append((t_text, k_text))
    smiles = _smiles_or_molfile(smiles, molfile)
    raw = _raw_options(mixing, volumes, volume_err, populations, site_names, ratio, t1,
                       t1_intrinsic, course, course_quantity, x_eq)  # fmt: skip
    entry = dict(**raw,
        method=method, smiles=smiles, compound=compound, name=name, process=process, sites=sites,
        nucleus=nucleus, solvent=solvent, field=field, dg=dg, dg_t=dg_t, dh=dh, ds=ds, ea=ea,
        log10_a=log10_a, tc=tc, dnu=dnu, j=j, population=population, t_min=t_min, t_max=t_max,
        direction=direction, convention=convention, degeneracy=degeneracy, kappa=kappa,
        order=order, concentration=concentration, calibration=calibration,
        dh_ds_corr=dh_ds_corr, theory=theory, functional=functional, basis=basis,
        solvation=solvation, conformers=conformers, standard_state=standard_state,
        reference=reference, label=label, status=status, rates=rates,
        units={"field": "MHz"},  # the option is --mhz/--field: a bare number means MHz
    )  # fmt: skip
    st = state(ctx)
    database = api.open_registry(st.db)
    measurement_id = api.add_measurement(database, entry, actor=st.actor)
    record = api.get_measurement(database, measurement_id)
    if as_json:
        render_record(record, as_json=True)
    else:
        typer.echo(
            f"added measurement {measurement_id} ({record['compound'].get('label') or record['compound'].get('name') or ''})"
        )
        for finding in record["findings"]:
            typer.echo(f"  {finding['severity']}: {finding['message']}")
            if finding.get("likely_cause"):
                typer.echo(f"    likely cause: {finding['likely_cause']}")
        if record["flagged"]:
            typer.echo(f"  status flagged: {_FLAGGED_NOTE}")


def _raw_options(
    mixing: str | None, volumes: str | None, volume_err: str | None, populations: str | None,
    site_names: str | None, ratio: str | None, t1: str | None, t1_intrinsic: str | None,
    course: str | None, course_quantity: str | None, x_eq: str | None,
) -> dict[str, Any]:  # fmt: skip
    """The raw-data fields of ``add``: one T1 (saturated or intrinsic), the course file read."""
    from registry import api

    if t1 is not None and t1_intrinsic is not None:
        raise UsageError("give --t1 (partner saturated) or --t1-intrinsic, not both")
    return dict(
        mixing=mixing, volumes=volumes, volume_err=volume_err, site_populations=populations,
        site_names=site_names, ss_ratio=ratio, t1=t1 if t1 is not None else t1_intrinsic,
        t1_kind="intrinsic" if t1_intrinsic is not None else None,
        course=None if course is None else api.course_text(course),
        course_quantity=course_quantity, x_eq=x_eq,
    )  # fmt: skip


def show(
    ctx: typer.Context,
    measurement_id: str = typer.Argument(..., help="Measurement id."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Everything stored about one measurement."""
    from registry import api

    database = api.open_registry(state(ctx).db)
    record = api.get_measurement(database, read_id(measurement_id))
    if as_json:
        render_record(record, as_json=True)
        return
    typer.echo(_show_text(record))


def _fmt(value: Any, err: Any, unit: str, text: Any) -> str:
    if value is None:
        return "—"
    core = f"{value:.2f}" + (f" ± {err:.2f}" if err else "") + f" {unit}"
    return f"{core}   (reported: {text})" if text else core


#: what a flagged measurement's mark says (add, show)
_FLAGGED_NOTE = (
    "left out of barrier ranges, overview plots and paper tables unless asked for, until the "
    "finding is resolved or accepted"
)


def _show_text(r: dict[str, Any]) -> str:
    c, p = r["compound"], r["process"] or {}
    lines = [
        f"measurement {r['id']}  [{r['status']}]" + (f"  label {r['label']}" if r["label"] else ""),
        f"  compound     {c.get('label') or ''} {c.get('name') or ''}".rstrip(),
        f"  SMILES       {c.get('smiles_canonical') or c.get('smiles_input') or '—'}",
    ]
    if r["flagged"]:
        open_ids = ", ".join(
            str(f["id"])
            for f in r["findings"]
            if f["severity"] == "error" and not f.get("accepted_by")
        )
        lines.insert(1, f"  FLAGGED      error finding {open_ids} open: {_FLAGGED_NOTE}")
    if c.get("inchikey"):
        lines.append(f"  InChIKey     {c['inchikey']}")
    if c and not c.get("structure_ok", True):
        lines.append(f"  structure    kept unsanitized: {c.get('structure_problem')}")
    if p:
        lines.append(
            f"  process      {p.get('kind')}  {p.get('sites') or ''}  {p.get('nucleus') or ''}".rstrip()
        )
    lines += [
        f"  method       {r['method']}",
        f"  solvent      {r['solvent_text'] or '—'}"
        + ("" if r["solvent_id"] or not r["solvent_text"] else "  (not in the solvent table)"),
        f"  field        {_fmt(r['field_mhz'], None, 'MHz', r['field_text'])}",
        f"  ΔG‡          {_fmt(r['dg_kj_mol'], r['dg_err_kj_mol'], 'kJ/mol', r['dg_text'])}",
        f"  at T         {_fmt(r['dg_t_k'], None, 'K', r['dg_t_text'])}",
    ]
    for key, label, unit in (("dh", "ΔH‡", "kJ/mol"), ("ea", "Ea", "kJ/mol")):
        if r[f"{key}_kj_mol"] is not None:
            lines.append(
                f"  {label:<12} {_fmt(r[f'{key}_kj_mol'], r[f'{key}_err_kj_mol'], unit, r[f'{key}_text'])}"
            )
    if r["ds_j_mol_k"] is not None:
        lines.append(
            f"  ΔS‡          {_fmt(r['ds_j_mol_k'], r['ds_err_j_mol_k'], 'J/(mol·K)', r['ds_text'])}"
        )
    if r["t_min_k"] is not None or r["t_max_k"] is not None:
        lines.append(
            f"  T range      {_fmt(r['t_min_k'], None, 'K', None)} … {_fmt(r['t_max_k'], None, 'K', None)}"
        )
    lines += _recorded_lines(r)
    for co in r["coalescence"]:
        extra = (f", J {co['j_hz']:.1f} Hz" if co["j_hz"] else "") + (
            f", populations {co['population_text']}" if co["population_text"] else ""
        )
        lines.append(
            f"  coalescence  Tc {co['tc_k']:.1f} K ({co['tc_text']}), Δν {co['dnu_hz']:.2f} Hz ({co['dnu_text']}){extra}"
        )
    lines += raw_data_lines(r.get("raw_data"))
    if r["rate_points"]:
        lines.append(f"  rate points  {len(r['rate_points'])}")
        lines += rate_fit_lines(r["rate_points"])
    lines.append(f"  reference    {r['reference'] or '—'}")
    lines.append(f"  entered      {r['entered_by']} at {r['entered_at']}")
    if r["extra"]:
        lines.append(f"  other        {json.dumps(r['extra'], ensure_ascii=False)}")
    for f in r["findings"]:
        accepted = (
            f"  (accepted by {f['accepted_by']}: {f['accept_reason']})"
            if f.get("accepted_by")
            else ""
        )
        lines.append(f"  {f['severity']:<8}     [{f['rule_id']}] {f['message']}{accepted}")
    lines.append(f"  history      {r['revision_count']} revision(s)")
    return "\n".join(lines)


def _recorded_lines(r: dict[str, Any]) -> list[str]:
    """ΔG‡ at 298.15 K, which rate constant the values mean, and the temperature calibration."""
    lines = []
    at = r.get("at_298")
    if at is not None:
        err = "σ not available (no ΔH‡/ΔS‡ correlation stored)"
        if at["dg_err_kj_mol"] is not None:
            err = f"± {at['dg_err_kj_mol']:.2f}"
        where = {"yes": ", extrapolated beyond the measured range", "no": ""}.get(
            at["extrapolated"], ", measured range unknown"
        )
        lines.append(
            f"  ΔG‡(298.15 K) {at['dg_kj_mol']:.2f} kJ/mol {err} (ΔH‡ − TΔS‡{where})".rstrip()
        )
    rec = r["recorded"]
    if rec["convention"]:
        k = f"{rec['convention']}: {rec['convention_meaning']}"
    else:
        k = f"unspecified (the checks read it as {rec['convention_read_as']})"
    extras = []
    if rec["degeneracy"] is not None:
        extras.append(f"path degeneracy {rec['degeneracy']}")
    if rec["kappa"] is not None:
        extras.append(f"κ {rec['kappa']:g}")
    if rec["order"] == 2:
        extras.append(
            f"bimolecular at {rec['concentration_m']:g} mol/L: ΔG‡ refers to the 1 M standard state"
        )
    elif rec["order"] == 1:
        extras.append("first order")
    if rec["direction"]:
        extras.append(f"ΔG‡ {rec['direction']}")
    lines.append(f"  rate const.  {k}" + (f"; {', '.join(extras)}" if extras else ""))
    lines += _theory_lines(r)
    if r.get("method") == "computed":
        return lines
    if rec["calibration"]:
        how = "default for it" if rec["calibration_default_sigma"] else "as stated"
        lines.append(
            f"  T calibr.    {r['t_calibration_text']}: σ(T) {rec['calibration_sigma_k']:g} K "
            f"({how})"
        )
    else:
        lines.append("  T calibr.    not recorded")
    return lines


_THEORY_SHOWN = (
    ("theory_level", "theory"), ("theory_method", "  method"), ("theory_basis", "  basis"),
    ("theory_solvation", "  solvation"), ("theory_conformers", "  conformers"),
    ("standard_state", "std. state"),
)  # fmt: skip


def _theory_lines(r: dict[str, Any]) -> list[str]:
    """How a computed barrier was computed (only what was recorded)."""
    return [f"  {title:<13}{r[col]}" for col, title in _THEORY_SHOWN if r.get(col)]


def list_cmd(
    ctx: typer.Context,
    compound: str = typer.Option(None, help="Compound label or name contains this text."),
    method: str = typer.Option(None, help="Only this method."),
    solvent: str = typer.Option(
        None,
        help="Solvent: a name or alias, a class (chlorinated, nonpolar …) or part of the text.",
    ),
    process: str = typer.Option(None, help="Only this process kind."),
    status: str = typer.Option(None, help="Only this status."),
    barrier: str = typer.Option(
        None, "--barrier", help="ΔG‡ range in any unit: '>= 22 kcal/mol', '80-100 kJ/mol'."
    ),
    barrier_min: str = typer.Option(
        None, "--barrier-min", help="Lowest ΔG‡, any unit, e.g. '15 kcal/mol'."
    ),
    barrier_max: str = typer.Option(None, "--barrier-max", help="Highest ΔG‡, any unit."),
    at: str = typer.Option(
        None,
        "--at",
        help="Compare barriers at one temperature, e.g. '298.15 K': ΔG‡ = ΔH‡ − TΔS‡ where "
        "both are stored (marked when extrapolated); --barrier and --sort barrier use it.",
    ),
    sort: str = typer.Option(
        None, "--sort", help="id, barrier, -barrier, temperature, -temperature, compound, solvent."
    ),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Show retracted measurements too."
    ),
    flagged: bool = flags.FLAGGED,
    clean: bool = flags.CLEAN,
    limit: int = typer.Option(None, help="At most this many rows."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON (one object per measurement)."),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
) -> None:
    """List measurements with basic filters (flagged ones are marked)."""
    from registry import api

    only = flags.choice(flagged, clean)
    database = api.open_registry(state(ctx).db)
    rows = api.list_measurements(
        database, compound=compound, method=method, solvent=solvent, process=process,
        status=status, barrier=barrier, barrier_min=barrier_min, barrier_max=barrier_max,
        include_retracted=include_retracted, flagged=only, limit=limit, at=at, sort=sort,
    )  # fmt: skip
    if as_json or as_csv:
        render_rows(rows, as_json=as_json, as_csv=as_csv)
        return
    columns = list(api.TABLE_COLUMNS["list"])
    if at is not None:  # ΔG‡ at the common temperature beside each reported ΔG‡ and its T
        at_columns = ["dg_at_kj_mol", "dg_at_err_kj_mol", "at_t_k", "extrapolated"]
        columns[columns.index("dg_t_k") + 1 : columns.index("dg_t_k") + 1] = at_columns
    render_rows(flags.marked(rows), columns=columns)
