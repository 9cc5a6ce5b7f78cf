"""Docs checked against the code: every command has help text and is shown in the README."""

from __future__ import annotations

from pathlib import Path

import typer

from registry.cli.main import app

ROOT = Path(__file__).resolve().parent.parent


def _commands() -> list[tuple[str, object]]:
    root = typer.main.get_command(app)
    found: list[tuple[str, object]] = []

    def walk(prefix: str, command: object) -> None:
        subs = getattr(command, "commands", None)
        if subs:
            for name, sub in subs.items():
                walk(f"{prefix} {name}".strip(), sub)
        else:
            found.append((prefix, command))

    walk("", root)
    return found


def test_every_command_has_help_text() -> None:
    missing = [name for name, cmd in _commands() if not (getattr(cmd, "help", None) or "").strip()]
    assert missing == []


def test_every_command_is_mentioned_in_the_readme() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    missing = [name for name, _ in _commands() if f"fluxledger {name}" not in readme]
    assert missing == []


def test_readme_opens_with_the_job_and_shows_the_two_commands() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    first_paragraph = readme.split("\n\n")[1]
    assert "barrier" in first_paragraph
    assert "make demo" in readme
    assert "make test" in readme


def test_ci_runs_the_readme_test_command() -> None:
    assert "make test" in (ROOT / ".ci" / "run").read_text(encoding="utf-8")


def test_every_command_takes_json() -> None:
    lacking = []
    for name, cmd in _commands():
        params = {opt for p in getattr(cmd, "params", []) for opt in getattr(p, "opts", [])}
        if "--json" not in params:
            lacking.append(name)
    assert lacking == []


def test_the_readme_script_example_runs(tmp_path: Path) -> None:
    """The Python example in the README adds rows, checks them once and prints the summary."""
    import contextlib
    import io
    from types import SimpleNamespace

    from registry import api

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("### Adding from a Python script", 1)[1]
    code = section.split("```python\n", 1)[1].split("```", 1)[0]
    db = tmp_path / "group.sqlite"
    api.init_registry(str(db))
    code = code.replace('"group.sqlite"', repr(str(db)))
    # invented rows: Tc 52 °C, Δν 40 Hz gives ΔG‡ ≈ 16.2 kcal/mol (Gutowsky–Holm k_c = πΔν/√2,
    # J. Chem. Phys. 25, 1228 (1956), in the Eyring equation with CODATA constants), so 19.0 is an error
    rows = [
        SimpleNamespace(smiles="CC(=O)N(C)C", tc=52, dnu=40, dg=16.0, doi="10.0000/invented.1"),
        SimpleNamespace(smiles="CN(C)C=O", tc=52, dnu=40, dg=19.0, doi="10.0000/invented.2"),
    ]
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code, "README.md", "exec"), {"my_rows": rows})
    assert "checked 2 measurements: 1 error" in out.getvalue()
    database = api.open_registry(str(db))
    assert [m["id"] for m in api.list_measurements(database)] == [1, 2]
    database.dispose()


def test_the_readme_search_example_runs(tmp_path: Path) -> None:
    """The README's library search finds the hindered biaryl above 90 kJ/mol in a non-polar
    solvent and leaves out the rest (invented measurements on real structures)."""
    import contextlib
    import io

    from registry import api
    from registry.record.entry import EntryInput

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("### Searching from Python", 1)[1]
    code = section.split("```python\n", 1)[1].split("```", 1)[0]
    db = tmp_path / "group.sqlite"
    api.init_registry(str(db))
    database = api.open_registry(str(db))
    for smiles, label, dg, solvent in (
        ("Oc1ccc2ccccc2c1-c1c(O)ccc2ccccc12", "BINOL", "155 kJ/mol", "toluene-d8"),
        ("Cc1ccccc1-c1ccccc1C", "DMBP", "75 kJ/mol", "toluene-d8"),  # below the range
        ("COc1cccc(OC)c1-c1c(C)cccc1C", "TMB", "120 kJ/mol", "DMSO-d6"),  # polar solvent
        ("CC(=O)N(C)C", "DMA", "76 kJ/mol", "C6D6"),  # not a biaryl
    ):
        api.add_measurement(
            database,
            EntryInput(method="lineshape", smiles=smiles, compound=label, dg=dg, solvent=solvent,
                       process="bond-rotation"),
        )  # fmt: skip
    database.dispose()
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code.replace('"group.sqlite"', repr(str(db))), "README.md", "exec"), {})
    lines = out.getvalue().splitlines()
    assert lines[0].startswith("BINOL 155")
    assert lines[-1] == "1 measurement(s) on 1 compound(s)"


def test_the_readme_notebook_example_runs(tmp_path: Path) -> None:
    """The notebook example lists rotation barriers as a DataFrame, averages them by solvent and
    finds the amides (invented measurements on real structures)."""
    import contextlib
    import io

    from registry import api

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("### The registry in a notebook", 1)[1]
    code = section.split("```python\n", 1)[1].split("```", 1)[0]
    db = tmp_path / "group.sqlite"
    api.init_registry(str(db))
    database = api.open_registry(str(db))
    for smiles, label, dg, solvent in (
        ("CC(=O)N(C)C", "DMA", "76 kJ/mol", "CDCl3"),
        ("CN(C)C=O", "DMF", "88 kJ/mol", "CDCl3"),
        ("CN(C)C(=O)c1ccccc1", "DMB", "62 kJ/mol", "toluene-d8"),
        ("Cc1ccccc1-c1ccccc1C", "DMBP", "55 kJ/mol", "toluene-d8"),  # below the range
    ):
        api.add_measurement(
            database,
            dict(method="lineshape", smiles=smiles, compound=label, dg=dg, solvent=solvent,
                 process="bond-rotation"),
        )  # fmt: skip
    database.close()
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code.replace('"group.sqlite"', repr(str(db))), "README.md", "exec"), {})
    printed = out.getvalue()
    # the mean of 76 and 88 kJ/mol in CDCl3, and the one 62 kJ/mol row in toluene-d8
    assert "CDCl3" in printed and "82.0" in printed and "62.0" in printed
    assert "CC(=O)N(C)C" in printed  # the first row's compound, as RDKit writes it
    assert "3 amide measurement(s)" in printed
